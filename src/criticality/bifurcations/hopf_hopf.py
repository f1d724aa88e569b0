"""Hopf-Hopf (double Hopf) points: two pairs +-i omega1, +-i omega2.

Pipeline place: model -> equilibrium -> Taylor forms -> **two conditions in two
symbols** -> eigenvectors of both pairs -> third-order coefficients ->
:class:`HopfHopfResult`.

Location: with ``chi(l) = E(l^2) + l O(l^2)``, two pairs on the imaginary
axis mean that ``E`` and ``O`` share two roots ``s = -omega1^2, -omega2^2``:
the resultant (``psc_0``) and the first principal subresultant coefficient
(``psc_1``) of ``E`` and ``O`` vanish.  They are solved in closed form for the
two chosen symbols (or ``point=`` gives the values).  The common factor
``s^2 + g1 s + g0`` gives ``omega1^2 + omega2^2 = g1`` and
``omega1^2 omega2^2 = g0``; ``omega1 > omega2`` by convention.

Convention (Kuznetsov, Elements of Applied Bifurcation Theory, 3rd ed., 2004,
Section 8.6, from memory; re-derived and tested on the truncated normal form):
``A q_k = i omega_k q_k``, ``A^T p_k = -i omega_k p_k``, ``<p_k, q_k> = 1``,
``<q_k, q_k> = 1``; with ``x - x0 = sum_k (z_k q_k + conj(z_k q_k)) + O(2)``
the normal form reads

    z1' = i omega1 z1 + p11 z1 |z1|^2 + p12 z1 |z2|^2 + ...,
    z2' = i omega2 z2 + p21 z2 |z1|^2 + p22 z2 |z2|^2 + ...,

``p11``, ``p22`` the first Lyapunov coefficients' ``c1`` of each pair (the
projection formula), and

    p12 = <p1, C(q1, q2, conj q2) + B(q1, h0011) + B(q2, h1001) + B(conj q2, h1010)>,
    p21 = <p2, C(q1, conj q1, q2) + B(q2, h1100) + B(q1, h0110) + B(conj q1, h1010)>,
    h1010 = (i(omega1 + omega2) - A)^{-1} B(q1, q2),
    h1001 = (i(omega1 - omega2) - A)^{-1} B(q1, conj q2),  h0110 = conj(h1001),
    h1100 = -A^{-1} B(q1, conj q1),  h0011 = -A^{-1} B(q2, conj q2).

The amplitude equations ``r1' = r1 (mu1 + Re p11 r1^2 + Re p12 r2^2)``,
``r2' = r2 (mu2 + Re p21 r1^2 + Re p22 r2^2)`` have the invariants
``theta = Re p12 / Re p22`` and ``delta = Re p21 / Re p11`` (rescaling q1 and
q2 leaves them alone).  ``Re p11 Re p22 > 0`` is the simple case,
``< 0`` the difficult case.  All computations run in the real field
``K(omega2/omega1)`` and its extension by ``nu = i omega1``, with
``i omega2 = (omega2/omega1) nu``.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, ClassVar, Mapping, Sequence

from dataclasses import dataclass

import sympy

from ..local.boundary import guarded
from ..algebra import upoly
from ..algebra.linalg import SingularMatrixError, determinant, dot, solve_vector
from ..algebra.quadratic import QuadraticExtension, lower
from ..errors import DegenerateBifurcationError, DegenerateHopfError, NoHopfPointError
from ..kinds import HopfHopfCase, PointStatus, Sign, coerce
from ..local.options import check_branch, pick_branch
from ..local.eigenbasis import critical_eigenbasis
from ..algebra.linalg import characteristic_polynomial
from ..local.prepare import EquilibriumSpec, expr, prepare, sign_word
from ..local.projection import projection_c1
from ..renderers import Rendered
from .bogdanov_takens import _solve_pair
from .fold_hopf import _located, _names, collect_points
from .map_normal_form import solve_complex

if TYPE_CHECKING:
    from ..algebra.field import Element
    from ..model.core import Model

__all__ = ["HopfHopfResult", "hopf_hopf", "hopf_hopf_all", "HOPF_HOPF_CONVENTIONS",
           "hopf_hopf_scenario", "principal_subresultant"]


HOPF_HOPF_CONVENTIONS = (
    "A q_k = i omega_k q_k, A^T p_k = -i omega_k p_k, <p_k, q_k> = 1, <q_k, q_k> = 1, "
    "omega1 > omega2 > 0",
    "z1' = i omega1 z1 + p11 z1|z1|^2 + p12 z1|z2|^2, z2' = i omega2 z2 + p21 z2|z1|^2 + "
    "p22 z2|z2|^2 (Kuznetsov 2004, Section 8.6)",
    "theta = Re p12 / Re p22, delta = Re p21 / Re p11; Re p11 Re p22 > 0 simple case, < 0 "
    "difficult case",
)


@dataclass(frozen=True)
class HopfHopfResult(Rendered):
    """A Hopf-Hopf point and the coefficients of its amplitude equations."""

    result_kind: ClassVar[str] = "hopf_hopf"

    parameters: tuple
    values: dict
    equilibrium: dict
    omega1: sympy.Expr
    omega2: sympy.Expr
    p11: object
    p12: object
    p21: object
    p22: object
    theta: object
    delta: object
    case: HopfHopfCase
    resonance: str
    status: PointStatus
    scenario: str
    signs: dict
    notes: tuple = ()
    conventions: tuple = HOPF_HOPF_CONVENTIONS

    def __post_init__(self) -> None:
        coerce(self, case=HopfHopfCase, status=PointStatus)

    def rows(self) -> list[tuple[str, str, object]]:
        return [("values", "Hopf-Hopf point", self.values),
                ("equilibrium", "equilibrium", self.equilibrium),
                ("omega1", "omega1", self.omega1), ("omega2", "omega2", self.omega2),
                ("p11", "p11", self.p11), ("p12", "p12", self.p12), ("p21", "p21", self.p21),
                ("p22", "p22", self.p22), ("theta", "theta = Re p12 / Re p22", self.theta),
                ("delta", "delta = Re p21 / Re p11", self.delta), ("case", "case", self.case),
                ("resonance", "resonance omega1 : omega2", self.resonance),
                ("status", "status", self.status), ("scenario", "scenario", self.scenario),
                ("signs", "signs", self.signs)]


# -- location -------------------------------------------------------------------------


def principal_subresultant(K: Any, f: Sequence[Element], g: Sequence[Element], j: int) -> Element:
    """``psc_j(f, g)`` (lowest coefficient first): the determinant of the
    Sylvester submatrix; ``psc_0`` is the resultant."""
    m, k = len(f) - 1, len(g) - 1
    size = m + k - 2 * j
    if size <= 0:
        return K.one
    width = m + k - j

    def row(p, shift):
        hi = list(reversed(p))  # highest first
        r = [K.zero] * shift + hi
        return (r + [K.zero] * (width - len(r)))[:size]

    rows = [row(f, i) for i in range(k - j)] + [row(g, i) for i in range(m - j)]
    return determinant(K, rows)


def _conditions(prep):
    K = prep.tower.top
    chi = characteristic_polynomial(K, prep.taylor.jacobian())
    E, O = upoly.even_odd_parts(chi)
    if not O:
        raise NoHopfPointError("the characteristic polynomial is even for every parameter value "
                               "(a conservative linear part); no crossing",
                               reason="empty_critical_set")
    return principal_subresultant(K, E, O, 0), principal_subresultant(K, E, O, 1)


# -- the point ---------------------------------------------------------------------------


_RESONANCES = ((1, "1:1"), (4, "1:2"), (9, "1:3"), (16, "1:4"))


def _frequencies(prep, target, chi, ctx):
    K = target.top
    E, O = upoly.even_odd_parts(chi)
    g = upoly.gcd(E, O)
    if len(g) != 3:
        raise DegenerateBifurcationError(
            f"{max(len(g) - 1, 0)} pair(s) of eigenvalues on the imaginary axis here, not two",
            reason="not_two_pairs")
    g0, g1 = g[0], g[1]
    disc = g1 * g1 - 4 * g0
    if sign_word(target, disc, ctx) == "zero":
        raise DegenerateBifurcationError("the two pairs coincide (omega1 = omega2: the 1:1 "
                                         "resonance)", reason="resonance_1_1")
    root = target.sqrt(disc)
    W1, W2 = (g1 + root) / 2, (g1 - root) / 2
    for W in (W1, W2):
        if sign_word(target, W, ctx) in ("negative", "zero", "nonpositive"):
            raise DegenerateBifurcationError("a pair is real or zero (omega^2 <= 0): not two "
                                             "pairs on the imaginary axis",
                                             reason="omega_squared_nonpositive")
    ratio = target.sqrt(W2 / W1)
    return W1, W2, ratio, K


def _lift_pair(N, x, ratio):
    """``a + b nu2`` (nu2 = i omega2) as an element of ``N = K(nu)``, nu = i omega1."""
    a, b = x.ext.components(x)
    return N.element(a, b * ratio)


def _nsum(N, xs):
    acc = N.zero
    for x in xs:
        acc = acc + x
    return acc


def _cross(K, N, A, taylor, q1, q2, pb1, pb2, ratio):
    """``(p12, p21)`` for the vectors given (not normalised)."""
    c1, c2 = [x.conjugate() for x in q1], [x.conjugate() for x in q2]
    nu = N.gen
    nu2 = nu * ratio
    real = lambda v: [lower(N(x).a) for x in v]  # noqa: E731
    try:
        h0011 = [-x for x in solve_vector(K, A, real(taylor.form(2, q2, c2)))]
        h1100 = [-x for x in solve_vector(K, A, real(taylor.form(2, q1, c1)))]
        h1010 = solve_complex(K, N, A, nu + nu2, [N(x) for x in taylor.form(2, q1, q2)])
        h1001 = solve_complex(K, N, A, nu - nu2, [N(x) for x in taylor.form(2, q1, c2)])
    except SingularMatrixError as exc:
        raise DegenerateBifurcationError("a combination omega1 +- omega2 or zero is an "
                                         "eigenvalue frequency (a resonance or a zero "
                                         "eigenvalue)", reason="resonance") from exc
    h0110 = [x.conjugate() for x in h1001]
    lift = lambda v: [N(x) for x in v]  # noqa: E731
    t12 = [_nsum(N, parts) for parts in zip(
        lift(taylor.form(3, q1, q2, c2)), lift(taylor.form(2, q1, lift(h0011))),
        lift(taylor.form(2, q2, h1001)), lift(taylor.form(2, c2, h1010)))]
    t21 = [_nsum(N, parts) for parts in zip(
        lift(taylor.form(3, q1, c1, q2)), lift(taylor.form(2, q2, lift(h1100))),
        lift(taylor.form(2, q1, h0110)), lift(taylor.form(2, c1, h1010)))]
    return dot(N, pb1, t12), dot(N, pb2, t21)


def _resonance(target, W1, W2, ctx):
    for k, name in _RESONANCES:
        if sign_word(target, W1 - k * W2, ctx) == "zero":
            return name
    return "none"


def _coefficients(prep, target, sub, W1, W2, ratio, K):
    taylor = prep.taylor.map(lambda c: K(sub(c)), K)
    A = taylor.jacobian()
    # the printed generators I*sqrt(W) are formed only if an output needs them
    N = QuadraticExtension(K, -W1, "nu", root=lambda: sympy.I * sympy.sqrt(target.to_sympy(W1)))
    N2 = QuadraticExtension(K, -W2, "nu2",
                            root=lambda: sympy.I * sympy.sqrt(target.to_sympy(W2)))
    eb1 = critical_eigenbasis(K, A, W1, N)
    eb2 = critical_eigenbasis(K, A, W2, N2)
    p11 = N(projection_c1(taylor, eb1)) / eb1.qq
    p22 = N2(projection_c1(taylor, eb2)) / eb2.qq
    q2 = [_lift_pair(N, N2(x), ratio) for x in eb2.q]
    pb2 = [_lift_pair(N, N2(x), ratio) for x in eb2.pbar]
    p12, p21 = _cross(K, N, A, taylor, eb1.q, q2, eb1.pbar, pb2, ratio)
    return N, N2, p11, p12 / eb2.qq, p21 / eb1.qq, p22


def hopf_hopf_scenario(case: str, signs: dict) -> str:
    """The unfolding in words from the case and the signs of theta, delta, theta delta - 1."""
    t, d, td = signs.get("theta"), signs.get("delta"), signs.get("theta_delta_minus_1")
    if case == "simple":
        side = signs.get("p11")
        attract = "stable" if side == "negative" else "unstable (reverse time for stability)"
        if td == "negative":
            mixed = (f"theta delta < 1: in a wedge between two torus-bifurcation curves a "
                     f"{attract} invariant two-torus (both frequencies, the mixed mode) exists")
        elif td == "positive":
            mixed = ("theta delta > 1: the mixed-mode torus is a saddle; in the wedge both "
                     "single-frequency cycles coexist (bistability) and the torus separates them")
        else:
            mixed = "the sign of theta delta - 1 is not decided"
        sub = _simple_subcase(t, d, td)
        return (f"simple case (Re p11 Re p22 > 0){sub}: {mixed}; the single-frequency cycles "
                "are born on the two Hopf curves (Kuznetsov 2004, Section 8.6)")
    if case == "difficult":
        return ("difficult case (Re p11 Re p22 < 0): the mixed-mode torus can itself lose "
                "stability (a three-torus in the full system) and heteroclinic structures may "
                f"appear; the sub-case depends on theta ({t}), delta ({d}), theta delta - 1 "
                f"({td}) and on fifth-order terms not computed here (Kuznetsov 2004, "
                "Section 8.6)")
    return "the case (sign of Re p11 Re p22) is not decided"


def _simple_subcase(t, d, td):
    table = {("positive", "positive", "positive"): "I", ("positive", "positive", "negative"): "II",
             ("negative", "negative", "negative"): "IV", ("negative", "negative", "positive"): "V"}
    label = table.get((t, d, td))
    if label is None and {t, d} == {"positive", "negative"}:
        label = "III"
    return f", sub-case {label} (numbering from memory)" if label else ""


def _point(prep, sp1, sp2, names):
    target = sp2.target
    ctx = prep.context(target)
    sub = lambda x: sp2.substitute(sp1.substitute(x))  # noqa: E731
    chi = characteristic_polynomial(target.top, prep.taylor.map(sub, target.top).jacobian())
    if not chi[0]:
        raise DegenerateBifurcationError("a zero eigenvalue coexists with the pairs",
                                         reason="zero_eigenvalue")
    W1, W2, ratio, _ = _frequencies(prep, target, chi, ctx)
    K = target.top
    E = lambda x: expr(target, x, ctx)  # noqa: E731
    resonance = _resonance(target, W1, W2, ctx)
    status = PointStatus.NONDEGENERATE
    notes = ["the regularity of the unfolding in the two symbols is not checked; "
             "fifth-order terms (needed in the difficult case) are not computed"]
    try:
        N, N2, p11, p12, p21, p22 = _coefficients(prep, target, sub, W1, W2, ratio, K)
    except (DegenerateBifurcationError, DegenerateHopfError) as exc:
        if resonance in ("1:2",):
            status = PointStatus.RESONANCE_1_2
            notes.append(f"the coefficients do not exist at the 1:2 resonance ({exc})")
            return _result(names, prep, sub, E, target, W1, W2, None, resonance, status, notes)
        raise
    if resonance != "none":
        status = PointStatus(f"resonance_{resonance.replace(':', '_')}")
    return _result(names, prep, sub, E, target, W1, W2, (N, N2, p11, p12, p21, p22), resonance,
                   status, notes)


def _result(names, prep, sub, E, target, W1, W2, coeffs, resonance, status, notes):
    ctx = prep.context(target)
    values = {}
    point = {st: E(sub(prep.tower.convert(v))) for st, v in zip(prep.model.states,
                                                                 prep.choice.point)}
    for s, v in prep.choice.substitutions.items():
        values[s.name] = E(sub(prep.tower.convert(v)))
    values.update(_symbol_values(prep, sub, E, names))
    cp = [None] * 4
    theta = delta = None
    signs, case = {}, HopfHopfCase.UNDECIDED
    if coeffs is not None:
        N, N2, p11, p12, p21, p22 = coeffs
        cplx = lambda F, x: E(lower(F(x).a)) + E(lower(F(x).b)) * F.root  # noqa: E731
        cp = [cplx(N, p11), cplx(N, p12), cplx(N, p21), cplx(N2, p22)]
        re = [lower(N(p11).a), lower(N(p12).a), lower(N(p21).a), lower(N2(p22).a)]
        for key, x in zip(("p11", "p12", "p21", "p22"), re):
            signs[key] = sign_word(target, x, ctx)
        if re[3] and re[0]:
            th, de = re[1] / re[3], re[2] / re[0]
            theta, delta = E(th), E(de)
            signs.update(theta=sign_word(target, th, ctx), delta=sign_word(target, de, ctx),
                         theta_delta_minus_1=sign_word(target, th * de - 1, ctx))
        prod = sign_word(target, re[0] * re[3], ctx)
        case = {Sign.POSITIVE: HopfHopfCase.SIMPLE, Sign.NEGATIVE: HopfHopfCase.DIFFICULT,
                Sign.ZERO: HopfHopfCase.DEGENERATE}.get(prod, HopfHopfCase.UNDECIDED)
        if case == HopfHopfCase.DEGENERATE and status == PointStatus.NONDEGENERATE:
            status = PointStatus.RE_P11_OR_RE_P22_VANISHES
    scenario = (hopf_hopf_scenario(case, signs) if status == PointStatus.NONDEGENERATE else
                f"status {status}: the amplitude-equation scenario does not apply as stated"
                + (f"; {hopf_hopf_scenario(case, signs)}" if coeffs is not None else ""))
    return HopfHopfResult(names, values, point, sympy.sqrt(E(W1)), sympy.sqrt(E(W2)), *cp,
                          theta, delta, case, resonance, status, scenario, signs, tuple(notes))


def _symbol_values(prep, sub, E, names):
    out = {}
    for name in names:
        sym = prep.symbol(name)
        out[name] = E(sub(prep.tower.convert(sym)))
    return out


@guarded("the Hopf-Hopf analysis")
def hopf_hopf_all(model: Model, parameters: str | Sequence[str], second: str | None = None, *,
                  point: Mapping[str, object] | None = None, equilibrium: EquilibriumSpec = None,
                  eliminate: Sequence[str] | None = None,
                  values: Mapping[str, object] | None = None,
                  assume: Mapping[str, str] | None = None, backend: str = "flint") -> tuple:
    """Every closed-form Hopf-Hopf point (see :func:`hopf_hopf`)."""
    p1, p2 = _names(parameters, second)
    model.require_kind("flow", "the Hopf-Hopf analysis")
    prep = prepare(model, p1, equilibrium=equilibrium, eliminate=eliminate, values=values,
                   assume=assume, order=3, backend=backend, keep=(p2,))
    u1, u2 = prep.symbol(p1), prep.symbol(p2)
    if point is None:
        c0, c1 = _conditions(prep)
        located = _solve_pair(prep, u1, u2, c0, c1)
    else:
        located = _located(prep, u1, u2, point)
    return collect_points(located, lambda sp1, sp2: _point(prep, sp1, sp2, (p1, p2)), point,
                          f"two pairs of eigenvalues on the imaginary axis in '{p1}' and '{p2}'")


@guarded("the Hopf-Hopf analysis")
def hopf_hopf(model: Model, parameters: str | Sequence[str], second: str | None = None, *,
              point: Mapping[str, object] | None = None, equilibrium: EquilibriumSpec = None,
              eliminate: Sequence[str] | None = None, values: Mapping[str, object] | None = None,
              assume: Mapping[str, str] | None = None, backend: str = "flint",
              branch: int | None = 0) -> HopfHopfResult:
    """Hopf-Hopf analysis in two symbols; arguments as for :func:`fold_hopf`.

    Examples
    --------
    >>> from criticality import Model
    >>> m = Model(["x1", "y1", "x2", "y2"],
    ...           {"x1": "m1*x1 - 5*y1 - x1*(x1^2 + y1^2)", "y1": "5*x1 + m1*y1 - y1*(x1^2 + y1^2)",
    ...            "x2": "m2*x2 - 2*y2 - x2*(x2^2 + y2^2)", "y2": "2*x2 + m2*y2 - y2*(x2^2 + y2^2)"})
    >>> r = hopf_hopf(m, ("m1", "m2"), equilibrium=0)
    >>> r.values, r.omega1, r.omega2, r.p11, r.theta, r.case
    ({'m1': 0, 'm2': 0}, 5, 2, -2, 0, 'simple')
    """
    branch = check_branch(branch)
    results = hopf_hopf_all(model, parameters, second, point=point, equilibrium=equilibrium,
                            eliminate=eliminate, values=values, assume=assume, backend=backend)
    return pick_branch(results, branch)
