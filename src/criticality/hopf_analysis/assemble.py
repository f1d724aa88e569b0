"""From the engine's field elements to a :class:`HopfResult`.

Pipeline place: engine -> **assemble** -> result.

Here the admissibility conditions of the branch are stated and, where
possible, proved (omega^2 > 0, the critical value in the parameter's declared
range, transversality, stability of the other eigenvalues); they then serve
as side conditions for the sign of l1.  Every expression leaves the field in
canonical factored form (:mod:`criticality.algebra.canonical`).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Mapping, Sequence

from dataclasses import replace

import sympy

from ..algebra.algebraic import AlgebraicExtension
from ..algebra.certified import is_numeric
from ..algebra.quadratic import lower
from ..algebra.canonical import canonical_expr, factored, larger_than
from .classify import INADMISSIBLE, NONTRANSVERSAL, classify, no_verdict
from ..local.critical import Condition, cofactor_hurwitz
from ..errors import CriticalityError
from .results import CyclePrediction, HopfResult, ReducedSystemView
from ..algebra.signs import NEGATIVE, NONNEGATIVE, NONPOSITIVE, POSITIVE, UNDECIDED, ZERO, context_for
from ..kinds import Classification, ConditionStatus, Side

if TYPE_CHECKING:
    from .engine import BranchComputation
    from ..local.equilibria import EquilibriumChoice
    from ..model.core import Model

__all__ = ["build_result"]



def _status(fs, relation: str = ">") -> ConditionStatus:
    if relation == "!=":
        if fs.sign in (POSITIVE, NEGATIVE):
            return ConditionStatus.HOLDS
        return ConditionStatus.FAILS if fs.sign == ZERO else ConditionStatus.OPEN
    if fs.sign == POSITIVE:
        return ConditionStatus.HOLDS
    if fs.sign in (NEGATIVE, NONPOSITIVE, ZERO):
        return ConditionStatus.FAILS
    return ConditionStatus.OPEN


def _side(fs):
    """Expression known positive on the admissible set, from an open ``> 0``."""
    s, product = fs.sign_part()
    return s * product if fs.undecided else None


def _raw(tower, x, ctx):
    """Factored sign with atoms left as placeholders (for side conditions)."""
    return factored(tower, x, ctx, restore=False)


class _Branch:
    """Helper bundling one branch's conversions."""

    def __init__(self, bc, ctx) -> None:
        self.bc = bc
        self.tower = bc.branch.tower
        self.ctx = ctx
        self._memo: dict = {}

    def expr(self, x):
        # one conversion per element: a result shows Re c1, Im c1 and the
        # transversality in several quantities, and converting a large element
        # (factoring its coordinates) costs seconds
        hit = self._memo.get(id(x))
        if hit is not None and hit[0] is x:
            return hit[1]
        e = canonical_expr(self.tower, x, self.ctx)
        self._memo[id(x)] = (x, e)  # x kept alive, so its id is not reused
        return e

    def fs(self, x):
        return factored(self.tower, x, self.ctx)


def _admissibility(B, mu_name, mu_assumption, value, W, sheets=()):
    conds, sides = [], []
    fs_w = _raw(B.tower, W, B.ctx)
    conds.append(Condition("omega_squared_positive", "omega^2 > 0: the pair is imaginary, not a "
                           "real pair +-kappa", B.expr(W), ">", _status(fs_w)))
    if _side(fs_w) is not None:
        sides.append(_side(fs_w))
    for k, (root, r) in enumerate(sheets, start=1):
        fs_r = _raw(B.tower, r, B.ctx)
        key = "on_chosen_sheet" if len(sheets) == 1 else f"on_chosen_sheet_{k}"
        conds.append(Condition(key, f"the value of {sympy.sstr(root)} at the critical value is "
                               "its principal (positive) root: the Hopf point belongs to the "
                               "chosen equilibrium, not to the one with the other sign of the "
                               "root", B.expr(r), ">", _status(fs_r)))
        if _side(fs_r) is not None:
            sides.append(_side(fs_r))
    if mu_assumption in ("positive", "nonnegative", "negative", "nonzero"):
        x = -value if mu_assumption == "negative" else value
        fs_v = _raw(B.tower, x, B.ctx)
        rel = "!=" if mu_assumption == "nonzero" else ">"
        status = _status(fs_v, rel)
        if mu_assumption == "nonnegative" and fs_v.sign in (NONNEGATIVE, ZERO):
            status = ConditionStatus.HOLDS
        conds.append(Condition("critical_value_admissible",
                               f"the critical value respects the declared sign of '{mu_name}' "
                               f"({mu_assumption})", B.expr(x), rel, status))
        if rel == ">" and _side(fs_v) is not None:
            sides.append(_side(fs_v))
    return conds, sides


