"""Validation of map bifurcations by iterating the map near onset.

Pipeline place: flip / Neimark-Sacker result -> **iteration of the original
map** -> :class:`MapValidation`.

The map is evaluated in floating point (``math``) from the model's own sympy
equations with every parameter given a value; the bifurcation parameter is
set to ``mu_c + offset`` on the side where the result predicts a 2-cycle or an
invariant curve.  For a supercritical result the orbit from a point near the
fixed point settles on the predicted object and its half-width (2-cycle) or
half range per component (invariant curve) is compared with the prediction
``sqrt(k_j (mu - mu_c))``; the two agree to relative order
``sqrt(|mu - mu_c|)``.  For a subcritical result the prediction is an unstable
object on the stable side: an orbit started at half the predicted size must
return to the fixed point and one started at twice the size must leave.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Callable, Mapping

import math
from dataclasses import dataclass

import sympy

from ..errors import ParameterError, ValidationRunError
from ..model.parameter import critical_symbol

if TYPE_CHECKING:
    from ..bifurcations.maps import FlipResult, NeimarkSackerResult
    from ..model.core import Model

__all__ = ["MapValidation", "validate_map", "iterate"]


@dataclass(frozen=True)
class MapValidation:
    """The outcome of :func:`validate_map`."""

    analysis: str
    parameter: str
    value: float
    offset: float
    predicted: dict
    measured: dict
    agrees: bool
    tolerance: float
    notes: tuple = ()

    def summary(self) -> str:
        lines = [f"Iteration check of the {self.analysis} prediction at {self.parameter} = "
                 f"{self.value:.12g} (offset {self.offset:+.3g})"]
        for k in self.predicted:
            m = self.measured.get(k)
            shown = "-" if m is None else f"{m:.6g}"
            lines.append(f"  {k}: predicted {self.predicted[k]:.6g}, measured {shown}")
        lines.append(f"  agreement within {self.tolerance:.0%}: {'yes' if self.agrees else 'no'}")
        lines += [f"  note: {n}" for n in self.notes]
        return "\n".join(lines)

    __str__ = summary


def _number(expr, values, what) -> float:
    e = expr.xreplace(values)
    if e.free_symbols:
        names = ", ".join(sorted(map(str, e.free_symbols)))
        raise ParameterError(f"{what} depends on {names}; give values=... for them")
    v = complex(sympy.N(e, 30))
    if abs(v.imag) > 1e-12 * max(1.0, abs(v.real)):
        raise ValidationRunError(f"{what} is not real at these values ({v})")
    return v.real


def iterate(step: Callable, x: Any, count: int) -> Any:
    """Apply ``step`` (a function of a tuple) ``count`` times; None if the
    orbit leaves every bounded region (overflow or non-finite values)."""
    for _ in range(count):
        try:
            x = step(x)
        except (OverflowError, ZeroDivisionError, ValueError):
            return None
        if not all(math.isfinite(v) and abs(v) < 1e12 for v in x):
            return None
    return x


def _setup(result, model, values, offset):
    if result.unknown != result.parameter:
        raise ValidationRunError(
            "iteration checks need the critical value in the model's parameter "
            f"'{result.parameter}' (this result solved for '{result.unknown}'); rerun the "
            "analysis without eliminate=/solve_for=")
    symbols = model.symbols
    given = dict(model.value_substitution(values or {}))
    for p in model.parameters:
        if p.default is not None and p.symbol not in given:
            given[p.symbol] = p.default
    mu = symbols[result.parameter]
    given.pop(mu, None)
    mu_c = _number(result.critical_values[result.parameter], given, "the critical value")
    k = {s: _number(v.xreplace({mu: mu_c + 1}).xreplace(
        {critical_symbol(mu): mu_c}), given,
        f"the amplitude coefficient of {s}") for s, v in result.amplitude_squared.items()}
    side = 1.0 if sum(k.values()) > 0 else -1.0
    mu_v = mu_c + side * abs(offset)
    fixed = {mu: sympy.nsimplify(mu_v)}
    eqs = [e.xreplace(given).xreplace(fixed) for e in model.equations]
    free = set().union(*(e.free_symbols for e in eqs)) - set(model.state_symbols)
    if free:
        raise ParameterError(f"the map depends on {', '.join(sorted(map(str, free)))}; give "
                             "values=... for them")
    func = sympy.lambdify(model.state_symbols, eqs, modules="math")
    x0 = tuple(_number(v.xreplace({mu: fixed[mu]}), given, "the fixed point")
               for v in result.fixed_point.values())
    predicted = {s: math.sqrt(abs(kv * (mu_v - mu_c))) for s, kv in k.items()}
    return (lambda x: tuple(func(*x))), x0, mu_v, mu_c, predicted


def _measure(step, x, analysis, window):
    """Half-widths per component over ``window`` iterates of a settled orbit."""
    pts = []
    for _ in range(window):
        x = step(x)
        pts.append(x)
    n = len(pts[0])
    if analysis == "flip":
        return [abs(pts[-1][j] - pts[-2][j]) / 2 for j in range(n)]
    return [(max(p[j] for p in pts) - min(p[j] for p in pts)) / 2 for j in range(n)]


def validate_map(result: FlipResult | NeimarkSackerResult, model: Model,
                 values: Mapping[str, object] | None = None, *, offset: float = 1e-3,
                 steps: int | None = None,
                 tolerance: float = 0.1) -> MapValidation:
    """Iterate the original map near onset and compare with ``result``.

    Parameters
    ----------
    result : FlipResult or NeimarkSackerResult
    model : Model
        The map the result was computed from.
    values : mapping, optional
        Values of the other parameters.
    offset : float
        ``|mu - mu_c|``; the side is the one where the result predicts the
        2-cycle or the invariant curve.
    steps : int, optional
        Iterations before measuring (default from the predicted rate).
    tolerance : float
        Accepted relative difference (leading-order prediction: O(sqrt(offset))).
    """
    analysis = "flip" if hasattr(result, "coefficient") else "Neimark-Sacker"
    if not result.amplitude_squared:
        raise ValidationRunError(f"the {analysis} result predicts no amplitude (status "
                                 f"'{result.status}'); nothing to compare")
    step, x0, mu_v, mu_c, predicted = _setup(result, model, values, offset)
    names = list(predicted)
    steps = steps or int(min(2_000_000, 40 / abs(offset)))
    sub = result.verdict.startswith("subcritical")
    notes = []
    if sub:
        return _bracket(result, step, x0, mu_v, predicted, steps, analysis, mu_v - mu_c,
                        tolerance)
    start = tuple(v + 0.5 * predicted[s] + 1e-9 for v, s in zip(x0, names))
    end = iterate(step, start, steps)
    if end is None:
        raise ValidationRunError(f"the orbit left every bounded region at "
                                 f"{result.parameter} = {mu_v}")
    window = 2 if analysis == "flip" else 2000
    measured = dict(zip(names, _measure(step, end, analysis, window)))
    agrees = all(abs(measured[s] - predicted[s]) <= tolerance * predicted[s] for s in names)
    notes.append(f"{steps} iterations from the fixed point shifted by half the prediction")
    return MapValidation(analysis, result.parameter, mu_v, mu_v - mu_c, predicted, measured, agrees,
                         tolerance, tuple(notes))


def _bracket(result, step, x0, mu_v, predicted, steps, analysis, offset, tolerance):
    names = list(predicted)
    inside = tuple(v + 0.5 * predicted[s] for v, s in zip(x0, names))
    outside = tuple(v + 2.0 * predicted[s] for v, s in zip(x0, names))
    a, b = iterate(step, inside, steps), iterate(step, outside, steps)
    dist = lambda x: None if x is None else max(abs(u - v) for u, v in zip(x, x0))  # noqa: E731
    scale = max(predicted.values())
    back = a is not None and dist(a) < 0.1 * scale
    away = b is None or dist(b) > 2.0 * scale
    measured = {"inside start ends at distance": dist(a), "outside start ends at distance":
                dist(b)}
    notes = ("subcritical: the unstable object lies on the stable side; the inner start must "
             "return to the fixed point and the outer start must leave",)
    return MapValidation(analysis, result.parameter, mu_v, offset,
                         {k: scale for k in measured}, measured, back and away, tolerance,
                         notes)
