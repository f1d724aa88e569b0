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

__version__ = "0.1.0"

# public name -> submodule that defines it
_LAZY = {
    "Model": "model",
    "Parameter": "model",
    "parse_expression": "expressions",
    "format_expression": "expressions",
    "hopf": "analysis",
    "hopf_all": "analysis",
    "HopfResult": "results",
    "latex_report": "latex",
    "validate": "validation",
    "plot_parameter_plane": "plots",
    "plot_amplitude": "plots",
    "save_figure": "plots",
    "ValidationReport": "validation_report",
    "sweep": "sweeps",
    "curve_data": "plane",
    "write_curve_csv": "plane",
    "analyses": "registry",
    "fold": "fold_points",
    "bautin_points": "bautin",
    "bogdanov_takens": "double_zero",
    "time_limit": "budget",
}

__all__ = sorted(["__version__", *_LAZY, *_error_names])


def __getattr__(name: str):
    module = _LAZY.get(name)
    if module is None:
        raise AttributeError(f"module 'criticality' has no attribute {name!r}")
    value = getattr(import_module(f".{module}", __name__), name)
    globals()[name] = value
    return value


def __dir__():
    return __all__
