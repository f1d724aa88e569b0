"""Text, LaTeX and JSON of a delay Hopf result.

Pipeline place: result -> **outputs**.  Pure functions returning strings; the
result's methods call them (imported on use).  JSON: every quantity as a string
in the model syntax (``format_expression``; ``x(t - tau)`` for a delayed
state), in the envelope every kind shares (:mod:`criticality.outputs.envelope`,
schema ``criticality.hopf_delay``); :func:`read_delay_json` reads the
expressions back through the whitelisted parser.  The renderers are registered
for the result kind ``hopf_delay`` (:mod:`criticality.renderers`).
"""

from __future__ import annotations

from typing import Any, Mapping

import json

import sympy

from ..errors import ExpressionError, ModelFileError
from ..outputs.envelope import document_symbols, envelope, read_document
from ..outputs.escape import tex_text
from ..outputs.notebook import html_table, markdown_table
from ..renderers import register_renderer
from ..model.expressions import format_expression, parse_expression
from ..outputs.latex_expr import latex_name

#: a DelayHopfResult, typed loosely: the result imports this module at run time, and a
#: type-only import back would make the two modules import each other
ResultLike = Any

__all__ = ["summary_text", "latex_section", "latex_document", "latex_inline", "to_json",
           "result_to_dict", "read_delay_json", "SCHEMA", "SCHEMA_VERSION"]

SCHEMA = "criticality.hopf_delay"
SCHEMA_VERSION = 1
_CAUTION = ("The analysis is local: valid near the critical value and near the equilibrium. A "
            "subcritical result means an abrupt, hysteretic onset of large oscillations. Verify "
            "before relying on it (result.validate() simulates the delay equation), and defer to "
            "applicable codes and licensed engineering practice.")


def _text(expr) -> str:
    if isinstance(expr, bool) or expr is None:
        return str(expr)
    if isinstance(expr, sympy.logic.boolalg.BooleanAtom):
        return str(bool(expr))
    if isinstance(expr, sympy.core.relational.Relational):
        return f"{_text(expr.lhs)} {expr.rel_op} {_text(expr.rhs)}"
    try:
        return format_expression(sympy.sympify(expr, strict=True))
    except Exception:       # Piecewise, complex values: sympy's own text
        return sympy.sstr(expr)


def summary_text(r: ResultLike) -> str:
    mode = ("the delay is the bifurcation parameter" if r.mode == "delay"
            else "the delays are fixed")
    lines = [f"Hopf bifurcation of a retarded equation in {r.parameter!r} ({mode})",
             f"  equilibrium:          " + ", ".join(f"{s} = {_text(v)}"
                                                     for s, v in r.equilibrium.items()),
             f"  quasi-polynomial:     {sympy.sstr(r.quasi_polynomial)}",
             f"  frequency polynomial: F(s) = {_text(r.frequency_polynomial)}  (s = omega^2)",
             f"  omega:                {_text(r.omega)}",
             f"  first critical value: {r.parameter} = {_text(r.critical_value)}",
             f"  every critical value: {r.parameter}_j = {_text(r.critical_sequence)}, "
             "j = 0, 1, 2, ...",
             f"  crossing direction:   {_direction(r)}",
             f"  Re d lambda/d {r.parameter}:    {_text(r.transversality)}",
             f"  c1:                   {sympy.sstr(r.c1)}",
             f"  l1:                   {_text(r.l1)}",
             f"  verdict:              {r.classification}: {r.verdict}",
             f"  cycle:                exists {r.cycle.side} the critical value; period "
             f"{_text(r.cycle.period)}"]
    for state, k in r.cycle.amplitude_coefficients.items():
        lines.append(f"    amplitude of {state}: sqrt(({_text(k)}) ({r.parameter} - "
                     f"{r.parameter}_0))")
    if r.compact:
        lines.append("  in terms of omega and tau_0 (the values above):")
        for key, value in r.compact.items():
            lines.append(f"    {key} = {sympy.sstr(value)}")
    for c in r.conditions:
        lines.append(f"  condition:            {_text(c)}")
    for c in r.stability_conditions:
        lines.append(f"  stated:               {c}")
    lines.append(f"  routes agree:         {r.routes_agree} (projection form, "
                 "Hassard-Kazarinoff-Wan procedure)")
    lines.append("  conventions:")
    lines += [f"    - {c}" for c in r.conventions.lines()]
    lines.append("  caution: " + _CAUTION)
    return "\n".join(lines)


def _direction(r) -> str:
    if r.crossing_direction == 1:
        return "+1 (a pair crosses to the right as the parameter increases)"
    if r.crossing_direction == -1:
        return "-1 (a pair crosses to the left as the parameter increases)"
    return f"decided by the sign of {_text(r.crossing_indicator)}"


def _latex(expr) -> str:
    names = {}
    for s in sympy.sympify(expr, strict=True).free_symbols:
        if isinstance(s, sympy.Symbol):
            names[s] = latex_name(s.name)
    return sympy.latex(expr, symbol_names=names)


