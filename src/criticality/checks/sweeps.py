"""Vectorised evaluation of a result's closed forms over parameter grids.

Pipeline place: result -> **sweeps** (numpy) -> plots, tables, users' own
figures.

:func:`sweep` turns one quantity of a :class:`~criticality.hopf_analysis.results.HopfResult`
(``"l1"``, ``"critical_value"``, ``"amplitude_coefficient:x"``, ... or any
sympy expression in its parameters) into a numpy function with common
subexpressions removed (:mod:`criticality.local.codegen`), compiled once, and
evaluates it over a grid of parameter values in float64 chunks (serially, or
as tasks on a dask cluster with ``scheduler=``).  Points where the Hopf point
does not exist (``omega^2 <= 0``, the critical value outside the parameter's declared range,
or a root of the equilibrium on its other sheet: another equilibrium) are marked in
:attr:`Sweep.admissible`.  A sweep that runs longer than a couple of seconds
reports its progress on standard error (or to a callback); pass
``progress=False`` to keep it silent.

Large closed forms can cancel catastrophically in float64 (the l1 of a
food chain with a square root in its critical value, about 17,000
operations, loses up to all its digits at some points).  Every sweep
therefore re-evaluates the same expression at a few grid points with
mpmath at 30 digits and records the largest relative error it saw in
:attr:`Sweep.sampled_error`; above :data:`ERROR_WARNING` it issues a
:class:`~criticality.errors.PrecisionWarning`.
"""

from __future__ import annotations

import sys
import time
import warnings
from dataclasses import dataclass
from typing import Any, Callable, Mapping, Sequence

import sympy

from ..errors import MissingExtraError, NoAdmissiblePointWarning, ParameterError, PrecisionWarning
from ..local.options import check_values

__all__ = ["Sweep", "sweep", "quantity_expression", "QUANTITIES", "grid_function",
           "evaluate_many"]

#: the named quantities a sweep accepts (plus ``amplitude_coefficient:<state>``
#: and ``amplitude:<state>``)
QUANTITIES = ("critical_value", "omega", "omega_squared", "period", "transversality", "l1",
              "l2", "re_c1", "planar_coefficient", "frequency_slope", "radius_coefficient")

#: seconds after which a sweep starts to report progress
PROGRESS_AFTER = 2.0
#: grid points re-evaluated at 30 digits by every sweep
SAMPLED_POINTS = 12
#: the relative error (against 30 digits) above which a sweep warns
ERROR_WARNING = 1e-6
_CHUNK = 1 << 14
_CHUNKS_PER_TASK = 16


def _numpy():
    try:
        import numpy
    except ImportError as exc:
        raise MissingExtraError("sweeps need numpy; install it with: "
                                "pip install 'criticality[validate]'") from exc
    return numpy


@dataclass(frozen=True)
class Sweep:
    """A quantity evaluated over a parameter grid.

    Attributes
    ----------
    quantity : str
        The name asked for (or the printed expression).
    expression : sympy.Expr
        The closed form that was evaluated (fixed values substituted).
    grid : mapping of str to numpy.ndarray
        The grid coordinates, broadcast to a common shape.
    values : numpy.ndarray
        The quantity at every grid point (NaN where it is undefined).
    admissible : numpy.ndarray of bool
        Where the Hopf point exists (omega^2 > 0 and the critical value in
        the declared range of the bifurcation parameter).
    fixed : mapping of str to sympy.Expr
        The values of the parameters not on the grid.
    sampled_error : float or None
        The largest relative error of ``values`` (float64) against the same
        expression evaluated with mpmath at 30 digits, over ``sampled_points``
        grid points spread evenly through the admissible finite values (None
        where no point could be checked).
    sampled_points : int
        How many grid points that check covered.
    """

    quantity: str
    expression: sympy.Expr
    grid: Mapping[str, object]
    values: Any
    admissible: Any
    fixed: Mapping[str, sympy.Expr]
    sampled_error: float | None = None
    sampled_points: int = 0

    @property
    def shape(self) -> tuple:
        return tuple(self.values.shape)

    def masked(self) -> Any:
        """``values`` with NaN where the Hopf point does not exist."""
        np = _numpy()
        out = np.array(self.values, dtype=float if not np.iscomplexobj(self.values) else complex)
        out[~self.admissible] = np.nan
        return out


