"""The process guards of the command line: the command's budget, progress on
standard error, and Ctrl-C.

Pipeline place: **command line** (around every subcommand handler).  No
mathematics here.

* The budget (``--time-limit``, :data:`~.ranges.DEFAULT_TIME_LIMIT` by default,
  ``none`` for no limit) covers the whole command: reading the model, the
  analysis, the output.  :func:`criticality.budget.time_limit` stops it at the
  deadline even inside a long sympy call (its watchdog thread interrupts the
  main thread).  When the real command is stuck in compiled code two seconds
  past the limit, the process ends with the same message and exit status 7.
* Progress: every stage that runs for more than a second is announced on
  standard error, when it is a terminal and ``-q`` is not given.
* Ctrl-C raises ``KeyboardInterrupt`` in the main thread (exit status 130);
  if the main thread does not answer within a second (compiled code), the
  process ends with status 130 at once.  The hard exits apply to the real
  command only, not to ``main(argv)`` called from Python.
"""

from __future__ import annotations

import argparse
import os
import signal
import socket
import sys
import threading
from contextlib import contextmanager
from typing import Any

from .support import is_terminal
from ..budget import time_limit

__all__ = ["command_guard", "EXIT_INTERRUPTED", "EXIT_OVERDUE"]

EXIT_INTERRUPTED = 130
#: the exit status of a budget that could not be stopped in time (as ComputationLimitError)
EXIT_OVERDUE = 7
_GRACE = 1.0


def _progress(text: str) -> None:
    print(f"criticality:   {text}", file=sys.stderr, flush=True)


def _overdue(message: str) -> None:
    try:
        print(f"criticality: error: {message}", file=sys.stderr, flush=True)
    finally:
        os._exit(EXIT_OVERDUE)


@contextmanager
def command_guard(args: argparse.Namespace, *, hard: bool = False) -> Any:
    """Run a subcommand handler under its budget, with progress and (for the
    real command, ``hard``) the Ctrl-C and overdue exits."""
    limit = getattr(args, "time_limit", None) if getattr(args, "command_budget", False) else None
    quiet = bool(getattr(args, "quiet", False))
    progress = _progress if not quiet and is_terminal(sys.stderr) else None
    with _interrupt_guard(hard):
        with time_limit(limit, f"the {getattr(args, 'command', None) or 'command'} command",
                        progress=progress, on_overdue=_overdue if hard else None):
            yield


@contextmanager
def _interrupt_guard(hard: bool):
    """End the process one second after Ctrl-C if the main thread is stuck."""
    if not hard or threading.current_thread() is not threading.main_thread():
        yield
        return
    reader, writer = socket.socketpair()
    writer.setblocking(False)
    finished = threading.Event()
    try:
        previous = signal.set_wakeup_fd(writer.fileno(), warn_on_full_buffer=False)
    except (ValueError, OSError):
        reader.close()
        writer.close()
        yield
        return
    watcher = threading.Thread(target=_watch_interrupts, args=(reader, finished), daemon=True,
                               name="criticality-interrupt")
    watcher.start()
    try:
        yield
    finally:
        finished.set()
        signal.set_wakeup_fd(previous)
        writer.close()


def _watch_interrupts(reader, finished: threading.Event) -> None:
    try:
        while not finished.is_set():
            data = reader.recv(16)
            if not data or finished.is_set():
                return
            if signal.SIGINT in data and not finished.wait(_GRACE):
                print("criticality: interrupted", file=sys.stderr, flush=True)
                os._exit(EXIT_INTERRUPTED)
    except OSError:
        return
    finally:
        reader.close()
