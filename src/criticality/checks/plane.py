"""The Hopf curve in a plane of two parameters, as numbers (no drawing).

Pipeline place: result -> sweeps -> **plane data** -> plots, CSV.

Two cases, both from the closed forms of the result:

* one axis is the bifurcation parameter ``mu``: the curve is the graph of the
  critical value ``mu_c`` as a function of the parameter on the other axis;
* neither axis is ``mu``: ``mu`` keeps the value given in ``values`` and the
  curve is the level set ``mu_c(x, y) = mu`` (traced with contourpy on a
  grid): the parameter points at which this value of ``mu`` is critical.

Along the curve the sign of l1 says super- or subcritical; the points where
l1 changes sign (degenerate, Bautin points) are located by root finding on the
closed form (first case) or by interpolation along the traced curve (second
case).  The region where the equilibrium is stable is where the critical pair
is on the stable side, ``(mu - mu_c) * Re(dlambda/dmu) < 0``, the Hopf point
exists (omega^2 > 0) and the other eigenvalues are stable (every
``others_stable`` Hurwitz condition of the result holds): a local statement,
exact as long as this branch is the only place where eigenvalues cross.
:func:`stability_grid` can also decide stability from the numeric eigenvalues
of the Jacobian at every grid point (``method="eigenvalues"``).
"""

from __future__ import annotations

import math
import os
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any, Mapping, Sequence

import sympy

from ..files import write_text_atomic
from ..errors import ParameterError
from ..kinds import Classification
from .sweeps import _numpy, grid_function, sweep

if TYPE_CHECKING:
    from ..hopf_analysis.results import HopfResult

__all__ = ["CurveData", "StabilityGrid", "curve_data", "stability_grid", "curve_csv",
           "write_curve_csv", "feasibility_grid", "state_signs"]


@dataclass(frozen=True)
class CurveData:
    """Points of the Hopf curve in the plane of two parameters.

    Attributes
    ----------
    x_name, y_name : str
        The parameters on the axes.
    x, y : numpy.ndarray
        Coordinates of the points (NaN separates pieces of the curve).
    segment : numpy.ndarray of int
        Which connected piece each point belongs to (-1 for gaps).
    l1 : numpy.ndarray
        The first Lyapunov coefficient at each point.
    others_stable : numpy.ndarray of bool
        Whether the other eigenvalues are stable there (crossing the curve
        changes the stability of the equilibrium).
    zeros : tuple of (float, float)
        Points where l1 vanishes on the curve.
    mode : str
        ``"graph"`` (one axis is the bifurcation parameter) or ``"level set"``.
    fixed : mapping of str to sympy.Expr
        Values of the parameters not on the axes.
    """

    x_name: str
    y_name: str
    x: Any
    y: Any
    segment: Any
    l1: Any
    others_stable: Any
    zeros: tuple
    mode: str
    fixed: Mapping[str, object]

    @property
    def classification(self) -> Any:
        """``"supercritical"``/``"subcritical"``/``"degenerate"`` per point
        (``""`` in gaps)."""
        np = _numpy()
        out = np.full(self.l1.shape, "", dtype=object)
        ok = self.segment >= 0
        out[ok & (self.l1 < 0)] = Classification.SUPERCRITICAL
        out[ok & (self.l1 > 0)] = Classification.SUBCRITICAL
        out[ok & (self.l1 == 0)] = Classification.DEGENERATE
        return out


def _axis_check(result, x, y):
    if x == y:
        raise ParameterError(f"the two axes must be different parameters, got {x!r} twice")
    for name in (x, y):
        if name in result.model.states:
            raise ParameterError(f"{name!r} is a state of the model; the axes are parameters")


def _off_axes(values, x, y) -> dict:
    """The given values without those of the axis parameters (the axes vary them)."""
    return {k: v for k, v in dict(values or {}).items() if k not in (x, y)}


def _range(name, rng):
    try:
        lo, hi = (float(v) for v in rng)
    except (TypeError, ValueError) as exc:
        raise ParameterError(f"the range of {name!r} must be two numbers (low, high)") from exc
    if not (math.isfinite(lo) and math.isfinite(hi) and lo < hi):
        raise ParameterError(f"the range of {name!r} must satisfy low < high, got {rng!r}")
    return lo, hi