def quantity_expression(result: Any, quantity: str | sympy.Expr) -> sympy.Expr:
    """The closed form of ``result`` called ``quantity`` (see :data:`QUANTITIES`)."""
    if isinstance(quantity, sympy.Expr):
        return quantity
    if not isinstance(quantity, str):
        raise ParameterError(f"a quantity is a name or a sympy expression, got "
                             f"{type(quantity).__name__}")
    cycle = result.cycle
    # built on demand: re(c1) of a large c1 costs sympy seconds, so only the
    # quantity asked for is formed
    named = {
        "critical_value": lambda: result.critical_value, "omega": lambda: result.omega,
        "omega_squared": lambda: result.omega_squared, "period": lambda: cycle.period,
        "transversality": lambda: result.transversality, "l1": lambda: result.l1,
        "l2": lambda: result.l2, "re_c1": lambda: sympy.re(result.c1),
        "planar_coefficient": lambda: result.planar_coefficient,
        "frequency_slope": lambda: cycle.frequency_slope,
        "radius_coefficient": lambda: sympy.Add(*cycle.amplitude_coefficients.values()) / 4,
    }
    if quantity == "radius_coefficient" and cycle.amplitude_power != 2:
        raise ParameterError(
            f"'radius_coefficient' assumes the square-root law; here l1 vanishes identically "
            f"and the amplitudes follow the 1/{cycle.amplitude_power} power law: sweep "
            "'amplitude:<state>' instead")
    if quantity in named:
        expression = named[quantity]()
        if expression is None:
            raise ParameterError(f"'{quantity}' was not computed; run hopf(..., order=5)")
        return expression
    kind, _, state = quantity.partition(":")
    table = {"amplitude_coefficient": cycle.amplitude_coefficients,
             "amplitude": cycle.amplitudes}.get(kind)
    if table is not None and state in table:
        return table[state]
    choices = ", ".join(QUANTITIES) + ", amplitude_coefficient:<state>, amplitude:<state>"
    if table is not None:
        raise ParameterError(f"'{state}' is not a state of the model (states: "
                             f"{', '.join(result.model.states)})")
    raise ParameterError(f"unknown quantity {quantity!r}; expected one of {choices}")


def _fixed_values(result, names, values) -> dict:
    """Exact values of the parameters not on the grid (model defaults filled in)."""
    from .numeric import parameter_values

    given = dict(values or {})
    clash = sorted(set(given) & set(names))
    if clash:
        raise ParameterError(f"{', '.join(clash)} is both on the grid and given a fixed value")
    placeholder = {n: 0 for n in names}
    exact = parameter_values(result, {**given, **placeholder})
    return {k: v for k, v in exact.items() if k not in names}


def grid_function(result: Any, expr: sympy.Expr, names: Sequence[str],
                  values: Mapping | None = None) -> tuple:
    """A numpy function of the grid parameters ``names`` and the fixed values.

    Returns ``(function, substituted expression, fixed values)``; every other
    free symbol of ``expr`` must have a value.
    """
    fixed = _fixed_values(result, names, values)
    repl = {s: fixed[s.name] for s in expr.free_symbols if s.name in fixed}
    sub = expr.xreplace(repl)
    symbols = {s.name: s for s in sub.free_symbols}
    left = sorted(set(symbols) - set(names))
    if left:
        raise ParameterError(f"no value for {', '.join(left)}: put it on the grid or give it a "
                             "fixed value")
    args = [symbols.get(n, sympy.Symbol(n, real=True)) for n in names]
    return compiled_function(sub, args), sub, fixed


def compiled_function(expr: sympy.Expr, args: Sequence[sympy.Symbol]) -> Callable:
    """``expr`` compiled once for numpy arrays, common subexpressions removed
    (:mod:`criticality.local.codegen`; the result's own sympy expression, no
    user text).  Falls back to ``sympy.lambdify`` for a node the compiler does
    not print."""
    from ..local.codegen import UnsupportedExpression, compile_expressions

    try:
        fn = compile_expressions([expr], args, "numpy")
    except UnsupportedExpression:
        return sympy.lambdify(args, expr, modules="numpy")
    return _First(fn)


class _First:
    """The single output of a compiled list, called with positional arrays."""

    def __init__(self, fn) -> None:
        self.fn = fn

    def __call__(self, *arrays):
        return self.fn(arrays)[0]


def _admissible_expressions(result) -> list:
    return [(c.expr, c.relation) for c in result.conditions
            if c.key in ("omega_squared_positive", "critical_value_admissible")
            or c.key.startswith("on_chosen_sheet")]


class _Progress:
    """Reports a fraction done on stderr (or to a callback) after a delay."""

    def __init__(self, label: str, progress) -> None:
        self.label, self.progress = label, progress
        self.started = time.perf_counter()
        self.shown = False

    def __call__(self, done: int, total: int) -> None:
        if self.progress is False or self.progress is None:
            return
        if callable(self.progress) and self.progress is not True:
            self.progress(done, total)
            return
        if time.perf_counter() - self.started < PROGRESS_AFTER and not self.shown:
            return
        self.shown = True
        sys.stderr.write(f"\r{self.label}: {100 * done // max(total, 1):3d}% of {total} points")
        if done >= total:
            sys.stderr.write("\n")
        sys.stderr.flush()


