"""Pictures of a Hopf result: the parameter plane and the amplitude law.

Pipeline place: result -> plane data / validation -> **plots** (matplotlib).

:func:`plot_parameter_plane` draws the Hopf curve of a result in the plane of
two parameters (see :mod:`criticality.checks.plane` for how the curve is defined when
neither axis is the bifurcation parameter): supercritical and subcritical
pieces in different line styles, named in a legend, the points where l1
vanishes marked, and the region where the equilibrium is stable shaded.
:func:`plot_amplitude` draws the predicted amplitude ``sqrt(k_j (mu - mu_c))``
against the bifurcation parameter, with the amplitudes measured by
:func:`criticality.validate` as points.  :func:`save_figure` writes PNG, SVG or
PDF atomically.

matplotlib is the ``plot`` extra, imported inside the functions.  The plots
take an optional ``ax``, return what they drew, and never call ``show()``;
without ``ax`` they draw on a new :class:`matplotlib.figure.Figure` (no pyplot
state is touched).
"""

from __future__ import annotations

import io
import math
import os
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any, Mapping, Sequence

from ..files import write_bytes_atomic
from ..errors import MissingExtraError, ParameterError
from ..kinds import Classification
from ..checks.plane import (CurveData, StabilityGrid, curve_data, feasibility_grid,
                            stability_grid, write_curve_csv)
from .latex_expr import latex_name

if TYPE_CHECKING:
    from ..model.core import Model
    from ..checks.validation_report import ValidationReport
    from ..hopf_analysis.results import HopfResult

__all__ = ["PlaneDiagram", "AmplitudePlot", "plot_parameter_plane", "plot_amplitude",
           "save_figure", "figure_bytes", "write_curve_csv", "curve_data", "axis_label"]

_STYLE = {"supercritical": dict(color="tab:blue", linestyle="-", linewidth=2.0),
          "subcritical": dict(color="tab:red", linestyle="--", linewidth=2.0)}
_LABEL = {"supercritical": "supercritical (l1 < 0)", "subcritical": "subcritical (l1 > 0)"}
_FORMATS = ("png", "svg", "pdf")


def _matplotlib():
    try:
        import matplotlib  # noqa: F401
        from matplotlib.figure import Figure
    except ImportError as exc:
        raise MissingExtraError("plots need matplotlib; install it with: "
                                "pip install 'criticality[plot]'") from exc
    return Figure


def _axes(ax, figsize, dpi):
    if ax is not None:
        return ax.figure, ax
    Figure = _matplotlib()
    fig = Figure(figsize=figsize, dpi=dpi)
    return fig, fig.add_subplot()


@dataclass(frozen=True)
class PlaneDiagram:
    """What :func:`plot_parameter_plane` drew.

    Attributes
    ----------
    figure, ax : matplotlib objects
    curve : CurveData
        The curve's points (also for :func:`write_curve_csv`).
    stability : StabilityGrid or None
        The shaded region, if shading was asked for.
    artists : mapping of str to list
        Legend label -> the matplotlib artists drawn under it.
    """

    figure: object
    ax: object
    curve: CurveData
    stability: StabilityGrid | None
    artists: Mapping[str, list]


def _runs(curve: CurveData):
    """Maximal runs of points with the same segment, sign of l1 and stability of the rest."""
    n = len(curve.x)
    i = 0
    while i < n:
        if curve.segment[i] < 0 or not math.isfinite(curve.l1[i]) or curve.l1[i] == 0:
            i += 1
            continue
        kind = Classification.SUPERCRITICAL if curve.l1[i] < 0 else Classification.SUBCRITICAL
        key = (curve.segment[i], kind, bool(curve.others_stable[i]))
        j = i + 1
        while j < n and curve.segment[j] == key[0] and (
                Classification.SUPERCRITICAL if curve.l1[j] < 0 else Classification.SUBCRITICAL
        ) == kind and bool(
                curve.others_stable[j]) == key[2]:
            j += 1
        stop = j + 1 if j < n and curve.segment[j] == key[0] else j  # join to the next run
        yield kind, key[2], slice(i, stop)
        i = j


def _draw_curve(ax, curve, artists) -> None:
    for kind, others, part in _runs(curve):
        label = _LABEL[kind] + ("" if others else ", other eigenvalues unstable")
        style = dict(_STYLE[kind], alpha=1.0 if others else 0.4)
        (line,) = ax.plot(curve.x[part], curve.y[part], **style)
        artists.setdefault(label, []).append(line)
    if curve.zeros:
        xs, ys = zip(*curve.zeros)
        (pts,) = ax.plot(xs, ys, linestyle="none", marker="o", markersize=7,
                         markerfacecolor="white", markeredgecolor="black", zorder=5)
        artists["l1 = 0 (degenerate Hopf point)"] = [pts]


