"""Fold-Hopf (zero-Hopf) points: a simple zero eigenvalue and a pair +-i omega.

Pipeline place: model -> equilibrium -> Taylor forms -> **two conditions in two
symbols** -> eigenvectors -> quadratic normal-form coefficients ->
:class:`FoldHopfResult`.

Location: with ``chi(lambda) = lambda^n + a_1 lambda^(n-1) + ... + a_n`` the
point needs ``a_n = 0`` (a zero eigenvalue) and a pair of roots of
``chi(lambda)/lambda`` summing to zero (its Hurwitz determinant, as for Hopf
points), solved in closed form for the two chosen symbols; or ``point=`` gives
their values.  ``omega^2`` is the common root of the even and odd parts of
``chi/lambda``; ``omega^2 <= 0`` (a real pair) is rejected.

Convention (Kuznetsov, Elements of Applied Bifurcation Theory, 3rd ed., 2004,
Section 8.5, from memory; re-derived and tested on the truncated normal form):
``A q0 = 0``, ``A^T p0 = 0``, ``<p0, q0> = 1`` (real), ``A q1 = i omega q1``,
``A^T p1 = -i omega p1``, ``<p1, q1> = 1``, ``<q1, q1> = 1``; with
``x - x0 = u q0 + z q1 + conj(z q1) + O(2)`` the restricted field reads

    u' = (1/2) G200 u^2 + G011 |z|^2 + O(3),
    z' = i omega z + G110 u z + O(3),
    G200 = <p0, B(q0, q0)>,  G011 = <p0, B(q1, conj q1)>,  G110 = <p1, B(q0, q1)>.

Rescaling ``q0 -> a q0`` and ``q1 -> b q1`` multiplies ``G200`` by ``a``,
``G011`` by ``|b|^2 / a`` and leaves ``G110`` alone, so the invariants are

    s = sign(G200 G011),   theta = Re G110 / G200,

the ``s`` and ``theta`` of the amplitude equations
``xi' = beta1 + xi^2 + s r^2``, ``r' = r (beta2 + theta xi + ...)``
(Guckenheimer and Holmes, Nonlinear Oscillations, Dynamical Systems, and
Bifurcations of Vector Fields, 1983, Section 7.4, write ``b = -s``, ``a = -theta``).
Their nontrivial equilibrium (a cycle of the full system) has determinant
``-2 s theta r^2``: for ``s theta > 0`` it is a saddle (no torus), for
``s theta < 0`` it can undergo a Hopf bifurcation, i.e. a torus bifurcation
of the cycle, whose direction is decided by third-order terms (the truncated
amplitude system is integrable there).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, ClassVar, Mapping, Sequence

from dataclasses import dataclass

import sympy

from ..local.boundary import guarded
from ..algebra import upoly
from ..algebra.linalg import dot
from ..algebra.quadratic import lower
from ..errors import DegenerateBifurcationError, NoHopfPointError, ParameterError
from ..kinds import PointStatus, Sign, coerce
from ..local.options import (check_branch, check_name, check_second, check_values,
                             pick_branch)
from ..local.critical import nu_extension, pair_sum_condition
from ..local.eigenbasis import critical_eigenbasis
from ..algebra.linalg import characteristic_polynomial
from ..local.prepare import EquilibriumSpec, expr, prepare, sign_word, solve_for
from ..model.expressions import convert_sympy, parse_expression
from ..renderers import Rendered
from .bogdanov_takens import _solve_pair
from .fold import _null_vectors

if TYPE_CHECKING:
    from ..model.core import Model

__all__ = ["FoldHopfResult", "fold_hopf", "fold_hopf_all", "FOLD_HOPF_CONVENTIONS",
           "fold_hopf_scenario"]


FOLD_HOPF_CONVENTIONS = (
    "A q0 = 0, A^T p0 = 0, <p0, q0> = 1 (real); A q1 = i omega q1, A^T p1 = -i omega p1, "
    "<p1, q1> = 1, <q1, q1> = 1",
    "u' = G200 u^2/2 + G011 |z|^2, z' = i omega z + G110 u z (+ third order) with "
    "G200 = <p0, B(q0,q0)>, G011 = <p0, B(q1, conj q1)>, G110 = <p1, B(q0, q1)>",
    "invariants s = sign(G200 G011), theta = Re G110 / G200 (Kuznetsov 2004, Section 8.5); "
    "Guckenheimer-Holmes (1983, Section 7.4) write b = -s, a = -theta",
)


@dataclass(frozen=True)
class FoldHopfResult(Rendered):
    """A fold-Hopf point and its quadratic normal-form coefficients."""

    result_kind: ClassVar[str] = "fold_hopf"

    parameters: tuple
    values: dict
    equilibrium: dict
    omega: sympy.Expr
    q0: tuple
    p0: tuple
    q1: tuple
    G200: sympy.Expr
    G011: sympy.Expr
    G110: sympy.Expr
    s: object
    theta: sympy.Expr
    theta_sign: Sign
    status: PointStatus
    scenario: str
    conditions: tuple = ()
    notes: tuple = ()
    conventions: tuple = FOLD_HOPF_CONVENTIONS

    def __post_init__(self) -> None:
        coerce(self, theta_sign=Sign, status=PointStatus)

    def rows(self) -> list[tuple[str, str, object]]:
        return [("values", "fold-Hopf point", self.values),
                ("equilibrium", "equilibrium", self.equilibrium),
                ("omega", "frequency omega", self.omega),
                ("q0", "q0 (A q0 = 0)", self.q0), ("p0", "p0", self.p0),
                ("q1", "q1 (A q1 = i omega q1)", self.q1),
                ("G200", "G200", self.G200), ("G011", "G011 (<q1,q1> = 1)", self.G011),
                ("G110", "G110", self.G110), ("s", "s = sign(G200 G011)", self.s),
                ("theta", "theta = Re G110 / G200", self.theta),
                ("theta_sign", "sign of theta", self.theta_sign),
                ("status", "status", self.status), ("scenario", "scenario", self.scenario),
                ("conditions", "conditions", self.conditions)]


def fold_hopf_scenario(s: int | str, theta_sign: str) -> str:
    """The unfolding in words for ``s`` (+1, -1 or a word) and the sign of theta."""
    if s not in (1, -1) or theta_sign not in ("positive", "negative"):
        return ("s and the sign of theta are not both decided; the four cases are s theta > 0 "
                "(no torus) and s theta < 0 (a torus bifurcation of the cycle)")
    t = 1 if theta_sign == "positive" else -1
    if s * t > 0:
        what = ("s = 1, theta > 0" if s == 1 else "s = -1, theta < 0")
        return (f"{what}: near the point a fold curve and a Hopf curve of one of the two "
                "equilibria meet; the cycle born there is a saddle of the amplitude equations "
                "and no invariant torus appears (the simple cases)")
    if s == 1:
        return ("s = 1, theta < 0: the cycle born at the Hopf curve undergoes a torus "
                "(Neimark-Sacker) bifurcation; the amplitude equations have a heteroclinic "
                "connection of the two equilibria, whose breakup can give complicated, "
                "possibly chaotic dynamics; third-order terms decide the torus's stability")
    return ("s = -1, theta > 0: the cycle born at the Hopf curve undergoes a torus "
            "(Neimark-Sacker) bifurcation; third-order terms decide the torus's stability "
            "and the fate of the torus")


def _conditions(prep, u1, u2):
    """``(c0, c1)``: ``a_n`` and the pair condition of ``chi / lambda``."""
    K = prep.tower.top
    chi = characteristic_polynomial(K, prep.taylor.jacobian())
    c1 = pair_sum_condition(prep.tower, chi[1:])
    return chi[0], c1


def _unfolding(prep, u1, u2, c0, c1):
    """The Jacobian determinant of the two defining conditions in the two
    symbols (an element of the tower before substitution); nonzero at the
    point means the two symbols unfold it regularly."""
    d = lambda x, u: prep.tower.derivative(x, u) if x else x  # noqa: E731
    return d(c0, u1) * d(c1, u2) - d(c0, u2) * d(c1, u1)


def _located(prep, u1, u2, point, conditions=None):
    if point is None:
        c0, c1 = conditions if conditions is not None else _conditions(prep, u1, u2)
        return _solve_pair(prep, u1, u2, c0, c1)
    names = {str(k): v for k, v in (check_values(point, "point") or {}).items()}
    missing = [u.name for u in (u1, u2) if u.name not in names]
    if missing:
        raise NoHopfPointError(f"point= must give values for {u1.name} and {u2.name}; "
                               f"missing {', '.join(missing)}", reason="point_incomplete")
    t = prep.tower
    v1, v2 = (_constant_value(names[u.name], u.name) for u in (u1, u2))
    sols1, _ = solve_for(t, t.convert(u1 - v1), u1)
    t2 = sols1[0].target
    sols2, _ = solve_for(t2, t2.convert(u2 - v2), u2)
    return [(sols1[0], sols2[0])]


def _constant_value(raw, name):
    """An exact constant from text (through the whitelisted parser) or a number."""
    context = f"point value for '{name}'"
    if isinstance(raw, str):
        value = parse_expression(raw, {}, context=context)
    else:
        value = convert_sympy(raw, {}, context=context)
    if value.free_symbols:
        raise ParameterError(f"the {context} must be a constant number, not {value}")
    return value


def _pair_part(K, chi):
    """``W = omega^2`` from ``chi = lambda * phi``, with degenerate cases named."""
    if chi[0]:
        raise DegenerateBifurcationError("det A != 0 at this point: no zero eigenvalue",
                                         reason="no_zero_eigenvalue")
    phi = chi[1:]
    if not phi[0]:
        raise DegenerateBifurcationError("a further eigenvalue is zero (a double zero "
                                         "eigenvalue with a pair: codimension three)",
                                         reason="double_zero")
    E, O = upoly.even_odd_parts(phi)
    g = upoly.gcd(E, O)
    if len(g) < 2:
        raise DegenerateBifurcationError("no pair +-i omega at this point", reason="no_pair")
    if len(g) > 2:
        raise DegenerateBifurcationError("two pairs of eigenvalues sum to zero here (a zero "
                                         "eigenvalue with two pairs: codimension three)",
                                         reason="two_critical_pairs")
    return g[0]


def _point(prep, sp1, sp2, names, unfolding=None):
    target = sp2.target
    K = target.top
    sub = lambda x: sp2.substitute(sp1.substitute(x))  # noqa: E731
    taylor = prep.taylor.map(sub, K)
    A = taylor.jacobian()
    W = _pair_part(K, characteristic_polynomial(K, A))
    ctx = prep.context(target)
    if sign_word(target, W, ctx) in ("negative", "zero", "nonpositive"):
        raise DegenerateBifurcationError("the pair is real (omega^2 <= 0): a zero eigenvalue "
                                         "with a neutral saddle, not fold-Hopf",
                                         reason="omega_squared_nonpositive")
    N = nu_extension(target, W)
    eb = critical_eigenbasis(K, A, W, N)
    q0, p0 = _null_vectors(K, A)
    q1 = eb.q
    q1b = [x.conjugate() for x in q1]
    G200 = dot(K, p0, taylor.form(2, q0, q0))
    G011 = lower(N(dot(N, [N(x) for x in p0], taylor.form(2, q1, q1b))).a) / eb.qq
    G110 = N(dot(N, eb.pbar, taylor.form(2, [N(x) for x in q0], q1)))
    E = lambda x: expr(target, x, ctx)  # noqa: E731
    cplx = lambda x: E(lower(N(x).a)) + E(lower(N(x).b)) * N.root  # noqa: E731
    sign = sign_word(target, G200 * G011, ctx)
    s = {"positive": 1, "negative": -1}.get(sign, sign)
    theta = lower(G110.a) / G200 if G200 else None
    theta_sign = sign_word(target, theta, ctx) if theta is not None else Sign.UNDEFINED
    status = PointStatus.NONDEGENERATE
    for word, x in ((PointStatus.G200_VANISHES, G200), (PointStatus.G011_VANISHES, G011),
                    (PointStatus.THETA_VANISHES, lower(G110.a))):
        if sign_word(target, x, ctx) == Sign.ZERO:
            status = word
            break
    values = {sp1.symbol.name: E(sp2.substitute(sp1.value)), sp2.symbol.name: E(sp2.value)}
    for sym, v in prep.choice.substitutions.items():
        values[sym.name] = E(sub(prep.tower.convert(v)))
    point = {st: E(sub(prep.tower.convert(v))) for st, v in zip(prep.model.states,
                                                                 prep.choice.point)}
    checks = [("G200", G200), ("G011", G011), ("Re G110", lower(G110.a))]
    if unfolding is not None:
        checks.append((f"unfolding: the Jacobian of (a_n, pair condition) in ({names[0]}, "
                       f"{names[1]})", sub(unfolding)))
    conds = tuple(f"{d}: {sympy.sstr(E(x))} != 0 [{_nonzero(target, x, ctx)}]"
                  for d, x in checks)
    scenario = (fold_hopf_scenario(s, theta_sign) if status == PointStatus.NONDEGENERATE else
                f"degenerate fold-Hopf point ({status.replace('_', ' ')}): higher-order terms "
                "decide")
    return FoldHopfResult(names, values, point, sympy.sqrt(E(W)), tuple(map(E, q0)),
                          tuple(map(E, p0)), tuple(cplx(x) for x in q1), E(G200), E(G011),
                          cplx(G110), s, E(theta) if theta is not None else None, theta_sign,
                          status, scenario, conds,
                          ("third-order coefficients (the torus's direction for s theta < 0) "
                           "are not computed",))


def _nonzero(target, x, ctx):
    return {"zero": "fails", "positive": "holds", "negative": "holds"}.get(
        sign_word(target, x, ctx), "open")


def _names(parameters, second):
    """The two names of a codimension-two analysis, from ``(p1, p2)`` or
    ``p1, second=p2``: two different non-empty strings (ParameterError)."""
    if isinstance(parameters, (tuple, list)):
        if second is not None or len(parameters) != 2:
            raise ParameterError("give the two symbols as one pair (p1, p2), e.g. "
                                 f"('b1', 'b2'); got {parameters!r:.60}")
        p1, p2 = parameters
    elif second is None:
        raise ParameterError("give the two symbols as (p1, p2), or the first and "
                             "second=...")
    else:
        p1, p2 = parameters, second
    check_name(p1, "the first parameter")
    return p1, check_second(p1, p2)


@guarded("the fold-Hopf analysis")
def fold_hopf_all(model: Model, parameters: str | Sequence[str], second: str | None = None, *,
                  point: Mapping[str, object] | None = None, equilibrium: EquilibriumSpec = None,
                  eliminate: Sequence[str] | None = None,
                  values: Mapping[str, object] | None = None,
                  assume: Mapping[str, str] | None = None, backend: str = "flint") -> tuple:
    """Every closed-form fold-Hopf point (see :func:`fold_hopf`)."""
    p1, p2 = _names(parameters, second)
    model.require_kind("flow", "the fold-Hopf analysis")
    prep = prepare(model, p1, equilibrium=equilibrium, eliminate=eliminate, values=values,
                   assume=assume, order=2, backend=backend, keep=(p2,))
    u1, u2 = prep.symbol(p1), prep.symbol(p2)
    conditions = _conditions(prep, u1, u2)
    unfolding = _unfolding(prep, u1, u2, *conditions)
    return collect_points(_located(prep, u1, u2, point, conditions),
                          lambda sp1, sp2: _point(prep, sp1, sp2, (p1, p2), unfolding), point,
                          f"a zero eigenvalue and a pair +-i omega in '{p1}' and '{p2}'")


def collect_points(candidates: Any, build: Any, point: object, what: str) -> tuple:
    """The result built from every located candidate ``(sp1, sp2)``.  A
    degenerate candidate (or one that divides by zero) is set aside; with
    none left, the first such error is raised for a given ``point``, else
    NoHopfPointError saying that no closed-form point has ``what``."""
    out, errors = [], []
    for sp1, sp2 in candidates:
        try:
            out.append(build(sp1, sp2))
        except DegenerateBifurcationError as exc:
            errors.append(exc)
        except ZeroDivisionError:
            errors.append(DegenerateBifurcationError(
                "a candidate point makes a denominator of the model or of the equilibrium "
                "vanish", reason="undefined"))
    if out:
        return tuple(out)
    if point is not None and errors:
        raise errors[0]
    raise NoHopfPointError(f"no closed-form point with {what}"
                           + (f" ({errors[0]})" if errors else ""), reason="empty_critical_set")


@guarded("the fold-Hopf analysis")
def fold_hopf(model: Model, parameters: str | Sequence[str], second: str | None = None, *,
              point: Mapping[str, object] | None = None, equilibrium: EquilibriumSpec = None,
              eliminate: Sequence[str] | None = None, values: Mapping[str, object] | None = None,
              assume: Mapping[str, str] | None = None, backend: str = "flint",
              branch: int | None = 0) -> FoldHopfResult:
    """Fold-Hopf analysis in two symbols.

    Parameters
    ----------
    model : Model
    parameters : tuple of two str
        The two symbols (parameters, or free equilibrium coordinates such as
        ``"x_eq"`` with ``eliminate=[...]``); ``fold_hopf(model, "a", "b")`` is
        accepted too.
    point : mapping, optional
        Values of the two symbols at the point (skips the search).
    equilibrium, eliminate, values, assume, backend, branch
        As for :func:`criticality.bogdanov_takens`.

    Examples
    --------
    >>> from criticality import Model
    >>> m = Model(["u", "x", "y"], {"u": "b1*u + u^2 - 2*(x^2 + y^2)",
    ...                             "x": "b2*x - y + 3*u*x", "y": "x + b2*y + 3*u*y"})
    >>> r = fold_hopf(m, ("b1", "b2"), equilibrium={"u": 0, "x": 0, "y": 0})
    >>> r.s, r.theta, r.G200
    (-1, 3/2, 2)
    """
    branch = check_branch(branch)
    results = fold_hopf_all(model, parameters, second, point=point, equilibrium=equilibrium,
                            eliminate=eliminate, values=values, assume=assume, backend=backend)
    return pick_branch(results, branch)
