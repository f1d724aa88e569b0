"""TOML model files: reading with line numbers, and writing.

Internal to :mod:`criticality.model.core` (see ``docs/model-files.md`` for the
schema).  Reading checks the top-level keys, finds the file line of every key
by scanning the text, and hands the pieces to the model's validation, which
reports every problem with its line.  Writing produces a file that reads back
to an equal model.
"""

from __future__ import annotations

import os
import re
import sys
from typing import Any

from .syntax import _suggest
from ..errors import InvalidModelFileError, ModelFileError, ModelFileSyntaxError
from .expressions import format_expression

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover - exercised on Python 3.10 only
    import tomli as tomllib

__all__ = ["read_model_text", "read_model_file", "model_to_toml", "MAX_FILE_CHARS", "TOP_KEYS"]

#: largest model file read, in characters
MAX_FILE_CHARS = 1_000_000
#: the keys a model file may have at its top level
TOP_KEYS = ("name", "description", "states", "bifurcation_parameter", "parameters",
            "equations", "equilibrium", "units", "kind")
_BARE = r"[A-Za-z0-9_-]+"
_PART = rf'(?:{_BARE}|"[^"]*"|\'[^\']*\')'
_KEY = re.compile(rf"({_PART}(?:\s*\.\s*{_PART})*)\s*=")
_HEADER = re.compile(rf"\[\[?\s*({_PART}(?:\s*\.\s*{_PART})*)\s*\]")
_PIECES = re.compile(rf'"([^"]*)"|\'([^\']*)\'|({_BARE})')
_AT = re.compile(r"\(at line (\d+), column (\d+)\)")


def _key_path(text: str) -> tuple[str, ...]:
    return tuple(next(g for g in m.groups() if g is not None) for m in _PIECES.finditer(text))


class _KeyLines:
    """The line of every key in a TOML text (found by scanning, not by the reader)."""

    def __init__(self, text: str):
        self.keys: dict[tuple, int] = {}
        self.values: dict[tuple, int] = {}
        table: tuple = ()
        open_quote = None
        for number, raw in enumerate(text.split("\n"), 1):
            line = raw.strip()
            if open_quote is not None:
                if line.count(open_quote) % 2 == 1:
                    open_quote = None
                continue
            if not line or line.startswith("#"):
                continue
            header = _HEADER.match(line)
            if header is not None:
                table = _key_path(header.group(1))
                self.keys.setdefault(table, number)
                continue
            key = _KEY.match(line)
            if key is None:
                continue
            path = table + _key_path(key.group(1))
            self.keys.setdefault(path, number)
            rest = line[key.end():].strip()
            value_line = number
            for quote in ('"""', "'''"):
                if rest.startswith(quote):
                    if rest.count(quote) == 1:
                        open_quote = quote
                    value_line = number + 1 if rest == quote else number
            self.values.setdefault(path, value_line)

    def locate(self, section: str, key: str | None = None, value: bool = False) -> int | None:
        """Line of ``section.key`` (of its value when ``value``), else of the section."""
        path = (section,) if key is None else (section, str(key))
        line = (self.values if value else self.keys).get(path) or self.keys.get(path)
        if line is None and key is not None:
            line = self.keys.get((section,))
        return line

    def equation_lines(self) -> dict[str, int]:
        return {path[1]: n for path, n in self.values.items()
                if len(path) == 2 and path[0] == "equations"}


def _load(text: str, source: str) -> dict:
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        message = str(exc)
        found = _AT.search(message)
        line, column = (int(found.group(1)), int(found.group(2))) if found else (None, None)
        where = f" at line {line}, column {column}" if found else ""
        reason = _AT.sub("", message).strip()
        raise ModelFileSyntaxError(f"{source} is not valid TOML{where}: {reason}",
                                   source=source, line=line, column=column) from None
    except (RecursionError, MemoryError):
        raise ModelFileSyntaxError(f"{source} is not a readable TOML model file (its "
                                   "values are nested too deeply)", source=source) from None


def read_model_text(cls: Any, text: str, source: str | None = None) -> Any:
    """Build ``cls`` (the Model class) from the text of a model file."""
    source = source or "<text>"
    if not isinstance(text, str):
        raise ModelFileError(f"{source}: expected the text of a model file, found "
                             f"{type(text).__name__}")
    if len(text) > MAX_FILE_CHARS:
        raise ModelFileError(f"{source} has {len(text)} characters; model files are limited "
                             f"to {MAX_FILE_CHARS}")
    data = _load(text, source)
    lines = _KeyLines(text)
    problems = []
    for key in data:
        if key not in TOP_KEYS:
            close = _suggest(key, TOP_KEYS)
            hint = f"did you mean {close[0]!r}? " if close else ""
            at = lines.locate(key)
            problems.append(f"{f'line {at}: ' if at else ''}unknown key {key!r}; {hint}"
                            f"(allowed: {', '.join(TOP_KEYS)})")
    if "states" not in data:
        problems.append("missing key 'states' (the ordered list of state names, e.g. "
                        "states = [\"x\", \"y\"])")
    pieces = {key: data.get(key) for key in TOP_KEYS if key != "states"}
    pieces["states"] = data.get("states", [])
    pieces["equations"] = data.get("equations", {})
    return cls._from_pieces(pieces, source=source, locate=lines.locate, problems=problems,
                            lines=lines.equation_lines(), error=InvalidModelFileError)


