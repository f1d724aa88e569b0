"""The public Hopf analysis: ``hopf(model, parameter, ...)``.

Pipeline place: model -> prepared problem -> **engine** -> result.  This
module prepares the problem (:func:`criticality.local.prepare.prepare`), hands
it to :mod:`criticality.hopf_analysis.engine`, and turns the field elements of
each branch into a :class:`HopfResult` (:mod:`criticality.hopf_analysis.assemble`).
"""

from __future__ import annotations

from dataclasses import replace

from typing import TYPE_CHECKING, Mapping, Sequence, Union

from .assemble import build_result
from .direct import direct_forms
from ..local.boundary import guarded
from ..budget import hint, stage
from ..budget import time_limit as time_limit_
from .engine import run_engine
from ..errors import NoHopfPointError
from ..local.options import (check_backend, check_branch, check_digits, check_equilibrium,
                             check_order, refuse_unused)
from ..local.prepare import EquilibriumSpec, prepare
from .results import HopfResult

if TYPE_CHECKING:
    from ..model.core import Model
    from ..delay.numeric import NumericDelayHopf
    from ..delay.results import DelayHopfResult

__all__ = ["hopf", "hopf_all"]

#: what hopf() returns: a HopfResult, or for a model with delayed states the delay result
AnyHopfResult = Union[HopfResult, "DelayHopfResult", "NumericDelayHopf"]

@guarded("the Hopf analysis")

def hopf(model: Model, parameter: str | None = None, *, equilibrium: EquilibriumSpec = None,
         eliminate: Sequence[str] | None = None, branch: int | None = None, order: int = 3,
         values: Mapping[str, object] | None = None, assume: Mapping[str, str] | None = None,
         backend: str = "flint", guess: Mapping | None = None, digits: int = 30,
         time_limit: float | None = None) -> AnyHopfResult:
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
    eliminate : sequence of str or "auto", optional
        Parametrise the family by the equilibrium: these names (parameters or
        states, one per state) are solved from ``f(x0) = 0``; the other states
        become free symbols ``<state>_eq``.  ``"auto"`` lets the engine choose
        parameters (never ``parameter``) in which ``f(x0) = 0`` is linear or
        triangular, so that no radical appears
        (:mod:`criticality.local.parametrise`); the result's
        ``parametrisation`` says which, and ``direct_forms`` gives the Hopf
        condition back in the original parameters as far as it exists.  Not
        the default: where the solved equilibrium has radicals, the result's
        notes (or the refusal) name the parametrisation this would use.
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
    branch, backend = check_branch(branch), check_backend(backend)
    if getattr(model, "delays", ()):
        from ..delay.analysis import hopf_delay
        return hopf_delay(model, parameter, equilibrium=equilibrium, values=values,
                          branch=branch, assume=assume, time_limit=time_limit, order=order,
                          eliminate=eliminate, guess=guess, digits=digits)
    if guess is not None:
        from .numeric_mode import hopf_numeric
        check_digits(digits, 5, 500)
        refuse_unused("the numeric mode (guess=) locates one Hopf point from the guess and",
                      equilibrium=equilibrium, eliminate=eliminate, branch=branch, assume=assume)
        check_backend(backend)
        with time_limit_(time_limit, "the numeric Hopf analysis"):
            return hopf_numeric(model, parameter or model.bifurcation_parameter, guess,
                                digits=digits, order=order, values=values)
    with time_limit_(time_limit, "the Hopf analysis"):
        return _analyse(model, parameter, equilibrium, eliminate, order, values, assume,
                        backend, select=0 if branch is None else branch)[0]


@guarded("the Hopf analysis")
def hopf_all(model: Model, parameter: str | None = None, *, equilibrium: EquilibriumSpec = None,
             eliminate: Sequence[str] | None = None, order: int = 3,
             values: Mapping[str, object] | None = None, assume: Mapping[str, str] | None = None,
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
    check_order(order)
    check_equilibrium(equilibrium, model)
    if order > 3:
        hint(f"ask for a lower order (order={order} was asked; order=3 gives l1)")
    prep = prepare(model, parameter, equilibrium=equilibrium, eliminate=eliminate,
                   values=values, assume=assume, order=order, backend=backend, vary=True)
    results = _results(prep, select)
    if order == 3 and any(r is not None and r.l1 == 0 for r in results):
        # l1 vanishes identically: the second coefficient decides
        results = _results(prep.at_order(5), select)
    if any(r is None for r in results):
        raise NoHopfPointError(
            "omega^2 <= 0 on this branch under the declared assumptions: the two eigenvalues "
            "that sum to zero are a real pair +-kappa (a neutral saddle), not a pair crossing "
            "the imaginary axis", reason="omega_squared_nonpositive")
    if prep.choice.parametrisation is not None:
        stage("the Hopf condition in the original parameters (eliminating the coordinate)")
        results = [replace(r, direct_forms=direct_forms(r)) for r in results]
    if values:  # the outputs list the parameters fixed before the analysis
        fixed = model.value_substitution(values)
        records = tuple((model.parameter(s.name), v) for s, v in fixed.items())
        results = [replace(r, fixed_parameters=records) for r in results]
    return tuple(results)


def _results(prep, select) -> list:
    out = run_engine(prep, select=select)
    stage("assembling the result (factoring and deciding signs)")
    return [build_result(prep.model, prep.parameter, prep.mu, prep.choice, out, bc,
                         dict(prep.assumptions), prep.params) for bc in out.branches]
