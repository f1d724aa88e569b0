"""The equilibrium: given, solved, or used to parametrise the family.

Pipeline place: model -> **equilibrium** -> Taylor forms.

Three ways to fix the steady state ``x0`` the analysis shifts to:

* given: a mapping from state names to expressions (strings go through the
  model's own parser); the engine checks exactly that every right-hand side
  vanishes there;
* solved: ``sympy.solve`` on the right-hand sides, the branch chosen by index
  or by a sign condition on the states (``"positive"``, ``"nonnegative"``,
  ``"nonzero"``);
* parametrised: the caller names as many unknowns (parameters or states) as
  there are states; they are solved from ``f(x0) = 0`` while the remaining
  states become free symbols ``<state>_eq`` of the family.  This is the usual
  practice for models whose equilibrium has no closed form;
* parametrised automatically (``eliminate="auto"``): the unknowns are found by
  :mod:`criticality.local.parametrise`, where the equations are linear or
  triangular in them, so that no radical appears.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any, Mapping, Sequence

import sympy
from sympy.polys.polyerrors import BasePolynomialError

from ..errors import EquilibriumNotFoundError, ParameterError
from ..algebra.signs import NEGATIVE, NONNEGATIVE, POSITIVE, ZERO, SignContext
from .parametrise import Parametrisation, coordinate_symbols, find_parametrisations

if TYPE_CHECKING:
    from ..model.core import Model

__all__ = ["EquilibriumChoice", "given_equilibrium", "solve_equilibria", "select_equilibrium",
           "parametrised_equilibrium", "automatic_equilibrium", "radical_free_advice"]

_CONDITIONS = ("positive", "nonnegative", "nonzero")


@dataclass(frozen=True)
class EquilibriumChoice:
    """The chosen equilibrium and how it was obtained.

    Attributes
    ----------
    point : tuple of sympy.Expr
        ``x0`` aligned with the model's states.
    how : str
        ``"given"``, ``"solved"`` or ``"parametrised"``.
    substitutions : dict
        Parameters eliminated in favour of equilibrium coordinates
        (parametrised mode): symbol -> expression.
    new_symbols : tuple of sympy.Symbol
        Free symbols introduced for equilibrium coordinates.
    note : str
    parametrisation : Parametrisation or None
        The parametrisation of the family (parametrised mode): which
        unknowns were solved for, named by the caller or found
        automatically, and the factors assumed non-zero.
    """

    point: tuple
    how: str
    substitutions: dict
    new_symbols: tuple
    note: str = ""
    parametrisation: Parametrisation | None = None


def given_equilibrium(model: Model, mapping: Any) -> EquilibriumChoice:
    """Read a user mapping ``{state: expression}`` (every state must be given)."""
    unknown = [k for k in mapping if k not in model.states]
    if unknown:
        raise EquilibriumNotFoundError(
            f"the equilibrium names {', '.join(map(repr, unknown))}, which "
            f"{'is not a state' if len(unknown) == 1 else 'are not states'} of the model "
            f"(states: {', '.join(model.states)})")
    missing = [s for s in model.states if s not in mapping]
    if missing:
        raise EquilibriumNotFoundError(
            f"the equilibrium gives no value for {', '.join(map(repr, missing))}; give every "
            "state a value, or leave the equilibrium out to let the engine solve for it")
    point = []
    for s in model.states:
        value = mapping[s]
        if isinstance(value, str):
            value = model.parse(value, context=f"equilibrium value of '{s}'")
        else:
            value = _match_symbols(model, sympy.sympify(value, strict=True))
        if value.has(*model.state_symbols):
            raise EquilibriumNotFoundError(
                f"the equilibrium value of '{s}' ({value}) contains a state variable; it must "
                "be an expression in the parameters only")
        point.append(value)
    return EquilibriumChoice(tuple(point), "given", {}, ())


def _match_symbols(model, expr):
    """Replace sympy symbols handed in by the model's own symbols (by name)."""
    repl = {}
    for sym in expr.free_symbols:
        own = model.symbols.get(sym.name)
        if own is None:
            raise ParameterError(f"the symbol '{sym.name}' is neither a state nor a parameter "
                                 "of the model")
        if own is not sym:
            repl[sym] = own
    return expr.xreplace(repl) if repl else expr