def read_model_file(cls: Any, path: str | os.PathLike[str]) -> Any:
    """Build ``cls`` from a model file on disk."""
    try:
        name = os.fspath(path)
        _check_regular(name)
        with open(name, "rb") as handle:
            data = handle.read(4 * MAX_FILE_CHARS + 1)
    except TypeError:
        raise ModelFileError(f"expected a file path, found {type(path).__name__}") from None
    except ValueError:  # a NUL byte, which no file name can hold
        raise ModelFileError(f"the model file path {str(path)!r} contains a NUL character; "
                             "no file has such a name") from None
    except FileNotFoundError:
        raise ModelFileError(f"model file {str(path)!r} not found") from None
    except OSError as exc:
        raise ModelFileError(f"cannot read model file {str(path)!r}: "
                             f"{exc.strerror or exc}") from None
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = data[:exc.start].count(b"\n") + 1
        raise ModelFileSyntaxError(f"{name} is not UTF-8 text (byte {exc.start}, line {line})",
                                   source=name, line=line) from None
    return read_model_text(cls, text, name)


def _check_regular(name: str) -> None:
    """A model path must name a regular file (after links): a named pipe would
    block the reader and a device never ends."""
    import stat

    try:
        info = os.stat(name)
    except (OSError, TypeError, ValueError):
        return  # open() reports a missing or unusable path
    if stat.S_ISDIR(info.st_mode):
        raise ModelFileError(f"cannot read model file {str(name)!r}: it is a folder")
    if not stat.S_ISREG(info.st_mode):
        raise ModelFileError(f"cannot read model file {str(name)!r}: it is not a regular file "
                             "(a named pipe or a device); on the command line, pass - to read "
                             "standard input")


# -- writing --------------------------------------------------------------------

_ESCAPES = {'"': '\\"', "\\": "\\\\", "\n": "\\n", "\t": "\\t", "\r": "\\r", "\b": "\\b",
            "\f": "\\f"}


def _string(text: str) -> str:
    """A TOML basic string."""
    out = []
    for ch in text:
        if ch in _ESCAPES:
            out.append(_ESCAPES[ch])
        elif ord(ch) < 32 or ord(ch) == 127:
            out.append(f"\\u{ord(ch):04X}")
        else:
            out.append(ch)
    return '"' + "".join(out) + '"'


def _parameter_entry(parameter) -> str:
    if parameter.default is None and parameter.description is None and parameter.unit is None:
        return _string(parameter.assumption)
    fields = [f"assume = {_string(parameter.assumption)}"]
    if parameter.default is not None:
        fields.append(f"value = {_string(format_expression(parameter.default))}")
    if parameter.description is not None:
        fields.append(f"description = {_string(parameter.description)}")
    if parameter.unit is not None:
        fields.append(f"unit = {_string(parameter.unit)}")
    return "{ " + ", ".join(fields) + " }"


def model_to_toml(model: Any) -> str:
    """The text of a model file that reads back to ``model``."""
    out = ["# criticality model file (TOML); the schema is in docs/model-files.md"]
    if model.name is not None:
        out.append(f"name = {_string(model.name)}")
    if model.description is not None:
        out.append(f"description = {_string(model.description)}")
    if getattr(model, "kind", "flow") != "flow":
        out.append(f"kind = {_string(model.kind)}")
    out.append("states = [" + ", ".join(map(_string, model.states)) + "]")
    if model.bifurcation_parameter is not None:
        out.append(f"bifurcation_parameter = {_string(model.bifurcation_parameter)}")
    declared = [p for p in model.parameters if p.declared]
    undeclared = [p.name for p in model.parameters if not p.declared]
    if declared or undeclared:
        out += ["", "[parameters]"]
        out += [f"{p.name} = {_parameter_entry(p)}" for p in declared]
        if undeclared:
            out.append("# used in the equations without a declaration (read as real): "
                       + ", ".join(undeclared))
    out += ["", "[equations]"]
    out += [f"{s} = {_string(format_expression(e))}" for s, e in zip(model.states, model.equations)]
    if model.equilibrium_hint is not None:
        out += ["", "[equilibrium]"]
        out += [f"{s} = {_string(format_expression(v))}" for s, v in model.equilibrium_hint.items()]
    units = getattr(model, "state_units", None) or {}
    if units:
        out += ["", "[units]"]
        out += [f"{s} = {_string(u)}" for s, u in units.items()]
    return "\n".join(out) + "\n"
