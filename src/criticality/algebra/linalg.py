"""Exact linear algebra over the engine's fields.

Matrices are lists of rows of field elements.  Elimination is Gaussian with
size-aware pivoting: in each column the non-zero entry with the fewest terms
(``field.size``) becomes the pivot, which keeps intermediate rational functions
small; zero entries are skipped, so sparse Jacobians stay cheap.  Over QQ
itself the work is handed to ``flint.fmpq_mat``.  The characteristic
polynomial is Berkowitz's division-free algorithm, over the polynomial ring
where the field has one.
"""

from __future__ import annotations

from typing import Sequence

import flint

from ..budget import checkpoint
from ..errors import CriticalityError
from . import upoly
from .field import Element, Field, clear_denominators
from .flint_field import FlintRationalField
from .quadratic import QuadraticElement, lower

#: a matrix over a field, as the functions return it: a list of rows
Matrix = list[list[Element]]
#: what the functions accept for a matrix: any sequence of rows
MatrixLike = Sequence[Sequence[Element]]
#: a vector over a field
Vector = Sequence[Element]

__all__ = [
    "SingularMatrixError",
    "identity",
    "matmul",
    "matvec",
    "dot",
    "transpose",
    "solve",
    "kernel",
    "rank_and_pivots",
    "inverse",
    "determinant",
    "solve_vector",
    "solve_consistent",
    "characteristic_polynomial",
]


class SingularMatrixError(CriticalityError, ZeroDivisionError):
    """A linear system that should have a unique solution is singular."""


def identity(K: Field, n: int) -> Matrix:
    return [[K.one if i == j else K.zero for j in range(n)] for i in range(n)]


def transpose(M: MatrixLike) -> Matrix:
    return [list(col) for col in zip(*M)]


def matmul(K: Field, A: MatrixLike, B: MatrixLike) -> Matrix:
    """``A @ B`` skipping zero entries of ``A``."""
    cols = len(B[0]) if B else 0
    out = []
    for row in A:
        acc = [K.zero] * cols
        for k, a in enumerate(row):
            if not a:
                continue
            brow = B[k]
            for j in range(cols):
                b = brow[j]
                if b:
                    acc[j] = acc[j] + a * b
        out.append(acc)
    return out


def dot(K: Field, a: Vector, b: Vector) -> Element:
    """``sum a_i b_i`` (no conjugation), skipping zero entries."""
    acc = K.zero
    for x, y in zip(a, b):
        if x and y:
            acc = acc + x * y
    return acc


def matvec(K: Field, A: MatrixLike, v: Vector) -> list[Element]:
    out = []
    for row in A:
        acc = K.zero
        for a, x in zip(row, v):
            if a and x:
                acc = acc + a * x
        out.append(acc)
    return out


def _is_qq(K) -> bool:
    return isinstance(K, FlintRationalField)


def _to_fmpq_mat(M):
    return flint.fmpq_mat(len(M), len(M[0]) if M else 0, [x for row in M for x in row])


def _from_fmpq_mat(M):
    return [[M[i, j] for j in range(M.ncols())] for i in range(M.nrows())]


def _pivot_row(K, M, c, start):
    """The row (from ``start``) whose entry in column ``c`` is the non-zero
    element with the fewest terms, or None."""
    best, best_size = None, None
    for i in range(start, len(M)):
        x = M[i][c]
        if x:
            s = K.size(x)
            if best is None or s < best_size:
                best, best_size = i, s
    return best


def _eliminate(K, M, ncols_pivot: int):
    """Row-reduce ``M`` (modified in place) to reduced row echelon form in its
    first ``ncols_pivot`` columns.  Returns the pivot columns."""
    rows = len(M)
    pivots = []
    r = 0
    for c in range(ncols_pivot):
        checkpoint()
        best = _pivot_row(K, M, c, r)
        if best is None:
            continue
        M[r], M[best] = M[best], M[r]
        prow = M[r]
        inv = 1 / prow[c]
        for j in range(c, len(prow)):
            if prow[j]:
                prow[j] = prow[j] * inv
        for i in range(rows):
            if i == r:
                continue
            f = M[i][c]
            if not f:
                continue
            row = M[i]
            for j in range(c, len(row)):
                pj = prow[j]
                if pj:
                    row[j] = row[j] - f * pj
        pivots.append(c)
        r += 1
        if r == rows:
            break
    return pivots


def solve(K: Field, A: MatrixLike, B: MatrixLike) -> Matrix:
    """Solve ``A X = B`` for square, non-singular ``A``; ``B`` is a list of rows.

    Raises
    ------
    SingularMatrixError
        If ``A`` is singular.
    """
    n = len(A)
    if n == 0:
        return []
    m = len(B[0])
    if _is_qq(K):
        try:
            X = _to_fmpq_mat(A).solve(_to_fmpq_mat(B))
        except ZeroDivisionError as exc:
            raise SingularMatrixError("singular matrix") from exc
        return _from_fmpq_mat(X)
    M = [list(A[i]) + list(B[i]) for i in range(n)]
    pivots = _eliminate(K, M, n)
    if len(pivots) < n:
        raise SingularMatrixError("singular matrix")
    return [row[n:n + m] for row in M]


def solve_vector(K: Field, A: MatrixLike, b: Vector) -> list[Element]:
    """Solve ``A x = b`` for one right-hand side vector ``b``."""
    X = solve(K, A, [[x] for x in b])
    return [row[0] for row in X]


