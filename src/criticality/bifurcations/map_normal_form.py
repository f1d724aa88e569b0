"""Normal-form coefficients of maps at a multiplier on the unit circle.

Pipeline place: fixed point + Taylor forms of F -> **eigenvectors, homological
solves, coefficients** -> flip and Neimark-Sacker results.

Write ``F(x0 + u) = x0 + A u + (1/2) B(u, u) + (1/6) C(u, u, u) + ...``.  On
the center manifold ``x - x0 = H(z, conj z)`` and the restricted map is
``z -> G(z, conj z)``; the invariance equation ``F(H(z)) = H(G(z))`` at order
``z^j conj(z)^k`` is a linear system with the homological operator of maps,
``lambda^j conj(lambda)^k I - A`` (``lambda`` the critical multiplier), which
is singular exactly at the resonant orders.

Flip (``A q = -q``, ``A^T p = -p``, ``<p, q> = 1``, real vectors): the
restricted map is ``y -> -y + a y^2 + b y^3``; its second iterate is
``y -> y - 2 c y^3`` with

    c = a^2 + b = (1/6) <p, C(q, q, q)> + (1/2) <p, B(q, (I - A)^{-1} B(q, q))>

(Kuznetsov, Elements of Applied Bifurcation Theory, 3rd ed., 2004, Section
5.4, from memory; re-derived here and tested on the truncated normal form).

Neimark-Sacker (``A q = lambda q``, ``A^T p = conj(lambda) p``,
``<p, q> = conj(p)^T q = 1``, ``lambda = e^{i theta}``): ``g20 = g11 = 0``
are removed with

    h20 = (lambda^2 I - A)^{-1} B(q, q),   h11 = (I - A)^{-1} B(q, conj q),

and the resonant order ``z^2 conj z`` gives the normal form
``z -> lambda z + c1 z |z|^2 + ...`` with

    c1 = (1/2) <p, C(q, q, conj q) + 2 B(q, h11) + B(conj q, h20)>.

The complex solves run over the real field: ``(sigma I - A)(X + nu Y) = r``
with ``sigma = alpha + beta nu`` becomes one real block system.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Sequence

from ..algebra.linalg import SingularMatrixError, dot, kernel, matmul, matvec, solve, \
    solve_vector, transpose
from ..algebra.quadratic import lower
from ..errors import DegenerateBifurcationError

if TYPE_CHECKING:
    from ..algebra.field import Element
    from ..local.taylor import TaylorForms

__all__ = ["flip_vectors", "flip_coefficients", "unit_circle_vectors", "ns_coefficient",
           "solve_complex"]


def _shifted(K, A, sigma):
    n = len(A)
    return [[(sigma if i == j else K.zero) - A[i][j] for j in range(n)] for i in range(n)]


def flip_vectors(K: Any, A: list[list[Element]]) -> tuple[list[Element], list[Element]]:
    """``(q, p)`` with ``A q = -q``, ``A^T p = -p``, ``<p, q> = 1``."""
    M = _shifted(K, A, -K.one)
    right, left = kernel(K, M), kernel(K, transpose(M))
    if len(right) != 1:
        raise DegenerateBifurcationError(
            f"the multiplier -1 has a {len(right)}-dimensional eigenspace; a simple multiplier "
            "-1 was expected", reason="double_flip")
    q, p = right[0], left[0]
    s = dot(K, p, q)
    if not s:
        raise DegenerateBifurcationError(
            "the multiplier -1 is not simple (a Jordan block: the 1:2 resonance)",
            reason="resonance_1_2")
    return q, [x / s for x in p]


def flip_coefficients(K: Any, A: list[list[Element]], taylor: TaylorForms, q: Sequence[Element],
                      p: Sequence[Element]) -> tuple[Element, Element]:
    """``(a, c)``: the quadratic coefficient ``a = <p, B(q, q)>/2`` of the
    restricted map and the flip coefficient ``c`` (module docstring)."""
    Bqq = taylor.form(2, q, q)
    try:
        h = solve_vector(K, _shifted(K, A, K.one), Bqq)
    except SingularMatrixError as exc:
        raise DegenerateBifurcationError(
            "a multiplier +1 coexists with the multiplier -1 (a fold-flip point); the flip "
            "analysis does not apply", reason="fold_flip") from exc
    a = dot(K, p, Bqq) / 2
    third = dot(K, p, taylor.form(3, q, q, q)) / 6 if taylor.order >= 3 else K.zero
    return a, third + dot(K, p, taylor.form(2, q, h)) / 2


def unit_circle_vectors(K: Any, N: Any, A: list[list[Element]],
                        lam: Element) -> tuple[list[Element], list[Element]]:
    """``(q, pbar)``: ``A q = lambda q`` and ``A^T pbar = lambda pbar`` with
    ``pbar^T q = 1`` (``pbar = conj(p)``), from the real kernels of
    ``A^2 - 2 cos(theta) A + I``; no eigenvalue of ``A`` is computed."""
    n = len(A)
    two_cos = lower(lam + lam.conjugate())
    A2 = matmul(K, A, A)
    M = [[A2[i][j] - two_cos * A[i][j] + (K.one if i == j else K.zero) for j in range(n)]
         for i in range(n)]
    right, left = kernel(K, M), kernel(K, transpose(M))
    if len(right) != 2 or len(left) != 2:
        raise DegenerateBifurcationError(
            f"the multipliers exp(+-i theta) span a {len(right)}-dimensional real space, not 2: "
            "they are not simple (a double pair on the unit circle)", reason="two_critical_pairs")
    lam_bar = lam.conjugate()
    v, w = right[0], left[0]
    Av, wA = matvec(K, A, v), matvec(K, transpose(A), w)
    q = [N(a) - lam_bar * N(b) for a, b in zip(Av, v)]
    pbar = [N(a) - lam_bar * N(b) for a, b in zip(wA, w)]
    s = N.zero
    for x, y in zip(pbar, q):
        s = s + x * y
    if not s:
        raise DegenerateBifurcationError("the left and right eigenvectors of the critical "
                                         "multiplier are orthogonal: it is not simple",
                                         reason="two_critical_pairs")
    inv = 1 / s
    return q, [x * inv for x in pbar]


def solve_complex(K: Any, N: Any, A: list[list[Element]], sigma: Element,
                  r: Sequence[Element]) -> list[Element]:
    """``h`` with ``(sigma I - A) h = r`` for ``sigma`` and ``r`` in ``N = K(nu)``,
    as one real block system of size 2n."""
    n = len(A)
    alpha, beta = N.components(sigma)
    d = N.radicand
    top = _shifted(K, A, alpha)
    M = [list(top[i]) + [beta * d if i == j else K.zero for j in range(n)] for i in range(n)]
    M += [[beta if i == j else K.zero for j in range(n)] + list(top[i]) for i in range(n)]
    rhs = [N.components(x)[0] for x in r] + [N.components(x)[1] for x in r]
    sol = solve(K, M, [[x] for x in rhs])
    return [N.element(sol[i][0], sol[n + i][0]) for i in range(n)]


def ns_coefficient(K: Any, N: Any, A: list[list[Element]], taylor: TaylorForms,
                   q: Sequence[Element], pbar: Sequence[Element], lam: Element) -> Element:
    """``c1`` of the Neimark-Sacker normal form for the eigenvector ``q``
    (not normalised; ``c1`` scales like ``|q|^2``)."""
    qbar = [x.conjugate() for x in q]
    Bqq = taylor.form(2, q, q)
    Bqqb = [lower(N(x).a) for x in taylor.form(2, q, qbar)]
    try:
        h11 = solve_vector(K, _shifted(K, A, K.one), Bqqb)
    except SingularMatrixError as exc:
        raise DegenerateBifurcationError("a multiplier +1 coexists with the critical pair",
                                         reason="fold_neimark_sacker") from exc
    try:
        h20 = solve_complex(K, N, A, lam * lam, [N(x) for x in Bqq])
    except SingularMatrixError as exc:
        raise DegenerateBifurcationError(
            "lambda^2 is a multiplier too (the 1:3 resonance when lambda^3 = 1); the "
            "Neimark-Sacker normal form does not apply", reason="resonance_1_3") from exc
    total = [N(c) + 2 * N(b) + N(e) for c, b, e in zip(
        taylor.form(3, q, q, qbar), taylor.form(2, q, [N(x) for x in h11]),
        taylor.form(2, qbar, h20))]
    acc = N.zero
    for x, y in zip(pbar, total):
        acc = acc + x * y
    return acc / 2
