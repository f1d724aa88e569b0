"""The critical set of a retarded equation: purely imaginary roots of the quasi-polynomial.

Pipeline place: delay forms -> **critical set** -> normal form.

With one delay the characteristic quasi-polynomial is
``chi(lambda) = det(lambda I - A_0 - A_1 exp(-lambda tau)) = P(lambda) +
Q(lambda) exp(-lambda tau)`` whenever ``A_1`` has rank one (one delayed
feedback path; always so for a scalar equation).  A root ``lambda = i omega``
needs ``|P(i omega)| = |Q(i omega)|``, i.e. ``F(omega^2) = 0`` with the
polynomial ``F(s) = |P(i sqrt s)|^2 - |Q(i sqrt s)|^2``, and then
``exp(-i omega tau) = -P(i omega)/Q(i omega)`` fixes ``omega tau`` modulo
``2 pi``: ``omega tau = theta + 2 pi j``.

* The delay as bifurcation parameter (:func:`delay_crossing`): the critical
  delays are ``tau_j = (theta + 2 pi j)/omega``, ``j = 0, 1, 2, ...``; the
  crossing direction is ``sign Re(d lambda/d tau) = sign F'(omega^2)``, the
  same for every ``j`` (Cooke and van den Driessche, "On zeroes of some
  transcendental equations", Funkcialaj Ekvacioj 29, 1986).
* Another parameter ``mu`` at a fixed delay (:func:`parameter_crossing`):
  ``F(omega^2, mu) = 0`` is solved for ``mu = mu(omega)``; where
  ``-P/Q`` at ``mu(omega)`` is a constant ``exp(-i theta)``, the crossings are
  ``omega_j = (theta + 2 pi j)/tau`` and ``mu_j = mu(omega_j)`` in closed form.
  Otherwise the crossing solves a transcendental equation and
  :class:`~criticality.errors.ClosedFormUnavailableError` names the way out
  (fix values and give a guess).

Throughout, ``omega`` is kept as a positive symbol ``w`` while the normal form
is computed: at ``E = -P(i w)/Q(i w)`` the quasi-polynomial vanishes
identically in ``w``, so every kernel and solve is exact before the closed form
of ``omega`` is substituted.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Sequence

from dataclasses import dataclass

import sympy

from .cx import Cx
from ..errors import ClosedFormUnavailableError, NoHopfPointError

if TYPE_CHECKING:
    from ..algebra.field import Element
    from .linearize import DelayForms
    from ..model.core import Model

__all__ = ["Crossing", "quasi_polynomial_parts", "delay_crossing", "parameter_crossing",
           "positive_symbols", "decide_sign", "LAMBDA", "S_OMEGA2", "J_INDEX"]

LAMBDA = sympy.Symbol("lambda")
S_OMEGA2 = sympy.Symbol("s")                     # s = omega^2 in F(s)
J_INDEX = sympy.Symbol("j", integer=True, nonnegative=True)


@dataclass(frozen=True)
class Crossing:
    """One family of purely imaginary roots ``+-i omega`` of the quasi-polynomial.

    Expressions are in the model's symbols.  ``w`` and ``T`` are the internal
    symbols that stand for omega and for the delay at the crossing during the
    normal-form computation; ``factor`` is ``exp(-i w tau)`` there and
    ``mu_of_w`` the bifurcation parameter as a function of ``w`` (parameter
    mode); these and ``P``, ``Q`` are in positive-assumption symbols
    (``to_model`` maps back).
    """

    mode: str
    parameter: sympy.Symbol
    P: sympy.Expr
    Q: sympy.Expr
    frequency_polynomial: sympy.Expr
    omega: sympy.Expr
    theta: sympy.Expr
    cos_theta: sympy.Expr
    sin_theta: sympy.Expr
    critical_value: sympy.Expr
    sequence: sympy.Expr
    crossing_indicator: sympy.Expr
    crossing_sign: int | None
    conditions: tuple
    w: sympy.Symbol
    T: sympy.Symbol
    factor: Cx
    mu_of_w: sympy.Expr | None
    delay_value: sympy.Expr
    to_model: dict
    to_positive: dict
    branch_count: int = 1

    def at_critical(self, expr: sympy.Expr) -> sympy.Expr:
        """An internal expression (in w, T, positive symbols) at the first crossing,
        in the model's symbols."""
        value = sympy.sympify(expr, strict=True).xreplace({self.T: self.delay_value_pos}).xreplace(
            {self.w: self.omega.xreplace(self.to_positive)})
        return value.xreplace(self.to_model)

    @property
    def delay_value_pos(self) -> sympy.Expr:
        return self.delay_value.xreplace(self.to_positive)


