"""The invariant projection formula for the first Lyapunov coefficient.

Pipeline place: eigenbasis + Taylor forms -> **projection formula** -> result.
It is the engine's second, independent route to ``c1`` (the first is the
center-manifold series followed by the planar normal form), and the faster.

With ``A q = i omega q``, ``A^T p = -i omega p`` and ``<p, q> = 1``
(Kuznetsov, Elements of Applied Bifurcation Theory, 3rd ed., 2004, Section
3.5, formula for ``c1(0)`` in n dimensions):

    c1 = 1/2 <p, C(q, q, conj q)> - <p, B(q, A^{-1} B(q, conj q))>
         + 1/2 <p, B(conj q, (2 i omega I - A)^{-1} B(q, q))>.

The two linear solves run over the real field: ``A h = B(q, conj q)`` (a real
vector), and ``(2 nu I - A) h = r`` as
``h = -(2 nu I + A)(A^2 + 4 W I)^{-1} r`` with the real and imaginary parts of
``r`` as two right-hand sides.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Sequence

from ..algebra.linalg import SingularMatrixError, dot, matvec, solve, solve_vector
from ..errors import DegenerateHopfError

if TYPE_CHECKING:
    from ..algebra.field import Element
    from .eigenbasis import Eigenbasis
    from .taylor import TaylorForms

__all__ = ["projection_c1", "solve_shifted"]


def _pair(N, x):
    return N.components(x)


def solve_shifted(eb: Eigenbasis, m: int, r: Sequence[Element]) -> list[Element]:
    """Solve ``(m nu I - A) h = r`` for an integer ``m != +-1`` over the real
    field, ``r`` a vector of the nu-extension."""
    K, N, A = eb.field, eb.nu_field, eb.A
    n = len(A)
    parts = [_pair(N, x) for x in r]
    if m == 0:
        try:
            re = solve_vector(K, A, [a for a, _ in parts])
            im = solve_vector(K, A, [b for _, b in parts])
        except SingularMatrixError as exc:
            raise DegenerateHopfError("the Jacobian is singular at the critical point "
                                      "(zero eigenvalue)", reason="zero_eigenvalue") from exc
        return [N.element(-a, -b) for a, b in zip(re, im)]
    shift = (m * m) * eb.W
    M = [[eb.A2[i][j] + (shift if i == j else K.zero) for j in range(n)] for i in range(n)]
    try:
        XY = solve(K, M, [[a, b] for a, b in parts])
    except SingularMatrixError as exc:
        raise DegenerateHopfError(
            f"{m} i omega is an eigenvalue of the Jacobian (a strong resonance); the "
            "normal-form computation is singular there", reason="resonance") from exc
    X = [row[0] for row in XY]
    Y = [row[1] for row in XY]
    AX, AY = matvec(K, A, X), matvec(K, A, Y)
    mW = m * eb.W
    # (m nu - A)^{-1} r = -(m nu + A) (A^2 + m^2 W)^{-1} r, y = X + nu Y
    # (m nu + A) y = (A X - m W Y) + nu (m X + A Y)
    return [N.element(-(ax - mW * y), -(m * x + ay)) for ax, y, x, ay in zip(AX, Y, X, AY)]


def projection_c1(taylor: TaylorForms, eb: Eigenbasis) -> Element:
    """``c1`` for the eigenvector ``q`` of ``eb`` (not normalised): divide by
    ``<q, q>`` for the unit-eigenvector convention."""
    N = eb.nu_field
    q = eb.q
    qbar = [x.conjugate() for x in q]
    Bqq = taylor.form(2, q, q)
    Bqqb = taylor.form(2, q, qbar)
    Cqqqb = taylor.form(3, q, q, qbar)
    h11 = solve_shifted(eb, 0, [N(x) for x in Bqqb])  # = -A^{-1} B(q, conj q)
    h20 = solve_shifted(eb, 2, [N(x) for x in Bqq])   # = (2 nu - A)^{-1} B(q, q)
    t1 = dot(N, eb.pbar, Cqqqb)
    t2 = dot(N, eb.pbar, taylor.form(2, q, h11))
    t3 = dot(N, eb.pbar, taylor.form(2, qbar, h20))
    return (t1 + t3) / 2 + t2
