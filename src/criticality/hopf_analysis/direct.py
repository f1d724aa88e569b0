"""The Hopf condition of a parametrised family, back in the original parameters.

Pipeline place: result (parametrised) -> **direct forms** -> result.

A family parametrised by one equilibrium coordinate ``c`` (``a = E(c, q,
mu)`` eliminated) has its critical value ``mu_c = R(c, q)`` and the sign
boundary of ``l1`` as rational functions of ``c``.  Mapping them to the
original parameters means solving ``a = E(c, q, mu)`` for ``c``, the
equation that needed radicals in the first place; what can be given exactly
is the elimination of ``c``: the resultant of the numerators of ``mu - R``
and ``a - E`` is a polynomial ``H(mu, a, q)`` that vanishes on the Hopf set
(its factors that vanish identically on the family are kept).  Where ``H``
is linear in ``mu`` the critical value follows in closed form; where its
degree is two, it is a root of a quadratic; above, no closed form in
radicals is claimed.  The boundary where ``l1`` changes sign is eliminated
the same way.  Families with several free coordinates are not eliminated
(the result says so).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import sympy

from ..algebra.polyops import resultant_factors
from ..algebra.signs import NEGATIVE, POSITIVE, context_for

if TYPE_CHECKING:
    from .results import HopfResult

__all__ = ["DirectForms", "direct_forms"]


@dataclass(frozen=True)
class DirectForms:
    """The Hopf condition in the original parameters, as far as it exists.

    Attributes
    ----------
    hopf_set : sympy.Expr or None
        A polynomial ``H`` in the bifurcation parameter and the original
        parameters with ``H = 0`` on the Hopf set of the family.
    degree : int or None
        The degree of ``H`` in the bifurcation parameter.
    critical_value : sympy.Expr or None
        The critical value in the original parameters, where ``H`` is linear
        in the bifurcation parameter.
    candidates : tuple of sympy.Expr
        Where ``H`` is quadratic in the bifurcation parameter, its two roots:
        the family's critical value is one of them, which one may change with
        the parameters (the coordinate tells them apart).
    l1_boundary : sympy.Expr or None
        A product of polynomials in the original parameters that vanishes
        wherever the sign of ``l1`` can change on the Hopf set (the zero set
        of l1 and the factors of undecided sign, the coordinate eliminated);
        None where ``l1`` has one sign, or where it could not be eliminated.
    note : str
        What exists and what does not, in one or two sentences.
    """

    hopf_set: Any
    degree: Any
    critical_value: Any
    l1_boundary: Any
    note: str
    candidates: tuple = ()


#: marks a sign boundary that could not be eliminated (too large, not polynomial)
_TOO_LARGE = sympy.Symbol("_too_large")


def _unavailable(why: str) -> DirectForms:
    return DirectForms(None, None, None, None, why)


def _on_family(factor, substitution) -> bool:
    """Whether ``factor`` vanishes identically on the parametrised family."""
    return sympy.cancel(sympy.together(factor.xreplace(substitution))) == 0


def _eliminated(factors, substitution):
    if factors is None:
        return None
    kept = [f for f in factors if f.free_symbols and _on_family(f, substitution)]
    return sympy.Mul(*kept) if kept else None


def direct_forms(result: HopfResult) -> DirectForms:
    """The direct forms of a result computed on a parametrised family."""
    par = result.parametrisation
    if par is None or not par.eliminated:
        return _unavailable("")
    if len(par.coordinates) != 1:
        return _unavailable(
            f"the family has {len(par.coordinates)} free coordinates; the conditions are given "
            "in them only (eliminating several coordinates is not attempted)")
    (c,) = par.coordinates
    mu, mu_c = result.parameter_symbol, result.critical_value
    (name, value), = par.eliminated
    a = result.model.symbols[name]
    if any(e.has(sympy.Pow) and _has_root(e) for e in (mu_c, value)):
        return _unavailable("the parametrised critical value has a root; no polynomial "
                            "elimination was attempted")
    family = {a: value.xreplace({mu: mu_c}), mu: mu_c}
    relation = a - value
    hopf = _eliminated(resultant_factors(mu - mu_c, relation, c), family)
    if hopf is None:
        return _unavailable("the coordinate could not be eliminated exactly (the polynomials "
                            "are too large or not polynomial)")
    degree = int(sympy.degree(hopf, mu))
    explicit, candidates = None, ()
    p = sympy.Poly(hopf, mu)
    if degree == 1:
        explicit = sympy.factor(-p.coeff_monomial(1) / p.coeff_monomial(mu))
    elif degree == 2:
        a2, a1, a0 = p.all_coeffs()
        root = sympy.sqrt(sympy.factor(a1 ** 2 - 4 * a2 * a0))
        candidates = tuple(sympy.factor(-a1 / (2 * a2)) + sign * root / sympy.factor(2 * a2)
                           for sign in (1, -1))
    deciding = [rel.lhs - rel.rhs for rel in (result.l1_zero_set, result.supercritical_where)
                if rel is not None]
    boundary = _boundary(deciding, relation.xreplace({mu: mu_c}), c, {a: family[a]}) \
        if deciding else None
    definite = False
    if boundary is not None and boundary is not _TOO_LARGE:
        boundary, definite = _undecided(result, boundary)
    zero = deciding or None
    words = _words(result, c, hopf, degree, explicit, zero, boundary, definite)
    return DirectForms(hopf, degree, explicit, None if boundary is _TOO_LARGE else boundary,
                       words, candidates)


def _boundary(deciding, relation, c, family):
    """Where the sign of l1 can change on the Hopf set, in the original
    parameters: each irreducible factor of the deciding expressions (the
    zero set of l1 and the factors of undecided sign) that holds the
    coordinate is eliminated by a resultant with the relation ``a = E``, and
    the factors of the resultant that meet it on the family (a common factor
    once ``a = E`` is put back) are kept; factors free of the coordinate are
    kept as they are."""
    kept: dict = {}
    for expr in deciding:
        for part in sympy.fraction(sympy.together(expr)):
            for f, _ in sympy.factor_list(part)[1]:
                if not f.free_symbols:
                    continue
                if not f.has(c):
                    kept.setdefault(f, None)
                    continue
                factors = resultant_factors(f, relation, c)
                if factors is None:
                    return _TOO_LARGE
                for g in factors:
                    back = sympy.fraction(sympy.together(g.xreplace(family)))[0]
                    if g.free_symbols and sympy.gcd(back, f).free_symbols:
                        kept.setdefault(g, None)
    if not kept:
        return None
    return sympy.Mul(*sorted(kept, key=sympy.default_sort_key))


def _undecided(result, boundary):
    """``(product of the factors of undecided sign, whether every factor had
    a known sign)`` under the declared assumptions of the original
    parameters."""
    names = {str(s) for s in boundary.free_symbols}
    symbols = [s for s in result.model.parameter_symbols if s.name in names]
    ctx = context_for(symbols, {s: result.assumptions.get(s.name, "real") for s in symbols})
    open_ = [f for f in sympy.Mul.make_args(boundary)
             if f.free_symbols and ctx.polynomial_sign(f) not in (POSITIVE, NEGATIVE)]
    return (sympy.Mul(*open_) if open_ else None), not open_


def _has_root(expr) -> bool:
    return any(isinstance(x, sympy.Pow) and not x.exp.is_Integer
               for x in sympy.preorder_traversal(expr))


def _words(result, c, hopf, degree, explicit, zero, boundary, definite) -> str:
    mu = result.parameter
    text = f"in the original parameters the Hopf set is {sympy.sstr(hopf)} = 0 ({c} eliminated)"
    if explicit is not None:
        text += f", i.e. {mu} = {sympy.sstr(explicit)}"
    elif degree == 2:
        text += (f"; the critical value is one of the two roots of this quadratic in {mu} "
                 "(direct_forms.candidates; which one can change with the parameters)")
    else:
        text += (f"; of degree {degree} in {mu}, so no closed form in radicals is given for the "
                 "critical value in the original parameters")
    if boundary is _TOO_LARGE:
        text += "; the factors that decide the sign of l1 were too large to eliminate"
    elif boundary is not None:
        text += (f"; the sign of l1 on the Hopf set can change only where "
                 f"{sympy.sstr(boundary)} = 0")
    elif definite:
        text += ("; the factors that decide the sign of l1, taken to the original parameters, "
                 "do not vanish under the declared signs, so l1 keeps its sign along each "
                 "connected piece of the Hopf set")
    elif zero is not None:
        text += ("; the factors that decide the sign of l1 have no zero in the original "
                 "parameters on the family")
    return text
