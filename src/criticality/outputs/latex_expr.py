"""LaTeX for expressions: names, named factors and line breaking.

Pipeline place: result -> **LaTeX expressions** -> :mod:`criticality.outputs.latex`.

* :func:`latex_name` turns a model name into LaTeX that never collides with a
  macro: Greek names become Greek letters (``sigma`` -> ``\\sigma``), other
  multi-letter names are set upright-italic as one word (``eps`` ->
  ``\\mathit{eps}``), trailing digits and ``_`` pieces become subscripts
  (``T0`` -> ``T_{0}``, ``x_eq`` -> ``x_{\\mathrm{eq}}``).  ``E``, ``I``
  and ``lambda`` are ordinary names.
* :class:`Notation` picks the report's own symbols (the frequency, the
  eigenvalue variable, the center coordinates, the letter of named factors)
  so that none of them looks like a symbol of the model.
* :class:`TexWriter` names long polynomial factors (``P_{1}``, ``P_{2}``, ...,
  shared by every equation of a document, a factor and its negative get one
  name), and breaks what is still too wide at the terms of a sum, for
  ``align*`` blocks.
"""

from __future__ import annotations

from typing import Sequence

import re

import sympy
from sympy.printing.latex import LatexPrinter

from ..algebra.canonical import compact

__all__ = ["latex_name", "Notation", "TexWriter"]

_GREEK = frozenset(
    "alpha beta gamma delta epsilon varepsilon zeta eta theta vartheta iota kappa lambda mu nu "
    "xi rho varrho sigma varsigma tau upsilon phi varphi chi psi omega Gamma Delta Theta Lambda "
    "Xi Pi Sigma Upsilon Phi Psi Omega".split())


def _piece(text: str) -> str:
    if text in _GREEK:
        return "\\" + text
    if len(text) == 1 or text.isdigit():
        return text
    return "\\mathrm{" + text + "}"


def latex_name(name: str) -> str:
    """LaTeX for a state or parameter name (letters, digits, underscores).

    >>> [latex_name(n) for n in ("sigma", "beta_1", "x_eq", "E", "I", "lambda", "T0", "eps")]
    ['\\\\sigma', '\\\\beta_{1}', 'x_{\\\\mathrm{eq}}', 'E', 'I', '\\\\lambda', 'T_{0}', '\\\\mathit{eps}']
    """
    if name.startswith("_"):
        return "\\mathit{" + name.replace("_", "\\_") + "}"
    primes = len(name) - len(name.rstrip("_"))
    parts = name.rstrip("_").split("_")
    base, subs = parts[0], [p for p in parts[1:] if p]
    match = re.fullmatch(r"([A-Za-z]+?)(\d+)", base)
    if match:
        base, subs = match.group(1), [match.group(2)] + subs
    if base in _GREEK:
        out = "\\" + base
    elif len(base) == 1:
        out = base
    else:
        out = "\\mathit{" + base + "}"
    if subs:
        out += "_{" + ",".join(_piece(s) for s in subs) + "}"
    return "{" + out + "'" * primes + "}" if primes else out


def _name_width(name: str) -> float:
    parts = name.strip("_").split("_")
    base = re.sub(r"\d+$", "", parts[0]) or parts[0]
    width = 1.0 if (base in _GREEK or len(base) == 1) else 0.9 * len(base)
    rest = len(name) - len(base)
    return width + 0.6 * max(rest, 0)


class Notation:
    """The report's own symbols, chosen to differ from every model symbol.

    Attributes
    ----------
    omega, lam, xi, eta : sympy.Symbol
        Placeholders for the frequency, the eigenvalue variable and the two
        center coordinates; :attr:`names` maps them to their LaTeX.
    factor_letter : str
        The letter of named factors (``P`` unless the model uses it).
    names : dict
        Placeholder name -> LaTeX, for the printer.
    """

    def __init__(self, model_names: Sequence[str]) -> None:
        taken = {latex_name(n) for n in model_names}
        taken |= {t.split("_")[0] for t in taken}

        def pick(*candidates):
            return next((c for c in candidates if c not in taken), candidates[-1] + "'")

        self.omega = sympy.Symbol("~omega", positive=True)
        self.lam = sympy.Symbol("~lambda")
        self.xi = sympy.Symbol("~xi", real=True)
        self.eta = sympy.Symbol("~eta", real=True)
        self.names = {
            "~omega": pick("\\omega", "\\omega_{\\mathrm{H}}", "\\Omega_{\\mathrm{H}}"),
            "~lambda": pick("\\lambda", "s", "\\Lambda"),
            "~xi": pick("\\xi", "\\zeta_{1}", "u_{\\mathrm{c}}"),
            "~eta": pick("\\eta", "\\zeta_{2}", "v_{\\mathrm{c}}"),
        }
        self.factor_letter = pick("P", "Q", "R", "F", "G", "H")
        self.atom_letter = pick("L", "M", "N", "K", "W")
        self.widths = {key: 1.0 for key in self.names}