def _math(name: str) -> str:
    """A model name as matplotlib mathtext."""
    return "$" + latex_name(name) + "$"


def axis_label(model: Model, name: str) -> str:
    """An axis label from the model: the description, the name in math and
    the unit (``"sinking loss rate $v$ [1/day]"``); the bare name when the
    model gives neither."""
    description = unit = None
    if name in getattr(model, "states", ()):
        unit = (getattr(model, "state_units", None) or {}).get(name)
    else:
        for p in model.parameters:
            if p.name == name:
                description, unit = p.description, getattr(p, "unit", None)
    if not description and not unit:
        return name
    text = f"{description} {_math(name)}" if description else _math(name)
    return text + (f" [{unit}]" if unit else "")


def _draw_infeasible(ax, feasible, artists) -> None:
    from matplotlib.patches import Patch

    X, Y, ok = feasible
    if ok.all():
        return
    region = ax.contourf(X, Y, (~ok).astype(float), levels=[0.5, 1.5], colors=["0.55"],
                         alpha=0.30, hatches=["//"])
    proxy = Patch(facecolor="0.55", alpha=0.30, hatch="//")
    artists["equilibrium not feasible"] = [region, proxy]


def _draw_stability(ax, grid, artists, feasible=None) -> None:
    from matplotlib.patches import Patch

    stable = grid.stable if feasible is None else grid.stable & feasible[2]
    filled = stable.astype(float)
    if filled.max() <= 0:
        return
    region = ax.contourf(grid.x, grid.y, filled, levels=[0.5, 1.5], colors=["tab:green"],
                         alpha=0.18)
    proxy = Patch(facecolor="tab:green", alpha=0.18)
    artists["equilibrium stable"] = [region, proxy]


def plot_parameter_plane(result: HopfResult, x: str, y: str, *, values: Mapping | None = None,
                         x_range: Sequence[float] = (0.0, 1.0),
                         y_range: Sequence[float] = (0.0, 1.0), ax: Any = None,
                         points: int = 400,
                         shade: bool = True, stability: str = "closed form",
                         shade_points: int = 200, figsize: tuple[float, float] = (6.4, 4.8),
                         dpi: int = 100, title: str | None = None, legend: bool = True,
                         feasible: Any = None) -> PlaneDiagram:
    """Draw the Hopf curve of ``result`` in the ``(x, y)`` parameter plane.

    Parameters
    ----------
    result : HopfResult
    x, y : str
        Parameters on the axes.  When one is the bifurcation parameter the
        curve is the graph of the critical value; otherwise the bifurcation
        parameter keeps its value from ``values`` and the curve is where that
        value is critical.
    values : mapping, optional
        Values of the other parameters.
    x_range, y_range : (float, float)
        The window of the plane.
    ax : matplotlib Axes, optional
        Draw here; default a new Figure of ``figsize`` inches at ``dpi``.
    points : int
        Samples of the curve.
    shade : bool
        Shade the region where the equilibrium is stable.
    stability : {"closed form", "eigenvalues"}
        How that region is decided (see :func:`criticality.checks.plane.stability_grid`).
    shade_points : int
        Grid points per side for the shading.
    title : str, optional
    legend : bool
    feasible : str or mapping, optional
        The sign each state's equilibrium coordinate must keep (``"nonnegative"``
        for every state, or ``{"P": "positive", ...}``); where the
        equilibrium breaks it the plane is hatched grey ("not feasible") and
        never shaded as stable.  Default: the signs declared for the family
        parameters ``<state>_eq``, if any.

    Returns
    -------
    PlaneDiagram
        The axes are labelled from the model's descriptions and units.
    """
    _matplotlib()
    curve = curve_data(result, x, y, values=values, x_range=x_range, y_range=y_range,
                       points=points)
    fig, ax = _axes(ax, figsize, dpi)
    artists: dict = {}
    grid = None
    region = None
    if shade:
        region = feasibility_grid(result, x, y, feasible=feasible, values=values,
                                  x_range=x_range, y_range=y_range, points=shade_points)
        grid = stability_grid(result, x, y, values=values, x_range=x_range, y_range=y_range,
                              points=shade_points, method=stability)
        _draw_stability(ax, grid, artists, region)
        if region is not None:
            _draw_infeasible(ax, region, artists)
    _draw_curve(ax, curve, artists)
    ax.set_xlim(*x_range)
    ax.set_ylim(*y_range)
    ax.set_xlabel(axis_label(result.model, x))
    ax.set_ylabel(axis_label(result.model, y))
    ax.set_title(title if title is not None else _plane_title(result, curve))
    if legend and artists:
        ax.legend([v[-1] for v in artists.values()], list(artists), loc="best", fontsize="small")
    return PlaneDiagram(fig, ax, curve, grid, artists)


