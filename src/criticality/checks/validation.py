"""Numerical validation of a Hopf prediction by simulating the original model.

Pipeline place: result -> **validation** (scipy) -> report (text, LaTeX).

:func:`validate` integrates the model the result was computed from, with every
parameter fixed at a point and the bifurcation parameter at ``mu_c + delta``
on the side where the predicted cycle exists, and compares the cycle it finds
with the prediction:

* a cycle that attracts (supercritical, the other eigenvalues stable) is
  reached forward in time from a start on the predicted cycle; after the
  transient (its length follows from the radial rate ``2 |beta'(mu_c) delta|``
  and the gap to the other eigenvalues) each state's half peak-to-peak
  amplitude and the period are measured and compared with
  ``sqrt(k_j delta)`` and ``2 pi / (omega + frequency_slope delta)``;
* a cycle that repels in every direction (subcritical in the plane, or every
  other eigenvalue unstable) is measured the same way in reversed time;
* a subcritical onset with the other eigenvalues stable is bracketed: before
  onset, a start at 0.7 of the predicted cycle must fall onto the equilibrium
  and a start at 1.3 of it must leave; and the unstable cycle itself (like a
  saddle-type cycle, which no integration reaches) is located by Newton's
  method on the periodic orbit (single shooting with the variational
  equations) and measured the same way.

Two or three offsets ``delta`` show whether the relative error shrinks as the
prediction says it should (``O(delta)``): when it does not, the local
prediction is poor at that point (a relaxation or canard regime, or another
attractor) and the report says so.  numpy and scipy are the ``validate``
extra; they are imported inside :func:`validate`.
"""

from __future__ import annotations

import math
import time
from typing import TYPE_CHECKING, Any, Mapping, Sequence

from .simulate import bracket, local_frame, measure_cycle, prepare, settle_time, shoot_cycle
from ..errors import MissingExtraError, ParameterError, ValidationRunError
from ..kinds import Classification, Side
from ..local.options import check_values
from .validation_report import BracketOutcome, CycleMeasurement, ValidationReport

if TYPE_CHECKING:
    from ..hopf_analysis.results import HopfResult

__all__ = ["validate", "default_offsets", "natural_scale", "ValidationReport", "CycleMeasurement",
           "BracketOutcome"]

#: offsets relative to the natural scale of the problem
RELATIVE_OFFSETS = (1e-2, 4e-3, 1.6e-3)
#: relative errors below this are at the precision of the measurement
ERROR_FLOOR = 1e-5
#: the observed order below which the error is said not to shrink
MIN_ORDER = 0.5
#: how many of the offsets (the largest) are bracketed: the time to decide
#: grows like 1 / offset, and the cycle itself is measured at every offset
BRACKET_OFFSETS = 2


def _extras():
    try:
        import numpy
        from scipy.integrate import solve_ivp
    except ImportError as exc:
        raise MissingExtraError(
            f"validate() needs numpy and scipy ({exc.name} is missing); install them with: "
            "pip install 'criticality[validate]'") from exc
    return numpy, solve_ivp


def default_offsets(result: HopfResult, values: Mapping | None = None, **kwargs: Any) -> tuple:
    """The offsets ``|mu - mu_c|`` :func:`validate` uses by default.

    The offsets are 1e-2, 4e-3 and 1.6e-3 of :func:`natural_scale` at the
    parameter point.
    """
    np, _ = _extras()
    setup = prepare(result, {**dict(values or {}), **kwargs}, np)
    return _default_offsets(setup)


def natural_scale(omega: float, gap: float, beta1: float, slope: float) -> float:
    """The offset ``|mu - mu_c|`` beyond which the local prediction cannot hold.

    The smallest of ``omega / |beta'|`` and ``gap / |beta'|`` (where the
    growth rate of the critical pair reaches the frequency, or the distance
    ``gap`` of the other eigenvalues from the imaginary axis) and
    ``omega / |frequency_slope|`` (where the first-order frequency shift
    reaches the frequency itself).
    """
    scale = min(omega, gap) / abs(beta1)
    if slope and math.isfinite(slope):
        scale = min(scale, omega / abs(slope))
    return scale


def _default_offsets(setup) -> tuple:
    scale = natural_scale(setup.omega, setup.gap, setup.beta1, setup.slope)
    return tuple(scale * r for r in RELATIVE_OFFSETS)