class _Printer(LatexPrinter):
    """sympy's LaTeX printer with collision-free symbol names."""

    def __init__(self, names: dict) -> None:
        super().__init__({"mul_symbol": None, "ln_notation": False})
        self._names = names

    def _print_Symbol(self, expr, style: str = "plain"):
        known = self._names.get(expr.name)
        return known if known is not None else latex_name(expr.name)


def _non_polynomial(node) -> bool:
    """A logarithm, exponential or other function, or a radical of a
    non-numeric base."""
    if isinstance(node, sympy.Function) and not isinstance(node, sympy.core.function.AppliedUndef):
        return bool(node.free_symbols)
    return (node.is_Pow and node.exp.is_Rational and not node.exp.is_Integer
            and not node.base.is_number)


def _needs_brackets(term) -> bool:
    return term.is_Relational or term.is_Add


class TexWriter:
    """LaTeX for the expressions of one document.

    Parameters
    ----------
    notation : Notation
    width : float
        Target width of one line of mathematics, in characters of output.
    threshold : float
        Sums wider than this inside a larger expression get a name.
    """

    def __init__(self, notation: Notation, width: float = 40, threshold: float = 22) -> None:
        self.notation = notation
        self.width = width
        self.threshold = threshold
        self.names = dict(notation.names)
        self.widths = dict(notation.widths)
        self.printer = _Printer(self.names)
        self.table: dict = {}
        self.defined: list = []
        self.pending: list = []
        self._memo: dict = {}
        #: repeated non-polynomial subexpressions -> their names (see :meth:`name_atoms`)
        self.atoms: dict = {}
        self._atoms_used: set = set()

    def name_atoms(self, exprs: Sequence[sympy.Expr], min_count: int = 2,
                   min_width: float = 6) -> None:
        """Name the non-polynomial subexpressions (logarithms, exponentials,
        radicals, roots) that occur at least ``min_count`` times in
        ``exprs`` and are wider than ``min_width``: each is printed as
        ``L_{k}`` and defined once, after the first block that uses it."""
        counts: dict = {}
        for e in exprs:
            for node in sympy.preorder_traversal(sympy.sympify(e, strict=True)):
                if _non_polynomial(node):
                    counts[node] = counts.get(node, 0) + 1
        for node, count in sorted(counts.items(), key=lambda kv: sympy.default_sort_key(kv[0])):
            if count >= min_count and self.measure(node) > min_width and node not in self.atoms:
                index = len(self.atoms) + 1
                symbol = sympy.Symbol(f"~atom{index:04d}")
                self.names[symbol.name] = f"{self.notation.atom_letter}_{{{index}}}"
                self.widths[symbol.name] = 2.0 + 0.6 * len(str(index))
                self.atoms[node] = symbol

    def _atom(self, e):
        symbol = self.atoms[e]
        if symbol not in self._atoms_used:
            self._atoms_used.add(symbol)
            self.pending.append((symbol, e))
        return symbol

    # -- measuring --------------------------------------------------------------------
    def measure(self, e: sympy.Expr) -> float:
        """Approximate printed width of ``e`` (fractions count their wider part)."""
        key = e
        if key in self._memo:
            return self._memo[key]
        value = self._measure(e)
        if len(self._memo) < 20000:
            self._memo[key] = value
        return value

    def _measure(self, e) -> float:
        if e.is_Symbol:
            return self.widths.get(e.name) or _name_width(e.name)
        if e.is_Integer:
            return len(str(abs(int(e)))) + (1 if e < 0 else 0)
        if e.is_Rational:
            return max(len(str(abs(int(e.p)))), len(str(int(e.q)))) + 1
        if e.is_Number or e.is_NumberSymbol or e is sympy.I:
            return len(str(e)) if e.is_Float else 1
        if e.is_Add:
            return sum(self.measure(a) for a in e.args) + 2.0 * (len(e.args) - 1)
        if e.is_Mul:
            num, den = sympy.fraction(e, exact=True)
            if den != 1:
                return max(self._product(num), self._product(den)) + 1
            return self._product(e)
        if e.is_Pow:
            base, exp = e.args
            if exp == sympy.S.Half:
                return self.measure(base) + 1.5
            if exp.is_negative:
                return self.measure(1 / e) + 1
            return self.measure(base) + 0.7 * self.measure(exp) + 2 * (not base.is_Atom)
        if e.is_Function:
            return len(type(e).__name__) + sum(self.measure(a) for a in e.args) + 2
        return len(str(e))

    def _product(self, e) -> float:
        return sum(self.measure(f) + 1.5 * f.is_Add for f in sympy.Mul.make_args(e))

    # -- naming -------------------------------------------------------------------------
    def _symbol_for(self, expr):
        if expr in self.table:
            return self.table[expr]
        negated = -expr
        if negated in self.table:
            return -self.table[negated]
        index = len(self.table) + 1
        symbol = sympy.Symbol(f"~factor{index:04d}")
        self.names[symbol.name] = f"{self.notation.factor_letter}_{{{index}}}"
        self.widths[symbol.name] = 2.0 + 0.6 * len(str(index))
        self.table[expr] = symbol
        self.pending.append((symbol, expr))
        return symbol

    def _rebuild(self, e, root: bool):
        if e.is_Atom:
            return e
        if not root and e in self.atoms:
            return self._atom(e)
        args = tuple(self._rebuild(a, False) for a in e.args)
        new = e if all(a is b for a, b in zip(args, e.args)) else e.func(*args)
        if not root and new.is_Add and self.measure(new) > self.threshold:
            return self._symbol_for(new)
        return new

    def shorten(self, e: sympy.Expr) -> sympy.Expr:
        """``e`` with wide inner sums replaced by named factors, and the
        numerator or denominator of a fraction that is still too wide named
        as a whole."""
        e = compact(sympy.sympify(e, strict=True))
        if e.is_Relational:
            return e.func(self._rebuild(e.lhs, True), self._rebuild(e.rhs, True),
                          evaluate=False)
        e = self._rebuild(e, True)
        if e in self.table:
            return self.table[e]
        if e.is_Add and -e in self.table:
            return -self.table[-e]
        return self._fit(e)

    def _fit(self, e):
        if not e.is_Mul or self.measure(e) <= self.width:
            return e
        num, den = sympy.fraction(e, exact=True)
        parts = []
        for part in (num, den):
            factors = sympy.Mul.make_args(part)
            simple = [f for f in factors if f.is_Atom]
            composite = [f for f in factors if not f.is_Atom]
            if len(composite) > 1 and self._product(part) > 0.8 * self.width:
                composite = [self._symbol_for(sympy.Mul(*composite))]
            parts.append(sympy.Mul(*simple, *composite))
        return parts[0] / parts[1] if parts[1] != 1 else parts[0]

    def take_definitions(self) -> list:
        """The factors named since the last call, as ``(symbol, expression)``."""
        out, self.pending = self.pending, []
        self.defined += out
        return out

    # -- printing -------------------------------------------------------------------------
    def tex(self, e: sympy.Expr) -> str:
        """LaTeX of ``e`` as it stands (no naming, no breaking)."""
        return self.printer.doprint(e)

    def pieces(self, e: sympy.Expr, width: float | None = None) -> list:
        """``e`` (already shortened) as LaTeX lines no wider than ``width``,
        broken between the terms of a sum."""
        width = self.width if width is None else width
        if self.measure(e) <= width or not (e.is_Add or e.is_Mul):
            return [self.tex(e)]
        if e.is_Mul:
            return self._product_pieces(e, width)
        items = []
        for i, term in enumerate(self.printer._as_ordered_terms(e)):
            negative = term.could_extract_minus_sign()
            body = -term if negative else term
            text = self.tex(body)
            if _needs_brackets(body):
                text = "\\left(" + text + "\\right)"
            sign = "- " if negative else ("+ " if i else "")
            items.append((sign, text, self.measure(body) + 2))
        lines, current, used = [], "", 0.0
        rest = sum(size for _, _, size in items)
        for sign, text, size in items:
            orphan = rest < 0.2 * width and used + rest <= width + 4
            if current and used + size > width and not orphan:
                lines.append(current)
                current, used = ("{}" + sign + text) if sign else text, size
            else:
                current += (" " if current else "") + sign + text
                used += size
            rest -= size
        lines.append(current)
        return lines

    def _product_pieces(self, e, width: float) -> list:
        """A wide product without denominator, broken between factors."""
        num, den = sympy.fraction(e, exact=True)
        if den != 1:
            return [self.tex(e)]
        lines: list = []
        current: list = []
        used = 0.0
        for factor in e.as_ordered_factors():
            size = self.measure(factor) + 1.5 * factor.is_Add
            if current and used + size > width:
                lines.append(current)
                current, used = [], 0.0
            current.append(factor)
            used += size
        lines.append(current)
        out = []
        for k, group in enumerate(lines):
            text = " ".join(self.printer.parenthesize(f, 50) if f.is_Add else self.tex(f)
                            for f in group)
            out.append(text if k == 0 else "{}\\cdot " + text)
        return out

    def align_rows(self, lhs: str, e: sympy.Expr, width: float | None = None, relation: str = "=",
                   fit: bool = True) -> list:
        """Rows of an ``align*`` block for ``lhs = e`` (``e`` shortened here)."""
        short = self.shorten(e) if fit else self._rebuild(sympy.sympify(e, strict=True), True)
        lines = self.pieces(short, width)
        rows = [f"{lhs} &{relation} {lines[0]}"]
        rows += [f"&\\qquad {line}" for line in lines[1:]]
        return rows

    def definition_rows(self, width: float | None = None) -> list:
        """Rows defining the factors named since the last call."""
        rows = []
        while self.pending:
            for symbol, expr in self.take_definitions():
                rows += self.align_rows(self.names[symbol.name], expr, width, fit=False)
        return rows