def build_result(model: Model, name: str, mu: sympy.Symbol, choice: EquilibriumChoice, out: Any,
                 bc: BranchComputation, assumptions: Mapping[str, str],
                 params: Sequence[sympy.Symbol]) -> HopfResult | None:
    """The :class:`HopfResult` of one computed branch, or None when the branch
    is provably not a Hopf point (omega^2 <= 0)."""
    tower = bc.branch.tower
    ctx0 = context_for(params, assumptions, tower.atoms)
    B = _Branch(bc, ctx0)
    br, eb = bc.branch, bc.eigenbasis
    conds, sides = _admissibility(B, name, assumptions.get(mu, "real"), br.value, br.W,
                                  br.sheets)
    if conds[0].status == ConditionStatus.FAILS:
        return None
    ctx = ctx0.with_conditions(sides)
    B = _Branch(bc, ctx)
    omega = _omega(B, br.W)
    beta1, beta_nu = br.transversality
    conds.append(Condition("transversal", "the pair crosses with non-zero speed: Re "
                           "d lambda / d mu != 0", B.expr(beta1), "!=",
                           _status(_raw(tower, beta1, ctx), "!=")))
    stab = []
    for label, d in cofactor_hurwitz(br):
        st = _status(_raw(tower, d, ctx))
        stab.append(st)
        which = label.split("_")
        what = (f"Hurwitz determinant {which[-1]} of factor {which[0]} of the remaining "
                "characteristic polynomial" if len(which) == 2 else
                f"Hurwitz determinant {label} of the remaining characteristic polynomial")
        conds.append(Condition(f"others_stable_{label}", f"{what} is positive (all of them "
                               "together: the other eigenvalues lie in the left half-plane)",
                               B.expr(d), ">", st))
    c1 = bc.c_center[0]
    re_c1, im_c1_nu = lower(c1.a), lower(c1.b)
    fs_l1 = factored(tower, re_c1, ctx)
    verdict = classify(fs_l1)
    if verdict.classification == Classification.DEGENERATE:
        verdict = _higher_verdict(tower, ctx, bc.c_center, verdict)
    failed = {c.key for c in conds if c.status == "fails"}
    if "transversal" in failed:
        verdict = no_verdict(NONTRANSVERSAL, name)
    elif "critical_value_admissible" in failed:
        verdict = no_verdict(INADMISSIBLE, name, assumptions.get(mu, "real"))
    re_c1_expr = fs_l1.as_expr()
    im_c1_expr = B.expr(im_c1_nu) * omega
    # l1 from the factored Re c1 already at hand (converting it again costs as much)
    lyap = tuple((re_c1_expr if i == 0 else B.expr(lower(c.a))) / omega
                 for i, c in enumerate(bc.c_center))
    cycle = _cycle(B, model, bc, omega, verdict, stab, mu, fs_l1)
    return HopfResult(
        model=model, parameter=name, parameter_symbol=mu,
        equilibrium={s: v for s, v in zip(model.states, choice.point)},
        equilibrium_how=choice.how,
        critical_value=B.expr(br.value), omega_squared=B.expr(br.W), omega=omega,
        transversality=B.expr(beta1),
        eigenvalue_derivative=B.expr(beta1) + sympy.I * omega * B.expr(beta_nu),
        c1=re_c1_expr + sympy.I * im_c1_expr, l1=re_c1_expr / omega,
        planar_coefficient=re_c1_expr / 2, lyapunov_coefficients=lyap,
        classification=verdict.classification, verdict=verdict.text,
        supercritical_where=verdict.supercritical_where, l1_zero_set=verdict.zero_set,
        conditions=tuple(conds), cycle=cycle,
        q_norm_squared=B.expr(eb.qq), routes_agree=bc.routes_agree,
        branch_index=br.index, branch_count=out.branch_count,
        substitutions={str(k): v for k, v in choice.substitutions.items()},
        notes=tuple(_notes(model, choice, out, bc)),
        assumptions={str(k): v for k, v in assumptions.items()},
        _details=_Details(B, bc, omega, model),
        parametrisation=choice.parametrisation,
    )


