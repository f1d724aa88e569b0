"""The registry of analyses: one entry per kind of local bifurcation.

Pipeline place: beside the public API; the command line and the outputs list
this registry instead of hard-coding the analyses.  An entry names the
function that computes the analysis (imported only when used, so that
listing the registry stays cheap) and the symbols it needs from the user.

Examples
--------
>>> [a.name for a in analyses()][:4]
['hopf', 'fold', 'bautin', 'bogdanov_takens']
>>> get("fold").needs
('parameter',)
"""

from __future__ import annotations

from dataclasses import dataclass
from importlib import import_module
from typing import TYPE_CHECKING, Any, Callable

if TYPE_CHECKING:
    from .model.core import Model

__all__ = ["Analysis", "register", "analyses", "get"]


@dataclass(frozen=True)
class Analysis:
    """A registered analysis.

    Attributes
    ----------
    name : str
        The registry key (also the command-line word).
    description : str
        One sentence for listings.
    target : str
        ``"module:function"`` inside the package, imported on first use.
    needs : tuple of str
        The positional symbols the function takes after the model:
        ``("parameter",)`` or ``("parameter", "second")``.
    result : str
        The name of the result class.
    """

    name: str
    description: str
    target: str
    needs: tuple = ("parameter",)
    result: str = ""

    @property
    def function(self) -> Callable[..., Any]:
        """The computing function (imported on first access)."""
        module, _, attr = self.target.partition(":")
        return getattr(import_module(f"criticality.{module}"), attr)

    def __call__(self, model: Model, *symbols: str, **options: Any) -> Any:
        if len(symbols) != len(self.needs):
            raise TypeError(f"analysis '{self.name}' needs {len(self.needs)} symbol(s) "
                            f"({', '.join(self.needs)}), got {len(symbols)}")
        return self.function(model, *symbols, **options)


_REGISTRY: dict = {}


def register(analysis: Analysis) -> Analysis:
    """Add (or replace) an analysis under its name."""
    _REGISTRY[analysis.name] = analysis
    return analysis


def analyses() -> tuple:
    """Every registered analysis, in registration order."""
    return tuple(_REGISTRY.values())


def get(name: str) -> Analysis:
    """The analysis called ``name``.

    Raises
    ------
    KeyError
        With the list of known names.
    """
    try:
        return _REGISTRY[name]
    except KeyError:
        raise KeyError(f"no analysis called {name!r}; known: {', '.join(_REGISTRY)}") from None


register(Analysis("hopf", "Hopf bifurcation: critical value, frequency, Lyapunov coefficients "
                  "and the criticality verdict", "hopf_analysis.analysis:hopf", ("parameter",), "HopfResult"))
register(Analysis("fold", "a simple zero eigenvalue: fold (saddle-node), transcritical or "
                  "pitchfork point and its normal form", "bifurcations.fold:fold", ("parameter",),
                  "FoldResult"))
register(Analysis("bautin", "points of the Hopf set where l1 = 0, with l2 and the scenario "
                  "(fold of cycles, hysteresis)", "bifurcations.bautin:bautin_points",
                  ("parameter", "second"), "BautinPoint"))
register(Analysis("bogdanov_takens", "double zero eigenvalue in two parameters: the normal-form "
                  "coefficients a and b and the sign of a b", "bifurcations.bogdanov_takens:bogdanov_takens",
                  ("parameter", "second"), "BogdanovTakensResult"))
register(Analysis("hopf_delay", "Hopf bifurcation of a retarded equation x' = f(x(t), "
                  "x(t - tau), ...): critical delays, crossing direction, l1 and the verdict",
                  "delay.analysis:hopf_delay", ("parameter",), "DelayHopfResult"))
register(Analysis("flip", "period doubling of a map's fixed point (multiplier -1): critical "
                  "value, flip coefficient, 2-cycle amplitude", "bifurcations.maps:flip_all",
                  ("parameter",), "FlipResult"))
register(Analysis("neimark_sacker", "Neimark-Sacker point of a map (multipliers exp(+-i theta)): "
                  "angle, first Lyapunov coefficient of the map, invariant curve, resonances",
                  "bifurcations.maps:neimark_sacker_all", ("parameter",), "NeimarkSackerResult"))
register(Analysis("fold_hopf", "a zero eigenvalue and a pair +-i omega in two parameters: "
                  "G200, G011, G110, the invariants s and theta and the scenario",
                  "bifurcations.fold_hopf:fold_hopf_all", ("parameter", "second"),
                  "FoldHopfResult"))
register(Analysis("hopf_hopf", "two pairs +-i omega1, +-i omega2 in two parameters: p11, p12, "
                  "p21, p22, theta, delta, the case and the resonances",
                  "bifurcations.hopf_hopf:hopf_hopf_all", ("parameter", "second"),
                  "HopfHopfResult"))
