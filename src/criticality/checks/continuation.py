"""Numeric Hopf curves: the Hopf point followed as a second parameter moves.

Pipeline place: model + guess -> compiled Taylor data -> **pseudo-arclength
continuation of the Hopf system** -> :class:`HopfCurve` (a frozen table) ->
CSV, pandas, plots, the CLI.

The Hopf system of :mod:`criticality.local.numeric_hopf` (``3n + 2``
equations in ``x, mu, omega`` and the critical eigenvector) gains the second
parameter ``a`` as an unknown; its solutions form a curve.  The curve is
followed by pseudo-arclength continuation (Keller 1977): tangent from the
null vector of the Jacobian, a predictor step along it, a Newton corrector on
the system bordered by the tangent, step control by the number of Newton steps.
So the curve is followed through turning points, where ``a`` is extremal
along it.  Rows of the table are computed at the requested values of ``a``
(a value crossed twice, on both sides of a turning point, gives two rows) by
Newton's method at fixed ``a`` warm-started from the neighbouring curve
points; each row carries ``mu_c``, omega, ``l1`` (and ``l2``), the
transversality, a status and a verdict.  Where ``l1`` changes sign between
curve points the Bautin point is refined by the secant method on ``a``;
turning points are refined by a parabola through the neighbours and a Newton
solve at fixed ``mu``.

Everything here is float64 and local: each row is a local analysis at that
Hopf point, valid near it; a subcritical row means an abrupt, hysteretic onset
there.  Rows computed on a dask cluster (``scheduler=``) are identical to the
serial ones: the same function runs on the same inputs, with the model
shipped as its TOML text.
"""

from __future__ import annotations

import csv
import io
import os
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any, Mapping

from ..errors import EquilibriumNotFoundError, MissingExtraError, ParameterError
from ..kinds import Classification

if TYPE_CHECKING:
    from ..model.core import Model

__all__ = ["HopfCurve", "CurvePoint", "hopf_curve"]

_ROW_STATUS = ("ok", "not reached", "failed", "omega near zero")


def _np():
    try:
        import numpy as np
    except ImportError as exc:  # pragma: no cover - numpy ships with the numeric extras
        raise MissingExtraError("Hopf curves need numpy; install it with: "
                                "pip install 'criticality[validate]'") from exc
    return np


@dataclass(frozen=True)
class CurvePoint:
    """A special point of a Hopf curve (a Bautin point or a turning point)."""

    kind: str
    along_value: float
    critical_value: float
    omega: float
    l2: float | None = None
    note: str = ""


