"""Real radical forms of the real roots the engine names ``RealAlgebraicRoot``.

Pipeline place: a result's critical value (an element of ``K[mu]/(m)``,
shown as ``RealAlgebraicRoot(Lambda(x, m(x)), k[, 0])``) -> **a closed form
in real radicals, on request** -> the result's ``in_radicals()``.

The engine keeps a critical value of degree 3 or 4 as a root of its defining
polynomial, because that is exact, evaluates to any precision and stays
small.  A reader may want radicals instead.  They exist as *real* radicals
only in some shapes, and this module gives them exactly there:

* binomials ``a x^n + c`` of any degree: ``(-c/a)^(1/n)`` with its sign;
* cubics with one real root (discriminant < 0): Cardano's formula
  ``x = cbrt(-q/2 + sqrt(D)) + cbrt(-q/2 - sqrt(D)) - b/(3a)`` with
  ``D = q^2/4 + p^3/27 > 0`` of the depressed cubic ``t^3 + p t + q``, the
  cube roots real (Cardano 1545; e.g. Abramowitz and Stegun, Handbook of
  Mathematical Functions, 1964, 3.8.2);
* cubics with three real roots (discriminant > 0, the casus irreducibilis)
  have no real radical form (Hoelder 1891); on request the trigonometric
  form ``t_j = 2 sqrt(-p/3) cos(acos(3q/(2p) sqrt(-3/p))/3 - 2 pi j/3)``
  (Viete 1615; Abramowitz and Stegun 3.8.2) is given instead;
* quartics in ``x^2`` (``a x^4 + b x^2 + c``): ``x = +-sqrt(y)`` with ``y``
  the roots of the quadratic ``a y^2 + b y + c``.

Each form is valid where the signs it relies on hold.  Signs are decided
under the declared assumptions (:class:`~criticality.algebra.signs.SignContext`);
a sign that cannot be decided is stated as a condition of validity on the
form, never assumed silently.  A shape outside this list, or a sign that
makes the form impossible, raises :class:`ClosedFormUnavailableError`
with the reason.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import sympy

from ..errors import ClosedFormUnavailableError
from .signs import NEGATIVE, POSITIVE, SignContext

__all__ = ["RadicalForm", "real_radical_form", "real_cube_root"]


@dataclass(frozen=True)
class RadicalForm:
    """A real root in closed form.

    Attributes
    ----------
    expr : sympy.Expr
        The closed form (real radicals, or cosines for the casus irreducibilis).
    conditions : tuple of sympy relationals
        Sign conditions the form relies on that the assumptions do not decide
        (empty where every sign is proved).
    how : str
        Which formula: ``"binomial"``, ``"Cardano"``, ``"trigonometric"``,
        ``"biquadratic"``.
    """

    expr: sympy.Expr
    conditions: tuple
    how: str


def real_cube_root(u: sympy.Expr) -> sympy.Expr:
    """The real cube root ``sign(u) |u|^(1/3)``; ``u^(1/3)`` where ``u`` is
    known positive (sympy's ``u**(1/3)`` is the principal complex root)."""
    if u.is_nonnegative:
        return sympy.cbrt(u)
    if u.is_nonpositive:
        return -sympy.cbrt(-u)
    return sympy.sign(u) * sympy.cbrt(sympy.Abs(u))


class _Signs:
    """Sign decisions with the undecided ones collected as conditions."""

    def __init__(self, context: SignContext) -> None:
        self.context = context
        self.conditions: list = []

    def sign(self, expr: sympy.Expr) -> Any:
        expr = sympy.factor(sympy.together(expr))
        if expr.is_number:
            if expr.is_zero:
                return 0
            return POSITIVE if expr.is_positive else NEGATIVE if expr.is_negative else None
        try:
            s = self.context.sign(expr)
        except (ValueError, TypeError, NotImplementedError):
            s = None
        return s if s in (POSITIVE, NEGATIVE) else None

    def require(self, expr: sympy.Expr, positive: bool, what: str) -> None:
        """Record that the form needs ``expr > 0`` (or ``< 0``); refuse if the
        opposite is proved.  An undecided sign becomes a stated condition and
        a side condition for the later decisions."""
        s = self.sign(expr)
        want = POSITIVE if positive else NEGATIVE
        if s == want:
            return
        if s is not None:
            raise ClosedFormUnavailableError(
                f"{what}: {sympy.sstr(sympy.factor(expr))} is "
                f"{'negative' if s == NEGATIVE else 'positive' if s == POSITIVE else 'zero'} "
                "under the declared assumptions")
        coeff, rest = sympy.factor(sympy.together(expr)).as_coeff_Mul()
        if coeff < 0:
            positive = not positive
        rel = sympy.StrictGreaterThan if positive else sympy.StrictLessThan
        self.conditions.append(rel(rest, 0))
        num, den = sympy.fraction(sympy.together(rest))
        side = sympy.expand(num * den) * (1 if positive else -1)
        try:
            self.context = self.context.with_conditions([side])
        except (ValueError, TypeError, NotImplementedError):
            pass


def real_radical_form(lam: sympy.Lambda, k: int, bound: Any, context: SignContext, *,
                      trigonometric: bool = False) -> RadicalForm:
    """The closed form of the ``k``-th real root of ``lam`` (increasing
    order), as in ``RealAlgebraicRoot(Lambda(x, m(x)), k[, bound])``.

    Parameters
    ----------
    lam : sympy.Lambda
        ``Lambda(x, m(x))``, ``m`` of any degree with coefficients in the
        parameters.
    k : int
        The index among the real roots in increasing order, from 0.
    bound : None or 0
        With 0, only the positive roots are counted.
    context : SignContext
        The declared signs of the parameters.
    trigonometric : bool
        For a cubic with three real roots, give the cosine form (no real
        radical form exists there).

    Raises
    ------
    ClosedFormUnavailableError
        For a shape without a real radical form, or where a sign the form
        needs is proved false.
    """
    k = int(k)
    x = lam.variables[0]
    poly = sympy.Poly(lam.expr, x)
    coeffs = poly.all_coeffs()
    n = poly.degree()
    signs = _Signs(context)
    if bound is not None and bound != 0:
        raise ClosedFormUnavailableError(f"roots counted above {bound} are not converted")
    nonzero = [i for i, c in enumerate(coeffs) if c != 0]
    if nonzero == [0, n]:
        expr = _binomial(coeffs[0], coeffs[-1], n, k, bound, signs)
        how = "binomial"
    elif n == 3:
        expr, how = _cubic(coeffs, k, bound, signs, trigonometric)
    elif n == 4 and coeffs[1] == 0 and coeffs[3] == 0:
        expr = _biquadratic(coeffs[0], coeffs[2], coeffs[4], k, bound, signs)
        how = "biquadratic"
    else:
        raise ClosedFormUnavailableError(
            f"the critical value is a root of {sympy.sstr(lam.expr)} = 0 (degree {n}); a real "
            "radical form is offered for binomials, cubics and quartics in x^2 only, so it "
            "stays a RealAlgebraicRoot (exact, and numeric at any precision)")
    return RadicalForm(expr, tuple(signs.conditions), how)


def _binomial(a, c0, n, k, bound, signs: _Signs) -> sympy.Expr:
    """Roots of ``a x^n + c0``: ``x^n = r`` with ``r = -c0/a``."""
    r = sympy.factor(-c0 / a)
    if n % 2:  # one real root, of the sign of r
        if k != 0:
            raise ClosedFormUnavailableError(f"x^{n} = r has one real root, not root {k}")
        if bound is not None:
            signs.require(r, True, "the positive root needs r > 0")
            return r ** sympy.Rational(1, n)
        return r ** sympy.Rational(1, n) if n == 1 else _real_odd_root(r, n)
    signs.require(r, True, f"x^{n} = r has real roots only where r > 0")
    base = r ** sympy.Rational(1, n)
    order = [base] if bound is not None else [-base, base]
    if k >= len(order):
        raise ClosedFormUnavailableError(f"x^{n} = r has {len(order)} such real roots, not {k + 1}")
    return order[k]


def _real_odd_root(r, n) -> sympy.Expr:
    if r.is_nonnegative:
        return r ** sympy.Rational(1, n)
    if r.is_nonpositive:
        return -(-r) ** sympy.Rational(1, n)
    return sympy.sign(r) * sympy.Abs(r) ** sympy.Rational(1, n)


def _cubic(coeffs, k, bound, signs: _Signs, trigonometric: bool):
    a, b, c, d = coeffs
    p = sympy.factor((3 * a * c - b ** 2) / (3 * a ** 2))
    q = sympy.factor((2 * b ** 3 - 9 * a * b * c + 27 * a ** 2 * d) / (27 * a ** 3))
    shift = sympy.factor(-b / (3 * a))
    D = sympy.factor(q ** 2 / 4 + p ** 3 / 27)  # -(discriminant)/(108 a^4)
    s = signs.sign(D)
    if s == POSITIVE or (s is None and not trigonometric):
        # one real root: Cardano, with real cube roots
        if k != 0:
            raise ClosedFormUnavailableError(
                f"a cubic with one real root has no root number {k + 1}")
        signs.require(D, True, "Cardano's formula in real radicals needs one real root, "
                               "q^2/4 + p^3/27 > 0")
        rt = sympy.sqrt(D)
        sq = signs.sign(q)
        if sq in (POSITIVE, NEGATIVE):
            # the cube root of larger modulus, u, has a known sign; the other is -p/(3u)
            u = sympy.cbrt(-q / 2 + rt) if sq == NEGATIVE else -sympy.cbrt(q / 2 + rt)
            t = u - p / (3 * u)
        else:
            t = real_cube_root(-q / 2 + rt) + real_cube_root(-q / 2 - rt)
        expr = t + shift
        if bound is not None:
            signs.require(expr, True, "the root is counted among the positive ones")
        return expr, "Cardano"
    if not trigonometric:
        raise ClosedFormUnavailableError(
            "the cubic has three real roots (q^2/4 + p^3/27 < 0): the casus irreducibilis, "
            "which has no form in real radicals; in_radicals(trigonometric=True) (on the "
            "command line --cosine-form) gives the "
            "cosine form")
    signs.require(D, False, "the cosine form needs three real roots, q^2/4 + p^3/27 < 0")
    # p < 0 follows from D < 0
    amplitude = 2 * sympy.sqrt(-p / 3)
    angle = sympy.acos(sympy.factor(3 * q / (2 * p)) * sympy.sqrt(-3 / p)) / 3
    # angle in [0, pi/3]: j = 0 gives the largest root, j = 1 the middle, j = 2 the smallest
    increasing = [amplitude * sympy.cos(angle - 2 * sympy.pi * j / 3) + shift for j in (2, 1, 0)]
    if bound is not None:
        counted = _roots_above_zero(coeffs, 3, signs)
        increasing = increasing[3 - counted:]
    if k >= len(increasing):
        raise ClosedFormUnavailableError(f"the cubic has no real root number {k + 1} here")
    return increasing[k], "trigonometric"


def _roots_above_zero(coeffs, total: int, signs: _Signs) -> int:
    """How many of ``total`` real roots are positive, by Descartes' rule of
    signs where it is exact (the sign changes of ``m(x)`` and ``m(-x)`` add
    up to the number of real roots); else refuse."""
    sg = [signs.sign(c) if c != 0 else 0 for c in coeffs]
    if coeffs[-1] == 0 or any(s is None for s in sg):
        raise ClosedFormUnavailableError(
            "the number of positive roots is not decided by the declared signs")
    n = len(coeffs) - 1

    def changes(values):
        nz = [v for v in values if v != 0]
        return sum(1 for u, v in zip(nz, nz[1:]) if u != v)
    flip = {POSITIVE: NEGATIVE, NEGATIVE: POSITIVE, 0: 0}
    pos = changes(sg)
    neg = changes([flip[s] if (n - i) % 2 else s for i, s in enumerate(sg)])
    if pos + neg != total:
        raise ClosedFormUnavailableError(
            "the number of positive roots is not decided by the declared signs")
    return pos


def _biquadratic(a, b, c, k, bound, signs: _Signs) -> sympy.Expr:
    """Roots of ``a x^4 + b x^2 + c``: ``x^2 = y`` with ``a y^2 + b y + c = 0``."""
    disc = sympy.factor(b ** 2 - 4 * a * c)
    signs.require(disc, True, "x^2 = y needs two distinct real y, b^2 - 4 a c > 0")
    rt = sympy.sqrt(disc)
    y1, y2 = (sympy.factor((-b - rt) / (2 * a)), sympy.factor((-b + rt) / (2 * a)))
    sa = signs.sign(a)
    if sa is None:
        raise ClosedFormUnavailableError("the sign of the leading coefficient is not decided")
    if sa == NEGATIVE:
        y1, y2 = y2, y1  # now y1 < y2
    prod, total = signs.sign(c / a), signs.sign(-b / a)
    if prod == POSITIVE and total == POSITIVE:
        ys = [y1, y2]
    elif prod == NEGATIVE:
        ys = [y2]
    elif prod == POSITIVE and total == NEGATIVE:
        raise ClosedFormUnavailableError("both values of x^2 are negative: no real root")
    else:
        raise ClosedFormUnavailableError("the signs of the values of x^2 are not decided")
    positive = [sympy.sqrt(y) for y in ys]
    order = positive if bound is not None else [-r for r in reversed(positive)] + positive
    if k >= len(order):
        raise ClosedFormUnavailableError(f"there is no real root number {k + 1}")
    return order[k]
