"""Helpers of the command line: argument types, progress, input and output.

Pipeline place: **command line** (with :mod:`criticality.cli.main`).  No
mathematics: these functions turn text from the command line into the
arguments of library calls, read the model, report slow stages on standard
error and write files atomically.
"""

from __future__ import annotations

import argparse
import os
import sys
import threading
import time
import warnings
from contextlib import contextmanager
from typing import Any, Iterable, Iterator

from ..errors import NameTypoWarning, OutputError

__all__ = ["pairs", "split_top_level", "equilibrium_choice", "name_list", "eliminate_option",
           "Stage",
           "read_model", "typo_warnings", "write_output", "is_terminal", "EQUILIBRIUM_WORDS"]

#: equilibrium choices that ask the engine to solve and select
EQUILIBRIUM_WORDS = ("positive", "nonnegative", "nonzero")


def split_top_level(text: str) -> list:
    """Split at commas outside parentheses.

    >>> split_top_level("x=0, y=sqrt(b*(r-1)), z=f(1,2)")
    ['x=0', 'y=sqrt(b*(r-1))', 'z=f(1,2)']
    """
    parts: list[str] = []
    depth = 0
    current: list[str] = []
    for ch in text:
        if ch == "," and depth == 0:
            parts.append("".join(current))
            current = []
            continue
        depth += (ch == "(") - (ch == ")")
        current.append(ch)
    parts.append("".join(current))
    return [p for p in (x.strip() for x in parts) if p]


def pairs(items: Iterable[str], what: str) -> dict:
    """``NAME=VALUE`` items (each may hold several, comma-separated) as a dict.

    Raises
    ------
    argparse.ArgumentTypeError
        For an item without ``=``, an empty name or value, or a repeated name.
    """
    out = {}
    for item in items:
        for piece in split_top_level(item):
            name, sep, value = piece.partition("=")
            name, value = name.strip(), value.strip()
            if not sep or not name or not value:
                raise argparse.ArgumentTypeError(
                    f"{what}: expected NAME=VALUE, got {piece!r}")
            if name in out:
                raise argparse.ArgumentTypeError(f"{what}: {name!r} is given twice")
            out[name] = value
    return out


def equilibrium_choice(text: str) -> Any:
    """The ``--equilibrium`` value: a mapping, an index or a sign word.

    >>> equilibrium_choice("x=0, y=1/2"), equilibrium_choice("2"), equilibrium_choice("positive")
    ({'x': '0', 'y': '1/2'}, 2, 'positive')
    """
    text = text.strip()
    if text.isdigit():
        return int(text)
    if text in EQUILIBRIUM_WORDS:
        return text
    if "=" in text:
        return pairs([text], "--equilibrium")
    raise argparse.ArgumentTypeError(
        f"--equilibrium: expected STATE=EXPR pairs (\"x=0, y=0\"), an index (0, 1, ...) or one "
        f"of {', '.join(EQUILIBRIUM_WORDS)}; got {text!r}")


def name_list(text: str) -> list:
    """A comma-separated list of names (``--eliminate k,T0``)."""
    names = [n.strip() for n in text.split(",") if n.strip()]
    if not names:
        raise argparse.ArgumentTypeError("expected one or more names separated by commas")
    return names


def eliminate_option(text: str) -> list | str:
    """``--eliminate``: comma-separated names, or ``auto`` (the engine finds
    a linear or triangular set)."""
    return "auto" if text.strip() == "auto" else name_list(text)