def solve_equilibria(model: Model, equations: Sequence[sympy.Expr] | None = None) -> list:
    """All equilibria sympy finds, sorted deterministically.

    Raises
    ------
    EquilibriumNotFoundError
        When sympy cannot solve the system (non-polynomial, too hard).
    """
    eqs = list(equations if equations is not None else model.equations)
    states = list(model.state_symbols)
    try:
        sols = sympy.solve(eqs, states, dict=True)
    except (NotImplementedError, ValueError, TypeError) as exc:
        raise EquilibriumNotFoundError(
            "sympy could not solve f(x) = 0 for the equilibria of this model "
            f"({type(exc).__name__}); give the equilibrium explicitly, or parametrise the family "
            "by the equilibrium (eliminate=...)") from exc
    out = []
    for sol in sols:
        if all(s in sol for s in states):
            point = tuple(sympy.factor(sol[s]) for s in states)
            if not any(p.has(*states) for p in point):
                out.append(point)
    if not out:
        raise EquilibriumNotFoundError(
            "no isolated equilibrium in closed form was found; give the equilibrium explicitly, "
            "or parametrise the family by the equilibrium (eliminate=...)")
    return sorted(set(out), key=lambda p: (sum(sympy.count_ops(x) for x in p),
                                           sympy.default_sort_key(p)))


def select_equilibrium(model: Model, candidates: Sequence, choice: Any,
                       sign_context: SignContext) -> EquilibriumChoice:
    """Pick one of ``candidates`` by index or by a sign condition."""
    listing = "; ".join(f"[{k}] " + ", ".join(f"{s} = {v}" for s, v in zip(model.states, p))
                        for k, p in enumerate(candidates))
    if choice is None:
        if len(candidates) == 1:
            return EquilibriumChoice(candidates[0], "solved", {}, ())
        raise EquilibriumNotFoundError(
            f"the model has {len(candidates)} equilibria: {listing}. Choose one with "
            "equilibrium=<index> or equilibrium='positive' (or give it explicitly)")
    if isinstance(choice, int) and not isinstance(choice, bool):
        if not 0 <= choice < len(candidates):
            raise EquilibriumNotFoundError(
                f"equilibrium index {choice} is out of range; the equilibria are: {listing}")
        return EquilibriumChoice(candidates[choice], "solved", {}, (),
                                 f"equilibrium {choice} of {len(candidates)}")
    if choice not in _CONDITIONS:
        raise EquilibriumNotFoundError(
            f"unknown equilibrium choice {choice!r}; expected an index, one of "
            f"{', '.join(_CONDITIONS)}, or a mapping from states to values")
    wanted = {"positive": (POSITIVE,), "nonnegative": (POSITIVE, NONNEGATIVE, ZERO),
              "nonzero": (POSITIVE, NEGATIVE)}[choice]
    hits = [p for p in candidates if _has_signs(p, sign_context, wanted)]
    if len(hits) == 1:
        radicands = _radicands(hits[0])
        where = (f" (real where {' > 0, '.join(map(str, radicands))} > 0)" if radicands else "")
        return EquilibriumChoice(hits[0], "solved", {}, (), f"the {choice} equilibrium{where}")
    if not hits:
        raise EquilibriumNotFoundError(
            f"no equilibrium is provably {choice} under the declared assumptions; the equilibria "
            f"are: {listing}. Choose one by index, or declare parameter signs")
    raise EquilibriumNotFoundError(
        f"{len(hits)} equilibria are {choice}: {listing}; choose one by index")


def _radicands(point) -> list:
    """The radicands of the square roots in ``point`` (the point is real
    where they are >= 0), numerator times denominator so that each is a
    polynomial of the same sign."""
    found = {sympy.Mul(*sympy.fraction(sympy.together(a.base)))
             for x in point for a in x.atoms(sympy.Pow)
             if a.exp.is_Rational and a.exp.q == 2 and a.base.free_symbols}
    return sorted(found, key=sympy.default_sort_key)


def _has_signs(point, sign_context, wanted) -> bool:
    """Every coordinate of ``point`` has one of the ``wanted`` signs where
    the point is real (its radicands positive)."""
    radicands = _radicands(point)
    ctx = sign_context.with_conditions(radicands) if radicands else sign_context
    return all(ctx.sign(x) in wanted for x in point)


def _solve_as_real(eqs: Sequence[sympy.Expr], unknowns: Sequence[sympy.Symbol]) -> list:
    """``sympy.solve(eqs, unknowns, dict=True)`` with every unknown taken as
    merely real: sympy would drop the solutions that contradict an unknown's
    sign assumption (a parameter declared positive), and the engine checks
    those signs itself, with the declared assumptions and the family's side
    conditions."""
    stand_in = {u: sympy.Dummy(u.name, real=True) for u in unknowns}
    back = {d: u for u, d in stand_in.items()}
    sols = sympy.solve([e.xreplace(stand_in) for e in eqs], [stand_in[u] for u in unknowns],
                       dict=True)
    return [{back.get(k, k): v.xreplace(back) for k, v in sol.items()} for sol in sols]


