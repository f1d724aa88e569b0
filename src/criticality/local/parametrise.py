"""The automatic radical-free parametrisation of a family by its equilibrium.

Pipeline place: model -> **equilibrium (parametrised)** -> Taylor forms.

Where the equilibrium equations ``f(x0) = 0`` are linear, or triangular
(solvable one equation at a time, each linear in its new unknown), in some
of the parameters, solving for those parameters instead of for the states
makes the equilibrium coordinates free symbols ``<state>_eq`` of the family
and removes every radical of the equilibrium.  :func:`find_parametrisations`
searches for such sets of ``n`` unknowns (parameters, possibly with some
states; never the bifurcation parameter, which must stay a parameter of the
result) structurally: degrees of the numerators of ``f`` as polynomials in
each candidate, one elimination step at a time, with no call to
``sympy.solve``.  The search is capped, ordered and deterministic.

Each step solves ``c u + r = 0`` for ``u``; the pivot ``c`` must not vanish,
and factors that are a single symbol (``x`` in ``x (a - x y)``) are set aside
as non-zero (the interior equilibrium).  These conditions are stated on the
result.  Among the sets found the preferred one keeps the declared signs of
the eliminated parameters provable (``a = x_eq`` for ``a`` positive holds where
``x_eq > 0``), eliminates the fewest parameters, touches the fewest equations
and gives the smallest expressions, in that order.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import TYPE_CHECKING, Iterable, Mapping

import sympy

from ..algebra.elimination import triangular_eliminations
from ..algebra.signs import NEGATIVE, NONNEGATIVE, POSITIVE, ZERO, context_for
from ..model.parameter import symbol_for

if TYPE_CHECKING:
    from ..model.core import Model

__all__ = ["Parametrisation", "ParametrisationSearch", "find_parametrisations",
           "coordinate_symbols", "SEARCH_LIMIT"]

#: elimination steps the search explores at most (each one a few small polynomial operations)
SEARCH_LIMIT = 3000

_PROVED, _IF_POSITIVE, _OPEN = "proved", "where the coordinates are positive", "not proved"


@dataclass(frozen=True)
class Parametrisation:
    """One radical-free parametrisation of the equilibrium family.

    Attributes
    ----------
    unknowns : tuple of str
        The names solved for (parameters and states), in the order solved.
    kind : str
        ``"linear"`` (the equations are jointly linear in the unknowns) or
        ``"triangular"`` (solved one equation at a time).
    point : tuple of sympy.Expr
        ``x0`` aligned with the model's states, in the free coordinates.
    eliminated : tuple of (str, sympy.Expr)
        Each eliminated parameter and its expression (rational in the free
        coordinates and the remaining parameters).
    coordinates : tuple of sympy.Symbol
        The free equilibrium coordinates (``x_eq``).
    nonzero : tuple of sympy.Expr
        Factors assumed non-zero: the pivots (the determinant, for a linear
        system), the single-symbol factors set aside, the denominators of the
        model at the point (only those not provably non-zero).
    signs : tuple of (str, str, str)
        ``(parameter, declared sign, status)`` for every eliminated parameter
        with a declared sign; status ``"proved"``, ``"where the coordinates
        are positive"`` or ``"not proved"``.
    how : str
        ``"automatic"`` (found here) or ``"named"`` (``eliminate=[...]``,
        solved by sympy; ``kind`` is then ``"named"`` too).
    implied : tuple of (str, str)
        ``(coordinate name, sign word)`` where an eliminated parameter with a
        declared sign equals a rational multiple of one coordinate (``A =
        x_eq`` with ``A`` positive makes ``x_eq`` positive): the declaration
        carries over to the coordinate.
    """

    unknowns: tuple
    kind: str
    point: tuple
    eliminated: tuple
    coordinates: tuple
    nonzero: tuple
    signs: tuple
    how: str = "automatic"
    implied: tuple = ()

    def describe(self) -> str:
        """One line: ``equilibrium coordinates x_eq as parameters; a = ... eliminated``."""
        coords = ", ".join(map(str, self.coordinates))
        parts = [f"equilibrium coordinate{'s' if len(self.coordinates) > 1 else ''} {coords} "
                 "as parameters",
                 "; ".join(f"{n} = {sympy.sstr(v)}" for n, v in self.eliminated) +
                 " eliminated"]
        if self.nonzero:
            parts.append("where " + ", ".join(f"{sympy.sstr(e)} != 0" for e in self.nonzero))
        return " (".join([parts[0] + "; " + parts[1]] + parts[2:]) + (")" if self.nonzero
                                                                      else "")

    def sign_notes(self) -> tuple:
        """Sentences on the declared signs of the eliminated parameters."""
        out = []
        for name, word in self.implied:
            source = next(n for n, v in self.eliminated
                          if {str(f) for f in v.free_symbols} == {name})
            out.append(f"'{name}' is taken {word}, since '{source}' = "
                       f"{sympy.sstr(dict(self.eliminated)[source])} is declared so")
        for name, declared, status in self.signs:
            if status == _PROVED:
                continue
            value = dict(self.eliminated)[name]
            where = ("it holds where the coordinates are positive (declare them, e.g. "
                     f"assume={{'{self.coordinates[0]}': 'positive'}})" if status == _IF_POSITIVE
                     else "it is a condition on the family, not proved")
            out.append(f"'{name}' is declared {declared}; its expression {sympy.sstr(value)} "
                       f"is {declared} only where that holds: {where}")
        return tuple(out)


@dataclass(frozen=True)
class ParametrisationSearch:
    """What :func:`find_parametrisations` found.

    ``found`` is ranked, best first; ``reason`` says why it is empty (or
    that the search was capped); ``steps`` counts the elimination steps
    explored.
    """

    found: tuple
    reason: str
    steps: int
    capped: bool

    @property
    def best(self) -> Parametrisation | None:
        return self.found[0] if self.found else None

    def advice(self) -> str:
        """A clause for an error message: the parametrisation found and how
        to ask for it (empty when none was found)."""
        best = self.best
        if best is None:
            return ""
        return (f"; eliminate='auto' (--eliminate auto) would solve for "
                f"{', '.join(best.unknowns)} instead: {best.describe()}")


def coordinate_symbols(model: Model, free_states: Iterable[str],
                       assume: Mapping[str, str] | None = None) -> dict:
    """``{state name: Symbol('<state>_eq', ...)}``, each name clear of the
    model's own names, real or carrying the word ``assume`` gives it
    (``Symbol("T_eq", positive=True)`` for ``{"T_eq": "positive"}``)."""
    taken = set(model.symbols)
    out = {}
    for s in free_states:
        name = f"{s}_eq"
        while name in taken:
            name += "_"
        out[s] = symbol_for(name, (assume or {}).get(name, "real"))
    return out


def find_parametrisations(model: Model, parameter: str, assumptions: Mapping | None = None,
                          *, keep: Iterable[str] = (), coordinate_assumptions: Mapping | None
                          = None, limit: int = SEARCH_LIMIT) -> ParametrisationSearch:
    """Sets of unknowns in which the equilibrium equations are linear or
    triangular, ranked (see the module docstring).

    Parameters
    ----------
    model : Model
    parameter : str
        The bifurcation parameter: never eliminated.
    assumptions : mapping, optional
        ``{symbol: assumption word}`` of the parameters (default: declared).
    keep : iterable of str
        Further parameters never eliminated (a second parameter).
    coordinate_assumptions : mapping, optional
        ``{name: word}`` for the free coordinates (``assume=``).
    limit : int
        Elimination steps explored at most.

    Examples
    --------
    >>> from criticality import Model
    >>> m = Model(["x", "y"], {"x": "A - (B + 1)*x + x^2*y", "y": "B*x - x^2*y"},
    ...           {"A": "positive", "B": "positive"})
    >>> find_parametrisations(m, "B").best.describe()
    'equilibrium coordinate x_eq as parameters; A = x_eq eliminated (where x_eq != 0)'
    """
    kept = {parameter, *keep}
    params = [p.name for p in model.parameters if p.name not in kept]
    search = _search(model, params, limit, coordinate_assumptions)
    if search.found or search.capped:
        return _ranked(model, search, assumptions, coordinate_assumptions)
    if not params:
        reason = (f"the model has no parameter other than {', '.join(map(repr, sorted(kept)))} "
                  "to solve the equilibrium equations for")
    else:
        reason = (f"the equilibrium equations are not linear or triangular in any set of "
                  f"{len(model.states)} unknowns among the parameters "
                  f"{', '.join(map(repr, params))} and the states (in every order some "
                  "equation is of degree >= 2 in each unknown left or holds it inside a "
                  "function, or a solution would fix a parameter at 0 or make a denominator "
                  "vanish)")
        others = [p for p in (p.name for p in model.parameters) if p not in params]
        if others and _search(model, [p.name for p in model.parameters], limit,
                                    coordinate_assumptions).found:
            reason += (f"; only sets that eliminate {', '.join(map(repr, others))} exist, and "
                       "the analysis' parameter must stay a parameter of the result")
    return ParametrisationSearch((), reason, search.steps, False)


def _search(model, params, limit, coordinate_assumptions=None) -> ParametrisationSearch:
    """The eliminations of the kernel, checked against the model and
    completed into :class:`Parametrisation` records (unranked)."""
    pool = tuple(model.state_symbols) + tuple(model.symbols[p] for p in params)
    numerators, denominators = [], []
    for f in model.equations:
        num, den = sympy.fraction(sympy.together(f))
        numerators.append(num)
        denominators.append(den)
    chosen = tuple(model.symbols[p] for p in params)
    search = triangular_eliminations(numerators, pool, required=chosen, nonzero_unknowns=chosen,
                                     denominators=denominators, limit=limit)
    out = tuple(p for p in (_complete(model, e, coordinate_assumptions) for e in search.found)
                if p is not None)
    reason = (f"the search stopped after {search.steps} elimination steps" if search.capped
              else "")
    return ParametrisationSearch(out, reason, search.steps, search.capped)


def _complete(model, elimination, coordinate_assumptions=None) -> Parametrisation | None:
    """An elimination as a :class:`Parametrisation`, in the free coordinates."""
    values = elimination.values
    solved = {str(u) for u in elimination.unknowns}
    coords = coordinate_symbols(model, [s for s in model.states if s not in solved],
                                coordinate_assumptions)
    rename = {model.symbols[s]: c for s, c in coords.items()}
    values = {u: v.xreplace(rename) for u, v in values.items()}
    everything = {**values, **rename}
    if not elimination.checked and any(sympy.cancel(sympy.together(f.xreplace(everything)))
                                       for f in model.equations):
        return None  # the kernel checks in the field; atoms holding a solved unknown here
    point = tuple(values.get(model.symbols[s], coords.get(s)) for s in model.states)
    nonzero = [e.xreplace(rename) for e in elimination.nonzero]
    eliminated = tuple((p.name, values[model.symbols[p.name]]) for p in model.parameters
                       if model.symbols[p.name] in values)
    return Parametrisation(tuple(map(str, elimination.unknowns)),
                           "linear" if elimination.linear else "triangular", point, eliminated,
                           tuple(coords.values()), _distinct(nonzero), ())


def _distinct(exprs) -> tuple:
    out: dict = {}
    for f in exprs:
        if f.free_symbols and f not in out and -f not in out:
            out[f] = None
    return tuple(sorted(out, key=sympy.default_sort_key))


# -- ranking -------------------------------------------------------------------------------

def _sign_status(ctx_user, ctx_positive, value, declared) -> str:
    wanted = {"positive": (POSITIVE,), "negative": (NEGATIVE,),
              "nonnegative": (POSITIVE, NONNEGATIVE, ZERO), "nonzero": (POSITIVE, NEGATIVE)}
    ok = wanted[declared]
    if ctx_user.sign(value) in ok:
        return _PROVED
    return _IF_POSITIVE if ctx_positive.sign(value) in ok else _OPEN


def _sign_of_factor(ctx, f):
    """The sign of a factor assumed non-zero: by its terms where it is a
    polynomial, by its structure (``exp(...)`` > 0) where not."""
    if f.is_polynomial(*f.free_symbols):
        return ctx.polynomial_sign(f)
    return ctx.structural_sign(f)


def _ranked(model, search, assumptions, coordinate_assumptions) -> ParametrisationSearch:
    declared = {model.symbols[p.name]: p.assumption for p in model.parameters}
    declared.update(assumptions or {})
    coord_words = dict(coordinate_assumptions or {})
    scored = []
    for k, par in enumerate(search.found):
        left = [model.symbols[p.name] for p in model.parameters
                if p.name not in dict(par.eliminated)]
        words = {s: declared.get(s, "real") for s in left}
        user = {**words, **{c: coord_words.get(c.name, "real") for c in par.coordinates}}
        positive = {**words, **{c: "positive" for c in par.coordinates}}
        symbols = left + list(par.coordinates)
        ctx_user, ctx_pos = context_for(symbols, user), context_for(symbols, positive)
        signs = tuple((name, declared[model.symbols[name]],
                       _sign_status(ctx_user, ctx_pos, value, declared[model.symbols[name]]))
                      for name, value in par.eliminated
                      if declared.get(model.symbols[name], "real") != "real")
        nonzero = tuple(f for f in par.nonzero if _sign_of_factor(ctx_user, f)
                        not in (POSITIVE, NEGATIVE))
        implied = _implied(par, declared, model, coord_words)
        if implied:
            by_name = {str(c): c for c in par.coordinates}
            user.update({by_name[c]: w for c, w in implied if c in by_name})
            ctx_user = context_for(symbols, user)
            signs = tuple((n, d, _sign_status(ctx_user, ctx_pos, dict(par.eliminated)[n], d))
                          for n, d, _ in signs)
        par = Parametrisation(par.unknowns, par.kind, par.point, par.eliminated,
                              par.coordinates, nonzero, signs, implied=implied)
        if implied:  # the coordinates' symbols carry the signs the declarations imply
            par = _signed_coordinates(par, dict(implied))
        touched = sum(1 for f in model.equations
                      if f.has(*[model.symbols[n] for n, _ in par.eliminated]))
        size = sum(sympy.count_ops(v) for v in par.point) + sum(
            sympy.count_ops(v) for _, v in par.eliminated)
        free = tuple(i for i, name in enumerate(model.states) if name not in par.unknowns)
        key = (sum(s[2] != _PROVED for s in signs), sum(s[2] == _OPEN for s in signs),
               len(par.eliminated), touched, size, free, k)
        scored.append((key, par))
    scored.sort(key=lambda item: item[0])
    return ParametrisationSearch(tuple(p for _, p in scored), search.reason, search.steps,
                                 search.capped)


def _signed_coordinates(par: Parametrisation, words: Mapping[str, str]) -> Parametrisation:
    """``par`` with each coordinate named in ``words`` replaced by the symbol
    that carries its word."""
    rename = {c: symbol_for(c.name, words[c.name]) for c in par.coordinates if c.name in words}
    return replace(par, point=tuple(v.xreplace(rename) for v in par.point),
                   eliminated=tuple((n, v.xreplace(rename)) for n, v in par.eliminated),
                   coordinates=tuple(rename.get(c, c) for c in par.coordinates),
                   nonzero=tuple(f.xreplace(rename) for f in par.nonzero))


_FLIP = {"positive": "negative", "negative": "positive", "nonzero": "nonzero"}


def _implied(par, declared, model, coord_words) -> tuple:
    """The coordinates whose sign an eliminated parameter's declaration
    fixes (the parameter is a rational multiple of the coordinate)."""
    out: dict = {}
    for name, value in par.eliminated:
        word = declared.get(model.symbols[name], "real")
        if word not in _FLIP or len(value.free_symbols) != 1:
            continue
        (c,) = value.free_symbols
        if c not in par.coordinates or c.name in coord_words or c.name in out:
            continue
        k = sympy.cancel(value / c)
        if k.is_Rational and k != 0:
            out[c.name] = word if k > 0 else _FLIP[word]
    return tuple(out.items())
