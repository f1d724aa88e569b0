"""Prose with formulas in it, set as LaTeX text with the formulas in math mode.

Pipeline place: result -> **prose** -> LaTeX report.  Descriptions in model
files, condition descriptions, notes and the verdict in words mix English
with formulas written in the model syntax (``x*y^2``, ``l1 < 0``,
``omega^2 > 0``, ``g*P/(s + P)``).  :func:`prose_to_tex` finds the formulas,
converts each token by token (``x*y^2`` -> ``$x y^{2}$``, ``l1`` ->
``$\\ell_{1}$``, ``!=`` -> ``\\neq``) and escapes the rest with the one
LaTeX escape of :mod:`criticality.outputs.escape`.  Nothing is evaluated:
the conversion is lexical, so it never fails.

A span counts as a formula when it contains an operator that English does
not use between words (``*``, ``/``, ``^``, ``=``, ``<``, ``>``), or a sum
or difference of names the model declares, or when it is a declared name in
quotes or one that is not also a short English word.
"""

from __future__ import annotations

from typing import Iterable, Sequence

import re

from .escape import tex_text
from .latex_expr import latex_name

__all__ = ["prose_to_tex", "formula_to_tex"]

_TOKEN = re.compile(r"\s*(\*\*|<=|>=|!=|==|\+-|[A-Za-z_][A-Za-z0-9_]*'?|\d+(?:\.\d+)?|[-+*/^()<>=,|])")
_WORD = re.compile(r"[A-Za-z_][A-Za-z0-9_]*'?|\d+(?:\.\d+)?")
_OP = re.compile(r" ?(\*\*|<=|>=|!=|==|\+(?!-)|[-*/^<>=]) ?")
#: phrases the engine writes, with their mathematics
_PHRASES = {"Re d lambda / d mu": "\\operatorname{Re}\\, d\\lambda/d\\mu",
            "d lambda / d mu": "d\\lambda/d\\mu", "+-i omega": "\\pm i\\omega",
            "<q, q>": "\\langle q, q\\rangle", "<p, q>": "\\langle p, q\\rangle",
            "<a, b>": "\\langle a, b\\rangle", "conj(a)^T b": "\\bar{a}^{T} b",
            "Delta_(n-1)": "\\Delta_{n-1}"}


def _operand(text: str, i: int):
    """End of the operand starting at ``i`` (a word, a number, a call
    ``f(...)``, a parenthesised formula, with a prefix sign), or None."""
    if text.startswith("+-", i):
        i += 2
    elif i < len(text) and text[i] == "-":
        i += 1
    if i < len(text) and text[i] == "(":
        end = _formula(text, i + 1)
        if end is None or end >= len(text) or text[end] != ")":
            return None
        return end + 1
    match = _WORD.match(text, i)
    if not match:
        return None
    end = match.end()
    if text[end - 1] == "'" and i > 0 and text[i - 1] == "'":
        end -= 1  # 'B' is a quoted name, not B prime
    if end < len(text) and text[end] == "(":
        inner = _formula(text, end + 1)
        if inner is not None and inner < len(text) and text[inner] == ")":
            return inner + 1
    return end


def _formula(text: str, i: int):
    """End of the formula ``operand (op operand)*`` starting at ``i``, or None."""
    while i < len(text) and text[i] == " ":
        i += 1
    end = _operand(text, i)
    if end is None:
        return None
    while True:
        op = _OP.match(text, end)
        if not op:
            return end
        nxt = _operand(text, op.end())
        if nxt is None:
            return end
        end = nxt


def _spans(text: str):
    """``(start, end)`` of the candidate formulas, left to right."""
    i = 0
    while i < len(text):
        starts_word = (text[i].isalnum() or text[i] == "_" or text.startswith("+-", i)
                       or text[i] in "(-")
        if starts_word and (i == 0 or not (text[i - 1].isalnum() or text[i - 1] == "_")):
            end = _formula(text, i)
            if end is not None and end > i:
                yield i, end
                i = end
                continue
        i += 1