def _evaluate_block(fn, flat, report=None, offset: int = 0, total: int | None = None):
    """``fn`` over aligned chunks of the flat arrays (also a cluster task)."""
    import numpy as np

    size = flat[0].size
    total = size if total is None else total
    out = None
    with np.errstate(all="ignore"):
        for start in range(0, size, _CHUNK):
            part = fn(*(a[start:start + _CHUNK] for a in flat))
            part = np.broadcast_to(np.asarray(part), (min(_CHUNK, size - start),))
            if out is None:
                out = np.empty(size, dtype=complex if np.iscomplexobj(part) else float)
            elif np.iscomplexobj(part) and not np.iscomplexobj(out):
                out = out.astype(complex)
            out[start:start + part.size] = part
            if report is not None:
                report(offset + min(start + _CHUNK, size), total)
    return out


def _evaluate(np, fn, arrays, report, scheduler=None) -> Any:
    flat = [a.ravel() for a in arrays]
    total = flat[0].size
    if scheduler is None:
        out = _evaluate_block(fn, flat, report)
    else:
        from .cluster import map_tasks
        block = _CHUNK * _CHUNKS_PER_TASK  # tasks split on chunk boundaries: same chunks
        items = [(fn, [a[s:s + block] for a in flat]) for s in range(0, total, block)]
        parts = map_tasks(scheduler, _evaluate_block, items)
        kind = complex if any(np.iscomplexobj(p) for p in parts) else float
        out = np.concatenate([np.asarray(p, dtype=kind) for p in parts])
        report(total, total)
    if np.iscomplexobj(out):
        small = np.abs(out.imag) <= 1e-12 * (1 + np.abs(out.real))
        if np.all(small | ~np.isfinite(out)):
            out = out.real.copy()
    return out.reshape(arrays[0].shape)


def _float_array(np, values, name):
    """The grid coordinates of ``name`` as a float array (ParameterError if
    they are not numbers)."""
    try:
        return np.asarray(values, dtype=float)
    except (TypeError, ValueError) as exc:
        raise ParameterError(f"the grid values of {name!r} must be numbers (an array of "
                             f"floats); {exc}") from None


# ``result`` is a HopfResult, typed as Any: HopfResult.evaluate_many calls into this module,
# and a type-only import back would make the two modules import each other.
def sweep(result: Any, quantity: str | sympy.Expr, grid: Mapping, *,
          values: Mapping | None = None, progress: bool | str | Callable = "auto",
          scheduler: Any = None) -> Sweep:
    """Evaluate a closed form of ``result`` over a grid of parameter values.

    Parameters
    ----------
    result : HopfResult
    quantity : str or sympy.Expr
        A name from :data:`QUANTITIES`, ``"amplitude_coefficient:<state>"``,
        ``"amplitude:<state>"`` (needs the bifurcation parameter on the grid),
        or an expression in the result's parameters.
    grid : mapping of str to array_like
        Parameter name -> values; the arrays are broadcast together (use
        ``numpy.meshgrid`` for a plane).
    values : mapping, optional
        Fixed values of the other parameters (model defaults fill gaps).
    progress : "auto", bool or callable
        ``"auto"``/True: a line on stderr once the sweep has run for
        :data:`PROGRESS_AFTER` seconds; False: silent; a callable receives
        ``(done, total)`` after every chunk.
    scheduler : dask.distributed.Client or str, optional
        Evaluate the chunks as tasks on a dask cluster (each task gets the
        compiled expression, rebuilt on the worker from its generated source,
        and its slice of the grid); the values are identical to the serial
        run.

    Returns
    -------
    Sweep

    Examples
    --------
    >>> import numpy as np
    >>> from criticality import Model, hopf
    >>> m = Model(["x", "y"], {"x": "y", "y": "-x + (mu - a)*y - x^2*y"}, {"mu": "real"})
    >>> r = hopf(m, "mu", equilibrium={"x": 0, "y": 0})
    >>> sweep(r, "critical_value", {"a": np.array([0.0, 1.5])}).values
    array([0. , 1.5])
    """
    np = _numpy()
    expr = quantity_expression(result, quantity)
    if not isinstance(grid, Mapping):
        raise ParameterError("the grid must be a mapping {parameter name: array of values}; "
                             f"got {type(grid).__name__} {grid!r:.60}")
    values = check_values(values)
    names = list(grid)
    if not names:
        raise ParameterError("the grid is empty: give at least one parameter and its values")
    fn, sub, fixed = grid_function(result, expr, names, values)
    arrays = np.broadcast_arrays(*(_float_array(np, grid[n], n) for n in names))
    report = _Progress(f"sweep {quantity}", progress)
    out = _evaluate(np, fn, arrays, report, scheduler)
    ok = np.ones(out.shape, dtype=bool)
    for cond, relation in _admissible_expressions(result):
        cfn = grid_function(result, cond, names, values)[0]
        c = np.real(_evaluate(np, cfn, arrays, lambda *a: None, scheduler))
        ok &= (c > 0) if relation == ">" else (c != 0)
    if out.size and not ok.any():
        from .numeric import branch_words

        warnings.warn(f"sweep of {quantity}: no point of the grid is admissible on "
                      f"{branch_words(result)}: at every point its omega^2, critical value "
                      "or sheet condition fails (admissible is False everywhere, masked() "
                      "all NaN); another branch (hopf_all) or another grid may have the "
                      "Hopf points",
                      NoAdmissiblePointWarning, stacklevel=2)
    error, checked = _sampled_error(np, sub, names, arrays, out, ok)
    if error is not None and error > ERROR_WARNING:
        warnings.warn(f"sweep of {quantity}: float64 lost digits; at {checked} sampled grid "
                      f"points the largest relative error against 30-digit evaluation is "
                      f"{error:.1e} (the closed form cancels); use evaluate() at the points "
                      "that matter, or fewer free parameters", PrecisionWarning, stacklevel=2)
    return Sweep(quantity=str(quantity), expression=sub,
                 grid={n: a for n, a in zip(names, arrays)}, values=out, admissible=ok,
                 fixed=fixed, sampled_error=error, sampled_points=checked)


