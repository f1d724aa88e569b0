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
from .quadratic import QuadraticElement, lower
from .signs import UNKNOWN, FactoredSign, FactorSign, SignContext

__all__ = ["factored", "canonical_expr", "larger_than"]


def factored(tower, x, ctx: SignContext, *, restore: bool = True) -> FactoredSign:
    """Factor an element with signs; an element with radicals is one
    undecided factor.  With ``restore=False`` transcendental atoms stay as
    the field's placeholder symbols (as the sign context knows them)."""
    x = lower(x)
    if isinstance(x, QuadraticElement):
        expr = canonical_expr(tower, x, ctx)
        if not restore and tower.atoms:
            expr = expr.xreplace({a.expr: a.symbol for a in tower.atoms})
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
