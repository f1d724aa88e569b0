"""The numeric mode: a Hopf point located numerically when no closed form exists.

Pipeline place: model + guess -> compiled Taylor data
(:mod:`criticality.local.compiled`) -> **Newton on the Hopf system**
(:mod:`criticality.local.numeric_hopf`) -> the engine's normal-form
machinery over a numeric field -> :class:`HopfResult` with ``status``
"numeric (k correct digits)".

For models whose equilibrium has no closed form (exponential rate laws, Hill
functions with a symbolic exponent, the Hodgkin-Huxley equations, rings of
tanh units), the equilibrium, the critical value, omega and the critical
eigenvector are found together by Newton's method on the Hopf system (the
eigenvector formulation, analytic Jacobian).  The model's derivatives are
differentiated and compiled once per model (with common subexpressions
removed) and kept in a small cache, so a further point of the same model,
with other parameter values or another guess, costs only the numerics.

Accuracy.  Up to 13 digits the whole computation runs in float64; the
number of correct digits is estimated from the condition number of the Newton
matrix (``cond * eps``, the first-order bound), the last Newton correction and
the agreement of two routes to ``c1`` (a dense complex projection formula
and the engine's realified one).  If that estimate falls short of the digits
asked, or more digits are asked, the float64 point is refined in mpmath and
the analysis runs once at ``digits + 15`` significant digits (at order 3 with
ball linear algebra, :mod:`criticality.local.numeric_balls`).  Its correct
digits are judged from that one run: the digits the float64 run lost on this
point (its agreement with the precise run) are lost at the higher precision
too, and the condition number, the two routes to ``c1`` and the radii of the
balls bound them further.  Where that judgement falls short of the digits
asked (or float64 could not judge the point), a second run at
``2 digits + 15`` digits decides, and the number of digits on which the two
runs agree is reported.  The values are rounded to ``digits``.
"""

from __future__ import annotations

import math
from collections import OrderedDict
from typing import TYPE_CHECKING, Any, Mapping

import mpmath
import sympy

from ..local.boundary import guarded
from ..errors import DegenerateHopfError, NoHopfPointError, ParameterError
from ..local.compiled import CompiledTaylor
from ..local.lyapunov import complex_normal_form
from ..local.prepare import check_order, resolve_parameter
from ..local.numeric_hopf import (FloatField, HopfSystem, MpField, eigen_data, engine_eigenbasis,
                                  numpy_projection_c1, numpy_projection_c1_real,
                                  numpy_transversality)
from ..local.numeric_balls import ball_coefficients
from ..local.projection import projection_c1

if TYPE_CHECKING:
    from .results import HopfResult
    from ..local.numeric_hopf import HopfPoint
    from ..model.core import Model

__all__ = ["hopf_numeric", "numeric_setup", "NumericSetup", "FLOAT64_DIGITS", "guess_vector",
           "nu_to_complex"]

#: the most digits the float64 route may report
FLOAT64_DIGITS = 13
_CACHE: "OrderedDict[tuple, CompiledTaylor]" = OrderedDict()
_CACHE_SIZE = 16


_VALUES: "OrderedDict[tuple, dict]" = OrderedDict()


def _exact_values(model, values: dict) -> dict:
    """``model.value_substitution(values)``, remembered for repeated calls."""
    try:
        key = (model._key(), tuple(sorted((k, v) for k, v in values.items())))
        hash(key)
    except TypeError:
        return model.value_substitution(values)
    hit = _VALUES.get(key)
    if hit is None:
        hit = _VALUES[key] = model.value_substitution(values)
        while len(_VALUES) > 256:
            _VALUES.popitem(last=False)
    return hit


