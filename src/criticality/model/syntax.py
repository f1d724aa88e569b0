"""Text side of the expression parser: limits, name tables, the scanner.

Internal to :mod:`criticality.model.expressions`.  It checks characters, literal
sizes and nesting before Python's parser sees the text, splits the top-level
sum into terms, rewrites ``^`` and keyword names, and keeps the maps from the
rewritten text back to the user's columns.
"""

from __future__ import annotations

import ast
import difflib
import keyword
import re
import unicodedata
from types import MappingProxyType
from typing import Any, Callable, Mapping

import sympy

from ..errors import ExpressionLimitError, ExpressionSyntaxError, ForbiddenExpressionError

__all__ = [
    "FUNCTIONS", "NOT_ANALYTIC", "RESERVED_NAMES", "EXPRESSION_KEYWORDS", "MAX_TEXT_LENGTH",
    "MAX_DEPTH", "MAX_NODES", "MAX_LITERAL_DIGITS", "MAX_EXPONENT", "MAX_NAME_LENGTH",
    "MAX_NESTING", "MAX_TRANSCENDENTAL", "name_problem",
]

MAX_TEXT_LENGTH = 20_000      #: characters in one expression
MAX_DEPTH = 100               #: nesting of brackets, signs, powers and calls
MAX_NODES = 20_000            #: syntax-tree nodes in one expression
MAX_LITERAL_DIGITS = 1_000    #: characters in one number literal
MAX_EXPONENT = 1_000          #: largest |exponent| of a power with a numeric exponent
MAX_NAME_LENGTH = 100         #: characters in one name
MAX_NESTING = 6               #: functions and non-integer powers inside one another
MAX_TRANSCENDENTAL = 200      #: function calls and non-integer powers in one expression
_MAX_DECIMAL_EXPONENT = 400   # |e| in a literal such as 1e-400
_MAX_POWER_BITS = 20_000      # size of the exact result of one numeric power
_MAX_TOTAL_POWER_BITS = 200_000
_MAX_ROOT_BITS = 512          # numerator/denominator size under a fractional power
_FLOAT_RANGE = sympy.Float(1e308)

FUNCTIONS: Mapping[str, Callable] = MappingProxyType({
    "exp": sympy.exp, "log": sympy.log, "ln": sympy.log, "sqrt": sympy.sqrt,
    "sin": sympy.sin, "cos": sympy.cos, "tan": sympy.tan, "cot": sympy.cot,
    "sec": sympy.sec, "csc": sympy.csc, "sinh": sympy.sinh, "cosh": sympy.cosh,
    "tanh": sympy.tanh, "coth": sympy.coth, "sech": sympy.sech, "csch": sympy.csch,
    "asin": sympy.asin, "acos": sympy.acos, "atan": sympy.atan, "asinh": sympy.asinh,
    "acosh": sympy.acosh, "atanh": sympy.atanh, "erf": sympy.erf, "erfc": sympy.erfc,
})
_KINK = "is not analytic at 0; the analysis needs an analytic vector field"
_JUMP = "jumps; the analysis needs an analytic vector field"
NOT_ANALYTIC: Mapping[str, str] = MappingProxyType({
    "abs": f"abs {_KINK}", "Abs": f"Abs {_KINK}", "sign": f"sign {_JUMP}",
    "sgn": f"sgn {_JUMP}", "min": "min is not analytic where its arguments are equal",
    "max": "max is not analytic where its arguments are equal",
    "Min": "Min is not analytic where its arguments are equal",
    "Max": "Max is not analytic where its arguments are equal",
    "floor": f"floor {_JUMP}", "ceil": f"ceil {_JUMP}", "ceiling": f"ceiling {_JUMP}",
    "round": f"round {_JUMP}", "Heaviside": f"Heaviside {_JUMP}",
    "heaviside": f"heaviside {_JUMP}", "step": f"step {_JUMP}", "mod": f"mod {_JUMP}",
    "Mod": f"Mod {_JUMP}", "frac": f"frac {_JUMP}",
    "Piecewise": "Piecewise definitions are not one analytic formula",
    "piecewise": "piecewise definitions are not one analytic formula",
    "re": "re is not complex-analytic; the model must be real",
    "im": "im is not complex-analytic; the model must be real",
    "conjugate": "conjugate is not complex-analytic; the model must be real",
    "pow": "write powers as x**n or x^n", "atan2": "write atan(y/x) where x > 0",
})