def _offsets(offsets, setup) -> tuple:
    if offsets is None:
        return _default_offsets(setup)
    out = []
    for d in offsets:
        if isinstance(d, bool) or not isinstance(d, (int, float)) or not math.isfinite(d) or d <= 0:
            raise ParameterError(f"offsets must be positive numbers (distances |mu - mu_c|; the "
                                 f"side is where the cycle exists), got {d!r}")
        out.append(float(d))
    if not out:
        raise ParameterError("give at least one offset")
    return tuple(sorted(set(out), reverse=True))


def _method(setup, method):
    if method is not None:
        if method not in ("DOP853", "RK45", "Radau", "BDF", "LSODA"):
            raise ParameterError(f"unknown integrator {method!r}; expected one of DOP853, RK45, "
                                 "Radau, BDF, LSODA")
        return method
    fastest = max((abs(e) for e in setup.others), default=0.0)
    return "LSODA" if fastest > 100 * setup.omega else "DOP853"


def _plan(setup) -> tuple:
    """(measure direction or 0, bracket direction or 0) from l1 and the other eigenvalues."""
    stable = all(e.real < 0 for e in setup.others)
    unstable = all(e.real > 0 for e in setup.others)
    measure = 1 if (setup.l1 < 0 and stable) else -1 if (setup.l1 > 0 and unstable) else 0
    brackets = 1 if (setup.l1 > 0 and stable) else -1 if (
        setup.l1 < 0 and unstable and not stable) else 0
    return measure, brackets


def validate(result: HopfResult, values: Mapping | None = None, *,
             offsets: Sequence[float] | None = None,
             tolerance: float = 0.05, method: str | None = None, rtol: float = 1e-9,
             window_periods: int = 10, max_periods: int = 4000,
             bracket_factors: tuple = (0.7, 1.3), shooting: bool = True,
             **kwargs: Any) -> ValidationReport:
    """Check the predicted cycle of ``result`` by simulating the original model.

    Parameters
    ----------
    result : HopfResult
    values : mapping, optional
        Values of the remaining parameters (also as keywords; a parameter whose
        name clashes with an option goes in the mapping).
    offsets : sequence of float, optional
        Distances ``|mu - mu_c|`` to check (the side is where the cycle
        exists); default: :func:`default_offsets`.
    tolerance : float
        Largest relative amplitude (and first-order period) error accepted at
        the smallest offset.
    method : str, optional
        scipy integrator; default DOP853 (8th order), LSODA (switching to
        BDF) when the other eigenvalues are far faster than the oscillation.
    rtol : float
        Relative tolerance of the integrator (absolute: ``rtol`` times 1e-2 of
        the predicted radius).
    window_periods : int
        Periods measured after the transient.
    max_periods : int
        Cap on the length of one run, in periods.
    bracket_factors : (float, float)
        Inside and outside starts of the bracketing, as multiples of the
        predicted radius.
    shooting : bool
        Measure, by Newton's method on the periodic orbit, a cycle that
        integration in neither time direction can reach (a subcritical cycle
        with the other eigenvalues stable, a saddle-type cycle).

    Returns
    -------
    ValidationReport

    Raises
    ------
    MissingExtraError
        numpy or scipy is not installed.
    ParameterError
        A parameter lacks a value, or an option is out of range.
    ValidationRunError
        The integration cannot be carried out (e.g. no definite side, l1 = 0).
    """
    started = time.perf_counter()
    values = check_values(values)
    if result.classification in ("nontransversal", "inadmissible"):
        raise ValidationRunError(f"the result gives no verdict ({result.classification}): "
                                 f"{result.verdict}; there is no predicted cycle to confirm")
    power = getattr(result.cycle, "amplitude_power", 2)
    if power != 2:
        raise ValidationRunError(
            f"l1 vanishes identically here and the result predicts a 1/{power} power law from "
            f"l{power // 2}; this check simulates the square-root law of l1 only. Compare "
            "result.cycle.amplitudes with a simulation of the model directly.")
    np, ivp = _extras()
    _check_options(tolerance, rtol, window_periods, max_periods, bracket_factors)
    setup = prepare(result, {**dict(values or {}), **kwargs}, np)
    sign = setup.side_sign
    if setup.l1 == 0 or not math.isfinite(setup.l1):
        raise ValidationRunError("l1 vanishes at this parameter point: the cycle is not "
                                 "predicted by the first Lyapunov coefficient")
    deltas = _offsets(offsets, setup)
    how = _method(setup, method)
    opts = dict(method=how, rtol=rtol, np=np, ivp=ivp)
    measure_dir, bracket_dir = _plan(setup)
    approach = {1: "forward", -1: "backward"}.get(measure_dir, "shooting" if shooting else None)
    notes: list[str] = []
    measurements = tuple(_measure(setup, sign * d, approach, window_periods, max_periods,
                                  notes, opts) for d in deltas) if approach else ()
    brackets = tuple(_bracket(setup, sign * d, bracket_dir, bracket_factors, max_periods, opts)
                     for d in deltas[:BRACKET_OFFSETS]) if bracket_dir else ()
    verdict, reasons, warnings, orders = _judge(setup, measurements, brackets, tolerance)
    return ValidationReport(
        parameter=result.parameter, values=setup.values, critical_value=setup.mu_c,
        omega=setup.omega, l1=setup.l1,
        classification=Classification.SUPERCRITICAL if setup.l1 < 0 else Classification.SUBCRITICAL,
        side=Side.ABOVE if sign > 0 else Side.BELOW,
        predicted_stable=setup.l1 < 0 and all(e.real < 0 for e in setup.others),
        states=setup.states, measurements=measurements,
        brackets=brackets, orders=orders, verdict=verdict, reasons=reasons,
        warnings=tuple(notes) + warnings, tolerance=tolerance, method=how, rtol=rtol,
        elapsed=time.perf_counter() - started)


