"""Pieces shared by the output modules (text summary, LaTeX, JSON).

Pipeline place: result -> **rendering helpers** -> outputs.

Pure functions on a :class:`~criticality.hopf_analysis.results.HopfResult`: splitting the
complex quantities into real and imaginary parts, writing an expression in the
model syntax, wrapping long expression text, and the fixed wording of the
verdict, the cycle and the cautions, so that every output says the same thing.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import sympy

from ..errors import CriticalityError
from ..kinds import Classification, Side
from ..model.expressions import format_expression
from ..model.parameter import ASSUMPTIONS, assumption_of, symbol_for

if TYPE_CHECKING:
    from ..hopf_analysis.results import HopfResult, ReducedSystemView

__all__ = ["split_complex", "model_text", "try_model_text", "wrap_expression", "CAUTIONS",
           "parametrisation_sentences", "classification_sentence", "cycle_sentences", "transversality_sentence",
           "reduced_system_or_none", "per_offset"]

#: the cautions every output states, in this order
CAUTIONS = (
    "The analysis is local: it describes the model for parameters near the critical value and "
    "states near the equilibrium only; far from the bifurcation point other attractors and "
    "bifurcations may dominate.",
    "A subcritical result means an abrupt, hysteretic onset: past the critical value the state "
    "leaves the equilibrium for a large-amplitude oscillation (or another attractor), and "
    "returning the parameter to below the critical value need not bring it back.",
    "Verify the result before relying on it, for example by simulating the model near onset "
    "(criticality's numerical check) and by checking the model's assumptions.",
    "Where the result feeds engineering decisions, defer to the applicable codes and standards "
    "and to licensed engineering practice; this analysis does not replace them.",
)

_CLASSIFICATION: dict[str, str] = {
    Classification.SUPERCRITICAL: ("Supercritical (l1 < 0): a stable limit cycle is born as the equilibrium "
                      "loses stability; its amplitude grows like the square root of the distance "
                      "from the critical value (a soft, reversible onset)."),
    Classification.SUBCRITICAL: ("Subcritical (l1 > 0): an unstable cycle surrounds the equilibrium on its "
                    "stable side and shrinks onto it at the critical value; there the equilibrium "
                    "loses stability without a small stable cycle to take over (a hard, "
                    "hysteretic onset)."),
    Classification.DEPENDS: ("The type depends on the parameters: supercritical (stable cycle, soft onset) "
                "where the condition below holds, subcritical (hard, hysteretic onset) where it "
                "is reversed."),
    Classification.DEGENERATE: ("Degenerate (l1 = 0): the first Lyapunov coefficient vanishes; the next "
                   "coefficient decides (a Bautin point)."),
    "nontransversal": ("No verdict (zero transversality): the pair of eigenvalues reaches the "
                       "imaginary axis without crossing it, so the Hopf theorem does not apply; "
                       "the Lyapunov coefficients are reported but decide nothing."),
    "inadmissible": ("No verdict (empty admissible set): the critical value violates the "
                     "declared sign of the parameter, so no admissible parameter value reaches "
                     "this point."),
}


_ROOT = {2: "square", 4: "fourth", 6: "sixth", 8: "eighth"}


def classification_sentence(classification: str, power: int = 2) -> str:
    """The verdict in words for a classification string of a result.

    ``power`` is the cycle's ``amplitude_power``: above 2 the first Lyapunov
    coefficient vanishes identically and ``l_(power/2)`` decides.

    >>> classification_sentence("supercritical").split(":")[0]
    'Supercritical (l1 < 0)'
    >>> classification_sentence("subcritical", 4).split(":")[0]
    'Subcritical (l1 = 0 identically, l2 > 0)'
    """
    text = _CLASSIFICATION.get(classification, f"Classification: {classification}.")
    if power > 2 and classification in (Classification.SUPERCRITICAL, Classification.SUBCRITICAL):
        j = power // 2
        vanish = "l1" if j == 2 else f"l1 = ... = l{j - 1}"
        text = text.replace("(l1 <", f"({vanish} = 0 identically, l{j} <")
        text = text.replace("(l1 >", f"({vanish} = 0 identically, l{j} >")
        text = text.replace("the square root", f"the {_ROOT.get(power, f'{power}-th')} root")
    return text


def split_complex(expr: sympy.Expr) -> tuple:
    """``(re, im)`` of an expression built as ``re + I*im`` with real parts.

    The results build complex quantities exactly so (``c1``, ``d lambda/d mu``,
    eigenvector components); the terms that carry the imaginary unit are
    divided by it, which sympy does structurally, so no simplification runs.

    >>> a, b = sympy.symbols("a b", real=True)
    >>> split_complex(a + sympy.I*b/2)
    (a, b/2)
    """
    expr = sympy.sympify(expr, strict=True)
    if not expr.has(sympy.I):
        return expr, sympy.Integer(0)
    re_terms, im_terms = [], []
    for term in sympy.Add.make_args(expr):
        if term.has(sympy.I):
            im_terms.append(term / sympy.I)
        else:
            re_terms.append(term)
    re, im = sympy.Add(*re_terms), sympy.Add(*im_terms)
    if im.has(sympy.I):
        re, im = expr.as_real_imag()
    return re, im


def try_model_text(expr: sympy.Expr) -> str | None:
    """The expression in the model syntax, or None where the syntax cannot
    express it (the imaginary unit, ``Abs``, infinities, ``nan``)."""
    try:
        return format_expression(expr)
    except CriticalityError:
        return None


def model_text(expr: sympy.Expr) -> str:
    """The expression in the model syntax where possible, else in sympy's own
    notation (marked ``[sympy]``), so that a display never fails.

    >>> x = sympy.Symbol("x", real=True)
    >>> model_text(x**2/2 + 1)
    'x**2/2 + 1'
    """
    text = try_model_text(expr)
    return text if text is not None else f"[sympy] {sympy.sstr(expr)}"


def _break_points(text: str, start: int = 0, stop: int | None = None) -> list:
    """``(position, depth, before)`` of the places a line may break in
    ``text[start:]``, positions and depths counted from ``start``; only the
    characters before ``stop`` (a position counted from ``start``) are
    scanned, so that wrapping a long text reads each character once."""
    n = len(text)
    end = n if stop is None else min(n, start + stop)
    rest = n - start
    points, depth = [], 0
    for j in range(start, end):
        ch = text[j]
        i = j - start
        if ch == "(":
            depth += 1
        elif ch == ")":
            depth -= 1
        elif ch in "+-" and 0 < i < rest - 1 and text[j - 1] == " " and text[j + 1] == " ":
            points.append((i, depth, True))
        elif ch in "*/," and i + 1 < rest and text[j + 1] != "*" and \
                text[j - 1 if i else n - 1] != "*":
            points.append((i + 1, depth, False))
    return points


def wrap_expression(text: str, width: int, max_lines: int | None = None) -> list:
    """Break a long expression text into lines of at most ``width`` characters,
    preferring the shallowest sums, then products; a line that must break
    inside a long name or number is cut hard.  With ``max_lines``, wrapping
    stops after that many lines (the rest of the text is not read): the
    first lines are those of the whole wrap.

    >>> wrap_expression("a*b + c*d - e*f + g*h", 12)
    ['a*b + c*d', '- e*f + g*h']
    """
    width = max(width, 12)
    lines: list = []
    n, start = len(text), 0
    # each line looks at the next ``width + 1`` characters only (and the text
    # is never copied), so the work is linear in the length of the text
    while n - start > width and (max_lines is None or len(lines) < max_lines):
        points = [p for p in _break_points(text, start, width + 1) if 0 < p[0] <= width]
        if not points:
            lines.append(text[start:start + width])
            start += width
            continue
        half = [p for p in points if p[0] >= width // 2] or points
        scores = {p: p[1] + (0 if p[2] else 0.5 + 0.25 * _at(text, start, p[0] - 2).isdigit())
                  for p in half}
        best = min(scores.values())
        cut = max(p[0] for p in half if scores[p] == best)
        lines.append(text[start:start + cut].rstrip())
        start += cut
        while start < n and text[start].isspace():
            start += 1
    if max_lines is None or len(lines) < max_lines:
        lines.append(text[start:])
    return lines


def _at(text: str, start: int, i: int) -> str:
    """``text[start:][i]``, a negative ``i`` counting from the end as Python does."""
    return text[start + i] if i >= 0 else text[i]


def transversality_sentence(result: HopfResult) -> str:
    """Which side of the critical value the equilibrium is unstable on."""
    sign = _sign(result.transversality, result.assumptions)
    name = result.parameter
    if sign > 0:
        return (f"The pair crosses into the right half-plane as {name} increases: the "
                f"equilibrium is unstable for {name} > {name}_c (nearby).")
    if sign < 0:
        return (f"The pair crosses into the right half-plane as {name} decreases: the "
                f"equilibrium is unstable for {name} < {name}_c (nearby).")
    unstable = _unstable_side(result)
    if unstable is not None:
        return (f"The equilibrium is unstable for {name} {unstable} {name}_c (nearby), stable on "
                "the other side.")
    return ("The direction of crossing depends on the parameters: it is the sign of the "
            "transversality.")


def _unstable_side(result):
    """``">"`` or ``"<"`` from the cycle's side and the verdict, or None."""
    side = {Side.ABOVE: ">", Side.BELOW: "<"}.get(result.cycle.side)
    if side is None or result.classification not in (Classification.SUPERCRITICAL,
                                                     Classification.SUBCRITICAL):
        return None
    if result.classification == Classification.SUPERCRITICAL:
        return side
    return "<" if side == ">" else ">"