EXPRESSION_KEYWORDS = frozenset({"and", "or", "not", "in", "is", "if", "else", "for",
                                 "None", "True", "False", "async", "await", "yield"})
_RENAMED = frozenset(keyword.kwlist) - EXPRESSION_KEYWORDS   # lambda, as, del, ...
_KW_PREFIX = "__kw_"
RESERVED_NAMES = frozenset({"pi", *FUNCTIONS, *EXPRESSION_KEYWORDS})
_NAME = re.compile(r"[A-Za-z_][A-Za-z0-9_]*")
_DECIMAL = re.compile(r"(\d*)(?:\.(\d*))?(?:[eE]([+-]?\d+))?")
_SCAN = re.compile(r"""
    (?P<number>(?:\d[\d_]*(?:\.[\d_]*)?|\.\d[\d_]*)(?:[eE][+-]?\d[\d_]*)?[jJ]?)
  | (?P<name>[A-Za-z_]\w*)
  | (?P<space>[ \t\r\n]+)
  | (?P<power>\*\*|\^)
  | (?P<other>.)""", re.VERBOSE | re.DOTALL | re.ASCII)
_CHAR_REFUSALS = {
    "'": "strings are not allowed", '"': "strings are not allowed",
    "#": "comments are not allowed inside an expression",
    "\\": "a backslash is not allowed in an expression",
    ";": "only one expression is allowed (found ';')",
    ":": "':' has no meaning in an expression (lambda, slices, dicts and ':=' are not allowed)",
}
_LOOKALIKES = {"\u2212": "-", "\u2013": "-", "\u2014": "-", "\u00d7": "*", "\u00b7": "*",
               "\u22c5": "*", "\u2217": "*", "\u00f7": "/", "\u2044": "/", "\u00b5": "mu"}


def name_problem(name: object) -> str | None:
    """Say why ``name`` cannot name a state or parameter, or return None if it can."""
    if not isinstance(name, str):
        return f"a name must be a string, not {type(name).__name__}"
    if not _NAME.fullmatch(name):
        return (f"{name!r} is not a valid name (use ASCII letters, digits and "
                "underscores, not starting with a digit)")
    if len(name) > MAX_NAME_LENGTH:
        return f"name {name[:20]!r}... is longer than {MAX_NAME_LENGTH} characters"
    if name.startswith("__"):
        return f"{name!r} starts with '__', which is reserved"
    if name == "pi":
        return "'pi' is the constant pi and cannot name a state or parameter"
    if name in FUNCTIONS:
        return f"{name!r} is the name of a function and cannot name a state or parameter"
    if name in EXPRESSION_KEYWORDS:
        return f"{name!r} is a keyword of the expression syntax; choose another name"
    return None


def _distance(a: str, b: str) -> int:
    """Levenshtein distance (insertions, deletions, substitutions)."""
    previous = list(range(len(b) + 1))
    for i, ca in enumerate(a, 1):
        current = [i]
        for j, cb in enumerate(b, 1):
            current.append(min(previous[j] + 1, current[j - 1] + 1, previous[j - 1] + (ca != cb)))
        previous = current
    return previous[-1]


def _suggest(name: str, candidates) -> list[str]:
    """Known names that ``name`` is probably a misspelling of (best first)."""
    candidates = [c for c in dict.fromkeys(candidates) if c != name]
    folded = [c for c in candidates if c.lower() == name.lower()]
    if folded:
        return folded[:3]
    limit = 0 if len(name) < 2 else 1 if len(name) < 6 else 2
    near = sorted((d, c) for c in candidates
                  if abs(len(c) - len(name)) <= limit and (d := _distance(name, c)) <= limit)
    similar = difflib.get_close_matches(name, candidates, n=3, cutoff=0.75)
    return list(dict.fromkeys([c for _, c in near] + similar))[:3]


class _Where:
    """Turns offsets in the user's text into error objects with line, column, piece."""

    def __init__(self, text: str, context: str | None, line: int | None):
        self.text, self.context, self.line = text, context, line

    def position(self, start: int) -> tuple[int | None, int]:
        start = max(0, min(start, len(self.text)))
        row = self.text.count("\n", 0, start)
        column = start - (self.text.rfind("\n", 0, start) + 1) + 1
        if self.line is not None:
            return self.line + row, column
        return (row + 1 if "\n" in self.text else None), column

    def error(self, cls, message: str, start: int | None = None, end: int | None = None, **kw):
        line, column, piece = self.line, None, None
        if start is not None:
            line, column = self.position(start)
            end = max(end if end is not None else start + 1, start + 1)
            piece = " ".join(self.text[start:end].split())[:60] or None
            if piece and piece not in message:
                message = f"{message} (at {piece!r})"
        return cls(message, context=self.context, line=line, column=column, piece=piece, **kw)