def _sub(name: str, index: object) -> str:
    """``name`` with a subscript ``index``; a name that already carries one
    (``\\tau_{1}``) is braced first, so that LaTeX sees one subscript."""
    return f"{{{name}}}_{{{index}}}" if "_" in name else f"{name}_{index}"


def latex_inline(r: ResultLike) -> str:
    p = latex_name(r.parameter)
    return (rf"{_sub(p, 0)} = {_latex(r.critical_value)},\ \omega = {_latex(r.omega)},\ "
            rf"\ell_1 = {_latex(r.l1)}\ (\text{{{r.classification}}})")


def latex_section(r: ResultLike) -> str:
    p = latex_name(r.parameter)
    lam = sympy.Symbol("lambda")
    out = [r"\section*{Hopf bifurcation of a retarded equation}",
           r"\begin{align*}"]
    for state, rhs in zip(r.model.states, r.model.equations):
        out.append(rf"  \dot {latex_name(state)} &= {_latex(rhs)} \\")
    out.append(r"\end{align*}")
    out.append(r"Characteristic quasi-polynomial and frequency condition:")
    out.append(r"\begin{align*}")
    out.append(rf"  \chi(\lambda) &= {_latex(r.quasi_polynomial)} \\")
    out.append(rf"  F(s) &= {_latex(r.frequency_polynomial)}, \quad s = \omega^2 \\")
    out.append(rf"  \omega &= {_latex(r.omega)} \\")
    out.append(rf"  {_sub(p, 0)} &= {_latex(r.critical_value)} \\")
    out.append(rf"  {_sub(p, 'j')} &= {_latex(r.critical_sequence)}, \quad j = 0, 1, 2, \dots \\")
    out.append(rf"  \operatorname{{Re}} \frac{{d\lambda}}{{d{p}}} &= {_latex(r.transversality)} \\")
    out.append(rf"  c_1 &= {_latex(r.c1)} \\")
    out.append(rf"  \ell_1 &= {_latex(r.l1)}")
    out.append(r"\end{align*}")
    out.append(rf"Verdict: {r.classification}. Cycle on the side {r.cycle.side} of the critical "
               rf"value, period ${_latex(r.cycle.period)}$.")
    out.append(r"\begin{itemize}")
    for state, k in r.cycle.amplitude_coefficients.items():
        out.append(rf"  \item amplitude of ${latex_name(state)}$: "
                   rf"$\sqrt{{({_latex(k)})({p} - {_sub(p, 0)})}}$")
    for c in r.conventions.lines():
        out.append(r"  \item \texttt{" + tex_text(c) + "}")
    out.append(r"\end{itemize}")
    out.append(tex_text(_CAUTION))
    _ = lam
    return "\n".join(out)



def latex_document(r: ResultLike) -> str:
    return "\n".join([r"\documentclass{article}", r"\usepackage{amsmath,amssymb}",
                      r"\begin{document}", latex_section(r), r"\end{document}", ""])


def _json_value(expr):
    if isinstance(expr, (bool, int)) or expr is None:
        return expr
    return _text(expr)


def result_to_dict(r: ResultLike, *, point: Mapping | None = None, digits: int = 30) -> dict:
    body = {
        "kind": r.kind,
        "model": {"states": list(r.model.states),
                  "parameters": {p.name: p.assumption for p in r.model.parameters},
                  "equations": {s: _text(e) for s, e in zip(r.model.states, r.model.equations)},
                  "delays": [_text(d) for d in r.delays]},
        "parameter": r.parameter, "mode": r.mode,
        "equilibrium": {s: _text(v) for s, v in r.equilibrium.items()},
        "quasi_polynomial": sympy.sstr(r.quasi_polynomial),
        "P": _text(r.P), "Q": _text(r.Q),
        "frequency_polynomial": _text(r.frequency_polynomial),
        "omega": _text(r.omega), "theta": _text(r.theta),
        "critical_value": _text(r.critical_value),
        "critical_sequence": _text(r.critical_sequence),
        "crossing_indicator": _text(r.crossing_indicator),
        "crossing_direction": r.crossing_direction,
        "transversality": _text(r.transversality),
        "c1": {"re": _text(sympy.re(r.c1)), "im": _text(sympy.im(r.c1))},
        "l1": _text(r.l1),
        "classification": str(r.classification), "verdict": r.verdict,
        "criticality_condition": _json_value(r.criticality_condition),
        "conditions": [_text(c) for c in r.conditions],
        "stability_conditions": list(r.stability_conditions),
        "cycle": {"side": r.cycle.side, "period": _text(r.cycle.period),
                  "amplitude_coefficients": {s: _text(k) for s, k in
                                             r.cycle.amplitude_coefficients.items()}},
        "routes_agree": bool(r.routes_agree),
        "in_terms_of_omega_and_tau_0": {k: sympy.sstr(v) for k, v in r.compact.items()},
    }
    tail = {}
    if point is not None:
        num = r.evaluate(point, digits=digits)
        tail["numeric"] = {"values": {k: str(v) for k, v in num.values.items()},
                           "critical_value": str(num.critical_value), "omega": str(num.omega),
                           "l1": str(num.l1), "residual": str(num.residual)}
    return envelope(SCHEMA, "hopf_delay", body, status=r.status,
                    conventions=list(r.conventions.lines()), notes=r.notes,
                    cautions=(_CAUTION,), tail=tail)