def curve_data(result: HopfResult, x: str, y: str, *, values: Mapping | None = None,
               x_range: Sequence[float] = (0.0, 1.0), y_range: Sequence[float] = (0.0, 1.0),
               points: int = 400) -> CurveData:
    """The Hopf curve of ``result`` in the ``(x, y)`` parameter plane.

    Parameters
    ----------
    result : HopfResult
    x, y : str
        Parameters on the horizontal and vertical axes.
    values : mapping, optional
        Values of the other parameters (and of the bifurcation parameter when
        neither axis is it); values of the axis parameters are ignored.
    x_range, y_range : (float, float)
    points : int
        Samples along the free axis (graph) or per side of the grid (level
        set).

    Returns
    -------
    CurveData
    """
    np = _numpy()
    _axis_check(result, x, y)
    xr, yr = _range(x, x_range), _range(y, y_range)
    values = _off_axes(values, x, y)
    if points < 10:
        raise ParameterError(f"points must be at least 10, got {points}")
    mu = result.parameter
    if mu in (x, y):
        free, free_range = (y, yr) if x == mu else (x, xr)
        t = np.linspace(free_range[0], free_range[1], int(points))
        data = _graph(np, result, free, t, values)
        if x == mu:
            data = dict(data, x=data["y"], y=data["x"],
                        zeros=tuple((b, a) for a, b in data["zeros"]))
        return CurveData(x_name=x, y_name=y, mode="graph", **data)
    return _level_set(np, result, x, y, xr, yr, int(points), values)


def _graph(np, result, free, t, values):
    mu_c = sweep(result, "critical_value", {free: t}, values=values, progress=False)
    l1 = sweep(result, "l1", {free: t}, values=values, progress=False).values
    ok = mu_c.admissible & np.isfinite(mu_c.values) & np.isfinite(l1)
    stab = _others_stable(np, result, {free: t}, values)
    seg = _segments(np, ok)
    ys = np.where(ok, mu_c.values, np.nan)
    fn = grid_function(result, result.l1, [free], values)[0]
    zeros = []
    for i in np.nonzero(ok[:-1] & ok[1:] & (np.sign(l1[:-1]) * np.sign(l1[1:]) < 0))[0]:
        root = _bisect(lambda s: float(np.real(fn(s))), t[i], t[i + 1])
        cfn = grid_function(result, result.critical_value, [free], values)[0]
        zeros.append((root, float(np.real(cfn(root)))))
    return dict(x=np.where(ok, t, np.nan), y=ys, segment=seg, l1=np.where(ok, l1, np.nan),
                others_stable=stab & ok, zeros=tuple(zeros), fixed=mu_c.fixed)


def _bisect(f, a, b, steps: int = 200):
    fa = f(a)
    for _ in range(steps):
        m = 0.5 * (a + b)
        fm = f(m)
        if fm == 0 or b - a < 1e-15 * max(1.0, abs(m)):
            return m
        if (fm < 0) == (fa < 0):
            a, fa = m, fm
        else:
            b = m
    return 0.5 * (a + b)


def _segments(np, ok):
    seg = np.full(ok.shape, -1, dtype=int)
    current, prev = -1, False
    for i, flag in enumerate(ok):
        if flag and not prev:
            current += 1
        if flag:
            seg[i] = current
        prev = flag
    return seg


def _others_stable(np, result, grid, values):
    out = None
    for c in result.conditions:
        if not c.key.startswith("others_stable"):
            continue
        s = sweep(result, c.expr, grid, values=values, progress=False).values
        flag = np.real(s) > 0
        out = flag if out is None else out & flag
    if out is None:
        shape = np.broadcast_arrays(*(np.asarray(v, dtype=float) for v in grid.values()))[0].shape
        out = np.ones(shape, dtype=bool)
    return out