class Stage:
    """Report a stage on standard error when it takes more than ``after``
    seconds: its name when the time passes, then the elapsed time at its end.

    Use as ``with Stage("analysing", quiet=False): ...``.
    """

    def __init__(self, name: str, *, quiet: bool = False, after: float = 1.0,
                 stream: Any = None) -> None:
        self.name, self.quiet, self.after = name, quiet, after
        self.stream = stream
        self._timer = None
        self._announced = False
        self._start = 0.0

    def _announce(self):
        self._announced = True
        print(f"criticality: {self.name} ...", file=self.stream or sys.stderr, flush=True)

    def __enter__(self):
        from ..budget import reporting, stage

        self._start = time.perf_counter()
        if self.stream is None and not is_terminal(sys.stderr):
            self.quiet = True  # progress only for a person watching
        stage(self.name)
        if not self.quiet and not reporting():  # else the budget announces the stages
            self._timer = threading.Timer(self.after, self._announce)
            self._timer.daemon = True
            self._timer.start()
        return self

    def __exit__(self, *exc):
        if self._timer is not None:
            self._timer.cancel()
        elapsed = time.perf_counter() - self._start
        if not self.quiet and (self._announced or elapsed > self.after):
            state = "done" if exc[0] is None else "stopped"
            print(f"criticality: {self.name} {state} in {elapsed:.1f} s",
                  file=self.stream or sys.stderr, flush=True)
        return False


def is_terminal(stream: Any) -> bool:
    try:
        return bool(stream.isatty())
    except (AttributeError, ValueError, OSError):
        return False


def _read_stdin(stdin=None) -> str:
    """Standard input, capped like a model file (a stream of zeros must not
    fill the memory)."""
    from ..errors import ModelFileError, ModelFileSyntaxError
    from ..model.toml_file import MAX_FILE_CHARS

    stream = stdin if stdin is not None else sys.stdin
    cap = 4 * MAX_FILE_CHARS
    raw = getattr(stream, "buffer", None)
    data = (raw if raw is not None else stream).read(cap + 1)
    if len(data) > cap:
        raise ModelFileError(f"standard input holds more than {cap // 1_000_000} MB; a model "
                             "file is at most that long")
    if isinstance(data, bytes):
        raw_bytes: bytes = data
        try:
            data = raw_bytes.decode("utf-8")
        except UnicodeDecodeError as exc:
            line = raw_bytes[:exc.start].count(b"\n") + 1
            raise ModelFileSyntaxError(f"standard input is not UTF-8 text (byte {exc.start}, "
                                       f"line {line})", source="<stdin>", line=line) from None
    return data


def read_model(path: str, *, stdin: Any = None) -> Any:
    """The model in ``path`` (``"-"``: standard input)."""
    from ..model.core import Model

    with typo_warnings():
        if path == "-":
            return Model.from_text(_read_stdin(stdin), source="<stdin>")
        return Model.from_file(path)


@contextmanager
def typo_warnings(prefix: str = "") -> Iterator[None]:
    """Show the library's NameTypoWarning as ``criticality: warning: ...``
    lines on standard error (other warnings pass on unchanged)."""
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", NameTypoWarning)
        try:
            yield
        finally:
            shown = set()
            for w in caught:
                if not issubclass(w.category, NameTypoWarning):
                    warnings.warn_explicit(w.message, w.category, w.filename, w.lineno)
                elif str(w.message) not in shown:
                    shown.add(str(w.message))
                    print(f"criticality: warning: {prefix}{w.message}", file=sys.stderr)


@contextmanager
def _os_errors(path: str):
    try:
        yield
    except OSError as exc:
        raise OutputError(f"cannot write {path}: {exc.strerror or exc}") from None


def write_output(text: str, path: str | None, *, force: bool = False,
                 stdout: Any = None) -> str | None:
    """Write ``text`` to ``path`` atomically (temporary file in the same
    folder, then :func:`os.replace`), or to standard output for None or
    ``"-"``.  An existing file is kept unless ``force``
    (:class:`~criticality.errors.OutputExistsError`)."""
    if path is None or path == "-":
        (stdout or sys.stdout).write(text)
        return None
    from ..files import write_text_atomic

    with _os_errors(path):
        write_text_atomic(os.fspath(path), text, force=force)
    return path
