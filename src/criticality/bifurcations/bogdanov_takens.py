"""Bogdanov-Takens points: a double zero eigenvalue with a Jordan block.

Pipeline place: model -> equilibrium -> Taylor forms -> **double-zero
conditions in two parameters** -> generalised eigenvectors -> normal-form
coefficients -> :class:`BogdanovTakensResult`.

With ``chi(lambda) = lambda^n + a_1 lambda^(n-1) + ... + a_n`` the double
zero requires ``a_n = 0`` and ``a_(n-1) = 0`` (for n = 2: ``det A = 0`` and
``trace A = 0``).  They are solved in closed form for the two chosen symbols
(parameters, or free equilibrium coordinates of a family parametrised by
the equilibrium), one after the other.

At the point (Kuznetsov, Elements of Applied Bifurcation Theory, 3rd ed.,
2004, Section 8.4, from memory; the formulas are re-derived and tested on
the normal form itself):

    A q0 = 0,  A q1 = q0,  A^T p1 = 0,  A^T p0 = p1,
    <p0, q0> = <p1, q1> = 1,  <p1, q0> = <p0, q1> = 0,
    a = (1/2) <p1, B(q0, q0)>,   b = <p0, B(q0, q0)> + <p1, B(q0, q1)>,

so that on the center manifold, after a near-identity change,
``w0' = w1``, ``w1' = a w0^2 + b w0 w1 + O(|w|^3)``.  Rescaling
``q0 -> s q0`` multiplies both ``a`` and ``b`` by ``s``: ``a/b`` and the sign
of ``a b`` are the invariants.  The unfolding then has a fold curve, a Hopf
curve and a homoclinic (saddle-loop) curve meeting at the point; the cycle
born on the Hopf curve is stable (supercritical Hopf) when ``a b < 0`` and
unstable (subcritical) when ``a b > 0`` (checked against this package's Hopf
analysis of the unfolding ``x' = y, y' = b1 + b2 x + x^2 + s x y``).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any, ClassVar, Mapping, Sequence

import sympy

from ..local.prepare import EquilibriumSpec, expr, prepare, sign_word, solve_for
from ..renderers import Rendered, render
from ..algebra.linalg import dot, kernel, matvec, solve_consistent, transpose
from ..errors import DegenerateBifurcationError, NoHopfPointError
from ..kinds import Sign, coerce
from ..local.boundary import guarded
from ..local.options import check_branch, check_second, pick_branch
from ..algebra.linalg import characteristic_polynomial

if TYPE_CHECKING:
    from ..algebra.field import Element
    from ..model.core import Model

__all__ = ["BogdanovTakensResult", "bogdanov_takens", "bogdanov_takens_all", "BT_CONVENTIONS"]


BT_CONVENTIONS = (
    "A q0 = 0, A q1 = q0, A^T p1 = 0, A^T p0 = p1, <p0, q0> = <p1, q1> = 1, "
    "<p1, q0> = <p0, q1> = 0 (real vectors)",
    "on the center manifold w0' = w1, w1' = a w0^2 + b w0 w1 + ..., with "
    "a = <p1, B(q0, q0)>/2 and b = <p0, B(q0, q0)> + <p1, B(q0, q1)>",
    "q0 -> s q0 scales a and b by s: a/b and the sign of a b are invariant",
)


@dataclass(frozen=True)
class BogdanovTakensResult(Rendered):
    """A Bogdanov-Takens point and its normal-form coefficients."""

    result_kind: ClassVar[str] = "bogdanov_takens"

    parameters: tuple
    values: dict
    equilibrium: dict
    q0: tuple
    q1: tuple
    p0: tuple
    p1: tuple
    a: sympy.Expr
    b: sympy.Expr
    ab_sign: Sign
    scenario: str
    notes: tuple = ()
    conventions: tuple = BT_CONVENTIONS

    def __post_init__(self) -> None:
        coerce(self, ab_sign=Sign)

    def rows(self) -> list[tuple[str, str, object]]:
        return [("values", "double-zero point", self.values),
                ("equilibrium", "equilibrium", self.equilibrium),
                ("q0", "q0", self.q0), ("q1", "q1", self.q1), ("p0", "p0", self.p0),
                ("p1", "p1", self.p1), ("a", "a", self.a), ("b", "b", self.b),
                ("ab_sign", "sign of a b", self.ab_sign), ("scenario", "scenario", self.scenario)]


def _chain(K, M, top):
    """``x`` with ``M x = top`` and ``top . x = 0`` (unique for a Jordan chain)."""
    rows = [list(r) for r in M] + [list(top)]
    rhs = [[t] for t in top] + [[K.zero]]
    return [r[0] for r in solve_consistent(K, rows, rhs)]


def generalised_eigenvectors(K: Any, A: list[list[Element]]) -> tuple:
    """``(q0, q1, p0, p1)`` normalised as in the module docstring."""
    right, left = kernel(K, A), kernel(K, transpose(A))
    if len(right) != 1:
        raise DegenerateBifurcationError(f"the kernel of the Jacobian has dimension {len(right)}: the "
                                  "double zero eigenvalue is not a single Jordan block",
                                  reason="double_zero")
    q0, p1 = right[0], left[0]
    try:
        q1 = _chain(K, A, q0)
        p0 = _chain(K, transpose(A), p1)
    except Exception as exc:  # noqa: BLE001 - no chain: the zero eigenvalue is simple
        raise DegenerateBifurcationError("the zero eigenvalue is simple (no Jordan chain): a fold, not a "
                                  "Bogdanov-Takens point", reason="zero_eigenvalue") from exc
    s = dot(K, p1, q1)
    if not s:
        raise DegenerateBifurcationError("the zero eigenvalue has multiplicity above two (a triple zero)",
                                  reason="double_zero")
    p1 = [x / s for x in p1]
    p0 = [x / s for x in p0]
    tau = -dot(K, p0, q1)
    q1 = [a + tau * b for a, b in zip(q1, q0)]
    return q0, q1, p0, p1


def _scenario(sign) -> str:
    if sign == "negative":
        return ("a b < 0: the Hopf bifurcation emanating from the point is supercritical; the "
                "stable cycle it creates grows and disappears in a saddle homoclinic orbit")
    if sign == "positive":
        return ("a b > 0: the Hopf bifurcation emanating from the point is subcritical; the "
                "unstable cycle it creates disappears in a saddle homoclinic orbit")
    if sign == "zero":
        return "a b = 0: a degenerate Bogdanov-Takens point (higher-order terms decide)"
    return "the sign of a b is not decided under the assumptions; see the expressions"


def _solve_pair(prep, u1, u2, c0, c1):
    """Closed-form points of ``c0 = c1 = 0``: list of (first, second) solved points."""
    for eq_a, eq_b, first, second in ((c0, c1, u1, u2), (c0, c1, u2, u1),
                                      (c1, c0, u1, u2), (c1, c0, u2, u1)):
        found = []
        sols, _ = solve_for(prep.tower, eq_a, first)
        for sp1 in sols:
            rest = sp1.substitute(eq_b)
            if not rest:
                continue
            sols2, _ = solve_for(sp1.target, rest, second)
            found.extend((sp1, sp2) for sp2 in sols2)
        if found:
            return found
    return []


def _point(prep, sp1, sp2, names):
    K = sp2.target.top
    sub = lambda x: sp2.substitute(sp1.substitute(x))  # noqa: E731
    taylor = prep.taylor.map(sub, K)
    A = taylor.jacobian()
    chi = characteristic_polynomial(K, A)
    if chi[0] or chi[1]:
        raise DegenerateBifurcationError("internal: the double-zero conditions do not hold",
                                  reason="double_zero")
    if len(chi) > 3 and not chi[2]:
        raise DegenerateBifurcationError("a third eigenvalue is zero", reason="double_zero")
    q0, q1, p0, p1 = generalised_eigenvectors(K, A)
    Bq0q0 = taylor.form(2, q0, q0)
    a = dot(K, p1, Bq0q0) / 2
    b = dot(K, p0, Bq0q0) + dot(K, p1, taylor.form(2, q0, q1))
    target = sp2.target
    ctx = prep.context(target)
    E = lambda x: expr(target, x, ctx)  # noqa: E731
    v1 = sp2.substitute(sp1.value)
    values = {sp1.symbol.name: E(v1), sp2.symbol.name: E(sp2.value)}
    for s, v in prep.choice.substitutions.items():
        values[s.name] = E(sub(prep.tower.convert(v)))
    point = {s: E(sub(prep.tower.convert(v))) for s, v in zip(prep.model.states, prep.choice.point)}
    sign = sign_word(target, a * b, ctx)
    notes = []
    if not matvec(K, A, q1) == q0:
        notes.append("internal check failed: A q1 != q0")
    return BogdanovTakensResult(names, values, point, tuple(map(E, q0)), tuple(map(E, q1)),
                                tuple(map(E, p0)), tuple(map(E, p1)), E(a), E(b), sign,
                                _scenario(sign), tuple(notes))


@guarded("the Bogdanov-Takens analysis")
def bogdanov_takens_all(model: Model, parameter: str, second: str, *,
                        equilibrium: EquilibriumSpec = None,
                        eliminate: Sequence[str] | None = None,
                        values: Mapping[str, object] | None = None,
                        assume: Mapping[str, str] | None = None, backend: str = "flint") -> tuple:
    """Every closed-form Bogdanov-Takens point (see :func:`bogdanov_takens`)."""
    check_second(parameter or getattr(model, "bifurcation_parameter", None), second)
    prep = prepare(model, parameter, equilibrium=equilibrium, eliminate=eliminate,
                   values=values, assume=assume, order=2, backend=backend, keep=(second,))
    u1, u2 = prep.symbol(parameter), prep.symbol(second)
    chi = characteristic_polynomial(prep.tower.top, prep.taylor.jacobian())
    out = []
    for sp1, sp2 in _solve_pair(prep, u1, u2, chi[0], chi[1]):
        try:
            out.append(_point(prep, sp1, sp2, (parameter, second)))
        except DegenerateBifurcationError:
            continue
    if not out:
        raise NoHopfPointError(
            f"no closed-form point with a double zero eigenvalue (det A = 0 and the next "
            f"coefficient of the characteristic polynomial = 0) in '{parameter}' and "
            f"'{second}'", reason="empty_critical_set")
    return tuple(out)


@guarded("the Bogdanov-Takens analysis")
def bogdanov_takens(model: Model, parameter: str, second: str, *,
                    equilibrium: EquilibriumSpec = None, eliminate: Sequence[str] | None = None,
                    values: Mapping[str, object] | None = None,
                    assume: Mapping[str, str] | None = None, backend: str = "flint",
                    branch: int | None = 0) -> BogdanovTakensResult:
    """Bogdanov-Takens analysis in the two symbols ``parameter`` and ``second``.

    Both may be model parameters or, for a family parametrised by the
    equilibrium (``eliminate=[...]``), free equilibrium coordinates such as
    ``"x_eq"``.

    Examples
    --------
    >>> from criticality import Model
    >>> m = Model(["x", "y"], {"x": "y", "y": "b1 + b2*x + 2*x^2 - 3*x*y"})
    >>> r = bogdanov_takens(m, "b2", "x_eq", eliminate=["b1", "y"])
    >>> r.values, r.a, r.b, r.ab_sign
    ({'b2': 0, 'x_eq': 0, 'b1': 0}, 2, -3, 'negative')
    """
    branch = check_branch(branch)
    results = bogdanov_takens_all(model, parameter, second, equilibrium=equilibrium,
                                  eliminate=eliminate, values=values, assume=assume,
                                  backend=backend)
    return pick_branch(results, branch)