def _quote(piece: str) -> str:
    piece = " ".join(piece.split())
    return repr(piece if len(piece) <= 60 else piece[:57] + "...")


def _refuse_character(where: _Where, ch: str, i: int):
    if ch in _CHAR_REFUSALS:
        return where.error(ForbiddenExpressionError, _CHAR_REFUSALS[ch], i)
    code = f"U+{ord(ch):04X}"
    uname = unicodedata.name(ch, "")
    if ord(ch) < 32 or ord(ch) == 127:
        what = "a null byte" if ch == "\0" else f"the control character {code}"
        return where.error(ExpressionSyntaxError, f"{what} is not allowed", i)
    hint = _LOOKALIKES.get(ch)
    if hint is None and uname.startswith("GREEK ") and " LETTER " in uname:
        word = uname.split(" LETTER ")[-1].lower()
        hint = word.capitalize() if "CAPITAL" in uname else word
    if hint is None and uname.startswith("SUPERSCRIPT "):
        hint = "^" + unicodedata.normalize("NFKC", ch)
    if hint is None and unicodedata.normalize("NFKC", ch).isascii():
        hint = unicodedata.normalize("NFKC", ch)
    advice = f"; write {hint!r} instead" if hint else "; only ASCII characters are allowed"
    return where.error(ExpressionSyntaxError,
                       f"the character {ch!r} ({code} {uname or 'unnamed'}) is not ASCII"
                       f"{advice}", i)


def _scan(text: str, where: _Where) -> list[tuple[str, int, int, str]]:
    """Split the text into tokens ``(kind, start, end, text)``, refusing bad
    characters, over-long literals and over-deep nesting before Python's parser
    sees them."""
    tokens: list[tuple[str, int, int, str]] = []
    depth = signs = 0
    for m in _SCAN.finditer(text):
        kind, s, e, piece = m.lastgroup or "", m.start(), m.end(), m.group()
        if kind == "other":
            if piece in "([{":
                depth += 1
                if depth > MAX_DEPTH:
                    raise where.error(ExpressionLimitError,
                                      f"brackets are nested more than {MAX_DEPTH} deep", s)
            elif piece in ")]}":
                depth -= 1
            elif not (" " <= piece <= "~") or piece in _CHAR_REFUSALS:
                raise _refuse_character(where, piece, s)
        elif kind == "number" and e - s > MAX_LITERAL_DIGITS:
            raise where.error(ExpressionLimitError,
                              f"a number longer than {MAX_LITERAL_DIGITS} characters", s, s + 20)
        elif kind == "name":
            _check_name_token(where, tokens, piece, s, e)
        if kind != "space":
            signs = signs + 1 if piece in ("+", "-") else 0
            if signs > MAX_DEPTH:
                raise where.error(ExpressionLimitError, f"more than {MAX_DEPTH} signs in a row", s)
        tokens.append((kind, s, e, piece))
    return tokens


def _check_name_token(where: _Where, tokens, piece: str, s: int, e: int) -> None:
    if piece.startswith("__"):
        raise where.error(ForbiddenExpressionError,
                          f"names starting with '__' such as {_quote(piece)} are not allowed", s, e)
    if len(piece) > MAX_NAME_LENGTH:
        raise where.error(ExpressionLimitError,
                          f"a name longer than {MAX_NAME_LENGTH} characters", s, s + 20)
    if tokens and tokens[-1][0] == "number" and tokens[-1][2] == s:
        number = tokens[-1][3]
        if number == "0" and piece[0] in "xXoObB":
            message = "only decimal numbers are allowed (no hexadecimal, octal or binary)"
            raise where.error(ExpressionSyntaxError, message, tokens[-1][1], e)
        message = (f"missing '*' between {number!r} and {piece!r}? write {number}*{piece} "
                   "(implicit multiplication is not read)")
        raise where.error(ExpressionSyntaxError, message, tokens[-1][1], e)