def cycle_sentences(result: HopfResult, show: Any = None) -> list:
    """The predicted cycle in words (side, stability, period); ``show``
    writes an expression (default: :func:`model_text`)."""
    show = model_text if show is None else show
    cycle, name = result.cycle, result.parameter
    side = {"above": f"The cycle exists for {name} > {name}_c (near the critical value).",
            "below": f"The cycle exists for {name} < {name}_c (near the critical value)."}
    out = [side.get(cycle.side, f"The side of {name}_c on which the cycle exists depends on "
                    "the parameters" + (f": it exists for {name} > {name}_c exactly where "
                                        f"{show(cycle.side_condition.lhs)} > 0."
                                        if cycle.side_condition is not None else "."))]
    power = getattr(cycle, "amplitude_power", 2)
    deciding = "l1" if power == 2 else f"l{power // 2}"
    if cycle.stable is True:
        out.append(f"It is orbitally stable ({deciding} < 0 and the other eigenvalues are "
                   "stable).")
    elif cycle.stable is False:
        out.append("It is unstable.")
    else:
        out.append("Its stability is not decided for all parameters (see the verdict and the "
                   "conditions).")
    if power == 2:
        out.append("Amplitudes (half peak-to-peak) follow amplitude_j^2 = slope_j*"
                   f"({name} - {name}_c) to leading order; the period is 2*pi/omega at onset.")
    else:
        out.append(f"Since l1 vanishes identically, {deciding} decides: amplitudes (half "
                   f"peak-to-peak) scale like |{name} - {name}_c|^(1/{power}) to leading order "
                   "(see the amplitudes); the period is 2*pi/omega at onset.")
    return out