def _plane_title(result, curve) -> str:
    mu = result.parameter
    fixed = ", ".join(f"${latex_name(k)} = {_short(v)}$" for k, v in sorted(curve.fixed.items())
                      if k != mu)
    if curve.mode == "level set":
        head = f"Hopf curve: where ${latex_name(mu)} = {_short(curve.fixed[mu])}$ is critical"
    else:
        head = f"Hopf curve: critical value ${latex_name(mu)}_{{\\mathrm{{c}}}}$"
    return head + (f" ({fixed})" if fixed else "")


def _short(v) -> str:
    try:
        return f"{float(v):.4g}"
    except (TypeError, ValueError):
        return str(v)


@dataclass(frozen=True)
class AmplitudePlot:
    """What :func:`plot_amplitude` drew.

    ``mu`` and ``predicted`` (state -> array) are the plotted prediction;
    ``artists`` maps legend labels to the matplotlib artists.
    """

    figure: object
    ax: object
    mu: object
    predicted: Mapping[str, object]
    artists: Mapping[str, list]


def _amplitude_range(num, slope, simulated, offset_range):
    from ..checks.validation import natural_scale

    if offset_range is not None:
        lo, hi = (float(v) for v in offset_range)
        if not 0 <= lo < hi:
            raise ParameterError(f"offset_range must be (low, high) with 0 <= low < high, "
                                 f"got {offset_range!r}")
        return lo, hi
    offs = [abs(m.offset) for m in getattr(simulated, "measurements", ())]
    offs += [abs(b.offset) for b in getattr(simulated, "brackets", ())]
    if offs:
        return 0.0, 1.25 * max(offs)
    others = [abs(float(e.real)) for e in num.eigenvalues
              if abs(abs(float(e.imag)) - float(num.omega)) > 1e-8 * (1 + float(num.omega))
              or abs(float(e.real)) > 1e-8]
    scale = natural_scale(float(num.omega), min(others, default=math.inf),
                          float(num.transversality), float(slope))
    return 0.0, 1.25e-2 * scale


def _frequency_slope(result, num) -> float:
    import sympy

    expr = result.cycle.frequency_slope
    repl = {s: num.values[s.name] for s in expr.free_symbols if s.name in num.values}
    value = sympy.N(expr.xreplace(repl))
    return float(sympy.re(value)) if value.is_number else 0.0


def plot_amplitude(result: HopfResult, values: Mapping | None = None, *,
                   states: Sequence[str] | None = None, simulated: ValidationReport | None = None,
                   offset_range: Sequence[float] | None = None, ax: Any = None,
                   points: int = 200, figsize: tuple[float, float] = (6.4, 4.8),
                   dpi: int = 100, title: str | None = None, **kwargs: Any) -> AmplitudePlot:
    """Amplitude of each state against the bifurcation parameter.

    The predicted cycle ``sqrt(k_j (mu - mu_c))`` is drawn on the side where
    it exists (solid when it is stable, dashed when not); the amplitudes a
    :class:`~criticality.checks.validation_report.ValidationReport` measured are drawn
    as points, and its bracketing starts (inside: fell back; outside: left) as
    triangles.

    Parameters
    ----------
    result : HopfResult
    values : mapping, optional
        Parameter values (also as keywords).
    states : sequence of str, optional
        Which states (default: those with a non-zero predicted amplitude).
    simulated : ValidationReport, optional
        From :func:`criticality.validate` at the same parameter point.
    offset_range : (float, float), optional
        Range of ``|mu - mu_c|``; default covers the simulated offsets.
    ax, figsize, dpi, title : as in :func:`plot_parameter_plane`
    """
    import numpy as np

    _matplotlib()
    num = result.evaluate({**dict(values or {}), **kwargs}, digits=20)
    k = {s: float(v) for s, v in num.amplitude_coefficients.items()}
    chosen = list(states) if states else [s for s, v in k.items() if v != 0]
    unknown = [s for s in chosen if s not in k]
    if unknown:
        raise ParameterError(f"not states of the model: {', '.join(unknown)}")
    side = 1.0 if sum(k.values()) > 0 else -1.0
    mu_c = float(num.critical_value)
    slope = _frequency_slope(result, num)
    lo, hi = _amplitude_range(num, slope, simulated, offset_range)
    offs = np.linspace(lo, hi, points)
    mu = mu_c + side * offs
    fig, ax = _axes(ax, figsize, dpi)
    stable = float(num.l1) < 0
    artists: dict = {}
    predicted = {}
    for i, s in enumerate(chosen):
        amp = np.sqrt(np.maximum(k[s] * side * offs, 0.0))
        predicted[s] = amp
        (line,) = ax.plot(mu, amp, color=f"C{i}", linestyle="-" if stable else "--")
        artists[f"{s}: predicted {'stable' if stable else 'unstable'} cycle"] = [line]
    if simulated is not None:
        _draw_simulated(ax, simulated, chosen, artists)
    ax.axvline(mu_c, color="0.5", linewidth=0.8)
    ax.set_xlabel(axis_label(result.model, result.parameter))
    units = {(getattr(result.model, "state_units", None) or {}).get(s) for s in chosen}
    ax.set_ylabel("amplitude (half peak-to-peak)" +
                  (f" [{units.pop()}]" if len(units) == 1 and None not in units else ""))
    mu_tex = latex_name(result.parameter)
    ax.set_title(title if title is not None else
                 f"Cycle amplitude near ${mu_tex}_{{\\mathrm{{c}}}} = {mu_c:.6g}$")
    ax.legend([v[-1] for v in artists.values()], list(artists), loc="best", fontsize="small")
    return AmplitudePlot(fig, ax, mu, predicted, artists)