class NumericSetup:
    """A model compiled for the numeric mode: the compiled Taylor data, the
    parameter symbols in order and their exact values, the bifurcation
    parameter's index, and the float values for Newton."""

    def __init__(self, model: Model, parameter: str, values: Mapping | None, order: int,
                 along: tuple = ()) -> None:
        if parameter in model.states:
            raise ParameterError(f"'{parameter}' is a state variable, not a parameter")
        model.parameter(parameter)  # did-you-mean on an unknown name
        for a in along:
            model.parameter(a)
        given = dict(values or {})
        clash = sorted(set(given) & {parameter, *along})
        if clash:
            raise ParameterError(f"{', '.join(map(repr, clash))} is varied, so it cannot also "
                                 "be given a fixed value in values=")
        defaults = {k: v for k, v in model.defaults().items()
                    if k not in given and k not in (parameter, *along)}
        exact = _exact_values(model, {**defaults, **given})
        symbols = list(model.parameter_symbols)
        names = [s.name for s in symbols]
        varied = {parameter, *along}
        missing = [n for n in names if n not in varied and model.symbols[n] not in exact]
        if missing:
            raise ParameterError(
                f"the numeric mode needs a value for every parameter except '{parameter}'; "
                f"no value for {', '.join(map(repr, missing))} (give values={{...}} or "
                "defaults in the model)")
        self.model = model
        self.parameter = parameter
        self.names = names
        self.mu_index = names.index(parameter)
        self.along_index = tuple(names.index(a) for a in along)
        self.exact = [exact.get(s, sympy.Integer(0)) for s in symbols]
        self.floats = [float(sympy.N(v, 20)) for v in self.exact]
        active = (self.mu_index, *self.along_index)
        key = (model._key(), tuple(names), active, order)
        compiled = _CACHE.get(key)
        if compiled is None:
            compiled = CompiledTaylor(model.equations, model.state_symbols, symbols, active,
                                      order)
            _CACHE[key] = compiled
            while len(_CACHE) > _CACHE_SIZE:
                _CACHE.popitem(last=False)
        else:
            _CACHE.move_to_end(key)
        self.compiled = compiled

    def system(self) -> HopfSystem:
        return HopfSystem(self.compiled, self.floats, self.mu_index)

    def mp_params(self, dps: int) -> list:
        with mpmath.workdps(dps + 5):
            return [mpmath.mpf(int(v)) if v.is_Integer else mpmath.mpf(sympy.N(v, dps + 5))
                    for v in self.exact]


def numeric_setup(model: Model, parameter: str, values: Mapping | None = None, order: int = 3,
                  along: tuple = ()) -> NumericSetup:
    """The (cached) compiled setup of ``model`` for the numeric mode."""
    return NumericSetup(model, parameter, values, order, along)


# -- float64 --------------------------------------------------------------------------------

def nu_to_complex(N: Any, x: Any, omega: Any) -> complex:
    a, b = N.components(x)
    return complex(a) + 1j * complex(b) * omega


def _others_max_re(np, A, omega):
    lam = np.linalg.eigvals(np.asarray(A, dtype=float))
    order = np.argsort(np.abs(lam - 1j * omega))
    keep = [z for i, z in enumerate(lam) if i not in (order[0],)]
    keep.sort(key=lambda z: abs(z + 1j * omega))
    rest = keep[1:]
    return max((z.real for z in rest), default=-1.0), lam