_RELATION = {"<=": "\\leq", ">=": "\\geq", "!=": "\\neq", "==": "=", "<": "<", ">": ">",
             "=": "=", "+-": "\\pm"}
_ENGLISH = frozenset("a an as at be by do i if in is it me my no of on or so to up us we A I "
                     "and are but can for had has its may not the was who".split())
_FUNCTIONS = {"sqrt": "\\sqrt", "exp": "\\exp", "log": "\\log", "ln": "\\ln", "sin": "\\sin",
              "cos": "\\cos", "tan": "\\tan", "tanh": "\\tanh", "Re": "\\operatorname{Re}",
              "Im": "\\operatorname{Im}", "conj": "\\overline", "abs": "\\left|"}


def _name(token: str) -> str:
    prime = token.endswith("'")
    base = token.rstrip("'")
    match = re.fullmatch(r"l(\d+)", base)
    if match:
        out = "\\ell_{" + match.group(1) + "}"
    elif re.fullmatch(r"[a-z]_?c", base) and len(base) <= 3 and base not in ("c", "_c"):
        out = latex_name(base[0]) + "_{\\mathrm{c}}"
    elif base.endswith("_c") and len(base) > 2:
        out = latex_name(base[:-2]) + "_{\\mathrm{c}}"
    elif base == "pi":
        out = "\\pi"
    elif base in ("Re", "Im"):
        out = "\\operatorname{" + base + "}"
    else:
        out = latex_name(base)
    return out + ("'" if prime else "")


def _group(tokens: list, i: int):
    """LaTeX of the operand at ``tokens[i]`` (a parenthesised group without its
    parentheses, or one token) and the index after it."""
    if i < len(tokens) and tokens[i] == "(":
        depth, j = 0, i
        while j < len(tokens):
            depth += (tokens[j] == "(") - (tokens[j] == ")")
            if depth == 0:
                break
            j += 1
        return _convert(tokens[i + 1:j]), j + 1
    if i < len(tokens):
        if tokens[i] == "-" and i + 1 < len(tokens):
            inner, k = _group(tokens, i + 1)
            return "-" + inner, k
        return _atom(tokens[i]), i + 1
    return "", i


def _atom(token: str) -> str:
    if re.fullmatch(r"[A-Za-z_][A-Za-z0-9_]*'?", token):
        return _name(token)
    if token in _RELATION:
        return _RELATION[token]
    return {"*": "\\,", "|": "|"}.get(token, token)


def _convert(tokens: list) -> str:
    out, i = [], 0
    while i < len(tokens):
        t = tokens[i]
        if t in ("^", "**"):
            inner, i = _group(tokens, i + 1)
            out.append("^{" + inner + "}")
            continue
        if t in _FUNCTIONS and i + 1 < len(tokens) and tokens[i + 1] == "(":
            inner, i = _group(tokens, i + 1)
            macro = _FUNCTIONS[t]
            if macro in ("\\sqrt", "\\overline"):
                out.append(macro + "{" + inner + "}")
            elif macro == "\\left|":
                out.append("\\left|" + inner + "\\right|")
            else:
                out.append(macro + "\\left(" + inner + "\\right)")
            continue
        if t == "*":
            out.append("\\,")
        elif t in ("<", ">", "<=", ">=", "!=", "==", "="):
            out.append(" " + _RELATION[t] + " ")
        elif t in ("+", "-", "+-"):
            out.append(" " + _RELATION.get(t, t) + " " if out else _RELATION.get(t, t))
        elif t == ",":
            out.append(",\\ ")
        else:
            out.append(_atom(t))
        i += 1
    text = "".join(out)
    return re.sub(r"\s+", " ", text).strip()


