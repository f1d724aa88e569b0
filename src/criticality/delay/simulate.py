"""Validation of a delay Hopf result by simulating the retarded equation.

Pipeline place: result -> **simulation** -> validation report.

The integrator is the method of steps with a dense history: classical
fourth-order Runge-Kutta with a fixed step ``h`` no longer than the smallest
delay, so that every delayed argument ``t + c h - tau_k`` of a stage lies in the
computed past; there the solution is read from the cubic Hermite interpolant
of the stored values and derivatives (fourth-order accurate, like the steps).
The initial history is the predicted cycle ``x0 + 2 rho Re(q exp(i omega
theta))`` on ``[-tau_max, 0]`` (exact derivative), so the transient is short.
Amplitudes are half the peak-to-peak range over whole periods after the
transient; the period is the mean spacing of upward crossings of the mean
(interpolated linearly).

The right-hand side is lambdified once to plain ``math`` functions; no sympy in
the loop.
"""

from __future__ import annotations

import cmath
import math
from dataclasses import dataclass
from typing import Any, Mapping, Sequence

import sympy

from ..errors import ParameterError, ValidationRunError
from ..model.delayed import delayed_terms

#: a DelayHopfResult, typed loosely: the result imports this module at run time, and a
#: type-only import back would make the two modules import each other
ResultLike = Any

__all__ = ["DelaySimulation", "DelayValidation", "simulate_delay", "validate_delay"]


@dataclass(frozen=True)
class DelaySimulation:
    """One simulated run: the measured amplitudes (half peak-to-peak per state)
    and period, with the step and the time span used."""

    parameter_value: float
    amplitudes: Mapping[str, float]
    period: float
    step: float
    span: float


@dataclass(frozen=True)
class DelayValidation:
    """Predicted and simulated cycles at several offsets from the critical value.

    ``rows`` holds one dict per offset: ``offset``, ``predicted`` and
    ``measured`` amplitudes, their ``relative_error`` (largest over the states),
    ``predicted_period`` (``2 pi/omega`` corrected by the frequency slope),
    ``measured_period``, ``period_error``.  ``agrees`` says whether every
    relative error is below ``tolerance``; ``converging`` whether the amplitude
    errors shrink with the offset.
    """

    parameter: str
    critical_value: float
    rows: tuple
    tolerance: float
    agrees: bool
    converging: bool
    status: str

    def __str__(self) -> str:
        lines = [f"Simulation check of the delay Hopf prediction in {self.parameter!r} "
                 f"(critical value {self.critical_value:.10g}): {self.status}"]
        for row in self.rows:
            lines.append(f"  offset {row['offset']:+.4g}: amplitude error "
                         f"{row['relative_error']:.3%}, period {row['measured_period']:.6g} "
                         f"(predicted {row['predicted_period']:.6g})")
        return "\n".join(lines)


class _Rhs:
    """f(x(t), x(t - tau_k)) as plain floats for one parameter value."""

    def __init__(self, result, values: Mapping, mu_value: float) -> None:
        model = result.model
        sub = {model.symbols[k]: sympy.Float(v, 30) for k, v in values.items()}
        sub[result.parameter_symbol] = sympy.Float(mu_value, 30)
        self.states = list(model.state_symbols)
        terms = sorted(delayed_terms(list(model.equations)), key=sympy.default_sort_key)
        self.lags = []
        names = []
        replace = {}
        for k, term in enumerate(terms):
            symbol = sympy.Symbol(f"_lag{k}", real=True)
            replace[term] = symbol
            names.append(symbol)
            delay = float(term.delay.xreplace(sub))
            self.lags.append((self.states.index(term.state), delay))
        eqs = [e.xreplace(replace).xreplace(sub) for e in model.equations]
        leftover = set().union(*(e.free_symbols for e in eqs)) - set(self.states) - set(names)
        if leftover:
            raise ParameterError("give values for " + ", ".join(sorted(map(str, leftover)))
                                 + " to simulate")
        self.f = sympy.lambdify(self.states + names, eqs, modules="math")
        self.max_delay = max(d for _, d in self.lags)
        self.min_delay = min(d for _, d in self.lags)

    def __call__(self, x, lagged):
        return self.f(*x, *lagged)