@dataclass(frozen=True)
class HopfCurve:
    """The Hopf curve of ``parameter`` as ``along`` moves (a frozen table).

    Attributes
    ----------
    parameter, along : str
        The bifurcation parameter and the second parameter.
    along_values, critical_value, omega, l1, transversality : numpy.ndarray
        One entry per row, in the order along the curve (read-only arrays).
    l2 : numpy.ndarray or None
        With ``order=5``.
    status : tuple of str
        Per row: ``"ok"``, ``"not reached"`` (the continuation stopped before
        this value), ``"failed"`` or ``"omega near zero"``.
    verdict : tuple of str
        Per row: ``"supercritical"`` (l1 < 0), ``"subcritical"`` (l1 > 0),
        ``"degenerate"`` (l1 zero to float64 accuracy) or ``""``.
    bautin_points, turning_points : tuple of CurvePoint
    notes : tuple of str
    """

    parameter: str
    along: str
    along_values: object
    critical_value: object
    omega: object
    l1: object
    l2: object
    transversality: object
    status: tuple
    verdict: tuple
    bautin_points: tuple
    turning_points: tuple
    notes: tuple = field(default=())

    def __len__(self) -> int:
        return len(self.status)

    def columns(self) -> dict:
        """The table as ``{column name: values}``."""
        out = {self.along: self.along_values, self.parameter: self.critical_value,
               "omega": self.omega, "l1": self.l1}
        if self.l2 is not None:
            out["l2"] = self.l2
        out["transversality"] = self.transversality
        out["status"] = list(self.status)
        out["verdict"] = list(self.verdict)
        return out

    def to_pandas(self) -> Any:
        """The table as a pandas DataFrame (needs pandas)."""
        try:
            import pandas
        except ImportError as exc:
            raise MissingExtraError("to_pandas() needs pandas; install it with: "
                                    "pip install pandas") from exc
        return pandas.DataFrame(self.columns())

    def to_csv(self, path: str | os.PathLike[str] | None = None, *, force: bool = False) -> str:
        """The table as CSV text (also written to ``path`` if given; an
        existing file is kept unless ``force``)."""
        cols = self.columns()
        buf = io.StringIO()
        writer = csv.writer(buf, lineterminator="\n")
        writer.writerow(list(cols))
        for i in range(len(self)):
            writer.writerow([v[i] if isinstance(v[i], str) else repr(float(v[i]))
                             for v in cols.values()])
        text = buf.getvalue()
        if path is not None:
            from ..files import write_text_atomic
            write_text_atomic(path, text, force=force)
        return text

    def plot(self, ax: Any = None) -> Any:
        """The curve in the ``(along, parameter)`` plane, coloured by verdict,
        Bautin points and turning points marked; returns the axes."""
        try:
            from matplotlib.figure import Figure
        except ImportError as exc:
            raise MissingExtraError("plots need matplotlib; install it with: "
                                    "pip install 'criticality[plot]'") from exc
        np = _np()
        if ax is None:
            ax = Figure().add_subplot()
        colours = {"supercritical": "tab:blue", "subcritical": "tab:red",
                   "degenerate": "tab:purple"}
        a, mu = np.asarray(self.along_values), np.asarray(self.critical_value)
        for i in range(len(self) - 1):
            v = self.verdict[i]
            if self.status[i] == "ok" and self.status[i + 1] == "ok" and v in colours:
                ax.plot(a[i:i + 2], mu[i:i + 2], color=colours[v], lw=2)
        for v, colour in colours.items():
            ax.plot([], [], color=colour, lw=2, label=v)
        for p in self.bautin_points:
            ax.plot(p.along_value, p.critical_value, "ko", label="Bautin point")
        for p in self.turning_points:
            ax.plot(p.along_value, p.critical_value, "k^", label="turning point")
        ax.set_xlabel(self.along)
        ax.set_ylabel(f"{self.parameter} at the Hopf point")
        handles, labels = ax.get_legend_handles_labels()
        seen: dict = {}
        for h, lab in zip(handles, labels):
            seen.setdefault(lab, h)
        ax.legend(list(seen.values()), list(seen), loc="best")
        return ax


# -- the continuation ---------------------------------------------------------------------

class _Curve:
    """The Hopf system with the second parameter as an unknown:
    ``Y = (x, mu, omega, v_r, v_i, a)``."""

    def __init__(self, setup) -> None:
        from ..local.numeric_hopf import HopfSystem

        self.setup = setup
        self.sys = HopfSystem(setup.compiled, setup.floats, setup.mu_index)
        self.ai = setup.along_index[0]
        self.n = setup.compiled.n
        self.m = 3 * self.n + 2

    def G(self, Y, c):
        G, cache = self.sys.residual(Y[:-1], c, {self.ai: float(Y[-1])})
        return G, cache

    def DG(self, Y, c, cache):
        return self.sys.jacobian(Y[:-1], c, cache, param_columns=(1,))

    def tangent(self, Y, c, previous):
        np = _np()
        G, cache = self.G(Y, c)
        D = self.DG(Y, c, cache)
        M = np.vstack([D, previous[None, :]])
        rhs = np.zeros(self.m + 1)
        rhs[-1] = 1.0
        t = np.linalg.solve(M, rhs)
        return t / np.linalg.norm(t)

    def correct(self, Y, c, fix=None, border=None, tol: float = 1e-11, max_iter: int = 12):
        """Newton on ``G = 0`` plus either ``Y[fix]`` fixed or the border row
        ``border = (t, Yp)``: ``t . (Y - Yp) = 0``."""
        np = _np()
        Y = Y.copy()
        for it in range(1, max_iter + 1):
            G, cache = self.G(Y, c)
            if G is None:
                return None, it
            D = self.DG(Y, c, cache)
            if fix is not None:
                keep = [j for j in range(self.m + 1) if j != fix]
                try:
                    d = np.linalg.solve(D[:, keep], -G)
                except np.linalg.LinAlgError:
                    return None, it
                delta = np.zeros(self.m + 1)
                delta[keep] = d
            else:
                t, Yp = border
                M = np.vstack([D, t[None, :]])
                r = np.concatenate([G, [t @ (Y - Yp)]])
                try:
                    delta = np.linalg.solve(M, -r)
                except np.linalg.LinAlgError:
                    return None, it
            Y = Y + delta
            if not np.all(np.isfinite(Y)):
                return None, it
            if np.max(np.abs(delta)) < 1e-10 * max(1.0, np.max(np.abs(Y))) and \
                    np.max(np.abs(G)) < tol * max(1.0, np.max(np.abs(Y))):
                return Y, it
        return None, max_iter


