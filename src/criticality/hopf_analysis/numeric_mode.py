"""The numeric mode: a Hopf point located by mpmath when no closed form exists.

Pipeline place: model + guess -> **numeric Hopf point** -> the same normal-form
machinery, run over a floating-point field -> :class:`HopfResult` with
``status`` "numeric".

For models whose equilibrium has no closed form (exponential rate laws,
Hill functions with a symbolic exponent, the Hodgkin-Huxley equations), the
equilibrium and the critical value are found together by Newton's method on
the augmented system

    f(x, mu) = 0,     Delta_(n-1)(J(x, mu)) = 0,

where ``Delta_(n-1)`` is the Hurwitz determinant of the characteristic
polynomial (it vanishes where two eigenvalues sum to zero; a real pair
+-kappa is rejected afterwards by requiring omega^2 > 0).  At the point, the
Taylor coefficients are evaluated numerically and the engine's own exact
algorithms run over :class:`MpField`, a field of mpmath numbers (the linear
solves pivot on the largest entry): the eigen-data, the projection formula
for ``c1`` and the normalization method (:mod:`criticality.local.lyapunov`) for
``c1, c2, ...``.

Accuracy.  The whole computation runs twice, at ``digits + 15`` and at
``2 digits + 15`` significant digits; the number of digits on which the two
runs agree (over the critical value, the equilibrium, omega, the
transversality and the Lyapunov coefficients) is reported as the number of
correct digits, and the values of the more precise run, rounded to
``digits``, are returned.
"""

from __future__ import annotations

from typing import Mapping

import mpmath
import sympy

from ..algebra.quadratic import QuadraticElement, QuadraticExtension
from ..budget import checkpoint
from ..local.eigenbasis import Eigenbasis
from ..errors import DegenerateHopfError, EquilibriumNotFoundError, NoHopfPointError, ParameterError
from ..local.lyapunov import complex_normal_form
from ..local.prepare import check_order, resolve_parameter
from ..local.projection import projection_c1
from ..local.taylor import TaylorForms, raw_taylor

__all__ = ["MpField", "locate_hopf_point", "hopf_numeric"]


class MpField:
    """The real numbers at the current mpmath precision, as an engine field.

    ``size`` is minus the absolute value, so that the engine's size-aware
    pivoting becomes partial pivoting on the largest entry.
    """

    backend = "mpmath"
    symbols: tuple = ()
    level = 0

    def __init__(self):
        self.zero = mpmath.mpf(0)
        self.one = mpmath.mpf(1)

    def __call__(self, value):
        if isinstance(value, QuadraticElement):
            return value
        if isinstance(value, sympy.Basic):
            return mpmath.mpf(sympy.N(value, mpmath.mp.dps + 5))
        return mpmath.mpf(value)

    def size(self, x):
        return -abs(x)

    def to_sympy(self, x):
        return sympy.Float(x, mpmath.mp.dps)

    def is_zero(self, x) -> bool:
        return not x


# -- locating the point ------------------------------------------------------------------

def _charpoly(J):
    """``[1, a1, ..., an]`` of ``det(lambda I - J)`` (Faddeev-LeVerrier)."""
    n = J.rows
    coeffs = [mpmath.mpf(1)]
    M = mpmath.zeros(n, n)
    eye = mpmath.eye(n)
    for k in range(1, n + 1):
        M = J * M + coeffs[-1] * eye
        coeffs.append(-sum((J * M)[i, i] for i in range(n)) / k)
    return coeffs


def _hurwitz(coeffs, k):
    m = len(coeffs) - 1
    H = mpmath.matrix(k, k)
    for i in range(1, k + 1):
        for j in range(1, k + 1):
            idx = 2 * j - i
            H[i - 1, j - 1] = coeffs[idx] if 0 <= idx <= m else 0
    return mpmath.det(H)