def _check_options(tolerance, rtol, window_periods, max_periods, factors):
    if not (0 < tolerance < 1):
        raise ParameterError(f"tolerance must lie between 0 and 1, got {tolerance!r}")
    if not (1e-14 <= rtol <= 1e-4):
        raise ParameterError(f"rtol must lie between 1e-14 and 1e-4, got {rtol!r}")
    if int(window_periods) < 3:
        raise ParameterError(f"window_periods must be at least 3, got {window_periods!r}")
    if int(max_periods) < 10 * int(window_periods):
        raise ParameterError(f"max_periods must be at least ten windows, got {max_periods!r}")
    inside, outside = factors
    if not (0 < inside < 1 < outside):
        raise ParameterError(f"bracket_factors must be (inside < 1, outside > 1), got {factors!r}")


def _predicted_amplitudes(setup, offset) -> dict:
    return {s: math.sqrt(k * offset) if k * offset > 0 else 0.0 for s, k in setup.k.items()}


def _measure(setup, offset, approach, window_periods, max_periods, notes, opts):
    np = opts["np"]
    mu = setup.mu_c + offset
    frame = local_frame(setup, mu, np)
    if abs(frame.eigenvalue.imag) < 0.5 * setup.omega:
        notes.append(f"at offset {offset:+.4g} the eigenvalues next to the critical pair are "
                     f"{frame.eigenvalue:.3g} and its conjugate: the offset is far outside the "
                     "range where the local prediction can hold")
    radius = math.sqrt(setup.radius_coefficient * abs(offset))
    period0 = 2 * math.pi / setup.omega
    window = window_periods * period0
    settle = settle_time(setup, offset)
    if approach != "shooting" and settle > max_periods * period0 - window:
        notes.append(f"at offset {offset:+.4g} the transient would take about "
                     f"{settle / period0:.0f} periods (more than max_periods = {max_periods}): "
                     "the cycle was located by shooting instead")
        approach = "shooting"
    if approach == "shooting":
        guess = 2 * math.pi / (setup.omega + (setup.slope * offset if math.isfinite(
            setup.slope) else 0.0))
        run = shoot_cycle(setup, frame, radius, guess, rtol=opts["rtol"], np=np,
                          ivp=opts["ivp"])
        return _measurement(setup, offset, mu, approach, run, 0.0, run.time)
    run = measure_cycle(setup, frame, radius, direction=1 if approach == "forward" else -1,
                        transient=settle, window=window, **opts)
    return _measurement(setup, offset, mu, approach, run, settle, window)