def _renormalise(curve, Y):
    """A normalisation vector ``c`` for the current eigenvector (``c^H v = 1``)."""
    np = _np()
    n = curve.n
    v = Y[n + 2:2 * n + 2] + 1j * Y[2 * n + 2:3 * n + 2]
    return v / np.vdot(v, v).real


def _follow(curve, Y0, c, lo, hi, direction, h0, max_steps):
    """Curve points ``[(Y, c, tangent), ...]`` from ``Y0`` while ``a`` is in
    ``[lo, hi]`` (one step beyond), and the reason it stopped."""
    np = _np()
    m = curve.m
    e = np.zeros(m + 1)
    e[-1] = direction
    t = curve.tangent(Y0, c, e)
    if t[-1] * direction < 0:
        t = -t
    points = [(Y0, c, t)]
    h, Y = h0, Y0
    span = hi - lo
    for _ in range(max_steps):
        a = Y[-1]
        if a > hi + 1e-12 * span or a < lo - 1e-12 * span:
            return points, "range covered"
        Yp = Y + h * t
        Ynew, its = curve.correct(Yp, c, border=(t, Yp))
        if Ynew is None:
            h /= 2
            if h < h0 * 1e-4:
                return points, (f"the corrector failed near {curve.setup.names[curve.ai]} = "
                                f"{a:.6g} (step size below {h0 * 1e-4:.2g})")
            continue
        c = _renormalise(curve, Ynew)
        tn = curve.tangent(Ynew, c, t)
        if tn @ t < 0:
            tn = -tn
        n = curve.n
        if abs(Ynew[n + 1]) < 1e-8 * max(1.0, np.max(np.abs(Ynew[:n + 1]))):
            points.append((Ynew, c, tn))
            return points, "omega reached zero (a double zero eigenvalue ends the curve)"
        points.append((Ynew, c, tn))
        Y, t = Ynew, tn
        h = min(h * (1.5 if its <= 3 else 1.0 if its <= 5 else 0.5), 8 * h0)
    return points, f"stopped after {max_steps} steps"


