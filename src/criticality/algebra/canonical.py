"""Compact, canonical sympy expressions from field elements.

Pipeline place: engine (field elements) -> **canonical expressions** -> result.

A rational function leaves the field as ``constant * factors / factors``:
numerator and denominator are factored by python-flint, each factor's sign is
decided under the model's assumptions (and the admissibility conditions of
the Hopf set), factors with a known sign are listed first, and negative ones
are flipped so that the constant carries the sign.  The factor that decides
the sign of the whole is then visible at a glance.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Iterable

import sympy

from .flint_field import FlintRationalFunctionField
from .algebraic import AlgebraicElement
from .certified import certified_sign, is_numeric
from .family_signs import family_sign
from .quadratic import QuadraticElement, lower
from .signs import NEGATIVE, POSITIVE, UNDECIDED, ZERO, FactoredSign, FactorSign, SignContext

if TYPE_CHECKING:
    from .domain import Tower
    from .field import Element

__all__ = ["factored", "canonical_expr", "larger_than", "compact"]


def factored(tower: Tower, x: Element, ctx: SignContext, *,
             restore: bool = True) -> FactoredSign:
    """Factor an element with signs; an element with radicals or roots is one
    factor, of certified sign when it is a number
    (:mod:`criticality.algebra.certified`), else undecided.  With
    ``restore=False`` transcendental atoms stay as the field's placeholder
    symbols (as the sign context knows them)."""
    x = lower(x)
    if isinstance(x, (QuadraticElement, AlgebraicElement)):
        expr = canonical_expr(tower, x, ctx)
        if not restore and tower.atoms:
            expr = expr.xreplace({a.expr: a.symbol for a in tower.atoms})
        sign = certified_sign(x) if is_numeric(tower) else _assumed_sign(expr)
        if sign is None and isinstance(x, AlgebraicElement):
            sign = family_sign(tower, x, ctx)
        if sign == 1:
            return FactoredSign(sympy.Integer(1), (FactorSign(expr, 1, False, POSITIVE),),
                                POSITIVE)
        if sign == -1:
            return FactoredSign(sympy.Integer(-1), (FactorSign(-expr, 1, False, POSITIVE),),
                                NEGATIVE)
        if sign == 0:
            return FactoredSign(sympy.Integer(0), (), ZERO)
        return FactoredSign(sympy.Integer(1), (FactorSign(expr, 1, False, UNDECIDED),), UNDECIDED)
    K = tower.base
    x = K(x)
    if not x:
        return FactoredSign(sympy.Integer(0), (), ZERO)
    if isinstance(K, FlintRationalFunctionField):
        raw = ctx.from_flint(K, x.num, x.den)
    else:
        raw = ctx.factored(K.to_sympy(x))
    return _restore(tower, raw) if restore else raw


def _assumed_sign(expr):
    """The sign sympy's assumptions give a small expression (e.g. a root
    declared positive), else None."""
    if larger_than((expr,), 60):
        return None
    if expr.is_positive:
        return 1
    if expr.is_negative:
        return -1
    return None


def _restore(tower, fs: FactoredSign) -> FactoredSign:
    if not tower.atoms:
        return fs
    sub = tower.atom_substitution()
    return FactoredSign(fs.constant, tuple(
        FactorSign(f.expr.xreplace(sub), f.multiplicity, f.in_denominator, f.sign)
        for f in fs.factors), fs.sign)


def canonical_expr(tower: Tower, x: Element, ctx: SignContext) -> sympy.Expr:
    """The element as a compact sympy expression (factored where possible)."""
    x = lower(x)
    if isinstance(x, QuadraticElement):
        return canonical_expr(tower, x.a, ctx) + canonical_expr(tower, x.b, ctx) * x.ext.root
    if isinstance(x, AlgebraicElement):
        return sympy.Add(*[canonical_expr(tower, a, ctx) * x.ext.root ** k
                           for k, a in enumerate(x.c) if a])
    return factored(tower, x, ctx).as_expr()


def larger_than(exprs: Iterable[sympy.Expr], nodes: int) -> bool:
    """Whether the expressions together have more than ``nodes`` nodes
    (counting stops there, so the test is cheap on huge expressions).  Used
    to keep large results away from sympy's printing and flattening."""
    count = 0
    for expr in exprs:
        for _ in sympy.preorder_traversal(expr):
            count += 1
            if count > nodes:
                return True
    return False