def positive_symbols(model: Model) -> tuple[dict, dict]:
    """Maps from the model's symbols to symbols carrying their declared sign,
    and back.  The model's own symbols carry them already, so both maps are
    usually empty; they cover a symbol whose sympy assumptions differ from
    its parameter's declaration."""
    forward, back = {}, {}
    for p in model.parameters:
        s, new = model.symbols[p.name], p.symbol
        if new != s:
            forward[s], back[new] = new, s
    return forward, back


def decide_sign(expr: sympy.Expr) -> int | None:
    """+1, -1 or 0 where sympy's assumptions settle the sign of ``expr`` factor by
    factor (symbols carry their declared signs), else None."""
    expr = sympy.sympify(expr, strict=True)
    if not expr.free_symbols:
        return _numeric_sign(expr)
    expr = sympy.factor(sympy.cancel(expr))
    if expr == 0:
        return 0
    num, den = sympy.fraction(expr)
    sign = 1
    for part in (*sympy.Mul.make_args(num), *sympy.Mul.make_args(den)):
        base, exp = part.as_base_exp()
        if exp.is_Integer and int(exp) % 2 == 0 and base.is_real:
            if base.is_zero is False or base.is_nonzero:
                continue
        if part.is_positive:
            continue
        if part.is_negative:
            sign = -sign
            continue
        if part.is_number:
            value = sympy.N(part, 30)
            if value.is_real and value != 0:
                sign = sign if value > 0 else -sign
                continue
        return None
    return sign


def _numeric_sign(expr, digits: int = 60) -> int | None:
    """The sign of a constant from a 60-digit evaluation (None when it is within
    1e-50 of 0 and not exactly 0)."""
    if expr == 0:
        return 0
    value = sympy.N(expr, digits)
    re, im = value.as_real_imag()
    if abs(im) > sympy.Float("1e-50") or abs(re) < sympy.Float("1e-50"):
        return 0 if sympy.simplify(expr) == 0 else None
    return 1 if re > 0 else -1


def quasi_polynomial_parts(forms: DelayForms) -> tuple[sympy.Expr, sympy.Expr]:
    """``(P, Q)`` with ``det Delta(lambda) = P(lambda) + Q(lambda) exp(-lambda tau)`` for a
    model with one delay whose matrix ``A_1`` has rank one."""
    if len(forms.delays) != 1:
        raise ClosedFormUnavailableError(
            f"the model has {len(forms.delays)} distinct delays; the closed-form crossing covers "
            "one delay, chi = P(lambda) + Q(lambda) exp(-lambda tau); the numeric mode handles "
            "several: pass guess={...} with the states, the parameter and 'omega' near the "
            "crossing")
    E = sympy.Dummy("E")
    n = forms.n
    M = LAMBDA * sympy.eye(n) - forms.matrices[0] - forms.matrices[1] * E
    chi = sympy.expand(M.det(method="berkowitz"))
    poly = sympy.Poly(chi, E)
    if poly.degree() > 1:
        raise ClosedFormUnavailableError(
            "the delayed part of the linearisation has rank > 1, so the quasi-polynomial has "
            "powers of exp(-lambda tau) beyond the first; the closed-form crossing covers "
            "chi = P(lambda) + Q(lambda) exp(-lambda tau)")
    P = sympy.expand(poly.coeff_monomial(1))
    Q = sympy.expand(poly.coeff_monomial(E))
    if Q == 0:
        raise NoHopfPointError("the delayed terms do not enter the linear part at this "
                               "equilibrium (Q = 0), so the delay cannot change its stability",
                               reason="delay_absent_from_linear_part")
    return P, Q


