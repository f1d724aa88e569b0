"""The accepted range of every numeric command-line value, in one place.

Pipeline place: **command line** (argument types).  Each function here is an
``argparse`` type: it turns the text of one option into a value or raises
:class:`argparse.ArgumentTypeError` with the range accepted (argparse puts
the option's name in front), so a value out of range ends in exit status 2 before any
work starts (never deep inside the library).

The bounds are practical, not mathematical: beyond them a run would only
exhaust memory or time (a 10^8-point curve, a 10^5-dpi picture, an order
99999 normal form) or lose every digit (a range near the largest float).
"""

from __future__ import annotations

import argparse
import math
from typing import Any, Callable

__all__ = ["DEFAULT_TIME_LIMIT", "integer", "real", "real_list", "time_limit_value", "range_bound", "OrderedPair",
           "WIDTH", "DPI", "SIZE", "POINTS", "RANGE_BOUND", "OFFSETS", "TOLERANCE",
           "MAX_PERIODS", "ORDER", "BRANCH", "DIGITS", "TIME_LIMIT", "MAX_PIXELS"]

#: default budget of one command, in seconds (``--time-limit none`` lifts it)
DEFAULT_TIME_LIMIT = 600.0

#: (low, high) of each option, inclusive
WIDTH = (20, 10_000)
DPI = (10, 1200)
SIZE = (0.5, 100.0)
POINTS = (2, 100_000)
RANGE_BOUND = 1e15
OFFSETS = (1e-6, 1e3)
TOLERANCE = (1e-6, 10.0)
MAX_PERIODS = (1, 1_000_000)
ORDER = (3, 15)
BRANCH = (0, 10_000)
DIGITS = (1, 4000)
TIME_LIMIT = (0.001, 1e7)
#: the largest picture, width x height in pixels (--size times --dpi squared)
MAX_PIXELS = 100_000_000


def _number(text: str, kind, what: str):
    try:
        value = kind(text.strip())
    except (TypeError, ValueError, OverflowError):
        raise argparse.ArgumentTypeError(f"expected {what}, got {text!r}") from None
    if isinstance(value, float) and not math.isfinite(value):
        raise argparse.ArgumentTypeError(f"expected a finite number, got {text!r}")
    return value


def integer(option: str, bounds: tuple, *, odd: bool = False) -> Callable[[str], int]:
    """An argparse type: an integer within ``bounds`` (inclusive)."""
    low, high = bounds

    def parse(text: str) -> int:
        value = _number(text, int, "an integer")
        if not low <= value <= high or (odd and value % 2 == 0):
            kind = "an odd integer" if odd else "an integer"
            raise argparse.ArgumentTypeError(
                f"expected {kind} from {low} to {high}, got {text!r}")
        return value

    parse.__name__ = option  # argparse names the type in its own messages
    return parse


def real(option: str, bounds: tuple) -> Callable[[str], float]:
    """An argparse type: a finite number within ``bounds`` (inclusive)."""
    low, high = bounds

    def parse(text: str) -> float:
        value = _number(text, float, "a number")
        if not low <= value <= high:
            raise argparse.ArgumentTypeError(
                f"expected a number from {low:g} to {high:g}, got {text!r}")
        return value

    parse.__name__ = option
    return parse


def real_list(option: str, bounds: tuple, *,
              signed: bool = False) -> Callable[[str], tuple]:
    """An argparse type: comma-separated numbers, each within ``bounds`` (in
    magnitude when ``signed``)."""
    one = real(option, bounds)

    def parse(text: str) -> tuple:
        items = [t.strip() for t in text.split(",") if t.strip()]
        if not items:
            raise argparse.ArgumentTypeError(f"expected comma-separated numbers, got {text!r}")
        if not signed:
            return tuple(one(t) for t in items)
        out = []
        for t in items:
            value = one(t.lstrip("-+") or t)
            out.append(-value if t.startswith("-") else value)
        return tuple(out)

    parse.__name__ = option
    return parse


def time_limit_value(text: str) -> float | None:
    """``--time-limit``: seconds, or ``none`` for no limit."""
    if text.strip().lower() in ("none", "off", "no"):
        return None
    try:
        return real("--time-limit", TIME_LIMIT)(text)
    except argparse.ArgumentTypeError as exc:
        raise argparse.ArgumentTypeError(f"{exc} (seconds, or none for no limit)") from None


def range_bound(option: str) -> Callable[[str], float]:
    """The type of each number of ``--x-range``/``--y-range``."""
    return real(option, (-RANGE_BOUND, RANGE_BOUND))


class OrderedPair(argparse.Action):
    """``--x-range LOW HIGH`` (with ``type=range_bound(...)``): LOW < HIGH,
    with a spread that floating point can resolve."""

    def __call__(self, parser: argparse.ArgumentParser, namespace: argparse.Namespace,
                 values: Any, option_string: str | None = None) -> None:
        option = option_string or self.dest
        low, high = values
        if not low < high or (high - low) <= 1e-9 * max(abs(low), abs(high)):
            parser.error(f"{option}: expected LOW < HIGH (numbers from {-RANGE_BOUND:g} to "
                         f"{RANGE_BOUND:g}, LOW and HIGH distinguishable); got {low!r} {high!r}")
        setattr(namespace, self.dest, (low, high))
