"""Lyapunov coefficients of any order by the n-dimensional normalization method.

Pipeline place: eigenbasis + Taylor forms -> **complex normal form** -> result.
It is the engine's third route to the normal-form coefficients (the first is
the center-manifold series followed by the planar normal form, the second the
projection formula for ``c1``), and the one that reaches any order without
ever writing down the reduced planar system.

The method
----------
The center manifold and the normal form are found together: with
``x - x0 = H(z, conj z)``,

    H = z q + conj(z q) + sum_{j + l >= 2} h_jl z^j conj(z)^l,
    z' = nu z + sum_{k >= 1} c_k z |z|^(2k),           nu = i omega,

the invariance equation ``H_z z' + H_conj(z) conj(z)' = F(H)`` splits by
monomials.  At ``z^j conj(z)^l`` it reads

    ((j - l) nu I - A) h_jl = R_jl - [j = l + 1] c_l q - [l = j + 1] conj(c_j) conj(q),
    R_jl = [F_nonlinear(H)]_jl - sum_k (a c_k + b conj(c_k)) h_ab,  (a, b) = (j - k, l - k),

where ``R_jl`` only involves terms of lower degree.  Only ``j >= l`` is
solved; ``h_lj = conj(h_jl)`` because ``x`` is real.  For ``j - l != 1`` the
operator is invertible (no resonance) and :func:`~criticality.local.projection.solve_shifted`
solves it over the real field.  At the resonant monomials ``j = l + 1`` the
operator ``nu I - A`` is singular; the bordered system

    [[nu I - A, q], [conj(p)^T, 0]] [h; c] = [R; alpha]

is not, and gives ``c_l`` (its solvability condition is ``c_l = <p, R>``)
together with ``h_(l+1,l)`` normalised by ``<p, h_(l+1,l)> = alpha``.  The
package's choice is ``alpha = 0``; it is realified into a ``2n + 2`` system
over the real field (``h = X + nu Y``, ``c = c_a + nu c_b``).

Agreement with the center-manifold route (established, and tested exactly)
--------------------------------------------------------------------------
The center-manifold route takes ``h`` in the complementary invariant subspace
(``<p, h> = 0`` at every monomial) and then, in the planar normal form, sets
the near-identity transformation to zero at the resonant monomials.  Composing
the two, the map ``w -> x`` it builds has zero component along ``q`` at every
resonant monomial ``w^(k+1) conj(w)^k``: this is exactly the choice
``alpha = 0`` above.  Since every other coefficient of ``H`` is forced by the
invariance equation, both routes construct the *same* ``H`` and the *same*
normal form, so ``c_k`` (real and imaginary parts, every k) agree exactly.

What is invariant under other choices
-------------------------------------
Changing the choice at the resonant monomial of degree ``2m + 1``
(``<p, h_(m+1,m)> = alpha_m`` instead of 0, for the eigenvector ``q`` of the
eigenbasis) changes the normal form as follows (each fact is tested exactly
in tests/test_higher_order.py):

* ``c_1`` does not depend on any choice (both parts);
* ``c_2`` changes by exactly ``conj(alpha_1) c_1 - alpha_1 conj(c_1)``, which
  is purely imaginary: ``Re c_2`` is invariant *always*, even where
  ``Re c_1 != 0``; ``Im c_2`` is invariant only where ``c_1 = 0``;
* ``Re c_3`` changes by ``-2 Re(c_1) Re(alpha_2)`` under ``alpha_2`` and by
  terms in ``Re c_1`` and ``Re c_2`` under ``alpha_1``: it is invariant where
  ``Re c_1 = Re c_2 = 0``, and not in general where only ``Re c_1 = 0``.

This is the picture of the radial equation ``s' = 2 sum_k Re(c_k) s^(k+1)``
(``s = |z|^2``), a one-dimensional vector field changed by conjugation
``s -> s + beta_1 s^2 + beta_2 s^3 + ...``: with ``Re c_m`` its first
non-zero coefficient, ``Re c_m`` and ``Re c_2m`` are its formal invariants
and the coefficients in between can be removed (the bracket of ``s^(j+1)``
with ``s^(k+1)`` is ``(k - j) s^(j+k+1)``).  So ``l_k = Re(c_k)/omega`` is
invariant, and meaningful, where ``l_1 = ... = l_(k-1) = 0``; ``l_2`` is
invariant everywhere.  The reported ``c_k`` use ``alpha = 0`` throughout,
so all three routes agree exactly.

Scaling.  The eigenvector ``q`` of the eigenbasis is not normalised; with
``<q, q> = Q`` the coefficients for the unit eigenvector are
``c_k / Q^k`` (``x = zq + ...`` with ``q -> q / sqrt(Q)`` rescales ``z``).
The classical complex coordinate of a planar system ``z = x + i y`` with
``x' = -omega y + ...`` corresponds to ``q = (1, -i)/2`` up to phase, i.e.
``<q, q> = 1/2``; hence the classical ``c_k`` is ``2^-k`` times the
package's unit-convention ``c_k`` (equivalently, the unit ``c_k`` is
``2^k`` times the classical one).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from dataclasses import dataclass

from ..algebra.linalg import SingularMatrixError, solve
from ..budget import checkpoint
from ..errors import DegenerateHopfError
from .prepare import check_order
from .projection import solve_shifted
from ..algebra.series import compose

if TYPE_CHECKING:
    from ..algebra.field import Element
    from .eigenbasis import Eigenbasis
    from .taylor import TaylorForms

__all__ = ["NormalizationSeries", "normalization_series", "complex_normal_form",
           "unit_normal_form"]


@dataclass(frozen=True)
class NormalizationSeries:
    """The center manifold and normal form in complex coordinates.

    Attributes
    ----------
    h : dict
        ``(j, l) -> h_jl`` (vectors over the nu-extension) for ``j + l``
        from 1 to ``order - 1`` (and the resonant coefficient of degree
        ``order``); ``h_(1,0) = q``.  Both ``(j, l)`` and ``(l, j)`` are
        present.
    c : tuple
        ``c_1, c_2, ...`` for the eigenvector ``q`` of the eigenbasis (not
        normalised: divide ``c_k`` by ``<q, q>^k`` for the unit convention).
    order : int
        The highest degree treated (odd).
    """

    h: dict
    c: tuple
    order: int


def _conj_vec(v):
    return [x.conjugate() for x in v]


def _component_polys(N, h, n):
    """``u_i = sum h_jl[i] z^j conj(z)^l`` as bivariate dicts."""
    polys = [{} for _ in range(n)]
    for m, vec in h.items():
        for i in range(n):
            x = vec[i]
            if x:
                polys[i][m] = x
    return polys


def _nonlinear_part(taylor, polys, d):
    """Degree-``d`` coefficients of ``F_>=2(H)``: ``{(j, l): vector}``."""
    n = taylor.n
    cache: dict = {}
    out: dict = {}
    for i in range(n):
        for k in range(2, min(d, taylor.order) + 1):
            checkpoint()
            part = taylor.degree_part(i, k)
            if not part:
                continue
            for m, c in compose(taylor.field, part, polys, d, cache).items():
                if sum(m) != d or m[0] < m[1]:
                    continue
                vec = out.get(m)
                if vec is None:
                    vec = out[m] = [None] * n
                vec[i] = c if vec[i] is None else vec[i] + c
    return out


def _drift(h, c, j, l):
    """``sum_k (a c_k + b conj(c_k)) h_ab`` with ``(a, b) = (j - k, l - k)``."""
    acc = None
    for k, ck in enumerate(c, start=1):
        a, b = j - k, l - k
        if a < 0 or b < 0 or a + b < 2:
            continue
        factor = a * ck + b * ck.conjugate()
        if not factor:
            continue
        term = [factor * x for x in h[(a, b)]]
        acc = term if acc is None else [s + t for s, t in zip(acc, term)]
    return acc


def _bordered_resonant(eb, r, alpha):
    """Solve ``(nu I - A) h + c q = r``, ``conj(p)^T h = alpha`` for ``(h, c)``
    over the real field (realified ``2n + 2`` system)."""
    K, N, A, W = eb.field, eb.nu_field, eb.A, eb.W
    n = len(A)
    zero = K.zero
    size = 2 * n + 2
    rows = [[zero] * size for _ in range(size)]
    qa, qb = eb.Av, eb.v
    pa = [N.components(x)[0] for x in eb.pbar]
    pb = [N.components(x)[1] for x in eb.pbar]
    for i in range(n):
        re, im = rows[i], rows[n + i]
        for j in range(n):
            if A[i][j]:
                re[j] = -A[i][j]          # -A X
                im[n + j] = -A[i][j]      # -A Y
        re[n + i] = -W                    # -W Y
        im[i] = K.one                     # X
        re[2 * n] = qa[i]                 # c_a q_a
        re[2 * n + 1] = -W * qb[i]        # -W c_b q_b
        im[2 * n] = qb[i]                 # c_a q_b
        im[2 * n + 1] = qa[i]             # c_b q_a
    na, nb = rows[2 * n], rows[2 * n + 1]
    for j in range(n):
        na[j], na[n + j] = pa[j], -W * pb[j]
        nb[j], nb[n + j] = pb[j], pa[j]
    ra = [N.components(x) for x in r]
    aa, ab = N.components(N(alpha))
    rhs = [[x[0]] for x in ra] + [[x[1]] for x in ra] + [[aa], [ab]]
    try:
        sol = [row[0] for row in solve(K, rows, rhs)]
    except SingularMatrixError as exc:
        raise DegenerateHopfError(
            "the bordered system at a resonant order is singular: the eigenvalue i omega "
            "is not simple", reason="two_critical_pairs") from exc
    h = [N.element(sol[j], sol[n + j]) for j in range(n)]
    return h, N.element(sol[2 * n], sol[2 * n + 1])


def normalization_series(taylor: TaylorForms, eb: Eigenbasis, order: int, *,
                         choices: Any = None) -> NormalizationSeries:
    """Solve the homological equations degree by degree up to ``order``.

    Parameters
    ----------
    taylor : TaylorForms
        The shifted field at the critical point (coefficients in ``eb.field``).
    eb : Eigenbasis
    order : int
        Odd, at least 3: ``c_1 .. c_((order-1)/2)`` are computed.
    choices : mapping, optional
        ``{k: alpha_k}``: impose ``<p, h_(k+1,k)> = alpha_k`` (elements of the
        nu-extension) instead of 0 -- an alternative normal form, used to
        study which coefficients are invariant.

    Raises
    ------
    DegenerateHopfError
        At a strong resonance (``m i omega`` an eigenvalue, ``m = 0, 2, 3, ...``)
        or when ``i omega`` is not a simple eigenvalue.
    """
    check_order(order)
    N = eb.nu_field
    n = len(eb.A)
    q = [N(x) for x in eb.q]
    h = {(1, 0): q, (0, 1): _conj_vec(q)}
    c: list = []
    choices = dict(choices or {})
    for d in range(2, order + 1):
        polys = _component_polys(N, h, n)
        F = _nonlinear_part(taylor, polys, d)
        for l in range(d // 2 + 1):
            j = d - l
            r = [N(x) if x is not None else N.zero for x in F.get((j, l), [None] * n)]
            drift = _drift(h, c, j, l)
            if drift is not None:
                r = [x - y for x, y in zip(r, drift)]
            if j - l == 1:
                hjl, ck = _bordered_resonant(eb, r, choices.get(l, 0))
                c.append(ck)
            else:
                if d == order:
                    continue
                hjl = solve_shifted(eb, j - l, r)
            h[(j, l)] = hjl
            if j != l:
                h[(l, j)] = _conj_vec(hjl)
    return NormalizationSeries(h, tuple(c), order)


def complex_normal_form(taylor: TaylorForms, eb: Eigenbasis, order: int) -> tuple:
    """``(c_1, c_2, ...)`` up to degree ``order`` in the unit-eigenvector
    convention (``<q, q> = 1``), by the normalization method.

    Examples
    --------
    The normal form ``z' = (mu + i) z + a z|z|^2 + b z|z|^4`` written for
    ``z = x + i y`` has, in the unit convention, ``c_1 = 2 a`` and
    ``c_2 = 4 b`` (see the module docstring).
    """
    return unit_normal_form(normalization_series(taylor, eb, order), eb.qq)


def unit_normal_form(series: NormalizationSeries, qq: Element) -> tuple:
    """The coefficients of ``series`` divided by ``<q, q>^k``."""
    return tuple(ck / qq ** k for k, ck in enumerate(series.c, start=1))