def _row(curve, Y, c, order):
    """``(mu, omega, l1, l2, transversality, status)`` at a curve point."""
    np = _np()
    from ..hopf_analysis.numeric_mode import nu_to_complex
    from ..local.lyapunov import complex_normal_form
    from ..local.numeric_hopf import (FloatField, eigen_data, engine_eigenbasis,
                                      numpy_projection_c1, numpy_transversality)

    n = curve.n
    x, mu, om = Y[:n], float(Y[n]), float(Y[n + 1])
    q = Y[n + 2:2 * n + 2] + 1j * Y[2 * n + 2:3 * n + 2]
    if om < 0:
        om, q = -om, q.conj()
    p = list(curve.sys.params)
    p[curve.setup.mu_index] = mu
    p[curve.ai] = float(Y[-1])
    ct = curve.setup.compiled
    vals = np.array(ct.values(x, p, "math"), dtype=float)
    A = ct.dense().jacobian(vals)
    if om < 1e-8 * max(1.0, float(np.max(np.abs(A)))):
        return mu, om, np.nan, np.nan, np.nan, "omega near zero"
    try:
        _, pbar = eigen_data(ct, vals, om, q, "numpy")
        l1 = complex(numpy_projection_c1(ct.dense(), vals, A, om, q, pbar)).real / om
        beta = complex(numpy_transversality(ct.dense(), vals, A, q, pbar, 0)).real
        l2 = np.nan
        if order >= 5:
            K = FloatField()
            eb = engine_eigenbasis(A, om, q, pbar, K)
            cs = complex_normal_form(ct.taylor_forms(vals, K, order), eb, order)
            l2 = nu_to_complex(eb.nu_field, cs[1], om).real / om
    except (ArithmeticError, ValueError, np.linalg.LinAlgError):
        return mu, om, np.nan, np.nan, np.nan, "failed"
    return mu, om, l1, l2, beta, "ok"


def _verdict(l1, status, scale: float = 1.0):
    if status != "ok":
        return ""
    if abs(l1) <= 1e-10 * max(1.0, scale):
        return Classification.DEGENERATE
    return Classification.SUPERCRITICAL if l1 < 0 else Classification.SUBCRITICAL


def _crossings(points, targets):
    """``[(k, j)]``: segment k (curve points k, k+1) crosses ``targets[j]``,
    counted half-open in the direction of travel (the last segment closed),
    in the order along the curve."""
    out = []
    last = len(points) - 2
    for k in range(len(points) - 1):
        a0, a1 = points[k][0][-1], points[k + 1][0][-1]
        hits = []
        for j, a in enumerate(targets):
            forward = a0 <= a < a1 or (k == last and a == a1 and a1 >= a0)
            backward = a1 < a <= a0 or (k == last and a == a1 and a1 < a0)
            if (a1 >= a0 and forward) or (a1 < a0 and backward):
                hits.append((abs(a - a0), j))
        out += [(k, j) for _, j in sorted(hits)]
    return out


def _point_at(curve, points, k, a):
    """The curve point at ``a`` on segment ``k`` (Newton at fixed ``a``)."""
    (Y0, _, _), (Y1, _, _) = points[k], points[k + 1]
    a0, a1 = Y0[-1], Y1[-1]
    s = 0.0 if a1 == a0 else (a - a0) / (a1 - a0)
    Y = Y0 + s * (Y1 - Y0)
    Y[-1] = a
    c = _renormalise(curve, Y)
    out, _ = curve.correct(Y, c, fix=curve.m)
    return out, c


def _bautin(curve, points, k, l1k, l1k1, order):
    """Refine the sign change of l1 on segment ``k`` by the secant method in ``a``."""
    a_lo, a_hi = points[k][0][-1], points[k + 1][0][-1]
    f_lo, f_hi = l1k, l1k1
    best = None
    for _ in range(30):
        a = a_hi - f_hi * (a_hi - a_lo) / (f_hi - f_lo) if f_hi != f_lo else (a_lo + a_hi) / 2
        Y, c = _point_at(curve, points, k, a)
        if Y is None:
            break
        mu, om, l1, l2, _, status = _row(curve, Y, c, max(order, 5))
        best = (a, mu, om, l2)
        if status != "ok" or abs(l1) < 1e-13 or abs(a_hi - a_lo) < 1e-13 * max(1, abs(a)):
            break
        if (l1 < 0) == (f_lo < 0):
            a_lo, f_lo = a, l1
        else:
            a_hi, f_hi = a, l1
    if best is None:
        return None
    a, mu, om, l2 = best
    return CurvePoint("bautin", float(a), float(mu), float(om), float(l2),
                      "l1 changes sign here; l2 decides the onset nearby")


