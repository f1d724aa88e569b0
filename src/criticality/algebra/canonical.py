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

import sympy

from .flint_field import FlintRationalFunctionField
from .algebraic import AlgebraicElement
from .certified import certified_sign, is_numeric
from .family_signs import family_sign
from .quadratic import QuadraticElement, lower
from .signs import NEGATIVE, POSITIVE, UNKNOWN, ZERO, FactoredSign, FactorSign, SignContext

__all__ = ["factored", "canonical_expr", "larger_than"]


def factored(tower, x, ctx: SignContext, *, restore: bool = True) -> FactoredSign:
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
        return FactoredSign(sympy.Integer(1), (FactorSign(expr, 1, False, UNKNOWN),), UNKNOWN)
    K = tower.base
    x = K(x)
    if not x:
        return FactoredSign(sympy.Integer(0), (), "zero")
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


def canonical_expr(tower, x, ctx: SignContext) -> sympy.Expr:
    """The element as a compact sympy expression (factored where possible)."""
    x = lower(x)
    if isinstance(x, QuadraticElement):
        return canonical_expr(tower, x.a, ctx) + canonical_expr(tower, x.b, ctx) * x.ext.root
    if isinstance(x, AlgebraicElement):
        return sympy.Add(*[canonical_expr(tower, a, ctx) * x.ext.root ** k
                           for k, a in enumerate(x.c) if a])
    return factored(tower, x, ctx).as_expr()


def larger_than(exprs, nodes: int) -> bool:
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
