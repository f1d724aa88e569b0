"""Simple algebraic extensions L = F[t]/(m) of any degree.

A Hopf branch whose critical value is a root of an irreducible polynomial
``m(mu)`` of degree ``n`` over the parameter field is computed in
``L = K[mu]/(m)``: an element is a polynomial in the class ``t`` of ``mu`` of
degree < n with coefficients in ``K``, products are reduced modulo ``m`` and
inverses come from the extended Euclidean algorithm over ``K``.  Degree one is
the rational case; nothing in the arithmetic depends on the degree.

Which root ``t`` stands for is a matter of the embedding, not of the
arithmetic: the extension carries the sympy expression of the root (a
:class:`RealAlgebraicRoot`, or sympy's ``CRootOf`` when the coefficients are
numbers) and, over QQ, an isolating interval with rational end points which
:mod:`criticality.algebra.certified` refines to decide signs.
"""

from __future__ import annotations

from typing import Any, Sequence

from fractions import Fraction

import sympy

from . import upoly
from .field import Element, Field, RingElement

__all__ = ["AlgebraicExtension", "AlgebraicElement", "RealAlgebraicRoot"]


class AlgebraicElement:
    """``c[0] + c[1] t + ... + c[n-1] t**(n-1)`` in an :class:`AlgebraicExtension`."""

    __slots__ = ("c", "ext")

    def __init__(self, c: Sequence[Element], ext: AlgebraicExtension) -> None:
        self.c = c  # tuple of base elements, length ext.degree
        self.ext = ext

    def _coerce(self, other):
        """``other`` as a coefficient tuple, or None when it belongs to a
        higher extension (whose reflected operation then takes over)."""
        if isinstance(other, AlgebraicElement):
            if other.ext is self.ext:
                return other.c
            if other.ext.level > self.ext.level:
                return None
        level = getattr(getattr(other, "ext", None), "level", 0)
        if level > self.ext.level:
            return None
        return self.ext.scalar(other).c

    def __add__(self, other: Element) -> "AlgebraicElement":
        c = self._coerce(other)
        if c is None:
            return other.__add__(self)
        return AlgebraicElement(tuple(a + b for a, b in zip(self.c, c)), self.ext)

    __radd__ = __add__

    def __neg__(self) -> "AlgebraicElement":
        return AlgebraicElement(tuple(-a for a in self.c), self.ext)

    def __sub__(self, other: Element) -> "AlgebraicElement":
        c = self._coerce(other)
        if c is None:
            return (-other).__add__(self)
        return AlgebraicElement(tuple(a - b for a, b in zip(self.c, c)), self.ext)

    def __rsub__(self, other: Element) -> "AlgebraicElement":
        return (-self) + other

    def __mul__(self, other: Element) -> "AlgebraicElement":
        c = self._coerce(other)
        if c is None:
            return other.__mul__(self)
        return self.ext.from_list(self.ext.reduce(upoly.mul(upoly.trim(self.c), upoly.trim(c))))

    __rmul__ = __mul__

    def inverse(self) -> "AlgebraicElement":
        return self.ext.inverse(self)

    def __truediv__(self, other: Element) -> "AlgebraicElement":
        c = self._coerce(other)
        if c is None:
            return other.inverse().__mul__(self)
        return self * self.ext.inverse(AlgebraicElement(c, self.ext))

    def __rtruediv__(self, other: Element) -> "AlgebraicElement":
        return self.inverse() * other

    def __pow__(self, k: int) -> "AlgebraicElement":
        if not isinstance(k, int):
            return NotImplemented
        if k < 0:
            return self.inverse() ** (-k)
        result, base = self.ext.one, self
        while k:
            if k & 1:
                result = result * base
            base = base * base
            k >>= 1
        return result

    def __eq__(self, other: Element) -> bool:
        c = self._coerce(other)
        if c is None:
            return other.__eq__(self)
        return all(a == b for a, b in zip(self.c, c))

    def __ne__(self, other: Element) -> bool:
        r = self.__eq__(other)
        return r if r is NotImplemented else not r

    def __hash__(self) -> int:
        if not any(self.c[1:]):
            return hash(self.c[0])
        return hash(self.c)

    def __bool__(self) -> bool:
        return any(bool(a) for a in self.c)

    def __repr__(self) -> str:
        return f"[{' + '.join(f'{a!r}*{self.ext.name}^{k}' for k, a in enumerate(self.c))}]"