def _turning(curve, points, k):
    """A turning point near curve point ``k`` (a extremal along the curve)."""
    np = _np()
    n = curve.n
    trio = [points[j][0] for j in (k - 1, k, k + 1)]
    mus = np.array([Y[n] for Y in trio])
    As = np.array([Y[-1] for Y in trio])
    try:
        coef = np.polyfit(mus, As, 2)
    except (np.linalg.LinAlgError, ValueError):
        return None
    if coef[0] == 0:
        return None
    mu_star = -coef[1] / (2 * coef[0])
    Y = points[k][0].copy()
    Y[n] = mu_star
    c = _renormalise(curve, Y)
    out, _ = curve.correct(Y, c, fix=n)
    if out is None:
        out = points[k][0]
    return CurvePoint("turning", float(out[-1]), float(out[n]), float(abs(out[n + 1])), None,
                      f"'{curve.setup.names[curve.ai]}' is extremal along the curve here")


def hopf_curve(model: Model, parameter: str, along: Mapping, guess: Mapping, *,
               values: Mapping | None = None, order: int = 3, radius: float = 1.0,
               max_steps: int | None = None, scheduler: Any = None) -> HopfCurve:
    """Follow the Hopf point of ``parameter`` as another parameter moves.

    Parameters
    ----------
    model : Model
    parameter : str
        The bifurcation parameter.
    along : mapping
        ``{name: values}``: the second parameter and the values (1-d, at least
        two) at which the table has rows; the curve starts at the first value.
    guess : mapping
        Starting values for every state and for ``parameter`` at the first
        value of ``along`` (as for ``hopf(..., guess=...)``).
    values : mapping, optional
        Values of the other parameters (model defaults fill gaps).
    order : int
        3 gives l1, 5 also l2.
    radius : float
        Trust radius of the first Newton solve (see ``hopf``).
    max_steps : int, optional
        Continuation steps at most (default ``20 * len(values) + 200``).
    scheduler : dask.distributed.Client or str, optional
        Compute the rows on a dask cluster (a Client or a scheduler address);
        the results are identical to the serial run.

    Returns
    -------
    HopfCurve

    Examples
    --------
    >>> import numpy as np
    >>> from criticality import Model
    >>> m = Model(["x", "y"], {"x": "mu*x - y - x^3 + a*x*y^2", "y": "x + mu*y - y^3"},
    ...           {"mu": "real", "a": "real"})
    >>> c = hopf_curve(m, "mu", {"a": np.linspace(0, 1, 5)}, {"x": 0, "y": 0, "mu": 0.1})
    >>> [round(float(v), 12) for v in c.critical_value], c.verdict[0]
    ([0.0, 0.0, 0.0, 0.0, 0.0], 'supercritical')
    """
    np = _np()
    from ..hopf_analysis.numeric_mode import guess_vector, numeric_setup

    if not isinstance(along, Mapping) or len(along) != 1:
        raise ParameterError("along must be a mapping with one entry {name: values}")
    (name, targets), = along.items()
    targets = np.asarray(targets, dtype=float).ravel()
    if targets.size < 2 or not np.all(np.isfinite(targets)):
        raise ParameterError(f"along['{name}'] needs at least two finite values")
    if name == parameter:
        raise ParameterError(f"'{name}' is the bifurcation parameter; along names another one")
    if order not in (3, 5):
        raise ParameterError(f"order must be 3 or 5 for a Hopf curve, got {order!r}")
    setup = numeric_setup(model, parameter, values, order, along=(name,))
    setup.floats[setup.along_index[0]] = float(targets[0])
    curve = _Curve(setup)
    start = guess_vector(model, parameter, guess)
    try:
        pt = curve.sys.solve(start[:-1], start[-1], radius=radius)
    except EquilibriumNotFoundError as exc:
        raise EquilibriumNotFoundError(f"at {name} = {targets[0]:g} (the start of the curve): "
                                       f"{exc}") from exc
    Y0 = np.concatenate([pt.x, [pt.mu, pt.omega], pt.q.real, pt.q.imag, [targets[0]]])
    c0 = _renormalise(curve, Y0)
    lo, hi = float(targets.min()), float(targets.max())
    direction = 1.0 if targets[-1] >= targets[0] else -1.0
    spacing = float(np.min(np.abs(np.diff(np.unique(targets))))) if np.unique(targets).size > 1 \
        else (hi - lo)
    h0 = max(spacing, (hi - lo) / 50)
    steps = max_steps if max_steps is not None else 20 * targets.size + 200
    points, reason = _follow(curve, Y0, c0, lo, hi, direction, h0, steps)
    rows = _rows(curve, points, targets, order, scheduler)
    return _table(curve, setup, parameter, name, points, rows, targets, order, reason)


