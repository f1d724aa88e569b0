"""The public Hopf analysis of a retarded equation: ``hopf_delay(model, parameter)``.

Pipeline place: model -> equilibrium -> delay forms (:mod:`.linearize`) ->
crossing (:mod:`.critical`) -> normal form (:mod:`.normal_form`) -> **result**
(:class:`~criticality.delay.results.DelayHopfResult`).  ``criticality.hopf``
hands a model with delayed states here.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Mapping, Sequence

import sympy

from .critical import (LAMBDA, decide_sign, delay_crossing, parameter_crossing,
                       positive_symbols)
from .linearize import delay_forms, equilibrium_point
from .normal_form import center_data
from .results import DelayHopfResult
from ..local.boundary import guarded
from ..budget import stage
from ..budget import time_limit as time_limit_
from ..errors import ClosedFormUnavailableError, NoHopfPointError, ParameterError
from ..hopf_analysis.results import CyclePrediction
from ..kinds import Classification, Side

if TYPE_CHECKING:
    from .numeric import NumericDelayHopf
    from ..local.prepare import EquilibriumSpec
    from ..model.core import Model
from ..local.options import (check_assume, check_branch, check_digits, check_equilibrium,
                             check_order, check_values, refuse_unused)

__all__ = ["hopf_delay"]


@guarded("the delay Hopf analysis")
def hopf_delay(model: Model, parameter: str | None = None, *, equilibrium: EquilibriumSpec = None,
               values: Mapping[str, object] | None = None, branch: int | None = None,
               assume: Mapping[str, str] | None = None, time_limit: float | None = None,
               order: int = 3, eliminate: Sequence[str] | None = None,
               guess: Mapping[str, object] | None = None, backend: str = "sympy",
               digits: int = 30) -> DelayHopfResult | NumericDelayHopf:
    """Hopf analysis of a retarded equation with respect to ``parameter``.

    Parameters
    ----------
    model : criticality.Model
        A model whose equations use delayed states ``x(t - tau)``.
    parameter : str, optional
        The bifurcation parameter: a delay (the critical delays ``tau_j``, the
        crossing direction) or another parameter at the fixed delay.
    equilibrium : mapping, int or str, optional
        As for :func:`criticality.hopf` (the equilibria of a retarded equation
        are those of the equation with every delay set to 0).
    values : mapping, optional
        Exact values for some parameters, fixed first.
    branch : int, optional
        Which crossing frequency (delay mode) or which root ``mu(omega)``
        (parameter mode) when there are several; default 0.
    assume : mapping, optional
        Extra or changed sign assumptions of parameters, e.g. ``{"k": "positive"}``.
    time_limit : float, optional
        Wall-clock budget in seconds.
    guess : mapping, optional
        Numeric mode (:mod:`criticality.delay.numeric`): starting values for every
        state and the parameter (and optionally ``omega``); every other
        parameter needs a value (``values`` or the model's defaults).  Returns a
        :class:`~criticality.delay.numeric.NumericDelayHopf`.
    digits : int
        Digits of the numeric mode.
    order, eliminate, backend
        Accepted for the interface of :func:`criticality.hopf`: only ``order=3``
        (l1) is computed for delay equations, the equilibrium is given or solved
        (not parametrised), and the exact computation runs in the engine's
        rational function field (``backend`` is not used).

    Examples
    --------
    >>> from criticality import Model
    >>> m = Model(["x"], {"x": "-k*x(t - tau) - x^3"}, {"k": "positive", "tau": "positive"})
    >>> r = hopf_delay(m, "tau", equilibrium={"x": 0})
    >>> r.critical_value, r.omega, r.classification
    (pi/(2*k), k, 'supercritical')
    """
    branch = check_branch(branch)
    check_order(order)
    assume, values = check_assume(assume), check_values(values)
    equilibrium = check_equilibrium(equilibrium)
    if guess is not None:
        check_digits(digits, 5, 500)
        refuse_unused("the numeric mode of delay equations (guess=) locates one point from "
                      "the guess and", equilibrium=equilibrium, branch=branch, assume=assume)
    if order != 3:
        raise ClosedFormUnavailableError(f"order={order}: for delay equations only l1 (order=3) "
                                         "is computed")
    if eliminate is not None:
        raise ParameterError("eliminate= is not available for delay equations; give the "
                             "equilibrium or let it be solved")
    if guess is not None:
        from .numeric import hopf_delay_numeric
        name = parameter or model.bifurcation_parameter
        if not name:
            raise ParameterError("name the bifurcation parameter for the numeric mode")
        with time_limit_(time_limit, "the numeric delay Hopf analysis"):
            return hopf_delay_numeric(model, name, guess, values=values, digits=digits)
    with time_limit_(time_limit, "the delay Hopf analysis"):
        return _analyse(model, parameter, equilibrium, values, branch or 0, assume)


def _analyse(model, parameter, equilibrium, values, branch, assume=None):
    if values:
        model = model.with_values(dict(values))
    if assume:
        model = _with_assumptions(model, assume)
    if not model.delays:
        raise ParameterError("the model has no delayed state x(t - tau); use criticality.hopf")
    name = parameter or model.bifurcation_parameter
    if not name:
        raise ParameterError("name the bifurcation parameter (a delay or another parameter)")
    if name in model.states:
        raise ParameterError(f"'{name}' is a state variable, not a parameter")
    model.parameter(name)
    mu = model.symbols[name]
    stage("the equilibrium of the retarded equation")
    choice = equilibrium_point(model, equilibrium)
    stage("the linear part and the Taylor forms on extended vectors")
    forms = delay_forms(model, choice.point)
    delay_mode = mu in forms.delays
    if delay_mode and (any(m.has(mu) for m in forms.matrices) or
                       any(p.has(mu) for p in choice.point)):
        raise ClosedFormUnavailableError(
            f"the delay {name!r} also enters the coefficients of the linear part; the closed-form "
            "crossing (Cooke and van den Driessche) needs P and Q independent of the delay")
    if not delay_mode and not (any(m.has(mu) for m in forms.matrices)):
        raise NoHopfPointError(f"the parameter {name!r} does not enter the linear part",
                               reason="parameter_absent")
    stage("the crossing of the imaginary axis")
    crossing = (delay_crossing if delay_mode else parameter_crossing)(model, forms, mu, branch)
    forward, back = positive_symbols(model)
    mu_pos = forward.get(mu, mu)
    stage("the normal form on the center manifold")
    data = center_data(forms.substitute(forward), crossing, mu_pos)
    return _assemble(model, name, mu, choice, forms, crossing, data, forward, back)


def _with_assumptions(model, assume):
    """The model with changed sign assumptions of some parameters."""
    from dataclasses import replace
    from ..model.core import Model
    known = {p.name for p in model.parameters}
    unknown = [k for k in assume if k not in known]
    if unknown:
        raise ParameterError(f"assume= names {', '.join(map(repr, unknown))}, which "
                             "are not parameters of the model")
    parameters = [replace(p, assumption=assume.get(p.name, p.assumption)) for p in
                  model.parameters]
    return Model(list(model.states), dict(zip(model.states, model.equations)), parameters,
                 name=model.name, description=model.description,
                 equilibrium=None if model.equilibrium_hint is None else dict(
                     model.equilibrium_hint),
                 bifurcation_parameter=model.bifurcation_parameter)


def _irrational(expr) -> bool:
    """Whether an expression holds radicals or inverse trigonometric values
    (where cancel and factor would spend minutes on gcds over the generators)."""
    return any(p.is_Pow and not p.exp.is_Integer or isinstance(p, sympy.Function)
               for p in sympy.preorder_traversal(expr))


def _tidy(expr):
    """A compact form: factored where the expression is rational in the
    parameters (and pi); kept as substituted where it holds radicals or acos."""
    expr = sympy.sympify(expr, strict=True)
    if _irrational(expr):
        return expr
    expr = sympy.cancel(expr)
    try:
        return sympy.factor(expr)
    except (sympy.PolynomialError, ValueError, TypeError):
        return expr


def _at(crossing, expr, T=None):
    """An internal expression at the first crossing (positive symbols kept)."""
    T = crossing.delay_value_pos if T is None else T
    omega = crossing.omega.xreplace(crossing.to_positive)
    return _tidy(sympy.sympify(expr, strict=True).xreplace({crossing.T: T}).xreplace({crossing.w: omega}))


OMEGA, TAU0 = sympy.Symbol("omega", positive=True), sympy.Symbol("tau_0", positive=True)


def _named(crossing, expr):
    """An internal expression as a rational function of the named symbols tau_0
    and (where it is a radical) omega: used where their closed forms hold
    radicals or acos."""
    omega = crossing.omega.xreplace(crossing.to_positive)
    if _irrational(omega):
        return sympy.sympify(expr, strict=True).xreplace({crossing.w: OMEGA, crossing.T: TAU0}).xreplace(
            crossing.to_model)
    value = sympy.sympify(expr, strict=True).xreplace({crossing.w: omega, crossing.T: TAU0})
    return _tidy(value).xreplace(crossing.to_model)


def _assemble(model, name, mu, choice, forms, crossing, data, forward, back):
    qq = data.qq
    c1_re = _at(crossing, data.c1_projection.re / qq)
    c1_im = _at(crossing, data.c1_projection.im / qq)
    agree = (sympy.cancel(data.c1_projection.re - data.c1_hkw.re) == 0 and
             sympy.cancel(data.c1_projection.im - data.c1_hkw.im) == 0)
    omega = crossing.omega.xreplace(forward)
    slope_re, slope_im = _at(crossing, data.slope.re), _at(crossing, data.slope.im)
    sign = decide_sign(c1_re)
    l1 = _tidy(c1_re / omega)
    classification, verdict, condition = _verdict(sign, l1, back)
    mu_c = crossing.critical_value.xreplace(forward)
    cycle = _cycle(model, mu_pos_of(mu, forward), mu_c, omega, data, crossing, slope_re,
                   slope_im, c1_re, c1_im, sign, back)
    l1_sequence = None
    if crossing.mode == "delay":
        first = crossing.sequence.xreplace(forward)
        l1_sequence = _tidy(_at(crossing, data.c1_projection.re / qq, first) / omega)
    stability = _stability(crossing, forms, forward)
    compact = {}
    if _irrational(omega) or _irrational(crossing.critical_value):
        re, im = (sympy.cancel(sympy.S(x) / qq) for x in (data.c1_projection.re,
                                                           data.c1_projection.im))
        compact = {"c1": _named(crossing, re + sympy.I * im),
                   "l1": _named(crossing, sympy.cancel(re / crossing.w)),
                   "transversality": _named(crossing, data.slope.re)}
    q = tuple(_tidy(x.expr()).xreplace(back) for x in
              (type(data.q[0])(_at(crossing, v.re), _at(crossing, v.im)) for v in data.q))
    p = tuple(_tidy(x.expr()).xreplace(back) for x in
              (type(data.p[0])(_at(crossing, v.re), _at(crossing, v.im)) for v in data.p))
    delay = crossing.delay_value if crossing.mode == "parameter" else mu
    quasi = sympy.expand(crossing.P + crossing.Q * sympy.exp(-LAMBDA * delay.xreplace(forward)))
    return DelayHopfResult(
        model=model, parameter=name, mode=crossing.mode, delays=forms.delays,
        equilibrium={s: v for s, v in zip(model.states, choice.point)},
        matrices=forms.matrices, quasi_polynomial=quasi.xreplace(back),
        P=crossing.P.xreplace(back), Q=crossing.Q.xreplace(back),
        frequency_polynomial=crossing.frequency_polynomial, omega=crossing.omega,
        theta=crossing.theta, critical_value=crossing.critical_value,
        critical_sequence=crossing.sequence,
        crossing_indicator=(crossing.crossing_indicator if crossing.mode == "delay"
                            else slope_re.xreplace(back)),
        crossing_direction=(crossing.crossing_sign if crossing.mode == "delay"
                            else decide_sign(slope_re)),
        transversality=slope_re.xreplace(back),
        eigenvalue_derivative=(slope_re + sympy.I * slope_im).xreplace(back),
        c1=(c1_re + sympy.I * c1_im).xreplace(back), l1=l1.xreplace(back),
        l1_sequence=None if l1_sequence is None else l1_sequence.xreplace(back),
        classification=classification, verdict=verdict, criticality_condition=condition,
        conditions=crossing.conditions, stability_conditions=stability,
        eigenvector_q=q, eigenvector_p=p, q_norm_squared=_at(crossing, qq).xreplace(back),
        cycle=cycle, routes_agree=agree, notes=tuple(model.notes), compact=compact)


def mu_pos_of(mu: sympy.Symbol, forward: Mapping) -> sympy.Symbol:
    return forward.get(mu, mu)


def _verdict(sign, l1, back):
    if sign == -1:
        return Classification.SUPERCRITICAL, "supercritical for all admissible parameters (l1 < 0)", True
    if sign == 1:
        return Classification.SUBCRITICAL, "subcritical for all admissible parameters (l1 > 0)", False
    if sign == 0:
        return Classification.DEGENERATE, "l1 = 0 identically: a degenerate Hopf point", False
    condition = sympy.StrictLessThan(l1.xreplace(back), 0)
    return Classification.DEPENDS, f"supercritical where {condition}, subcritical where it is reversed", condition


def _cycle(model, mu_pos, mu_c, omega, data, crossing, beta1, slope_im, c1_re, c1_im, sign, back):
    degenerate = sign == 0
    k_radius = sympy.nan if degenerate else _tidy(-beta1 / c1_re)
    side_sign = None if degenerate else decide_sign(k_radius)
    side = {1: Side.ABOVE, -1: Side.BELOW}.get(side_sign, Side.UNDECIDED)
    if degenerate:
        side = Side.UNDECIDED
    offset = mu_pos - mu_c
    amplitudes, coefficients = {}, {}
    qq = _at(crossing, data.qq)
    for state, v in zip(model.states, data.q):
        k = sympy.nan if degenerate else _tidy(4 * k_radius * _at(crossing, v.abs2()) / qq)
        coefficients[state] = k.xreplace(back)
        amplitudes[state] = sympy.sqrt(k * offset).xreplace(back)
    slope = sympy.nan if degenerate else _tidy(slope_im - beta1 * c1_im / c1_re)
    stable = True if sign == -1 and crossing.mode == "delay" else (False if sign == 1 else None)
    return CyclePrediction(
        side=side, side_condition=None if side != Side.UNDECIDED or degenerate else
        sympy.StrictGreaterThan(k_radius.xreplace(back), 0),
        stable=stable, radius_squared=(k_radius * offset).xreplace(back),
        amplitudes=amplitudes, amplitude_coefficients=coefficients,
        period=(2 * sympy.pi / omega).xreplace(back), frequency_slope=slope.xreplace(back))


def _hurwitz(coeffs):
    """Leading principal minors of the Hurwitz matrix of a monic polynomial
    (coefficients a_1 .. a_n after the leading 1)."""
    n = len(coeffs)
    a = [sympy.S.One, *coeffs]
    M = sympy.zeros(n, n)
    for i in range(n):
        for j in range(n):
            k = 2 * (j + 1) - (i + 1)
            M[i, j] = a[k] if 0 <= k <= n else 0
    return [_tidy(M[:k, :k].det()) for k in range(1, n + 1)]


def _stability(crossing, forms, forward):
    """The conditions on the other roots, stated (decided ones omitted)."""
    out = []
    back = crossing.to_model
    if crossing.mode == "delay":
        chi0 = sympy.Poly(sympy.expand(crossing.P + crossing.Q), LAMBDA)
        lead = chi0.LC()
        coeffs = [sympy.cancel(c / lead) for c in chi0.all_coeffs()[1:]]
        undecided = [d for d in _hurwitz(coeffs) if decide_sign(d) != 1]
        if any(decide_sign(d) == -1 for d in undecided):
            out.append("the equilibrium is unstable already at tau = 0, so tau_0 is not a loss "
                       "of stability")
        elif undecided:
            shown = ", ".join(f"{d.xreplace(back)} > 0" for d in undecided)
            out.append(f"stability at tau = 0 (Hurwitz conditions of P + Q): {shown}")
        if crossing.crossing_sign != 1:
            out.append("roots cross to the right as tau increases: "
                       f"{crossing.crossing_indicator} > 0")
        if crossing.branch_count > 1:
            out.append(f"F(s) has {crossing.branch_count} positive roots: tau_0 is the first "
                       "crossing only if no other frequency (branch=1, 2, ...) has a smaller "
                       "critical delay")
    else:
        out.append("every other root of the quasi-polynomial has negative real part at the "
                   "critical value (not decided in closed form; evaluate() counts none near the "
                   "imaginary axis only)")
    return tuple(out)

