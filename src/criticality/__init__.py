"""criticality: exact symbolic Hopf bifurcation analysis.

Point the engine at a model (state variables, symbolic parameters, right-hand
sides) and a bifurcation parameter; it returns the critical value, the
frequency, the transversality, the Lyapunov coefficients and the criticality
condition as closed-form sympy expressions, with LaTeX, JSON and numerical
checks.

The public names are imported lazily, so that ``import criticality`` stays fast.
"""

from __future__ import annotations

from importlib import import_module

from .errors import *  # noqa: F401,F403  (small module, no heavy imports)
from .errors import __all__ as _error_names

TYPE_CHECKING = False  # typing.TYPE_CHECKING without importing typing (kept out of import time)
if TYPE_CHECKING:
    from typing import Any

__version__ = "0.1.0"

# public name -> submodule that defines it
_LAZY = {
    "Model": "model.core",
    "Parameter": "model.core",
    "parse_expression": "model.expressions",
    "format_expression": "model.expressions",
    "hopf": "hopf_analysis.analysis",
    "hopf_all": "hopf_analysis.analysis",
    "HopfResult": "hopf_analysis.results",
    "latex_report": "outputs.latex",
    "validate": "checks.validation",
    "plot_parameter_plane": "outputs.plots",
    "plot_amplitude": "outputs.plots",
    "save_figure": "outputs.plots",
    "ValidationReport": "checks.validation_report",
    "sweep": "checks.sweeps",
    "hopf_curve": "checks.continuation",
    "HopfCurve": "checks.continuation",
    "analyse_many": "checks.batch",
    "curve_data": "checks.plane",
    "write_curve_csv": "checks.plane",
    "analyses": "registry",
    "fold": "bifurcations.fold",
    "bautin_points": "bifurcations.bautin",
    "bogdanov_takens": "bifurcations.bogdanov_takens",
    "time_limit": "budget",
    "hopf_delay": "delay.analysis",
    "DelayHopfResult": "delay.results",
    "flip": "bifurcations.maps",
    "neimark_sacker": "bifurcations.maps",
    "validate_map": "checks.map_iteration",
    "fold_hopf": "bifurcations.fold_hopf",
    "hopf_hopf": "bifurcations.hopf_hopf",
    "spectrum_check": "checks.spectrum",
    # the words of verdicts, classifications and statuses (str-valued enums)
    "Classification": "kinds",
    "Sign": "kinds",
    "Side": "kinds",
    "ConditionStatus": "kinds",
    "FoldKind": "kinds",
    "HopfHopfCase": "kinds",
    "PointStatus": "kinds",
    "RunStatus": "kinds",
}

__all__ = sorted(["__version__", *_LAZY, *_error_names])


def __getattr__(name: str) -> Any:
    module = _LAZY.get(name)
    if module is None:
        raise AttributeError(f"module 'criticality' has no attribute {name!r}")
    value = getattr(import_module(f".{module}", __name__), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return __all__