def run_float(setup: NumericSetup, pt: HopfPoint, order: int) -> dict:
    """Every quantity in float64 at the located point, with the estimated
    number of correct digits (key ``"correct"``)."""
    import numpy as np

    ct = setup.compiled
    dense = ct.dense()
    vals = np.array(ct.values(pt.x, pt.params, "math"), dtype=float)
    A, pbar = eigen_data(ct, vals, pt.omega, pt.q, "numpy")
    c1_dense = numpy_projection_c1(dense, vals, A, pt.omega, pt.q, pbar)
    if order == 3:  # realified solves: the second route to c1
        cs = [complex(numpy_projection_c1_real(dense, vals, A, pt.omega, pt.q, pbar))]
    else:  # the engine's normalization method over float64
        K = FloatField()
        eb = engine_eigenbasis(A, pt.omega, pt.q, pbar, K)
        taylor = ct.taylor_forms(vals, K, order)
        N = eb.nu_field
        cs = [nu_to_complex(N, c, pt.omega) for c in complex_normal_form(taylor, eb, order)]
    dlam = complex(numpy_transversality(dense, vals, A, pt.q, pbar, 0))
    others, lam = _others_max_re(np, A, pt.omega)
    eps = 2.2e-16
    spread = abs(c1_dense - cs[0]) / max(abs(cs[0]), 1e-300)
    err = max(pt.condition * eps, pt.correction, spread, 4 * eps)
    correct = max(0, min(FLOAT64_DIGITS, int(math.floor(-math.log10(err)))))
    qn = pt.q / math.sqrt(np.vdot(pt.q, pt.q).real)
    with mpmath.workdps(20):
        return {
            "x0": [mpmath.mpf(float(v)) for v in pt.x], "mu_c": mpmath.mpf(pt.mu),
            "omega": mpmath.mpf(pt.omega), "W": mpmath.mpf(pt.omega) ** 2,
            "c": [mpmath.mpc(c) for c in cs], "c1_projection": mpmath.mpc(complex(c1_dense)),
            "dlam": mpmath.mpc(dlam), "q": [mpmath.mpc(complex(z)) for z in qn],
            "p": [mpmath.mpc(complex(z)) for z in (pbar.conj() * np.vdot(pt.q, pt.q).real /
                                                   math.sqrt(np.vdot(pt.q, pt.q).real))],
            "A": [[mpmath.mpf(float(a)) for a in row] for row in A],
            "eigenvalues": [mpmath.mpc(complex(z)) for z in lam],
            "others_max_re": mpmath.mpf(float(others)), "correct": correct,
        }


# -- mpmath ---------------------------------------------------------------------------------

def run_mp(setup: NumericSetup, system: HopfSystem, pt: HopfPoint, dps: int,
           order: int, digits: int) -> dict:
    """Every quantity at ``dps`` digits, from the float64 point refined in
    mpmath: at order 3 by the ball kernels (:mod:`criticality.local.numeric_balls`,
    two routes to ``c1``), above by the engine's projection formula and
    normalization method over mpmath numbers."""
    import numpy as np

    ct = setup.compiled
    exact = setup.mp_params(dps)
    x, mu, om, q, pm = system.refine(pt, dps, exact)
    with mpmath.workdps(dps):
        pm = list(exact)
        pm[setup.mu_index] = mu
        vals = ct.values(x, pm, "mpmath")
        if order == 3:
            b = ball_coefficients(ct, vals, om, q, dps, mpmath.mpf(10) ** -digits)
            A, pbar, qq = b["A"], b["pbar"], b["qq"]
            c1p, cs, dlam, rounding = b["c1_real"], [b["c1"]], b["dlam"], b["rounding"]
        else:
            A, pbar, c1p, cs, dlam = _engine_mp(ct, vals, om, q, order)
            qq, rounding = mpmath.fsum(abs(z) ** 2 for z in q), 0.0
        others, lam = _others_max_re(np, [[float(a) for a in row] for row in A], float(om))
        root = mpmath.sqrt(qq)
        return {
            "x0": list(x), "mu_c": mu, "omega": om, "W": om ** 2,
            "c": list(cs), "c1_projection": c1p, "dlam": dlam,
            "q": [z / root for z in q], "p": [mpmath.conj(z) * root for z in pbar],
            "A": [list(row) for row in A], "eigenvalues": [mpmath.mpc(complex(z)) for z in lam],
            "others_max_re": mpmath.mpf(float(others)), "rounding": rounding,
        }


def _engine_mp(ct: CompiledTaylor, vals: list, om: Any, q: list, order: int) -> tuple:
    """``(A, conj(p), c1 by projection, (c1, c2, ...) by normalization,
    d lambda / d mu)`` by the engine over mpmath numbers (orders above 3)."""
    A, pbar = eigen_data(ct, vals, om, q, "mpmath")
    K = MpField()
    eb = engine_eigenbasis(A, om, q, pbar, K)
    taylor = ct.taylor_forms(vals, K, order)
    N = eb.nu_field

    def cv(z):
        a, b = N.components(z)
        return mpmath.mpc(a, b * om)

    c1p = projection_c1(taylor, eb) / eb.qq
    cs = complex_normal_form(taylor, eb, order)
    n = ct.n
    f_mu = mpmath.matrix(n, 1)
    for i, pos in ct.layout.f_p[0]:
        f_mu[i] = vals[pos]
    dx = mpmath.lu_solve(mpmath.matrix(A), -f_mu)
    dxN = [N(dx[i]) for i in range(n)]
    dA_q = [N.zero] * n
    for i, j, pos in ct.layout.J_p[0]:
        dA_q[i] = dA_q[i] + N(vals[pos]) * eb.q[j]
    Bq = taylor.form(2, eb.q, dxN)
    dlam = sum((a * (b + c) for a, b, c in zip(eb.pbar, dA_q, Bq)), N.zero)
    return A, pbar, cv(c1p), [cv(c) for c in cs], cv(dlam)


