"""Closed-form solving of one field element for one generator.

Pipeline place: used by the critical set (:mod:`.critical`, the Hopf set in
the bifurcation parameter) and by the analyses beyond Hopf (fold,
Bogdanov-Takens, Bautin: ``det A = 0``, ``l1 = 0``, ... in one symbol).

The numerator of the element is factored in the polynomial ring; each factor
of degree one gives a value in the same field, each factor of degree two the
two roots with the square root of its discriminant adjoined, and (on request)
each factor ``c4 s^4 + c2 s^2 + c0`` even in the symbol the roots
``s = +-sqrt((-c2 +- sqrt(c2^2 - 4 c4 c0)) / (2 c4))``.  Factors of higher
degree are returned unsolved, as sympy expressions.

A transcendental atom of the tower (``log(1/(h + 1))``, ``exp(E/T)``) is an
independent generator of the field, but its definition may involve the
symbol solved for; then a factor that contains the atom is transcendental in
the symbol and is returned unsolved (never as a spurious polynomial factor,
and never left out), and a value at which such an atom is undefined
(``h = -1`` above) is not a solution.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import sympy

from ..algebra import Tower
from ..algebra.quadratic import QuadraticElement, lower
from .sign_words import sign_word

if TYPE_CHECKING:
    from ..algebra.field import Element

__all__ = ["LINEAR", "QUADRATIC", "BIQUADRATIC", "UNSOLVED", "closed_form_solutions",
           "branch_values", "analytic_sqrt", "SolvedPoint", "solve_for", "dependent_atoms"]

LINEAR, QUADRATIC, BIQUADRATIC, UNSOLVED = "linear", "quadratic", "biquadratic", "unsolved"


def _factor_coefficients(tower: Tower, x, symbol) -> list:
    """``[(coefficients lowest first, sympy factor)]`` for the factors of the
    numerator of ``x`` (a base-field element) as polynomials in ``symbol``."""
    K = tower.base
    R = K.ring
    out = []
    for poly, _m in R.factor(K.numerator(K(x)))[1]:
        coeffs = R.coefficients_in(poly, symbol)
        deg = max(coeffs)
        c = [K.from_ring(coeffs[k]) if k in coeffs else K.zero for k in range(deg + 1)]
        out.append((c, poly))
    return out


def _classify(c, biquadratic: bool):
    deg = len(c) - 1
    if deg == 0:
        return None
    if deg == 1:
        return (LINEAR, -c[0] / c[1])
    if deg == 2:
        return (QUADRATIC, (c[2], c[1], c[0]))
    if biquadratic and deg == 4 and not c[1] and not c[3]:
        return (BIQUADRATIC, (c[4], c[2], c[0]))
    return None


def closed_form_solutions(tower: Tower, x: Element, symbol: sympy.Symbol, *,
                          biquadratic: bool = False) -> list:
    """The solutions of ``x = 0`` for ``symbol``, factor by factor.

    Returns a list of ``(kind, data)``: ``(LINEAR, value)``,
    ``(QUADRATIC, (c2, c1, c0))``, with ``biquadratic`` also
    ``(BIQUADRATIC, (c4, c2, c0))``, and ``(UNSOLVED, sympy factor)`` for the
    factors of higher degree (and for an ``x`` that involves radicals, which
    is not factored).  Factors free of ``symbol`` are left out.
    """
    x = lower(x)
    if isinstance(x, QuadraticElement):
        return [(UNSOLVED, tower.to_sympy(x))]
    out = []
    R = tower.base.ring
    dependent = dependent_atoms(tower, symbol)
    for c, poly in _factor_coefficients(tower, x, symbol):
        factor = R.to_sympy(poly)
        if dependent and factor.has(*dependent):
            out.append((UNSOLVED, factor.xreplace(tower.atom_substitution())))
            continue
        kind = _classify(c, biquadratic)
        if kind is not None:
            out.append(kind)
        elif len(c) > 1:
            out.append((UNSOLVED, factor))
    return out


def dependent_atoms(tower: Tower, symbol: sympy.Symbol) -> tuple:
    """The generators of ``tower`` that stand for a transcendental function
    of ``symbol`` (``g0`` for ``log(1/(h + 1))`` when solving for ``h``)."""
    return tuple(a.symbol for a in tower.atoms if a.expr.has(symbol))


def _atoms_defined(tower: Tower, target: Tower, symbol: sympy.Symbol, value: Element) -> bool:
    """False where an atom that depends on ``symbol`` is undefined at
    ``symbol = value`` (a logarithm of zero, a pole)."""
    dependent = [a for a in tower.atoms if a.expr.has(symbol)]
    if not dependent:
        return True
    at = target.to_sympy(value)
    for a in dependent:
        e = a.expr.xreplace({symbol: at})
        if e.has(sympy.zoo, sympy.nan, sympy.oo, -sympy.oo):
            return False
    return True


def analytic_sqrt(target: Tower, disc: Element) -> Element:
    """A square root of ``disc`` (an element of the base field) that is
    analytic in the parameters: ``g sqrt(h)`` with ``disc = g^2 h`` and ``g``
    the product of the repeated factors of its numerator, whatever their
    sign.  The principal root ``|g| sqrt(h)`` would swap the two roots of the
    quadratic where ``g`` changes sign, so that one branch would jump from one
    equilibrium (one sign of an equilibrium's radical) to the other there."""
    K = target.base
    if not K.symbols or not disc:
        return target.sqrt(disc)
    R = K.ring
    g = K.one
    for poly, mult in R.factor(K.numerator(disc))[1]:
        if mult >= 2:
            g = g * K.from_ring(poly) ** (mult // 2)
    if g == K.one:
        return target.sqrt(disc)
    return g * target.sqrt(disc / (g * g))


def branch_values(tower: Tower, symbol: sympy.Symbol, solution: tuple) -> list:
    """``[(value, target tower)]`` for one solution of
    :func:`closed_form_solutions`: one value for a linear factor, two (with
    the root of the discriminant adjoined, each in its own tower) for a
    quadratic, up to four for a biquadratic factor (roots that are not
    analytic in the parameters are skipped)."""
    kind, data = solution
    if kind == LINEAR:
        target = tower.fresh(drop=symbol)
        return [(target.project(data), target)]
    if kind == QUADRATIC:
        out = []
        for sign in (1, -1):
            target = tower.fresh(drop=symbol)
            c2, c1, c0 = (target.project(c) for c in data)
            s = analytic_sqrt(target, c1 * c1 - 4 * c2 * c0)
            out.append(((-c1 + sign * s) / (2 * c2), target))
        return out
    if kind == BIQUADRATIC:
        c4, c2, c0 = data
        out = []
        for sign in (1, -1):
            target = tower.fresh()
            r = analytic_sqrt(target, c2 * c2 - 4 * c4 * c0)
            t = (-c2 + sign * r) / (2 * c4)
            try:
                out.append((target.sqrt(t), target))
            except Exception:  # noqa: BLE001 - a root that is not analytic: skip it
                continue
        return out
    return []


@dataclass(frozen=True)
class SolvedPoint:
    """``symbol = value`` with ``value`` in ``target``; ``substitute`` maps
    elements of the source tower into ``target``."""

    symbol: sympy.Symbol
    value: Any
    source: Tower
    target: Tower
    images: dict

    def substitute(self, x: Element) -> Element:
        return self.source.substitute(x, self.symbol, self.value, self.target, self.images)


def solve_for(tower: Tower, x: Element, symbol: sympy.Symbol,
              positive: bool = False) -> tuple[list[SolvedPoint], list[sympy.Expr]]:
    """Closed-form solutions of ``x = 0`` for ``symbol``: factors of degree
    one or two (and even factors of degree four).  Returns
    ``(points, unsolved)`` with ``points`` a list of :class:`SolvedPoint` and
    ``unsolved`` the sympy factors left alone.  Values proved non-real (or,
    with ``positive``, proved non-positive) are dropped."""
    points: list = []
    unsolved: list = []
    late: list = []
    for kind, data in closed_form_solutions(tower, x, symbol, biquadratic=True):
        if kind == UNSOLVED:
            unsolved.append(data)
            continue
        found = branch_values(tower, symbol, (kind, data))
        (late if kind == BIQUADRATIC else points).extend(found)
    out = []
    for value, target in points + late:
        if not _may_be_real(target, value, positive):
            continue
        if not _atoms_defined(tower, target, symbol, value):
            continue
        images = tower.radical_images(symbol, value, target)
        out.append(SolvedPoint(symbol, value, tower, target, images))
    return out, unsolved


def _may_be_real(target, value, positive) -> bool:
    """False for a value proved non-real (a root of a negative number) or,
    with ``positive``, proved non-positive; numbers are checked numerically."""
    e = target.to_sympy(value)
    if not e.free_symbols:
        v = sympy.N(e, 30)
        re, im = v.as_real_imag()
        if abs(im) > 1e-20 * max(1, abs(re)):
            return False
        return not positive or re > 0
    if positive and sign_word(target, value, None) in ("negative", "zero", "nonpositive"):
        return False
    return True