def rank_and_pivots(K: Field, A: MatrixLike) -> tuple[int, list[int], Matrix]:
    M = [list(r) for r in A]
    if _is_qq(K) and M:
        R, rank = _to_fmpq_mat(M).rref()
        pivots = []
        R = _from_fmpq_mat(R)
        for i in range(rank):
            pivots.append(next(j for j, x in enumerate(R[i]) if x))
        return rank, pivots, R
    pivots = _eliminate(K, M, len(M[0]) if M else 0)
    return len(pivots), pivots, M


def kernel(K: Field, A: MatrixLike) -> list[list[Element]]:
    """A basis of the null space of ``A`` (list of column vectors)."""
    ncols = len(A[0])
    rank, pivots, R = rank_and_pivots(K, A)
    free = [j for j in range(ncols) if j not in pivots]
    basis = []
    for f in free:
        v = [K.zero] * ncols
        v[f] = K.one
        for i, pc in enumerate(pivots):
            x = R[i][f]
            if x:
                v[pc] = -x
        basis.append(v)
    return basis


def inverse(K: Field, A: MatrixLike) -> Matrix:
    return solve(K, A, identity(K, len(A)))


def determinant(K: Field, A: MatrixLike) -> Element:
    """Determinant by elimination over the field (size-aware pivots)."""
    n = len(A)
    if _is_qq(K):
        return _to_fmpq_mat(A).det()
    M = [list(r) for r in A]
    det = K.one
    for c in range(n):
        checkpoint()
        best = _pivot_row(K, M, c, c)
        if best is None:
            return K.zero
        if best != c:
            M[c], M[best] = M[best], M[c]
            det = -det
        p = M[c][c]
        det = det * p
        inv = 1 / p
        for i in range(c + 1, n):
            f = M[i][c]
            if not f:
                continue
            f = f * inv
            row, prow = M[i], M[c]
            for j in range(c + 1, n):
                if prow[j]:
                    row[j] = row[j] - f * prow[j]
    return det


def solve_consistent(K: Field, A: MatrixLike, B: MatrixLike) -> Matrix:
    """Solve ``A X = B`` for a full-column-rank ``A`` with at least as many
    rows as columns, when the system is known to be consistent (e.g. a square
    singular operator bordered by normalisation rows).

    Raises
    ------
    SingularMatrixError
        If ``A`` has a non-trivial kernel or the system is inconsistent.
    """
    rows, cols = len(A), len(A[0])
    m = len(B[0])
    M = [list(A[i]) + list(B[i]) for i in range(rows)]
    if _is_qq(K):
        R, rank = _to_fmpq_mat(M).rref()
        M = _from_fmpq_mat(R)
        pivots = [next(j for j, x in enumerate(M[i]) if x) for i in range(rank)]
    else:
        pivots = _eliminate(K, M, cols)
    if pivots != list(range(cols)):
        raise SingularMatrixError("the bordered system does not determine the solution")
    for i in range(cols, rows):
        if any(M[i][cols:cols + m]):
            raise SingularMatrixError("the bordered system is inconsistent")
    return [M[i][cols:cols + m] for i in range(cols)]


def characteristic_polynomial(K: Field, A: MatrixLike) -> list[Element]:
    """Coefficients (lowest degree first, monic) of ``det(lambda I - A)``.

    Berkowitz's division-free algorithm (Berkowitz, Information Processing
    Letters 18, 1984).  Over a parameter field with a polynomial-ring view
    (python-flint or the sympy stand-in) the matrix is first scaled by a
    common denominator ``D`` so that every product is a product of integer
    polynomials (no gcds): ``chi_A`` has coefficients ``a_k(D A) / D^k``.
    Measured on a 20 x 20 symbolic Jacobian it is about 150 times faster
    than Hessenberg reduction with fractions.
    """
    low = [[lower(x) for x in row] for row in A]
    base = getattr(K, "base", K)
    while hasattr(base, "base"):
        base = base.base
    if getattr(base, "symbols", ()) and hasattr(base, "ring") and not any(
            isinstance(x, QuadraticElement) for row in low for x in row):
        return _charpoly_cleared(base, [[base(x) for x in row] for row in low])
    coeffs = _berkowitz(A, K.zero, K.one)
    return upoly.trim(list(reversed(coeffs)))


def _charpoly_cleared(K, A):
    R = K.ring
    n = len(A)
    D, nums = clear_denominators(K, [x for row in A for x in row])
    M = [nums[i * n:(i + 1) * n] for i in range(n)]
    coeffs = _berkowitz(M, R.zero, R.one)
    out, Dk = [], K.one
    Dfield = K.from_ring(D)
    for k, c in enumerate(coeffs):  # highest degree first: coefficient of lambda^(n-k)
        out.append(K.from_ring(c) / Dk if k else K.one)
        Dk = Dk * Dfield
    return upoly.trim(list(reversed(out)))


def _berkowitz(M, zero, one):
    """Coefficients of ``det(lambda I - M)``, highest degree first, using only
    ring operations (+, -, *)."""
    n = len(M)
    C = [one, -M[0][0]]
    for r in range(1, n):
        checkpoint()
        row = M[r][:r]
        v = [M[i][r] for i in range(r)]
        toeplitz = [one, -M[r][r]]
        for k in range(r):
            toeplitz.append(-_sparse_dot(row, v, zero))
            if k < r - 1:
                v = [_sparse_dot(M[i][:r], v, zero) for i in range(r)]
        new = []
        for i in range(r + 2):
            acc = zero
            for j in range(max(0, i - len(toeplitz) + 1), min(i, r) + 1):
                t, c = toeplitz[i - j], C[j]
                if t and c:
                    acc = acc + t * c
            new.append(acc)
        C = new
    return C


def _sparse_dot(a, b, zero):
    acc = zero
    for x, y in zip(a, b):
        if x and y:
            acc = acc + x * y
    return acc