def _level_set(np, result, x, y, xr, yr, n, values):
    import contourpy

    vals = dict(values or {})
    if result.parameter not in vals:
        raise ParameterError(f"neither axis is the bifurcation parameter {result.parameter!r}: "
                             f"give its value in values= (the curve is where it is critical)")
    mu0 = _number(result, result.parameter, vals[result.parameter])
    rest = {k: v for k, v in vals.items() if k != result.parameter}
    X, Y = np.meshgrid(np.linspace(*xr, n), np.linspace(*yr, n))
    grid = {x: X, y: Y}
    mu_c = sweep(result, "critical_value", grid, values=rest, progress="auto")
    z = np.ma.masked_invalid(np.where(mu_c.admissible, np.real(mu_c.values) - mu0, np.nan))
    lines = contourpy.contour_generator(X, Y, z).lines(0.0)
    fn = grid_function(result, result.critical_value, [x, y], rest)[0]
    lines = [_refine(np, lambda a, b: np.real(fn(a, b)) - mu0, line, X[0], Y[:, 0])
             for line in lines]
    xs, ys, seg = [], [], []
    for k, line in enumerate(lines):
        xs += [*line[:, 0], np.nan]
        ys += [*line[:, 1], np.nan]
        seg += [k] * len(line) + [-1]
    xs, ys, seg = np.array(xs, dtype=float), np.array(ys, dtype=float), np.array(seg, dtype=int)
    pts = {x: np.nan_to_num(xs), y: np.nan_to_num(ys)}
    l1 = np.where(seg >= 0, np.real(sweep(result, "l1", pts, values=rest,
                                          progress=False).values), np.nan)
    stab = _others_stable(np, result, pts, rest) & (seg >= 0)
    zeros = []
    for i in np.nonzero((seg[:-1] >= 0) & (seg[:-1] == seg[1:])
                        & (np.sign(l1[:-1]) * np.sign(l1[1:]) < 0))[0]:
        w = l1[i] / (l1[i] - l1[i + 1])
        zeros.append((float(xs[i] + w * (xs[i + 1] - xs[i])),
                      float(ys[i] + w * (ys[i + 1] - ys[i]))))
    return CurveData(x_name=x, y_name=y, x=xs, y=ys, segment=seg, l1=l1, others_stable=stab,
                     zeros=tuple(zeros), mode="level set", fixed={**mu_c.fixed,
                                                                 result.parameter: mu0})


def _refine(np, f, line, xs, ys, steps: int = 60):
    """Move contour vertices onto the level set ``f = 0`` by bisection along
    the grid edge each one lies on (contour vertices are linear interpolates)."""
    out = np.array(line, dtype=float)
    dx, dy = xs[1] - xs[0], ys[1] - ys[0]
    i = np.clip(np.floor((out[:, 0] - xs[0]) / dx).astype(int), 0, len(xs) - 2)
    j = np.clip(np.floor((out[:, 1] - ys[0]) / dy).astype(int), 0, len(ys) - 2)
    on_column = np.isclose(out[:, 0], xs[np.clip(np.rint((out[:, 0] - xs[0]) / dx).astype(int),
                                                 0, len(xs) - 1)], rtol=0, atol=1e-9 * abs(dx))
    lo = np.where(on_column[:, None], np.stack([out[:, 0], ys[j]], 1),
                  np.stack([xs[i], out[:, 1]], 1))
    hi = np.where(on_column[:, None], np.stack([out[:, 0], ys[j + 1]], 1),
                  np.stack([xs[i + 1], out[:, 1]], 1))
    with np.errstate(all="ignore"):
        flo, fhi = f(lo[:, 0], lo[:, 1]), f(hi[:, 0], hi[:, 1])
        good = np.isfinite(flo) & np.isfinite(fhi) & (np.sign(flo) * np.sign(fhi) <= 0)
        for _ in range(steps):
            mid = 0.5 * (lo + hi)
            fm = f(mid[:, 0], mid[:, 1])
            left = np.sign(fm) == np.sign(flo)
            lo = np.where(left[:, None], mid, lo)
            flo = np.where(left, fm, flo)
            hi = np.where(left[:, None], hi, mid)
    out[good] = 0.5 * (lo + hi)[good]
    return out


@dataclass(frozen=True)
class StabilityGrid:
    """Where the equilibrium is stable, on a grid of the plane.

    ``stable`` is True where the equilibrium is stable, False where it is
    not, and ``known`` False where the method cannot tell (no Hopf point on
    the vertical line for the closed form; no real equilibrium for the
    eigenvalues).
    """

    x: Any
    y: Any
    stable: Any
    known: Any
    method: str