def _draw_simulated(ax, report, chosen, artists) -> None:
    for i, s in enumerate(chosen):
        pts = [(m.mu, m.measured_amplitudes[s]) for m in report.measurements
               if m.measured and s in m.measured_amplitudes]
        if pts:
            xs, ys = zip(*pts)
            (p,) = ax.plot(xs, ys, linestyle="none", marker="o", color=f"C{i}")
            artists[f"{s}: simulated"] = [p]
    marks = {"decayed": ("v", "tab:green"), "escaped": ("^", "tab:red"),
             "undecided": ("s", "0.5")}
    for b in report.brackets:
        s = chosen[0]
        base = b.predicted_amplitudes.get(s, 0.0)
        for factor, outcome in ((b.inside_factor, b.inside), (b.outside_factor, b.outside)):
            marker, color = marks[outcome]
            (p,) = ax.plot([b.mu], [factor * base], linestyle="none", marker=marker, color=color)
            artists.setdefault(f"{s}: start at {factor:g} x predicted, {outcome}", []).append(p)


def _figure_of(thing):
    """The matplotlib Figure of a plot object of this library (a
    :class:`PlaneDiagram`, an :class:`AmplitudePlot`, ...), of an Axes, or a
    Figure itself."""
    if hasattr(thing, "savefig"):
        return thing
    for attribute in ("figure", "fig"):
        inner = getattr(thing, attribute, None)
        if inner is not None and hasattr(inner, "savefig"):
            return inner
    raise ParameterError(f"save_figure needs a figure or a plot of this library (it has a "
                         f"'figure'); got {type(thing).__name__}")


def save_figure(figure: Any, path: str | os.PathLike[str], *, force: bool = False,
                dpi: int | None = None) -> str:
    """Write ``figure`` to ``path`` (PNG, SVG or PDF, from the suffix) atomically.

    ``figure`` is a matplotlib Figure or Axes, or any plot object this
    library returns (:class:`PlaneDiagram`, :class:`AmplitudePlot`).

    The image has exactly the figure's size (``figsize * dpi`` pixels for
    PNG).  Raises :class:`~criticality.errors.OutputExistsError` if the file
    exists and ``force`` is False.
    """
    return write_bytes_atomic(path, figure_bytes(figure, path, dpi=dpi), force=force)


def figure_bytes(figure: Any, path: str | os.PathLike[str], *, dpi: int | None = None) -> bytes:
    """The image :func:`save_figure` would write to ``path`` (format from the
    suffix), as bytes; for writing several files at once
    (:func:`criticality.files.write_all`)."""
    figure = _figure_of(figure)
    path = os.fspath(path)
    fmt = os.path.splitext(path)[1].lstrip(".").lower()
    if fmt not in _FORMATS:
        raise ParameterError(f"cannot tell the image format of {path!r}: use a name ending in "
                             f"{', '.join('.' + f for f in _FORMATS)}")
    buffer = io.BytesIO()
    figure.savefig(buffer, format=fmt, dpi=dpi if dpi is not None else figure.dpi)
    return buffer.getvalue()
