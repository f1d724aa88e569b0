"""A zero eigenvalue: fold (saddle-node), transcritical and pitchfork points.

Pipeline place: model -> equilibrium -> Taylor forms -> **det A = 0** ->
one-dimensional center manifold -> normal form -> :class:`FoldResult`.

Conventions.  At the critical point ``A q = 0``, ``A^T p = 0``, ``<p, q> = 1``
(all real).  On the center manifold ``x - x0 = y q + (1/2) y^2 h2 + ...``
with ``<p, h2> = 0`` the restricted equation reads

    y' = t (mu - mu_c) + lambda' (mu - mu_c) y + a y^2 + d y^3 + ...,
    a = (1/2) <p, B(q, q)>,           t = <p, f_mu(x0, mu_c)>,
    d = (1/6) <p, C(q, q, q) + 3 B(q, h2)>,   A h2 = 2 a q - B(q, q),

and ``lambda' = <p, (dA/dmu) q>`` is the speed of the zero eigenvalue along
a branch of equilibria that is smooth in ``mu`` (Kuznetsov, Elements of
Applied Bifurcation Theory, 3rd ed., 2004, Section 3.2 for the one-dimensional
normal forms and Chapter 5 for the projection onto ``q``, from memory).
Rescaling ``q -> s q`` (``p -> p/s``) multiplies ``a`` by ``s``, ``t`` by
``1/s`` and ``d`` by ``s^2``: the invariant statements are the sign of
``a t`` and the sign of ``d``, which is what the verdicts use.

Which case applies:

* **fold**: the family is parametrised so that ``mu`` is not the unknown of
  ``det A = 0`` (typically ``eliminate=[mu, ...]``, the equilibrium
  coordinate solved for); ``a != 0`` and ``t != 0``.  Two equilibria exist on
  the side where ``a t (mu - mu_c) < 0`` and collide at ``mu_c``.
* **transcritical**: ``det A = 0`` is solved for ``mu`` on an equilibrium
  branch given in closed form for all ``mu`` (e.g. the trivial branch
  ``f(0, mu) = 0``); then ``t = 0`` necessarily and ``a != 0``.
* **pitchfork**: as transcritical but ``a = 0`` (a symmetry ``u -> -u`` of
  the shifted field makes this generic); ``d < 0`` supercritical (stable
  side branches where the trivial branch is unstable), ``d > 0`` subcritical.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import TYPE_CHECKING, Any, ClassVar, Mapping, Sequence

import sympy

from ..kinds import FoldKind, Sign, coerce
from ..local.prepare import EquilibriumSpec, expr, prepare, sign_word, solve_for, unknown_symbol
from ..model.expressions import format_expression
from ..model.parameter import critical_symbol
from ..renderers import Rendered, render
from ..algebra.linalg import determinant, dot, kernel, matvec, solve, transpose
from ..errors import ClosedFormUnavailableError, DegenerateBifurcationError, NoHopfPointError
from ..local.boundary import guarded
from ..local.options import check_branch, pick_branch

if TYPE_CHECKING:
    from ..model.core import Model

__all__ = ["FoldResult", "fold", "fold_all", "FOLD_CONVENTIONS", "MAP_FOLD_CONVENTIONS"]


FOLD_CONVENTIONS = (
    "A q = 0, A^T p = 0, <p, q> = 1 (real vectors); x - x0 = y q + O(y^2) on the center manifold",
    "y' = t (mu - mu_c) + lambda' (mu - mu_c) y + a y^2 + d y^3 with a = <p, B(q, q)>/2, "
    "t = <p, f_mu>, d = <p, C(q, q, q) + 3 B(q, h2)>/6",
    "q -> s q scales a by s, t by 1/s, d by s^2: the signs of a t and of d are invariant",
)


MAP_FOLD_CONVENTIONS = (
    "map x -> F(x): a multiplier +1 of A = DF(x0); the fixed points of F are the equilibria "
    "of x' = F(x) - x, whose zero eigenvalue this analysis treats",
    "A q = q, A^T p = p, <p, q> = 1 (real vectors); restricted map y -> y + t (mu - mu_c) + "
    "lambda' (mu - mu_c) y + a y^2 + d y^3 with the formulas of the fold of flows "
    "(F(x) - x has the same quadratic and cubic forms as F)",
    "q -> s q scales a by s, t by 1/s, d by s^2: the signs of a t and of d are invariant",
)
_MAP_NOTE = ("discrete-time map x -> F(x): the critical multiplier is +1; 'eigenvalue speed' is "
             "the speed of that multiplier, and the fixed points collide or exchange stability "
             "as for the equilibria of a flow")


@dataclass(frozen=True)
class FoldResult(Rendered):
    """A point with a simple zero eigenvalue and its normal form."""

    result_kind: ClassVar[str] = "fold"

    kind: FoldKind
    parameter: str
    unknown: str
    critical_values: dict
    equilibrium: dict
    q: tuple
    p: tuple
    a: sympy.Expr
    transversality: sympy.Expr
    eigenvalue_speed: object
    cubic: sympy.Expr
    normal_form: sympy.Expr
    verdict: str
    notes: tuple = ()
    conventions: tuple = FOLD_CONVENTIONS
    signs: dict = field(default_factory=dict)

    def __post_init__(self) -> None:
        coerce(self, kind=FoldKind)

    def rows(self) -> list[tuple[str, str, object]]:
        return [("kind", "kind", self.kind), ("parameter", "parameter", self.parameter),
                ("critical_values", "critical values", self.critical_values),
                ("equilibrium", "equilibrium", self.equilibrium),
                ("q", "right null vector q", self.q), ("p", "left null vector p", self.p),
                ("a", "quadratic coefficient a", self.a),
                ("transversality", "transversality t = <p, f_mu>", self.transversality),
                ("eigenvalue_speed", "eigenvalue speed lambda'", self.eigenvalue_speed),
                ("cubic", "cubic coefficient d", self.cubic),
                ("normal_form", "normal form y'", self.normal_form),
                ("verdict", "verdict", self.verdict)]


def _f_mu(model, choice, mu):
    """``d f / d mu`` at fixed state, at the equilibrium (sympy)."""
    states = dict(zip(model.state_symbols, choice.point))
    out = []
    for e in model.equations:
        d = sympy.diff(e, mu).xreplace(states).xreplace(choice.substitutions)
        out.append(d.xreplace(choice.substitutions))
    return out


def _null_vectors(K, A):
    right, left = kernel(K, A), kernel(K, transpose(A))
    if len(right) != 1:
        raise DegenerateBifurcationError(
            f"the Jacobian has a {len(right)}-dimensional kernel at this point; a simple zero "
            "eigenvalue was expected", reason="double_zero")
    q, p = right[0], left[0]
    s = dot(K, p, q)
    if not s:
        raise DegenerateBifurcationError(
            "the zero eigenvalue is not simple (<p, q> = 0: a Jordan block, as at a "
            "Bogdanov-Takens point); use bogdanov_takens()", reason="double_zero")
    return q, [x / s for x in p]


def _cubic(K, A, taylor, q, p, a):
    """``d`` and ``h2`` from the bordered system ``[[A, q], [p^T, 0]]``."""
    n = len(A)
    Bqq = taylor.form(2, q, q)
    M = [list(A[i]) + [q[i]] for i in range(n)] + [list(p) + [K.zero]]
    rhs = [[2 * a * q[i] - Bqq[i]] for i in range(n)] + [[K.zero]]
    h2 = [row[0] for row in solve(K, M, rhs)[:n]]
    Cqqq = taylor.form(3, q, q, q)
    Bqh = taylor.form(2, q, h2)
    return dot(K, p, [c + 3 * b for c, b in zip(Cqqq, Bqh)]) / 6


def _is_odd(taylor) -> bool:
    return all(not taylor.degree_part(i, k) for i in range(taylor.n)
               for k in range(2, taylor.order + 1, 2))


def _classify(kind_hint, a_s: Sign, t_s: Sign, d_s: Sign) -> FoldKind:
    if kind_hint == "branch":
        if a_s != Sign.ZERO:
            return FoldKind.TRANSCRITICAL
        return FoldKind.PITCHFORK if d_s != Sign.ZERO else FoldKind.DEGENERATE
    if a_s != Sign.ZERO and t_s != Sign.ZERO:
        return FoldKind.FOLD
    return FoldKind.DEGENERATE


def _verdict(kind, signs, unknown_value_name) -> str:
    mu = unknown_value_name
    if kind == "fold":
        at = signs["at"]
        side = {"positive": "below", "negative": "above"}.get(at)
        where = (f"two equilibria exist for {mu} {'<' if side == 'below' else '>'} the critical "
                 "value and collide there" if side else
                 f"two equilibria exist where a t ({mu} - {mu}_c) < 0 (sign of a t undecided)")
        return f"fold (saddle-node): {where}"
    if kind == "transcritical":
        return "transcritical: the branches exchange stability at the critical value"
    if kind == "pitchfork":
        d = signs["d"]
        word = {"negative": "supercritical (the side branches are stable)",
                "positive": "subcritical (the side branches are unstable)"}.get(
            d, "super- or subcritical according to the sign of d")
        return f"pitchfork, {word}"
    return "degenerate: a higher-order analysis is needed"


def _analyse(prep, sp, unknown, mu):
    target = sp.target
    K = target.top
    ctx = prep.context(target)
    taylor = prep.taylor.map(sp.substitute, K)
    A = taylor.jacobian()
    q, p = _null_vectors(K, A)
    a = dot(K, p, taylor.form(2, q, q)) / 2
    t = dot(K, p, [sp.substitute(x) for x in prep.extra])
    speed = None
    if unknown == mu:
        dA = [[sp.substitute(prep.tower.derivative(x, mu)) if x else K.zero for x in row]
              for row in prep.taylor.jacobian()]
        speed = dot(K, p, matvec(K, dA, q))
    d = _cubic(K, A, taylor, q, p, a) if taylor.order >= 3 else K.zero
    signs = {"a": sign_word(target, a, ctx), "t": sign_word(target, t, ctx),
             "d": sign_word(target, d, ctx), "at": sign_word(target, a * t, ctx)}
    kind = _classify("branch" if unknown == mu else "fold", signs["a"], signs["t"], signs["d"])
    return taylor, q, p, a, t, speed, d, signs, kind, ctx


def _result(prep, sp, unknown):
    mu = prep.mu
    taylor, q, p, a, t, speed, d, signs, kind, ctx = _analyse(prep, sp, unknown, mu)
    target = sp.target
    E = lambda x: expr(target, x, ctx)  # noqa: E731
    values = {unknown.name: E(sp.value)}
    if unknown != mu:
        sub = prep.choice.substitutions.get(mu)
        values[prep.parameter] = E(sp.substitute(prep.tower.convert(sub))) if sub is not None \
            else mu
    point = {s: E(sp.substitute(prep.tower.convert(v)))
             for s, v in zip(prep.model.states, prep.choice.point)}
    y = sympy.Symbol("y")
    dmu = mu - critical_symbol(mu)
    nf = E(t) * dmu + (E(speed) * dmu * y if speed is not None else 0) + E(a) * y ** 2
    if kind == "pitchfork":
        nf += E(d) * y ** 3
    notes = []
    if _is_odd(taylor):
        notes.append("the shifted field is odd (a symmetry u -> -u), which makes the pitchfork "
                     "generic")
    return FoldResult(kind, prep.parameter, unknown.name, values, point,
                      tuple(E(x) for x in q), tuple(E(x) for x in p), E(a), E(t),
                      E(speed) if speed is not None else None, E(d), nf,
                      _verdict(kind, signs, prep.parameter), tuple(notes), FOLD_CONVENTIONS,
                      signs)


@guarded("the fold analysis")
def fold_all(model: Model, parameter: str, *, solve_for_name: str | None = None,
             equilibrium: EquilibriumSpec = None, eliminate: Sequence[str] | None = None,
             values: Mapping[str, object] | None = None, assume: Mapping[str, str] | None = None,
             backend: str = "flint") -> tuple:
    """Every closed-form point of ``det A = 0`` (see :func:`fold`)."""
    if getattr(model, "kind", "flow") == "map":
        results = fold_all(model.fixed_point_flow(), parameter, solve_for_name=solve_for_name,
                           equilibrium=equilibrium, eliminate=eliminate, values=values,
                           assume=assume, backend=backend)
        return tuple(replace(r, notes=(_MAP_NOTE,) + r.notes, conventions=MAP_FOLD_CONVENTIONS)
                     for r in results)
    prep = prepare(model, parameter, equilibrium=equilibrium, eliminate=eliminate,
                   values=values, assume=assume, order=3, backend=backend,
                   extra=lambda m, c: _f_mu(m, c, m.symbols[parameter or m.bifurcation_parameter]))
    unknown = unknown_symbol(prep, solve_for_name)
    det = determinant(prep.tower.top, prep.taylor.jacobian())
    points, unsolved = solve_for(prep.tower, det, unknown)
    found: list = []
    for sp in points:
        try:
            found.append(_result(prep, sp, unknown))
        except DegenerateBifurcationError:
            continue
    left = ", ".join(format_expression(u) for u in unsolved)
    if not found:
        if unsolved:
            raise ClosedFormUnavailableError(
                f"det A = 0 has no closed-form solution for '{unknown}': it vanishes where "
                f"{left} = 0, which is not solved in closed form (a factor of degree above "
                "two, or one transcendental in the parameter); fix the other parameters and "
                "solve that equation numerically, or choose another parameter")
        raise NoHopfPointError(f"no point with a simple zero eigenvalue was found by solving "
                               f"det A = 0 for '{unknown}'", reason="empty_critical_set")
    if unsolved:
        note = (f"det A = 0 also where {left} = 0, which has no closed form for "
                f"'{unknown}'; the points listed are the closed-form ones only")
        found = [replace(r, notes=r.notes + (note,)) for r in found]
    return tuple(found)


@guarded("the fold analysis")
def fold(model: Model, parameter: str, *, solve_for: str | None = None,
         equilibrium: EquilibriumSpec = None, eliminate: Sequence[str] | None = None,
         values: Mapping[str, object] | None = None, assume: Mapping[str, str] | None = None,
         backend: str = "flint", branch: int | None = 0) -> FoldResult:
    """Zero-eigenvalue analysis of ``model`` in ``parameter``.

    Parameters
    ----------
    model : Model
    parameter : str
        The bifurcation parameter ``mu``.
    solve_for : str, optional
        The symbol solved from ``det A = 0``: default ``parameter`` if it is
        still free, else the first free equilibrium coordinate (``x_eq``)
        of a family parametrised by the equilibrium (``eliminate=[...]``,
        which may include ``parameter`` itself: the usual way to reach a
        fold, where the equilibrium is not a function of ``mu``).
    equilibrium, eliminate, values, assume, backend
        As for :func:`criticality.hopf`.
    branch : int
        Which solution of ``det A = 0`` to return.

    Returns
    -------
    FoldResult

    Examples
    --------
    >>> from criticality import Model
    >>> m = Model(["x"], {"x": "mu - x^2"}, parameters={"mu": "real"})
    >>> r = fold(m, "mu", eliminate=["mu"])
    >>> r.kind, r.critical_values, r.a, r.transversality
    ('fold', {'x_eq': 0, 'mu': 0}, -1, 1)
    """
    branch = check_branch(branch)
    results = fold_all(model, parameter, solve_for_name=solve_for, equilibrium=equilibrium,
                       eliminate=eliminate, values=values, assume=assume, backend=backend)
    return pick_branch(results, branch)
