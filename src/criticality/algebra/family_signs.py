"""Signs of elements of K[t]/(m) on a whole family of parameters.

Pipeline place: used by :mod:`criticality.algebra.canonical` for an element
``x = P(t)/D`` of an algebraic extension whose root ``t`` depends on the
parameters (a critical value of degree >= 3).

The argument is one of continuity.  The declared parameter set (each
parameter positive, nonnegative, negative or real) is connected.  If on it
the leading coefficient and the discriminant of ``m`` never vanish (and, for a
root counted among the positive ones, neither does ``m(0)``), the chosen root
is a continuous function of the parameters; if moreover the resultant
``Res_t(m, P)`` never vanishes, ``P(t)`` never vanishes, so its sign is
constant and is read at one sample point, where it is certified exactly
(:mod:`criticality.algebra.certified`).  "Never vanishes" is proved by the
sign rules of :mod:`criticality.algebra.signs`; where they cannot prove it,
no sign is claimed.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any

import flint
import sympy

from .algebraic import AlgebraicElement, AlgebraicExtension
from .certified import certified_sign
from .flint_field import FlintRationalField, FlintRationalFunctionField
from .signs import NEGATIVE, POSITIVE

__all__ = ["family_sign"]

_CONNECTED = ("positive", "nonnegative", "negative", "nonpositive", "real")
_SAMPLE = (Fraction(3, 2), Fraction(5, 3), Fraction(7, 4), Fraction(11, 5), Fraction(13, 6),
           Fraction(17, 7), Fraction(19, 8), Fraction(23, 9))


def family_sign(tower: Any, x: Any, ctx: Any) -> int | None:
    """``1`` or ``-1`` when the sign of ``x`` (an :class:`AlgebraicElement`
    directly over the flint parameter field) is proved constant on the
    declared parameter set, else None."""
    ext: Any = getattr(x, "ext", None)
    K = tower.base
    if not isinstance(x, AlgebraicElement) or ext.base is not K or tower.atoms or \
            not isinstance(K, FlintRationalFunctionField):
        return None
    kinds = [ctx.assumptions.get(s, "real") for s in K.symbols]
    if any(k not in _CONNECTED for k in kinds):
        return None
    bound = _bound(ext.root)
    M, _ = _cleared(K, ext.modulus)
    P, D = _cleared(K, x.c)
    t = len(K.symbols)
    names = tuple(str(s) for s in K.symbols) + ("t_",)
    R = flint.fmpz_mpoly_ctx.get(names, "degrevlex")
    Mt, Pt = _lift(R, M, t), _lift(R, P, t)
    checks = [M[-1], _drop(K, Mt.resultant(Pt, "t_")),
              _drop(K, Mt.resultant(Mt.derivative(t), "t_"))]
    if bound is None:
        return None
    if bound[1] is not None:  # a root counted among the positive ones
        checks.append(M[0])
    one = K.one.num
    for poly in checks + [D]:
        if poly.is_zero() or ctx.from_flint(K, poly, one).sign not in (POSITIVE, NEGATIVE):
            return None
    point = [_sample(k, i) for i, k in enumerate(kinds)]
    value = _at_sample(K, ext, P, M, point, bound)
    if value is None:
        return None
    d = ctx.from_flint(K, D, one).sign
    return value if d == POSITIVE else -value


def _bound(root):
    """``(k, lower bound or None)`` of a family's root, None for other roots."""
    args = getattr(root, "args", ())
    if type(root).__name__ == "RealAlgebraicRoot" and len(args) >= 2:
        return (int(args[1]), args[2] if len(args) == 3 else None)
    return None


def _cleared(K, coeffs):
    """Polynomials ``P_k`` and ``D`` with ``coeffs[k] = P_k / D``."""
    one = K.one.num
    den = one
    for c in coeffs:
        c = K(c)
        den = den * (c.den / den.gcd(c.den))
    out = []
    for c in coeffs:
        c = K(c)
        out.append(c.num * (den / c.den))
    return out, den


def _lift(R, polys, t):
    data = {}
    for k, p in enumerate(polys):
        for monom, v in p.to_dict().items():
            data[tuple(monom) + (k,)] = v
    return R.from_dict(data)


def _drop(K, poly):
    nv = len(K.symbols)
    data = {tuple(m[:nv]): v for m, v in poly.to_dict().items()}
    return K.ctx.from_dict(data)


def _sample(kind, i):
    v = _SAMPLE[i % len(_SAMPLE)] + (i // len(_SAMPLE))
    return -v if kind in ("negative", "nonpositive") else v


def _at_sample(K, ext, P, M, point, bound_info):
    """Certified sign of ``P(t)`` at the sample point, ``t`` the family's root there."""
    Q = FlintRationalField()
    num = [Fraction(int(p.p), int(p.q)) for p in (flint.fmpq(0) + _eval(c, point) for c in M)]
    x = sympy.Dummy("x")
    poly = sympy.Poly(sum(sympy.Rational(c.numerator, c.denominator) * x ** k
                          for k, c in enumerate(num)), x)
    if poly.degree() != len(M) - 1:
        return None
    intervals = [(Fraction(int(a.p), int(a.q)), Fraction(int(b.p), int(b.q)))
                 for (a, b), _m in poly.intervals()]
    index = 0
    if bound_info is not None:
        index, low = bound_info
        if low is not None:
            intervals = [iv for iv in intervals if iv[0] >= 0 or
                         (iv[1] > 0 and poly.eval(0) * poly.eval(sympy.Rational(
                             iv[1].numerator, iv[1].denominator)) < 0)]
    else:
        index = int(ext.root.args[1]) if len(getattr(ext.root, "args", ())) > 1 else 0
    if index >= len(intervals):
        return None
    lo, hi = intervals[index]
    if bound_info is not None and bound_info[1] is not None and lo < 0:
        lo = Fraction(0)
    L = AlgebraicExtension(Q, [Q(c) for c in num], "t", interval=(lo, hi))
    value = L.from_list([Q(Fraction(int(q.p), int(q.q))) for q in
                         (flint.fmpq(0) + _eval(p, point) for p in P)])
    return certified_sign(value)


def _eval(poly, point):
    """An ``fmpz_mpoly`` at a rational point, exactly."""
    acc = flint.fmpq(0)
    for monom, c in poly.to_dict().items():
        term = flint.fmpq(int(c))
        for v, e in zip(point, monom):
            if e:
                term *= flint.fmpq(v.numerator, v.denominator) ** int(e)
        acc += term
    return acc
