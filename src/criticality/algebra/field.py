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

__all__ = ["Field"]


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

    zero: object
    one: object
    symbols: tuple = ()
    backend = "abstract"

    def __call__(self, value):  # pragma: no cover - documented protocol
        """Coerce an int, a Fraction, a sympy Rational or an element of a
        subfield into this field."""
        raise NotImplementedError

    def from_sympy(self, expr):  # pragma: no cover - documented protocol
        """Convert a sympy expression that is a rational function of the
        generators."""
        raise NotImplementedError

    def to_sympy(self, x):  # pragma: no cover - documented protocol
        """Convert an element back to a sympy expression."""
        raise NotImplementedError

    def size(self, x) -> int:  # pragma: no cover - documented protocol
        """A measure of an element's size (number of terms, bits), used for
        pivoting."""
        raise NotImplementedError

    def is_zero(self, x) -> bool:
        return not x