def stability_grid(result: HopfResult, x: str, y: str, *, values: Mapping | None = None,
                   x_range: Sequence[float] = (0.0, 1.0), y_range: Sequence[float] = (0.0, 1.0),
                   points: int = 200, method: str = "closed form") -> StabilityGrid:
    """Stability of the equilibrium over the plane (see the module notes).

    ``method`` is ``"closed form"`` (sign of the transversality and the
    conditions of the result) or ``"eigenvalues"`` (numeric eigenvalues of
    the Jacobian of the original model at the equilibrium).
    """
    np = _numpy()
    _axis_check(result, x, y)
    xr, yr = _range(x, x_range), _range(y, y_range)
    X, Y = np.meshgrid(np.linspace(*xr, points), np.linspace(*yr, points))
    mu = result.parameter
    vals = _off_axes(values, x, y)
    if method == "eigenvalues":
        return _eigen_stability(np, result, x, y, X, Y, vals)
    if method != "closed form":
        raise ParameterError(f"unknown stability method {method!r}; expected 'closed form' or "
                             "'eigenvalues'")
    grid = {x: X, y: Y}
    if mu in grid:
        mu_vals = grid.pop(mu)
    elif mu in vals:
        mu_vals = _number(result, mu, vals.pop(mu))
    else:
        raise ParameterError(f"give the value of the bifurcation parameter {mu!r} in values=")
    mu_c = sweep(result, "critical_value", grid, values=vals)
    beta = sweep(result, "transversality", grid, values=vals, progress=False).values
    others = _others_stable(np, result, grid, vals)
    side = (mu_vals - np.real(mu_c.values)) * np.real(beta) < 0
    known = mu_c.admissible & np.isfinite(np.real(mu_c.values)) & np.isfinite(np.real(beta))
    known &= _equilibrium_exists(np, result, {**grid, mu: mu_vals}, vals)
    stable = side & others & known
    return StabilityGrid(X, Y, np.broadcast_to(stable, X.shape), np.broadcast_to(known, X.shape),
                         method)


def _equilibrium_exists(np, result, grid, vals):
    """Where every coordinate of the equilibrium is real and finite."""
    names = list(grid)
    arrays = np.broadcast_arrays(*(np.asarray(grid[n], dtype=float) for n in names))
    ok = np.ones(arrays[0].shape, dtype=bool)
    for expr in result.equilibrium.values():
        fn = grid_function(result, expr, names, vals)[0]
        with np.errstate(all="ignore"):
            v = np.asarray(fn(*arrays), dtype=complex)
        ok = ok & np.isfinite(v) & (np.abs(v.imag) <= 1e-12 * (1 + np.abs(v.real)))
    return ok


_SIGN_OK = {"positive": lambda v: v > 0, "nonnegative": lambda v: v >= 0,
            "negative": lambda v: v < 0, "nonpositive": lambda v: v <= 0}


def state_signs(result: HopfResult, feasible: Any = None) -> dict:
    """State -> the sign its equilibrium coordinate must have.

    ``feasible`` is a sign word for every state (``"nonnegative"``,
    ``"positive"``, ...), a mapping state -> sign word, or None: then the
    signs declared for the family parameters ``<state>_eq`` of the
    parametrised mode are used (empty when there are none).
    """
    states = result.model.states
    if feasible is None:
        return {s: result.assumptions[f"{s}_eq"] for s in states
                if result.assumptions.get(f"{s}_eq") in _SIGN_OK}
    table = {s: feasible for s in states} if isinstance(feasible, str) else dict(feasible)
    for state, sign in table.items():
        if state not in states:
            raise ParameterError(f"feasible: {state!r} is not a state of the model (states: "
                                 f"{', '.join(states)})")
        if sign not in _SIGN_OK:
            raise ParameterError(f"feasible: the sign of {state!r} must be one of "
                                 f"{', '.join(_SIGN_OK)}, got {sign!r}")
    return table


