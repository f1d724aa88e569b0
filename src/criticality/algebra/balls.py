"""Complex-ball arithmetic at a working precision, for the numeric mode.

Pipeline place: numeric Hopf point (mpmath) -> **ball kernels** -> the
numeric mode's coefficients at many digits.

python-flint's ``arb``/``acb`` numbers and matrices run in C, with a rigorous
error radius on every result: where the numeric mode once ran its linear
solves in pure-Python mpmath, it converts the compiled values once (exactly:
an mpmath number is a binary floating-point number, which a ball holds
without rounding), computes with balls, and converts the midpoints back.
The radii bound the rounding of that part of the computation; they say
nothing about the error of the inputs, which the caller estimates.

Only this module (inside :mod:`criticality.algebra`) imports python-flint;
callers see opaque numbers with ``+``, ``-``, ``*``, ``/`` and the methods
of :class:`BallArithmetic`.
"""

from __future__ import annotations

from typing import Any, Sequence

import flint
import mpmath

__all__ = ["BallArithmetic", "SolveFailed"]


class SolveFailed(ArithmeticError):
    """A ball linear solve could not separate the matrix from singular
    matrices at any precision tried (the matrix is singular, or nearly)."""


class BallArithmetic:
    """Balls at about ``dps`` significant digits; use as a context manager
    (``with BallArithmetic(45) as B: ...``) so that the precision is scoped.

    Examples
    --------
    >>> import mpmath
    >>> with BallArithmetic(30) as B:
    ...     x = B.solve([[B.real(2), B.real(1)], [B.real(1), B.real(3)]], [B.real(1), B.real(2)])
    ...     [mpmath.nstr(B.to_mpmath(v).real, 12) for v in x]
    ['0.2', '0.6']
    """

    def __init__(self, dps: int) -> None:
        self.dps = int(dps)
        self.prec = int(self.dps * 3.33) + 16
        self._scope: Any = None

    def __enter__(self) -> "BallArithmetic":
        self._scope = flint.ctx.workprec(self.prec)
        self._scope.__enter__()
        return self

    def __exit__(self, *exc: Any) -> None:
        self._scope.__exit__(*exc)
        self._scope = None

    # -- conversions -----------------------------------------------------------------------
    @property
    def zero(self) -> Any:
        return flint.acb(0)

    def real(self, x: Any) -> Any:
        """An ``arb`` holding the mpmath number, float or int ``x`` exactly
        (rounded only if it has more bits than the working precision)."""
        return flint.arb(x)

    def complex(self, z: Any) -> Any:
        """An ``acb`` from an mpmath ``mpc``/``mpf``, a complex or a ball."""
        if isinstance(z, (flint.acb, flint.arb)):
            return flint.acb(z)
        if isinstance(z, mpmath.mpc):
            return flint.acb(flint.arb(z.real), flint.arb(z.imag))
        if isinstance(z, complex):
            return flint.acb(z.real, z.imag)
        return flint.acb(flint.arb(z))

    def conj(self, z: Any) -> Any:
        return z.conjugate()

    def to_mpmath(self, z: Any) -> Any:
        """The midpoint of ``z`` as an mpmath ``mpc`` (exact)."""
        z = flint.acb(z)
        return mpmath.mpc(_mid(z.real), _mid(z.imag))

    def to_mpf(self, x: Any) -> Any:
        """The midpoint of the real part of ``x`` as an mpmath ``mpf`` (exact)."""
        return _mid(flint.acb(x).real)

    def radius(self, z: Any) -> float:
        """An upper bound of the error radius of the ball ``z`` (``abs`` of
        the complex radius)."""
        z = flint.acb(z)
        return float(z.real.rad()) + float(z.imag.rad())

    # -- linear algebra ----------------------------------------------------------------------
    def solve(self, rows: Sequence[Sequence[Any]], rhs: Sequence[Any]) -> list:
        """The solution of ``M x = rhs`` (complex balls); the precision is
        raised up to four times where the solve cannot certify ``M``
        nonsingular, then :class:`SolveFailed`."""
        prec = self.prec
        for _ in range(5):
            with flint.ctx.workprec(prec):
                M = flint.acb_mat([[flint.acb(a) for a in row] for row in rows])
                b = flint.acb_mat([[flint.acb(v)] for v in rhs])
                try:
                    x = M.solve(b)
                except ZeroDivisionError:
                    prec *= 2
                    continue
            return [x[i, 0] for i in range(x.nrows())]
        raise SolveFailed("the matrix is singular (or nearly so) at every precision tried")

    def dot(self, a: Sequence[Any], b: Sequence[Any]) -> Any:
        acc = flint.acb(0)
        for x, y in zip(a, b):
            acc += x * y
        return acc


def _mid(x: Any) -> Any:
    man, exp = x.mid().man_exp()
    return mpmath.mpf((int(man), int(exp)))