def _split_terms(tokens) -> list[tuple[int, int]]:
    """Token ranges of the top-level terms, each with its leading sign.

    :func:`sympy.Add` assembles the sum at once, which keeps long sums away
    from the recursion limit of Python's parser.  Splitting is safe because
    ``+`` and ``-`` bind most loosely of everything the grammar accepts.
    """
    ranges, start, depth, prev = [], 0, 0, None
    for i, (kind, _s, _e, piece) in enumerate(tokens):
        if kind == "space":
            continue
        if piece in ("(", "[", "{"):
            depth += 1
        elif piece in (")", "]", "}"):
            depth -= 1
        elif piece in ("+", "-") and depth == 0 and prev is not None and (
                prev[0] in ("number", "name") or prev[1] in (")", "]", "}")):
            ranges.append((start, i))
            start = i
        prev = (kind, piece)
    ranges.append((start, len(tokens)))
    return ranges


class _Chunk:
    """One top-level term as handed to ``ast.parse``, with maps back to the user's text."""

    def __init__(self, tokens, lo: int, hi: int, text_length: int):
        while lo < hi and tokens[lo][0] == "space":
            lo += 1
        parts: list[str] = []
        self.starts: list[int] = []
        self.ends: list[int] = []
        for kind, s, e, piece in tokens[lo:hi]:
            if kind == "power":
                piece = "**"
            elif kind == "name" and piece in _RENAMED:
                piece = _KW_PREFIX + piece
            elif kind == "space":
                piece = " " * (e - s)
            parts.append(piece)
            if len(piece) == e - s:
                self.starts.extend(range(s, e))
                self.ends.extend(range(s + 1, e + 1))
            else:
                self.starts.extend([s] * len(piece))
                self.ends.extend([e] * len(piece))
        end = tokens[hi - 1][2] if hi > lo else text_length
        self.starts.append(end)
        self.ends.append(end)
        self.code = "".join(parts)

    def span(self, node) -> tuple[int, int]:
        """Start and end of a node in the user's text."""
        start = self.starts[min(node.col_offset, len(self.code))]
        end_offset = getattr(node, "end_col_offset", None) or node.col_offset + 1
        return start, self.ends[max(0, min(end_offset, len(self.code)) - 1)]


def _parse_chunk(chunk: _Chunk, where: _Where) -> ast.expr:
    if not chunk.code.strip():
        raise where.error(ExpressionSyntaxError, "an operand is missing", chunk.starts[-1])
    try:
        tree = ast.parse(chunk.code, mode="eval")
    except SyntaxError as exc:
        offset = max(0, min((exc.offset or 1) - 1, len(chunk.code)))
        start = chunk.starts[offset]
        detail = "" if exc.msg == "invalid syntax" else f": {exc.msg}"
        raise where.error(ExpressionSyntaxError, f"invalid syntax{detail}", start) from None
    except (RecursionError, MemoryError, ValueError, OverflowError) as exc:
        message = ("the expression is too long or nested too deeply for the parser "
                   f"({type(exc).__name__})")
        raise where.error(ExpressionLimitError, message, chunk.starts[0]) from None
    return tree.body


_NOT_FINITE = (sympy.S.ComplexInfinity, sympy.S.NaN, sympy.S.Infinity, sympy.S.NegativeInfinity)


def _decimal_to_rational(intpart: str, frac: str, exp: str) -> sympy.Rational:
    """Exact value of a checked decimal literal, built from Python integers."""
    digits = int((intpart + frac) or "0")
    scale = int(exp or 0) - len(frac)
    if scale >= 0:
        return sympy.Integer(digits * 10 ** scale)
    return sympy.Rational(digits, 10 ** -scale)


#: binary exponent bound on the value of a constant (about 30,000 digits)
MAX_CONSTANT_BITS = 100_000


def constant_out_of_range(value: Any) -> bool:
    """True when the constant ``value`` (a sympy number) is beyond
    ``2^+-MAX_CONSTANT_BITS`` or cannot be evaluated at all
    (``exp(exp(1000))``): its size is read from a 15-digit evaluation."""
    try:
        number = value.evalf(15)
        mpf = getattr(number, "_mpf_", None)
        size = None if mpf is None or not mpf[1] else mpf[2] + mpf[3]
    except (OverflowError, ValueError, ArithmeticError, RecursionError, MemoryError):
        return True
    return size is not None and abs(size) > MAX_CONSTANT_BITS