def _agreement(a, b, digits, cap):
    """Digits on which two runs agree, capped at ``cap``: relative for
    quantities larger than ``10^-digits``, absolute below."""
    worst = cap
    pairs = [(a["mu_c"], b["mu_c"]), (a["omega"], b["omega"]), (a["dlam"], b["dlam"])]
    pairs += list(zip(a["x0"], b["x0"])) + list(zip(a["c"], b["c"]))
    tiny = mpmath.mpf(10) ** (-digits)
    for x, y in pairs:
        diff = abs(x - y)
        if diff:
            rel = diff if abs(y) < tiny else diff / abs(y)
            worst = min(worst, int(mpmath.floor(-mpmath.log10(rel))))
    return max(worst, 0)


def guess_vector(model: Model, parameter: str, guess: Mapping) -> list:
    if not isinstance(guess, Mapping):
        raise ParameterError(f"guess must be a mapping {{name: value}}, got "
                             f"{type(guess).__name__}")
    known = set(model.states) | {parameter}
    bad = [k for k in guess if k not in known]
    if bad:
        raise ParameterError(f"the guess names {', '.join(map(repr, bad))}, which "
                             f"{'is' if len(bad) == 1 else 'are'} neither a state nor the "
                             f"bifurcation parameter '{parameter}'")
    missing = [k for k in list(model.states) + [parameter] if k not in guess]
    if missing:
        raise ParameterError(f"the guess gives no value for {', '.join(map(repr, missing))}; "
                             "the numeric mode needs a starting value for every state and for "
                             "the bifurcation parameter")
    out = []
    for key in list(model.states) + [parameter]:
        value = guess[key]
        if isinstance(value, str):
            value = model.parse(value, context=f"guess for '{key}'")
        try:
            if isinstance(value, (int, float)):
                number = float(value)
            else:
                number = float(sympy.N(sympy.sympify(value, strict=True), 20))
        except (TypeError, ValueError, sympy.SympifyError) as exc:
            raise ParameterError(f"the guess for '{key}' must be a number, got {value!r}") from exc
        if not math.isfinite(number):
            raise ParameterError(f"the guess for '{key}' must be finite, got {value!r}")
        out.append(number)
    return out


