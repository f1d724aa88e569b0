"""Notebook displays: ``_repr_html_`` and ``_repr_markdown_`` of every
result kind.

Pipeline place: result -> **HTML / Markdown** (Jupyter calls the result's
``_repr_html_`` or ``_repr_markdown_``, which ask the renderer registry).

The HTML is a table of the main quantities (expressions in the model syntax,
escaped), then the verdict, the conditions with their status and one line of
cautions.  The Markdown is the same table with the expressions as inline
LaTeX (``$...$``), which Jupyter typesets.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Sequence

import html

import mpmath
import sympy

from .latex_expr import latex_name
from ..algebra.canonical import compact
from .render import model_text
from ..renderers import register_renderer

if TYPE_CHECKING:
    from ..hopf_analysis.results import HopfResult

__all__ = ["html_table", "markdown_table", "hopf_rows"]

_SHORT_CAUTION = ("The analysis is local to the bifurcation point; a subcritical result means an "
                  "abrupt, hysteretic onset; verify before relying on it, and defer to applicable "
                  "codes and licensed engineering practice.")


def _plain(value) -> str:
    if value is None:
        return "-"
    if isinstance(value, (mpmath.mpf, mpmath.mpc)):
        return mpmath.nstr(value, 15)
    if isinstance(value, sympy.Basic):
        return model_text(compact(value))
    if isinstance(value, dict):
        return ", ".join(f"{k} = {_plain(v)}" for k, v in value.items())
    if isinstance(value, (tuple, list)):
        return "(" + ", ".join(_plain(v) for v in value) + ")"
    return str(value)


def _tex(value) -> str:
    if value is None:
        return "-"
    if isinstance(value, (mpmath.mpf, mpmath.mpc)):
        return mpmath.nstr(value, 15)
    if isinstance(value, sympy.Basic):
        names = {s: sympy.Symbol(latex_name(s.name)) for s in value.free_symbols
                 if isinstance(s, sympy.Symbol)}
        text = sympy.latex(compact(value).xreplace(names))
        return "$" + text.replace("|", "\\vert ") + "$"
    if isinstance(value, dict):
        return ", ".join(f"{k} = {_tex(v)}" for k, v in value.items())
    if isinstance(value, (tuple, list)):
        return "(" + ", ".join(_tex(v) for v in value) + ")"
    return str(value).replace("|", "\\|")


def html_table(title: str, rows: Sequence[tuple], paragraphs: Sequence[str] = ()) -> str:
    """``rows`` of ``(label, value)`` as an HTML table under a heading."""
    body = "".join(f"<tr><th style=\"text-align:left\">{html.escape(label)}</th>"
                   f"<td style=\"text-align:left\"><code>{html.escape(_plain(value))}</code>"
                   "</td></tr>" for label, value in rows)
    extra = "".join(f"<p>{html.escape(p)}</p>" for p in paragraphs)
    return (f"<div class=\"criticality-result\"><strong>{html.escape(title)}</strong>"
            f"<table>{body}</table>{extra}</div>")


def _cell(text: str) -> str:
    return str(text).replace("|", "\\|")


def markdown_table(title: str, rows: Sequence[tuple], paragraphs: Sequence[str] = ()) -> str:
    """``rows`` of ``(label, value)`` as a Markdown table, values in LaTeX."""
    lines = [f"**{title}**", "", "| quantity | value |", "|---|---|"]
    lines += [f"| {_cell(label)} | {_tex(value)} |" for label, value in rows]
    return "\n".join(lines + [""] + [f"{p}\n" for p in paragraphs]).rstrip() + "\n"


def hopf_rows(result: HopfResult) -> list:
    """The main quantities of a Hopf result, as ``(label, value)``."""
    name = result.parameter
    rows = [(f"critical value {name}_c", result.critical_value),
            ("frequency omega", result.omega), ("period 2 pi / omega", result.period),
            (f"transversality Re d lambda / d {name}", result.transversality),
            ("first Lyapunov coefficient l1", result.l1)]
    for k, c in enumerate(result.lyapunov_coefficients[1:], start=2):
        rows.append((f"Lyapunov coefficient l{k}", c))
    rows.append(("classification", str(result.classification)))
    if result.supercritical_where is not None:
        rows.append(("supercritical exactly where", result.supercritical_where))
    for c in result.conditions:
        rel = (sympy.StrictGreaterThan(c.expr, 0, evaluate=False) if c.relation == ">"
               else sympy.Ne(c.expr, 0, evaluate=False))
        rows.append((f"[{c.status}] {c.description}", rel))
    return rows


def _hopf_paragraphs(result) -> list:
    return [f"Verdict: {result.verdict}.", _SHORT_CAUTION]


def _hopf_title(result) -> str:
    model = getattr(result.model, "name", None)
    return (f"Hopf bifurcation of {model!r}" if model else "Hopf bifurcation") + \
        f" in {result.parameter} ({result.status})"


register_renderer("hopf", "html", lambda r, **kw: html_table(
    _hopf_title(r), hopf_rows(r), _hopf_paragraphs(r)))
register_renderer("hopf", "markdown", lambda r, **kw: markdown_table(
    _hopf_title(r), hopf_rows(r), _hopf_paragraphs(r)))


# -- the fold, Bautin and Bogdanov-Takens results (they list their rows) -----------------------

_TITLES = {"fold": lambda r: f"{r.kind.capitalize()} point in {r.parameter}",
           "bautin": lambda r: f"Bautin point on the Hopf set of {r.parameter}",
           "bogdanov_takens": lambda r: f"Bogdanov-Takens point in ({', '.join(r.parameters)})",
           "flip": lambda r: f"Flip (period doubling) of a map in {r.parameter}",
           "neimark_sacker": lambda r: f"Neimark-Sacker point of a map in {r.parameter}",
           "fold_hopf": lambda r: f"Fold-Hopf point in ({', '.join(r.parameters)})",
           "hopf_hopf": lambda r: f"Hopf-Hopf point in ({', '.join(r.parameters)})"}


def _listed(kind: str) -> None:
    title = _TITLES[kind]

    def rows(r):
        return [(label, value) for _, label, value in r.rows()]

    def notebook_latex(r, **kw):
        body = " \\\\\n".join(f"\\text{{{label}}} &: {_tex(v).strip('$')}"
                              for label, v in rows(r) if isinstance(v, sympy.Basic))
        return "$$\\begin{aligned}\n" + body + "\n\\end{aligned}$$"

    register_renderer(kind, "html", lambda r, **kw: html_table(title(r), rows(r), [_SHORT_CAUTION]))
    register_renderer(kind, "markdown",
                      lambda r, **kw: markdown_table(title(r), rows(r), [_SHORT_CAUTION]))
    register_renderer(kind, "notebook_latex", notebook_latex)


for _kind in _TITLES:
    _listed(_kind)


# -- a Hopf result evaluated at a point ---------------------------------------------------------

def _numeric_rows(n) -> list:
    rows = [("critical value", n.critical_value), ("omega", n.omega), ("period", n.period),
            ("transversality", n.transversality), ("l1", n.l1),
            ("classification", n.classification),
            ("|lambda - i omega| (numeric check)", n.pair_error),
            ("other eigenvalues stable", n.others_stable)]
    return rows


def _numeric_title(n) -> str:
    point = ", ".join(f"{k} = {_plain(v)}" for k, v in n.values.items())
    return f"Hopf quantities at {point or 'the model defaults'} ({n.digits} digits)"


register_renderer("hopf_numeric_point", "html",
                  lambda n, **kw: html_table(_numeric_title(n), _numeric_rows(n)))
register_renderer("hopf_numeric_point", "markdown",
                  lambda n, **kw: markdown_table(_numeric_title(n), _numeric_rows(n)))


# -- a simulation check --------------------------------------------------------------------------

def _validation_rows(v) -> list:
    return [("parameter", v.parameter), ("critical value", v.critical_value),
            ("omega", v.omega), ("l1", v.l1), ("classification", v.classification),
            ("verdict", v.verdict), ("integrator", f"{v.method}, rtol {v.rtol:.0e}")]


register_renderer("validation", "html", lambda v, **kw: html_table(
    "Simulation check of the Hopf prediction", _validation_rows(v), list(v.reasons)))
register_renderer("validation", "markdown", lambda v, **kw: markdown_table(
    "Simulation check of the Hopf prediction", _validation_rows(v), list(v.reasons)))
