"""The computational core of the Hopf analysis, on a prepared problem.

Pipeline: prepared problem (Taylor forms in the tower of fields) -> Jacobian
and characteristic polynomial with the bifurcation parameter symbolic -> critical branches -> for
each branch, substitution of the critical value, eigenbasis, the two routes to
the normal-form coefficients (projection formula; center manifold series +
planar normal form), and their exact comparison.

This module knows nothing about model files, names or outputs: it takes a
:class:`~criticality.local.prepare.PreparedProblem` (the Taylor forms already
in the tower of fields) and returns :class:`BranchComputation` records of field
elements, which :mod:`criticality.hopf_analysis.analysis` turns into results.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..algebra import Tower
from ..budget import hint, stage
from ..local.center_manifold import ReducedSystem, reduce_to_center_manifold
from ..local.critical import CriticalBranch, find_critical_branches
from ..local.eigenbasis import Eigenbasis, critical_eigenbasis
from ..algebra.canonical import factored
from ..errors import NoHopfPointError, ParameterError
from ..algebra.linalg import characteristic_polynomial
from ..local.lyapunov import complex_normal_form
from ..local.normal_form import complexify, planar_normal_form, unit_coefficients
from ..local.projection import projection_c1
from ..algebra.signs import NEGATIVE, NONPOSITIVE, ZERO
from ..local.prepare import PreparedProblem
from ..local.taylor import TaylorForms

__all__ = ["BranchComputation", "EngineOutput", "run_engine"]


@dataclass(frozen=True)
class BranchComputation:
    """Everything computed on one branch (field elements)."""

    branch: CriticalBranch
    taylor: TaylorForms
    eigenbasis: Eigenbasis
    reduced: ReducedSystem
    c_center: tuple      # c_k, unit normalisation, center-manifold route
    c1_projection: object  # c_1, unit normalisation, projection route
    c_complex: tuple = ()  # c_k, unit normalisation, normalization method (order >= 5)

    @property
    def routes_agree(self) -> bool:
        # every c_k is the same exact element on both series routes (criticality.local.lyapunov)
        return self.c_center[0] == self.c1_projection and all(
            a == b for a, b in zip(self.c_center, self.c_complex))


@dataclass(frozen=True)
class EngineOutput:
    tower_mu: Tower
    chi: list
    jacobian_mu: list
    branches: tuple
    notes: tuple
    degenerate: tuple
    branch_count: int = 1


def run_engine(problem: PreparedProblem, select: int | None = None) -> EngineOutput:
    """Run the pipeline on every closed-form branch of the critical set, or
    only on branch ``select`` of the ordered list (branches that need no new
    square root come first)."""
    order = max(3, problem.order)
    tower = problem.tower
    taylor_mu = problem.taylor
    K = tower.top
    A_mu = taylor_mu.jacobian()
    stage("computing the characteristic polynomial")
    chi = characteristic_polynomial(K, A_mu)
    ctx = problem.context()
    stage(f"solving for the critical set in '{problem.mu}'")
    critical_set = find_critical_branches(
        tower, problem.mu, chi, describe=lambda s: f"'{s}'",
        accept=lambda b: _may_be_positive(b, ctx),
        want=None if select is None else select + 1,
        admissible=lambda b: _in_range(b, ctx, problem.assumptions.get(problem.mu)),
        on_sheet=lambda b: all(_may_be_positive_element(b.tower, r, ctx) for _, r in b.sheets))
    branches, notes = critical_set.branches, list(critical_set.notes)
    if select is not None:
        if not 0 <= select < len(branches):
            raise ParameterError(f"branch {select} does not exist: the critical set has "
                                 f"{len(branches)} closed-form branch(es) (0 to "
                                 f"{len(branches) - 1})")
        todo = [branches[select]]
    else:
        todo = list(branches)
    computed = []
    for b in todo:
        if len(b.tower.levels) > len(tower.levels):
            hint(f"the critical value of '{problem.mu}' needs a square root, which makes "
                 "every later step work with pairs over a larger field" +
                 _linear_hint(critical_set.linear_in))
        try:
            bc = _compute_branch(tower, taylor_mu, b, problem, order)
        except ZeroDivisionError:
            notes.append(f"at the critical value {b.tower.to_sympy(b.value)} a Taylor "
                         "coefficient is undefined (a denominator vanishes); branch skipped")
            continue
        if bc is None:
            notes.append("a branch of the critical set has <q, q> = 0, which means omega^2 <= 0 "
                         "there (a real pair +-kappa, not a Hopf pair); it was dropped")
        else:
            computed.append(bc)
    if not computed:
        raise NoHopfPointError(
            "on every branch of the critical set omega^2 <= 0: where two eigenvalues sum to "
            "zero they are a real pair +-kappa (a neutral saddle), not a pair crossing the "
            "imaginary axis", reason="omega_squared_nonpositive")
    return EngineOutput(tower, chi, A_mu, tuple(computed), tuple(notes),
                        critical_set.degenerate, len(branches) + critical_set.unexamined)


def _linear_hint(names) -> str:
    """A clause for the budget's message: the parameters in which the
    critical set is linear (from the typed critical set)."""
    if not names:
        return ""
    return f"; it is linear in {', '.join(map(repr, names))}, which would avoid the root"


def _may_be_positive(branch, ctx) -> bool:
    return _may_be_positive_element(branch.tower, branch.W, ctx)


def _may_be_positive_element(tower, x, ctx) -> bool:
    sign = factored(tower, x, ctx, restore=False).sign
    return sign not in (NEGATIVE, NONPOSITIVE, ZERO)


def _in_range(branch, ctx, assumption) -> bool:
    """False where the critical value provably violates the parameter's
    declared sign."""
    if assumption not in ("positive", "nonnegative", "negative"):
        return True
    value = -branch.value if assumption == "negative" else branch.value
    sign = factored(branch.tower, value, ctx, restore=False).sign
    bad = (NEGATIVE, NONPOSITIVE, ZERO) if assumption != "nonnegative" else (NEGATIVE,)
    return sign not in bad


def _compute_branch(tower, taylor_mu, branch, problem, order) -> BranchComputation | None:
    target = branch.tower
    mu, value, images = problem.mu, branch.value, branch.images
    K = target.top
    stage("substituting the critical value into the Taylor coefficients")
    taylor = taylor_mu.map(lambda c: tower.substitute(c, mu, value, target, images), K)
    N = branch.nu_field
    stage("computing the critical eigenvectors")
    eb = critical_eigenbasis(K, taylor.jacobian(), branch.W, N)
    if not eb.qq:  # |Av|^2 + W |v|^2 = 0 forces W <= 0: not an imaginary pair
        return None
    stage("evaluating the projection formula for c1")
    c1_proj = projection_c1(taylor, eb) / eb.qq
    stage(f"reducing to the center manifold (order {order})")
    reduced = reduce_to_center_manifold(taylor, eb, order)
    stage(f"computing the planar normal form (order {order})")
    G = complexify(reduced, N, order)
    c_center = tuple(unit_coefficients(planar_normal_form(G, N, order), eb.qq))
    stage(f"computing the n-dimensional normal form (order {order})")
    c_complex = complex_normal_form(taylor, eb, order) if order >= 5 else ()
    return BranchComputation(branch, taylor, eb, reduced, c_center, c1_proj, c_complex)