def _row_inputs(curve, points, targets):
    out = []
    for k, j in _crossings(points, list(targets)):
        Y, c = _point_at(curve, points, k, float(targets[j]))
        out.append((j, Y, c))
    return out


def _rows(curve, points, targets, order, scheduler):
    inputs = _row_inputs(curve, points, targets)
    if scheduler is None:
        computed = [None if Y is None else _row(curve, Y, c, order) for _, Y, c in inputs]
    else:
        from .cluster import map_tasks
        s = curve.setup
        spec = (s.model.to_toml(), s.parameter, dict(_values_spec(s)), order,
                s.names[curve.ai])
        computed = map_tasks(scheduler, _row_task, [(spec, Y, c) for _, Y, c in inputs])
    return [(j, r) for (j, _, _), r in zip(inputs, computed)]


def _values_spec(setup):
    varied = {setup.mu_index, *setup.along_index}
    return {n: str(v) for i, (n, v) in enumerate(zip(setup.names, setup.exact))
            if i not in varied}


def _row_task(spec, Y, c):
    """One row, computed from the model's text (a task for a dask worker)."""
    from ..hopf_analysis.numeric_mode import numeric_setup
    from ..model import Model

    text, parameter, values, order, along = spec
    if Y is None:
        return None
    setup = numeric_setup(Model.from_text(text), parameter, values, order, along=(along,))
    return _row(_Curve(setup), Y, c, order)


def _table(curve, setup, parameter, name, points, rows, targets, order, reason):
    np = _np()
    reached = {j for j, _ in rows}
    table = []
    for j, r in rows:
        if r is None:
            table.append((targets[j], np.nan, np.nan, np.nan, np.nan, np.nan, "failed"))
        else:
            mu, om, l1, l2, beta, status = r
            table.append((targets[j], mu, om, l1, l2, beta, status))
    for j in range(len(targets)):
        if j not in reached:
            table.append((targets[j], np.nan, np.nan, np.nan, np.nan, np.nan, "not reached"))
    cols = list(zip(*table)) if table else [[]] * 7
    arrays = [np.array(col, dtype=float) for col in cols[:6]]
    for arr in arrays:
        arr.setflags(write=False)
    status = tuple(cols[6])
    verdict = tuple(_verdict(l1, st) for l1, st in zip(arrays[3], status))
    l1_points = []
    for Y, c, _ in points:
        r = _row(curve, Y, c, 3)
        l1_points.append(r[2] if r[5] == "ok" else np.nan)
    bautin = []
    for k in range(len(points) - 1):
        a, b = l1_points[k], l1_points[k + 1]
        if np.isfinite(a) and np.isfinite(b) and a * b < 0:
            p = _bautin(curve, points, k, a, b, order)
            if p is not None:
                bautin.append(p)
    turning = []
    for k in range(len(points) - 1):
        if points[k][2][-1] * points[k + 1][2][-1] < 0 and len(points) >= 3:
            p = _turning(curve, points, min(max(k, 1), len(points) - 2))
            if p is not None:
                turning.append(p)
    notes = (f"pseudo-arclength continuation: {len(points)} curve points; {reason}",
             "float64 throughout; each row is a local analysis at its Hopf point (valid near "
             "it); a subcritical row means an abrupt, hysteretic onset of oscillations there")
    return HopfCurve(parameter, name, arrays[0], arrays[1], arrays[2], arrays[3],
                     arrays[4] if order >= 5 else None, arrays[5], status, verdict,
                     tuple(bautin), tuple(turning), notes)
