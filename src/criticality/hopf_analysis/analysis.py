"""The public Hopf analysis: ``hopf(model, parameter, ...)``.

Pipeline place: model -> equilibrium -> **engine** -> result.  This module
chooses the equilibrium, hands sympy objects to :mod:`criticality.hopf_analysis.engine`, and
turns the field elements of each branch into a :class:`HopfResult`
(:mod:`criticality.hopf_analysis.assemble`).
"""

from __future__ import annotations

from dataclasses import replace
from typing import Mapping

from .assemble import build_result
from ..budget import hint, stage
from ..budget import time_limit as time_limit_
from ..algebra.signs import context_for
from .engine import Problem, run_engine
from ..local.equilibria import (given_equilibrium, parametrised_equilibrium, select_equilibrium,
                         solve_equilibria)
from ..errors import NoHopfPointError, ParameterError
from .results import HopfResult

__all__ = ["hopf", "hopf_all"]

_ASSUMPTIONS = ("real", "positive", "nonnegative", "negative", "nonzero")


def hopf(model, parameter: str | None = None, *, equilibrium=None, eliminate=None,
         branch: int | None = None, order: int = 3, values: Mapping | None = None,
         assume: Mapping | None = None, backend: str = "flint", guess: Mapping | None = None,
         digits: int = 30, time_limit: float | None = None) -> HopfResult:
    """Hopf analysis of ``model`` with respect to ``parameter``.

    Parameters
    ----------
    model : criticality.Model
    parameter : str, optional
        The bifurcation parameter (default: the model's own choice, if its
        file names one).
    equilibrium : mapping, int or str, optional
        A mapping ``{state: expression}``; or, to let the engine solve
        ``f(x) = 0``, the index of the equilibrium or one of ``"positive"``,
        ``"nonnegative"``, ``"nonzero"``.  Default: the model file's
        equilibrium, else the only equilibrium.
    eliminate : sequence of str, optional
        Parametrise the family by the equilibrium: these names (parameters or
        states, one per state) are solved from ``f(x0) = 0``; the other states
        become free symbols ``<state>_eq``.
    branch : int, optional
        Which branch of the critical set to return when there are several
        (default 0; all branches: :func:`hopf_all`).
    order : int
        Highest order of the normal form: 3 gives ``l1``; ``2k + 1`` gives
        ``l1 .. lk``.
    values : mapping, optional
        Exact values for some parameters, fixed before the analysis.
    assume : mapping, optional
        Extra or changed sign assumptions, e.g. ``{"x_eq": "positive"}``.
    backend : {"flint", "sympy"}
        The exact arithmetic used for the parameter field.
    guess : mapping, optional
        Numeric mode (:mod:`criticality.hopf_analysis.numeric_mode`): starting values for
        every state and for ``parameter``; the Hopf point is located by
        mpmath and every quantity evaluated to ``digits`` digits.
    digits : int
        Significant digits of the numeric mode.
    time_limit : float, optional
        Wall-clock budget in seconds for the analysis (exact or numeric); when it is spent
        the analysis stops with :class:`~criticality.errors.ComputationLimitError`
        naming the stage it reached and ways to make the problem smaller
        (:mod:`criticality.budget`).  Default: no limit.

    Returns
    -------
    HopfResult
        With ``branch_index`` and ``branch_count`` telling where it stands
        among the branches.

    Examples
    --------
    >>> from criticality import Model, hopf
    >>> m = Model(states=["x", "y"], equations={"x": "y", "y": "-x + mu*y - x^2*y"},
    ...           parameters={"mu": "real"})
    >>> r = hopf(m, "mu", equilibrium={"x": 0, "y": 0})
    >>> r.critical_value, r.l1, r.classification
    (0, -1/4, 'supercritical')
    """
    if getattr(model, "delays", ()):
        from ..delay.analysis import hopf_delay
        return hopf_delay(model, parameter, equilibrium=equilibrium, values=values,
                          branch=branch, assume=assume, time_limit=time_limit, order=order,
                          eliminate=eliminate, guess=guess, digits=digits)
    if guess is not None:
        from .numeric_mode import hopf_numeric
        with time_limit_(time_limit, "the numeric Hopf analysis"):
            return hopf_numeric(model, parameter or model.bifurcation_parameter, guess,
                                digits=digits, order=order, values=values)
    with time_limit_(time_limit, "the Hopf analysis"):
        return _analyse(model, parameter, equilibrium, eliminate, order, values, assume,
                        backend, select=0 if branch is None else branch)[0]


