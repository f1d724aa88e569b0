"""The boundary of each analysis: foreign exceptions become the project's.

Pipeline place: wraps every public entry point (``hopf``, ``fold``,
``bautin_points``, the map and codimension-two analyses, the delay analysis,
the evaluation of a result).

The libraries under the engine (sympy, mpmath, python-flint) signal the
limits of their methods with their own exceptions: a polynomial routine
handed a radical, a series that does not converge, a number beyond a
machine integer, a recursion that runs out of stack.  :func:`guarded`
converts those, and only those, into a
:class:`~criticality.errors.ComputationLimitError` or
:class:`~criticality.errors.ClosedFormUnavailableError` whose message names
the analysis and the stage it was in (read from the innermost frame of the
package in the traceback) and keeps the original as ``__cause__``.  Errors
that only a mistake in the package can cause (``TypeError``,
``AttributeError``, ``KeyError``, ...) pass through unchanged: they are bugs
and must be seen as such.
"""

from __future__ import annotations

import functools
from typing import Any, Callable, TypeVar

from ..errors import ClosedFormUnavailableError, ComputationLimitError, CriticalityError

__all__ = ["guarded", "stage_of", "STAGES"]

F = TypeVar("F", bound=Callable[..., Any])

#: module of the package -> the stage it computes (for the messages)
STAGES = {
    "model": "reading the model",
    "local.equilibria": "solving for the equilibrium",
    "local.prepare": "preparing the problem (fixed values, equilibrium, fields)",
    "local.taylor": "expanding the model in Taylor series at the equilibrium",
    "local.solve": "solving for a parameter in closed form",
    "local.critical": "solving for the critical set",
    "local.eigenbasis": "computing the critical eigenvectors",
    "local.center_manifold": "reducing to the center manifold",
    "local.normal_form": "computing the normal form",
    "local.lyapunov": "computing the normal form",
    "local.projection": "evaluating the projection formula",
    "local.numeric_hopf": "locating the Hopf point numerically",
    "algebra": "exact arithmetic in the parameter field",
    "algebra.signs": "deciding a sign",
    "algebra.canonical": "writing the result in canonical form",
    "hopf_analysis.assemble": "assembling the result",
    "hopf_analysis.numeric_mode": "the numeric mode",
    "checks.numeric": "evaluating the result at a parameter point",
    "delay": "the analysis of the delay equation",
    "bifurcations": "the codimension analysis",
}


def _foreign_kinds() -> tuple:
    """The exception classes of the libraries that mean 'beyond this
    method', mapped to the project's error class."""
    import mpmath
    import sympy.polys.polyerrors as pe
    return ((RecursionError, ComputationLimitError, "the expressions are nested too deeply"),
            (MemoryError, ComputationLimitError, "the expressions grew beyond the memory"),
            (OverflowError, ComputationLimitError, "a number grew beyond what can be evaluated"),
            (mpmath.libmp.NoConvergence, ComputationLimitError,
             "a numerical method did not converge"),
            (pe.BasePolynomialError, ClosedFormUnavailableError,
             "a polynomial method met an expression it cannot handle"),
            (NotImplementedError, ClosedFormUnavailableError,
             "a method the computation needs is not available for this input"))


def stage_of(exc: BaseException) -> str:
    """The stage an exception was raised in: the innermost frame of the
    package in its traceback, in words."""
    tb, module = exc.__traceback__, None
    while tb is not None:
        name = tb.tb_frame.f_globals.get("__name__", "")
        if name.startswith("criticality.") and not name.endswith(".boundary"):
            module = name[len("criticality."):]
        tb = tb.tb_next
    while module:
        if module in STAGES:
            return STAGES[module]
        module = module.rpartition(".")[0]
    return "the computation"


def _convert(exc: BaseException, what: str) -> CriticalityError | None:
    for kind, cls, meaning in _foreign_kinds():
        if isinstance(exc, kind):
            detail = str(exc).strip().splitlines()[0][:200] if str(exc).strip() else ""
            shown = f"{type(exc).__name__}" + (f": {detail}" if detail else "")
            return cls(f"{what} stopped while {stage_of(exc)}: {meaning} ({shown}). Make the "
                       "problem smaller (fix parameters with values={...}, give the "
                       "equilibrium, lower the order) or use the numeric mode (guess={...}).")
    return None


def guarded(what: str) -> Callable[[F], F]:
    """Decorator: run an entry point with its foreign exceptions converted
    (see the module docstring).  ``what`` names the analysis in messages."""
    def wrap(function: F) -> F:
        @functools.wraps(function)
        def run(*args: Any, **kwargs: Any) -> Any:
            try:
                return function(*args, **kwargs)
            except CriticalityError:
                raise
            except Exception as exc:  # noqa: BLE001 - converted or re-raised unchanged
                converted = _convert(exc, what)
                if converted is None:
                    raise
                raise converted from exc
        return run  # type: ignore[return-value]
    return wrap