def _measurement(setup, offset, mu, approach, run, settle, window) -> CycleMeasurement:
    predicted = _predicted_amplitudes(setup, offset)
    big = max(predicted.values())
    measured = dict(run.amplitudes or {})
    errors = {s: (measured[s] / p - 1 if p > 1e-9 * big else None) if s in measured else None
              for s, p in predicted.items()}
    p0 = 2 * math.pi / setup.omega
    freq = setup.omega + (setup.slope * offset if math.isfinite(setup.slope) else 0.0)
    p1 = 2 * math.pi / freq
    got = run.period
    return CycleMeasurement(
        offset=offset, mu=mu, approach=approach,
        status=run.status, predicted_amplitudes=predicted, measured_amplitudes=measured,
        amplitude_errors=errors, predicted_period=p0, corrected_period=p1, measured_period=got,
        period_error=None if got is None else got / p0 - 1,
        corrected_period_error=None if got is None else got / p1 - 1,
        settle_time=settle, window=window, drift=run.residual, floquet=run.multiplier,
        **_floquet_prediction(setup, offset, got, run.multiplier))


def _floquet_prediction(setup, offset, period, multiplier) -> dict:
    """The largest nontrivial Floquet multiplier the local prediction gives, and the
    relative error of the measured one in the exponent."""
    if multiplier is None or period is None:
        return {}
    exponents = [-2.0 * setup.beta1 * offset] + [e.real for e in setup.others]
    predicted = math.exp(max(exponents) * period)
    if predicted == 1.0 or multiplier <= 0:
        return {"predicted_floquet": predicted}
    return {"predicted_floquet": predicted,
            "floquet_error": math.log(multiplier) / math.log(predicted) - 1}


def _bracket(setup, offset, direction, factors, max_periods, opts) -> BracketOutcome:
    """Starts inside and outside the unstable cycle, on the side where it exists."""
    np = opts["np"]
    mu = setup.mu_c + offset
    frame = local_frame(setup, mu, np)
    radius = math.sqrt(setup.radius_coefficient * abs(offset))
    rate = abs(setup.beta1 * offset)
    horizon = 30.0 / rate + (10.0 / setup.gap if math.isfinite(setup.gap) else 0.0)
    horizon = min(horizon, max_periods * 2 * math.pi / setup.omega)
    inside, outside = factors
    a = bracket(setup, frame, radius, inside, horizon=horizon, direction=direction, **opts)
    b = bracket(setup, frame, radius, outside, horizon=horizon, direction=direction, **opts)
    return BracketOutcome(offset=offset, mu=mu, radius=radius,
                          predicted_amplitudes=_predicted_amplitudes(setup, offset),
                          inside_factor=inside,
                          inside=a.status, inside_time=a.time, outside_factor=outside,
                          outside=b.status, outside_time=b.time)


def _orders(measurements) -> tuple:
    out: list[float | None] = []
    for a, b in zip(measurements, measurements[1:]):
        ea, eb = a.worst_amplitude_error, b.worst_amplitude_error
        if not (a.measured and b.measured) or not ea or not eb:
            out.append(None)
            continue
        out.append(math.log(ea / eb) / math.log(abs(a.offset / b.offset)))
    return tuple(out)


def _judge(setup, measurements, brackets, tolerance):
    """(verdict, reasons, warnings, orders) from the runs."""
    fails, opens, reasons, warnings = [], [], [], []
    orders = _orders(measurements)
    if not measurements and not brackets:
        opens.append("the predicted cycle is of saddle type (the other eigenvalues are on both "
                     "sides of the imaginary axis): integration in either time direction cannot "
                     "reach it")
    if measurements:
        _judge_measurements(measurements, orders, tolerance, fails, reasons, warnings)
        _judge_floquet(measurements, setup.l1 < 0 and all(e.real < 0 for e in setup.others),
                       tolerance, fails, reasons)
    if brackets:
        _judge_brackets(brackets, fails, opens, reasons)
    if fails:
        warnings.append("the local prediction is poor at this parameter point: check smaller "
                        "offsets, and look for a relaxation or canard regime or another attractor")
        return "not confirmed", tuple(fails + opens), tuple(warnings), orders
    if opens:
        return "inconclusive", tuple(opens + reasons), tuple(warnings), orders
    return "confirmed", tuple(reasons), tuple(warnings), orders


