"""A pure-sympy stand-in for the parameter field QQ(p1, ..., pk).

It wraps sympy's own fraction field (``sympy.polys.fields``), whose elements
already support the arithmetic protocol.  It is slower than the python-flint
field but has no compiled dependency; the test suite runs both on the same
computations and compares the results.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any, Sequence

import sympy
from sympy.polys.domains import QQ
from sympy.polys.fields import FracElement, field
from sympy.polys.rings import PolyRing

from .field import Element, Field, PolynomialRing, RingElement

__all__ = ["SympyRationalFunctionField", "SympyPolynomialRing"]


class SympyRationalFunctionField(Field):
    """QQ(p1, ..., pk) on sympy's ``FracField`` (k >= 0).

    Examples
    --------
    >>> import sympy
    >>> a = sympy.Symbol("a")
    >>> K = SympyRationalFunctionField([a])
    >>> K.to_sympy(K.from_sympy((a**2 - 1) / (a - 1)))
    a + 1
    """

    backend = "sympy"

    def __init__(self, symbols: Sequence[sympy.Symbol]) -> None:
        self.symbols = tuple(symbols)
        if self.symbols:
            self._field, *gens = field(list(self.symbols), QQ)
            self.gens = tuple(gens)
        else:
            self._field = QQ
            self.gens = ()
        self.zero = self(0)
        self.one = self(1)
        self.ring = SympyPolynomialRing(self.symbols,
                                        self._field.ring if self.symbols else None)

    def __call__(self, value: object) -> Element:
        if self.symbols and isinstance(value, FracElement):
            return value
        if isinstance(value, (Fraction, sympy.Rational)):
            value = QQ(int(value.numerator), int(value.denominator))
        elif isinstance(value, int):
            value = QQ(value)
        if not self.symbols:
            if isinstance(value, type(QQ(1))):
                return value
            raise TypeError(f"cannot convert {value!r} into QQ")
        return self._field.field_new(value) if hasattr(self._field, "field_new") else self._field(value)

    def from_sympy(self, expr: sympy.Expr) -> Element:
        expr = sympy.sympify(expr, strict=True)
        if not self.symbols:
            if not expr.is_Rational:
                raise ValueError(f"{expr} is not a rational number")
            return QQ(int(expr.p), int(expr.q))
        x = self._field.from_expr(expr)
        # from_expr does not make the denominator canonical (its leading
        # coefficient can be negative), so equal elements could compare
        # unequal; new() cancels and fixes the sign.
        return self._field.new(x.numer, x.denom)

    def to_sympy(self, x: Element) -> sympy.Expr:
        if not self.symbols:
            return QQ.to_sympy(x)
        return x.as_expr()

    def size(self, x: Element) -> int:
        if not self.symbols:
            return int(x.numerator).bit_length() + int(x.denominator).bit_length()
        return len(x.numer) + len(x.denom)

    # -- the polynomial-ring view ---------------------------------------------------------
    def numerator(self, x: Element) -> RingElement:
        if not self.symbols:
            return int(x.numerator)
        return self._integral(x)[0]

    def denominator(self, x: Element) -> RingElement:
        if not self.symbols:
            return int(x.denominator)
        return self._integral(x)[1]

    def _integral(self, x):
        """``(n, d)`` with integer coefficients and ``x = n / d``."""
        cn, n = self.ring.primitive(x.numer)
        cd, d = self.ring.primitive(x.denom)
        r = cn / cd
        return n * int(r.numerator), d * int(r.denominator)

    def from_ring(self, num: RingElement, den: RingElement | None = None) -> Element:
        if not self.symbols:
            value = QQ(int(num))
            return value if den is None else value / QQ(int(den))
        value = self._field.new(num)
        return value if den is None else value / self._field.new(den)

    def derivative(self, x: Element, symbol: sympy.Symbol) -> Element:
        if not self.symbols:
            raise ValueError(f"{symbol} is not a generator of QQ")
        i = self.symbols.index(symbol)
        return x.diff(self.gens[i])

    def __repr__(self) -> str:
        return f"QQ({', '.join(map(str, self.symbols))})[sympy]"


class SympyPolynomialRing(PolynomialRing):
    """The polynomial-ring view of the stand-in: sympy's ``PolyRing`` over QQ
    (elements with integer coefficients), or Python integers when there are
    no generators.  A ring extended by one variable puts it first, where
    sympy's resultant eliminates."""

    backend = "sympy"

    def __init__(self, symbols: Sequence[sympy.Symbol], ring: PolyRing | None = None,
                 base: Any = None) -> None:
        self.symbols = tuple(symbols)
        self.base = base
        self._ring: Any = ring if ring is not None or not self.symbols else \
            PolyRing(self.symbols, QQ)
        self.zero = self(0)
        self.one = self(1)
        self._extensions: dict = {}

    def __call__(self, n: int) -> RingElement:
        return self._ring(int(n)) if self._ring is not None else int(n)

    def from_dict(self, data: dict) -> RingElement:
        if self._ring is None:
            return int(data.get((), 0))
        return self._ring.from_dict({m: QQ(int(c)) for m, c in data.items()}) if data \
            else self._ring.zero

    def to_dict(self, p: RingElement) -> dict:
        if self._ring is None:
            return {(): int(p)} if p else {}
        return {tuple(m): int(c) for m, c in p.terms()}

    def from_sympy(self, expr: sympy.Expr) -> RingElement:
        if self._ring is None:
            return int(expr)
        return self._ring.from_expr(expr)

    def primitive(self, p: RingElement) -> tuple:
        """``(c, p / c)`` with integer coefficients of content one (sign
        kept), for a polynomial with rational coefficients."""
        if self._ring is None:
            return 1, int(p)
        if not p:
            return 1, p
        from math import gcd, lcm
        coeffs = p.coeffs()
        den = lcm(*(int(c.denominator) for c in coeffs))
        num = gcd(*(int(c.numerator * (den // c.denominator)) for c in coeffs))
        c = QQ(num, den)
        return c, p.quo_ground(c)

    def exquo(self, a: RingElement, b: RingElement) -> RingElement:
        return a.exquo(b) if self._ring is not None else a // b

    def gcd(self, a: RingElement, b: RingElement) -> RingElement:
        if self._ring is None:
            from math import gcd
            return gcd(a, b)
        return self.primitive(a.gcd(b))[1]

    def is_one(self, p: RingElement) -> bool:
        return p == 1

    def factor(self, p: RingElement) -> tuple:
        if self._ring is None:
            return int(p), []
        content, factors = p.factor_list()
        out = []
        for f, m in factors:
            c, f = self.primitive(f)
            content = content * c ** m
            out.append((f, int(m)))
        return content, out

    def degrees(self, p: RingElement) -> dict:
        if self._ring is None or not p:
            return {}
        return dict(zip(self.symbols, p.degrees()))

    def coefficients_in(self, p: RingElement, symbol: sympy.Symbol) -> dict:
        if symbol not in self.symbols:
            return {0: p} if p else {}
        i = self.symbols.index(symbol)
        buckets: dict = {}
        for monom, coeff in p.terms():
            rest = monom[:i] + (0,) + monom[i + 1:]
            buckets.setdefault(monom[i], {})[rest] = coeff
        return {k: self._ring.from_dict(d) for k, d in buckets.items()}

    def evaluate(self, p: RingElement, point: Sequence[int]) -> int:
        if self._ring is None:
            return int(p)
        v = p(*point) if len(self.symbols) > 1 else p(point[0])
        return int(v)

    def constant(self, p: RingElement) -> int:
        if self._ring is None:
            return int(p)
        if not p.is_ground:
            raise ValueError(f"{p} is not a constant")
        return int(p.LC) if p else 0

    def to_sympy(self, p: RingElement) -> sympy.Expr:
        if self._ring is None:
            return sympy.Integer(int(p))
        return p.as_expr()

    def project(self, p: RingElement, ring: "SympyPolynomialRing") -> RingElement:
        keep = [self.symbols.index(s) for s in ring.symbols]
        return ring.from_dict({tuple(m[i] for i in keep): c for m, c in self.to_dict(p).items()})

    def extend(self, name: str) -> "SympyPolynomialRing":
        hit = self._extensions.get(name)
        if hit is None:
            hit = self._extensions[name] = SympyPolynomialRing(
                (sympy.Symbol(name),) + self.symbols, base=self)
        return hit

    def from_coefficients(self, coeffs: Sequence[RingElement]) -> RingElement:
        data = {}
        for k, c in enumerate(coeffs):
            for monom, v in self.base.to_dict(c).items():
                data[(k,) + tuple(monom)] = v
        return self.from_dict(data)

    def split(self, p: RingElement) -> dict:
        out: dict = {}
        for monom, v in p.terms():
            out.setdefault(monom[0], {})[tuple(monom[1:])] = int(v)
        return {k: self.base.from_dict(d) for k, d in out.items()}

    def resultant(self, a: RingElement, b: RingElement) -> RingElement:
        r = a.resultant(b)
        if self.base._ring is None:
            return int(r.LC) if hasattr(r, "LC") else int(r)
        if getattr(r, "ring", None) is not self.base._ring:
            r = self.base._ring.from_dict(dict(r.terms())) if r else self.base._ring.zero
        return r

    def __repr__(self) -> str:
        return f"ZZ[{', '.join(map(str, self.symbols))}][sympy]"

