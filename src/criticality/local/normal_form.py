"""The Poincare normal form of the reduced planar system.

Pipeline place: center manifold -> **normal form** -> result.

The reduced system ``xi' = J xi + g(xi)`` is written in the complex coordinate
``z = xi1 + i xi2 / omega`` (so that ``x = x0 + Re(z q) + ...``), where it reads
``z' = i omega z + G(z, conj z)``.  A near-identity change
``z = w + sum h_jl w^j conj(w)^l`` removes every non-resonant term degree by
degree; the homological equation at ``w^j conj(w)^l`` is

    i omega (j - l - 1) h_jl + N_jl = [G(H, conj H) - (H_w - 1) N - H_conj(w) conj(N)]_jl,

solved with ``h_jl = 0`` at the resonant monomials ``j = l + 1``, which leaves
``w' = i omega w + sum_k c_k w |w|^(2k)``.  The coefficients are then converted
to the package's convention (``x - x0 = z q + conj(z q)`` with ``<q, q> = 1``):
``c_k = 4^k N_(k+1,k) / <q, q>^k``.

:func:`hassard_c1` is the classical closed formula for the first coefficient
(Hassard, Kazarinoff and Wan, Theory and Applications of Hopf Bifurcation,
1981; Guckenheimer and Holmes, 1983, Section 3.4), used as a cross-check.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Sequence

from math import factorial

from ..algebra.series import add_into, compose_degree, conjugate, derivative, mul

if TYPE_CHECKING:
    from ..algebra.field import Element
    from .center_manifold import ReducedSystem

__all__ = ["complexify", "planar_normal_form", "hassard_c1", "unit_coefficients"]


def complexify(reduced: ReducedSystem, N: Any, order: int) -> dict:
    """``G(z, conj z)`` with ``z' = nu z + G`` for the reduced system."""
    W_inv = 1 / reduced.W
    half = N(1) / 2
    nu = N.gen
    xi1 = {(1, 0): half, (0, 1): half}
    xi2 = {(1, 0): -nu * half, (0, 1): nu * half}
    powers = {}

    def pw(var, poly, k):
        key = (var, k)
        if key not in powers:
            powers[key] = {(0, 0): N.one} if k == 0 else mul(pw(var, poly, k - 1), poly, order)
        return powers[key]

    G: dict = {}
    for gdict, factor in ((reduced.g1, N.one), (reduced.g2, nu * W_inv)):
        for (a, b), c in gdict.items():
            term = mul(pw(1, xi1, a), pw(2, xi2, b), order)
            coeff = factor * c
            add_into(G, {m: coeff * v for m, v in term.items()})
    return {m: c for m, c in G.items() if c}


def planar_normal_form(G: dict, N: Any, order: int) -> list[Element]:
    """Normal-form coefficients ``[N_21, N_32, ...]`` up to degree ``order``
    for ``z' = nu z + G(z, conj z)`` (``G`` starts at degree 2)."""
    nu = N.gen
    H = {(1, 0): N.one}
    Nf: dict = {}
    for d in range(2, order + 1):
        Hb = conjugate(H)
        # at the last degree only the resonant coefficient is wanted
        keep = {((d + 1) // 2, (d - 1) // 2)} if d == order else None
        rhs = compose_degree(G, H, Hb, d, keep)
        if Nf:
            Hw = derivative(H, 0)
            Hw.pop((0, 0), None)
            Hwb = derivative(H, 1)
            corr: dict = {}
            add_into(corr, mul(Hw, Nf, d, True, keep))
            add_into(corr, mul(Hwb, conjugate(Nf), d, True, keep))
            for m, c in corr.items():
                if sum(m) == d:
                    rhs[m] = rhs[m] - c if m in rhs else -c
        for (j, l), c in rhs.items():
            if not c:
                continue
            if j - l == 1:
                Nf[(j, l)] = c
            else:
                H[(j, l)] = c / (nu * (j - l - 1))
    return [Nf.get((k + 1, k), N.zero) for k in range(1, (order - 1) // 2 + 1)]


def hassard_c1(G: dict, N: Any, W: Element) -> Element:
    """``c1`` of ``z' = nu z + G`` by the closed formula
    ``c1 = i/(2 omega) (g20 g11 - 2|g11|^2 - |g02|^2/3) + g21/2``,
    ``g_jl = j! l! G_jl`` (same scaling as :func:`planar_normal_form`)."""
    def g(j, l):
        return G.get((j, l), N.zero) * (factorial(j) * factorial(l))
    g20, g11, g02, g21 = g(2, 0), g(1, 1), g(0, 2), g(2, 1)
    bracket = g20 * g11 - 2 * g11 * g11.conjugate() - g02 * g02.conjugate() / 3
    return N.gen * bracket / (2 * W) + g21 / 2


def unit_coefficients(raw: Sequence[Element], qq: Element) -> list[Element]:
    """``c_k`` in the unit-eigenvector convention from the coefficients of the
    ``z = xi1 + i xi2/omega`` coordinate: ``4^k raw_k / <q,q>^k``."""
    return [c * (4 ** k) / qq ** k for k, c in enumerate(raw, start=1)]
