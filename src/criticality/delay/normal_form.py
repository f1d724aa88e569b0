"""The normal form on the center manifold of a retarded equation: c1 by two routes.

Pipeline place: critical set -> **normal form** -> result.

At a crossing ``lambda = i omega`` the center eigenfunction is
``q(theta) = q exp(i omega theta)`` on ``[-tau_max, 0]`` with ``Delta(i omega) q
= 0``; the adjoint eigenfunction is ``psi(s) = p exp(-i omega s)`` on ``[0,
tau_max]`` with ``p Delta(i omega) = 0`` (a row vector), and the bilinear form

    <psi, phi> = psi(0) phi(0) - sum_k int_{-tau_k}^0 psi(xi + tau_k) A_k phi(xi) d xi

gives ``<psi, q> = p Delta'(i omega) q`` with ``Delta'(lambda) = I + sum_k tau_k
A_k exp(-lambda tau_k)``.  The pairing is normalised to 1 by dividing ``p`` by
it; then ``psi(0)`` projects the nonlinearity onto the center direction.

Route A (the projection form): with extended vectors ``Q``, ``conj Q`` of the
eigenfunction and its conjugate,

    h20 = Delta(2 i omega)^{-1} B(Q, Q),   h11 = Delta(0)^{-1} B(Q, conj Q),
    c1 = 1/2 psi(0) [C(Q, Q, conj Q) + 2 B(Q, H11) + B(conj Q, H20)],

``H20``, ``H11`` the extended vectors of ``h20 exp(2 i omega theta)`` and of the
constant ``h11``.  For zero delays this is the projection formula of ordinary
equations (``Delta(2 i omega) = 2 i omega - A``, ``Delta(0) = -A``).

Route B (the procedure of Hassard, Kazarinoff and Wan, *Theory and
Applications of Hopf Bifurcation*, 1981, ch. 1 and the delay examples): the
coefficients ``g20, g11, g02`` of the reduced equation, the second-order
center-manifold terms ``w20(theta)``, ``w11(theta)`` including their center
components ``(i g20/omega) q(theta) + (i conj g02/(3 omega)) conj q(theta)``
and ``-(i g11/omega) q(theta) + (i conj g11/omega) conj q(theta)``, then
``g21`` and ``c1 = i/(2 omega) (g20 g11 - 2 |g11|^2 - |g02|^2/3) + g21/2``.

Both return ``c1`` for the eigenvector ``q`` as computed; the result divides by
``<q, q> = conj(q)^T q`` (the project's unit normalisation).
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from dataclasses import dataclass

from fractions import Fraction

import sympy

from .cx import ONE, Cx, dot, kernel, mat_vec, solve

if TYPE_CHECKING:
    from .critical import Crossing
    from .linearize import DelayForms

__all__ = ["CenterData", "center_data"]


@dataclass(frozen=True)
class CenterData:
    """Internal values at a crossing (Cx in the symbols ``w``, ``T`` of the crossing).

    ``c1_projection`` and ``c1_hkw`` are for the eigenvector ``q`` as found (not
    normalised); ``qq = <q, q>``; ``pairing = p Delta'(i omega) q``;
    ``slope = d lambda/d mu`` at the crossing.
    """

    q: tuple
    p: tuple
    pairing: Cx
    qq: sympy.Expr
    c1_projection: Cx
    c1_hkw: Cx
    h20: tuple
    h11: tuple
    slope: Cx


def _transpose(M):
    return [list(col) for col in zip(*M)]


def _field_for(exprs, extra):
    """The engine's rational function field over the symbols of ``exprs`` (and
    ``extra``), with its conversion; None where some expression is not rational
    over QQ in its symbols (pi, radicals, functions)."""
    from ..algebra.domain import make_base_field
    symbols = {s for s in extra if isinstance(s, sympy.Symbol)}
    for e in exprs:
        symbols |= sympy.sympify(e, strict=True).free_symbols
    symbols = sorted(symbols, key=sympy.default_sort_key)
    for e in exprs:
        e = sympy.sympify(e, strict=True)
        if not e.is_rational_function(*symbols) or e.has(sympy.pi, sympy.E):
            return None
    return make_base_field(symbols)


def _sympy_of(x):
    if isinstance(x, (int, Fraction)):
        return sympy.Rational(x)
    return x if isinstance(x, sympy.Basic) else x.field.to_sympy(x)


def center_data(forms: DelayForms, crossing: Crossing, mu_pos: sympy.Symbol) -> CenterData:
    """q, p, the pairing, c1 by both routes and d lambda/d mu at the crossing.

    ``forms`` are in positive-assumption symbols with ``mu`` still free;
    ``mu_pos`` is the bifurcation parameter's symbol there.  The computation
    runs in the engine's rational function field QQ(parameters, omega, tau)
    where everything is rational there, else in sympy expressions.
    """
    at = forms if crossing.mode == "delay" else forms.substitute({mu_pos: crossing.mu_of_w})
    E = crossing.factor
    exprs = [E.re, E.im, *at.delays, *(m[i, j] for m in at.matrices for i in range(m.rows)
                                      for j in range(m.cols)),
             *(v for t in at.second + at.third for v in t.values())]
    slope_exprs = [m.diff(mu_pos)[i, j] for m in forms.matrices for i in range(m.rows)
                   for j in range(m.cols)] if crossing.mode == "parameter" else []
    if crossing.mode == "parameter":
        slope_exprs = [sympy.sympify(e, strict=True).xreplace({mu_pos: crossing.mu_of_w})
                       for e in slope_exprs]
    K = _field_for(exprs + slope_exprs, (crossing.w, crossing.T))
    if K is None:
        return _center_data(at, forms, crossing, mu_pos, None)
    data = _center_data(at, forms, crossing, mu_pos, K.from_sympy)
    back = _sympy_of
    return CenterData(tuple(v.map(back) for v in data.q), tuple(v.map(back) for v in data.p),
                      data.pairing.map(back), back(data.qq), data.c1_projection.map(back),
                      data.c1_hkw.map(back), tuple(v.map(back) for v in data.h20),
                      tuple(v.map(back) for v in data.h11), data.slope.map(back))


def _center_data(at_sym, forms_sym, crossing, mu_pos, conv) -> CenterData:
    """The computation proper; ``conv`` converts sympy to field elements (None:
    stay in sympy)."""
    at = at_sym if conv is None else at_sym.converted(conv)
    conv = conv or (lambda e: e)
    w, T = conv(crossing.w), conv(crossing.T)
    E = crossing.factor.map(conv)
    delays = (T,) if crossing.mode == "delay" else at.delays
    factors = [E]
    D = at.delta(Cx(0, w), factors)
    q = kernel(D)
    p = kernel(_transpose(D))
    pairing = dot(p, mat_vec(at.delta_prime(factors, delays), q))
    pt = [x / pairing for x in p]
    Q = at.extend(q, factors)
    Qb = at.extend([x.conj() for x in q], [E.conj()])
    r20, r11 = at.B(Q, Q), at.B(Q, Qb)
    h20 = solve(at.delta(Cx(0, 2 * w), [E * E]), r20)
    h11 = solve(at.delta(Cx(0), [ONE]), r11)
    H20, H11 = at.extend(h20, [E * E]), at.extend(h11, [ONE])
    cubic = at.C(Q, Q, Qb)
    c1_a = dot(pt, [c + 2 * b1 + b2 for c, b1, b2 in
                    zip(cubic, at.B(Q, H11), at.B(Qb, H20))]) / 2
    c1_b = _hkw(at, pt, Q, Qb, H20, H11, r20, r11, cubic, w)
    qq = q[0].abs2()
    for x in q[1:]:
        qq = qq + x.abs2()
    slope = _slope(forms_sym, crossing, mu_pos, q, p, pairing, factors, w, conv)
    return CenterData(tuple(q), tuple(pt), pairing, qq, c1_a, c1_b, tuple(h20), tuple(h11),
                      slope)


def _hkw(at, pt, Q, Qb, H20, H11, r20, r11, cubic, w) -> Cx:
    """c1 by the g-coefficients of Hassard, Kazarinoff and Wan (1981)."""
    i = Cx(0, 1)
    g20, g11, g02 = dot(pt, r20), dot(pt, r11), dot(pt, at.B(Qb, Qb))
    a20, b20 = i * g20 / w, i * g02.conj() / (3 * w)
    a11, b11 = -(i * g11) / w, i * g11.conj() / w
    W20 = [a20 * x + b20 * y + z for x, y, z in zip(Q, Qb, H20)]
    W11 = [a11 * x + b11 * y + z for x, y, z in zip(Q, Qb, H11)]
    g21 = dot(pt, [c + 2 * b1 + b2 for c, b1, b2 in
                   zip(cubic, at.B(Q, W11), at.B(Qb, W20))])
    bracket = g20 * g11 - 2 * g11.abs2() - Cx(g02.abs2()) / 3
    return i * bracket / (2 * w) + g21 / 2


def _slope(forms, crossing, mu_pos, q, p, pairing, factors, w, conv) -> Cx:
    """d lambda/d mu = p (d Delta/d mu) q ... = -p Delta_mu q / (p Delta' q)."""
    n = forms.n
    E = factors[0]
    if crossing.mode == "delay":
        # Delta_tau = lambda A_1 exp(-lambda tau)
        A1 = forms.matrices[1]
        M = [[Cx(0, w) * E * conv(A1[i, j]) for j in range(n)] for i in range(n)]
    else:
        sub = {mu_pos: crossing.mu_of_w}
        A0 = forms.matrices[0].diff(mu_pos).xreplace(sub)
        A1 = forms.matrices[1].diff(mu_pos).xreplace(sub)
        M = [[Cx(-conv(A0[i, j])) - E * conv(A1[i, j]) for j in range(n)] for i in range(n)]
    return Cx(0) - dot(p, mat_vec(M, q)) / pairing