class _Details:
    """Builds the display-oriented parts of a result on first access."""

    def __init__(self, B, bc, omega, model) -> None:
        self.B, self.bc, self.omega, self.model = B, bc, omega, model

    def reduced_system(self):
        return _reduced_view(self.B, self.bc, self.omega, self.model)

    def jacobian(self):
        tower = self.bc.branch.tower
        return sympy.Matrix([[tower.to_sympy(x) for x in row] for row in self.bc.eigenbasis.A])

    def characteristic_polynomial(self):
        return _charpoly(self.B, self.bc.branch)

    def eigenvector_q(self):
        eb, B = self.bc.eigenbasis, self.B
        return tuple(B.expr(a) + sympy.I * self.omega * B.expr(b) for a, b in zip(eb.Av, eb.v))

    def eigenvector_p(self):
        return tuple(_conj_expr(self.B, x, self.omega) for x in self.bc.eigenbasis.pbar)


def _sqrt(expr, sign: int = 1):
    """``sqrt(expr)`` (``1/sqrt(expr)`` with ``sign=-1``) without sympy's
    attempt to split a large product into factors of known sign (which
    queries assumptions on every factor and took seconds on results of a few
    thousand terms; dividing by an unevaluated root costs the same)."""
    if expr.is_Number or expr.is_Symbol or expr.is_Pow:
        return sympy.sqrt(expr) ** sign
    return sympy.Pow(expr, sign * sympy.S.Half, evaluate=False)


def _omega(B, W):
    """``sqrt(W)`` without absolute values: the root of a square is taken in
    the field when its sign is known (``W = A**2``, ``A > 0`` gives ``A``), and
    factors of even multiplicity and known sign leave the square root."""
    try:
        root = B.tower.square_root(W)
    except CriticalityError:
        root = None
    if root is not None:
        return B.expr(root)
    return _factored_sqrt(B.fs(W), B.expr(W))


def _factored_sqrt(fs, expr):
    """``sqrt`` of a factored expression: factors of known sign and even
    multiplicity come out, the rest stays under the root."""
    if fs.sign == UNDECIDED and not fs.factors:
        return _sqrt(expr)
    outside, inside, below = [], [fs.constant.p], [fs.constant.q]
    split = True
    for f in fs.factors:
        known = f.sign in (POSITIVE, NONNEGATIVE)
        half, odd = divmod(f.multiplicity, 2) if known else (0, f.multiplicity)
        power = -1 if f.in_denominator else 1
        if half:
            outside.append(f.expr ** (half * power))
        if odd:
            (below if f.in_denominator else inside).append(f.expr ** odd)
            split = split and (known or not f.in_denominator)
    if not split:
        # a denominator factor of unknown sign: sqrt(N)/sqrt(D) would take the
        # root of a negative number wherever N and D are both negative (the
        # quotient is still positive there), so one root of the quotient is kept
        quotient = sympy.Mul(sympy.Mul(*inside), sympy.Pow(sympy.Mul(*below), -1))
        return _product(*outside, _sqrt(quotient))
    return _product(*outside, _sqrt(sympy.Mul(*inside)), _sqrt(sympy.Mul(*below), -1))


