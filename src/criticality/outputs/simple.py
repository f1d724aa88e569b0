"""Plain renderers for the fold, Bogdanov-Takens and Bautin results.

Pipeline place: result -> **text, LaTeX, JSON**.  A result lists its rows
``(key, label, value)``; values are sympy expressions, strings, numbers or
None.  Rendering is pure (strings in, strings out).
"""

from __future__ import annotations

import json

import sympy

__all__ = ["render_text", "render_latex", "render_json", "SCHEMA_VERSION"]

SCHEMA_VERSION = "1"


def _text(value) -> str:
    if value is None:
        return "-"
    if isinstance(value, sympy.Basic):
        return sympy.sstr(value)
    if isinstance(value, (tuple, list)):
        return "(" + ", ".join(_text(v) for v in value) + ")"
    if isinstance(value, dict):
        return ", ".join(f"{k} = {_text(v)}" for k, v in value.items())
    return str(value)


def render_text(title: str, rows, notes=(), conventions=()) -> str:
    """A two-column table, then notes and conventions."""
    width = max((len(label) for _, label, _ in rows), default=0)
    lines = [title, "=" * len(title)]
    lines += [f"{label.ljust(width)}  {_text(value)}" for _, label, value in rows]
    if notes:
        lines += ["", "Notes:"] + [f"  - {n}" for n in notes]
    if conventions:
        lines += ["", "Conventions:"] + [f"  - {c}" for c in conventions]
    return "\n".join(lines)


def _latex_value(value) -> str:
    if value is None:
        return r"\text{--}"
    if isinstance(value, sympy.Basic):
        return sympy.latex(value)
    if isinstance(value, (tuple, list)):
        return r"\left(" + ", ".join(_latex_value(v) for v in value) + r"\right)"
    if isinstance(value, dict):
        return ",\\ ".join(f"{sympy.latex(sympy.Symbol(str(k)))} = {_latex_value(v)}"
                           for k, v in value.items())
    return r"\text{" + _tex_text(str(value)) + "}"


def _tex_text(text: str) -> str:
    """Escape plain text for LaTeX text mode."""
    table = {"\\": r"\textbackslash{}", "&": r"\&", "%": r"\%", "$": r"\$", "#": r"\#",
             "_": r"\_", "{": r"\{", "}": r"\}", "^": r"\^{}", "~": r"\~{}",
             "<": r"\textless{}", ">": r"\textgreater{}"}
    return "".join(table.get(ch, ch) for ch in text)


def render_latex(title: str, rows) -> str:
    """An ``align*`` environment with one line per quantity."""
    body = " \\\\\n".join(f"  \\text{{{_tex_text(label)}}} &: {_latex_value(value)}"
                          for _, label, value in rows)
    return f"% {title}\n\\begin{{align*}}\n{body}\n\\end{{align*}}\n"


def _json_value(value):
    if value is None or isinstance(value, (bool, int)) and not isinstance(value, sympy.Basic):
        return value
    if isinstance(value, (tuple, list)):
        return [_json_value(v) for v in value]
    if isinstance(value, dict):
        return {str(k): _json_value(v) for k, v in value.items()}
    return _text(value)


def render_json(kind: str, rows, notes=(), conventions=(), **kwargs) -> str:
    """Every quantity as a string under its key, with the conventions."""
    doc = {"schema": f"criticality.{kind}", "schema_version": SCHEMA_VERSION,
           "quantities": {key: _json_value(value) for key, _, value in rows},
           "notes": list(notes), "conventions": list(conventions)}
    return json.dumps(doc, indent=kwargs.get("indent", 2), sort_keys=False)
