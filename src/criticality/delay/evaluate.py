"""Numeric evaluation of a delay Hopf result, with independent checks (mpmath).

Pipeline place: result -> **numeric evaluation**.

Besides the closed forms at a parameter point, :func:`evaluate_result`
computes, independently of the symbolic route:

* ``residual``: ``|det Delta(i omega)|`` at the critical value (0 up to rounding);
* ``numeric_c1``: the projection form of c1 from numeric matrices (mpmath
  linear algebra on ``Delta(i omega)``, ``Delta(2 i omega)``, ``Delta(0)``,
  the forms evaluated at the point), normalised as the result;
* ``numeric_slope``: ``d lambda/d mu`` from roots of the quasi-polynomial
  located by ``mpmath.findroot`` at ``mu_c +- h`` (a central difference).
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass
from typing import Any, Mapping

import mpmath
import sympy

from ..local.boundary import guarded
from ..local.options import check_digits
from ..errors import InadmissiblePointError, ParameterError
from ..kinds import Classification, coerce
from ..model.expressions import convert_sympy, parse_expression

#: a DelayHopfResult, typed loosely: the result imports this module at run time, and a
#: type-only import back would make the two modules import each other
ResultLike = Any

__all__ = ["NumericDelayResult", "evaluate_result"]


@dataclass(frozen=True, repr=False)
class NumericDelayResult:
    """A :class:`~criticality.delay.results.DelayHopfResult` at one parameter point
    (mpmath numbers with ``digits`` digits)."""

    values: Mapping[str, Any]
    digits: int
    critical_value: Any
    omega: Any
    period: Any
    transversality: Any
    c1: Any
    l1: Any
    classification: Classification
    amplitude_coefficients: Mapping[str, Any]
    residual: Any
    numeric_c1: Any
    numeric_slope: Any

    def __post_init__(self) -> None:
        coerce(self, classification=Classification)

    def __getitem__(self, key: str) -> Any:
        return getattr(self, key)

    def __repr__(self) -> str:
        # mpmath prints a number of many digits only at a working precision
        # that holds them (else Python's int-string limit fires)
        with mpmath.workdps(self.digits + 10):
            fields = ", ".join(f"{f.name}={getattr(self, f.name)!r}"
                               for f in dataclasses.fields(self))
        return f"{type(self).__name__}({fields})"

    def amplitude(self, offset: float) -> dict:
        """Predicted amplitude of each state at ``mu = mu_c + offset`` (NaN on the
        side without a cycle)."""
        with mpmath.workdps(self.digits):
            out = {}
            for state, k in self.amplitude_coefficients.items():
                v = k * mpmath.mpf(offset)
                out[state] = mpmath.sqrt(v) if v >= 0 else mpmath.nan
            return out


def _point(result, values: Mapping) -> dict:
    model = result.model
    sub = {}
    for key, raw in values.items():
        name = getattr(key, "name", key)
        if name == result.parameter:
            continue
        parameter = model.parameter(name)
        context = f"value of {parameter.name!r}"
        if isinstance(raw, str):
            value = parse_expression(raw, {}, context=context)
        else:
            value = convert_sympy(raw, {}, context=context, exact=not isinstance(raw, float))
        if value.free_symbols:
            raise ParameterError(f"the {context} must be a number, found {raw!r}")
        sub[model.symbols[parameter.name]] = value
    free = set()
    for expr in (result.critical_value, result.omega, result.c1):
        free |= expr.free_symbols
    missing = sorted(s.name for s in free - set(sub) if s.name != result.parameter)
    if missing:
        raise ParameterError(f"give values for {', '.join(missing)} to evaluate the result")
    return sub


def _mp(expr, sub, digits):
    value = sympy.sympify(expr, strict=True).xreplace(sub)
    value = sympy.N(value, digits + 10)
    re, im = value.as_real_imag()
    # through the binary value: no decimal string, so no limit on the digits
    real = _binary(re, digits + 10)
    if im == 0:
        return real
    return mpmath.mpc(real, _binary(im, digits + 10))


def _binary(x, digits):
    value = sympy.Float(x, digits)
    mpf = getattr(value, "_mpf_", None)
    return mpmath.mpf(mpf) if mpf is not None else mpmath.mpf(str(value))  # NaN


@guarded("the evaluation of the delay result")
def evaluate_result(result: ResultLike, values: Mapping,
                    digits: int = 30) -> NumericDelayResult:
    digits = check_digits(digits, 5, 10000)
    if not isinstance(values, Mapping):
        raise ParameterError(f"values must be a mapping {{name: number}}; got {values!r:.60}")
    sub = _point(result, values)
    with mpmath.workdps(digits + 10):
        _require_crossing(result, sub, digits)
        mu_c = _mp(result.critical_value, sub, digits)
        full = dict(sub)
        full[result.parameter_symbol] = sympy.Float(mu_c, digits + 10)
        omega = _mp(result.omega, sub, digits)
        c1 = _mp(result.c1, sub, digits)
        coefficients = {s: _mp(k, sub, digits) for s, k in
                        result.cycle.amplitude_coefficients.items()}
        residual = abs(_chi(result, full, 1j * omega))
        num_c1 = _numeric_c1(result, full, omega)
        slope = _numeric_slope(result, sub, mu_c, omega)
        out = NumericDelayResult(
            values={s.name: v for s, v in sub.items()}, digits=digits, critical_value=mu_c,
            omega=omega, period=2 * mpmath.pi / omega,
            transversality=_mp(result.transversality, sub, digits), c1=c1,
            l1=_mp(result.l1, sub, digits), classification=result.classification,
            amplitude_coefficients=coefficients, residual=residual, numeric_c1=num_c1,
            numeric_slope=slope)
    return out


def _require_crossing(result, sub, digits) -> None:
    """Raise :class:`InadmissiblePointError` where the closed forms have no
    crossing at the point: ``omega^2`` not positive (the frequency would be
    imaginary, and the phase ``acos`` of a complex number)."""
    w2 = _mp(result.omega ** 2, sub, digits)
    if isinstance(w2, mpmath.mpf) and w2 > 0:
        return
    at = ", ".join(f"{k} = {sympy.sstr(v)}" for k, v in sub.items()) or "these values"
    shown = mpmath.nstr(w2, min(digits, 15))
    what = (f"omega^2 = {shown} < 0" if isinstance(w2, mpmath.mpf) and w2 < 0 else
            f"omega^2 = {shown}, not a positive real number")
    raise InadmissiblePointError(
        f"at {at}: {what}, so no pair of roots of the characteristic quasi-polynomial crosses "
        f"the imaginary axis at i omega on this crossing (omega = {sympy.sstr(result.omega)}) "
        "there; the result's conditions say where it does", quantity="omega_squared",
        value=w2, branch=f"the crossing at omega = {sympy.sstr(result.omega)}")


def _matrices(result, full):
    out = []
    for M in result.matrices:
        out.append(mpmath.matrix([[_mp(M[i, j], full, mpmath.mp.dps) for j in range(M.cols)]
                                  for i in range(M.rows)]))
    return out


def _delays(result, full):
    return [_mp(d, full, mpmath.mp.dps) for d in result.delays]


def _delta(mats, delays, lam):
    n = mats[0].rows
    D = lam * mpmath.eye(n) - mats[0]
    for A, tau in zip(mats[1:], delays):
        D -= A * mpmath.exp(-lam * tau)
    return D


def _chi(result, full, lam):
    return mpmath.det(_delta(_matrices(result, full), _delays(result, full), lam))


def _null(M):
    """A kernel vector of a numerically singular matrix (last column fixed to 1
    where the leading block is invertible)."""
    n = M.rows
    if n == 1:
        return mpmath.matrix([1])
    for drop in range(n):
        keep = [c for c in range(n) if c != drop]
        A = mpmath.matrix([[M[i, c] for c in keep] for i in range(n - 1)])
        b = mpmath.matrix([-M[i, drop] for i in range(n - 1)])
        try:
            x = mpmath.lu_solve(A, b)
        except ZeroDivisionError:
            continue
        v = [mpmath.mpf(0)] * n
        v[drop] = mpmath.mpf(1)
        for c, val in zip(keep, x):
            v[c] = val
        return mpmath.matrix(v)
    raise ZeroDivisionError("no kernel vector found")


def _numeric_c1(result, full, omega):
    """The projection form with numeric matrices (independent of the symbolic route)."""
    from .linearize import delay_forms
    model = result.model
    point = tuple(sympy.sympify(result.equilibrium[s], strict=True) for s in model.states)
    forms = delay_forms(model, point).substitute(full)
    mats = [mpmath.matrix([[_mp(M[i, j], {}, mpmath.mp.dps) for j in range(M.cols)]
                           for i in range(M.rows)]) for M in forms.matrices]
    delays = [_mp(d, {}, mpmath.mp.dps) for d in forms.delays]
    lam = 1j * omega
    D = _delta(mats, delays, lam)
    q = _null(D)
    p = _null(D.T)
    n = D.rows
    Dp = mpmath.eye(n)
    for A, tau in zip(mats[1:], delays):
        Dp += A * (tau * mpmath.exp(-lam * tau))
    pair = (p.T * Dp * q)[0]
    pt = p / pair
    fac = [mpmath.exp(-lam * tau) for tau in delays]

    def ext(v, f):
        return [v[i] if k == 0 else v[i] * f[k - 1] for i, k in forms.slots]

    def B(u, v):
        out = []
        for table in forms.second:
            s = 0
            for (a, b), h in table.items():
                hv = _mp(h, {}, mpmath.mp.dps)
                s += hv * (u[a] * v[b] if a == b else u[a] * v[b] + u[b] * v[a])
            out.append(s)
        return mpmath.matrix(out)

    def C(u, v, w):
        from itertools import permutations
        out = []
        for table in forms.third:
            s = 0
            for idx, h in table.items():
                hv = _mp(h, {}, mpmath.mp.dps)
                s += hv * sum(u[a] * v[b] * w[c] for a, b, c in set(permutations(idx)))
            out.append(s)
        return mpmath.matrix(out)

    Q = ext(q, fac)
    Qb = ext([mpmath.conj(x) for x in q], [mpmath.conj(f) for f in fac])
    h20 = mpmath.lu_solve(_delta(mats, delays, 2 * lam), B(Q, Q))
    h11 = mpmath.lu_solve(_delta(mats, delays, 0), B(Q, Qb))
    H20 = ext(h20, [f * f for f in fac])
    H11 = ext(h11, [1] * len(fac))
    total = C(Q, Q, Qb) + 2 * B(Q, H11) + B(Qb, H20)
    c1 = (pt.T * total)[0] / 2
    qq = sum(abs(x) ** 2 for x in q)
    return c1 / qq


def _numeric_slope(result, sub, mu_c, omega):
    """d lambda/d mu by roots of the quasi-polynomial at mu_c +- h (central difference)."""
    h = mpmath.mpf(10) ** (-(mpmath.mp.dps // 3))
    roots = []
    for mu in (mu_c - h, mu_c + h):
        full = dict(sub)
        full[result.parameter_symbol] = sympy.Float(mu, mpmath.mp.dps)
        mats, delays = _matrices(result, full), _delays(result, full)
        roots.append(mpmath.findroot(lambda z: mpmath.det(_delta(mats, delays, z)),
                                     mpmath.mpc(0, omega)))
    return (roots[1] - roots[0]) / (2 * h)
