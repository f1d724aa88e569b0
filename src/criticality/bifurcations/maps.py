"""Bifurcations of fixed points of maps: flip (period doubling), Neimark-Sacker
and the fold of maps.

Pipeline place: map model -> fixed point (:mod:`.map_setup`) -> **critical
multiplier, normal form (:mod:`.map_normal_form`)** -> :class:`FlipResult`,
:class:`NeimarkSackerResult`; the multiplier +1 is treated by
:func:`criticality.fold`, which restates the fold of ``x' = F(x) - x`` for a map.

Conventions (stated on every result):

* flip: ``A q = -q``, ``A^T p = -p``, ``<p, q> = 1`` and the unit
  normalisation ``<q, q> = 1`` (real vectors).  The restricted map is
  ``y -> -(1 + beta) y + a y^2 + b y^3`` with ``x - x0 = y q + O(y^2)``;
  the reported flip coefficient is ``c = a^2 + b`` (the second iterate is
  ``y -> (1 + 2 beta) y - 2 c y^3``).  ``c > 0``: supercritical, a stable
  2-cycle is born where the fixed point loses stability; ``c < 0``:
  subcritical.  2-cycle: ``y^2 = -m'(mu_c)(mu - mu_c) / c`` with
  ``m(mu)`` the multiplier near -1, and the two points are
  ``x0 +- y q`` to leading order.
* Neimark-Sacker: ``A q = lambda q``, ``A^T p = conj(lambda) p``,
  ``<p, q> = conj(p)^T q = 1``, ``<q, q> = 1``; ``lambda = e^{i theta}``
  with ``0 < theta < pi``.  Normal form ``z -> lambda (1 + beta) z + c1 z|z|^2``;
  the first Lyapunov coefficient of the map is
  ``l1 = Re(e^{-i theta} c1)`` (Kuznetsov, Elements of Applied Bifurcation
  Theory, 3rd ed., 2004, Section 4.7, from memory).  ``l1 < 0``:
  supercritical, a stable closed invariant curve; ``l1 > 0``: subcritical.
  Curve: ``rho^2 = -(d|lambda|/dmu)(mu - mu_c) / l1`` and
  ``x - x0 = z q + conj(z q)``: component ``j`` oscillates with amplitude
  ``2 rho |q_j|``.  The strong resonances ``lambda^k = 1`` (k = 1..4) are
  named: 1:1 and 1:2 are other codimension-two points (reported as errors);
  at 1:3 the normal form does not exist; at 1:4 ``c1`` exists but does not
  decide the dynamics.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, ClassVar, Mapping, Sequence

import dataclasses
from dataclasses import dataclass

import sympy

from ..local.boundary import guarded
from ..algebra import upoly
from ..algebra.quadratic import lower
from ..errors import DegenerateBifurcationError, DegenerateHopfError, NoHopfPointError
from ..kinds import PointStatus, Sign, coerce
from ..model.parameter import critical_symbol
from ..local.options import check_branch, pick_branch
from ..local.critical import cofactor_hurwitz, find_critical_branches
from ..algebra.linalg import characteristic_polynomial
from ..local.prepare import EquilibriumSpec, expr, sign_word
from ..local.prepare import solve_for as solve_symbol
from ..renderers import Rendered
from .map_normal_form import flip_coefficients, flip_vectors, ns_coefficient, unit_circle_vectors
from .map_setup import cayley, condition_status, inside_unit_circle, map_jacobian, prepare_map, \
    unknown_symbol

if TYPE_CHECKING:
    from ..model.core import Model

__all__ = ["FlipResult", "NeimarkSackerResult", "flip", "flip_all", "neimark_sacker",
           "neimark_sacker_all", "FLIP_CONVENTIONS", "NS_CONVENTIONS"]


FLIP_CONVENTIONS = (
    "map x -> F(x); A = DF(x0); A q = -q, A^T p = -p, <p, q> = 1, <q, q> = 1 (real vectors)",
    "restricted map y -> -(1 + beta) y + a y^2 + b y^3 with x - x0 = y q + O(y^2); reported "
    "c = a^2 + b = <p, C(q,q,q)>/6 + <p, B(q, (I - A)^{-1} B(q,q))>/2",
    "c > 0 supercritical (stable 2-cycle), c < 0 subcritical; 2-cycle x0 +- y q with "
    "y^2 = -m'(mu - mu_c)/c, m the multiplier near -1",
)
NS_CONVENTIONS = (
    "map x -> F(x); A q = lambda q, A^T p = conj(lambda) p, <p, q> = conj(p)^T q = 1, "
    "<q, q> = 1; lambda = exp(i theta), 0 < theta < pi",
    "normal form z -> lambda (1 + beta) z + c1 z|z|^2 with x - x0 = z q + conj(z q) + O(|z|^2); "
    "first Lyapunov coefficient of the map l1 = Re(exp(-i theta) c1) (Kuznetsov 2004, "
    "Section 4.7)",
    "l1 < 0 supercritical (stable invariant curve), l1 > 0 subcritical; curve radius "
    "rho^2 = -(d|lambda|/dmu)(mu - mu_c)/l1, component amplitude 2 rho |q_j|",
    "critical set through the Cayley transform s = (lambda - 1)/(lambda + 1): "
    "tan(theta/2)^2 is the omega^2 of the transformed characteristic polynomial",
)


def _text_conditions(conditions):
    return tuple(f"{d}: {sympy.sstr(e)} {rel} 0 [{status}]" for d, e, rel, status in conditions)


@dataclass(frozen=True)
class FlipResult(Rendered):
    """A period-doubling (flip) point of a fixed point of a map."""

    result_kind: ClassVar[str] = "flip"

    parameter: str
    unknown: str
    critical_values: dict
    fixed_point: dict
    q: tuple
    p: tuple
    quadratic: sympy.Expr
    coefficient: sympy.Expr
    coefficient_sign: Sign
    multiplier_speed: sympy.Expr
    amplitude_squared: dict
    verdict: str
    status: PointStatus
    conditions: tuple = ()
    notes: tuple = ()
    conventions: tuple = FLIP_CONVENTIONS

    def __post_init__(self) -> None:
        coerce(self, coefficient_sign=Sign, status=PointStatus)

    def rows(self) -> list[tuple[str, str, object]]:
        return [("system", "system", "map x -> F(x) (discrete time)"),
                ("parameter", "parameter", self.parameter),
                ("critical_values", "critical values (multiplier -1)", self.critical_values),
                ("fixed_point", "fixed point", self.fixed_point),
                ("q", "eigenvector q (A q = -q)", self.q), ("p", "adjoint p", self.p),
                ("quadratic", "quadratic coefficient a (for this q)", self.quadratic),
                ("coefficient", "flip coefficient c (<q,q> = 1)", self.coefficient),
                ("coefficient_sign", "sign of c", self.coefficient_sign),
                ("multiplier_speed", "multiplier speed dm/dmu", self.multiplier_speed),
                ("amplitude_squared", "2-cycle half-width squared", self.amplitude_squared),
                ("status", "status", self.status), ("verdict", "verdict", self.verdict),
                ("conditions", "conditions", _text_conditions(self.conditions))]


@dataclass(frozen=True)
class NeimarkSackerResult(Rendered):
    """A Neimark-Sacker point (multipliers exp(+-i theta)) of a map."""

    result_kind: ClassVar[str] = "neimark_sacker"

    parameter: str
    unknown: str
    critical_values: dict
    fixed_point: dict
    angle: sympy.Expr
    cos_angle: sympy.Expr
    multiplier: sympy.Expr
    q: tuple
    c1: object
    lyapunov: object
    lyapunov_sign: Sign
    modulus_speed: sympy.Expr
    radius_squared: object
    amplitude_squared: dict
    status: PointStatus
    verdict: str
    conditions: tuple = ()
    notes: tuple = ()
    conventions: tuple = NS_CONVENTIONS

    def __post_init__(self) -> None:
        coerce(self, lyapunov_sign=Sign, status=PointStatus)

    def rows(self) -> list[tuple[str, str, object]]:
        return [("system", "system", "map x -> F(x) (discrete time)"),
                ("parameter", "parameter", self.parameter),
                ("critical_values", "critical values (|lambda| = 1)", self.critical_values),
                ("fixed_point", "fixed point", self.fixed_point),
                ("angle", "rotation angle theta", self.angle),
                ("cos_angle", "cos(theta)", self.cos_angle),
                ("multiplier", "critical multiplier lambda", self.multiplier),
                ("q", "eigenvector q (A q = lambda q)", self.q),
                ("c1", "c1 (<q,q> = 1)", self.c1),
                ("lyapunov", "first Lyapunov coefficient l1 = Re(exp(-i theta) c1)",
                 self.lyapunov),
                ("lyapunov_sign", "sign of l1", self.lyapunov_sign),
                ("modulus_speed", "d|lambda|/dmu", self.modulus_speed),
                ("radius_squared", "invariant curve radius squared rho^2", self.radius_squared),
                ("amplitude_squared", "component amplitude squared (2 rho |q_j|)^2",
                 self.amplitude_squared),
                ("status", "status", self.status), ("verdict", "verdict", self.verdict),
                ("conditions", "conditions", _text_conditions(self.conditions))]


# -- shared ---------------------------------------------------------------------------


def _values_and_point(prep, unknown, value_expr, sub, E):
    values = {unknown.name: value_expr}
    mu = prep.mu
    if unknown != mu:
        given = prep.choice.substitutions.get(mu)
        values[prep.parameter] = E(sub(prep.tower.convert(given))) if given is not None else mu
    point = {s: E(sub(prep.tower.convert(v))) for s, v in zip(prep.model.states, prep.choice.point)}
    return values, point


def _conditions(target, ctx, E, items):
    """``[(description, expr, relation, status)]`` from ``(description, element, want)``."""
    out = []
    for description, x, want in items:
        out.append((description, E(x), ">" if want == "positive" else "!=",
                    condition_status(target, x, ctx, want)))
    return tuple(out)


def _delta(unknown):
    return unknown - critical_symbol(unknown)


# -- flip ----------------------------------------------------------------------------


def _flip_verdict(sign):
    return {"positive": "supercritical: a stable 2-cycle is born where the fixed point loses "
                        "stability (period doubling)",
            "negative": "subcritical: an unstable 2-cycle surrounds the stable fixed point and "
                        "shrinks onto it; past the critical value the onset is abrupt",
            "zero": "degenerate: the flip coefficient c vanishes; a higher-order analysis "
                    "is needed"}.get(sign, "supercritical if c > 0, subcritical if c < 0 "
                                           "(the sign of c is not decided)")


def _flip_point(prep, sp, unknown, chi, dchi):
    K = sp.target.top
    sub = sp.substitute
    taylor = prep.taylor.map(sub, K)
    A = map_jacobian(taylor)
    chi_at = [sub(c) for c in chi]
    minus = -K.one
    slope = upoly.evaluate(upoly.derivative(chi_at), minus, K.zero)
    if not slope:
        raise DegenerateBifurcationError("the multiplier -1 is double (the 1:2 resonance)",
                                         reason="resonance_1_2")
    if not upoly.evaluate(chi_at, K.one, K.zero):
        raise DegenerateBifurcationError("a multiplier +1 coexists with -1 (a fold-flip point)",
                                         reason="fold_flip")
    q, p = flip_vectors(K, A)
    a, c = flip_coefficients(K, A, taylor, q, p)
    speed = -upoly.evaluate([sub(x) for x in dchi], minus, K.zero) / slope
    qq = sum((x * x for x in q[1:]), q[0] * q[0])
    target, ctx = sp.target, prep.context(sp.target)
    E = lambda x: expr(target, x, ctx)  # noqa: E731
    sign = sign_word(target, c, ctx)
    status = PointStatus.DEGENERATE_COEFFICIENT if sign == Sign.ZERO else (
        PointStatus.TRANSVERSALITY_FAILS if not speed else PointStatus.NONDEGENERATE)
    amp = {}
    if c:
        d = _delta(unknown)
        amp = {s: E(-speed * qj * qj / c) * d for s, qj in zip(prep.model.states, q)}
    cofactor, _ = upoly.divmod_(chi_at, [K.one, K.one])
    conds = _conditions(target, ctx, E, [("the multiplier crosses -1 with nonzero speed",
                                          speed, "nonzero")]
                        + [(f"the other multipliers lie inside the unit circle ({k})", x,
                            "positive") for k, x in enumerate(inside_unit_circle(K, cofactor), 1)])
    values, point = _values_and_point(prep, unknown, E(sp.value), lambda x: sub(x), E)
    notes = ("the unit normalisation <q, q> = 1 divides c by <q, q> = " + sympy.sstr(E(qq)),)
    return FlipResult(prep.parameter, unknown.name, values, point, tuple(map(E, q)),
                      tuple(map(E, p)), E(a), E(c / qq), sign,
                      E(speed), amp, _flip_verdict(sign), status, conds, notes)


@guarded("the flip analysis")
def flip_all(model: Model, parameter: str, *, solve_for: str | None = None,
             equilibrium: EquilibriumSpec = None, eliminate: Sequence[str] | None = None,
             values: Mapping[str, object] | None = None, assume: Mapping[str, str] | None = None,
             backend: str = "flint") -> tuple:
    """Every closed-form flip point (see :func:`flip`)."""
    prep = prepare_map(model, parameter, equilibrium=equilibrium, eliminate=eliminate,
                       values=values, assume=assume, order=3, backend=backend,
                       analysis="the flip analysis")
    unknown = unknown_symbol(prep, solve_for)
    K = prep.tower.top
    chi = characteristic_polynomial(K, map_jacobian(prep.taylor))
    dchi = [prep.tower.derivative(c, unknown) if c else K.zero for c in chi]
    at_minus_one = upoly.evaluate(chi, -K.one, K.zero)
    points, unsolved = solve_symbol(prep.tower, at_minus_one, unknown)
    out, degenerate = [], []
    for sp in points:
        try:
            out.append(_flip_point(prep, sp, unknown, chi, dchi))
        except DegenerateBifurcationError as exc:
            degenerate.append(exc)
        except ZeroDivisionError:
            degenerate.append(DegenerateBifurcationError(
                "a candidate critical value makes a denominator of the map or of the fixed "
                "point vanish", reason="undefined"))
    if out:
        return tuple(out)
    if degenerate:
        raise degenerate[0]
    extra = f" (no closed form for {', '.join(map(str, unsolved))} = 0)" if unsolved else ""
    raise NoHopfPointError(f"no fixed point with a multiplier -1 was found by solving "
                           f"chi(-1) = det(-I - A) = 0 for '{unknown}'{extra}",
                           reason="empty_critical_set")


@guarded("the flip analysis")
def flip(model: Model, parameter: str, *, solve_for: str | None = None,
         equilibrium: EquilibriumSpec = None, eliminate: Sequence[str] | None = None,
         values: Mapping[str, object] | None = None, assume: Mapping[str, str] | None = None,
         backend: str = "flint", branch: int | None = 0) -> FlipResult:
    """Period-doubling (flip) analysis of a map's fixed point in ``parameter``.

    Parameters
    ----------
    model : Model
        A map (``kind="map"``): the equations give the next state.
    parameter : str
        The bifurcation parameter ``mu``.
    solve_for, equilibrium, eliminate, values, assume, backend, branch
        As for :func:`criticality.fold`; ``equilibrium`` is the fixed point.

    Returns
    -------
    FlipResult

    Examples
    --------
    >>> from criticality import Model
    >>> m = Model(["x"], {"x": "r*x*(1 - x)"}, kind="map")
    >>> r = flip(m, "r", equilibrium=1)
    >>> r.critical_values, r.coefficient_sign, r.status
    ({'r': 3}, 'positive', 'nondegenerate')
    """
    branch = check_branch(branch)
    results = flip_all(model, parameter, solve_for=solve_for, equilibrium=equilibrium,
                       eliminate=eliminate, values=values, assume=assume, backend=backend)
    return pick_branch(results, branch)


# -- Neimark-Sacker --------------------------------------------------------------------


_RESONANCE_REASONS = {
    "zero_eigenvalue": ("resonance_1_1", "the critical multipliers meet at +1 (the 1:1 "
                        "resonance, a double multiplier +1)"),
    "two_critical_pairs": ("two_critical_pairs", "two pairs of multipliers lie on the unit "
                           "circle at once (or the pair is double)"),
}


def _ns_verdict(sign, status):
    if status == PointStatus.RESONANCE_1_3:
        return ("strong resonance 1:3 (theta = 2 pi/3): the normal form z -> lambda z + c1 "
                "z|z|^2 does not exist; no invariant-curve prediction")
    if status == PointStatus.RESONANCE_1_4:
        return ("strong resonance 1:4 (theta = pi/2): c1 is computed but a further resonant "
                "term decides the dynamics; no invariant-curve prediction")
    return {"negative": "supercritical: a stable closed invariant curve is born where the "
                        "fixed point loses stability",
            "positive": "subcritical: an unstable closed invariant curve surrounds the stable "
                        "fixed point and shrinks onto it; past the critical value the onset "
                        "is abrupt",
            "zero": "degenerate: the first Lyapunov coefficient of the map vanishes; a "
                    "higher-order analysis is needed"}.get(
        sign, "supercritical if l1 < 0, subcritical if l1 > 0 (the sign is not decided)")


def _multiplier(N, W):
    """``lambda = (1 + nu)/(1 - nu) = ((1 - W) + 2 nu)/(1 + W)`` with ``nu^2 = -W``."""
    K = N.base
    inv = 1 / (K.one + W)
    return N.element((K.one - W) * inv, 2 * inv)


def _resonance(target, W, ctx):
    for value, name in ((1, PointStatus.RESONANCE_1_4), (3, PointStatus.RESONANCE_1_3)):
        if sign_word(target, W - value, ctx) == Sign.ZERO:
            return name
    return None


def _ns_point(prep, unknown, branch):
    target, K, N, W = branch.tower, branch.tower.top, branch.nu_field, branch.W
    sub = lambda c: prep.tower.substitute(c, unknown, branch.value, target,  # noqa: E731
                                          branch.images)
    ctx = prep.context(target)
    E = lambda x: expr(target, x, ctx)  # noqa: E731
    taylor = prep.taylor.map(sub, K)
    A = map_jacobian(taylor)
    lam = _multiplier(N, W)
    q, pbar = unit_circle_vectors(K, N, A, lam)
    qq = lower(sum((x.conjugate() * x for x in q[1:]), q[0].conjugate() * q[0]))
    status = _resonance(target, W, ctx) or PointStatus.NONDEGENERATE
    speed = 2 * branch.transversality[0] / (K.one + W)
    c1 = lyap = rho2 = None
    sign, amp = Sign.UNDECIDED, {}
    if status != PointStatus.RESONANCE_1_3:
        c1_raw = ns_coefficient(K, N, A, taylor, q, pbar, lam)
        re = lower((lam.conjugate() * c1_raw).a)
        c1 = E(lower(c1_raw.a) / qq) + E(lower(c1_raw.b) / qq) * N.root
        lyap = E(re / qq)
        sign = sign_word(target, re, ctx)
        if re and status == PointStatus.NONDEGENERATE:
            d = _delta(unknown)
            rho2 = E(-speed * qq / re) * d
            amp = {s: E(-4 * speed * lower((x.conjugate() * x).a) / re) * d
                   for s, x in zip(prep.model.states, q)}
        if sign == Sign.ZERO and status == PointStatus.NONDEGENERATE:
            status = PointStatus.DEGENERATE_LYAPUNOV
    if status == PointStatus.NONDEGENERATE and not speed:
        status = PointStatus.TRANSVERSALITY_FAILS
    cos = (K.one - W) / (K.one + W)
    conds = [("the critical multipliers are a complex pair (tan(theta/2)^2 > 0)", W, "positive"),
             ("the modulus of the multipliers crosses 1 with nonzero speed", speed, "nonzero"),
             ("no 1:4 resonance (theta != pi/2)", W - 1, "nonzero"),
             ("no 1:3 resonance (theta != 2 pi/3)", W - 3, "nonzero")]
    conds += [(f"the other multipliers lie inside the unit circle ({k})", x, "positive")
              for k, x in cofactor_hurwitz(branch)]
    values, point = _values_and_point(prep, unknown, E(branch.value), sub, E)
    angle = 2 * sympy.atan(sympy.sqrt(E(W)))
    multiplier = E(lower(lam.a)) + E(lower(lam.b)) * N.root
    qs = tuple(E(lower(x.a)) + E(lower(x.b)) * N.root for x in q)
    notes = (f"tan(theta/2)^2 = {sympy.sstr(E(W))} (omega^2 of the Cayley-transformed "
             "characteristic polynomial)",)
    return NeimarkSackerResult(prep.parameter, unknown.name, values, point, angle, E(cos),
                               multiplier, qs, c1, lyap, sign, E(speed), rho2, amp, status,
                               _ns_verdict(sign, status), _conditions(target, ctx, E, conds),
                               notes)


def _map_error(exc):
    if isinstance(exc, DegenerateHopfError):
        reason, words = _RESONANCE_REASONS.get(exc.reason, (exc.reason, str(exc)))
        return DegenerateBifurcationError(f"not a Neimark-Sacker point: {words}", reason=reason)
    return exc


@guarded("the Neimark-Sacker analysis")
def neimark_sacker_all(model: Model, parameter: str, *, solve_for: str | None = None,
                       equilibrium: EquilibriumSpec = None, eliminate: Sequence[str] | None = None,
                       values: Mapping[str, object] | None = None,
                       assume: Mapping[str, str] | None = None, backend: str = "flint") -> tuple:
    """Every closed-form Neimark-Sacker point (see :func:`neimark_sacker`)."""
    prep = prepare_map(model, parameter, equilibrium=equilibrium, eliminate=eliminate,
                       values=values, assume=assume, order=3, backend=backend,
                       analysis="the Neimark-Sacker analysis")
    unknown = unknown_symbol(prep, solve_for)
    K = prep.tower.top
    chi = characteristic_polynomial(K, map_jacobian(prep.taylor))
    transformed = cayley(K, chi)

    def accept(branch) -> bool:
        return sign_word(branch.tower, branch.W, prep.context(branch.tower)) not in (
            "negative", "zero", "nonpositive")

    try:
        found = find_critical_branches(
            prep.tower, unknown, transformed, describe=lambda s: f"'{s}'", accept=accept)
        branches, notes = found.branches, found.notes
    except NoHopfPointError as exc:
        raise NoHopfPointError(f"no pair of multipliers exp(+-i theta) reaches the unit circle "
                               f"as '{unknown}' varies (the Cayley-transformed characteristic "
                               f"polynomial has no pair +-i tan(theta/2) there; {exc})",
                               reason=exc.reason) from None
    except DegenerateBifurcationError as exc:
        raise _map_error(exc) from None
    out, errors = [], []
    for b in branches:
        try:
            r = _ns_point(prep, unknown, b)
        except DegenerateBifurcationError as exc:
            errors.append(exc)
            continue
        except ZeroDivisionError:
            errors.append(DegenerateBifurcationError(
                "a candidate critical value makes a denominator of the map or of the fixed "
                "point vanish", reason="undefined"))
            continue
        out.append(dataclasses.replace(r, notes=r.notes + tuple(
            f"critical set (after the Cayley transform): {n}" for n in notes)))
    if not out:
        raise errors[0]
    return tuple(out)


@guarded("the Neimark-Sacker analysis")
def neimark_sacker(model: Model, parameter: str, *, solve_for: str | None = None,
                   equilibrium: EquilibriumSpec = None, eliminate: Sequence[str] | None = None,
                   values: Mapping[str, object] | None = None,
                   assume: Mapping[str, str] | None = None, backend: str = "flint",
                   branch: int | None = 0) -> NeimarkSackerResult:
    """Neimark-Sacker analysis of a map's fixed point in ``parameter``.

    Parameters
    ----------
    model : Model
        A map (``kind="map"``).
    parameter : str
        The bifurcation parameter ``mu``.
    solve_for, equilibrium, eliminate, values, assume, backend, branch
        As for :func:`flip`.

    Returns
    -------
    NeimarkSackerResult

    Examples
    --------
    >>> from criticality import Model
    >>> m = Model(["x", "y"], {"x": "r*x*(1 - y)", "y": "x"}, kind="map")
    >>> r = neimark_sacker(m, "r", equilibrium=1)
    >>> r.critical_values, r.angle, r.lyapunov_sign
    ({'r': 2}, pi/3, 'negative')
    """
    branch = check_branch(branch)
    results = neimark_sacker_all(model, parameter, solve_for=solve_for,
                                 equilibrium=equilibrium, eliminate=eliminate, values=values,
                                 assume=assume, backend=backend)
    return pick_branch(results, branch)
