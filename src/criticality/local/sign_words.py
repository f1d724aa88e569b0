"""The sign of a field element as a word, and an element as a compact sympy
expression: what the analyses beyond Hopf (fold, Bogdanov-Takens, Bautin)
report about their coefficients.

Pipeline place: field elements of a prepared problem -> **sign words** ->
the verdicts of :mod:`criticality.bifurcations`.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import sympy

from ..algebra.canonical import canonical_expr, factored
from ..algebra.quadratic import lower
from ..algebra.signs import context_for
from ..kinds import Sign

if TYPE_CHECKING:
    from ..algebra import Tower
    from ..algebra.field import Element
    from ..algebra.signs import SignContext

__all__ = ["sign_word", "expr"]


def sign_word(tower: Tower, x: Element, ctx: SignContext | None) -> Sign:
    """``"positive"``, ``"negative"``, ``"zero"``, ``"nonnegative"``,
    ``"nonpositive"`` or ``"undecided"`` (a :class:`~criticality.kinds.Sign`)."""
    x = lower(x)
    if not x:
        return Sign.ZERO
    numeric = _numeric_sign(tower, x)
    if numeric is not None:
        return numeric
    if ctx is None:
        ctx = context_for((), {}, tower.atoms)
    try:
        fs = factored(tower, x, ctx)
    except Exception:  # noqa: BLE001 - radicals: no decision
        return Sign.UNDECIDED
    if fs.undecided:
        return Sign.UNDECIDED
    return Sign(fs.sign)


def _numeric_sign(tower, x):
    """The sign of a constant (an algebraic number, possibly with radicals
    and transcendental atoms), decided at 60 digits; None for expressions
    with free symbols or values too close to zero to decide."""
    e = tower.to_sympy(x)
    if e.free_symbols:
        return None
    v = sympy.N(e, 60)
    re, im = v.as_real_imag()
    if abs(im) > 1e-40 * max(1, abs(re)) or abs(re) < sympy.Float(10) ** -40:
        return None
    return Sign.POSITIVE if re > 0 else Sign.NEGATIVE


def expr(tower: Tower, x: Element, ctx: SignContext) -> sympy.Expr:
    """A field element as a compact sympy expression."""
    return canonical_expr(tower, x, ctx)
