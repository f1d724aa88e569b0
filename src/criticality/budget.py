"""A wall-clock budget for long exact analyses.

Pipeline place: wraps the engine and the result assembly; the stages call
:func:`stage` and the inner loops :func:`checkpoint`.

Exact computations can grow beyond what a session affords: a critical value
that needs a square root of a large radicand makes every later step work
over a quadratic extension of a big parameter field.  ``hopf(...,
time_limit=seconds)`` sets a budget; when it is spent the analysis stops with
:class:`~criticality.errors.ComputationLimitError`, which names the stage it
was in and the ways to make the problem smaller (fixing parameters, another
bifurcation parameter, a lower order, the numeric mode).  Nothing is lost:
the model and the inputs are untouched.

Two mechanisms stop a spent budget:

* the checkpoints between steps (:func:`stage`, :func:`checkpoint`) raise at
  once;
* a watchdog thread, started with the budget, interrupts calls that never
  reach a checkpoint (sympy's ``solve`` of the equilibrium, a long
  ``factor``): at the deadline it raises :class:`BudgetExpired`
  asynchronously in the thread that runs the budget (at its next Python
  instruction, again every half second if something swallowed it; never
  while that thread imports a module), and the
  budget turns it into the same :class:`ComputationLimitError`.  A single
  call that stays inside compiled code cannot be interrupted this way; it is
  stopped when it returns (the command line ends the process instead, see
  ``on_overdue``).

The other analyses (``fold``, ``bautin_points``, ``bogdanov_takens``) share
the checkpoints; bound them with the context manager::

    with criticality.time_limit(60):
        points = criticality.bautin_points(model, "a", "b")

Without a budget the checkpoints cost one context-variable lookup each.
"""

from __future__ import annotations

import ctypes
import math
import sys
import threading
import time
from contextlib import contextmanager
from contextvars import ContextVar
from typing import Any, Iterator
from dataclasses import dataclass, field

from .errors import ComputationLimitError, ParameterError

__all__ = ["time_limit", "stage", "checkpoint", "hint", "reporting", "BudgetExpired"]

#: seconds a stage runs before the progress callback hears of it
PROGRESS_AFTER = 1.0
#: seconds between two "still ..." reports of the same stage
PROGRESS_EVERY = 10.0
_POLL = 0.05
_REFIRE = 0.5


class BudgetExpired(BaseException):
    """Raised asynchronously in the thread under a spent budget by its
    watchdog; :func:`time_limit` turns it into
    :class:`~criticality.errors.ComputationLimitError`.  A ``BaseException``
    so that the ``except Exception`` clauses of the libraries it interrupts
    let it through."""


@dataclass
class _Budget:
    limit: float | None
    started: float
    what: str
    stage: str = "setting up"
    hints: list = field(default_factory=list)
    stage_since: float = field(default_factory=time.monotonic)
    expired: bool = False
    reporting: bool = False


_current: ContextVar = ContextVar("criticality_budget", default=None)
_clock = time.monotonic  # replaceable in tests (the checkpoints read it)


def _seconds(seconds) -> float | None:
    if seconds is None:
        return None
    if isinstance(seconds, bool):
        raise ParameterError(f"time_limit must be a number of seconds; got {seconds!r}")
    try:
        limit = float(seconds)
    except (TypeError, ValueError, OverflowError):
        raise ParameterError(f"time_limit must be a number of seconds; got {seconds!r}") from None
    if not limit > 0:  # also NaN
        raise ParameterError(f"time_limit must be positive; got {seconds!r}")
    return None if math.isinf(limit) else limit


@contextmanager
def time_limit(seconds: float | None, what: str = "the analysis", *, progress: Any = None,
               on_overdue: Any = None) -> Iterator[None]:
    """Run the enclosed computation within ``seconds`` of wall-clock time
    (``None`` or ``inf``: no limit).

    Parameters
    ----------
    seconds : float or None
        The budget.
    what : str
        What is bounded, for the stop message ("the Hopf analysis").
    progress : callable, optional
        ``progress(text)`` is called from the watchdog thread when a stage has
        run for more than a second, and every ten seconds after that (the
        command line prints it; computation never prints).
    on_overdue : callable, optional
        ``on_overdue(message)`` is called from the watchdog thread when the
        computation has not stopped two seconds after the limit (it is stuck
        in compiled code); the command line ends the process there.

    Budgets do not nest: inside another budget only ``what`` is taken over
    for the message, the outer limit stays in force.
    """
    limit = _seconds(seconds)
    outer = _current.get()
    if outer is not None:
        saved, outer.what = outer.what, what
        try:
            yield
        except BudgetExpired:  # the outer budget reports the stop with this ``what``
            raise
        except BaseException:
            outer.what = saved
            raise
        outer.what = saved
        return
    if limit is None and progress is None:
        yield
        return
    budget = _Budget(limit, _clock(), what, reporting=progress is not None)
    token = _current.set(budget)
    watchdog = _Watchdog(budget, progress, on_overdue)
    try:
        yield
    except BudgetExpired:
        watchdog.halt()
        raise ComputationLimitError(_message(budget, time.monotonic() - watchdog.start_time)) \
            from None
    finally:
        watchdog.halt()
        _current.reset(token)


