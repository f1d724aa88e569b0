"""Retarded (delay) differential equations: critical delays, crossing direction and c1.

Pipeline place: a room of its own beside ``hopf_analysis``: model (with
``x(t - tau)``) -> :mod:`.linearize` -> :mod:`.critical` -> :mod:`.normal_form`
-> :class:`.results.DelayHopfResult` -> :mod:`.render`, :mod:`.evaluate`,
:mod:`.simulate`.  ``criticality.hopf`` hands delayed models to
:func:`hopf_delay`.
"""

from typing import Any

from .analysis import hopf_delay
from .results import DelayHopfResult

__all__ = ["hopf_delay", "DelayHopfResult", "validate_delay"]


def __getattr__(name: str) -> Any:
    if name == "validate_delay":
        from .simulate import validate_delay
        return validate_delay
    raise AttributeError(name)