#: Above this many expression nodes a product involving roots is left as
#: built: sympy's flattening would re-evaluate every root of a product and ask
#: for the sign of each large factor (seconds per amplitude on results of a
#: few thousand terms).
_FLATTEN_NODES = 2000


def _product(*parts):
    parts = [p for p in parts if p != 1]
    if len(parts) >= 2 and larger_than(parts, _FLATTEN_NODES):
        return sympy.Mul(*parts, evaluate=False)
    return sympy.Mul(*parts)


def _higher_verdict(tower, ctx, coefficients, verdict):
    """Where l1 vanishes identically, the first Lyapunov coefficient that does
    not vanish decides (it is invariant there)."""
    for k, c in enumerate(coefficients[1:], start=2):
        fs = factored(tower, lower(c.a), ctx)
        if fs.sign == ZERO or fs.constant == 0:
            continue
        higher = classify(fs, coefficient=f"l{k}")
        vanish = "l1" if k == 2 else f"l1 = ... = l{k - 1}"
        text = f"{vanish} = 0 identically; by l{k}: {higher.text}"
        return replace(higher, text=text)
    if len(coefficients) < 2:
        return verdict
    vanish = "l1 = l2" if len(coefficients) == 2 else f"l1 = ... = l{len(coefficients)}"
    return replace(verdict, text=f"degenerate: {vanish} = 0 identically; a higher order "
                   "(order=...) decides, if any does")


def _conj_expr(B, x, omega):
    a, b = x.ext.components(x)
    return B.expr(a) - sympy.I * omega * B.expr(b)


def _charpoly(B, br):
    lam = sympy.Symbol("lambda")
    rest = sympy.Add(*[B.expr(c) * lam ** k for k, c in enumerate(br.cofactor)])
    return sympy.Mul(lam ** 2 + B.expr(br.W), rest, evaluate=False)


#: above this many terms in Re c_j the cycle quantities keep k = -beta'/Re c_j
#: as a quotient: its one division would take the norm of Re c_j (in the
#: eight-parameter food chain 60 % of the whole analysis, for k, its sign, and
#: the frequency slope)
_QUOTIENT_TERMS = 400


