"""Elements of a quadratic extension of QQ(p1, ..., pk) over one common denominator.

In a Hopf computation whose critical value needs a square root, every later
quantity lies in ``K(t)``, ``t**2 = d``, with ``K = QQ(p1, ..., pk)``.  The
generic :class:`~criticality.algebra.quadratic.QuadraticElement` stores
``a + b*t`` as two reduced fractions of ``K``, so one product costs four
products and two sums in ``K``, each with its own gcds.  Here ``a + b*t`` is
``(A + B*t) / D`` with integer polynomials ``A``, ``B``, ``D``
(``flint.fmpz_mpoly``), reduced so that ``gcd(A, B, D) = 1`` and ``D`` has a
positive leading coefficient: a product is five polynomial products and one
reduction, a sum is Henrici's scheme on one pair of denominators.  The
representation is unique, so equality is equality of the three polynomials.

The class is a :class:`QuadraticElement` (``isinstance`` checks, ``lower``
and the tower's maps keep working); ``a`` and ``b`` are computed on demand as
reduced fractions of ``K`` and cached.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any

from .field import Element
from .quadratic import QuadraticElement

__all__ = ["CommonDenominatorElement"]


def _content_divide(P, Q, D):
    """``(P, Q, D)`` divided by ``gcd(P, Q, D)``, ``D`` made positive-leading."""
    g = P.gcd(D) if not P.is_zero() else D
    if not g.is_one():
        g = g.gcd(Q) if not Q.is_zero() else g
        if not g.is_one():
            P, Q, D = P / g, Q / g, D / g
    if D.leading_coefficient() < 0:
        P, Q, D = -P, -Q, -D
    return P, Q, D


def _content_gcd(P, Q, part):
    """``gcd(P, Q, part)``, the shorter of ``P`` and ``Q`` met first (the
    second gcd then meets a small polynomial)."""
    if P.is_zero():
        return Q.gcd(part)
    if Q.is_zero():
        return P.gcd(part)
    if len(Q) < len(P):
        P, Q = Q, P
    h = P.gcd(part)
    return h if h.is_one() else h.gcd(Q)


class CommonDenominatorElement(QuadraticElement):
    """``(A + B*t) / D`` in a quadratic extension of a flint parameter field."""

    __slots__ = ("A", "B", "D", "_ab")

    ext: Any  # the extension (its base is a FlintRationalFunctionField)

    def __init__(self, A: Any, B: Any, D: Any, ext: Any) -> None:
        # callers guarantee gcd(A, B, D) = 1 and a positive leading coefficient of D
        self.A = A
        self.B = B
        self.D = D
        self.ext = ext
        self._ab: tuple | None = None

    # -- the two coordinates over the base field, on demand ------------------------------
    def _pair(self) -> tuple:
        if self._ab is None:
            field = self.ext.base
            self._ab = (field.from_polynomials(self.A, self.D),
                        field.from_polynomials(self.B, self.D))
        return self._ab

    @property
    def a(self) -> Element:
        return self._pair()[0]

    @property
    def b(self) -> Element:
        if self.B.is_zero():
            return self.ext.base.zero
        return self._pair()[1]

    @classmethod
    def from_pair(cls, a: Any, b: Any, ext: Any) -> "CommonDenominatorElement":
        """``a + b*t`` from two reduced fractions of the base field: over the
        least common multiple of their denominators, which is already reduced."""
        ad, bd = a.den, b.den
        if b.num.is_zero():
            return cls(a.num, b.num, ad, ext)
        if a.num.is_zero():
            return cls(a.num, b.num, bd, ext)
        if ad == bd:
            return cls(a.num, b.num, ad, ext)
        g = ad.gcd(bd)
        return cls(a.num * (bd / g), b.num * (ad / g), ad * (bd / g), ext)

    def _make(self, A: Any, B: Any, D: Any) -> "CommonDenominatorElement":
        return CommonDenominatorElement(A, B, D, self.ext)

    def _parts(self, other: Element):
        """``other`` as ``(A, B, D)`` of this extension, ``(num, den)`` of the
        base field (tagged by length), or None for an element of a higher
        extension (whose reflected operation then takes over)."""
        if isinstance(other, CommonDenominatorElement):
            if other.ext is self.ext:
                return other.A, other.B, other.D
            if other.ext.level > self.ext.level:
                return None
        elif isinstance(other, QuadraticElement):
            if other.ext is self.ext:
                o = CommonDenominatorElement.from_pair(self.ext.base(other.a),
                                                       self.ext.base(other.b), self.ext)
                return o.A, o.B, o.D
            if other.ext.level > self.ext.level:
                return None
        if not isinstance(other, (int, Fraction)) and getattr(
                getattr(other, "ext", None), "level", 0) > self.ext.level:
            return None
        x = self.ext.base(other)
        return x.num, x.den

    # -- arithmetic ---------------------------------------------------------------------
    def __add__(self, other: Element) -> "CommonDenominatorElement":
        o = self._parts(other)
        if o is None:
            return other.__add__(self)
        A, B, D = self.A, self.B, self.D
        if len(o) == 2:
            n, d = o
            if n.is_zero():
                return self
            if d == D:
                return self._make(*_content_divide(A + n, B, D))
            g = D.gcd(d)
            Dg, dg = D / g, d / g
            P, Q = A * dg + n * Dg, B * dg
            den = Dg * d
        else:
            A2, B2, D2 = o
            if D == D2:
                return self._make(*_content_divide(A + A2, B + B2, D))
            g = D.gcd(D2)
            Dg, D2g = D / g, D2 / g
            P, Q = A * D2g + A2 * Dg, B * D2g + B2 * Dg
            den = Dg * D2
        if g.is_one():
            return self._make(P, Q, den)
        # Henrici: only the factors of g can cancel
        h = P.gcd(g) if not P.is_zero() else g
        if not h.is_one() and not Q.is_zero():
            h = h.gcd(Q)
        if h.is_one():
            return self._make(P, Q, den)
        return self._make(P / h, Q / h, den / h)

    __radd__ = __add__

    def __neg__(self) -> "CommonDenominatorElement":
        return self._make(-self.A, -self.B, self.D)

    def __sub__(self, other: Element) -> "CommonDenominatorElement":
        o = self._parts(other)
        if o is None:
            return (-other).__add__(self)
        if len(o) == 2:
            n, d = o
            return self.__add__(self.ext.base.from_ring(-n, d) if not d.is_one()
                                else self.ext.base.from_ring(-n))
        A2, B2, D2 = o
        return self.__add__(CommonDenominatorElement(-A2, -B2, D2, self.ext))

    def __rsub__(self, other: Element) -> "CommonDenominatorElement":
        return (-self).__add__(other)

    def __mul__(self, other: Element) -> "CommonDenominatorElement":
        o = self._parts(other)
        if o is None:
            return other.__mul__(self)
        A, B, D = self.A, self.B, self.D
        if A.is_zero() and B.is_zero():
            return self
        if len(o) == 2:
            n, d = o
            if n.is_zero():
                return self.ext.zero
            # Henrici: D is coprime to (A, B), d to n
            g1 = n.gcd(D)
            if not g1.is_one():
                n, D = n / g1, D / g1
            g2 = A.gcd(d) if not A.is_zero() else d
            if not g2.is_one() and not B.is_zero():
                g2 = g2.gcd(B)
            if not g2.is_one():
                A, B, d = A / g2, B / g2, d / g2
            P, Q, den = A * n, B * n, D * d
            if den.leading_coefficient() < 0:
                P, Q, den = -P, -Q, -den
            return self._make(P, Q, den)
        A2, B2, D2 = o
        parts: tuple
        if B.is_zero() and B2.is_zero():
            parts = (D, D2)
            P, Q = A * A2, B
        else:
            rn, rd = self.ext._radicand_parts
            if rd.is_one():
                P = A * A2 + B * B2 * rn
                Q = A * B2 + A2 * B
                parts = (D, D2, rd)
            else:
                P = (A * A2) * rd + B * B2 * rn
                Q = (A * B2 + A2 * B) * rd
                parts = (D, D2, rd)
        if P.is_zero() and Q.is_zero():
            return self.ext.zero
        # reduce against each factor of the denominator in turn (smaller gcds
        # than against their product); the result is the same reduced element
        den = None
        for part in parts:
            if not part.is_one():
                h = _content_gcd(P, Q, part)
                if not h.is_one():
                    P, Q, part = P / h, Q / h, part / h
            den = part if den is None else den * part
        if den.leading_coefficient() < 0:
            P, Q, den = -P, -Q, -den
        return self._make(P, Q, den)

    __rmul__ = __mul__

    def norm(self) -> Element:
        """``a**2 - b**2 d`` as a reduced fraction of the base field."""
        rn, rd = self.ext._radicand_parts
        A, B, D = self.A, self.B, self.D
        num = A * A * rd - B * B * rn
        field = self.ext.base
        if num.is_zero():
            return field.zero
        den = None
        for part in (D, D, rd):
            if not part.is_one():
                h = num.gcd(part)
                if not h.is_one():
                    num, part = num / h, part / h
            den = part if den is None else den * part
        return field._normalised(num, den, reduced=True)

    def conjugate(self) -> "CommonDenominatorElement":
        return self._make(self.A, -self.B, self.D)

    def inverse(self) -> "CommonDenominatorElement":
        A, B, D = self.A, self.B, self.D
        if A.is_zero() and B.is_zero():
            raise ZeroDivisionError(f"division by zero in {self.ext}")
        if B.is_zero():
            # D / A: gcd(A, D) = 1 already
            return self._make(*_content_divide(D, B, A))
        # the conjugate over the norm: the norm is reduced against the factors
        # of its denominator one at a time, and the product then cancels by
        # Henrici's cross gcds (a gcd against the whole norm costs far more)
        n = self.norm()
        if not n:
            raise ZeroDivisionError(f"division by a zero divisor of {self.ext}")
        return self.conjugate().__mul__(n.inverse())

    def __truediv__(self, other: Element) -> "CommonDenominatorElement":
        o = self._parts(other)
        if o is None:
            return other.inverse().__mul__(self)
        if len(o) == 2:
            n, d = o
            if n.is_zero():
                raise ZeroDivisionError(f"division by zero in {self.ext}")
            return self.__mul__(self.ext.base.from_polynomials(d, n))
        A2, B2, D2 = o
        return self.__mul__(CommonDenominatorElement(A2, B2, D2, self.ext).inverse())

    def __rtruediv__(self, other: Element) -> "CommonDenominatorElement":
        return self.inverse().__mul__(other)

    # -- comparison ---------------------------------------------------------------------
    def __eq__(self, other: Element) -> bool:
        o = self._parts(other)
        if o is None:
            return other.__eq__(self)
        if len(o) == 2:
            n, d = o
            return self.B.is_zero() and self.A == n and self.D == d
        return self.A == o[0] and self.B == o[1] and self.D == o[2]

    def __ne__(self, other: Element) -> bool:
        r = self.__eq__(other)
        return r if r is NotImplemented else not r

    def __hash__(self) -> int:
        # as for the generic element: an element of the base field hashes as there
        return hash((self.a, self.b)) if not self.B.is_zero() else hash(self.a)

    def __bool__(self) -> bool:
        return not (self.A.is_zero() and self.B.is_zero())

    def __reduce__(self):
        return (CommonDenominatorElement.from_pair, (self.a, self.b, self.ext))

    def __repr__(self) -> str:
        return f"[({self.A}) + ({self.B})*{self.ext.name}] / ({self.D})"
