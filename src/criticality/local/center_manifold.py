"""Reduction onto the two-dimensional center manifold, as a series.

Pipeline place: eigenbasis + Taylor forms -> **center manifold** -> normal form.

In the real center coordinates ``(xi1, xi2)`` of the basis
``e1 = A v = Re q``, ``e2 = -v = -Im q / omega`` the linear part is
``J = [[0, -1], [W, 0]]`` and every coefficient stays in the real field (no
square root of ``W``).  The manifold is the graph
``u = xi1 e1 + xi2 e2 + h(xi)`` with ``h`` in the complementary invariant
subspace (annihilated by ``w`` and ``A^T w``) and the reduced system is
``xi' = J xi + g(xi)``.  At each degree k the invariance equation

    Dh_k(xi) J xi - A h_k(xi) = pi_s [F(u)]_k - sum_j Dh_j(xi) g_(k+1-j)(xi)

is a linear system for the ``(k+1) n`` coefficients of ``h_k`` in the
monomials ``xi1^(k-b) xi2^b``.  It is block-diagonalised by the complex
monomials ``z^j conj(z)^l`` and solved exactly with n x n real solves (see
:func:`_solve_homological`); at odd k the operator is singular on the whole
space and two bordering rows pin ``h_k`` to the complementary subspace.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Callable

from dataclasses import dataclass

import sympy

from ..algebra.linalg import SingularMatrixError, matvec, solve_consistent
from ..algebra.quadratic import QuadraticElement
from ..budget import checkpoint
from ..errors import CriticalityError, DegenerateHopfError
from .projection import solve_shifted
from ..algebra.series import compose, mul as poly_mul

if TYPE_CHECKING:
    from ..algebra.field import Element
    from .eigenbasis import Eigenbasis
    from .taylor import TaylorForms

__all__ = ["ReducedSystem", "reduce_to_center_manifold"]


@dataclass(frozen=True)
class ReducedSystem:
    """The vector field restricted to the center manifold.

    ``xi1' = -xi2 + g1(xi)``, ``xi2' = W xi1 + g2(xi)``, where the state is
    ``x = x0 + xi1 Re(q) - xi2 Im(q)/omega + h(xi)``.  ``g1`` and ``g2`` map
    exponent pairs ``(a, b)`` (for ``xi1^a xi2^b``) to field elements, degrees
    2 to ``order``; ``h`` maps a degree to the list of coefficient vectors of
    ``xi1^(k-b) xi2^b``, b = 0..k.
    """

    W: Any
    g1: dict
    g2: dict
    h: dict
    order: int
    field: Any

    def rotation_form(self, to_sympy: Callable[[Element], sympy.Expr], omega: sympy.Expr,
                      x: sympy.Symbol, y: sympy.Symbol) -> tuple[sympy.Expr, sympy.Expr]:
        """The right-hand sides in the coordinates ``x = xi1``, ``y = xi2 / omega``
        where the linear part is the rotation ``[[0, -omega], [omega, 0]]``:
        returns ``(f, g)`` with ``x' = -omega y + f``, ``y' = omega x + g``.
        Coefficients are converted by ``to_sympy``; powers of omega are split
        into ``W^k`` (in the field) times at most one ``omega``."""
        def term(c, a, b, shift):
            k = b + shift  # power of omega multiplying c
            w = self.W ** (k // 2) if k >= 0 else self.W ** (-((-k + 1) // 2))
            odd = k % 2
            return to_sympy(c * w) * omega ** odd * x ** a * y ** b

        f = sympy.Add(*[term(c, a, b, 0) for (a, b), c in sorted(self.g1.items())])
        g = sympy.Add(*[term(c, a, b, -1) for (a, b), c in sorted(self.g2.items())])
        return f, g



def reduce_to_center_manifold(taylor: TaylorForms, eb: Eigenbasis, order: int) -> ReducedSystem:
    """Compute ``g`` up to degree ``order`` (and ``h`` up to ``order - 1``)."""
    K, n = eb.field, len(eb.A)
    e1, e2 = eb.Av, [-x for x in eb.v]
    u = [{(1, 0): e1[j], (0, 1): e2[j]} for j in range(n)]
    for j in range(n):
        u[j] = {m: c for m, c in u[j].items() if c}
    g1: dict = {}
    g2: dict = {}
    h: dict = {}
    for k in range(2, order + 1):
        cache: dict = {}
        R = [_degree_part(taylor, i, u, k, cache) for i in range(n)]
        stable = []
        for b in range(k + 1):
            checkpoint()
            y = [R[i].get((k - b, b), K.zero) for i in range(n)]
            alpha, beta = eb.center_coordinates(y)
            if alpha:
                g1[(k - b, b)] = alpha
            if beta:
                g2[(k - b, b)] = beta
            if k < order:  # the stable part of the top degree feeds no h
                stable.append([y[i] - alpha * e1[i] - beta * e2[i] for i in range(n)])
        if k == order:
            break
        rhs = _subtract_drift(K, stable, h, g1, g2, k, n)
        h[k] = _solve_homological(eb, rhs, k)
        for b in range(k + 1):
            for j in range(n):
                c = h[k][b][j]
                if c:
                    u[j][(k - b, b)] = c
    return ReducedSystem(eb.W, g1, g2, h, order, K)


def _degree_part(taylor, i, u, k, cache):
    out: dict = {}
    for d in range(2, k + 1):
        checkpoint()
        part = taylor.degree_part(i, d)
        if not part:
            continue
        for m, c in compose(taylor.field, part, u, k, cache).items():
            if sum(m) == k:
                out[m] = out[m] + c if m in out else c
    return out


def _subtract_drift(K, stable, h, g1, g2, k, n):
    """``rhs_b = stable_b - [sum_j Dh_j g_(k+1-j)]`` at ``xi1^(k-b) xi2^b``."""
    rhs = [list(v) for v in stable]
    for j in range(2, k):
        i = k + 1 - j
        for c in range(j + 1):  # h_j coefficient of xi1^(j-c) xi2^c
            vec = h[j][c]
            for (a, bb), gv in g1.items():
                if a + bb != i or j - c == 0:
                    continue
                _accumulate(rhs, vec, (j - c) * gv, j - c - 1 + a, c + bb, n)
            for (a, bb), gv in g2.items():
                if a + bb != i or c == 0:
                    continue
                _accumulate(rhs, vec, c * gv, j - c + a, c - 1 + bb, n)
    return rhs


def _accumulate(rhs, vec, factor, p1, p2, n) -> None:
    b = p2
    for t in range(n):
        if vec[t]:
            rhs[b][t] = rhs[b][t] - factor * vec[t]


def _solve_homological(eb, rhs, k):
    """Solve for ``h_k`` (list over b of vectors) with ``h_k`` in the
    complementary subspace.

    The operator ``h -> Dh J xi - A h`` is diagonal in the complex monomials
    ``z^j conj(z)^l`` (``z = xi1 + i xi2 / omega``), where it is
    ``i omega (j - l) - A``: the right-hand side is moved to that basis, each
    coefficient is solved by an n x n real solve (``A``, ``A^2 + m^2 W``, or at
    ``j - l = +-1`` the singular ``A^2 + W`` bordered by the two rows that pin
    the solution to the complementary subspace), and the result is moved back.
    Real coefficients give ``h_lj = conj(h_jl)``, so only ``j >= l`` is solved.
    """
    N, n = eb.nu_field, len(eb.A)
    to_complex, to_real = _monomial_maps(eb, k)
    h_c = {}
    for j in range(k, (k - 1) // 2, -1):
        l = k - j
        r = [N.zero] * n
        for b in range(k + 1):
            t = to_complex[b].get((j, l))
            if t:
                r = [x + t * y for x, y in zip(r, rhs[b])]
        h_c[(j, l)] = _solve_resonant(eb, r) if j - l == 1 else \
            _shifted(eb, j - l, r, k)
        if j != l:
            h_c[(l, j)] = [x.conjugate() for x in h_c[(j, l)]]
    out = []
    for b in range(k + 1):
        vec = [N.zero] * n
        for (j, l), h in h_c.items():
            t = to_real[(j, l)].get(b)
            if t:
                vec = [x + t * y for x, y in zip(vec, h)]
        out.append([_real_part(x, N) for x in vec])
    return out


def _real_part(x, N):
    if isinstance(x, QuadraticElement) and x.ext is N:
        if x.b:
            raise CriticalityError("internal: the center manifold came out complex")
        return x.a
    return x


def _shifted(eb, m, r, k):
    try:
        return solve_shifted(eb, m, r)
    except DegenerateHopfError as exc:
        raise DegenerateHopfError(
            f"the center-manifold equation of degree {k} is singular: an eigenvalue of the "
            f"Jacobian is {m} i omega (a resonance)", reason="resonance") from exc


def _solve_resonant(eb, r):
    """``(nu I - A) h = r`` with ``r`` and ``h`` in the complementary subspace:
    ``h = -(nu I + A) y`` with ``(A^2 + W I) y = r``, ``w.y = (A^T w).y = 0``."""
    K, N, A, n = eb.field, eb.nu_field, eb.A, len(eb.A)
    M = [[eb.A2[i][j] + (eb.W if i == j else K.zero) for j in range(n)] for i in range(n)]
    rows = M + [list(eb.w), list(eb.wA)]
    parts = [N.components(x) for x in r]
    B = [[a, b] for a, b in parts] + [[K.zero, K.zero], [K.zero, K.zero]]
    try:
        Y = solve_consistent(K, rows, B)
    except SingularMatrixError as exc:
        raise DegenerateHopfError("the resonant center-manifold equation is singular: the "
                                  "pair +-i omega is not simple", reason="resonance") from exc
    X = [row[0] for row in Y]
    Z = [row[1] for row in Y]
    AX, AZ = matvec(K, A, X), matvec(K, A, Z)
    # y = X + nu Z; (nu + A) y = (A X - W Z) + nu (X + A Z)
    return [N.element(-(ax - eb.W * z), -(x + az)) for ax, z, x, az in zip(AX, Z, X, AZ)]


def _monomial_maps(eb, k):
    """Coefficient maps between ``xi1^(k-b) xi2^b`` and ``z^j conj(z)^l``."""
    N, W = eb.nu_field, eb.W
    nu, half = N.gen, N(1) / 2
    xi1 = {(1, 0): half, (0, 1): half}
    xi2 = {(1, 0): -nu * half, (0, 1): nu * half}
    to_complex = []
    for b in range(k + 1):
        p = {(0, 0): N.one}
        for _ in range(k - b):
            p = poly_mul(p, xi1, k)
        for _ in range(b):
            p = poly_mul(p, xi2, k)
        to_complex.append(p)
    c = nu / W  # z = xi1 + (nu/W) xi2, conj(z) = xi1 - (nu/W) xi2
    z, zb = {(1, 0): N.one, (0, 1): c}, {(1, 0): N.one, (0, 1): -c}
    to_real = {}
    for j in range(k + 1):
        p = {(0, 0): N.one}
        for _ in range(j):
            p = poly_mul(p, z, k)
        for _ in range(k - j):
            p = poly_mul(p, zb, k)
        to_real[(j, k - j)] = {bb: v for (aa, bb), v in p.items()}
    return to_complex, to_real
