"""The published closed formula for the second Lyapunov coefficient.

Pipeline place: eigenbasis + Taylor forms -> **formula for c2** -> cross-check.
It is an independent route to ``c_2``: explicit multilinear forms instead of
the polynomial compositions of :mod:`criticality.local.lyapunov`, and linear solves
directly over the nu-extension instead of realified ones.

Source: Yu. A. Kuznetsov, "Numerical normalization techniques for all codim 2
bifurcations of equilibria in ODE's", SIAM J. Numer. Anal. 36 (1999)
1104-1124, the Bautin (generalised Hopf) case; also Kuznetsov, Elements of
Applied Bifurcation Theory, 3rd ed., 2004, Section 8.7.  In that convention

    x - x0 = z q + conj(z q) + sum (1/(j! k!)) h_jk z^j conj(z)^k,
    z' = i omega z + (1/2) G21 z|z|^2 + (1/12) G32 z|z|^4,

so ``c_1 = G21/2`` and ``c_2 = G32/12``.  With ``B, C, D, E`` the
multilinear forms of the field (``D^k F(x0)``) and ``<p, q> = 1``:

    h20 = (2 i omega - A)^-1 B(q, q),     h11 = -A^-1 B(q, conj q),
    G21 = <p, C(q, q, qb) + B(qb, h20) + 2 B(q, h11)>,
    h30 = (3 i omega - A)^-1 [C(q, q, q) + 3 B(q, h20)],
    (i omega - A) h21 = C(q, q, qb) + B(qb, h20) + 2 B(q, h11) - G21 q,  <p, h21> = 0,
    h31 = (2 i omega - A)^-1 [D(q, q, q, qb) + 3 C(q, q, h11) + 3 C(q, qb, h20)
          + 3 B(h20, h11) + B(qb, h30) + 3 B(q, h21) - 3 G21 h20],
    h22 = -A^-1 [D(q, q, qb, qb) + 4 C(q, qb, h11) + C(qb, qb, h20) + C(q, q, h02)
          + 2 B(h11, h11) + 2 B(q, h12) + 2 B(qb, h21) + B(h20, h02)
          - 2 (G21 + conj G21) h11],
    G32 = <p, E(q, q, q, qb, qb) + D(q, q, q, h02) + 6 D(q, q, qb, h11)
          + 3 D(q, qb, qb, h20) + C(qb, qb, h30) + 3 C(q, q, h12) + 6 C(q, qb, h21)
          + 3 C(q, h20, h02) + 6 C(q, h11, h11) + 6 C(qb, h20, h11) + 2 B(qb, h31)
          + 3 B(q, h22) + B(h02, h30) + 3 B(h20, h12) + 6 B(h11, h21)>,

with ``qb = conj q``, ``h02 = conj h20``, ``h12 = conj h21``.  The structure
of the formula is recalled from memory; every multinomial weight was
re-derived (the coefficient of ``z^j conj(z)^k / (j! k!)`` in
``F(H)``) and the whole is tested against the normalization method.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from ..algebra.linalg import SingularMatrixError, dot, solve
from ..errors import DegenerateHopfError

if TYPE_CHECKING:
    from ..algebra.field import Element
    from .eigenbasis import Eigenbasis
    from .taylor import TaylorForms

__all__ = ["formula_c1_c2"]


def _lin(*terms):
    """``sum coeff * vector`` for ``(coeff, vector)`` pairs."""
    out = None
    for coeff, vec in terms:
        v = [coeff * x for x in vec]
        out = v if out is None else [a + b for a, b in zip(out, v)]
    return out


def _shifted_solve(eb, m, r):
    """``(m nu I - A)^-1 r`` over the nu-extension itself."""
    N, A = eb.nu_field, eb.A
    n = len(A)
    M = [[(m * N.gen if i == j else N.zero) - A[i][j] for j in range(n)] for i in range(n)]
    try:
        return [row[0] for row in solve(N, M, [[x] for x in r])]
    except SingularMatrixError as exc:
        raise DegenerateHopfError(f"{m} i omega is an eigenvalue of the Jacobian (resonance)",
                                  reason="resonance") from exc


def _bordered(eb, r):
    """``h`` with ``(nu - A) h = r`` (``r`` in the range) and ``<p, h> = 0``."""
    N, A = eb.nu_field, eb.A
    n = len(A)
    M = [[(N.gen if i == j else N.zero) - A[i][j] for j in range(n)] + [N(eb.q[i])]
         for i in range(n)]
    M.append([N(x) for x in eb.pbar] + [N.zero])
    sol = solve(N, M, [[x] for x in r] + [[N.zero]])
    return [row[0] for row in sol[:n]]


def formula_c1_c2(taylor: TaylorForms, eb: Eigenbasis) -> tuple[Element, Element]:
    """``(c_1, c_2)`` by the closed formula, for the eigenvector ``q`` of
    ``eb`` (divide by ``<q, q>`` and ``<q, q>^2`` for the unit convention).

    ``taylor`` must carry the field to degree 5 at least.
    """
    N = eb.nu_field
    q = [N(x) for x in eb.q]
    qb = [x.conjugate() for x in q]
    pbar = eb.pbar
    conj = lambda v: [x.conjugate() for x in v]  # noqa: E731
    B = lambda *v: [N(x) for x in taylor.form(2, *v)]  # noqa: E731
    C = lambda *v: [N(x) for x in taylor.form(3, *v)]  # noqa: E731
    D = lambda *v: [N(x) for x in taylor.form(4, *v)]  # noqa: E731
    E = lambda *v: [N(x) for x in taylor.form(5, *v)]  # noqa: E731
    h20 = _shifted_solve(eb, 2, B(q, q))
    h11 = _shifted_solve(eb, 0, B(q, qb))
    h02 = conj(h20)
    r21 = _lin((1, C(q, q, qb)), (1, B(qb, h20)), (2, B(q, h11)))
    G21 = dot(N, pbar, r21)
    h30 = _shifted_solve(eb, 3, _lin((1, C(q, q, q)), (3, B(q, h20))))
    h21 = _bordered(eb, _lin((1, r21), (-G21, q)))
    h12 = conj(h21)
    h31 = _shifted_solve(eb, 2, _lin(
        (1, D(q, q, q, qb)), (3, C(q, q, h11)), (3, C(q, qb, h20)), (3, B(h20, h11)),
        (1, B(qb, h30)), (3, B(q, h21)), (-3 * G21, h20)))
    h22 = _shifted_solve(eb, 0, _lin(
        (1, D(q, q, qb, qb)), (4, C(q, qb, h11)), (1, C(qb, qb, h20)), (1, C(q, q, h02)),
        (2, B(h11, h11)), (2, B(q, h12)), (2, B(qb, h21)), (1, B(h20, h02)),
        (-2 * (G21 + G21.conjugate()), h11)))
    G32 = dot(N, pbar, _lin(
        (1, E(q, q, q, qb, qb)), (1, D(q, q, q, h02)), (6, D(q, q, qb, h11)),
        (3, D(q, qb, qb, h20)), (1, C(qb, qb, h30)), (3, C(q, q, h12)), (6, C(q, qb, h21)),
        (3, C(q, h20, h02)), (6, C(q, h11, h11)), (6, C(qb, h20, h11)), (2, B(qb, h31)),
        (3, B(q, h22)), (1, B(h02, h30)), (3, B(h20, h12)), (6, B(h11, h21))))
    return G21 / 2, G32 / 12
