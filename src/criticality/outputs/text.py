"""The plain-text summary of a Hopf result, for a terminal.

Pipeline place: result -> **text summary** (``print(result)``,
``result.summary()``, ``criticality analyse``).

The summary is a table of quantities in the model syntax (so an expression
can be pasted back into a model file), the verdict in words, the conditions
with their status, the predicted cycle, notes, conventions and cautions.  Long
expressions are wrapped at sums first, then at products.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import textwrap

import mpmath
import sympy

from ..algebra.canonical import compact
from ..renderers import register_renderer
from .render import (CAUTIONS, classification_sentence, cycle_sentences, model_text,
                      parametrisation_sentences,
                      per_offset, split_complex, transversality_sentence, wrap_expression)

if TYPE_CHECKING:
    from ..hopf_analysis.results import HopfResult

__all__ = ["result_summary", "result_details", "numeric_summary", "DEFAULT_WIDTH", "SUMMARY_LINES"]

#: default line width of the summary
DEFAULT_WIDTH = 100
_LABEL = 26
_STATUS = {"holds": "holds", "fails": "FAILS", "open": "open "}


def _rows(result) -> list:
    name = result.parameter
    re_c1, im_c1 = split_complex(result.c1)
    rows = [(f"critical value {name}_c", result.critical_value),
            ("omega^2", result.omega_squared), ("omega", result.omega),
            ("period 2*pi/omega", result.period),
            (f"transversality Re dl/d{name}", result.transversality),
            ("l1 = Re(c1)/omega", result.l1)]
    for k, coefficient in enumerate(result.lyapunov_coefficients[1:], start=2):
        rows.append((f"l{k}", coefficient))
    rows += [("Re c1", re_c1), ("Im c1", im_c1), ("<q, q>", result.q_norm_squared)]
    return rows


def decimal(value: Any) -> sympy.Expr:
    """A number that carries decimals (the numeric mode) as one decimal with
    the digits of its least precise Float: ``2*pi/omega`` with a numeric
    omega prints as ``6.2831...``, not as ``6.2831...*pi/1.0``.

    >>> decimal(sympy.Float("1.5", 5) * sympy.pi)
    4.7124
    """
    if not isinstance(value, sympy.Basic) or not value.is_number:
        return value
    floats = value.atoms(sympy.Float)
    if not floats or value.has(sympy.I):
        return value
    digits = min(mpmath.libmp.prec_to_dps(f._prec) for f in floats)
    return sympy.Float(sympy.N(value, digits + 2), digits)


_MORE = " ..."
#: repeated non-polynomial subexpressions -> their names, while a text is being written
_NAMED: dict = {}


def _named(result) -> dict:
    """Names (L1, L2, ...) for the logarithms, exponentials and radicals that
    occur at least twice in the main quantities and are long."""
    from .latex_expr import _non_polynomial

    exprs = [result.critical_value, result.omega_squared, result.l1, result.c1,
             result.transversality, *result.cycle.amplitude_coefficients.values(),
             *(c.expr for c in result.conditions)]
    counts: dict = {}
    for e in exprs:
        for node in sympy.preorder_traversal(sympy.sympify(e, strict=True)):
            if _non_polynomial(node) and len(sympy.sstr(node)) > 12:
                counts[node] = counts.get(node, 0) + 1
    taken = set(result.model.symbols)
    letter = next(c for c in ("L", "M", "N", "K", "W", "Q") if not any(
        t.startswith(c) for t in taken)) if taken else "L"
    chosen = sorted((n for n, k in counts.items() if k >= 2), key=sympy.default_sort_key)
    return {node: sympy.Symbol(f"{letter}{k}", real=True) for k, node in enumerate(chosen, 1)}


def _shown(expr):
    expr = sympy.sympify(expr, strict=True)
    if _NAMED and not expr.is_Atom:
        expr = expr.xreplace(_NAMED)
    return decimal(compact(expr))


def _definitions(width: int) -> list:
    if not _NAMED:
        return []
    out = ["Named subexpressions (each written once)"]
    for node, symbol in _NAMED.items():
        out += _expr_lines(f"{symbol} = ", node, width, "  ", lines=None, raw=True)
    return [out]


def _wrapped(text: str, room: int, lines: int | None) -> list:
    """``text`` wrapped to ``room``; with ``lines``, cut after that many lines
    (the last one saying where the rest is)."""
    pieces = wrap_expression(text, room, None if lines is None else lines + 1)
    if lines is None or len(pieces) <= lines:
        return pieces
    pieces = wrap_expression(text, max(room - len(_MORE), 20), lines)
    return pieces[:lines - 1] + [pieces[lines - 1] + _MORE]


def _table(rows, width: int, heading: str = "closed form", lines: int | None = None) -> list:
    """Label column plus wrapped expression column (at most ``lines`` lines
    per quantity)."""
    room = max(width - _LABEL - 2, 20)
    out = [f"{'quantity'.ljust(_LABEL)}  {heading}", f"{'-' * _LABEL}  {'-' * min(room, 40)}"]
    for label, value in rows:
        text = value if isinstance(value, str) else model_text(_shown(value))
        pieces = _wrapped(text, room, lines)
        out.append(f"{label.ljust(_LABEL)}  {pieces[0]}")
        out += [f"{'':{_LABEL}}    {p}" for p in pieces[1:]]
    return out


def _paragraph(text: str, width: int, indent: str = "  ") -> list:
    return textwrap.wrap(text, width, initial_indent=indent, subsequent_indent=indent,
                         break_on_hyphens=False) or [indent]


def _expr_lines(prefix: str, expr, width: int, indent: str = "    ", suffix: str = "",
                lines: int | None = None, raw: bool = False) -> list:
    if lines is not None and len(prefix) + len(indent) > width // 2:
        return [f"{indent}{prefix.rstrip()}"] + _expr_lines("", expr, width, indent + "    ",
                                                             suffix, lines)
    room = max(width - len(prefix) - len(indent), 20)
    pieces = _wrapped(model_text(decimal(expr) if raw else _shown(expr)), room, lines)
    out = [f"{indent}{prefix}{pieces[0]}"] + [f"{indent}{' ' * len(prefix)}  {p}"
                                              for p in pieces[1:]]
    if suffix and len(out[-1]) + len(suffix) + 1 <= width:
        out[-1] += " " + suffix
    elif suffix:
        out.append(f"{indent}{suffix}")
    return out


def _header(result, width: int) -> list:
    model = result.model
    title = f"Hopf bifurcation of {model.name!r}" if getattr(model, "name", None) else \
        "Hopf bifurcation"
    title += f" in the parameter {result.parameter}"
    branch = f"branch {result.branch_index + 1} of {result.branch_count}; {result.status}"
    out = [title, "=" * min(len(title), width), f"({branch})"]
    fixed = getattr(result, "fixed_parameters", ())
    if fixed:
        out += _paragraph("Fixed before the analysis: " + ", ".join(
            f"{p.name} = {model_text(v)}" for p, v in fixed), width, "")
    out.append("")
    how = result.equilibrium_how
    out.append(f"Equilibrium ({how})")
    for state, value in result.equilibrium.items():
        out += _expr_lines(f"{state} = ", value, width, "  ")
    for name, value in result.substitutions.items():
        out += _expr_lines(f"{name} = ", value, width, "  ")
    for sentence in parametrisation_sentences(result):
        out += _paragraph(sentence, width)
    return out


def _verdict(result, width: int) -> list:
    out = ["Verdict"]
    out += _paragraph(classification_sentence(result.classification, result.cycle.amplitude_power), width)
    if result.supercritical_where is None and result.l1_zero_set is None:
        out += _paragraph(f"Verdict: {result.verdict}.", width)
    if result.supercritical_where is not None:
        rel = result.supercritical_where
        op = ">" if rel.rel_op == ">" else "<"
        out.append("  supercritical exactly where")
        out += _expr_lines("", rel.lhs, width, suffix=f"{op} 0")
    if result.l1_zero_set is not None:
        out.append("  l1 = 0 (a degenerate, Bautin point) where")
        out += _expr_lines("", result.l1_zero_set.lhs, width, suffix="= 0")
    out += _paragraph(transversality_sentence(result), width)
    return out


def _conditions(result, width: int) -> list:
    out = _paragraph("Conditions (holds: proved under the assumptions; open: stated, not "
                     "proved -- the result is valid where it holds)", width, "")
    for c in result.conditions:
        out += _paragraph(f"[{_STATUS.get(c.status, c.status)}] {c.description}", width)
        out += _expr_lines("", c.expr, width, "          ", suffix=f"{c.relation} 0")
    return out


def _cycle(result, width: int) -> list:
    out = ["Cycle near onset"]
    for sentence in cycle_sentences(result, lambda e: model_text(_shown(e))):
        out += _paragraph(sentence, width)
    name = result.parameter
    k = per_offset(result, result.cycle.radius_squared)
    if k is None:
        out.append("  squared radius rho^2 (unit normalisation):")
        out += _expr_lines("", result.cycle.radius_squared, width)
    else:
        out.append(f"  squared radius rho^2 = K*({name} - {name}_c) (unit normalisation), K:")
        out += _expr_lines("", k, width)
    for state, k in result.cycle.amplitude_coefficients.items():
        out.append(f"  slope_{state}: (amplitude of {state})^2 per unit of "
                   f"{result.parameter} - {result.parameter}_c:")
        out += _expr_lines("", k, width)
    if result.cycle.amplitude_power != 2:
        for state, amplitude in result.cycle.amplitudes.items():
            out.append(f"  amplitude of {state} (half peak-to-peak):")
            out += _expr_lines("", amplitude, width)
    out.append(f"  frequency slope d omega_cycle / d {result.parameter}:")
    out += _expr_lines("", result.cycle.frequency_slope, width)
    return out


def result_details(result: HopfResult, width: int = DEFAULT_WIDTH) -> str:
    global _NAMED
    _NAMED = _named(result)
    try:
        return _details(result, width)
    finally:
        _NAMED = {}


def _details(result, width: int = DEFAULT_WIDTH) -> str:
    """The full plain text of a :class:`~criticality.HopfResult` (``result.details()``).

    Parameters
    ----------
    result : HopfResult
    width : int
        Line width; long expressions wrap at sums, then at products.

    Returns
    -------
    str

    Examples
    --------
    >>> from criticality import Model, hopf
    >>> m = Model(["x", "y"], {"x": "y", "y": "-x + mu*y - x^2*y"}, {"mu": "real"})
    >>> text = result_details(hopf(m, "mu", equilibrium={"x": 0, "y": 0}))
    >>> print(text.splitlines()[0])
    Hopf bifurcation in the parameter mu
    >>> [line for line in text.splitlines() if line.startswith("l1")]
    ['l1 = Re(c1)/omega           -1/4']
    """
    sections = [_header(result, width), _table(_rows(result), width,
                                                   "closed form" if result.status == "closed form"
                                                   else result.status),
                ["Classification: " + result.classification], _verdict(result, width),
                _conditions(result, width), _cycle(result, width)]
    if result.notes:
        notes = ["Notes"]
        for note in result.notes:
            notes += textwrap.wrap(note, width, initial_indent="  - ", subsequent_indent="    ",
                                   break_on_hyphens=False)
        sections.append(notes)
    conventions = ["Conventions"]
    for line in result.conventions.lines():
        conventions += textwrap.wrap(line, width, initial_indent="  - ",
                                     subsequent_indent="    ", break_on_hyphens=False)
    sections.append(conventions)
    cautions = ["Cautions"]
    for line in CAUTIONS:
        cautions += textwrap.wrap(line, width, initial_indent="  ! ", subsequent_indent="    ",
                                  break_on_hyphens=False)
    sections.append(cautions)
    sections[2:2] = _definitions(width)
    return "\n\n".join("\n".join(s) for s in sections) + "\n"


def _number(value, digits: int) -> str:
    if isinstance(value, (mpmath.mpf, mpmath.mpc)):
        return mpmath.nstr(value, digits)
    return str(value)


def numeric_summary(numeric: Any, digits: int | None = None) -> str:
    """A numeric evaluation (:class:`~criticality.checks.numeric.NumericHopfResult`)
    as text, every number with ``digits`` significant digits (default: the
    evaluation's own)."""
    d = digits or numeric.digits
    point = ", ".join(f"{k} = {model_text(v)}" for k, v in numeric.values.items())
    rows = [("critical value", numeric.critical_value), ("omega^2", numeric.omega_squared),
            ("omega", numeric.omega), ("period", numeric.period),
            ("transversality", numeric.transversality), ("c1", numeric.c1), ("l1", numeric.l1)]
    rows += [(f"l{k}", v) for k, v in enumerate(numeric.lyapunov_coefficients[1:], start=2)]
    rows += [("classification", numeric.classification)]
    rows += [(f"equilibrium {k}", v) for k, v in numeric.equilibrium.items()]
    rows += [(f"amplitude^2 slope of {k}", v)
             for k, v in numeric.amplitude_coefficients.items()]
    rows += [("|lambda - i*omega| (check)", numeric.pair_error),
             ("other eigenvalues stable", numeric.others_stable)]
    width = max(len(r[0]) for r in rows)
    lines = [f"Numeric values at {point or 'the model defaults'} ({d} significant digits)"]
    lines += [f"  {label.ljust(width)}  {_number(v, d)}" for label, v in rows]
    lines.append("  eigenvalues of the Jacobian at the critical point:")
    lines += [f"    {_number(e, min(d, 20))}" for e in numeric.eigenvalues]
    return "\n".join(lines) + "\n"



#: the most lines ``print(result)`` shows
SUMMARY_LINES = 40
_CONVENTION_LINE = ("Conventions: <a, b> = conj(a)^T b; A q = i omega q, <q, q> = 1; "
                    "l1 = Re(c1)/omega. Every convention, and each expression cut with ... in "
                    "full: result.details()")
_CAUTION_PHRASES = ("Cautions: The analysis is local to the bifurcation point;",
                    "a subcritical result means an abrupt, hysteretic onset;",
                    "verify the result before relying on it,",
                    "and defer to applicable codes and licensed engineering practice.")


def _packed(phrases, width: int) -> list:
    """Phrases joined into lines of at most ``width``, never split."""
    lines = [phrases[0]]
    for phrase in phrases[1:]:
        if len(lines[-1]) + 1 + len(phrase) <= width:
            lines[-1] += " " + phrase
        else:
            lines.append("  " + phrase)
    return lines


def _short_verdict(result, width: int, lines: int) -> list:
    verdict = f"Verdict: {result.verdict}"
    out = [verdict if len(verdict) <= width else "Verdict"]  # a long one: the condition below
    out += _paragraph(classification_sentence(result.classification,
                                              result.cycle.amplitude_power), width)
    if result.supercritical_where is not None:
        rel = result.supercritical_where
        op = ">" if rel.rel_op == ">" else "<"
        out += _expr_lines("supercritical exactly where ", rel.lhs, width, "  ",
                           suffix=f"{op} 0", lines=lines)
    if result.l1_zero_set is not None:
        out += _expr_lines("l1 = 0 (a Bautin point) where ", result.l1_zero_set.lhs, width,
                           "  ", suffix="= 0", lines=1)
    out += _paragraph(transversality_sentence(result), width)
    return out


def _short_description(text: str) -> str:
    """The description of a condition up to its first top-level colon."""
    depth = 0
    for i, ch in enumerate(text):
        depth += (ch == "(") - (ch == ")")
        if ch == ":" and depth == 0:
            return text[:i]
    return text


def _short_conditions(result, width: int) -> list:
    out = ["Conditions"]
    for c in result.conditions:
        head = f"[{_STATUS.get(c.status, c.status)}] {_short_description(c.description)}: "
        if len(head) <= width // 2:
            out += _expr_lines(head, c.expr, width, "  ", suffix=f"{c.relation} 0", lines=1)
        else:
            out += _paragraph(head.rstrip(), width)[:2]
            out += _expr_lines("", c.expr, width, "          ", suffix=f"{c.relation} 0",
                               lines=1)
    return out


def _short_cycle(result, width: int, lines: int) -> list:
    out = ["Cycle near onset"]
    for sentence in cycle_sentences(result, lambda e: model_text(_shown(e)))[:3 if result.cycle.amplitude_power != 2 else 2]:
        out += _paragraph(sentence, width)
    name = result.parameter
    k = per_offset(result, result.cycle.radius_squared)
    if k is None:
        out += _expr_lines("squared radius rho^2 = ", result.cycle.radius_squared, width, "  ",
                           lines=lines)
    else:
        out += _expr_lines(f"squared radius rho^2 = K*({name} - {name}_c), K = ", k, width,
                           "  ", lines=lines)
    return out


def _summary_sections(result, width: int, lines: int) -> list:
    head = _header(result, width)
    head = head[:head.index("")]
    family = parametrisation_sentences(result)[:1]
    if family:  # one line: which parametrisation (in full in the details)
        line = family[0]
        head.append(line if len(line) <= width else line[:width - 3] + "...")
    status = "closed form" if result.status == "closed form" else result.status
    return [head, _table(_rows(result), width, status, lines=lines), *_definitions(width),
            ["Classification: " + result.classification], _short_verdict(result, width, lines),
            _short_conditions(result, width), _short_cycle(result, width, lines),
            textwrap.wrap(_CONVENTION_LINE, width, break_on_hyphens=False) +
            _packed(_CAUTION_PHRASES, width)]


def result_summary(result: HopfResult, width: int = DEFAULT_WIDTH) -> str:
    global _NAMED
    _NAMED = _named(result)
    try:
        return _summary(result, width)
    finally:
        _NAMED = {}


def _summary(result, width: int = DEFAULT_WIDTH) -> str:
    """A summary of a :class:`~criticality.HopfResult` in at most
    :data:`SUMMARY_LINES` lines (``print(result)``): the main quantities, the
    verdict, the condition, the conditions, the cycle, one line of
    conventions and the cautions.  Long expressions are cut (the full text is
    :func:`result_details`, ``result.details()``).

    Examples
    --------
    >>> from criticality import Model, hopf
    >>> m = Model(["x", "y"], {"x": "y", "y": "-x + mu*y - x^2*y"}, {"mu": "real"})
    >>> text = result_summary(hopf(m, "mu", equilibrium={"x": 0, "y": 0}))
    >>> [line for line in text.splitlines() if line.startswith("l1")]
    ['l1 = Re(c1)/omega           -1/4']
    >>> len(text.splitlines()) <= SUMMARY_LINES
    True
    """
    for lines, gap in ((2, "\n\n"), (1, "\n\n"), (1, "\n")):
        sections = _summary_sections(result, width, lines)
        text = gap.join("\n".join(s) for s in sections) + "\n"
        if len(text.splitlines()) <= SUMMARY_LINES:
            return text
    # still too long: shorten the middle sections (never the conventions and cautions)
    sections = [list(sec) for sec in sections]
    while sum(len(sec) for sec in sections) > SUMMARY_LINES:
        shrinkable = [k for k, sec in enumerate(sections[:-1]) if len(sec) > 2 and k > 1]
        if not shrinkable:
            break
        k = max(shrinkable, key=lambda i: len(sections[i]))
        marker = "  ... (in full: result.details())"
        if sections[k][-1] == marker:
            del sections[k][-2]
        else:
            sections[k][-2:] = [marker]
    text = "\n".join("\n".join(sec) for sec in sections) + "\n"
    return text


result_summary.__doc__, result_details.__doc__ = _summary.__doc__, _details.__doc__
_summary.__doc__ = _details.__doc__ = None  # the examples run once, on the public names

register_renderer("hopf", "text", result_summary)
register_renderer("hopf", "details", result_details)
