"""Certified signs of algebraic numbers.

Pipeline place: used by :mod:`criticality.algebra.canonical` wherever an
element of an extension (a radical, a root of a critical polynomial) has no
free parameter left: its sign is then a fact, not a condition.

An element of a tower over QQ is enclosed in a complex ball (python-flint's
``acb``): a root ``t`` of an irreducible polynomial through its isolating
interval, bisected with exact rational arithmetic to the working precision; a
radical ``sqrt(G)`` as the principal square root of the ball of ``G``.  The
precision is doubled until the real part of the ball excludes zero.  A zero
test is exact without numbers: in a field (the moduli are irreducible and the
radicands are not squares) an element is zero only when its representation
is, which the caller checks first.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any

import flint

from .algebraic import AlgebraicElement, AlgebraicExtension, as_fraction
from .field import Element
from .quadratic import QuadraticElement

__all__ = ["is_numeric", "certified_sign", "enclosure"]

_START, _STOP = 64, 1 << 14


def is_numeric(tower: Any) -> bool:  # a Tower (domain imports this module)
    """Whether every element of the tower is a number (no parameter, no atom)."""
    return not tower.base.symbols


def certified_sign(x: Element) -> int | None:
    """``1``, ``-1`` or ``0`` for a real algebraic number of a tower over QQ;
    None where the precision cap is reached (a zero divisor, or a value that
    is not real)."""
    if not x:
        return 0
    prec = _START
    while prec <= _STOP:
        with flint.ctx.workprec(prec):
            ball = enclosure(x, prec)
            re = ball.real
            if re > 0:
                return 1
            if re < 0:
                return -1
        prec *= 2
    return None


def enclosure(x: Element, prec: int) -> Any:
    """A ball (``acb``) that contains the value of ``x``."""
    if isinstance(x, AlgebraicElement):
        t = _root_ball(x.ext, prec)
        acc = flint.acb(0)
        for c in reversed(x.c):
            acc = acc * t + enclosure(c, prec)
        return acc
    if isinstance(x, QuadraticElement):
        a = enclosure(x.a, prec)
        if not x.b:
            return a
        return a + enclosure(x.b, prec) * enclosure(x.ext.radicand, prec).sqrt()
    if isinstance(x, int):
        return flint.acb(x)
    f = as_fraction(x)
    return flint.acb(flint.arb(flint.fmpq(f.numerator, f.denominator)))


def _root_ball(ext: AlgebraicExtension, prec: int):
    """The root of ``ext`` in a real ball of width about ``2**-prec``."""
    if ext.interval is None:
        raise ValueError(f"{ext} has no isolating interval")
    lo, hi = getattr(ext, "_refined", ext.interval)
    coeffs = [as_fraction(c) for c in ext.modulus]
    poly = flint.fmpq_poly([flint.fmpq(c.numerator, c.denominator) for c in coeffs])
    s_lo = _sign(poly(flint.fmpq(lo.numerator, lo.denominator)))
    width = Fraction(1, 1 << (prec + 4))
    while hi - lo > width:
        mid = (lo + hi) / 2
        s = _sign(poly(flint.fmpq(mid.numerator, mid.denominator)))
        if s == 0:
            lo = hi = mid
            break
        if s == s_lo:
            lo = mid
        else:
            hi = mid
    ext._refined = (lo, hi)
    a = flint.arb(flint.fmpq(lo.numerator, lo.denominator))
    b = flint.arb(flint.fmpq(hi.numerator, hi.denominator))
    return flint.acb(a.union(b))


def _sign(q) -> int:
    return (q > 0) - (q < 0)