def _cycle(B, model, bc, omega, verdict, stab, mu, re_c1=None):
    """The cycle near onset from the first ``c_j`` with ``Re c_j != 0``.

    With ``z' = (beta + i omega) z + c_j z|z|^(2j)`` (the lower ``Re c_i``
    vanishing identically) the cycle has ``rho^(2j) = -beta / Re c_j``, so
    ``rho^2 = (k (mu - mu_c))^(1/j)`` with ``k = -beta'(mu_c) / Re c_j`` and
    the amplitudes follow ``amplitude^(2j) ~ (mu - mu_c)``.

    Where ``Re c_j`` is large, ``k`` is never formed in the field: it is the
    quotient of the two expressions, its sign the product of the signs of
    ``beta'`` and ``Re c_j`` (``re_c1``, the factored ``Re c_1``, has the
    latter), the frequency slope is ``omega (beta_nu - beta' Im c_j / Re c_j)``
    and the amplitude coefficients are ``s_i k`` with ``s_i >= 0`` (so
    ``sqrt(s_i k delta) = sqrt(s_i) sqrt(k delta)``)."""
    br, eb = bc.branch, bc.eigenbasis
    beta1, beta_nu = br.transversality
    offset = mu - B.expr(br.value)
    j, R, S = 0, None, None
    for index, c in enumerate(bc.c_center, start=1):
        if lower(c.a):
            j, R, S = index, lower(c.a), lower(c.b)
            break
    amps, coeffs = {}, {}
    if j:
        lower_exact_zero = all(not c for c in bc.c_center[:j - 1])
        quotient = B.tower.top.size(R) > _QUOTIENT_TERMS
        if quotient:
            # every expression here is one the result already holds (memoised)
            r_expr = re_c1.as_expr() if j == 1 and re_c1 is not None else B.expr(R)
            sr = re_c1.sign if j == 1 and re_c1 is not None else _raw(B.tower, R, B.ctx).sign
            sb = _raw(B.tower, beta1, B.ctx).sign
            minus_b = -B.expr(beta1)
            k_expr = _product(minus_b, sympy.Pow(r_expr, -1))
            sign = _sign_of_k(sb, sr)
            if sign in (POSITIVE, NEGATIVE):
                side, side_cond = ("above" if sign == POSITIVE else "below"), None
            else:
                side, side_cond = "undecided", sympy.StrictGreaterThan(
                    _product(minus_b, r_expr), 0, evaluate=False)
            slope = (_product(omega, B.expr(beta_nu) - _product(
                B.expr(beta1), B.expr(S), sympy.Pow(r_expr, -1)))
                if lower_exact_zero else sympy.nan)
        else:
            k = -beta1 / R
            fs_k = _raw(B.tower, k, B.ctx)
            side, side_cond = _cycle_side(B, fs_k.sign, beta1, R, k)
            k_expr = B.expr(k)
            # beta_nu - beta1 S / R, with the one division by R (a norm) already in k
            slope = omega * B.expr(beta_nu + k * S) if lower_exact_zero else sympy.nan
        if j == 1:
            rho2 = k_expr * offset
        else:
            rho2 = sympy.Pow(k_expr * offset, sympy.Rational(1, j))
        inv_qq = 4 / eb.qq  # one inverse in the radical extension, not one per state
        for name, a, v in zip(model.states, eb.Av, eb.v):
            sj = (a * a + eb.W * v * v) * inv_qq  # amplitude_j^2 = sj rho^2
            if not sj:
                amps[name] = sympy.Integer(0)
                if j == 1:
                    coeffs[name] = sympy.Integer(0)
                continue
            if j == 1 and quotient:
                fs = B.fs(sj)
                root = _factored_sqrt(fs, fs.as_expr())
                coeffs[name] = _product(fs.as_expr(), k_expr)
                amps[name] = _product(root, _sqrt(k_expr * offset))
            elif j == 1:
                fs = B.fs(k * sj)
                coeffs[name] = fs.as_expr()
                # the root of k_j (mu - mu_c) > 0 as a product of two real roots:
                # sqrt(k_j) sqrt(mu - mu_c) above, sqrt(-k_j) sqrt(mu_c - mu)
                # below (two imaginary roots would give a negative amplitude)
                if side == "above":
                    amps[name] = _product(_factored_sqrt(fs, coeffs[name]), _sqrt(offset))
                elif side == "below":
                    neg = B.fs(-k * sj)
                    amps[name] = _product(_factored_sqrt(neg, neg.as_expr()), _sqrt(-offset))
                else:
                    fs_s = B.fs(sj)
                    amps[name] = _product(_factored_sqrt(fs_s, fs_s.as_expr()),
                                          _sqrt(k_expr * offset))
            else:
                fs = B.fs(sj)
                amps[name] = _product(_factored_sqrt(fs, fs.as_expr()),
                                      sympy.Pow(k_expr * offset, sympy.Rational(1, 2 * j)))
    else:
        side, side_cond, rho2, slope = Side.UNDECIDED, None, sympy.nan, sympy.nan
    if verdict.classification == Classification.SUPERCRITICAL:
        stable = True if all(s == ConditionStatus.HOLDS for s in stab) else (
            False if ConditionStatus.FAILS in stab else None)
    elif verdict.classification == Classification.SUBCRITICAL:
        stable = False
    else:
        stable = None
    return CyclePrediction(side, side_cond, stable, rho2, amps, coeffs, 2 * sympy.pi / omega, slope,
                           2 * j if j else 2)