class _Watchdog:
    """The thread that watches one budget: progress reports, the
    asynchronous stop at the deadline, the overdue call."""

    def __init__(self, budget: _Budget, progress, on_overdue):
        self.budget, self.progress, self.on_overdue = budget, progress, on_overdue
        self.target = threading.get_ident()
        self.start_time = time.monotonic()
        self.done = threading.Event()
        self.lock = threading.Lock()
        self.fired = False
        self.thread = threading.Thread(target=self._run, name="criticality-budget", daemon=True)
        self.thread.start()

    def _run(self) -> None:
        budget, announced, next_fire = self.budget, (None, 0.0), None
        deadline = None if budget.limit is None else self.start_time + budget.limit
        while not self.done.wait(_POLL):
            now = time.monotonic()
            if self.progress is not None:
                announced = self._report(now, announced)
            if deadline is None or now <= deadline:
                continue
            if (next_fire is None or now >= next_fire) and self._fire():
                next_fire = now + _REFIRE
            if self.on_overdue is not None and now > deadline + 2.0:
                self.on_overdue(_message(budget, now - self.start_time))
                return

    def _report(self, now: float, announced):
        stage, since = self.budget.stage, self.budget.stage_since
        ran = now - since
        if ran < PROGRESS_AFTER:
            return announced
        if announced[0] != (stage, since):
            self._say(f"{stage} ...")
            return (stage, since), now
        if now - announced[1] >= PROGRESS_EVERY:
            self._say(f"still {stage} ({ran:.0f} s)")
            return announced[0], now
        return announced

    def _say(self, text: str) -> None:
        try:
            self.progress(text)
        except Exception:  # a broken stream must not kill the watchdog
            self.progress = None

    def _fire(self) -> bool:
        """Deliver the stop, unless the thread is importing a module (an
        import cut in half would leave a broken module behind for the rest of
        the session): then the next poll tries again."""
        with self.lock:
            if self.done.is_set():
                return True
            if _importing(self.target):
                return False
            self.budget.expired = self.fired = True
            ctypes.pythonapi.PyThreadState_SetAsyncExc(ctypes.c_ulong(self.target),
                                                       ctypes.py_object(BudgetExpired))
            return True

    def halt(self) -> None:
        """End the watch (idempotent).  A stop delivered while halting is
        absorbed: the next one could come only half a second later."""
        try:
            self._stop()
        except BudgetExpired:
            self._stop()

    def _stop(self) -> None:
        """A stop that was fired but not yet delivered is withdrawn."""
        with self.lock:
            self.done.set()
            if self.fired:
                ctypes.pythonapi.PyThreadState_SetAsyncExc(ctypes.c_ulong(self.target), None)


def _importing(thread_id: int) -> bool:
    """Whether the thread is inside the import machinery."""
    frame = sys._current_frames().get(thread_id)
    while frame is not None:
        if frame.f_code.co_filename.startswith("<frozen importlib"):
            return True
        frame = frame.f_back
    return False


def stage(name: str) -> None:
    """Enter a named stage (used in the message when the budget runs out)."""
    budget = _current.get()
    if budget is not None:
        budget.stage = name
        budget.stage_since = time.monotonic()
        checkpoint()


def reporting() -> bool:
    """Whether the current budget reports its stages (a progress callback)."""
    budget = _current.get()
    return budget is not None and budget.reporting


def hint(text: str) -> None:
    """A problem-specific way out, quoted if the budget runs out."""
    budget = _current.get()
    if budget is not None and text not in budget.hints:
        budget.hints.append(text)


def checkpoint() -> None:
    """Stop with :class:`ComputationLimitError` once the budget is spent."""
    budget = _current.get()
    if budget is None or budget.limit is None:
        return
    elapsed = _clock() - budget.started
    if elapsed <= budget.limit and not budget.expired:
        return
    raise ComputationLimitError(_message(budget, elapsed))


def _message(budget: _Budget, elapsed: float) -> str:
    ways = budget.hints + [
        "fix parameters that need not stay symbolic (values={...})",
        "or run the numeric mode from a guess (guess={...}) for one parameter point",
    ]
    return (f"{budget.what} stopped after {elapsed:.1f} s (time limit {budget.limit:g} s) while "
            f"{budget.stage}; the computation did not finish within the budget. Ways to make "
            "the problem smaller: " + "; ".join(ways) + ".")