def feasibility_grid(result: HopfResult, x: str, y: str, *, feasible: Any = None,
                     values: Mapping | None = None, x_range: Sequence[float] = (0.0, 1.0),
                     y_range: Sequence[float] = (0.0, 1.0), points: int = 200) -> tuple | None:
    """``(X, Y, ok)``: where on the plane the equilibrium has the signs of
    :func:`state_signs` (a population stays nonnegative, ...); None when no
    state has a sign to keep."""
    np = _numpy()
    signs = state_signs(result, feasible)
    if not signs:
        return None
    xr, yr = _range(x, x_range), _range(y, y_range)
    X, Y = np.meshgrid(np.linspace(*xr, points), np.linspace(*yr, points))
    vals = _off_axes(values, x, y)
    ok = np.ones(X.shape, dtype=bool)
    for state, sign in signs.items():
        fn = grid_function(result, sympy.sympify(result.equilibrium[state], strict=True), [x, y], vals)[0]
        with np.errstate(all="ignore"):
            v = np.broadcast_to(np.asarray(fn(X, Y), dtype=complex), X.shape)
        real = np.isfinite(v) & (np.abs(v.imag) <= 1e-12 * (1 + np.abs(v.real)))
        ok &= real & _SIGN_OK[sign](np.where(real, v.real, np.nan))
    return X, Y, ok


def _number(result, name, raw) -> float:
    """A parameter value given as text or a number, as a float."""
    if isinstance(raw, str):
        value = result.model.parse(raw, context=f"value of {name!r}")
    elif isinstance(raw, (int, float, sympy.Expr)) and not isinstance(raw, bool):
        value = sympy.sympify(raw, strict=True)
    else:
        raise ParameterError(f"the value of {name!r} must be a number, got {raw!r}")
    if value.free_symbols:
        raise ParameterError(f"the value of {name!r} must be a constant, got {raw!r}")
    return float(sympy.N(value))


def _eigen_stability(np, result, x, y, X, Y, vals):
    model, mu = result.model, result.parameter
    states = model.state_symbols
    jac = sympy.Matrix(model.equations).jacobian(states)
    subs_eq = {s: result.equilibrium[n] for s, n in zip(states, model.states)}
    elim = {model.symbols[k]: v for k, v in result.substitutions.items() if k in model.symbols}
    J = jac.xreplace(elim).xreplace(subs_eq)
    entries = [J[i, j] for i in range(J.rows) for j in range(J.cols)]
    grid = {x: X, y: Y}
    names = list(grid)
    if mu not in grid and mu not in vals:
        raise ParameterError(f"give the value of the bifurcation parameter {mu!r} in values=")
    cols = []
    for e in entries:
        fn = grid_function(result, e, names, vals)[0]
        with np.errstate(all="ignore"):
            cols.append(np.broadcast_to(np.asarray(fn(X, Y), dtype=complex), X.shape))
    A = np.stack(cols, axis=-1).reshape(X.shape + (J.rows, J.cols))
    finite = np.all(np.isfinite(A), axis=(-1, -2)) & np.all(
        np.abs(A.imag) <= 1e-9 * (1 + np.abs(A.real)), axis=(-1, -2))
    A = np.where(finite[..., None, None], A.real, 0.0)
    lam = np.linalg.eigvals(A)
    stable = np.all(lam.real < 0, axis=-1) & finite
    return StabilityGrid(X, Y, stable, finite, "eigenvalues")


def curve_csv(curve: CurveData) -> str:
    """The curve as CSV text: segment, x, y, l1, classification, others_stable."""
    lines = [f"segment,{curve.x_name},{curve.y_name},l1,classification,others_stable"]
    cls = curve.classification
    for k in range(len(curve.x)):
        if curve.segment[k] < 0:
            continue
        lines.append(f"{int(curve.segment[k])},{float(curve.x[k])!r},{float(curve.y[k])!r},"
                     f"{float(curve.l1[k])!r},{cls[k]},{'yes' if curve.others_stable[k] else 'no'}")
    return "\n".join(lines) + "\n"


def write_curve_csv(curve: CurveData, path: str | os.PathLike[str], *,
                    force: bool = False) -> str:
    """Write :func:`curve_csv` to ``path`` atomically; returns the path.

    Raises
    ------
    OutputExistsError
        If the file exists and ``force`` is False.
    """
    return write_text_atomic(os.fspath(path), curve_csv(curve), force=force)