def _sign_of_k(sb, sr):
    """The sign of ``k = -beta' / Re c_j`` from the signs of ``beta'`` and
    ``Re c_j`` (UNDECIDED unless both are strict)."""
    if sb in (POSITIVE, NEGATIVE) and sr in (POSITIVE, NEGATIVE):
        return POSITIVE if sb != sr else NEGATIVE
    return UNDECIDED


def _cycle_side(B, sign, beta1, R, k):
    """``(side, condition)``: on which side of the critical value the cycle
    exists, from the sign of ``k = -beta'(mu_c) / Re c_j`` (or of its two
    factors); with ``k = 0`` (no crossing) there is no side, and a condition
    that sympy decides (a number) is never left as a boolean."""
    if sign not in (POSITIVE, NEGATIVE):
        sign = _sign_of_k(_raw(B.tower, beta1, B.ctx).sign, _raw(B.tower, R, B.ctx).sign)
    if sign in (POSITIVE, NEGATIVE):
        return ("above" if sign == POSITIVE else "below"), None
    e = B.expr(k)
    if larger_than([e], _FLATTEN_NODES):
        # sympy's assumptions decide no more than the certified sign above, and
        # asking them of a large expression took seconds
        return "undecided", sympy.StrictGreaterThan(e, 0, evaluate=False)
    rel = sympy.StrictGreaterThan(e, 0)
    if rel is sympy.true:
        return "above", None
    if sympy.StrictLessThan(e, 0) is sympy.true:
        return "below", None
    return "undecided", (rel if isinstance(rel, sympy.Rel) else None)


def _reduced_view(B, bc, omega, model):
    x, y = _fresh_coordinates(model)
    w = _frequency_symbol(model)
    rs = bc.reduced
    f, g = rs.rotation_form(B.expr, w, x, y)
    eb = bc.eigenbasis
    q = tuple(B.expr(a) + sympy.I * w * B.expr(b) for a, b in zip(eb.Av, eb.v))
    manifold = []
    for i in range(len(model.states)):
        terms = []
        for k, vecs in rs.h.items():
            for b, vec in enumerate(vecs):
                if vec[i]:
                    terms.append(B.expr(vec[i]) * x ** (k - b) * (w * y) ** b)
        manifold.append(sympy.Add(*terms))
    return ReducedSystemView(x, y, f, g, rs.order, q, tuple(manifold), w)


def _frequency_symbol(model):
    """The symbol standing for omega in the reduced system (not a model name)."""
    name = "omega"
    while name in model.symbols:
        name += "_c"
    return sympy.Symbol(name, positive=True)


def _fresh_coordinates(model):
    """Center-plane coordinates named so that they clash with no model name."""
    taken = set(model.symbols)
    for pair in (("x", "y"), ("xi", "eta"), ("X", "Y")):
        if not taken & set(pair):
            return sympy.symbols(pair, real=True)
    k = 1
    while {f"xi{k}", f"eta{k}"} & taken:
        k += 1
    return sympy.symbols((f"xi{k}", f"eta{k}"), real=True)


def _root_notes(tower):
    """Say how a critical value of degree >= 3 is represented and how its
    signs were decided."""
    out = []
    for level in tower.levels:
        if not isinstance(level, AlgebraicExtension):
            continue
        x = sympy.Symbol("x")
        poly = level.modulus_expr(x)
        how = ("every sign at it was decided exactly (interval arithmetic from its isolating "
               "interval, precision doubled until the sign is certain)" if is_numeric(tower) else
               "quantities are polynomials in it; conditions that involve it are stated with it")
        out.append(f"the critical value is a root of {sympy.sstr(poly)} = 0 (degree "
                   f"{level.degree}, in x = the critical value); {how}")
    return out


def _notes(model, choice, out, bc):
    notes = list(getattr(model, "notes", ()))
    if choice.note:
        notes.append(choice.note)
    notes.extend(out.notes)
    notes.extend(_root_notes(bc.branch.tower))
    if not bc.routes_agree:
        notes.append("WARNING: the center-manifold route and the projection formula disagree; "
                     "please report this model")
    return notes