@guarded("the numeric Hopf analysis")
def hopf_numeric(model: Model, parameter: str | None, guess: Mapping, *, digits: int = 30,
                 order: int = 3, values: Mapping | None = None, radius: float = 1.0) -> HopfResult:
    """Locate a Hopf point numerically from ``guess`` and analyse it.

    Parameters
    ----------
    model : Model
    parameter : str
        The bifurcation parameter; every other parameter needs a value (from
        ``values`` or the model's defaults).
    guess : mapping
        Starting values for every state and for ``parameter``.
    digits : int
        Significant digits wanted (5 to 500); up to 13 the analysis runs in
        float64 when its error estimate allows.
    order : int
        Odd, >= 3: ``2k + 1`` gives ``l1 .. lk``.
    values : mapping, optional
        Values for other parameters.
    radius : float
        The trust region: Newton's iterates stay within this scaled distance
        (max norm, scale ``max(1, |guess|)`` per coordinate) of the guess; a
        Hopf point farther away is refused.

    Returns
    -------
    HopfResult
        With ``status`` saying that it is numeric and how many digits are
        correct, and a note giving the distance of the point from the guess.
    """
    from .numeric_result import numeric_result

    if isinstance(digits, bool) or not isinstance(digits, int) or not 5 <= digits <= 500:
        raise ParameterError(f"digits must be an integer between 5 and 500, got {digits!r}")
    check_order(order)
    if not isinstance(radius, (int, float)) or not radius > 0:
        raise ParameterError(f"radius must be a positive number, got {radius!r}")
    base = model
    model, parameter = resolve_parameter(model, parameter, values)
    if len(model.states) < 2:
        raise NoHopfPointError("a Hopf bifurcation needs at least two state variables",
                               reason="empty_critical_set")
    # compiled for the model as given, with the fixed values as run-time inputs, so that
    # a further point at other values reuses the compiled code (the result reports the
    # model with the values applied)
    setup = numeric_setup(base if values else model, parameter, values or None, order)
    start = guess_vector(model, parameter, guess)
    system = setup.system()
    pt = system.solve(start[:-1], start[-1], radius=float(radius))
    where = (f"the Hopf point lies at scaled distance {pt.distance:.3g} from the guess "
             f"(Newton: {pt.iterations} steps within the trust radius {float(radius):g})")
    try:
        d: dict | None = run_float(setup, pt, order)
    except DegenerateHopfError:
        if digits <= FLOAT64_DIGITS:
            raise
        d = None  # float64 cannot judge this point: two mpmath runs below
    if d is not None and digits <= FLOAT64_DIGITS and d["correct"] >= digits:
        routes = abs(d["c1_projection"] - d["c"][0]) <= 10.0 ** (-digits) * \
            max(1, abs(d["c"][0]))
        how = (f"numeric mode (float64): the Hopf point was located by Newton's method from "
               f"the guess; the error estimate (condition number, last correction, two "
               f"routes to c1) gives {d['correct']} correct digits; {where}")
        return numeric_result(model, parameter, d, digits, digits, d["correct"], routes,
                              order, how)
    dps = digits + 15
    run = run_mp(setup, system, pt, dps, order, digits)
    with mpmath.workdps(dps):
        correct, lost = _one_run_digits(run, d, pt, digits, dps)
        how = (f"numeric mode: the Hopf point was located by Newton's method from the guess "
               f"and refined to {dps} significant digits; the double-precision run lost {lost} "
               f"of its digits on this point, so the same computation at {dps} digits keeps "
               f"{correct} (also bounded by the condition number, two routes to c1 and the rounding "
               f"radii of the ball arithmetic); {where}")
    if correct < digits:  # too ill-conditioned to judge from float64: run a second time
        high = run_mp(setup, system, pt, 2 * digits + 15, order, digits)
        with mpmath.workdps(2 * digits + 15):
            correct = _agreement(run, high, digits, dps)
        how = (f"numeric mode: the Hopf point was located by Newton's method from the guess; "
               f"runs at {dps} and {2 * digits + 15} significant digits agree to {correct} "
               f"digits, so {min(correct, digits)} digits are reported as correct; {where}")
        run = high
    with mpmath.workdps(dps):
        routes = abs(run["c1_projection"] - run["c"][0]) <= mpmath.mpf(10) ** (-digits) * \
            max(1, abs(run["c"][0]))
    return numeric_result(model, parameter, run, digits, min(correct, digits), correct,
                          routes, order, how)


def _one_run_digits(run: dict, d: dict | None, pt: HopfPoint, digits: int, dps: int) -> tuple:
    """``(correct, lost)``: the digits of a run at ``dps`` digits judged from
    one run.  Rounding errors grow with the unit roundoff through the same
    computation, so the digits float64 lost on this point (``lost``, from its
    agreement with the run) are lost at ``dps`` digits too; further bounds:
    the condition number of the Newton matrix times the refinement's residual
    tolerance, the agreement of the two routes to c1, and the radii of the
    balls (rounding of the final stage).  Two digits are kept in reserve."""
    lost = 16 if d is None else 16 - _agreement(d, run, 15, 16)
    bounds = [dps - lost - 2, dps - 5 - int(math.ceil(math.log10(max(pt.condition, 1.0))))]
    spread = abs(run["c1_projection"] - run["c"][0]) / max(abs(run["c"][0]), 1e-300)
    for err in (spread, run["rounding"]):
        if err:
            bounds.append(int(math.floor(-math.log10(float(err)))) - 1)
    return max(0, min(dps, *bounds)), lost