class _System:
    """Lambdified ``f``, its Jacobian and ``d f / d mu`` (mpmath code)."""

    def __init__(self, equations, states, mu):
        self.n = len(states)
        args = list(states) + [mu]
        F = sympy.Matrix(equations)
        J = F.jacobian(list(states))
        self.f = sympy.lambdify(args, list(F), modules="mpmath")
        self.J = sympy.lambdify(args, J.tolist(), modules="mpmath")
        self.f_mu = sympy.lambdify(args, list(F.diff(mu)), modules="mpmath")
        self.J_mu = sympy.lambdify(args, J.diff(mu).tolist(), modules="mpmath")

    def residual(self, y):
        J = mpmath.matrix(self.J(*y))
        return list(self.f(*y)) + [_hurwitz(_charpoly(J), self.n - 1)]


def _newton(system, y, tol):
    y = [mpmath.mpf(v) for v in y]
    m = len(y)
    h = mpmath.mpf(10) ** (-(mpmath.mp.dps // 3))
    res = system.residual(y)
    for _ in range(200):
        checkpoint()
        norm = max(abs(r) for r in res)
        if norm < tol:
            return y
        Jm = mpmath.matrix(m, m)
        for j in range(m):
            step = h * max(1, abs(y[j]))
            yp, ym = list(y), list(y)
            yp[j] += step
            ym[j] -= step
            rp, rm = system.residual(yp), system.residual(ym)
            for i in range(m):
                Jm[i, j] = (rp[i] - rm[i]) / (2 * step)
        try:
            delta = mpmath.lu_solve(Jm, mpmath.matrix([-r for r in res]))
        except ZeroDivisionError:
            break
        t = mpmath.mpf(1)
        while t > mpmath.mpf(2) ** -30:
            trial = [a + t * delta[i] for i, a in enumerate(y)]
            try:
                r_trial = system.residual(trial)
            except (ZeroDivisionError, ValueError):
                r_trial = None
            if r_trial is not None and max(abs(r) for r in r_trial) < norm:
                y, res = trial, r_trial
                break
            t /= 2
        else:
            break
    raise EquilibriumNotFoundError(
        "Newton's method did not converge from the guess to a point where f(x) = 0 and a pair "
        "of eigenvalues sums to zero; give a guess closer to the Hopf point (state values and "
        "the parameter value)")


def locate_hopf_point(equations, states, mu, guess, dps: int):
    """``(x0, mu_c)`` as mpf numbers at ``dps`` digits, from ``guess``
    (values for the states followed by the parameter)."""
    system = _System(equations, states, mu)
    with mpmath.workdps(dps):
        y = _newton(system, guess, mpmath.mpf(10) ** (-dps + 5))
    return y[:-1], y[-1], system


# -- the normal form at the point -----------------------------------------------------------

def _taylor(equations, states, point, order, K):
    at = [sympy.Float(x, mpmath.mp.dps + 5) for x in point]
    raw = raw_taylor(equations, states, at, order)
    return TaylorForms.from_raw(raw, [K(x) for x in at], K, K)


def _eigenbasis(A, K):
    n = len(A)
    M = mpmath.matrix(A)
    E, ER = mpmath.eig(M)
    k = max(range(n), key=lambda i: mpmath.im(E[i]) - 1e6 * abs(mpmath.re(E[i])))
    omega = mpmath.im(E[k])
    if omega <= 0 or abs(mpmath.re(E[k])) > abs(omega) * mpmath.mpf(10) ** (-mpmath.mp.dps // 2):
        raise NoHopfPointError("at the located point no pair of eigenvalues lies on the imaginary "
                               "axis away from zero (it is a real pair +-kappa: a neutral saddle)",
                               reason="omega_squared_nonpositive")
    W = omega ** 2
    y = [ER[i, k] for i in range(n)]
    v, Av = [mpmath.im(x) / omega for x in y], [mpmath.re(x) for x in y]
    EL, LR = mpmath.eig(M.T)
    kl = min(range(n), key=lambda i: abs(EL[i] - mpmath.mpc(0, omega)))
    z = [LR[i, kl] for i in range(n)]
    w, wA = [mpmath.im(x) / omega for x in z], [mpmath.re(x) for x in z]
    N = QuadraticExtension(K, -W, "nu", root=sympy.Symbol("nu"))
    q = [N.element(a, b) for a, b in zip(Av, v)]
    pbar = [N.element(a, b) for a, b in zip(wA, w)]
    norm = sum((a * b for a, b in zip(pbar, q)), N.zero)
    pbar = [x / norm for x in pbar]
    qq = sum(a * a for a in Av) + W * sum(b * b for b in v)
    A2 = (M * M).tolist()
    e2 = [-x for x in v]
    dot = lambda a, b: sum(x * y for x, y in zip(a, b))  # noqa: E731
    gram = ((dot(w, Av), dot(w, e2)), (dot(wA, Av), dot(wA, e2)),
            dot(w, Av) * dot(wA, e2) - dot(w, e2) * dot(wA, Av))
    return Eigenbasis(A, A2, W, v, Av, q, pbar, w, wA, qq, K, N, gram), E, k


def _cvalue(N, x):
    """An element of the nu-extension as an mpc number."""
    a, b = N.components(x)
    return mpmath.mpc(a, b * mpmath.sqrt(-N.radicand))


def _run(equations, states, mu, guess, dps, order):
    """Every quantity at ``dps`` digits (a dict of mpmath numbers)."""
    with mpmath.workdps(dps):
        x0, mu_c, system = locate_hopf_point(equations, states, mu, guess, dps)
        K = MpField()
        eqs = [e.xreplace({mu: sympy.Float(mu_c, dps + 5)}) for e in equations]
        taylor = _taylor(eqs, states, x0, order, K)
        A = taylor.jacobian()
        eb, eigs, k = _eigenbasis(A, K)
        N = eb.nu_field
        c1p = projection_c1(taylor, eb) / eb.qq
        cs = complex_normal_form(taylor, eb, order)
        y = list(x0) + [mu_c]
        A_mu = mpmath.matrix(system.J_mu(*y))
        f_mu = mpmath.matrix(list(system.f_mu(*y)))
        dx = mpmath.lu_solve(mpmath.matrix(A), -f_mu)
        dx = [N(dx[i]) for i in range(len(states))]
        q = eb.q
        dA_q = [sum((N(A_mu[i, j]) * q[j] for j in range(len(q))), N.zero) for i in range(len(q))]
        Bq = taylor.form(2, q, dx)
        dlam = sum((a * (b + c) for a, b, c in zip(eb.pbar, dA_q, Bq)), N.zero)
        omega = mpmath.sqrt(eb.W)
        others = [e for i, e in enumerate(eigs) if abs(e - mpmath.mpc(0, omega)) > 1e-6 * omega
                  and abs(e + mpmath.mpc(0, omega)) > 1e-6 * omega]
        return {
            "x0": x0, "mu_c": mu_c, "omega": omega, "W": eb.W,
            "c": [_cvalue(N, c) for c in cs], "c1_projection": _cvalue(N, c1p),
            "dlam": _cvalue(N, dlam), "q": [_cvalue(N, x) / mpmath.sqrt(eb.qq) for x in q],
            "p": [mpmath.conj(_cvalue(N, x)) * mpmath.sqrt(eb.qq) for x in eb.pbar],
            "A": [[a for a in row] for row in A], "eigenvalues": list(eigs),
            "others_max_re": max((mpmath.re(e) for e in others), default=mpmath.mpf(-1)),
        }


def _agreement(a, b, digits, cap):
    """Digits on which two runs agree, capped at ``cap``: relative for
    quantities larger than ``10^-digits``, absolute below."""
    worst = cap
    pairs = [(a["mu_c"], b["mu_c"]), (a["omega"], b["omega"]), (a["dlam"], b["dlam"])]
    pairs += list(zip(a["x0"], b["x0"])) + list(zip(a["c"], b["c"]))
    tiny = mpmath.mpf(10) ** (-digits)
    for x, y in pairs:
        diff = abs(x - y)
        if diff:
            rel = diff if abs(y) < tiny else diff / abs(y)  # absolute for values below 10^-digits
            worst = min(worst, int(mpmath.floor(-mpmath.log10(rel))))
    return max(worst, 0)


def _guess_vector(model, parameter, guess, states):
    known = set(model.states) | {parameter}
    bad = [k for k in guess if k not in known]
    if bad:
        raise ParameterError(f"the guess names {', '.join(map(repr, bad))}, which "
                             f"{'is' if len(bad) == 1 else 'are'} neither a state nor the "
                             f"bifurcation parameter '{parameter}'")
    missing = [k for k in list(model.states) + [parameter] if k not in guess]
    if missing:
        raise ParameterError(f"the guess gives no value for {', '.join(map(repr, missing))}; "
                             "the numeric mode needs a starting value for every state and for "
                             "the bifurcation parameter")
    out = []
    for key in list(model.states) + [parameter]:
        value = guess[key]
        if isinstance(value, str):
            value = model.parse(value, context=f"guess for '{key}'")
        try:
            out.append(mpmath.mpf(sympy.N(sympy.sympify(value, strict=True), 50)))
        except (TypeError, ValueError, sympy.SympifyError) as exc:
            raise ParameterError(f"the guess for '{key}' must be a number, got {value!r}") from exc
    return out


def _fixed_model(model, parameter, values):
    model = model.with_values(**dict(values)) if values else model
    defaults = {k: v for k, v in model.defaults().items() if k != parameter}
    if defaults:
        model = model.with_values(**defaults)
    model.parameter(parameter)
    rest = [p.name for p in model.parameters if p.name != parameter]
    if rest:
        raise ParameterError(
            f"the numeric mode needs a value for every parameter except '{parameter}'; "
            f"no value for {', '.join(map(repr, rest))} (give values={{...}} or defaults in "
            "the model)")
    return model


def hopf_numeric(model, parameter: str, guess: Mapping, *, digits: int = 30, order: int = 3,
                 values: Mapping | None = None):
    """Locate a Hopf point numerically from ``guess`` and analyse it.

    Parameters
    ----------
    model : Model
    parameter : str
        The bifurcation parameter; every other parameter needs a value (from
        ``values`` or the model's defaults).
    guess : mapping
        Starting values for every state and for ``parameter``.
    digits : int
        Significant digits wanted (5 to 500).
    order : int
        Odd, >= 3: ``2k + 1`` gives ``l1 .. lk``.
    values : mapping, optional
        Values for other parameters.

    Returns
    -------
    HopfResult
        With ``status`` saying that it is numeric and how many digits are
        correct (two runs at different precisions compared).
    """
    from .numeric_result import numeric_result

    if not 5 <= digits <= 500:
        raise ParameterError(f"digits must be between 5 and 500, got {digits}")
    check_order(order)
    base, parameter = resolve_parameter(model, parameter, values)
    fixed = _fixed_model(base, parameter, {})
    if len(fixed.states) < 2:
        raise NoHopfPointError("a Hopf bifurcation needs at least two state variables",
                               reason="empty_critical_set")
    mu = fixed.symbols[parameter]
    states = fixed.state_symbols
    start = _guess_vector(fixed, parameter, guess, states)
    low = _run(fixed.equations, states, mu, start, digits + 15, order)
    refined = [*low["x0"], low["mu_c"]]
    high = _run(fixed.equations, states, mu, refined, 2 * digits + 15, order)
    with mpmath.workdps(2 * digits + 15):
        correct = _agreement(low, high, digits, digits + 15)
        routes = abs(high["c1_projection"] - high["c"][0]) <= mpmath.mpf(10) ** (-digits) * \
            max(1, abs(high["c"][0]))
    if high["W"] <= 0:
        raise DegenerateHopfError("omega^2 <= 0 at the located point", reason="zero_eigenvalue")
    return numeric_result(fixed, model, parameter, high, digits, min(correct, digits), correct,
                          routes, order)
