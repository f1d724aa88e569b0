"""Linear and triangular elimination in a polynomial system, over QQ by python-flint.

Pipeline place: used by the automatic parametrisation of the equilibrium
(:mod:`criticality.local.parametrise`), which asks, without seeing a
polynomial's representation: in which orders can these equations be solved
one at a time, each linear in a new unknown?

The numerators of the equations become ``fmpz_mpoly`` in the unknowns, the
other symbols and one placeholder per non-polynomial atom (``tanh(a*u)``); an
unknown that occurs inside an atom of an equation is never solved from it nor
substituted into it.  A step solves ``c u + r = 0`` as ``u = -r/c`` and
replaces ``u`` in the other equations by the homogenised numerator
``sum_k a_k (-r)^k c^(d-k)``, from which the factors of the pivot ``c``
(assumed non-zero) are removed; a factor that is a single symbol (``x`` in
``x (a - x y)``) is set aside as non-zero, so that the interior branch is
followed.  The search is depth-first in the order of the equations and of the
unknowns given, capped, and deterministic.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Sequence

import sympy

from .flint_field import FlintRationalFunctionField

__all__ = ["Elimination", "EliminationSearch", "triangular_eliminations"]


@dataclass(frozen=True)
class Elimination:
    """One complete elimination.

    Attributes
    ----------
    unknowns : tuple of sympy.Symbol
        In the order solved.
    equations : tuple of int
        The index of the equation each unknown was solved from.
    values : dict
        ``{unknown: expression}`` in the symbols that were not solved for
        (factored numerator over factored denominator).
    nonzero : tuple of sympy.Expr
        The distinct factors of the pivots and the single-symbol factors set
        aside, in the free symbols (they must not vanish).
    linear : bool
        The equations are jointly linear in the unknowns.
    checked : bool
        The values were substituted back into every equation, exactly, and
        gave zero (False where an atom holds a solved unknown: the caller
        checks).
    """

    unknowns: tuple
    equations: tuple
    values: dict
    nonzero: tuple
    linear: bool
    checked: bool


@dataclass(frozen=True)
class EliminationSearch:
    """The eliminations found (in the order found), the steps explored and
    whether the cap stopped the search."""

    found: tuple
    steps: int
    capped: bool


@dataclass
class _State:
    K: Any
    pool: tuple
    required: frozenset
    nonzero_unknowns: frozenset
    inside: dict
    limit: int
    collect: int
    steps: int = 0
    capped: bool = False
    found: dict = field(default_factory=dict)
    seen: set = field(default_factory=set)


def triangular_eliminations(numerators: Sequence[sympy.Expr], pool: Sequence[sympy.Symbol], *,
                            required: Sequence[sympy.Symbol] = (),
                            nonzero_unknowns: Sequence[sympy.Symbol] = (),
                            denominators: Sequence[sympy.Expr] = (), limit: int = 3000,
                            collect: int = 24) -> EliminationSearch:
    """Every way (up to ``collect`` distinct sets of unknowns) to solve the
    equations ``numerators = 0`` for as many unknowns of ``pool`` one at a time,
    each linear in its unknown.

    Parameters
    ----------
    numerators : sequence of sympy.Expr
        Polynomials in the symbols (non-polynomial atoms allowed).
    pool : sequence of sympy.Symbol
        The candidate unknowns, in order of preference.
    required : sequence of sympy.Symbol
        Every elimination solves for at least one of these.
    nonzero_unknowns : sequence of sympy.Symbol
        Unknowns that may not be solved as 0 (parameters: a parameter fixed
        at zero is not a parametrisation).
    denominators : sequence of sympy.Expr
        Polynomials that must not vanish at the solution (the model's
        denominators); their factors there join ``nonzero``.
    limit : int
        Elimination steps explored at most.

    Examples
    --------
    >>> x, y, a, b = sympy.symbols("x y a b")
    >>> s = triangular_eliminations([a - x, b*x - x**2*y], [y, a], required=[a])
    >>> [(e.unknowns, e.values) for e in s.found]
    [((a, y), {y: b/x, a: x})]
    """
    pool = tuple(pool)
    everything = list(numerators) + list(denominators)
    symbols = sorted(set().union(*(e.free_symbols for e in everything)) | set(pool),
                     key=sympy.default_sort_key)
    atoms = sorted({a for e in everything for a in _atoms(e)}, key=sympy.default_sort_key)
    holders = [sympy.Dummy(f"atom{k}") for k in range(len(atoms))]
    gens = tuple(symbols) + tuple(holders)
    K = FlintRationalFunctionField(gens)
    replace = dict(zip(atoms, holders))
    polys = [K.ring.from_sympy(_integral(sympy.expand(e.xreplace(replace)))) for e in numerators]
    dens = [K.ring.from_sympy(_integral(sympy.expand(e.xreplace(replace)))) for e in denominators]
    inside = {gens.index(h): {gens.index(s) for s in a.free_symbols if s in pool}
              for a, h in zip(atoms, holders)}
    state = _State(K, tuple(gens.index(u) for u in pool),
                   frozenset(gens.index(u) for u in required),
                   frozenset(gens.index(u) for u in nonzero_unknowns), inside, limit, collect)
    _descend(state, tuple(enumerate(polys)), (), frozenset())
    back = dict(zip(holders, atoms))
    found = tuple(e for e in (_finish(state, steps, polys, dens, back)
                              for steps in state.found.values()) if e is not None)
    return EliminationSearch(found, state.steps, state.capped)


def _atoms(expr):
    """The sub-expressions that are not polynomial over QQ (functions,
    non-integer powers, constants such as pi, floats)."""
    out = set()
    for node in sympy.preorder_traversal(expr):
        if isinstance(node, (sympy.Function, sympy.NumberSymbol, sympy.Float)) or (
                isinstance(node, sympy.Pow) and not (node.exp.is_Integer and node.exp >= 0)) or (
                node.is_number and node.is_Atom and not node.is_Rational):
            out.add(node)
    return {a for a in out if not any(a != b and b.has(a) for b in out)}


def _integral(expr):
    """``expr`` with its rational coefficients cleared (same zeros)."""
    _, p = sympy.Poly(expr, *sorted(expr.free_symbols, key=sympy.default_sort_key)
                      ).clear_denoms() if expr.free_symbols else (1, None)
    return p.as_expr() if p is not None else sympy.Integer(1 if expr else 0)


def _locked(state, p) -> set:
    """Unknowns that occur inside an atom of ``p``."""
    out: set = set()
    for i, d in enumerate(p.degrees()):
        if d and i in state.inside:
            out |= state.inside[i]
    return out


def _descend(state, remaining, steps, used) -> None:
    if not remaining:
        if (not state.required or used & state.required) and used not in state.found:
            state.found[used] = steps
        return
    key = (used, frozenset(i for i, _ in remaining))
    if key in state.seen or len(state.found) >= state.collect:
        return
    state.seen.add(key)
    for pos, (index, p) in enumerate(remaining):
        branches, aside = _branches(state, p, used)
        for core in branches:
            degrees, locked = core.degrees(), _locked(state, core)
            for u in state.pool:
                if u in used or u in locked or degrees[u] != 1:
                    continue
                state.steps += 1
                if state.steps > state.limit:
                    state.capped = True
                    return
                coeffs = state.K.coefficients_in(core, state.K.symbols[u])
                c, r = coeffs[1], coeffs.get(0, state.K.ring.zero)
                if r.is_zero() and u in state.nonzero_unknowns:
                    continue
                others = remaining[:pos] + remaining[pos + 1:]
                rest = _substituted(state, others, u, -r, c, used | {u})
                if rest is None:
                    continue
                _descend(state, rest, steps + ((index, u, -r, c, aside),), used | {u})
                if state.capped or len(state.found) >= state.collect:
                    return


def _single_symbol(f) -> bool:
    terms = f.to_dict()
    return len(terms) == 1 and sum(next(iter(terms))) == 1


def _branches(state, p, used):
    """The factors of ``p`` with an open unknown (each a branch) and the
    single-symbol factors set aside."""
    open_ = [u for u in state.pool if u not in used]
    factors = [f for f, _ in p.factor()[1] if any(f.degrees()[u] for u in open_)]
    plain = [f for f in factors if not _single_symbol(f)]
    if plain:
        return plain, tuple(f for f in factors if _single_symbol(f))
    return factors, ()


def _substitute(state, p, u, num, den):
    """The numerator of ``p`` at ``u = num/den``: ``sum_k a_k num^k den^(d-k)``."""
    coeffs = state.K.coefficients_in(p, state.K.symbols[u])
    d = max(coeffs)
    out = state.K.ring.zero
    for k, a in coeffs.items():
        out += a * num ** k * den ** (d - k)
    return out


def _substituted(state, remaining, u, num, den, used):
    """The other equations at ``u = num/den``, without the pivot's factors;
    None where one of them cannot take the substitution (``u`` inside an
    atom) or no longer contains an open unknown."""
    open_ = [v for v in state.pool if v not in used]
    pivot = [f for f, _ in den.factor()[1]]
    out = []
    for index, p in remaining:
        if p.degrees()[u] == 0:
            new = p
        elif u in _locked(state, p):
            return None
        else:
            new = _substitute(state, p, u, num, den)
            for f in pivot:
                while not new.is_zero() and (new % f).is_zero():
                    new = new / f
        if new.is_zero() or not any(new.degrees()[v] for v in open_):
            return None
        out.append((index, new))
    return tuple(out)


def _finish(state, steps, polys, dens, back) -> Elimination | None:
    """Back-substitute one elimination in the field; expressions as sympy
    (None where a denominator of the model vanishes there identically)."""
    K = state.K
    values: dict = {}
    for index, u, num, den, aside in reversed(steps):
        values[u] = _at(K, K.from_polynomials(num, K.ring.one) /
                        K.from_polynomials(den, K.ring.one), values)
    pivots = [_at(K, K.from_polynomials(p, K.ring.one), values)
              for _, _, _, den, aside in steps for p in (den, *aside)]
    at_dens = [_at(K, K.from_polynomials(p, K.ring.one), values) for p in dens]
    if any(not d for d in at_dens):
        return None  # a denominator of the model vanishes identically there
    pivots += at_dens
    atomic = any(_locked(state, p) & set(values) for p in polys)
    checked = not atomic and all(not _at(K, K.from_polynomials(p, K.ring.one), values)
                                 for p in polys)
    unknowns = tuple(K.symbols[u] for _, u, _, _, _ in steps)
    linear = all(sum(m[u] for u in values) <= 1 for p in polys for m in p.to_dict())
    linear = linear and not atomic
    exprs = {K.symbols[u]: _factored(K, v).xreplace(back) for u, v in values.items()}
    exprs = _settle(exprs)
    nonzero: dict = {}
    for x in pivots:
        for part in (x.num, x.den):
            for f, _ in part.factor()[1]:
                e = K.poly_to_sympy(f).xreplace(back)
                nonzero.setdefault(_settle_one(e, exprs), None)
    return Elimination(unknowns, tuple(i for i, *_ in steps), exprs,
                       tuple(sorted(nonzero, key=sympy.default_sort_key)), linear, checked)


def _at(K, x, values):
    """``x`` with the solved unknowns replaced by their values (Horner in K)."""
    for u, v in values.items():
        if not x:
            return x
        symbol = K.symbols[u]
        if x.num.degrees()[u] == 0 and x.den.degrees()[u] == 0:
            continue
        x = _horner(K, x.num, symbol, v) / _horner(K, x.den, symbol, v)
    return x


def _horner(K, p, symbol, v):
    coeffs = K.coefficients_in(p, symbol)
    out = K.zero
    for k in range(max(coeffs), -1, -1):
        out = out * v + (K.from_polynomials(coeffs[k], K.ring.one) if k in coeffs else K.zero)
    return out


def _factored(K, x) -> sympy.Expr:
    """A reduced fraction as factored numerator over factored denominator."""
    def product(p):
        content, factors = p.factor()
        return sympy.Mul(sympy.Integer(int(content)),
                         *[K.poly_to_sympy(f) ** int(m) for f, m in factors])
    if x.den.is_one():
        return product(x.num)
    return product(x.num) / product(x.den)


def _settle_one(expr, values):
    """Replace solved unknowns that remain inside atoms (a value that needed
    an atom of a later unknown)."""
    for _ in range(len(values) + 1):
        if not expr.has(*values):
            return expr
        expr = expr.xreplace(values)
    return expr


def _settle(values: dict) -> dict:
    return {u: _settle_one(v, values) for u, v in values.items()}