def _sign(expr, assumptions=None) -> int:
    """+1, -1 or 0 (unknown) for a small expression, using the declared signs."""
    if expr.is_number:
        try:
            value = float(expr)
        except TypeError:
            return 0
        return (value > 0) - (value < 0)
    if sympy.count_ops(expr) > 300:
        return 0
    repl = {}
    for symbol in expr.free_symbols:  # the analysis' assumptions, where assume= changed them
        word = (assumptions or {}).get(symbol.name)
        if word in ASSUMPTIONS and word != assumption_of(symbol):
            repl[symbol] = symbol_for(symbol.name, word)
    expr = expr.xreplace(repl)
    if expr.is_positive:
        return 1
    if expr.is_negative:
        return -1
    return 0


def reduced_system_or_none(result: HopfResult) -> ReducedSystemView | None:
    """The reduced system of a result, or None where it is not available
    (the numeric mode does not build it)."""
    try:
        return result.reduced_system
    except CriticalityError:
        return None
    except (AttributeError, TypeError):
        return None


def per_offset(result: HopfResult, expr: sympy.Expr) -> sympy.Expr:
    """``K`` such that ``expr = K*(mu - mu_c)`` (the radius and amplitudes of
    the cycle have this shape), or None when ``expr`` is not of it."""
    offset = result.parameter_symbol - result.critical_value
    k = sympy.Mul(expr, sympy.Pow(offset, -1))
    return None if k.has(result.parameter_symbol) else k


def parametrisation_sentences(result: Any) -> list:
    """Plain sentences on the parametrisation of the family (``eliminate=``)
    and the Hopf condition back in the original parameters; empty for a
    given or solved equilibrium."""
    par = getattr(result, "parametrisation", None)
    if par is None:
        return []
    how = (f"automatic, {par.kind} in {', '.join(par.unknowns)}" if par.how == "automatic"
           else f"named: {', '.join(par.unknowns)} solved for")
    out = [f"Parametrisation ({how}): {par.describe()}."]
    direct = getattr(result, "direct_forms", None)
    if direct is not None and direct.note:
        note = direct.note
        out.append(f"Direct form: {note[0].upper()}{note[1:]}.")
    return out