# -- the compact display shape -----------------------------------------------------------------

#: expressions above this many nodes are shown as they are (compacting them costs more
#: than it helps)
COMPACT_NODES = 4000


def _primitive(poly_expr):
    """``(c, P)`` with ``poly_expr = c * P``, ``P`` a primitive polynomial with
    integer coefficients, negated only when every coefficient is negative (a
    factor keeps the orientation the sign analysis gave it); None when the
    expression is not a polynomial in its atoms."""
    gens = sorted(poly_expr.atoms(sympy.Symbol, sympy.Function), key=sympy.default_sort_key)
    gens = [g for g in gens if not any(g != h and g.has(h) and h.is_Symbol for h in gens)
            or g.is_Symbol]
    try:
        poly = sympy.Poly(poly_expr, *[g for g in gens if g.is_Symbol or g.is_Function])
    except sympy.PolynomialError:
        return None
    if not poly.domain.is_QQ and not poly.domain.is_ZZ:
        return None
    den, poly = poly.clear_denoms()
    content, prim = poly.primitive()
    c = sympy.Rational(content) / sympy.Rational(den)
    if all(coefficient < 0 for coefficient in prim.coeffs()):
        c, prim = -c, -prim  # a sum of negative terms: the sign goes to the constant
    return c, prim.as_expr()


def _compact_factor(e):
    """``(constant, factor)`` of one factor of a product."""
    if e.is_Number:
        return e, sympy.Integer(1)
    if e.is_Pow and e.exp.is_Integer:
        c, f = _compact_factor(e.base)
        return c ** e.exp, f ** e.exp
    if e.is_Add:
        if any(sympy.fraction(t, exact=True)[1] != 1 for t in e.args):
            together = sympy.together(e)
            if together != e:
                return _compact_product(together)
        found = _primitive(e)
        if found is not None:
            return found
        return sympy.Integer(1), sympy.Add(*[compact(t) for t in e.args])
    return sympy.Integer(1), e  # functions and radicals keep their arguments as written


def _compact_product(e):
    c, factors = sympy.Integer(1), []
    for arg in sympy.Mul.make_args(e):
        k, f = _compact_factor(arg)
        c *= k
        factors += [g for g in sympy.Mul.make_args(f) if g != 1]
    return c, sympy.Mul(*factors)


def compact(expr: sympy.Expr) -> sympy.Expr:
    """``expr`` in the compact display shape: a rational function as
    ``c * N / D`` with one fraction bar, ``N`` and ``D`` products of primitive
    integer polynomials with positive leading coefficients, the sign and the
    rational constant in ``c``; functions and relations are compacted inside.
    The value never changes (the shape only).

    >>> a = sympy.Symbol("a", real=True)
    >>> compact(-sympy.Rational(5, 6)*a**2 - a/12 - sympy.Rational(1, 12))
    -(10*a**2 + a + 1)/12
    >>> compact((-a**2/2 - 1)/(a*(2*a**2 + 1)))
    -(a**2 + 2)/(2*a*(2*a**2 + 1))
    """
    expr = sympy.sympify(expr, strict=True)
    if expr.is_Atom or larger_than([expr], COMPACT_NODES):
        return expr
    if expr.is_Relational:
        return expr.func(compact(expr.lhs), compact(expr.rhs), evaluate=False)
    if expr.has(sympy.I):
        re: list = []
        im: list = []
        for term in sympy.Add.make_args(expr):
            (im if term.has(sympy.I) else re).append(term)
        if re and im:
            return sympy.Add(compact(sympy.Add(*re)), compact(sympy.Add(*im) / sympy.I) * sympy.I,
                             evaluate=False)
        return expr
    if expr.is_Add:
        c, rest = _compact_factor(expr)
        if rest.is_Mul or rest.is_Pow:  # the sum was a fraction: compact its parts
            c2, rest = _compact_product(rest)
            c *= c2
    else:
        c, rest = _compact_product(expr)
    if rest == 1:
        return c
    args = sympy.Mul.make_args(rest)
    if len(args) == 1 and args[0].is_Add and c != 1:
        return sympy.Mul(c, args[0], evaluate=False)
    return sympy.Mul(c, rest)
