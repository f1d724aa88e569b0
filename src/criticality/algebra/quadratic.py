"""Quadratic extensions F(t), t**2 = d, and towers of them.

Two kinds of algebraic numbers occur in a Hopf computation and both are
quadratic over the field below them:

* radicals of the equilibrium or of the critical value, ``s = sqrt(G)``
  (a multi-quadratic extension is a tower of these), and
* ``nu = i*omega`` with ``nu**2 = -W``, ``W = omega**2`` in the field below;
  complex conjugation is ``nu -> -nu``.

An element ``a + b*t`` is stored as the pair ``(a, b)`` of elements of the base
field and reduced by ``t**2 -> d`` after each product.  The radicand must not be
a square in the base field (otherwise the ring has zero divisors); the
constructor does not prove this, and a division by a zero divisor raises
``ZeroDivisionError``.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any, Callable

import sympy

from .field import Element, Field, RingElement

__all__ = ["QuadraticExtension", "QuadraticElement", "lower"]


class QuadraticElement:
    """``a + b*t`` in a :class:`QuadraticExtension`."""

    __slots__ = ("a", "b", "ext")

    def __init__(self, a: Element, b: Element, ext: QuadraticExtension) -> None:
        self.a = a
        self.b = b
        self.ext = ext

    def _mpmath_(self, prec, rounding):
        # mpmath's protocol: a number on the left (mpf * element) asks for a
        # conversion first; refusing quickly here sends it to __rmul__ without
        # mpmath building an error message from repr(self) (slow for mpf parts)
        raise TypeError("an element of a quadratic extension is not an mpmath number")

    def _coerce(self, other):
        """Return other as ``(a, b)`` in this extension, or None if it is of a
        higher extension (so that its reflected operation takes over)."""
        if isinstance(other, QuadraticElement):
            if other.ext is self.ext:
                return other.a, other.b
            if other.ext.level > self.ext.level:
                return None
        elif isinstance(other, (int, Fraction)):
            other = self.ext.base(other)
        return other, None

    # Python does not try the reflected method when both operands have the same
    # type, so an operand of a higher extension is handed over explicitly.
    def __add__(self, other: Element) -> "QuadraticElement":
        c = self._coerce(other)
        if c is None:
            return other.__add__(self)
        a, b = c
        if b is None:
            return QuadraticElement(self.a + a, self.b, self.ext)
        return QuadraticElement(self.a + a, self.b + b, self.ext)

    __radd__ = __add__

    def __neg__(self) -> "QuadraticElement":
        return QuadraticElement(-self.a, -self.b, self.ext)

    def __sub__(self, other: Element) -> "QuadraticElement":
        c = self._coerce(other)
        if c is None:
            return (-other).__add__(self)
        a, b = c
        if b is None:
            return QuadraticElement(self.a - a, self.b, self.ext)
        return QuadraticElement(self.a - a, self.b - b, self.ext)

    def __rsub__(self, other: Element) -> "QuadraticElement":
        return (-self) + other

    def __mul__(self, other: Element) -> "QuadraticElement":
        c = self._coerce(other)
        if c is None:
            return other.__mul__(self)
        a, b = c
        if b is None:
            if not a:
                return self.ext.zero
            return QuadraticElement(self.a * a, self.b * a, self.ext)
        sa, sb = self.a, self.b
        if not sb:
            return QuadraticElement(sa * a, sa * b, self.ext)
        if not b:
            return QuadraticElement(sa * a, sb * a, self.ext)
        return QuadraticElement(sa * a + sb * b * self.ext.radicand, sa * b + sb * a, self.ext)

    __rmul__ = __mul__

    def norm(self) -> Element:
        """``a**2 - b**2 d``, an element of the base field."""
        kernel = getattr(self.ext.base, "norm_form", None)
        if kernel is not None:
            return kernel(self.a, self.b, self.ext.radicand)
        return self.a * self.a - self.b * self.b * self.ext.radicand

    def conjugate(self) -> "QuadraticElement":
        """``a - b*t`` (for ``nu = i*omega`` this is complex conjugation)."""
        return QuadraticElement(self.a, -self.b, self.ext)

    def inverse(self) -> "QuadraticElement":
        if not self.b:
            return QuadraticElement(1 / self.a, self.b, self.ext)
        n = self.norm()
        if not n:
            raise ZeroDivisionError(f"division by a zero divisor of {self.ext}")
        inv = 1 / n
        return QuadraticElement(self.a * inv, -self.b * inv, self.ext)

    def __truediv__(self, other: Element) -> "QuadraticElement":
        c = self._coerce(other)
        if c is None:
            return other.inverse().__mul__(self)
        a, b = c
        if b is None:
            inv = 1 / a
            return QuadraticElement(self.a * inv, self.b * inv, self.ext)
        return self * QuadraticElement(a, b, self.ext).inverse()

    def __rtruediv__(self, other: Element) -> "QuadraticElement":
        return self.inverse() * other

    def __pow__(self, k: int) -> "QuadraticElement":
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
        a, b = c
        if b is None:
            return not self.b and self.a == a
        return self.a == a and self.b == b

    def __ne__(self, other: Element) -> bool:
        r = self.__eq__(other)
        return r if r is NotImplemented else not r

    def __hash__(self) -> int:
        return hash((self.a, self.b)) if self.b else hash(self.a)

    def __bool__(self) -> bool:
        return bool(self.a) or bool(self.b)

    def __repr__(self) -> str:
        return f"[{self.a!r} + {self.b!r}*{self.ext.name}]"


def lower(x: Element) -> Element:
    """``x`` in the smallest field of its tower that contains it: strips
    extension levels whose generator has a zero coefficient (quadratic
    extensions and the algebraic extensions of :mod:`criticality.algebra.algebraic`)."""
    while True:
        if isinstance(x, QuadraticElement) and not x.b:
            x = x.a
        elif getattr(x, "c", None) is not None and hasattr(x, "ext") and not any(x.c[1:]):
            x = x.c[0]  # an element of an algebraic extension that lies in its base field
        else:
            return x


class QuadraticExtension(Field):
    """The extension ``base(t)`` with ``t**2 = radicand``.

    Parameters
    ----------
    base : Field
        The field below (a parameter field or another quadratic extension).
    radicand : element of base
        ``d`` in ``t**2 = d``; must not be a square in ``base``.
    name : str
        Name of the generator (for printing).
    root : sympy.Expr or callable, optional
        The sympy expression the generator stands for in outputs, e.g.
        ``sqrt(b*(r - 1))`` or ``I*sqrt(W)``; defaults to ``Symbol(name)``.
        A function of no arguments is called the first time the expression is
        needed (sympy's ``sqrt`` of a large radicand costs milliseconds, and
        many extensions never print their generator).

    Examples
    --------
    >>> from criticality.algebra.flint_field import FlintRationalField
    >>> QQ = FlintRationalField()
    >>> L = QuadraticExtension(QQ, QQ(2), "s")
    >>> s = L.gen
    >>> (1 + s) * (1 - s) == L(-1)
    True
    """

    def __init__(self, base: Field, radicand: Element, name: str,
                 root: sympy.Expr | Callable[[], sympy.Expr] | None = None) -> None:
        self.base = base
        self.radicand = base(radicand) if not isinstance(radicand, QuadraticElement) else radicand
        self.name = name
        self._root = root if root is not None else sympy.Symbol(name)
        self.level = getattr(base, "level", 0) + 1
        self.backend = base.backend
        self.symbols = base.symbols
        # a base field may name its own element class for extensions: over a
        # python-flint parameter field elements share one denominator (see
        # criticality.algebra.flint_quadratic); elsewhere they are pairs
        common = getattr(base, "quadratic_element", None)
        self._common = common is not None
        if common is not None:
            rad: Any = self.radicand
            self._radicand_parts = (rad.num, rad.den)
            self._from_pair = common.from_pair
        self.zero = self._element(base.zero, base.zero)
        self.one = self._element(base.one, base.zero)
        self.gen = self._element(base.zero, base.one)

    @property
    def root(self) -> sympy.Expr:
        """The sympy expression the generator stands for in outputs."""
        if callable(self._root) and not isinstance(self._root, sympy.Basic):
            self._root = self._root()
        return self._root

    def _element(self, a: Element, b: Element) -> QuadraticElement:
        if self._common:
            return self._from_pair(a, b, self)
        return QuadraticElement(a, b, self)

    def __call__(self, value: object) -> QuadraticElement:
        if isinstance(value, QuadraticElement) and value.ext is self:
            if self._common and type(value) is QuadraticElement:
                return self._element(value.a, value.b)
            return value
        return self._element(self.base(value), self.base.zero)

    def element(self, a: Element, b: Element) -> QuadraticElement:
        """``a + b*t`` from two elements of the base field."""
        return self._element(self.base(a), self.base(b))

    def contains(self, x: Element) -> bool:
        return isinstance(x, QuadraticElement) and x.ext is self

    def components(self, x: Element) -> tuple[Element, Element]:
        """``(a, b)`` with ``x = a + b*t``; base elements give ``(x, 0)``."""
        if self.contains(x):
            return x.a, x.b
        return self.base(x), self.base.zero

    def to_sympy(self, x: Element) -> sympy.Expr:
        a, b = self.components(x)
        return self.base.to_sympy(a) + self.base.to_sympy(b) * self.root

    def size(self, x: Element) -> int:
        if self._common and self.contains(x) and hasattr(x, "D"):
            return len(x.A) + len(x.B) + len(x.D)
        a, b = self.components(x)
        return self.base.size(a) + self.base.size(b)

    def __repr__(self) -> str:
        return f"{self.base!r}({self.name}: {self.name}^2 = {self.base.to_sympy(self.radicand)})"