def formula_to_tex(text: str) -> str:
    r"""A formula in the model syntax as LaTeX math (without dollars).

    >>> print(formula_to_tex("x*y^2"))
    x\,y^{2}
    >>> print(formula_to_tex("l1 < 0"))
    \ell_{1} < 0
    >>> print(formula_to_tex("Re d lambda / d mu != 0"))
    \operatorname{Re} d \lambda/d \mu \neq 0
    """
    chunks: list[list] = [[]]
    previous = None
    for token in _TOKEN.findall(text):
        if previous is not None and re.fullmatch(r"[A-Za-z0-9_.]+'?", token) and \
                re.fullmatch(r"[A-Za-z0-9_.)]+'?", previous):
            chunks.append([])  # two words side by side: keep them apart
        chunks[-1].append(token)
        previous = token
    return " ".join(_convert(c) for c in chunks if c)


def _is_formula(span: str, names: frozenset, quoted: bool) -> bool:
    if re.search(r"[*/^=<>]|\*\*|\+-", span):
        return True
    words = re.findall(r"[A-Za-z_][A-Za-z0-9_]*", span)
    if not words:
        return False
    if re.search(r"[-+]", span):
        return all(w in names or re.fullmatch(r"l\d+|omega|mu|lambda|pi", w) for w in words)
    if len(words) == 1 and span.strip() == words[0]:
        w = words[0]
        if re.fullmatch(r"[A-Za-z]+\d*_[A-Za-z0-9]+", w):
            return True  # x_eq, T0_eq: a subscripted name
        return (w in names and (quoted or w not in _ENGLISH)) or bool(re.fullmatch(r"l\d+", w))
    return False


def prose_to_tex(text: str, names: Iterable[str] = ()) -> str:
    r"""Prose made LaTeX: formulas in math mode, the rest escaped.

    Parameters
    ----------
    text : str
        English with formulas in the model syntax.
    names : iterable of str
        The model's declared names (states, parameters), which count as
        formulas on their own.

    Examples
    --------
    >>> print(prose_to_tex("grazing g*P/(s + P) with rate e", ["g", "P", "s", "e"]))
    grazing $g\,P/(s + P)$ with rate $e$
    >>> print(prose_to_tex("Supercritical (l1 < 0): a stable cycle"))
    Supercritical $(\ell_{1} < 0)$: a stable cycle
    >>> print(prose_to_tex("the sign of 'B' (positive), 50% & more", ["B"]))
    the sign of $B$ (positive), 50\% \& more
    >>> print(prose_to_tex("not a real pair +-kappa"))
    not a real pair $\pm\kappa$
    """
    names = frozenset(names)
    out, last = [], 0
    for phrase_or_span in _pieces(text):
        start, end, tex = phrase_or_span
        quoted = (start > 0 and text[start - 1] == "'" and end < len(text)
                  and text[end] == "'")
        if tex is None:
            if not _is_formula(text[start:end], names, quoted):
                continue
            tex = formula_to_tex(text[start:end])
        if quoted:
            start, end = start - 1, end + 1
        out.append(tex_text(text[last:start]))
        out.append("$" + tex + "$")
        last = end
    out.append(tex_text(text[last:]))
    return "".join(out)


def _pieces(text: str):
    """Known phrases (with their LaTeX) and candidate formulas, in order."""
    found: list[tuple[int, int, str | None]] = []
    for phrase, tex in _PHRASES.items():
        for match in re.finditer(re.escape(phrase), text):
            if not any(s < match.end() and match.start() < e for s, e, _ in found):
                end, tail = match.end(), ""
                op = _OP.match(text, end)
                rest = _formula(text, op.end()) if op else None
                if rest is not None:  # "... != 0" after the phrase
                    tail = " " + formula_to_tex(text[end:rest])
                    end = rest
                found.append((match.start(), end, tex + tail))
    for start, end in _spans(text):
        if not any(s < end and start < e for s, e, _ in found):
            found.append((start, end, None))
    return sorted(found)
