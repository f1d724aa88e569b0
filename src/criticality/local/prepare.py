"""Shared preparation for the analyses beyond Hopf (fold, Bogdanov-Takens,
Bautin): the model with its equilibrium shifted to the origin, as Taylor
forms over the engine's tower of fields, and closed-form solving of one
field element for one generator.

Pipeline place: model -> equilibrium -> **prepared problem** -> fold,
Bogdanov-Takens or Bautin analysis.
"""

from __future__ import annotations

from dataclasses import dataclass

import sympy

from ..algebra import Tower, collect_atoms
from ..algebra.quadratic import QuadraticElement, lower
from ..hopf_analysis.analysis import _assumptions, _equilibrium
from ..algebra.canonical import canonical_expr, factored
from .critical import _branch_values, _solutions
from ..errors import NotAnEquilibriumError, ParameterError
from ..algebra.signs import NEGATIVE, NONNEGATIVE, NONPOSITIVE, POSITIVE, ZERO, context_for, truth
from .taylor import TaylorForms, raw_taylor

__all__ = ["Prepared", "prepare", "solve_for", "SolvedPoint", "sign_word"]


@dataclass(frozen=True)
class Prepared:
    """A model at a (symbolic) equilibrium, ready for the field computations."""

    model: object
    parameter: str
    mu: sympy.Symbol
    choice: object
    equations: tuple
    params: tuple
    assumptions: dict
    tower: Tower
    taylor: TaylorForms
    extra: tuple  # field elements for the requested extra expressions

    def symbol(self, name: str) -> sympy.Symbol:
        """The generator called ``name`` (a parameter or a free equilibrium
        coordinate such as ``x_eq``)."""
        for s in self.params:
            if s.name == name:
                return s
        listing = ", ".join(s.name for s in self.params)
        raise ParameterError(f"'{name}' is not a free symbol of this analysis (free symbols: "
                             f"{listing}); eliminated parameters and states cannot be solved for")

    def context(self, tower=None):
        return context_for(self.params, self.assumptions, (tower or self.tower).atoms)


def prepare(model, parameter, *, equilibrium=None, eliminate=None, values=None, assume=None,
            order=3, backend="flint", extra=lambda model, choice: ()) -> Prepared:
    """Choose the equilibrium and build the Taylor forms in the field.

    ``extra(model, choice)`` returns sympy expressions (in the parameters) to
    convert into the same field, e.g. ``d f / d mu`` at the equilibrium.
    """
    if values:
        model = model.with_values(**dict(values))
    name = parameter or getattr(model, "bifurcation_parameter", None)
    if not name:
        raise ParameterError("name the parameter of the analysis")
    model.parameter(name)
    assumptions = _assumptions(model, assume)
    choice = _equilibrium(model, equilibrium, eliminate, assumptions)
    eqs = tuple(e.xreplace(choice.substitutions) for e in model.equations)
    for s in choice.new_symbols:
        assumptions.setdefault(s, (assume or {}).get(s.name, "real"))
    params = tuple(s for s in model.parameter_symbols if s not in choice.substitutions)
    params += tuple(choice.new_symbols)
    raw = raw_taylor(eqs, model.state_symbols, choice.point, order, tuple(model.states))
    more = tuple(sympy.sympify(e) for e in extra(model, choice))
    atoms = collect_atoms(list(raw.coefficients()) + list(choice.point) + list(more), params)
    plain = context_for(params, assumptions)
    tower = Tower(params, atoms, backend, lambda e: truth(plain.sign(e)))
    x0 = [tower.convert(e) for e in choice.point]
    taylor = TaylorForms.from_raw(raw, x0, tower.convert, tower.base)
    bad = [(model.states[i], r) for i, r in enumerate(taylor.residual()) if r]
    if bad:
        parts = "; ".join(f"the right-hand side for '{n}' equals {tower.to_sympy(r)}"
                          for n, r in bad)
        raise NotAnEquilibriumError(f"the given point is not an equilibrium: {parts} there "
                                    "instead of 0")
    K = tower.top
    taylor = TaylorForms(K, taylor.n, taylor.order, taylor.components)
    converted = tuple(tower.convert(e) for e in more)
    return Prepared(model, name, model.symbols[name], choice, eqs, params, assumptions, tower,
                    taylor, converted)


@dataclass(frozen=True)
class SolvedPoint:
    """``symbol = value`` with ``value`` in ``target``; ``substitute`` maps
    elements of the source tower into ``target``."""

    symbol: sympy.Symbol
    value: object
    source: Tower
    target: Tower
    images: dict

    def substitute(self, x):
        return self.source.substitute(x, self.symbol, self.value, self.target, self.images)


def _biquadratic(tower, x, symbol):
    """Roots of ``c4 s^4 + c2 s^2 + c0`` (a factor even in ``symbol``)."""
    K = tower.base
    x = lower(x)
    if isinstance(x, QuadraticElement) or not hasattr(K, "coefficients_in"):
        return []
    out = []
    _, factors = K(x).num.factor()
    for poly, _m in factors:
        coeffs = K.coefficients_in(poly, symbol)
        if max(coeffs, default=0) != 4 or any(k % 2 for k in coeffs):
            continue
        c = [K.from_polynomials(coeffs[k], K._one_poly) if k in coeffs else K.zero
             for k in (0, 2, 4)]
        for sign in (1, -1):
            target = tower.fresh()
            r = target.sqrt(c[1] * c[1] - 4 * c[2] * c[0])
            t = (-c[1] + sign * r) / (2 * c[2])
            try:
                out.append((target.sqrt(t), target))
            except Exception:  # noqa: BLE001 - a root that is not analytic: skip it
                continue
    return out


def solve_for(tower, x, symbol, positive=False):
    """Closed-form solutions of ``x = 0`` for ``symbol``: factors of degree
    one or two (and even factors of degree four).  Returns
    ``(points, unsolved)`` with ``unsolved`` the sympy factors left alone."""
    points, unsolved = [], []
    for kind, data in _solutions(tower, symbol, x):
        if kind == "unsolved":
            unsolved.append(data)
            continue
        for value, target in _branch_values(tower, symbol, (kind, data)):
            points.append((value, target))
    if unsolved:
        extra = _biquadratic(tower, x, symbol)
        if extra:
            points.extend(extra)
            unsolved = unsolved[:-1] if len(unsolved) == 1 else unsolved
    out = []
    for value, target in points:
        if not _may_be_real(target, value, positive):
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


def sign_word(tower, x, ctx) -> str:
    """``"positive"``, ``"negative"``, ``"zero"``, ``"nonnegative"``,
    ``"nonpositive"`` or ``"undecided"``."""
    x = lower(x)
    if not x:
        return "zero"
    numeric = _numeric_sign(tower, x)
    if numeric is not None:
        return numeric
    if ctx is None:
        ctx = context_for((), {}, tower.atoms)
    try:
        fs = factored(tower, x, ctx)
    except Exception:  # noqa: BLE001 - radicals: no decision
        return "undecided"
    if fs.undecided:
        return "undecided"
    return {POSITIVE: "positive", NEGATIVE: "negative", ZERO: "zero",
            NONNEGATIVE: "nonnegative", NONPOSITIVE: "nonpositive"}.get(fs.sign, "undecided")


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
    return "positive" if re > 0 else "negative"


def expr(tower, x, ctx):
    """A field element as a compact sympy expression."""
    return canonical_expr(tower, x, ctx)