def _sampled_error(np, expr, names, arrays, out, ok) -> tuple:
    """``(largest relative error, points checked)`` of the float64 values
    ``out`` against ``expr`` at 30 digits, at up to :data:`SAMPLED_POINTS`
    admissible finite grid points (evenly spaced in grid order)."""
    import mpmath

    from ..local.codegen import UnsupportedExpression, compile_expressions

    flat = out.ravel()
    good = np.flatnonzero(np.isfinite(flat) & ok.ravel())
    if not good.size or not expr.free_symbols:
        return None, 0
    picks = good[np.unique(np.linspace(0, good.size - 1, min(SAMPLED_POINTS, good.size))
                           .round().astype(int))]
    symbols = {s.name: s for s in expr.free_symbols}
    args = [symbols.get(n, sympy.Symbol(n, real=True)) for n in names]
    try:
        fn = compile_expressions([expr], args, "mpmath")
    except UnsupportedExpression:
        return None, 0
    flat_grid = [a.ravel() for a in arrays]
    worst = 0.0
    with mpmath.workdps(30):
        for i in picks:
            try:
                exact = fn([mpmath.mpf(float(a[i])) for a in flat_grid])[0]
            except (ValueError, ZeroDivisionError, OverflowError, TypeError):
                continue
            if not mpmath.isfinite(exact):
                continue
            scale = max(abs(exact), mpmath.mpf(10) ** -300)
            worst = max(worst, float(abs(mpmath.mpmathify(flat[i]) - exact) / scale))
    return worst, int(picks.size)


def evaluate_many(result: Any, points: Mapping,
                  quantities: Sequence[str] = ("critical_value", "omega", "l1"), *,
                  values: Mapping | None = None, scheduler: Any = None) -> Mapping:
    """Several quantities of ``result`` at many parameter points at once.

    ``points`` maps parameter names to arrays (broadcast together); each
    quantity is compiled once and evaluated in float64 chunks.  Returns a
    read-only mapping ``{quantity: numpy array}`` with NaN where the Hopf point
    does not exist (see :func:`sweep`).

    Examples
    --------
    >>> import numpy as np
    >>> from criticality import Model, hopf
    >>> m = Model(["x", "y"], {"x": "y", "y": "-x + (mu - a)*y - x^2*y"}, {"mu": "real"})
    >>> r = hopf(m, "mu", equilibrium={"x": 0, "y": 0})
    >>> evaluate_many(r, {"a": np.array([0.0, 1.5])})["critical_value"]
    array([0. , 1.5])
    """
    from types import MappingProxyType

    out = {}
    for q in quantities:
        arr = sweep(result, q, points, values=values, progress=False,
                    scheduler=scheduler).masked()
        arr.setflags(write=False)
        out[str(q)] = arr
    return MappingProxyType(out)