def to_json(r: ResultLike, *, point: Mapping | None = None, digits: int = 30) -> str:
    return json.dumps(result_to_dict(r, point=point, digits=digits), indent=2)


_EXPRESSION_FIELDS = ("P", "Q", "frequency_polynomial", "omega", "critical_value",
                      "critical_sequence", "transversality", "l1")


def read_delay_json(text: str) -> dict:
    """The expressions of a delay result's JSON, read back through the whitelisted
    parser (delayed states in the model's equations included).

    Raises
    ------
    ModelFileError
        If the text is not a delay result's document, or a field is missing or
        not an expression (the field is named).
    """
    if not isinstance(text, str):
        raise ModelFileError(f"a delay result's JSON must be text, not {type(text).__name__}")
    try:
        doc = read_document(text, SCHEMA)
    except ModelFileError:
        raise
    except (ValueError, RecursionError) as exc:   # not JSON at all
        raise ModelFileError(f"not a {SCHEMA} document: {exc}") from None

    def field(where, key, label):
        value = where.get(key) if isinstance(where, dict) else None
        if not isinstance(value, str):
            raise ModelFileError(f"{SCHEMA} document: the field {label!r} is missing or not "
                                 "an expression in quotes")
        return value

    model = doc.get("model")
    states = model.get("states") if isinstance(model, dict) else None
    equations = model.get("equations") if isinstance(model, dict) else None
    if (not isinstance(states, list) or not all(isinstance(s, str) for s in states)
            or not isinstance(equations, dict)):
        raise ModelFileError(f"{SCHEMA} document: 'model' must hold 'states' (a list of "
                             "names) and 'equations' (an object)")
    symbols = document_symbols(doc)

    def read(text, context, **more):
        return parse_expression(text, symbols, context=context, on_unknown=_any_name, **more)

    out = {}
    try:
        for key in _EXPRESSION_FIELDS:
            out[key] = read(field(doc, key, key), f"JSON field {key!r}")
        out["equations"] = {s: read(field(equations, s, f"model.equations.{s}"),
                                    f"JSON equation for {s!r}", delayed=states)
                            for s in equations}
        c1 = doc.get("c1")
        out["c1"] = (read(field(c1, "re", "c1.re"), "JSON field 'c1.re'")
                     + sympy.I * read(field(c1, "im", "c1.im"), "JSON field 'c1.im'"))
    except ExpressionError as exc:
        raise ModelFileError(f"{SCHEMA} document: {exc}") from None
    return out


def _any_name(name: str, column: int) -> None:
    """Names a document's expressions may use beyond the model's (read as real)."""


# -- the renderers of the result kind "hopf_delay" ----------------------------------------------

def _rows(r) -> list:
    return [(f"first critical value {r.parameter}_0", r.critical_value),
            (f"every critical value {r.parameter}_j (j = 0, 1, ...)", r.critical_sequence),
            ("frequency omega", r.omega), ("period 2 pi / omega", r.period),
            (f"transversality Re d lambda / d {r.parameter}", r.transversality),
            ("first Lyapunov coefficient l1", r.l1),
            ("verdict", r.verdict)]


_TITLE = "Hopf bifurcation of a retarded equation in {}"
_SHORT_CAUTION = ("The analysis is local to the bifurcation point; a subcritical result means an "
                  "abrupt, hysteretic onset; verify before relying on it (result.validate()), and "
                  "defer to applicable codes and licensed engineering practice.")

register_renderer("hopf_delay", "text", lambda r, **kw: summary_text(r))
register_renderer("hopf_delay", "details", lambda r, **kw: summary_text(r))
register_renderer("hopf_delay", "latex", lambda r, **kw: latex_section(r))
register_renderer("hopf_delay", "report", lambda r, **kw: latex_document(r))
register_renderer("hopf_delay", "notebook_latex", lambda r, **kw: "$" + latex_inline(r) + "$")
register_renderer("hopf_delay", "json", lambda r, **kw: to_json(r, **kw))
register_renderer("hopf_delay", "dict", lambda r, **kw: result_to_dict(r, **kw))
register_renderer("hopf_delay", "html", lambda r, **kw: html_table(
    _TITLE.format(r.parameter), _rows(r), [_SHORT_CAUTION]))
register_renderer("hopf_delay", "markdown", lambda r, **kw: markdown_table(
    _TITLE.format(r.parameter), _rows(r), [_SHORT_CAUTION]))
