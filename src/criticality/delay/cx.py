"""Exact complex numbers as pairs of real sympy expressions (internal to the delay room).

Every quantity of the delay analysis at ``lambda = i omega`` lives in
``K(omega, tau)(i)`` with ``K`` the field of the real parameters: the factor
``exp(-i omega tau)`` is itself an element there (``-P(i omega)/Q(i omega)``
at a crossing).  The components are elements of the engine's rational
function field (python-flint behind :func:`criticality.algebra.domain.make_base_field`)
where the problem is rational in its symbols, else sympy expressions reduced by
``sympy.cancel`` after every operation.  Keeping real and imaginary parts apart
avoids sympy's ``I`` arithmetic; conjugation flips the sign of the imaginary
part (every symbol is real).
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any, Callable, Mapping, Sequence

import sympy

__all__ = ["Cx", "ZERO", "ONE", "I_", "cx", "mat_vec", "solve", "kernel", "dot"]


def _c(e):
    """Reduce a component: sympy expressions by cancel; Python ints and elements
    of the engine's fields (:mod:`criticality.algebra`) are kept as they are."""
    if isinstance(e, sympy.Basic):
        if e.is_Integer:
            return int(e)
        if e.is_Rational:
            return Fraction(int(e.p), int(e.q))
        return e if e.is_Number else sympy.cancel(e)
    if isinstance(e, float):
        return sympy.Float(e)
    return e


class Cx:
    """re + i im with re, im real sympy expressions."""

    __slots__ = ("re", "im")

    def __init__(self, re: Any, im: Any = 0) -> None:
        self.re, self.im = _c(re), _c(im)

    def __add__(self, o: object) -> "Cx":
        o = cx(o)
        return Cx(self.re + o.re, self.im + o.im)

    __radd__ = __add__

    def __sub__(self, o: object) -> "Cx":
        o = cx(o)
        return Cx(self.re - o.re, self.im - o.im)

    def __rsub__(self, o: object) -> "Cx":
        return cx(o) - self

    def __neg__(self) -> "Cx":
        return Cx(-self.re, -self.im)

    def __mul__(self, o: object) -> "Cx":
        o = cx(o)
        if _zero(o.im):
            return Cx(self.re * o.re, self.im * o.re)
        if _zero(self.im):
            return Cx(self.re * o.re, self.re * o.im)
        return Cx(self.re * o.re - self.im * o.im, self.re * o.im + self.im * o.re)

    __rmul__ = __mul__

    def __truediv__(self, o: object) -> "Cx":
        o = cx(o)
        if _zero(o.im):
            return Cx(_div(self.re, o.re), _div(self.im, o.re))
        norm = _c(o.re ** 2 + o.im ** 2)
        return Cx(_div(self.re * o.re + self.im * o.im, norm),
                  _div(self.im * o.re - self.re * o.im, norm))

    def __rtruediv__(self, o: object) -> "Cx":
        return cx(o) / self

    def conj(self) -> "Cx":
        return Cx(self.re, -self.im)

    def abs2(self) -> Any:
        return _c(self.re ** 2 + self.im ** 2)

    def is_zero(self) -> bool:
        return _zero(self.re) and _zero(self.im)

    def subs(self, mapping: Mapping) -> "Cx":
        return Cx(self.re.xreplace(mapping) if mapping else self.re,
                  self.im.xreplace(mapping) if mapping else self.im)

    def expr(self) -> sympy.Expr:
        """The sympy value re + I*im (sympy components)."""
        return self.re + sympy.I * self.im

    def map(self, fn: Callable[[Any], Any]) -> "Cx":
        """Both components converted by ``fn`` (e.g. a field's ``to_sympy``)."""
        return Cx(fn(self.re), fn(self.im))

    def __repr__(self) -> str:
        return f"Cx({self.re}, {self.im})"


def _div(a, b):
    """a / b without Python's int division turning into a float."""
    if isinstance(a, (int, Fraction)) and isinstance(b, (int, Fraction)):
        return Fraction(a) / Fraction(b)
    return a / b


def _zero(x) -> bool:
    return x == 0 if isinstance(x, (int, Fraction, sympy.Basic)) else not x


def cx(value: object) -> Cx:
    """A Cx from a Cx, a real sympy expression or a number."""
    return value if isinstance(value, Cx) else Cx(value, 0)


ZERO, ONE, I_ = Cx(0), Cx(1), Cx(0, 1)


def dot(a: Sequence[Cx], b: Sequence[Cx]) -> Cx:
    """sum a_i b_i (no conjugation)."""
    total = ZERO
    for x, y in zip(a, b):
        if not (x.is_zero() or y.is_zero()):
            total = total + x * y
    return total


def mat_vec(M: Sequence[Sequence[Cx]], v: Sequence[Cx]) -> list:
    return [dot(row, v) for row in M]


def _size(x) -> int:
    if isinstance(x, (int, Fraction)):
        return 0
    if isinstance(x, sympy.Basic):
        return sympy.count_ops(x)
    return x.field.size(x) if hasattr(x, "field") else len(str(x))


def _pivot(rows, col, start):
    best = None
    for r in range(start, len(rows)):
        entry = rows[r][col]
        if not entry.is_zero():
            size = _size(entry.re) + _size(entry.im)
            if best is None or size < best[0]:
                best = (size, r)
    return None if best is None else best[1]


def _echelon(M):
    """Gauss-Jordan elimination; returns the reduced rows and the pivot columns."""
    rows = [list(r) for r in M]
    ncols = len(rows[0]) if rows else 0
    pivots, r = [], 0
    for col in range(ncols):
        if r == len(rows):
            break
        k = _pivot(rows, col, r)
        if k is None:
            continue
        rows[r], rows[k] = rows[k], rows[r]
        inv = ONE / rows[r][col]
        rows[r] = [x * inv for x in rows[r]]
        for i in range(len(rows)):
            if i != r and not rows[i][col].is_zero():
                f = rows[i][col]
                rows[i] = [x - f * y for x, y in zip(rows[i], rows[r])]
        pivots.append(col)
        r += 1
    return rows, pivots


def solve(M: Sequence[Sequence[Cx]], b: Sequence[Cx]) -> list:
    """The solution of M x = b for a nonsingular square M (ValueError if singular)."""
    n = len(M)
    rows, pivots = _echelon([list(M[i]) + [cx(b[i])] for i in range(n)])
    if pivots != list(range(n)):
        raise ValueError("singular linear system")
    return [rows[i][n] for i in range(n)]


def kernel(M: Sequence[Sequence[Cx]]) -> list:
    """One nonzero vector of the kernel of M (ValueError if M is nonsingular)."""
    n = len(M[0])
    rows, pivots = _echelon(M)
    free = [c for c in range(n) if c not in pivots]
    if not free:
        raise ValueError("the matrix is nonsingular")
    f = free[0]
    v = [ZERO] * n
    v[f] = ONE
    for i, c in enumerate(pivots):
        v[c] = -rows[i][f]
    return v