class AlgebraicExtension(Field):
    """``base[t]/(m)`` for an irreducible ``m`` of degree >= 1.

    Parameters
    ----------
    base : Field
        The field below.
    modulus : sequence of base elements
        The coefficients of ``m``, lowest degree first (made monic here).
    name : str
        The generator's name (for printing).
    root : sympy.Expr, optional
        The sympy expression ``t`` stands for in outputs.
    interval : (Fraction, Fraction), optional
        Over QQ: an interval with rational end points that contains exactly
        one root of ``m``, the one ``t`` stands for (real roots only).

    Examples
    --------
    >>> from criticality.algebra.flint_field import FlintRationalField
    >>> QQ = FlintRationalField()
    >>> L = AlgebraicExtension(QQ, [QQ(-2), QQ(0), QQ(0), QQ(1)], "t")   # t^3 = 2
    >>> t = L.gen
    >>> t ** 3 == L(2), (1 / (1 + t)) * (1 + t) == L.one
    (True, True)
    """

    #: an isolating interval of the root refined by the certified signs (a cache)
    _refined: tuple

    def __init__(self, base: Field, modulus: Sequence[Element], name: str,
                 root: sympy.Expr | None = None, interval: tuple | None = None) -> None:
        m = upoly.trim([base(c) for c in modulus])
        if len(m) < 2:
            raise ValueError("the modulus of an algebraic extension must have degree >= 1")
        self.base = base
        self.modulus = upoly.monic(m)
        self.degree = len(m) - 1
        self.name = name
        self.root = root if root is not None else sympy.Symbol(name)
        self.interval = interval
        self.level = getattr(base, "level", 0) + 1
        self.backend = base.backend
        self.symbols = base.symbols
        z = base.zero
        self.zero = AlgebraicElement((z,) * self.degree, self)
        self.one = self.scalar(base.one)
        self.gen = self.from_list([z, base.one])

    # -- construction ------------------------------------------------------------------
    def scalar(self, value: object) -> AlgebraicElement:
        z = self.base.zero
        return AlgebraicElement((self.base(value),) + (z,) * (self.degree - 1), self)

    def from_list(self, coeffs: Sequence[Element]) -> AlgebraicElement:
        """An element from coefficients (lowest first) of degree < n."""
        z = self.base.zero
        c = tuple(coeffs) + (z,) * (self.degree - len(coeffs))
        return AlgebraicElement(c, self)

    def __call__(self, value: object) -> AlgebraicElement:
        if isinstance(value, AlgebraicElement) and value.ext is self:
            return value
        return self.scalar(value)

    def contains(self, x: Element) -> bool:
        return isinstance(x, AlgebraicElement) and x.ext is self

    # -- arithmetic kernels ---------------------------------------------------------------
    def reduce(self, p: list[Element]) -> list[Element]:
        """``p mod m`` for a coefficient list ``p``."""
        n, m = self.degree, self.modulus
        p = list(p)
        for k in range(len(p) - 1, n - 1, -1):
            c = p[k]
            if not c:
                continue
            for j in range(n):
                if m[j]:
                    p[k - n + j] = p[k - n + j] - c * m[j]
        return p[:n]

    def inverse(self, x: AlgebraicElement) -> AlgebraicElement:
        """``1/x`` by the extended Euclidean algorithm over the base field."""
        a = upoly.trim(x.c)
        if not a:
            raise ZeroDivisionError(f"division by zero in {self}")
        if len(a) == 1:
            return self.scalar(1 / a[0])
        r0, r1 = list(self.modulus), a
        s0, s1 = [], [self.base.one]
        while len(r1) > 1:
            q, r = upoly.divmod_(r0, r1)
            r0, r1 = r1, r
            s0, s1 = s1, upoly.sub(s0, upoly.mul(q, s1))
            if not r1:
                raise ZeroDivisionError(f"division by a zero divisor of {self} (the modulus is "
                                        "not irreducible)")
        inv = 1 / r1[0]
        return self.from_list(self.reduce([c * inv for c in s1]))

    # -- boundary ------------------------------------------------------------------------
    def to_sympy(self, x: Element) -> sympy.Expr:
        x = self(x)
        return sympy.Add(*[self.base.to_sympy(a) * self.root ** k
                           for k, a in enumerate(x.c) if a])

    def size(self, x: Element) -> int:
        x = self(x)
        return sum(self.base.size(a) for a in x.c if a) or 1

    def modulus_expr(self, variable: sympy.Symbol) -> sympy.Expr:
        return sympy.Add(*[self.base.to_sympy(c) * variable ** k
                           for k, c in enumerate(self.modulus)])

    def __repr__(self) -> str:
        return f"{self.base!r}[{self.name}]/(degree {self.degree})"


