"""The sections of the LaTeX derivation report.

Pipeline place: result -> :mod:`criticality.outputs.latex_expr` -> **report
sections** -> :func:`criticality.outputs.latex.latex_report`.

:class:`Document` holds what every section shares (the notation, the writer
with its table of named factors, the frequency placeholder); each
``_section_*`` function returns the LaTeX of one section.  Named factors are
defined right after the first block that uses them.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import sympy

from .escape import tex_text
from .latex_expr import Notation, TexWriter, latex_name
from .prose import prose_to_tex
from .render import (CAUTIONS, classification_sentence, per_offset,
                     reduced_system_or_none, split_complex, transversality_sentence)
from ..hopf_analysis.results import CONVENTIONS

if TYPE_CHECKING:
    from ..hopf_analysis.results import HopfResult

__all__ = ["Document", "report_body", "tex_text", "join_rows"]

_RELATIONS = {">": ">", "<": "<", "!=": "\\neq", ">=": "\\geq", "<=": "\\leq", "==": "="}


def join_rows(rows: list) -> str:
    """Rows of an alignment joined by ``\\\\`` (none after ``\\intertext``)."""
    out = []
    for k, row in enumerate(rows):
        last = k == len(rows) - 1
        out.append(row if last or row.startswith("\\intertext") else row + " \\\\")
    return "\n".join(out)


def _radical_bases(omega) -> set:
    return {p.base for p in omega.atoms(sympy.Pow)
            if p.exp.is_Rational and p.exp.q == 2 and not p.base.is_number}


def _named_candidates(result, bases) -> list:
    """The expressions whose repeated logarithms, exponentials and radicals
    get names (radicals of the frequency itself excepted: it has its own
    symbol)."""
    exprs = [result.critical_value, result.omega_squared, result.l1, result.c1,
             result.transversality, *result.cycle.amplitude_coefficients.values(),
             *(c.expr for c in result.conditions), *result.equilibrium.values()]
    if result.supercritical_where is not None:
        exprs.append(result.supercritical_where.lhs)
    out = []
    for e in exprs:
        e = sympy.sympify(e, strict=True)
        if bases:
            e = e.xreplace({p: sympy.Dummy() for p in e.atoms(sympy.Pow)
                            if p.base in bases and p.exp.is_Rational and p.exp.q == 2})
        out.append(e)
    return out


class Document:
    """Shared state of one LaTeX document for one result."""

    def __init__(self, result: HopfResult, width: float, threshold: float,
                 zero_left: bool = False) -> None:
        self.result = result
        self.zero_left = zero_left
        names = set(result.model.symbols) | set(result.substitutions) | {result.parameter}
        for value in result.equilibrium.values():
            names |= {s.name for s in sympy.sympify(value, strict=True).free_symbols}
        names |= {p.name for p, _ in getattr(result, "fixed_parameters", ())}
        self.names = frozenset(names) | frozenset(result.model.states)
        self.notation = Notation(sorted(names))
        self.writer = TexWriter(self.notation, width=width, threshold=threshold)
        self.width = width
        self.mu = latex_name(result.parameter)
        self.mu_c = "{" + self.mu + "}_{\\mathrm{c}}"
        self.omega = self.notation.omega
        self.omega_tex = self.notation.names["~omega"]
        self.lam_tex = self.notation.names["~lambda"]
        self.re_dlambda = (f"\\operatorname{{Re}}\\frac{{d{self.lam_tex}}}{{d{self.mu}}}"
                           f"\\Big|_{{{self.mu_c}}}")
        self._omega_expr = sympy.sympify(result.omega, strict=True)
        self._bases = _radical_bases(self._omega_expr)
        self.writer.name_atoms(_named_candidates(result, self._bases))

    # -- expressions ------------------------------------------------------------------
    def split(self, expr: sympy.Expr) -> tuple:
        return split_complex(expr)

    def _has_radical(self, e) -> bool:
        return any(p.base in self._bases and p.exp.is_Rational and p.exp.q == 2
                   for p in e.atoms(sympy.Pow))

    def with_omega(self, e: sympy.Expr) -> sympy.Expr:
        """``e`` with the frequency written as the symbol omega where it
        appears as a factor (``l1 = R / omega`` rather than a radical)."""
        e = sympy.sympify(e, strict=True)
        if not self._bases:
            return e
        if e.is_Add:
            return sympy.Add(*[self.with_omega(t) for t in e.args])
        if not self._has_radical(e):
            return e
        best = None
        for k in (1, -1, 2, -2, 3, -3):
            t = e * self._omega_expr ** k
            if not self._has_radical(t):
                candidate = t * self.omega ** (-k)
                size = self.writer.measure(candidate) + 3 * (abs(k) - 1)
                if best is None or size < best[0]:
                    best = (size, candidate)
        return e if best is None else best[1]

    def over_omega(self, e: sympy.Expr) -> sympy.Expr:
        """``e`` written as ``(e*omega)/omega`` (for ``l_k = Re(c_k)/omega``)."""
        e = sympy.sympify(e, strict=True)
        if not self._bases:
            return e
        t = e * self._omega_expr
        return self.with_omega(e) if self._has_radical(t) else t * self.omega ** -1

    def complex_with_omega(self, e: sympy.Expr) -> sympy.Expr:
        """``re + i*im`` with the frequency factored out of both parts."""
        re, im = split_complex(e)
        return sympy.Add(self.with_omega(re), sympy.I * self.with_omega(im))

    def relation(self, op: str) -> str:
        return _RELATIONS.get(op, op)

    def inequality_rows(self, rel: sympy.Basic) -> list:
        """Rows for a relational ``lhs > 0``: the deciding expression on the
        left and 0 on the right (``0 < lhs`` with ``zero_left``, the form of
        the quantity block)."""
        if self.zero_left:
            return self.aligned_relation_rows(rel.lhs - rel.rhs, self.relation(rel.rel_op))
        return self.relation_rows(rel.lhs - rel.rhs, self.relation(rel.rel_op))

    def aligned_relation_rows(self, expr: sympy.Expr, relation: str) -> list:
        """``expr &relation 0`` for the quantity block (the relation aligned
        with the block's ``=`` signs, the deciding expression on the left);
        an expression too long for one row is broken as in
        :meth:`relation_rows`."""
        w = self.writer
        lines = w.pieces(w.shorten(expr))
        if len(lines) == 1:
            return [f"{lines[0]} &{relation} 0"]
        return self.relation_rows(expr, relation)

    def relation_rows(self, expr: sympy.Expr, relation: str) -> list:
        """``expr relation 0`` as rows: the expression, broken as needed, then
        the relation on the last row."""
        w = self.writer
        lines = w.pieces(w.shorten(expr))
        rows = [f"&{lines[0]}"] + [f"&\\qquad {line}" for line in lines[1:]]
        rows[-1] += f" {relation} 0"
        return rows

    def text(self, text: str) -> str:
        return tex_text(text)

    def prose(self, text: str) -> str:
        """Prose with its formulas in math mode (model names recognised)."""
        return prose_to_tex(" ".join(str(text).split()), self.names)

    # -- blocks ---------------------------------------------------------------------------
    def block(self, rows: list) -> str:
        if not rows:
            return ""
        return "\\begin{align*}\n" + join_rows(rows) + "\n\\end{align*}"

    def math(self, rows: list) -> str:
        """A block followed by the definitions of the factors it named."""
        out = self.block(rows)
        definitions = self.writer.definition_rows()
        if definitions:
            out += "\nwhere\n" + self.block(definitions)
        return out

    def matrix_rows(self, lhs: str, matrix: sympy.Matrix) -> list:
        w = self.writer
        entries = [[w.shorten(self.with_omega(x)) for x in row] for row in matrix.tolist()]
        cols = len(entries[0]) if entries else 0
        widths = [max(w.measure(row[j]) for row in entries) for j in range(cols)]
        if cols <= 10 and sum(widths) + 2 * cols <= 1.1 * self.width:
            body = " \\\\ ".join(" & ".join(w.tex(x) for x in row) for row in entries)
            return [f"{lhs} &= \\begin{{pmatrix}} {body} \\end{{pmatrix}}"]
        rows = []
        for i, row in enumerate(entries, start=1):
            for j, x in enumerate(row, start=1):
                if x != 0:
                    rows += w.align_rows(f"{lhs}_{{{i},{j}}}", x)
        rows.append("&\\text{(all other entries are zero)}")
        return rows


def _section(title: str, *parts) -> str:
    body = "\n\n".join(p for p in parts if p)
    return f"\\section*{{{title}}}\n{body}\n"


def _dot(name: str) -> str:
    return "\\dot{" + latex_name(name) + "}"


def _section_model(doc: Document) -> str:
    model, w = doc.result.model, doc.writer
    intro = []
    if model.description:
        intro.append(doc.prose(model.description))
    intro.append(f"States ({len(model.states)}): " +
                 ", ".join(f"${latex_name(s)}$" for s in model.states) +
                 f". Bifurcation parameter: ${doc.mu}$.")
    rows = []
    for state, rhs in zip(model.states, model.equations):
        rows += w.align_rows(_dot(state), rhs)
    table = ["\\begin{tabular}{lllp{0.45\\textwidth}}", "\\toprule",
             "parameter & assumption & value & meaning \\\\", "\\midrule"]
    assumptions = doc.result.assumptions
    for p in model.parameters:
        value = "" if p.default is None else f"${w.tex(p.default)}$"
        table.append(f"${latex_name(p.name)}$ & {doc.text(assumptions.get(p.name, p.assumption))}"
                     f" & {value} & {_meaning(doc, p)} \\\\")
    for p, fixed in getattr(doc.result, "fixed_parameters", ()):
        table.append(f"${latex_name(p.name)}$ & fixed & ${w.tex(fixed)}$ & "
                     f"{_meaning(doc, p)} (fixed before the analysis) \\\\")
    table += ["\\bottomrule", "\\end{tabular}"]
    extra = {k: v for k, v in assumptions.items() if k not in {p.name for p in model.parameters}}
    more = ("Further sign assumptions: " + ", ".join(
        f"${latex_name(k)}$ {doc.text(v)}" for k, v in extra.items()) + ".") if extra else ""
    return _section("Model", "\n\n".join(intro), doc.math(rows),
                    "\n".join(table) if model.parameters else "", more)


def _meaning(doc: Document, p) -> str:
    words = doc.prose(p.description or "")
    unit = getattr(p, "unit", None)
    return words + (f" [{doc.text(unit)}]" if unit else "")


def _section_equilibrium(doc: Document) -> str:
    r, w = doc.result, doc.writer
    how = {"given": "given with the model or the call",
           "solved": "found by solving $f(x) = 0$",
           "parametrised": "used as the family parameter: the parameters below were eliminated "
                           "so that the equilibrium coordinates are free symbols"}
    how_words = how.get(r.equilibrium_how) or doc.text(r.equilibrium_how)
    text = (f"The equilibrium ({how_words}), as a "
            f"function of ${doc.mu}$; the analysis takes it at ${doc.mu} = {doc.mu_c}$.")
    rows = []
    for state, value in r.equilibrium.items():
        rows += w.align_rows("{" + latex_name(state) + "}^{*}", value)
    for name, value in r.substitutions.items():
        rows += w.align_rows(latex_name(name), value)
    parts = [text, doc.math(rows)]
    parts += parametrisation_tex(doc)
    return _section("Equilibrium", *parts)


def parametrisation_head(doc: Document) -> str:
    """One sentence, math in math mode: which parametrisation the family
    uses, its free coordinates and where it holds; ``""`` without one."""
    par = getattr(doc.result, "parametrisation", None)
    if par is None:
        return ""
    w = doc.writer
    names = ", ".join(f"${latex_name(n)}$" for n in par.unknowns)
    how = (f"automatic, {doc.text(par.kind)} in {names}" if par.how == "automatic"
           else f"named: {names} solved for")
    coords = ", ".join(f"${latex_name(str(c))}$" for c in par.coordinates)
    gone = ", ".join(f"${latex_name(n)}$" for n, _ in par.eliminated)
    text = (f"Parametrisation ({how}): the equilibrium coordinate"
            f"{'s' if len(par.coordinates) > 1 else ''} {coords} "
            f"{'are' if len(par.coordinates) > 1 else 'is a'} free parameter"
            f"{'s' if len(par.coordinates) > 1 else ''}")
    if gone:
        text += f", and {gone} {'is' if len(par.eliminated) == 1 else 'are'} eliminated"
    if par.nonzero:
        text += " (where " + ", ".join(f"${w.tex(f)} \\neq 0$" for f in par.nonzero) + ")"
    return text + "."


def parametrisation_tex(doc: Document) -> list:
    """The parametrisation sentence and the Hopf condition back in the
    original parameters (display math), for the equilibrium section."""
    head = parametrisation_head(doc)
    if not head:
        return []
    parts, w = [head], doc.writer
    direct = getattr(doc.result, "direct_forms", None)
    if direct is None or direct.hopf_set is None:
        return parts
    mu = doc.mu
    parts.append("In the original parameters the Hopf set is")
    parts.append(doc.math(w.align_rows("0", direct.hopf_set)))
    if direct.critical_value is not None:
        parts.append(f"that is, ${mu} = {w.tex(direct.critical_value)}$.")
    elif direct.degree == 2:
        parts.append(f"The critical value is one of the two roots of this quadratic in ${mu}$; "
                     "which one can change with the parameters.")
    elif direct.degree > 2:
        parts.append(f"It is of degree {direct.degree} in ${mu}$, so no closed form in radicals "
                     "is given for the critical value in the original parameters.")
    if direct.l1_boundary is not None:
        parts.append("The sign of the first Lyapunov coefficient on the Hopf set can change "
                     "only where")
        parts.append(doc.math(w.align_rows("0", direct.l1_boundary)))
    return parts


def _section_linear(doc: Document) -> str:
    r, w = doc.result, doc.writer
    jac = doc.math(doc.matrix_rows("\\mathbf{A}", r.jacobian))
    lam = sympy.Symbol("lambda")
    chi = r.characteristic_polynomial.xreplace({lam: doc.notation.lam})
    pair = doc.notation.lam ** 2 + r.omega_squared
    rest = [a for a in sympy.Mul.make_args(chi) if a != pair]
    lhs = f"\\chi({doc.lam_tex})"
    if len(rest) < len(sympy.Mul.make_args(chi)):
        chi = sympy.Mul(doc.notation.lam ** 2 + doc.omega ** 2, *rest)
    rows = w.align_rows(lhs, chi)
    crit = ("A pair of eigenvalues lies on the imaginary axis where the Hurwitz determinant "
            f"$\\Delta_{{n-1}}$ of the characteristic polynomial vanishes; on this branch "
            f"(branch {r.branch_index + 1} of {r.branch_count}) that happens at")
    rows2 = w.align_rows(doc.mu_c, r.critical_value)
    rows2 += w.align_rows(doc.omega_tex + "^{2}", r.omega_squared)
    return _section("Linearisation at the critical point",
                    f"The Jacobian at the equilibrium for ${doc.mu} = {doc.mu_c}$:", jac,
                    "Its characteristic polynomial, with the critical pair "
                    f"$\\pm i{doc.omega_tex}$ split off:", doc.math(rows), crit, doc.math(rows2))


def _section_frequency(doc: Document) -> str:
    r, w = doc.result, doc.writer
    rows = w.align_rows(doc.omega_tex, r.omega)
    rows += w.align_rows("T", 2 * sympy.pi * doc.omega ** -1)
    rows += w.align_rows(f"\\frac{{d{doc.lam_tex}}}{{d{doc.mu}}}\\Big|_{{{doc.mu_c}}}",
                         doc.complex_with_omega(r.eigenvalue_derivative))
    rows += w.align_rows(doc.re_dlambda, r.transversality)
    text = ("The frequency, the period at onset, and the rate at which the eigenvalue $i" +
            doc.omega_tex + "$ moves with the parameter; its real part is the transversality. " +
            _unstable_words(doc))
    return _section("Frequency and transversality", text, doc.math(rows))


def _section_eigenvectors(doc: Document) -> str:
    r, w = doc.result, doc.writer
    text = ("Right and adjoint eigenvectors, $\\mathbf{A}\\mathbf{q} = i" + doc.omega_tex +
            "\\mathbf{q}$, $\\mathbf{A}^{T}\\mathbf{p} = -i" + doc.omega_tex + "\\mathbf{p}$, "
            "$\\langle \\mathbf{p}, \\mathbf{q}\\rangle = 1$ (components in the order of the "
            "states; $\\mathbf{q}$ is not normalised, its squared norm is given):")
    rows = []
    for k, x in enumerate(r.eigenvector_q, start=1):
        rows += w.align_rows(f"q_{{{k}}}", doc.complex_with_omega(x))
    for k, x in enumerate(r.eigenvector_p, start=1):
        rows += w.align_rows(f"p_{{{k}}}", doc.complex_with_omega(x))
    rows += w.align_rows("\\langle \\mathbf{q}, \\mathbf{q}\\rangle", r.q_norm_squared)
    return _section("Eigenvectors", text, doc.math(rows))


def _section_reduced(doc: Document) -> str:
    rs = reduced_system_or_none(doc.result)
    if rs is None:
        return _section("Reduced system on the center manifold",
                        "Not available for this result (" + doc.text(doc.result.status) + ").")
    n = doc.notation
    sub = {rs.x: n.xi, rs.y: n.eta, rs.omega: n.omega}
    xi, eta = n.names["~xi"], n.names["~eta"]
    w, om = doc.writer, doc.omega_tex
    rows = []
    for lhs, lead, expr in (("\\dot{" + xi + "}", f"-{om}\\,{eta}", rs.f),
                            ("\\dot{" + eta + "}", f"{om}\\,{xi}", rs.g)):
        part = w.align_rows(lhs, expr.xreplace(sub))
        first = part[0].split("&= ", 1)[1]
        joined = lead if first == "0" else lead + (" " if first.startswith("-") else " + ") + first
        part[0] = f"{lhs} &= {joined}"
        rows += part
    text = (f"In the coordinates $({xi}, {eta})$ of the center plane the state is "
            f"$x = x^{{*}} + {xi}\\,\\operatorname{{Re}}\\mathbf{{q}} - {eta}\\,"
            f"\\operatorname{{Im}}\\mathbf{{q}} + \\mathbf{{h}}({xi}, {eta})$ and the vector "
            f"field on the center manifold reads (to order {rs.order}):")
    hrows = []
    for k, h in enumerate(rs.manifold, start=1):
        if h != 0:
            hrows += w.align_rows(f"h_{{{k}}}({xi}, {eta})", h.xreplace(sub))
    return _section("Reduced system on the center manifold", text, doc.math(rows),
                    "The graph of the center manifold (quadratic part):" if hrows else "",
                    doc.math(hrows))


def _section_normal_form(doc: Document) -> str:
    r, w = doc.result, doc.writer
    re_c1, im_c1 = split_complex(r.c1)
    rows = w.align_rows("\\operatorname{Re} c_{1}", re_c1)
    rows += w.align_rows("\\operatorname{Im} c_{1}", doc.with_omega(im_c1))
    rows += w.align_rows("\\ell_{1} = \\frac{\\operatorname{Re} c_{1}}{" + doc.omega_tex + "}",
                         doc.over_omega(r.l1))
    rows += w.align_rows("a_{\\mathrm{GH}} = \\frac{" + doc.omega_tex + "\\,\\ell_{1}}{2}",
                         r.planar_coefficient)
    for k, coefficient in enumerate(r.lyapunov_coefficients[1:], start=2):
        rows += w.align_rows(f"\\ell_{{{k}}}", doc.over_omega(coefficient))
    text = ("The first Lyapunov coefficient $\\ell_{1}$ decides the type of the bifurcation. "
            "On the center manifold the normal form is $\\dot z = (\\beta + i" + doc.omega_tex +
            ")z + c_{1} z|z|^{2} + \\dots$ with the unit normalisation "
            "$\\langle \\mathbf{q}, \\mathbf{q}\\rangle = 1$; $a_{\\mathrm{GH}}$ is the planar "
            "coefficient of Guckenheimer and Holmes (1983, Section 3.4).")
    return _section("Normal-form coefficients", text, doc.math(rows))


def _section_verdict(doc: Document) -> str:
    r = doc.result
    parts = [doc.prose(classification_sentence(r.classification, r.cycle.amplitude_power))]
    if r.supercritical_where is None and r.l1_zero_set is None and len(r.verdict) <= 120:
        parts.append("Verdict: " + doc.prose(r.verdict) + ".")
    if r.supercritical_where is not None:
        parts.append("Supercritical exactly where")
        parts.append(doc.math(doc.inequality_rows(r.supercritical_where)))
    if r.l1_zero_set is not None:
        parts.append("The first Lyapunov coefficient vanishes (Bautin points) where")
        parts.append(doc.math(doc.relation_rows(r.l1_zero_set.lhs, "=") if not doc.zero_left
                              else doc.aligned_relation_rows(r.l1_zero_set.lhs, "=")))
    return _section("Criticality", *parts)


def _side_words(doc: Document) -> str:
    r, mu, muc = doc.result, doc.mu, doc.mu_c
    cycle = r.cycle
    if cycle.side in ("above", "below"):
        op = ">" if cycle.side == "above" else "<"
        words = f"The cycle exists for ${mu} {op} {muc}$ (near the critical value). "
    elif cycle.side_condition is not None:
        rows = doc.inequality_rows(cycle.side_condition)
        words = (f"The cycle exists for ${mu} > {muc}$ exactly where\n" + doc.math(rows) +
                 f"\nand for ${mu} < {muc}$ where the inequality is reversed. ")
    else:
        words = "The side on which the cycle exists is not decided. "
    deciding = cycle.amplitude_power // 2
    stable = {True: f"It is orbitally stable ($\\ell_{{{deciding}}} < 0$ and the other "
                    "eigenvalues are stable).", False: "It is unstable.",
              None: "Its stability is not decided for all parameters (see the criticality "
                    "condition and the conditions)."}
    return words + stable[cycle.stable]


def _unstable_words(doc: Document) -> str:
    sentence = transversality_sentence(doc.result)
    name = doc.result.parameter
    for op in (">", "<"):
        plain = f"{name} {op} {name}_c"
        if plain in sentence:
            head, tail = sentence.split(plain, 1)
            return doc.prose(head) + f"${doc.mu} {op} {doc.mu_c}$" + doc.prose(tail)
    return doc.prose(sentence)


def _offset_rows(doc: Document, lhs: str, expr) -> list:
    """``lhs = K (mu - mu_c)`` rows when ``expr`` has that shape."""
    k = per_offset(doc.result, expr)
    if k is None:
        return doc.writer.align_rows(lhs, expr)
    marker = sympy.Symbol("~offset")
    doc.writer.names[marker.name] = f"\\left({doc.mu} - {doc.mu_c}\\right)"
    doc.writer.widths[marker.name] = 8.0
    return doc.writer.align_rows(lhs, k * marker)


def _section_cycle(doc: Document) -> str:
    r, w = doc.result, doc.writer
    rows = _offset_rows(doc, "\\rho^{2}", r.cycle.radius_squared)
    for state, coefficient in r.cycle.amplitude_coefficients.items():
        rows += w.align_rows(f"\\frac{{A_{{{latex_name(state)}}}^{{2}}}}{{{doc.mu} - {doc.mu_c}}}",
                             coefficient)
    power = r.cycle.amplitude_power
    if power != 2:
        for state, amplitude in r.cycle.amplitudes.items():
            rows += w.align_rows(f"A_{{{latex_name(state)}}}", amplitude)
    if r.cycle.frequency_slope != sympy.nan:  # NaN: no linear frequency law (see CyclePrediction)
        rows += w.align_rows(f"\\frac{{d{doc.omega_tex}_{{\\mathrm{{cycle}}}}}}{{d{doc.mu}}}",
                             doc.with_omega(r.cycle.frequency_slope))
    amplitude_words = ("the squared amplitude $A_{j}^{2}$ of each state per unit of the distance "
                       "from the critical value" if power == 2 else
                       f"the amplitude $A_{{j}}$ of each state (a $1/{power}$ power law: "
                       f"$\\ell_{{1}}$ vanishes identically and $\\ell_{{{power // 2}}}$ decides)")
    return _section("Predicted cycle", _side_words(doc),
                    f"Squared radius (unit normalisation), {amplitude_words} (half "
                    "peak-to-peak, to leading order), and the slope of the cycle's angular "
                    f"frequency $\\omega_{{\\mathrm{{cycle}}}} = {doc.omega_tex} + "
                    f"\\frac{{d{doc.omega_tex}_{{\\mathrm{{cycle}}}}}}{{d{doc.mu}}}({doc.mu} - "
                    f"{doc.mu_c}) + \\dots$; the period at onset is $2\\pi/{doc.omega_tex}$:",
                    doc.math(rows))


def _section_conditions(doc: Document) -> str:
    items = []
    for c in doc.result.conditions:
        rel = sympy.StrictGreaterThan(c.expr, 0, evaluate=False) if c.relation == ">" else None
        rows = (doc.inequality_rows(rel) if rel is not None else
                doc.relation_rows(c.expr, "\\neq"))
        items.append(f"\\statuslabel{{{doc.text(c.status)}}}: {doc.prose(c.description)}\n" +
                     doc.math(rows))
    intro = ("\\statuslabel{holds}: proved under the assumptions; \\statuslabel{open}: stated, "
             "not proved (the result is valid where it holds); \\statuslabel{fails}: proved "
             "false.")
    return _section("Conditions", intro, *items)


def _section_words(doc: Document) -> str:
    r = doc.result
    notes = ("\\begin{itemize}\n" + "\n".join(f"\\item {doc.prose(n)}" for n in r.notes) +
             "\n\\end{itemize}") if r.notes else "None."
    lines = (_conventions_tex(doc) if r.conventions == CONVENTIONS
             else [doc.text(c) for c in r.conventions.lines()])
    conventions = "\\begin{itemize}\n" + "\n".join(f"\\item {c}" for c in lines) + \
        "\n\\end{itemize}"
    cautions = ("\\begin{itemize}\n" + "\n".join(f"\\item {doc.text(c)}" for c in CAUTIONS) +
                "\n\\end{itemize}")
    return (_section("Notes", notes) + _section("Conventions", conventions) +
            _section("Cautions", cautions))


def _conventions_tex(doc: Document) -> list:
    """The standard conventions, typeset (same content as :class:`Conventions`)."""
    om = doc.omega_tex
    return [
        "Inner product $\\langle a, b\\rangle = \\bar{a}^{T} b$.",
        f"$\\mathbf{{A}}\\mathbf{{q}} = i{om}\\mathbf{{q}}$ with ${om} > 0$, "
        f"$\\mathbf{{A}}^{{T}}\\mathbf{{p}} = -i{om}\\mathbf{{p}}$, "
        "$\\langle\\mathbf{p}, \\mathbf{q}\\rangle = 1$, and the unit normalisation "
        "$\\langle\\mathbf{q}, \\mathbf{q}\\rangle = 1$.",
        "On the center manifold $x - x^{*} = z\\mathbf{q} + \\overline{z\\mathbf{q}} + "
        f"O(|z|^{{2}})$ and $\\dot z = (\\beta + i{om})z + c_{{1}} z|z|^{{2}} + "
        "c_{2} z|z|^{4} + \\dots$",
        f"$\\ell_{{1}} = \\operatorname{{Re}} c_{{1}}/{om}$ (unit-eigenvector normalisation); "
        f"$\\ell_{{k}} = \\operatorname{{Re}} c_{{k}}/{om}$, meaningful where "
        "$\\ell_{1} = \\dots = \\ell_{k-1} = 0$.",
        f"For a planar system $\\dot x = -{om} y + f$, $\\dot y = {om} x + g$ the coefficient "
        "$a$ of Guckenheimer and Holmes (1983, Section 3.4) equals "
        f"${om}\\,\\ell_{{1}}/2$; other normalisations of $\\mathbf{{q}}$ scale "
        "$\\ell_{1}$ by $|\\mathbf{q}|^{2}$ but never change its sign.",
        "$\\ell_{1} < 0$: supercritical (stable cycle); $\\ell_{1} > 0$: subcritical "
        "(unstable cycle).",
        "Radius $\\rho^{2} = -\\beta'(\\mu_{\\mathrm{c}})(\\mu - \\mu_{\\mathrm{c}})/"
        "\\operatorname{Re} c_{1}$; the amplitude of $x_{j}$ is $2\\rho|q_{j}|$; the period is "
        f"$2\\pi/{om}$ to leading order.",
    ]


def report_body(doc: Document) -> str:
    """Every section of the report, in order."""
    parts = [_section_model, _section_equilibrium, _section_linear, _section_frequency,
             _section_eigenvectors, _section_reduced, _section_normal_form, _section_verdict,
             _section_cycle, _section_conditions, _section_words]
    return "\n".join(part(doc) for part in parts)