def hopf_all(model, parameter: str | None = None, *, equilibrium=None, eliminate=None,
             order: int = 3, values: Mapping | None = None, assume: Mapping | None = None,
             backend: str = "flint", time_limit: float | None = None) -> tuple:
    """Like :func:`hopf`, returning one :class:`HopfResult` per branch of the
    critical set.

    Branches are ordered: those whose critical value needs no new square root
    first, then in the order of the factors of the pair condition; ``hopf``
    returns branch 0 unless asked for another.
    """
    with time_limit_(time_limit, "the Hopf analysis"):
        return _analyse(model, parameter, equilibrium, eliminate, order, values, assume,
                        backend, select=None)


def _analyse(model, parameter, equilibrium, eliminate, order, values, assume, backend, select):
    if order < 3 or order % 2 == 0:
        raise ParameterError(f"order must be an odd integer >= 3 (3 gives l1, 5 gives l2); "
                             f"got {order}")
    full, fixed = model, {}
    if values:
        fixed = model.value_substitution(values)
        model = model.with_values(dict(values))
    name = parameter or getattr(model, "bifurcation_parameter", None)
    if not name:
        raise ParameterError("name the bifurcation parameter (the model file does not choose one)")
    if name in model.states:
        raise ParameterError(f"'{name}' is a state variable, not a parameter")
    model.parameter(name)  # raises with a did-you-mean if unknown
    assumptions = _assumptions(model, assume)
    choice = _equilibrium(model, equilibrium, eliminate, assumptions, full, fixed)
    eqs = tuple(e.xreplace(choice.substitutions) for e in model.equations)
    mu = model.symbols[name]
    if any(s == mu for s in choice.substitutions):
        raise ParameterError(f"the bifurcation parameter '{name}' cannot be eliminated")
    for s in choice.new_symbols:
        assumptions.setdefault(s, (assume or {}).get(s.name, "real"))
    params = tuple(s for s in model.parameter_symbols if s not in choice.substitutions)
    params += tuple(choice.new_symbols)
    if not any(e.has(mu) for e in eqs) and not any(x.has(mu) for x in choice.point):
        raise NoHopfPointError(f"the bifurcation parameter '{name}' does not occur in the model",
                               reason="parameter_absent")
    if order > 3:
        hint(f"ask for a lower order (order={order} was asked; order=3 gives l1)")
    problem = Problem(eqs, tuple(model.state_symbols), params, mu, choice.point, order, backend,
                      tuple(model.states), assumptions)
    out = run_engine(problem, select=select)
    stage("assembling the result (factoring and deciding signs)")
    results = [build_result(model, name, mu, choice, out, bc, assumptions, params)
               for bc in out.branches]
    if order == 3 and any(r is not None and r.l1 == 0 for r in results):
        # l1 vanishes identically: the second coefficient decides
        problem = replace(problem, order=5)
        out = run_engine(problem, select=select)
        stage("assembling the result (factoring and deciding signs)")
        results = [build_result(model, name, mu, choice, out, bc, assumptions, params)
                   for bc in out.branches]
    if any(r is None for r in results):
        raise NoHopfPointError(
            "omega^2 <= 0 on this branch under the declared assumptions: the two eigenvalues "
            "that sum to zero are a real pair +-kappa (a neutral saddle), not a pair crossing "
            "the imaginary axis", reason="omega_squared_nonpositive")
    return tuple(results)


def _assumptions(model, assume) -> dict:
    out = {}
    for p in model.parameters:
        out[model.symbols[p.name]] = p.assumption
    for key, value in (assume or {}).items():
        if value not in _ASSUMPTIONS:
            raise ParameterError(f"unknown assumption {value!r} for '{key}'; expected one of "
                                 f"{', '.join(_ASSUMPTIONS)}")
        if key in model.symbols:
            out[model.symbols[key]] = value
    return out


def _equilibrium(model, equilibrium, eliminate, assumptions, full=None, fixed=None):
    """Choose the equilibrium.  A given mapping is read against the model as
    written (``full``), so it may name parameters fixed by ``values``; their
    values (``fixed``) are then substituted."""
    if eliminate is not None:
        if equilibrium is not None:
            raise ParameterError("give either an equilibrium or eliminate=..., not both")
        return parametrised_equilibrium(model, eliminate)
    if isinstance(equilibrium, Mapping):
        choice = given_equilibrium(full if full is not None else model, equilibrium)
        if fixed:
            choice = replace(choice, point=tuple(p.xreplace(fixed) for p in choice.point))
        return choice
    hint = getattr(model, "equilibrium_hint", None)
    if equilibrium is None and hint:
        return given_equilibrium(model, hint)
    candidates = solve_equilibria(model)
    ctx = context_for(model.parameter_symbols, assumptions)
    return select_equilibrium(model, candidates, equilibrium, ctx)
