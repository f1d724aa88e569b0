"""A wall-clock budget for long exact analyses.

Pipeline place: wraps the engine and the result assembly; the stages call
:func:`stage` and the inner loops :func:`checkpoint`.

Exact computations can grow beyond what a session affords: a critical value
that needs a square root of a large radicand makes every later step work
over a quadratic extension of a big parameter field.  ``hopf(...,
time_limit=seconds)`` sets a budget; when it is spent the analysis stops at
the next checkpoint with :class:`~criticality.errors.ComputationLimitError`,
which names the stage it was in and the ways to make the problem smaller
(fixing parameters, another bifurcation parameter, a lower order, the
numeric mode).  Nothing is lost: the model and the inputs are untouched.

The other analyses (``fold``, ``bautin_points``, ``bogdanov_takens``) share
the checkpoints; bound them with the context manager::

    with criticality.time_limit(60):
        points = criticality.bautin_points(model, "a", "b")

Without a budget the checkpoints cost one context-variable lookup each.
"""

from __future__ import annotations

import time
from contextlib import contextmanager
from contextvars import ContextVar
from typing import Iterator
from dataclasses import dataclass, field

from .errors import ComputationLimitError, ParameterError

__all__ = ["time_limit", "stage", "checkpoint", "hint"]


@dataclass
class _Budget:
    limit: float
    started: float
    what: str
    stage: str = "setting up"
    hints: list = field(default_factory=list)


_current: ContextVar = ContextVar("criticality_budget", default=None)
_clock = time.monotonic  # replaceable in tests


@contextmanager
def time_limit(seconds: float | None, what: str = "the analysis") -> Iterator[None]:
    """Run the enclosed computation within ``seconds`` of wall-clock time
    (``None``: no limit).  Budgets do not nest: an inner one is ignored."""
    if seconds is None or _current.get() is not None:
        yield
        return
    try:
        limit = float(seconds)
    except (TypeError, ValueError):
        raise ParameterError(f"time_limit must be a number of seconds; got {seconds!r}") from None
    if not limit > 0:
        raise ParameterError(f"time_limit must be positive; got {seconds!r}")
    token = _current.set(_Budget(limit, _clock(), what))
    try:
        yield
    finally:
        _current.reset(token)


def stage(name: str) -> None:
    """Enter a named stage (used in the message when the budget runs out)."""
    budget = _current.get()
    if budget is not None:
        budget.stage = name
        checkpoint()


def hint(text: str) -> None:
    """A problem-specific way out, quoted if the budget runs out."""
    budget = _current.get()
    if budget is not None and text not in budget.hints:
        budget.hints.append(text)


def checkpoint() -> None:
    """Stop with :class:`ComputationLimitError` once the budget is spent."""
    budget = _current.get()
    if budget is None:
        return
    elapsed = _clock() - budget.started
    if elapsed <= budget.limit:
        return
    ways = budget.hints + [
        "fix parameters that need not stay symbolic (values={...})",
        "or run the numeric mode from a guess (guess={...}) for one parameter point",
    ]
    raise ComputationLimitError(
        f"{budget.what} stopped after {elapsed:.1f} s (time limit {budget.limit:g} s) while "
        f"{budget.stage}. The exact expressions grew too large for the budget. Ways to make "
        "the problem smaller: " + "; ".join(ways) + ".")