class _History:
    """Stored values and derivatives on a uniform grid; Hermite interpolation."""

    def __init__(self, t0: float, h: float) -> None:
        self.t0, self.h = t0, h
        self.x: list = []
        self.dx: list = []

    def append(self, x, dx) -> None:
        self.x.append(x)
        self.dx.append(dx)

    def at(self, t: float, i: int):
        s = (t - self.t0) / self.h
        k = min(max(int(math.floor(s)), 0), len(self.x) - 2)
        u = s - k
        if abs(u) < 1e-12:
            return self.x[k][i]
        if abs(u - 1) < 1e-12:
            return self.x[k + 1][i]
        h = self.h
        u2, u3 = u * u, u * u * u
        h00, h10 = 2 * u3 - 3 * u2 + 1, u3 - 2 * u2 + u
        h01, h11 = -2 * u3 + 3 * u2, u3 - u2
        return (h00 * self.x[k][i] + h10 * h * self.dx[k][i] + h01 * self.x[k + 1][i]
                + h11 * h * self.dx[k + 1][i])


def simulate_delay(result: ResultLike, values: Mapping, mu_value: float, *, history: Any,
                   span: float, measure: float, steps_per_period: int = 256) -> DelaySimulation:
    """Integrate the retarded equation at ``mu_value`` from the initial function
    ``history(theta) -> (x, dx)`` for ``span`` time units; measure over the last
    ``measure`` time units."""
    rhs = _Rhs(result, values, mu_value)
    omega = float(sympy.N(result.omega.xreplace(
        {result.model.symbols[k]: v for k, v in values.items()})))
    target = 2 * math.pi / omega / steps_per_period
    n_min = max(1, math.ceil(rhs.min_delay / target))
    h = rhs.min_delay / n_min
    back = math.ceil(rhs.max_delay / h) + 1
    hist = _History(-back * h, h)
    for k in range(back + 1):
        x, dx = history(-back * h + k * h)
        hist.append(list(x), list(dx))
    n = len(rhs.states)
    t = 0.0
    x = list(hist.x[-1])
    steps = int(math.ceil(span / h))
    start = steps - int(math.ceil(measure / h))
    samples = []

    def stage(time, y):
        lagged = [hist.at(time - d, i) for i, d in rhs.lags]
        return rhs(y, lagged)

    hist.dx[-1] = list(stage(t, x))
    for step in range(steps):
        k1 = hist.dx[-1]
        k2 = stage(t + h / 2, [x[i] + h / 2 * k1[i] for i in range(n)])
        k3 = stage(t + h / 2, [x[i] + h / 2 * k2[i] for i in range(n)])
        k4 = stage(t + h, [x[i] + h * k3[i] for i in range(n)])
        x = [x[i] + h / 6 * (k1[i] + 2 * k2[i] + 2 * k3[i] + k4[i]) for i in range(n)]
        if not all(math.isfinite(v) for v in x):
            raise ValidationRunError(f"the simulation at {result.parameter} = {mu_value:.6g} "
                                     "diverged")
        t += h
        hist.append(x, [0.0] * n)
        hist.dx[-1] = list(stage(t, x))
        if step >= start:
            samples.append((t, list(x)))
    return _measure(result, samples, h, span, mu_value)


def _measure(result, samples, h, span, mu_value) -> DelaySimulation:
    states = result.model.states
    amplitudes = {}
    for i, s in enumerate(states):
        values = [x[i] for _, x in samples]
        amplitudes[s] = (max(values) - min(values)) / 2
    i = max(range(len(states)), key=lambda j: amplitudes[states[j]])
    values = [x[i] for _, x in samples]
    mean = (max(values) + min(values)) / 2
    ups = []
    for (t0, a), (t1, b) in zip(samples, samples[1:]):
        if a[i] < mean <= b[i]:
            ups.append(t0 + (mean - a[i]) / (b[i] - a[i]) * (t1 - t0))
    if len(ups) < 3:
        raise ValidationRunError("the simulation shows no sustained oscillation to measure")
    period = (ups[-1] - ups[0]) / (len(ups) - 1)
    return DelaySimulation(mu_value, amplitudes, period, h, span)