class RealAlgebraicRoot(sympy.Function):
    """``RealAlgebraicRoot(Lambda(x, m(x)), k)``: the k-th real root (in
    increasing order, from 0) of ``m``, a polynomial whose coefficients depend
    on the parameters; ``RealAlgebraicRoot(Lambda(x, m(x)), k, 0)`` counts
    only the positive roots.  Once every parameter has a rational value it
    becomes sympy's ``CRootOf`` (and evaluates numerically).

    Examples
    --------
    >>> import sympy
    >>> a, x = sympy.Symbol("a", positive=True), sympy.Dummy("x")
    >>> r = RealAlgebraicRoot(sympy.Lambda(x, x**3 - a**2), 0)
    >>> sympy.N(r.xreplace({a: 8}), 5)
    4.0000
    >>> RealAlgebraicRoot(sympy.Lambda(x, x**2 - 2), 0, 0)
    sqrt(2)
    """

    @classmethod
    def eval(cls, lam: Any, k: Any, bound: Any = None) -> Any:
        if not isinstance(lam, sympy.Lambda) or not k.is_Integer:
            return None
        body = lam.expr
        if body.free_symbols - set(lam.variables):
            return None
        x = lam.variables[0]
        poly = sympy.Poly(body, x)
        if not all(c.is_Rational for c in poly.all_coeffs()):
            return None
        roots = poly.real_roots()
        if bound is not None:
            roots = [r for r in roots if r > bound]
        if int(k) >= len(roots):
            where = "" if bound is None else f" above {bound}"
            raise ValueError(f"{body} has {len(roots)} real root(s){where} here, no root "
                             f"number {int(k)}")
        return roots[int(k)]

    @property
    def free_symbols(self) -> set:
        return self.args[0].free_symbols

    def _eval_is_positive(self):
        if len(self.args) == 3 and self.args[2] == 0:
            return True
        return None

    def _eval_is_real(self) -> bool:
        return True

    def _eval_evalf(self, prec):
        lam = self.args[0]
        x = lam.variables[0]
        body = lam.expr
        if body.free_symbols - {x}:
            return None
        import mpmath
        dps = prec_to_dps(prec) + 10
        coeffs = [sympy.N(c, dps) for c in sympy.Poly(body, x).all_coeffs()]
        with mpmath.workdps(dps):
            roots = mpmath.polyroots([mpmath.mpf(str(c)) for c in coeffs], maxsteps=400,
                                     extraprec=2 * prec)
            tiny = mpmath.mpf(10) ** (-dps // 2)
            real = sorted(mpmath.re(r) for r in roots if abs(mpmath.im(r)) < tiny)
            if len(self.args) == 3:
                real = [r for r in real if r > mpmath.mpf(str(sympy.N(self.args[2], dps)))]
            k = int(self.args[1])
            return sympy.Float(mpmath.nstr(real[k], dps), prec_to_dps(prec)) \
                if k < len(real) else None


def prec_to_dps(prec: int) -> int:
    return max(1, int(prec * 0.30103))


def as_fraction(x: Any) -> Fraction:
    """A rational number of any of the engine's QQ types as a Fraction."""
    return Fraction(int(x.numerator), int(x.denominator)) if hasattr(x, "numerator") else \
        Fraction(int(x.p), int(x.q))