def _judge_measurements(ms, orders, tolerance, fails, reasons, warnings) -> None:
    lost = [m for m in ms if not m.measured]
    for m in lost:
        what = {"escaped": "left the neighbourhood of the equilibrium",
                "decayed": "fell onto the equilibrium",
                "undecided": "did not oscillate measurably"}[m.status]
        fails.append(f"at offset {m.offset:+.4g} the orbit started on the predicted cycle {what}: "
                     "no cycle was found near the prediction")
    if lost:
        return
    last = ms[-1]
    err = last.worst_amplitude_error
    if err is None:
        fails.append("no state has a predicted amplitude to compare with")
        return
    ok = err <= tolerance
    (reasons if ok else fails).append(
        f"amplitude error {err:.2e} at the smallest offset {last.offset:+.4g} "
        f"({'within' if ok else 'beyond'} the tolerance {tolerance:g})")
    perr = last.corrected_period_error
    if perr is None or abs(perr) > tolerance:
        fails.append(f"period error {perr if perr is None else f'{perr:.2e}'} at the smallest "
                     f"offset (tolerance {tolerance:g})")
    else:
        reasons.append(f"period error {abs(perr):.2e} against the first-order prediction")
    if len(ms) > 1:
        _judge_shrinking(ms, orders, fails, reasons)
    for m in ms:
        e = m.worst_amplitude_error or 0.0
        if m.drift is not None and m.drift > max(ERROR_FLOOR, 0.1 * e):
            warnings.append(f"at offset {m.offset:+.4g} the amplitude still drifts by "
                            f"{m.drift:.1e} within the measurement window (transient not settled)")


def _judge_floquet(ms, predicted_stable, tolerance, fails, reasons) -> None:
    """Compare the stability shooting finds (Floquet multipliers) with the prediction."""
    found = [m for m in ms if m.measured and m.floquet is not None]
    last = found[-1] if found else None
    if last is not None and last.floquet_error is not None and abs(
            last.floquet_error) > tolerance:
        fails.append(f"the largest Floquet multiplier at offset {last.offset:+.4g} differs from "
                     f"the prediction by {last.floquet_error:+.2e} in the exponent (tolerance "
                     f"{tolerance:g})")
    wrong = [m for m in found if (m.floquet < 1) != predicted_stable]
    want = "attract (all nontrivial |multipliers| < 1)" if predicted_stable else \
        "repel in some direction (a nontrivial |multiplier| > 1)"
    for m in wrong:
        fails.append(f"at offset {m.offset:+.4g} the Floquet multipliers of the cycle found by "
                     f"shooting (largest modulus {m.floquet:.6g}) contradict the prediction that "
                     f"it should {want}")
    if found and not wrong:
        errs = [abs(m.floquet_error) for m in found if m.floquet_error is not None]
        detail = f" (largest modulus within {max(errs):.1e} in the exponent)" if errs else ""
        reasons.append(f"the Floquet multipliers of the cycles found by shooting confirm that "
                       f"they {want}{detail}")


def _judge_shrinking(ms, orders, fails, reasons) -> None:
    bad = []
    for a, b, order in zip(ms, ms[1:], orders):
        ea, eb = a.worst_amplitude_error, b.worst_amplitude_error
        if eb <= ERROR_FLOOR:
            continue
        if eb > ea * abs(b.offset / a.offset) ** MIN_ORDER:
            bad.append(order)
    shown = ", ".join("-" if o is None else f"{o:.2f}" for o in orders)
    if bad:
        fails.append(f"the amplitude error does not shrink with the offset as O(offset) "
                     f"(observed orders {shown})")
    else:
        reasons.append(f"the amplitude error shrinks with the offset (observed orders {shown}; "
                       "errors below 1e-5 count as measurement precision)")


def _judge_brackets(brackets, fails, opens, reasons) -> None:
    for b in brackets:
        if b.as_predicted:
            continue
        text = (f"at offset {b.offset:+.4g}: the start at {b.inside_factor:g} of the predicted "
                f"radius {b.inside}, the start at {b.outside_factor:g} {b.outside}")
        wrong = b.inside == "escaped" or b.outside == "decayed"
        (fails if wrong else opens).append(text + (" (contradicts the prediction)" if wrong else
                                                   " (no outcome within the time limit)"))
    if all(b.as_predicted for b in brackets):
        reasons.append(f"subcritical onset bracketed at {len(brackets)} offset(s): starts inside "
                       "the predicted unstable cycle fall onto the equilibrium, starts outside "
                       "leave it")