def validate_delay(result: ResultLike, values: Mapping | None = None, *,
                   offsets: Sequence[float] | None = None, tolerance: float = 0.1,
                   periods: int = 40, settle: float = 8.0,
                   steps_per_period: int = 200) -> DelayValidation:
    """Simulate near onset at three offsets and compare amplitudes and periods.

    ``offsets`` are absolute offsets of the bifurcation parameter from the
    critical value, on the side where the cycle exists (default: 2%, 1% and
    0.5% of the critical value).  Each run lasts ``periods`` periods plus
    ``settle`` decay times ``1/(2 beta)`` of the transient (``beta = Re
    lambda``), and measures over the last six periods.  Only a supercritical
    (stable) cycle can be measured this way.
    """
    values = dict(values or {})
    numeric = result.evaluate(values, digits=20)
    if result.classification != "supercritical":
        raise ValidationRunError(f"the cycle is {result.classification}; only a stable "
                                 "(supercritical) cycle can be confirmed by simulation here")
    mu_c = float(numeric.critical_value)
    side = {"above": 1, "below": -1}.get(result.cycle.side)
    if side is None:
        raise ValidationRunError("the side of the cycle is undecided at this point")
    if offsets is None:
        offsets = [side * abs(mu_c) * f for f in (0.02, 0.01, 0.005)]
    omega = float(numeric.omega)
    slope = float(sympy.N(result.cycle.frequency_slope.xreplace(
        {result.model.symbols[k]: v for k, v in values.items()})))
    q = [complex(sympy.N(v.xreplace({result.model.symbols[k]: val for k, val in values.items()})))
         for v in result.eigenvector_q]
    qn = math.sqrt(sum(abs(v) ** 2 for v in q))
    x0 = [float(sympy.N(result.equilibrium[s].xreplace(
        {result.model.symbols[k]: v for k, v in values.items()}))) for s in result.model.states]
    rows: list[dict[str, Any]] = []
    for offset in offsets:
        mu = mu_c + offset
        predicted = {s: float(v) for s, v in numeric.amplitude(offset).items()}
        if any(math.isnan(v) for v in predicted.values()):
            raise ValidationRunError(f"offset {offset} is on the side without a cycle")
        rho = max(predicted.values()) / (2 * max(abs(v) for v in q) / qn)
        history = _cycle_history(x0, q, qn, rho, omega)
        period0 = 2 * math.pi / (omega + slope * offset)
        beta = abs(float(numeric.transversality) * offset)
        span = periods * period0 + settle / (2 * beta)
        run = simulate_delay(result, values, mu, history=history, span=span,
                             measure=6 * period0, steps_per_period=steps_per_period)
        errors = [abs(run.amplitudes[s] - predicted[s]) / predicted[s] for s in predicted
                  if predicted[s] > 1e-12]
        rows.append({"offset": offset, "parameter_value": mu, "predicted": predicted,
                     "measured": dict(run.amplitudes), "relative_error": max(errors),
                     "predicted_period": period0, "measured_period": run.period,
                     "period_error": abs(run.period - period0) / period0, "step": run.step})
    agrees = all(r["relative_error"] < tolerance and r["period_error"] < tolerance
                 for r in rows)
    errs = [r["relative_error"] for r in sorted(rows, key=lambda r: -abs(r["offset"]))]
    converging = all(b <= a * 1.05 + 1e-4 for a, b in zip(errs, errs[1:]))
    status = ("confirmed" if agrees and converging else
              "agrees, errors not shrinking" if agrees else "contradicted")
    return DelayValidation(result.parameter, mu_c, tuple(rows), tolerance, agrees,
                           converging, status)


def _cycle_history(x0, q, qn, rho, omega):
    """The predicted cycle x0 + 2 rho Re(q/|q| exp(i omega theta)) and its derivative."""
    unit = [v / qn for v in q]

    def history(theta):
        e = cmath.exp(1j * omega * theta)
        x = [x0[i] + 2 * rho * (unit[i] * e).real for i in range(len(x0))]
        dx = [2 * rho * (unit[i] * 1j * omega * e).real for i in range(len(x0))]
        return x, dx
    return history
