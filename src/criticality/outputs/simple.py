"""Plain renderers for the results listed by rows: fold, Bautin,
Bogdanov-Takens, the map bifurcations (flip, Neimark-Sacker), fold-Hopf and
Hopf-Hopf.

Pipeline place: result -> **text, LaTeX, JSON**.  A result lists its rows
``(key, label, value)``; values are sympy expressions, strings, numbers or
None.  Rendering is pure (strings in, strings out).
"""

from __future__ import annotations

from typing import Any, Sequence

import json

import sympy

from .envelope import SCHEMA_VERSION, envelope
from .escape import tex_text
from .render import CAUTIONS
from ..renderers import register_renderer

__all__ = ["render_text", "render_latex", "render_json", "SCHEMA_VERSION"]


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


def render_text(title: str, rows: Sequence[tuple], notes: Sequence[str] = (),
                conventions: Sequence[str] = (), cautions: Sequence[str] = CAUTIONS) -> str:
    """A two-column table, then notes, conventions and cautions."""
    width = max((len(label) for _, label, _ in rows), default=0)
    lines = [title, "=" * len(title)]
    lines += [f"{label.ljust(width)}  {_text(value)}" for _, label, value in rows]
    if notes:
        lines += ["", "Notes:"] + [f"  - {n}" for n in notes]
    if conventions:
        lines += ["", "Conventions:"] + [f"  - {c}" for c in conventions]
    if cautions:
        lines += ["", "Cautions:"] + [f"  - {c}" for c in cautions]
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
    return r"\text{" + tex_text(str(value)) + "}"


def render_latex(title: str, rows: Sequence[tuple]) -> str:
    """An ``align*`` environment with one line per quantity."""
    body = " \\\\\n".join(f"  \\text{{{tex_text(label)}}} &: {_latex_value(value)}"
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


def render_dict(kind: str, rows: Sequence[tuple], notes: Sequence[str] = (),
                conventions: Sequence[str] = (), status: str = "closed form") -> dict:
    """The document of a result listed by rows, in the shared envelope."""
    return envelope(f"criticality.{kind}", kind,
                    {"quantities": {key: _json_value(value) for key, _, value in rows}},
                    status=status, conventions=list(conventions), notes=notes)


def render_json(kind: str, rows: Sequence[tuple], notes: Sequence[str] = (),
                conventions: Sequence[str] = (), **kwargs: Any) -> str:
    """Every quantity as a string under its key, with the conventions, in
    the shared envelope (:mod:`criticality.outputs.envelope`)."""
    doc = render_dict(kind, rows, notes, conventions)
    return json.dumps(doc, indent=kwargs.get("indent", 2), sort_keys=False)


# -- the renderers of the kinds listed by rows ----------------------------

_TITLES = {
    "fold": (lambda r: f"{r.kind.capitalize()} point in '{r.parameter}'",
             lambda r: f"{r.kind} point"),
    "bautin": (lambda r: f"Bautin point on the Hopf set of '{r.parameter}'",
               lambda r: "Bautin point"),
    "bogdanov_takens": (lambda r: f"Bogdanov-Takens point in ({', '.join(r.parameters)})",
                        lambda r: "Bogdanov-Takens point"),
    "flip": (lambda r: f"Flip (period doubling) of a map in '{r.parameter}'",
             lambda r: "flip point of a map"),
    "neimark_sacker": (lambda r: f"Neimark-Sacker point of a map in '{r.parameter}'",
                       lambda r: "Neimark-Sacker point of a map"),
    "fold_hopf": (lambda r: f"Fold-Hopf point in ({', '.join(r.parameters)})",
                  lambda r: "fold-Hopf point"),
    "hopf_hopf": (lambda r: f"Hopf-Hopf point in ({', '.join(r.parameters)})",
                  lambda r: "Hopf-Hopf point"),
}


def _register(kind: str) -> None:
    text_title, latex_title = _TITLES[kind]
    register_renderer(kind, "text", lambda r, **kw: render_text(
        text_title(r), r.rows(), r.notes, r.conventions))
    register_renderer(kind, "details", lambda r, **kw: render_text(
        text_title(r), r.rows(), r.notes, r.conventions))
    register_renderer(kind, "latex", lambda r, **kw: render_latex(latex_title(r), r.rows()))
    register_renderer(kind, "json", lambda r, **kw: render_json(
        kind, r.rows(), r.notes, r.conventions, **kw))
    register_renderer(kind, "dict", lambda r, **kw: render_dict(
        kind, r.rows(), r.notes, r.conventions))


for _kind in _TITLES:
    _register(_kind)