def parametrised_equilibrium(model: Model, eliminate: Sequence[str],
                             assume: Mapping[str, str] | None = None) -> EquilibriumChoice:
    """Solve ``f(x0) = 0`` for the names in ``eliminate`` (parameters and
    states, as many as there are states); other states become free symbols
    ``<state>_eq``, real or carrying the assumption ``assume`` gives them
    (``Symbol("T_eq", positive=True)`` for ``assume={"T_eq": "positive"}``)."""
    eliminate = list(eliminate)
    n = len(model.states)
    if len(eliminate) != n:
        raise EquilibriumNotFoundError(
            f"to parametrise the family by the equilibrium, name exactly {n} unknowns to solve "
            f"for (parameters or states), one per equation; got {len(eliminate)}: {eliminate}")
    for name in eliminate:
        if name not in model.symbols:
            model.parameter(name)  # raises a ParameterError with a suggestion
    free_states = [s for s in model.states if s not in eliminate]
    new = coordinate_symbols(model, free_states, assume)
    repl = {model.symbols[s]: new[s] for s in free_states}
    eqs = [e.xreplace(repl) for e in model.equations]
    unknowns = [model.symbols[u] for u in eliminate]
    try:
        sols = _solve_as_real(eqs, unknowns)
    except (NotImplementedError, ValueError, TypeError) as exc:
        raise EquilibriumNotFoundError(
            f"sympy could not solve the equilibrium equations for {', '.join(eliminate)}; choose "
            "other unknowns (ones that enter linearly are best)") from exc
    sols = [s for s in sols if all(u in s for u in unknowns)]
    if not sols:
        raise EquilibriumNotFoundError(
            f"the equilibrium equations have no closed-form solution for {', '.join(eliminate)}; "
            "choose other unknowns (ones that enter linearly are best)")
    sols.sort(key=lambda s: sum(sympy.count_ops(v) for v in s.values()))
    sol = sols[0]
    point = tuple(new[s] if s in new else sympy.factor(sol[model.symbols[s]]) for s in model.states)
    subs = {model.symbols[u]: sympy.factor(sol[model.symbols[u]])
            for u in eliminate if u not in model.states}
    note = ("family parametrised by the equilibrium: " +
            ", ".join(f"{k} = {v}" for k, v in subs.items()) +
            (f" (solution 1 of {len(sols)})" if len(sols) > 1 else ""))
    coords = tuple(new[s] for s in free_states)
    record = Parametrisation(tuple(eliminate), "named", point,
                             tuple((str(k), v) for k, v in subs.items()), coords, (), (),
                             how="named")
    return EquilibriumChoice(point, "parametrised", subs, coords, note, record)


def automatic_equilibrium(model: Model, parameter: str, assumptions: Mapping | None = None, *,
                          keep: Sequence[str] = (),
                          coordinate_assumptions: Mapping | None = None) -> EquilibriumChoice:
    """The family parametrised by the equilibrium in the unknowns that
    :func:`~criticality.local.parametrise.find_parametrisations` ranks first
    (``eliminate="auto"``).

    Raises
    ------
    EquilibriumNotFoundError
        When no linear or triangular set exists, saying why.
    """
    search = find_parametrisations(model, parameter, assumptions, keep=keep,
                                   coordinate_assumptions=coordinate_assumptions)
    best = search.best
    if best is None:
        raise EquilibriumNotFoundError(
            f"eliminate='auto' found no radical-free parametrisation of the equilibrium: "
            f"{search.reason}. Name the unknowns to solve for (eliminate=[...]), give the "
            "equilibrium, or use the numeric mode (guess={...})")
    subs = {model.symbols[name]: value for name, value in best.eliminated}
    note = "; ".join((f"family parametrised automatically ({best.kind} in "
                      f"{', '.join(best.unknowns)}): {best.describe()}",) + best.sign_notes())
    return EquilibriumChoice(best.point, "parametrised", subs, best.coordinates, note, best)


def radical_free_advice(model: Model, parameter: str, assumptions: Mapping | None = None, *,
                        keep: Sequence[str] = ()) -> str:
    """A clause for a refusal or a note: the automatic parametrisation that
    exists and how to ask for it, or ``""``."""
    try:
        return find_parametrisations(model, parameter, assumptions, keep=keep).advice()
    except (BasePolynomialError, NotImplementedError, ValueError):
        return ""  # the advice is a courtesy: a model the finder cannot read gets none
