"""The criticality condition: the sign of the first Lyapunov coefficient.

Pipeline place: normal form -> **criticality condition** -> result.

``l1 = Re(c1) / omega`` with ``omega > 0``, so the sign is that of ``Re(c1)``.
Its factorisation is split into factors of proven sign and the undecided ones;
the verdict is

* "supercritical for all admissible parameters" (l1 < 0 proved),
* "subcritical for all admissible parameters" (l1 > 0 proved),
* "supercritical exactly where <inequality>" (one or more undecided factors),
* "degenerate" (l1 = 0 identically: the next Lyapunov coefficient decides).

Admissible means: the declared assumptions, omega^2 > 0 and the critical value
within the bifurcation parameter's declared range.
"""

from __future__ import annotations

from dataclasses import dataclass

import sympy

from ..algebra.canonical import larger_than
from ..algebra.signs import NEGATIVE, NONNEGATIVE, NONPOSITIVE, POSITIVE, UNDECIDED, ZERO, FactoredSign
from ..kinds import Classification

__all__ = ["Verdict", "classify", "no_verdict"]

SUPERCRITICAL, SUBCRITICAL, DEGENERATE, MIXED = (
    Classification.SUPERCRITICAL, Classification.SUBCRITICAL, Classification.DEGENERATE,
    Classification.DEPENDS)
#: no verdict: the pair does not cross (zero transversality), or the critical
#: value lies outside the parameter's declared range (empty admissible set)
NONTRANSVERSAL, INADMISSIBLE = Classification.NONTRANSVERSAL, Classification.INADMISSIBLE


@dataclass(frozen=True)
class Verdict:
    """The criticality condition.

    Attributes
    ----------
    classification : Classification
        ``"supercritical"``, ``"subcritical"``, ``"depends"`` or ``"degenerate"``.
    text : str
        The verdict in words.
    supercritical_where : sympy relational or None
        For ``"depends"``: the inequality on which the bifurcation is
        supercritical (``sign_factor < 0``).
    zero_set : sympy.Equality or None
        Where l1 vanishes inside the admissible set (Bautin points), if any.
    sign_factor : sympy.Expr
        The expression whose sign equals the sign of l1 (undecided factors
        times the sign of the rest).
    """

    classification: Classification
    text: str
    supercritical_where: object
    zero_set: object
    sign_factor: sympy.Expr


def classify(fs: FactoredSign, *, coefficient: str = "l1") -> Verdict:
    """Verdict from the factored sign of ``Re(c1)`` (or of ``Re(c_k)``)."""
    if fs.sign == ZERO or fs.constant == 0:
        return Verdict(DEGENERATE, f"degenerate: {coefficient} vanishes identically; the next "
                       "Lyapunov coefficient decides", None, None, sympy.Integer(0))
    undecided = fs.undecided
    even_unknown = [f for f in fs.factors if f.sign in (UNDECIDED, NONNEGATIVE) and f.multiplicity % 2 == 0
                    and not f.expr.is_number]
    zero_exprs = [f.expr for f in undecided if not f.in_denominator] + \
                 [f.expr for f in even_unknown if not f.in_denominator]
    zero_set = sympy.Eq(sympy.Mul(*zero_exprs), 0, evaluate=False) if zero_exprs else None
    zero_words = _show(zero_set.lhs, "Z, the product in zero_set") if zero_set is not None else ""
    where = f" except where {zero_words} = 0" if zero_exprs else ""
    if fs.sign in (NEGATIVE, NONPOSITIVE) and not undecided:
        return Verdict(SUPERCRITICAL, "supercritical for all admissible parameters" + where,
                       None, zero_set, sympy.Integer(-1))
    if fs.sign in (POSITIVE, NONNEGATIVE) and not undecided:
        return Verdict(SUBCRITICAL, "subcritical for all admissible parameters" + where,
                       None, zero_set, sympy.Integer(1))
    s, product = fs.sign_part()
    sign_factor = s * product
    ineq = (sympy.StrictGreaterThan(product, 0, evaluate=False) if s < 0
            else sympy.StrictLessThan(product, 0, evaluate=False))
    text = f"supercritical exactly where {_pretty(ineq)}; subcritical where the inequality is " \
           "reversed"
    if zero_set is not None:
        text += f"; {coefficient} vanishes where {zero_words} = 0"
    return Verdict(MIXED, text, ineq, zero_set, sign_factor)


def no_verdict(kind: Classification, parameter: str, sign: str = "") -> Verdict:
    """The named status that replaces a verdict where the Hopf theorem does
    not apply: ``NONTRANSVERSAL`` (Re d lambda / d mu = 0 at the critical
    value: the pair touches the imaginary axis without crossing) or
    ``INADMISSIBLE`` (the critical value violates the declared sign of the
    parameter, so no admissible parameter value reaches it)."""
    if kind == NONTRANSVERSAL:
        text = (f"no verdict: the transversality Re d lambda / d {parameter} vanishes at the "
                "critical value, so the pair touches the imaginary axis without crossing it "
                "and the Hopf theorem does not apply (a degenerate point: higher derivatives "
                f"in {parameter} decide whether cycles appear)")
    else:
        text = (f"no verdict: the critical value of '{parameter}' violates its declared sign "
                f"({sign}), so the admissible set is empty and no admissible parameter value "
                "reaches this Hopf point")
    return Verdict(kind, text, None, None, sympy.nan)


#: Expressions with more nodes than this are not spelled out in the verdict's
#: words (printing them can take longer than computing them); the relation
#: itself is always kept in ``supercritical_where`` / ``zero_set``.
_TEXT_NODES = 400


def _show(expr, name: str) -> str:
    if larger_than((expr,), _TEXT_NODES):
        return f"{name} (more than {_TEXT_NODES} nodes, not spelled out here)"
    return sympy.sstr(expr)


def _pretty(rel) -> str:
    op = ">" if isinstance(rel, sympy.StrictGreaterThan) else "<"
    return f"{_show(rel.lhs, 'F, the factor in supercritical_where')} {op} 0"
