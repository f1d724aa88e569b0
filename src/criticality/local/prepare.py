"""One preparation stage for every analysis: the problem built once.

Pipeline place: model -> **prepared problem** -> Hopf, fold, Bogdanov-Takens
or Bautin analysis (and the checks of the numeric mode's entry).

:func:`prepare` applies the fixed values, checks the parameter, chooses the
equilibrium (given, solved or parametrised), substitutes it, expands the field
in Taylor series there, rewrites transcendental atoms that are algebraic in
disguise (``tanh(log(z)/2) = (z - 1)/(z + 1)``), merges the radicals into one
tower of fields, converts the Taylor data into it, checks that the point is an
equilibrium and reports each step to the budget (:mod:`criticality.budget`).
The outcome is one frozen :class:`PreparedProblem`; every analysis reads it
and none repeats the set-up.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from types import MappingProxyType
from typing import Any, Callable, Iterable, Mapping, Sequence, Union

import sympy

from ..algebra import Tower, collect_atoms
from ..algebra.domain import algebraic_atom_rules
from ..algebra.signs import NEGATIVE, NONPOSITIVE, ZERO, SignContext, context_for, truth
from ..budget import hint, stage
from ..errors import (ClosedFormUnavailableError, EquilibriumNotFoundError, NoHopfPointError,
                      NotAnalyticError, NotAnEquilibriumError, ParameterError)
from .options import (AUTO_ELIMINATE, check_assume, check_name, check_options, check_order,
                      check_values)
from .equilibria import (EquilibriumChoice, automatic_equilibrium, given_equilibrium,
                         parametrised_equilibrium, radical_free_advice, select_equilibrium,
                         solve_equilibria)
from .sign_words import expr, sign_word
from .solve import SolvedPoint, solve_for
from .taylor import RawTaylor, TaylorForms, raw_taylor

#: how an equilibrium may be given: a mapping state -> value, the values in state order,
#: the index of a solved equilibrium, a sign word ("positive", "nonnegative", "nonzero"),
#: or None (the model file's equilibrium, else the only one)
EquilibriumSpec = Union[Mapping[str, object], Sequence[object], int, str, None]

__all__ = ["EquilibriumSpec", "PreparedProblem", "prepare", "prepare_system", "check_order",
           "resolve_parameter", "assumption_map", "choose_equilibrium", "SolvedPoint", "solve_for",
           "sign_word", "expr", "unknown_symbol", "has_radical"]

@dataclass(frozen=True)
class PreparedProblem:
    """A model at a (symbolic) equilibrium, ready for the field computations.

    Attributes
    ----------
    model
        The model with the fixed values applied (None for a bare system,
        :func:`prepare_system`).
    parameter, mu
        The name and symbol of the analysis' parameter.
    choice : EquilibriumChoice
        How the equilibrium was obtained (given, solved, parametrised).
    equations : tuple of sympy.Expr
        The right-hand sides with the eliminated symbols substituted.
    states, state_names : tuple
        The state symbols and their names.
    params : tuple of sympy.Symbol
        The free symbols: parameters not eliminated, then the free
        equilibrium coordinates (``x_eq``).
    assumptions : mapping
        Sign assumption of every free symbol (read-only).
    order : int
        Degree of the Taylor expansion.
    backend : str
        ``"flint"`` or ``"sympy"``.
    equilibrium : tuple of sympy.Expr
        The point, with disguised algebraic atoms rewritten.
    raw : RawTaylor
        The Taylor data as sympy expressions.
    tower : Tower
        The parameter field with the transcendental atoms and the radicals
        of the equilibrium.
    taylor : TaylorForms
        The shifted field over ``tower.top``.
    extra : tuple
        Field elements of the extra expressions asked for (e.g. ``d f / d mu``).
    """

    model: Any
    parameter: str
    mu: sympy.Symbol
    choice: EquilibriumChoice
    equations: tuple
    states: tuple
    state_names: tuple
    params: tuple
    assumptions: Mapping
    order: int
    backend: str
    equilibrium: tuple
    raw: RawTaylor
    tower: Tower
    taylor: TaylorForms
    extra: tuple = ()
    extra_exprs: tuple = ()

    def symbol(self, name: str) -> sympy.Symbol:
        """The generator called ``name`` (a parameter or a free equilibrium
        coordinate such as ``x_eq``)."""
        for s in self.params:
            if s.name == name:
                return s
        listing = ", ".join(s.name for s in self.params)
        raise ParameterError(f"'{name}' is not a free symbol of this analysis (free symbols: "
                             f"{listing}); eliminated parameters and states cannot be solved for")

    def context(self, tower: Tower | None = None) -> SignContext:
        """The sign context of the free symbols (and of ``tower``'s atoms)."""
        return context_for(self.params, dict(self.assumptions), (tower or self.tower).atoms)

    def at_order(self, order: int) -> "PreparedProblem":
        """The same problem expanded to another Taylor order (a fresh tower)."""
        if order == self.order:
            return self
        return _fields(self.model, self.parameter, self.mu, self.choice, self.equations,
                       self.params, dict(self.assumptions), order, self.backend,
                       self.choice.point, self.extra_exprs, False, self.states,
                       self.state_names)


def assumption_map(model: Any, assume: Mapping | None) -> dict:
    """``{symbol: assumption}`` for the model's parameters, changed or
    extended by ``assume`` (names -> one of the model's assumption words)."""
    out = {}
    for p in model.parameters:
        out[model.symbols[p.name]] = p.assumption
    for key, value in (check_assume(assume) or {}).items():
        if key in model.symbols:
            out[model.symbols[key]] = value
    return out


def choose_equilibrium(model: Any, equilibrium: Any, eliminate: Any, assumptions: Mapping,
                       full: Any = None, fixed: Mapping | None = None, *,
                       parameter: str | None = None, keep: Sequence[str] = (),
                       assume: Mapping | None = None) -> EquilibriumChoice:
    """Choose the equilibrium.  A given mapping is read against the model as
    written (``full``), so it may name parameters fixed by ``values``; their
    values (``fixed``) are then substituted.  ``eliminate="auto"`` keeps
    ``parameter`` and ``keep`` as parameters of the family; where the solved
    equilibrium needs radicals (or none is found), the radical-free
    parametrisation that exists is named in the note (or the error)."""
    if eliminate is not None:
        if equilibrium is not None:
            raise ParameterError("give either an equilibrium or eliminate=..., not both")
        if eliminate == AUTO_ELIMINATE:
            if parameter is None:
                raise ParameterError("eliminate='auto' needs the bifurcation parameter, which "
                                     "it keeps as a parameter of the family")
            stage("finding a radical-free parametrisation of the equilibrium")
            return automatic_equilibrium(model, parameter, assumptions, keep=keep,
                                         coordinate_assumptions=assume)
        return parametrised_equilibrium(model, eliminate, assume)
    if isinstance(equilibrium, Mapping):
        choice = given_equilibrium(full if full is not None else model, equilibrium)
        if fixed:
            choice = replace(choice, point=tuple(p.xreplace(fixed) for p in choice.point))
        return choice
    default = getattr(model, "equilibrium_hint", None)
    if equilibrium is None and default:
        return given_equilibrium(model, default)
    stage("solving f(x) = 0 for the equilibria (sympy's solve)")
    hint("give the equilibrium in closed form (equilibrium={...}, -e \"x=..., y=...\") or "
         "parametrise the family by it (eliminate=[...], --eliminate)")
    candidates: list = []
    try:
        candidates = solve_equilibria(model)
        ctx = context_for(model.parameter_symbols, assumptions)
        choice = select_equilibrium(model, candidates, equilibrium, ctx)
    except EquilibriumNotFoundError as exc:
        # none in closed form, or a choice to make among equilibria with radicals
        wanted = not candidates or any(has_radical(x) for p in candidates for x in p)
        advice = radical_free_advice(model, parameter, assumptions, keep=keep) \
            if parameter and wanted else ""
        if not advice:
            raise
        raise EquilibriumNotFoundError(str(exc) + advice) from exc
    if parameter is not None and any(has_radical(x) for x in choice.point):
        advice = radical_free_advice(model, parameter, assumptions, keep=keep)
        if advice:
            note = "the solved equilibrium has radicals" + advice
            choice = replace(choice, note="; ".join(n for n in (choice.note, note) if n))
    return choice


def has_radical(expr: sympy.Expr) -> bool:
    """Whether ``expr`` holds a root of a non-constant expression."""
    return any(not a.exp.is_Integer and a.base.free_symbols
               for a in sympy.preorder_traversal(expr) if isinstance(a, sympy.Pow))


def resolve_parameter(model: Any, parameter: str | None,
                      values: Mapping | None = None) -> tuple[Any, str]:
    """``(model with the fixed values applied, name of the parameter)``: the
    first step of every analysis, the numeric mode's included.  The name
    defaults to the model file's choice; a state, an unknown name (with a
    did-you-mean) or a value that breaks an assumption raise
    :class:`ParameterError`."""
    values = check_values(values)
    if parameter is not None:
        check_name(parameter, "parameter")
    if values:
        model = model.with_values(dict(values))
    name = parameter or getattr(model, "bifurcation_parameter", None)
    if not name:
        raise ParameterError("name the bifurcation parameter (the model file does not choose one)")
    if name in model.states:
        raise ParameterError(f"'{name}' is a state variable, not a parameter")
    model.parameter(name)  # raises with a did-you-mean if unknown
    return model, name


def prepare(model: Any, parameter: str | None = None, *, equilibrium: Any = None,
            eliminate: Any = None,
            values: Mapping | None = None, assume: Mapping | None = None, order: int = 3,
            backend: str = "flint",
            extra: Callable[[Any, EquilibriumChoice], Iterable] | None = None,
            vary: bool = False, keep: Sequence[str] = ()) -> PreparedProblem:
    """Build the problem of an analysis once.

    Parameters
    ----------
    model : Model
    parameter : str, optional
        The analysis' parameter (default: the model file's choice).
    equilibrium, eliminate, values, assume, backend
        As for :func:`criticality.hopf`.
    order : int
        Degree of the Taylor expansion.
    extra : callable, optional
        ``extra(model, choice)`` returns sympy expressions (in the parameters)
        to convert into the same field, e.g. ``d f / d mu`` at the equilibrium.
    vary : bool
        The analysis varies ``parameter`` across a critical value (Hopf,
        Bautin): it must stay free, occur in the model and not occur inside a
        transcendental function at the equilibrium.
    keep : sequence of str
        Further parameters ``eliminate="auto"`` must not eliminate (a second
        parameter of the analysis).
    """
    if getattr(model, "kind", "flow") == "map":
        model.require_kind("flow", "this analysis", "for maps use flip(), neimark_sacker() or "
                           "fold() (which treats a map's multiplier +1)")
    opts = check_options(model, parameter=parameter, equilibrium=equilibrium,
                         eliminate=eliminate, values=values, assume=assume, order=order,
                         backend=backend)
    equilibrium, eliminate, values = opts["equilibrium"], opts["eliminate"], opts["values"]
    assume, order, backend = opts["assume"], opts["order"], opts["backend"]
    full, fixed = model, (model.value_substitution(values) if values else {})
    model, name = resolve_parameter(model, parameter, values)
    assumptions = assumption_map(model, assume)
    stage("choosing the equilibrium")
    choice = choose_equilibrium(model, equilibrium, eliminate, assumptions, full, fixed,
                                parameter=name, keep=keep, assume=assume)
    eqs = tuple(e.xreplace(choice.substitutions) for e in model.equations)
    mu = model.symbols[name]
    if vary and any(s == mu for s in choice.substitutions):
        raise ParameterError(f"the bifurcation parameter '{name}' cannot be eliminated")
    implied = dict(choice.parametrisation.implied) if choice.parametrisation else {}
    for s in choice.new_symbols:
        assumptions.setdefault(s, (assume or {}).get(s.name, implied.get(s.name, "real")))
    params = tuple(s for s in model.parameter_symbols if s not in choice.substitutions)
    params += tuple(choice.new_symbols)
    if vary and not any(e.has(mu) for e in eqs) and not any(x.has(mu) for x in choice.point):
        raise NoHopfPointError(f"the bifurcation parameter '{name}' does not occur in the model",
                               reason="parameter_absent")
    more = tuple(sympy.sympify(e, strict=True) for e in (extra(model, choice) if extra else ()))
    return _fields(model, name, mu, choice, eqs, params, assumptions, order, backend,
                   choice.point, more, vary)


def prepare_system(equations: Sequence, states: Sequence, parameters: Sequence, parameter: Any,
                   equilibrium: Sequence, order: int = 3, backend: str = "flint",
                   state_names: Sequence[str] = (),
                   assumptions: Mapping | None = None) -> PreparedProblem:
    """:func:`prepare` for a system given as sympy objects (no model, no
    choice of equilibrium): the equations, the state and parameter symbols,
    the parameter varied (a symbol) and the equilibrium point."""
    states = tuple(states)
    names = tuple(state_names) or tuple(str(s) for s in states)
    choice = EquilibriumChoice(tuple(sympy.sympify(x, strict=True) for x in equilibrium), "given", {}, ())
    return _fields(None, str(parameter), parameter, choice,
                   tuple(sympy.sympify(e, strict=True) for e in equations), tuple(parameters),
                   dict(assumptions or {}), order, backend, choice.point, (), True,
                   states=states, names=names)


def _fields(model, name, mu, choice, eqs, params, assumptions, order, backend, point, more,
            vary, states=None, names=None) -> PreparedProblem:
    """The field stage: Taylor data, disguised atoms, the tower, the check."""
    states = tuple(model.state_symbols) if states is None else tuple(states)
    names = tuple(model.states) if names is None else tuple(names)
    if order > 3:
        hint(f"ask for a lower order (order={order} was asked; order=3 gives l1)")
    plain = context_for(params, assumptions)
    _check_real(eqs, states, point, names, plain)
    stage("expanding the model in Taylor series at the equilibrium")
    raw = raw_taylor(eqs, states, point, order, names)
    equilibrium = tuple(point)
    rules = algebraic_atom_rules(list(raw.coefficients()) + list(equilibrium) + list(more))
    if rules:
        raw = raw.map(lambda c: c.xreplace(rules))
        equilibrium = tuple(x.xreplace(rules) for x in equilibrium)
        more = tuple(e.xreplace(rules) for e in more)
    atoms = collect_atoms(list(raw.coefficients()) + list(equilibrium) + list(more), params)
    inside = [a for a in atoms if a.has(mu)] if vary else []
    if inside:
        advice = ""
        if model is not None and choice.how != "parametrised":
            advice = radical_free_advice(model, name, assumptions).lstrip("; ")
            advice = f" {advice[0].upper()}{advice[1:]}." if advice else ""
        raise ClosedFormUnavailableError(
            f"the bifurcation parameter '{mu}' occurs inside {inside[0]} at the "
            "equilibrium, so its critical value is not algebraic in closed form. Parametrise "
            "the family by the equilibrium (eliminate=[...] or eliminate='auto') so that it "
            "occurs polynomially, choose another bifurcation parameter, or use the numeric "
            f"mode (guess={{...}}).{advice}")
    tower = Tower(params, atoms, backend, lambda e: truth(plain.sign(e)))
    x0 = [tower.convert(e) for e in equilibrium]
    taylor = TaylorForms.from_raw(raw, x0, tower.convert, tower.base)
    _check_equilibrium(tower, taylor, names)
    taylor = TaylorForms(tower.top, taylor.n, taylor.order, taylor.components)
    converted = tuple(tower.convert(e) for e in more)
    return PreparedProblem(model, name, mu, choice, tuple(eqs), states, names, tuple(params),
                           MappingProxyType(dict(assumptions)), order, backend, equilibrium,
                           raw, tower, taylor, converted, tuple(more))


def _check_real(eqs, states, point, names, ctx):
    """Refuse a field that is complex at the equilibrium: an even root or a
    logarithm of a quantity that is negative there under the declared
    assumptions (``sqrt(b)`` with ``b`` declared negative)."""
    at = dict(zip(states, point))
    for name, f in zip(names, eqs):
        for atom in sorted(f.atoms(sympy.Pow, sympy.log), key=sympy.default_sort_key):
            if isinstance(atom, sympy.log):
                base, what = atom.args[0], "the logarithm of"
            elif atom.exp.is_Rational and atom.exp.q % 2 == 0:
                base, what = atom.base, "an even root of"
            else:
                continue
            value = base.xreplace(at)
            if ctx.structural_sign(value) in (NEGATIVE,) or (
                    what == "the logarithm of" and ctx.structural_sign(value) in (ZERO, NONPOSITIVE)):
                raise NotAnalyticError(
                    f"the right-hand side for '{name}' contains {atom}, {what} {value}, which "
                    "is not positive at the equilibrium under the declared assumptions, so the "
                    "model is complex (or undefined) there; the analysis needs a real field. "
                    "Check the sign declared for its parameters.")


def _check_equilibrium(tower, taylor, names):
    bad = [(names[i], r) for i, r in enumerate(taylor.residual()) if r]
    if bad:
        parts = "; ".join(f"the right-hand side for '{n}' equals {tower.to_sympy(r)}"
                          for n, r in bad)
        raise NotAnEquilibriumError(
            f"the given point is not an equilibrium: {parts} there instead of 0. Check the "
            "equilibrium coordinates, or let the engine solve for the equilibrium.")


def unknown_symbol(prep: PreparedProblem, name: str | None) -> sympy.Symbol:
    """The symbol solved for: ``name``, else the parameter if still free, else
    the first free fixed-point coordinate of a parametrised family."""
    if name is not None:
        return prep.symbol(name)
    if prep.mu in prep.params:
        return prep.mu
    if prep.choice.new_symbols:
        return prep.choice.new_symbols[0]
    return prep.symbol(prep.parameter)
