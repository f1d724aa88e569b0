"""The parameter field on python-flint: QQ(p1, ..., pk) and QQ itself.

Elements of QQ(p1, ..., pk) are reduced fractions ``num/den`` of integer
multivariate polynomials (``flint.fmpz_mpoly``) with ``gcd(num, den) = 1`` and
a positive leading coefficient of ``den``, so that equality is equality of
representations.  Addition and multiplication follow Henrici's scheme: the
gcds are taken of the smallest possible operands.

With no parameters the field is QQ and its elements are plain ``flint.fmpq``
numbers, which already carry the arithmetic protocol.

Both fields implement the protocol of :mod:`criticality.algebra.field`.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any, Sequence

import flint
import sympy

from .field import Element, Field, PolynomialRing, RingElement
from .flint_quadratic import CommonDenominatorElement

__all__ = ["FlintRationalFunctionField", "FlintRationalField", "RationalFunction",
           "FlintPolynomialRing"]

_fmpz_mpoly = flint.fmpz_mpoly
_fmpq = flint.fmpq
_fmpz = flint.fmpz


class RationalFunction:
    """A reduced fraction of two ``fmpz_mpoly`` over one context."""

    __slots__ = ("num", "den", "field")

    def __init__(self, num: RingElement, den: RingElement, field: Any) -> None:
        # callers guarantee: gcd(num, den) == 1 and den normalised
        self.num = num
        self.den = den
        self.field = field

    # -- construction helpers ------------------------------------------------
    def _coerce(self, other):
        if isinstance(other, RationalFunction):
            return other
        if isinstance(other, (int, _fmpz, _fmpq, Fraction)):
            return self.field(other)
        return None

    # -- arithmetic ------------------------------------------------------------
    def __add__(self, other: Element) -> "RationalFunction":
        other = self._coerce(other)
        if other is None:
            return NotImplemented
        a, b, c, d = self.num, self.den, other.num, other.den
        if b.is_one() and d.is_one():
            return RationalFunction(a + c, b, self.field)
        if b == d:
            num = a + c
            g = num.gcd(b)
            if g.is_one():
                return RationalFunction(num, b, self.field)
            return self.field._normalised(num / g, b / g)
        g = b.gcd(d)
        if g.is_one():
            return RationalFunction(a * d + c * b, b * d, self.field)
        bg, dg = b / g, d / g
        num = a * dg + c * bg
        g2 = num.gcd(g)
        if g2.is_one():
            return RationalFunction(num, bg * d, self.field)
        return self.field._normalised(num / g2, bg * (d / g2))

    __radd__ = __add__

    def __neg__(self) -> "RationalFunction":
        return RationalFunction(-self.num, self.den, self.field)

    def __sub__(self, other: Element) -> "RationalFunction":
        other = self._coerce(other)
        if other is None:
            return NotImplemented
        return self + (-other)

    def __rsub__(self, other: Element) -> "RationalFunction":
        other = self._coerce(other)
        if other is None:
            return NotImplemented
        return other + (-self)

    def __mul__(self, other: Element) -> "RationalFunction":
        other = self._coerce(other)
        if other is None:
            return NotImplemented
        a, b, c, d = self.num, self.den, other.num, other.den
        if a.is_zero() or c.is_zero():
            return self.field.zero
        if b.is_one() and d.is_one():
            return RationalFunction(a * c, b, self.field)
        if other is self or (a == c and b == d):
            # a square of a reduced fraction is reduced, and den**2 has a
            # positive leading coefficient: no gcd needed
            return RationalFunction(a * a, b * b, self.field)
        g1 = a.gcd(d)
        g2 = c.gcd(b)
        if not g1.is_one():
            a, d = a / g1, d / g1
        if not g2.is_one():
            c, b = c / g2, b / g2
        return self.field._normalised(a * c, b * d, reduced=True)

    __rmul__ = __mul__

    def inverse(self) -> "RationalFunction":
        if self.num.is_zero():
            raise ZeroDivisionError("division by zero in the parameter field")
        return self.field._normalised(self.den, self.num, reduced=True)

    def __truediv__(self, other: Element) -> "RationalFunction":
        other = self._coerce(other)
        if other is None:
            return NotImplemented
        return self * other.inverse()

    def __rtruediv__(self, other: Element) -> "RationalFunction":
        other = self._coerce(other)
        if other is None:
            return NotImplemented
        return other * self.inverse()

    def __pow__(self, k: int) -> "RationalFunction":
        if not isinstance(k, int):
            return NotImplemented
        if k < 0:
            return self.inverse() ** (-k)
        return RationalFunction(self.num ** k, self.den ** k, self.field)

    # -- comparison ------------------------------------------------------------
    def __eq__(self, other: Element) -> bool:
        other = self._coerce(other)
        if other is None:
            return NotImplemented
        return self.num == other.num and self.den == other.den

    def __ne__(self, other: Element) -> bool:
        result = self.__eq__(other)
        return result if result is NotImplemented else not result

    def __hash__(self) -> int:
        return hash((str(self.num), str(self.den)))

    def __bool__(self) -> bool:
        return not self.num.is_zero()

    def __repr__(self) -> str:
        if self.den.is_one():
            return f"({self.num})"
        return f"({self.num})/({self.den})"


class FlintRationalFunctionField(Field):
    """QQ(p1, ..., pk) as reduced fractions of ``fmpz_mpoly`` (k >= 1).

    Parameters
    ----------
    symbols : sequence of sympy.Symbol
        The generators, in order.

    Examples
    --------
    >>> import sympy
    >>> a, b = sympy.symbols("a b")
    >>> K = FlintRationalFunctionField([a, b])
    >>> x = K.from_sympy((a**2 - b**2) / (a + b))
    >>> K.to_sympy(x)
    a - b
    """

    backend = "flint"
    #: the element class of quadratic extensions of this field: one common
    #: denominator for both coordinates
    quadratic_element = CommonDenominatorElement

    def __init__(self, symbols: Sequence[sympy.Symbol]) -> None:
        symbols = tuple(symbols)
        if not symbols:
            raise ValueError("use FlintRationalField for a field without generators")
        self.symbols = symbols
        self.ring = FlintPolynomialRing(symbols)
        self.ctx = self.ring.ctx
        self._one_poly = self.ring.one
        self._zero_poly = self.ring.zero
        self.zero = RationalFunction(self._zero_poly, self._one_poly, self)
        self.one = RationalFunction(self._one_poly, self._one_poly, self)
        self.gens = tuple(RationalFunction(g, self._one_poly, self) for g in self.ctx.gens())

    # -- element construction ----------------------------------------------------
    def _normalised(self, num, den, reduced: bool = False) -> RationalFunction:
        if not reduced:
            g = num.gcd(den)
            if not g.is_one():
                num, den = num / g, den / g
        if den.leading_coefficient() < 0:
            num, den = -num, -den
        return RationalFunction(num, den, self)

    def __call__(self, value: object) -> RationalFunction:
        if isinstance(value, RationalFunction):
            return value
        if isinstance(value, (int, _fmpz)):
            return RationalFunction(self._one_poly * int(value), self._one_poly, self)
        if isinstance(value, (_fmpq, Fraction, sympy.Rational)):
            q = _fmpq(int(value.numerator), int(value.denominator)) if not isinstance(value, _fmpq) else value
            num = self._one_poly * int(q.p)
            den = self._one_poly * int(q.q)
            return RationalFunction(num, den, self)
        raise TypeError(f"cannot convert {value!r} into {self}")

    def norm_form(self, a: Any, b: Any, d: Any) -> RationalFunction:
        """``a**2 - b**2 d``, the norm of ``a + b sqrt(d)``.

        Formed over ``lcm(den a, den b)**2 den d`` and reduced against the
        factors ``lcm``, ``lcm`` and ``den d`` one at a time: each gcd then
        meets a denominator, not its square, which for large norms (the
        divisions in a radical extension) costs a fraction of the plain
        ``a*a - b*b*d``.  The result is the same reduced fraction."""
        a, b, d = self(a), self(b), self(d)
        an, ad, bn, bd, dn, dd = a.num, a.den, b.num, b.den, d.num, d.den
        g = ad.gcd(bd)
        lcm = ad * (bd / g)
        ua, ub = lcm / ad, lcm / bd
        num = an * an * ua * ua * dd - bn * bn * dn * ub * ub
        if num.is_zero():
            return self.zero
        den = self._one_poly
        for part in (lcm, lcm, dd):
            if part.is_one():
                continue
            h = num.gcd(part)
            if not h.is_one():
                num, part = num / h, part / h
            den = den * part
        return self._normalised(num, den, reduced=True)

    def from_polynomials(self, num: RingElement, den: RingElement) -> RationalFunction:
        """Element ``num/den`` from two ``fmpz_mpoly`` of this field's context."""
        if den.is_zero():
            raise ZeroDivisionError("zero denominator")
        return self._normalised(num, den)

    def from_sympy(self, expr: sympy.Expr) -> RationalFunction:
        num, den = sympy.fraction(sympy.together(sympy.sympify(expr, strict=True)))
        return self._from_sympy_poly(num) / self._from_sympy_poly(den)

    def _from_sympy_poly(self, expr) -> RationalFunction:
        poly = sympy.Poly(expr, *self.symbols, domain="QQ")
        terms = poly.terms()
        denominator = 1
        for _, c in terms:
            denominator = sympy.ilcm(denominator, int(c.denominator))
        data = {m: int(c.numerator) * (denominator // int(c.denominator)) for m, c in terms}
        num = self.ctx.from_dict(data) if data else self._zero_poly
        return self._normalised(num, self._one_poly * int(denominator))

    # -- conversion back --------------------------------------------------------------
    def poly_to_sympy(self, poly: RingElement) -> sympy.Expr:
        """A ``fmpz_mpoly`` of this context as a sympy expression (one Add)."""
        return self.ring.to_sympy(poly)

    # -- the polynomial-ring view --------------------------------------------------------
    def numerator(self, x: RationalFunction) -> RingElement:
        return x.num

    def denominator(self, x: RationalFunction) -> RingElement:
        return x.den

    def from_ring(self, num: RingElement, den: RingElement | None = None) -> RationalFunction:
        if den is None or den.is_one():
            return RationalFunction(num, self._one_poly, self)
        return self.from_polynomials(num, den)

    def to_sympy(self, x: RationalFunction) -> sympy.Expr:
        num = self.poly_to_sympy(x.num)
        if x.den.is_one():
            return num
        return num / self.poly_to_sympy(x.den)

    # -- structure ---------------------------------------------------------------------
    def size(self, x: RationalFunction) -> int:
        return len(x.num) + len(x.den)

    def derivative(self, x: RationalFunction, symbol: sympy.Symbol) -> RationalFunction:
        i = self.symbols.index(symbol)
        dn = x.num.derivative(i)
        if x.den.is_one():
            return RationalFunction(dn, x.den, self)
        dd = x.den.derivative(i)
        return self._normalised(dn * x.den - x.num * dd, x.den * x.den)

    def coefficients_in(self, poly: RingElement, symbol: sympy.Symbol) -> dict[int, object]:
        """Split an ``fmpz_mpoly`` as ``{k: coefficient of symbol**k}`` (polys)."""
        i = self.symbols.index(symbol)
        buckets: dict[int, dict] = {}
        for monom, coeff in poly.to_dict().items():
            k = monom[i]
            rest = monom[:i] + (0,) + monom[i + 1:]
            buckets.setdefault(k, {})[rest] = coeff
        return {k: self.ctx.from_dict(d) for k, d in buckets.items()}

    def __repr__(self) -> str:
        return f"QQ({', '.join(map(str, self.symbols))})[flint]"


class FlintRationalField(Field):
    """QQ with ``flint.fmpq`` elements (no generators)."""

    backend = "flint"
    symbols: tuple = ()
    gens: tuple = ()

    def __init__(self) -> None:
        self.zero = _fmpq(0)
        self.one = _fmpq(1)
        self.ring = FlintPolynomialRing(())

    def numerator(self, x: Element) -> RingElement:
        return self.ring(int(x.p))

    def denominator(self, x: Element) -> RingElement:
        return self.ring(int(x.q))

    def from_ring(self, num: RingElement, den: RingElement | None = None) -> Element:
        value = _fmpq(self.ring.constant(num))
        return value if den is None else value / self.ring.constant(den)

    def __call__(self, value: object) -> Element:
        if isinstance(value, _fmpq):
            return value
        if isinstance(value, (int, _fmpz)):
            return _fmpq(int(value))
        if isinstance(value, (Fraction, sympy.Rational)):
            return _fmpq(int(value.numerator), int(value.denominator))
        raise TypeError(f"cannot convert {value!r} into QQ")

    def from_sympy(self, expr: sympy.Expr) -> Element:
        if not getattr(expr, "is_Rational", False):
            raise ValueError(f"{expr} is not a rational number")
        return _fmpq(int(expr.p), int(expr.q))

    def to_sympy(self, x: Element) -> sympy.Expr:
        return sympy.Rational(int(x.p), int(x.q))

    def size(self, x: Element) -> int:
        return int(x.p).bit_length() + int(x.q).bit_length()

    def derivative(self, x: Element, symbol: sympy.Symbol) -> Element:
        raise ValueError(f"{symbol} is not a generator of QQ")

    def __repr__(self) -> str:
        return "QQ[flint]"


class FlintPolynomialRing(PolynomialRing):
    """ZZ[p1, ..., pk] on ``flint.fmpz_mpoly``: the polynomial-ring view of the
    flint fields (k = 0 gives the integers, as constant polynomials).

    Examples
    --------
    >>> import sympy
    >>> a, b = sympy.symbols("a b")
    >>> R = FlintPolynomialRing([a, b])
    >>> p = R.from_sympy(2*a**2*b - 2*b)
    >>> [R.to_sympy(f) for f, _ in R.factor(p)[1]]
    [b, a - 1, a + 1]
    """

    backend = "flint"

    def __init__(self, symbols: Sequence[sympy.Symbol], base: Any = None) -> None:
        self.symbols = tuple(symbols)
        self.base = base
        self.ctx = flint.fmpz_mpoly_ctx.get(tuple(str(s) for s in self.symbols), "degrevlex")
        self.zero = self.ctx.from_dict({})
        self.one = self.ctx.from_dict({(0,) * len(self.symbols): 1})
        self._sympy_cache: dict = {}
        self._extensions: dict = {}

    def __call__(self, n: int) -> RingElement:
        return self.one * int(n)

    def from_dict(self, data: dict) -> RingElement:
        return self.ctx.from_dict(data) if data else self.zero

    def to_dict(self, p: RingElement) -> dict:
        return {tuple(m): int(c) for m, c in p.to_dict().items()}

    def from_sympy(self, expr: sympy.Expr) -> RingElement:
        poly = sympy.Poly(expr, *self.symbols, domain="ZZ") if self.symbols else None
        if poly is None:
            return self(int(expr))
        return self.from_dict({m: int(c) for m, c in poly.terms()})

    def exquo(self, a: RingElement, b: RingElement) -> RingElement:
        return a / b

    def gcd(self, a: RingElement, b: RingElement) -> RingElement:
        return a.gcd(b)

    def is_one(self, p: RingElement) -> bool:
        return p.is_one()

    def factor(self, p: RingElement) -> tuple:
        content, factors = p.factor()
        return int(content), [(f, int(m)) for f, m in factors]

    def degrees(self, p: RingElement) -> dict:
        return dict(zip(self.symbols, p.degrees())) if not p.is_zero() else {}

    def coefficients_in(self, p: RingElement, symbol: sympy.Symbol) -> dict:
        if symbol not in self.symbols:
            return {0: p} if not p.is_zero() else {}
        i = self.symbols.index(symbol)
        buckets: dict = {}
        for monom, coeff in p.to_dict().items():
            rest = monom[:i] + (0,) + monom[i + 1:]
            buckets.setdefault(monom[i], {})[rest] = coeff
        return {k: self.ctx.from_dict(d) for k, d in buckets.items()}

    def evaluate(self, p: RingElement, point: Sequence[int]) -> int:
        return int(p(*point)) if self.symbols else self.constant(p)

    def constant(self, p: RingElement) -> int:
        if p.is_zero():
            return 0
        if not p.is_constant():
            raise ValueError(f"{p} is not a constant")
        return int(p.coeffs()[0])

    def to_sympy(self, p: RingElement) -> sympy.Expr:
        """As a sympy expression (one Add); conversions are cached, since the
        same factor occurs in many results."""
        key = str(p)
        hit = self._sympy_cache.get(key)
        if hit is None:
            hit = self._sympy_cache[key] = _poly_to_sympy(self.symbols, p)
        return hit

    def project(self, p: RingElement, ring: "FlintPolynomialRing") -> RingElement:
        """``p`` (free of the generators ``ring`` lacks) as an element of ``ring``."""
        keep = [self.symbols.index(s) for s in ring.symbols]
        return ring.from_dict({tuple(m[i] for i in keep): c for m, c in p.to_dict().items()})

    def extend(self, name: str) -> "FlintPolynomialRing":
        hit = self._extensions.get(name)
        if hit is None:
            hit = self._extensions[name] = FlintPolynomialRing(
                self.symbols + (sympy.Symbol(name),), base=self)
        return hit

    def from_coefficients(self, coeffs: Sequence[RingElement]) -> RingElement:
        data = {}
        for k, c in enumerate(coeffs):
            for monom, v in c.to_dict().items():
                data[tuple(monom) + (k,)] = v
        return self.from_dict(data)

    def split(self, p: RingElement) -> dict:
        n = len(self.symbols) - 1
        out: dict = {}
        for monom, v in p.to_dict().items():
            out.setdefault(monom[n], {})[tuple(monom[:n])] = v
        return {k: self.base.from_dict(d) for k, d in out.items()}

    def resultant(self, a: RingElement, b: RingElement) -> RingElement:
        r = a.resultant(b, str(self.symbols[-1]))
        return self.split(r).get(0, self.base.zero)

    def __repr__(self) -> str:
        return f"ZZ[{', '.join(map(str, self.symbols))}][flint]"


def _poly_to_sympy(syms, poly) -> sympy.Expr:
    """Build the Add of monomials directly from canonically sorted
    arguments.  An expanded polynomial with integer coefficients is
    already in sympy's canonical form, so the general constructors'
    flattening (and its assumption queries, which dominate for large
    results) is skipped; the outcome is identical to
    ``sympy.Add(*(c * x**e ...))``.

    The arguments are sorted by :func:`_order_key`, which orders them the
    way sympy's ``Basic.compare`` does (the order ``_addsort`` and
    ``_mulsort`` produce) but is computed once per argument instead of once
    per comparison; for polynomials with thousands of terms the comparisons
    cost more than the rest of the conversion."""
    memo: dict = {}
    terms = []
    for monom, coeff in poly.to_dict().items():
        c = sympy.Integer(int(coeff))
        factors = [sympy.Pow(s, e) if e != 1 else s for s, e in zip(syms, monom) if e]
        if c != 1 or not factors:
            factors.insert(0, c)
        if len(factors) == 1:
            terms.append((_order_key(factors[0], memo), factors[0]))
            continue
        keyed = sorted((_order_key(f, memo), f) for f in factors)
        term = sympy.Mul._from_args([f for _, f in keyed])
        terms.append(((_MUL_RANK, len(keyed), tuple(k for k, _ in keyed)), term))
    if not terms:
        return sympy.Integer(0)
    if len(terms) == 1:
        return terms[0][1]
    terms.sort(key=lambda kt: kt[0])
    return sympy.Add._from_args([t for _, t in terms])


_CLASS_INDEX = {name: i for i, name in enumerate(sympy.core.basic.ordering_of_classes)}
_UNKNOWN_CLASS = len(_CLASS_INDEX) + 1


def _class_rank(cls) -> tuple:
    """The position of a class in ``Basic.compare``: its index in sympy's
    ``ordering_of_classes``, or after all of them by name."""
    i = _CLASS_INDEX.get(cls.__name__)
    return (i, "") if i is not None else (_UNKNOWN_CLASS, cls.__name__)


_MUL_RANK = _class_rank(sympy.Mul)


def _order_key(e, memo: dict) -> tuple:
    """A sort key that orders sympy objects as ``Basic.compare`` does: class
    rank, then the length of the hashable content, then the content item by
    item (sub-objects by this same key, plain values by ``<``)."""
    hit = memo.get(e)
    if hit is not None:
        return hit
    content = e._hashable_content()
    key = (_class_rank(type(e)), len(content),
           tuple(_order_key(x, memo) if isinstance(x, sympy.Basic) else _plain(x)
                 for x in content))
    memo[e] = key
    return key


def _plain(x):
    if isinstance(x, frozenset):  # compare() orders these as Basic(*x); not met here
        raise TypeError("internal: unordered content in a polynomial term")
    return x