def _at_iw(poly, w) -> Cx:
    value = sympy.expand(poly.xreplace({LAMBDA: sympy.I * w}))
    return Cx(*value.as_real_imag())


def frequency_polynomial(P: sympy.Expr, Q: sympy.Expr, w: sympy.Symbol) -> sympy.Expr:
    """``F(s)`` with ``F(w^2) = |P(i w)|^2 - |Q(i w)|^2`` (w real)."""
    F = sympy.expand(_at_iw(P, w).abs2() - _at_iw(Q, w).abs2())
    poly = sympy.Poly(F, w)
    out = 0
    for (k,), c in poly.terms():
        if k % 2:
            raise ValueError("odd power of omega in |P|^2 - |Q|^2")
        out += c * S_OMEGA2 ** (k // 2)
    return sympy.expand(out)


def _positive_roots(F, where):
    """Roots ``s > 0`` of ``F(s)`` from its factors of degree 1 and 2 (closed form);
    each with its sign status (1 proven, None undecided)."""
    roots = []
    _, factors = sympy.factor_list(F, S_OMEGA2)
    for factor, _mult in factors:
        d = sympy.degree(factor, S_OMEGA2)
        if d == 0:
            continue
        if d > 2:
            raise ClosedFormUnavailableError(
                f"{where}: the frequency polynomial has a factor of degree {d} in omega^2 "
                f"({factor}); the closed form covers degrees 1 and 2")
        for r in sympy.solve(factor, S_OMEGA2):
            sign = decide_sign(r) if r.is_real is not False else -1
            if sign in (-1, 0):
                continue
            roots.append((sympy.factor(r), sign))
    roots.sort(key=lambda item: (item[1] is None, sympy.count_ops(item[0])))
    return roots


def _theta(c, s):
    """theta in [0, 2 pi) with cos theta = c, sin theta = s (closed form where the
    sign of s is decided; otherwise a Piecewise on it)."""
    sign = decide_sign(s)
    base = sympy.acos(c)
    if sign == 0:
        return sympy.S.Zero if decide_sign(c) == 1 else sympy.pi
    if sign == 1:
        return base
    if sign == -1:
        return 2 * sympy.pi - base
    return sympy.Piecewise((base, s >= 0), (2 * sympy.pi - base, True))


def delay_crossing(model: Model, forms: DelayForms, tau: str, branch: int = 0) -> Crossing:
    """The crossings with the delay ``tau`` as bifurcation parameter."""
    forward, back = positive_symbols(model)
    pos = forms.substitute(forward)
    P, Q = quasi_polynomial_parts(pos)
    w = sympy.Symbol("omega", positive=True)
    T = sympy.Dummy("tau_c", positive=True)
    F = frequency_polynomial(P, Q, w)
    roots = _positive_roots(F, "the crossing frequency")
    if not roots:
        raise NoHopfPointError(
            f"F(s) = |P(i omega)|^2 - |Q(i omega)|^2 = {F.xreplace(back)} has no positive root "
            "s = omega^2 under the declared assumptions: no root of the quasi-polynomial "
            "reaches the imaginary axis for any delay", reason="omega_squared_nonpositive")
    if not 0 <= branch < len(roots):
        raise NoHopfPointError(f"branch {branch} does not exist; there are {len(roots)} crossing "
                               "frequencies", reason="no_such_branch")
    s0, status = roots[branch]
    omega = sympy.sqrt(s0)
    E = Cx(0) - _at_iw(P, w) / _at_iw(Q, w)
    c = sympy.cancel(sympy.S(E.re).xreplace({w: omega}))
    s = sympy.cancel(-sympy.S(E.im).xreplace({w: omega}))
    theta = _theta(c, s)
    first = theta if theta != 0 else 2 * sympy.pi
    tau0 = first / omega
    sequence = (first + 2 * sympy.pi * J_INDEX) / omega
    indicator = sympy.factor(sympy.diff(F, S_OMEGA2).xreplace({S_OMEGA2: s0}))
    sign = decide_sign(indicator)
    conditions = []
    if status is None:
        conditions.append(sympy.StrictGreaterThan(s0.xreplace(back), 0))
    if sign is None:
        conditions.append(sympy.StrictGreaterThan(indicator.xreplace(back), 0))
    return Crossing("delay", tau, P, Q, F.xreplace(back),
                    omega.xreplace(back), theta.xreplace(back), c.xreplace(back),
                    s.xreplace(back), tau0.xreplace(back), sequence.xreplace(back),
                    indicator.xreplace(back), sign, tuple(conditions), w, T, E, None,
                    tau0.xreplace(back), back, forward, len(roots))


def parameter_crossing(model: Model, forms: DelayForms, mu: sympy.Symbol,
                       branch: int = 0) -> Crossing:
    """The crossings with a non-delay parameter ``mu`` at fixed delay(s)."""
    forward, back = positive_symbols(model)
    pos = forms.substitute(forward)
    mu_pos = forward.get(mu, mu)
    P, Q = quasi_polynomial_parts(pos)
    tau = pos.delays[0]
    w = sympy.Symbol("omega", positive=True)
    T = sympy.Dummy("tau_c", positive=True)
    F = frequency_polynomial(P, Q, w)
    Fw = sympy.expand(F.xreplace({S_OMEGA2: w ** 2}))
    if not Fw.has(mu_pos):
        raise ClosedFormUnavailableError(
            f"|P(i omega)| = |Q(i omega)| does not involve {mu}; the crossing frequency is fixed "
            "and the parameter enters only the phase, which has no closed form here")
    if sympy.degree(Fw, mu_pos) > 2:
        raise ClosedFormUnavailableError(
            f"|P(i omega)| = |Q(i omega)| has degree {sympy.degree(Fw, mu_pos)} in {mu}; the "
            "closed form covers degrees 1 and 2")
    candidates = []
    for root in sympy.solve(Fw, mu_pos):
        if decide_sign(root) == -1 and model.parameter(mu.name).assumption == "positive":
            continue
        if decide_sign(root) == 1 and model.parameter(mu.name).assumption == "negative":
            continue
        sub = {mu_pos: root}
        E = Cx(0) - _at_iw(P.xreplace(sub), w) / _at_iw(Q.xreplace(sub), w)
        if sympy.S(E.re).has(w) or sympy.S(E.im).has(w):
            continue
        candidates.append((root, E))
    if not candidates:
        raise ClosedFormUnavailableError(
            f"at a fixed delay the crossing in {mu} solves a transcendental equation in omega "
            "(the phase of -P/Q changes with omega); fix the other parameters' values and locate "
            "it numerically (e.g. evaluate the quasi-polynomial with mpmath from a guess)")
    if not 0 <= branch < len(candidates):
        raise NoHopfPointError(f"branch {branch} does not exist; there are {len(candidates)}",
                               reason="no_such_branch")
    mu_w, E = candidates[branch]
    c, s = sympy.S(E.re), -sympy.S(E.im)
    theta = _theta(c, s)
    first = theta if theta != 0 else 2 * sympy.pi
    omega0 = first / tau
    mu_c = sympy.cancel(mu_w.xreplace({w: omega0}))
    sequence = mu_w.xreplace({w: (first + 2 * sympy.pi * J_INDEX) / tau})
    # transversality d lambda/d mu = -chi_mu/chi_lambda at the crossing
    indicator = sympy.S.Zero
    return Crossing("parameter", mu, P, Q, F.xreplace(back),
                    omega0.xreplace(back), theta.xreplace(back), c.xreplace(back),
                    s.xreplace(back), mu_c.xreplace(back), sequence.xreplace(back), indicator,
                    None, (), w, T, E, mu_w, tau.xreplace(back), back, forward, len(candidates))


def derivative_in_lambda(poly: Sequence[Element], w: sympy.Symbol) -> Cx:
    return _at_iw(sympy.diff(poly, LAMBDA), w)


def at_iw(poly: Sequence[Element], w: sympy.Symbol) -> Cx:
    """The value of a polynomial in lambda at i w (w real), as a Cx."""
    return _at_iw(poly, w)

