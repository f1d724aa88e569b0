"""The protocol every field of the engine implements.

The engine computes in a tower of fields: the parameter field
K = QQ(p1, ..., pk) (python-flint, or the pure-sympy stand-in), quadratic
extensions of it by radicals of the equilibrium (``s**2 = G``), and finally the
extension by ``nu = i*omega`` (``nu**2 = -W``).  Elements of every field support
``+ - * /``, ``**`` with an integer exponent, ``==`` and truth testing
(non-zero); mixed operations with Python ints work.  A field object converts at
the boundary (``from_sympy``, ``to_sympy``) and reports an element's size, which
the linear solver uses to choose small pivots.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from typing import Iterable, Sequence

    import sympy

__all__ = ["Field", "PolynomialRing", "clear_denominators", "Element", "RingElement"]

#: an element of a :class:`Field`; its class depends on the field (a python-flint
#: number, a fraction of python-flint polynomials, a sympy expression, an extension's
#: element), so it is typed loosely
Element = Any
#: an element of a :class:`PolynomialRing` (a python-flint or sympy polynomial)
RingElement = Any


class Field:
    """Base class of the engine's fields (documentation of the protocol).

    Attributes
    ----------
    zero, one
        The neutral elements.
    symbols : tuple of sympy.Symbol
        The transcendental generators (empty for QQ and for extensions, which
        inherit their base's).
    backend : str
        ``"flint"`` or ``"sympy"``.
    """

    zero: Any  # an element of this field (each field has its own element type)
    one: Any
    symbols: tuple = ()
    backend = "abstract"

    def __call__(self, value: object) -> Element:  # pragma: no cover - documented protocol
        """Coerce an int, a Fraction, a sympy Rational or an element of a
        subfield into this field."""
        raise NotImplementedError

    def from_sympy(self, expr: sympy.Expr) -> Element:  # pragma: no cover - documented protocol
        """Convert a sympy expression that is a rational function of the
        generators."""
        raise NotImplementedError

    def to_sympy(self, x: Element) -> sympy.Expr:  # pragma: no cover - documented protocol
        """Convert an element back to a sympy expression."""
        raise NotImplementedError

    def size(self, x: Element) -> int:  # pragma: no cover - documented protocol
        """A measure of an element's size (number of terms, bits), used for
        pivoting."""
        raise NotImplementedError

    def is_zero(self, x: Element) -> bool:
        return not x


class PolynomialRing:
    """The polynomial-ring view beside a field: ZZ[p1, ..., pk] for the field
    QQ(p1, ..., pk) (documentation of the protocol; python-flint and the
    pure-sympy stand-in implement it).

    A field ``K`` with generators exposes ``K.ring`` and converts with
    ``K.numerator(x)``, ``K.denominator(x)`` (integer polynomials with
    ``x = numerator / denominator``) and ``K.from_ring(num, den=None)``.  Ring
    elements support ``+ - *``, ``==`` and truth testing.

    Attributes
    ----------
    symbols : tuple of sympy.Symbol
    zero, one
    base : PolynomialRing or None
        For a ring made by :meth:`extend`, the ring it extends.
    """

    symbols: tuple = ()
    backend = "abstract"

    def factor(self, p: RingElement) -> tuple:  # pragma: no cover - documented protocol
        """``(content, [(irreducible factor, multiplicity)])``."""
        raise NotImplementedError

    def coefficients_in(self, p: RingElement, symbol: sympy.Symbol) -> dict:  # pragma: no cover
        """``{k: coefficient of symbol**k}`` (ring elements free of ``symbol``)."""
        raise NotImplementedError

    def degrees(self, p: RingElement) -> dict:  # pragma: no cover - documented protocol
        """``{symbol: degree}``."""
        raise NotImplementedError

    def evaluate(self, p: RingElement, point: Sequence[int]) -> int:  # pragma: no cover
        """The integer value at integer values of all generators."""
        raise NotImplementedError

    def to_sympy(self, p: RingElement) -> sympy.Expr:  # pragma: no cover - documented protocol
        raise NotImplementedError

    def extend(self, name: str) -> "PolynomialRing":  # pragma: no cover - documented protocol
        """This ring with one more variable ``name``; :meth:`from_coefficients`,
        :meth:`split` and :meth:`resultant` work in that variable."""
        raise NotImplementedError

    def from_coefficients(self, coeffs: Sequence[RingElement]) -> RingElement:  # pragma: no cover
        """``sum coeffs[k] * t**k`` (``coeffs`` in :attr:`base`) in an extended ring."""
        raise NotImplementedError

    def split(self, p: RingElement) -> dict:  # pragma: no cover - documented protocol
        """``{k: coefficient of t**k in base}`` in an extended ring."""
        raise NotImplementedError

    def resultant(self, a: RingElement, b: RingElement) -> RingElement:  # pragma: no cover
        """The resultant in the extension variable, an element of :attr:`base`."""
        raise NotImplementedError


def clear_denominators(K: Any, xs: Iterable[Element]) -> tuple:
    """``(D, [n_1, ...])`` in ``K.ring`` with ``x_i = n_i / D`` and ``D`` the
    least common multiple of the denominators."""
    R = K.ring
    xs = [K(x) for x in xs]
    D = R.one
    for x in xs:
        d = K.denominator(x)
        if not R.is_one(d):
            D = D * R.exquo(d, R.gcd(D, d))
    return D, [K.numerator(x) * R.exquo(D, K.denominator(x)) for x in xs]
