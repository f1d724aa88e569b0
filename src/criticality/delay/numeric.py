"""The numeric mode of the delay analysis: a crossing located by mpmath from a guess.

Pipeline place: model -> delay forms (symbolic in the states) -> **numeric
crossing** (mpmath) -> :class:`NumericDelayHopf`.  For equilibria without a
closed form, or crossings that solve a transcendental equation, the
unknowns (equilibrium ``x``, the parameter ``mu``, the frequency ``omega``)
solve ``f(x, mu) = 0``, ``Re det Delta(i omega) = 0``, ``Im det Delta(i omega)
= 0`` by ``mpmath.findroot`` from the user's guess; c1 is the projection form
with numeric matrices (:func:`projection_c1`, also used by ``evaluate``) and
``d lambda/d mu`` a central difference of roots located by ``findroot``.
"""

from __future__ import annotations

from dataclasses import dataclass
from itertools import permutations
from typing import TYPE_CHECKING, Any, Mapping, Sequence

import mpmath
import sympy

from ..errors import NoHopfPointError, ParameterError
from ..kinds import Classification, coerce
from ..model.delayed import current_form

if TYPE_CHECKING:
    from ..algebra.field import Element
    from ..model.core import Model

__all__ = ["NumericDelayHopf", "hopf_delay_numeric", "delta_matrix", "null_vector",
           "projection_c1"]


@dataclass(frozen=True)
class NumericDelayHopf:
    """A Hopf point of a retarded equation located numerically (mpmath numbers).

    The conventions are those of :class:`~criticality.delay.results.DelayHopfResult`
    (c1 for ``conj(q)^T q = 1``, ``l1 = Re(c1)/omega``)."""

    model: Any
    parameter: str
    mode: str
    values: Mapping[str, Any]
    digits: int
    equilibrium: Mapping[str, Any]
    critical_value: Any
    omega: Any
    period: Any
    c1: Any
    l1: Any
    transversality: Any
    eigenvalue_derivative: Any
    classification: Classification
    amplitude_coefficients: Mapping[str, Any]
    residual: Any
    kind: str = "hopf_delay_numeric"
    status: str = "numeric"

    def __post_init__(self) -> None:
        coerce(self, classification=Classification)

    def summary(self) -> str:
        lines = [f"Hopf point of a retarded equation in {self.parameter!r}, located numerically "
                 f"({self.digits} digits)",
                 "  equilibrium: " + ", ".join(f"{k} = {mpmath.nstr(v, 12)}"
                                               for k, v in self.equilibrium.items()),
                 f"  critical value: {mpmath.nstr(self.critical_value, 15)}",
                 f"  omega: {mpmath.nstr(self.omega, 15)}",
                 f"  Re d lambda/d {self.parameter}: {mpmath.nstr(self.transversality, 12)}",
                 f"  c1: {mpmath.nstr(self.c1, 12)}",
                 f"  l1: {mpmath.nstr(self.l1, 12)} ({self.classification})",
                 f"  residual |chi(i omega)|: {mpmath.nstr(self.residual, 3)}",
                 "  caution: local analysis near the critical value; verify before relying on "
                 "it and defer to applicable codes and licensed engineering practice"]
        return "\n".join(lines)

    def to_dict(self, **_ignored: Any) -> dict:
        """The result as a JSON document in the shared envelope (numbers as
        decimal strings with the stated digits)."""
        from ..outputs.envelope import envelope

        d = self.digits
        body = {"kind": self.kind, "parameter": self.parameter, "mode": self.mode,
                "digits": d,
                "values": {k: str(v) for k, v in self.values.items()},
                "equilibrium": {k: mpmath.nstr(v, d) for k, v in self.equilibrium.items()},
                "critical_value": mpmath.nstr(self.critical_value, d),
                "omega": mpmath.nstr(self.omega, d), "period": mpmath.nstr(self.period, d),
                "transversality": mpmath.nstr(self.transversality, d),
                "c1": {"re": mpmath.nstr(mpmath.re(self.c1), d),
                       "im": mpmath.nstr(mpmath.im(self.c1), d)},
                "l1": mpmath.nstr(self.l1, d), "classification": str(self.classification),
                "amplitude_coefficients": {k: mpmath.nstr(v, d)
                                           for k, v in self.amplitude_coefficients.items()},
                "residual": mpmath.nstr(self.residual, 3)}
        return envelope("criticality.hopf_delay_numeric", self.kind, body, status=self.status,
                        conventions=["c1 for conj(q)^T q = 1", "l1 = Re(c1)/omega",
                                     "l1 < 0 supercritical, l1 > 0 subcritical"],
                        cautions=[_NUMERIC_CAUTION])

    def to_json(self, **_ignored: Any) -> str:
        import json
        return json.dumps(self.to_dict(), indent=2)

    def to_latex(self) -> str:
        """The located point as an ``align*`` block of decimals."""
        from ..outputs.latex_expr import latex_name

        d = self.digits
        p = latex_name(self.parameter)
        rows = [(f"{{{p}}}_0" if "_" in p else f"{p}_0", self.critical_value), (r"\omega", self.omega),
                (r"\operatorname{Re} \frac{d\lambda}{d" + p + "}", self.transversality),
                (r"\ell_1", self.l1)]
        body = " \\\\\n".join(f"  {k} &= {mpmath.nstr(v, d)}" for k, v in rows)
        return (f"% Hopf point of a retarded equation, located numerically ({d} digits)\n"
                f"\\begin{{align*}}\n{body}\n\\end{{align*}}\n"
                f"Verdict: {self.classification} ($\\ell_1 = {mpmath.nstr(self.l1, 6)}$). "
                + _NUMERIC_CAUTION + "\n")

    def latex_document(self) -> str:
        return "\n".join([r"\documentclass{article}", r"\usepackage{amsmath,amssymb}",
                          r"\begin{document}", self.to_latex(), r"\end{document}", ""])

    def __str__(self) -> str:
        return self.summary()


_NUMERIC_CAUTION = ("The analysis is local: valid near the critical value and near the "
                    "equilibrium. A subcritical result means an abrupt, hysteretic onset. Verify "
                    "before relying on it, and defer to applicable codes and licensed "
                    "engineering practice.")


def delta_matrix(mats: Any, delays: Sequence, lam: Element) -> Any:
    """``Delta(lambda) = lambda I - A_0 - sum_k A_k exp(-lambda tau_k)`` (mpmath)."""
    n = mats[0].rows
    D = lam * mpmath.eye(n) - mats[0]
    for A, tau in zip(mats[1:], delays):
        D -= A * mpmath.exp(-lam * tau)
    return D


def null_vector(M: Any) -> Any:
    """A kernel vector of a numerically singular matrix (one entry fixed to 1)."""
    n = M.rows
    if n == 1:
        return mpmath.matrix([1])
    best = None
    for drop in range(n):
        keep = [c for c in range(n) if c != drop]
        for skip in range(n):
            rows = [i for i in range(n) if i != skip]
            A = mpmath.matrix([[M[i, c] for c in keep] for i in rows])
            try:
                x = mpmath.lu_solve(A, mpmath.matrix([-M[i, drop] for i in rows]))
            except ZeroDivisionError:
                continue
            v = [mpmath.mpf(0)] * n
            v[drop] = mpmath.mpf(1)
            for c, val in zip(keep, x):
                v[c] = val
            v = mpmath.matrix(v)
            err = mpmath.norm(M * v)
            if best is None or err < best[0]:
                best = (err, v)
    if best is None:
        raise ZeroDivisionError("no kernel vector found")
    return best[1]


def projection_c1(mats: Any, delays: Sequence, slots: Any, second: Any, third: Any,
                  omega: Any) -> tuple:
    """c1 (unit normalisation) by the projection form with numeric data.

    ``second``/``third`` are per-equation dicts of mpmath derivative values on
    the extended vector with coordinates ``slots``."""
    lam = mpmath.mpc(0, 1) * omega
    D = delta_matrix(mats, delays, lam)
    q, p = null_vector(D), null_vector(D.T)
    n = D.rows
    Dp = mpmath.eye(n)
    for A, tau in zip(mats[1:], delays):
        Dp += A * (tau * mpmath.exp(-lam * tau))
    pt = p / (p.T * Dp * q)[0]
    fac = [mpmath.exp(-lam * tau) for tau in delays]

    def ext(v, f):
        return [v[i] if k == 0 else v[i] * f[k - 1] for i, k in slots]

    def B(u, v):
        return mpmath.matrix([sum((h * (u[a] * v[b] if a == b else u[a] * v[b] + u[b] * v[a])
                                   for (a, b), h in table.items()), mpmath.mpf(0))
                              for table in second])

    def C(u, v, w):
        return mpmath.matrix([sum((h * sum(u[a] * v[b] * w[c] for a, b, c in set(permutations(i)))
                                   for i, h in table.items()), mpmath.mpf(0))
                              for table in third])

    Q = ext(q, fac)
    Qb = ext([mpmath.conj(x) for x in q], [mpmath.conj(f) for f in fac])
    h20 = mpmath.lu_solve(delta_matrix(mats, delays, 2 * lam), B(Q, Q))
    h11 = mpmath.lu_solve(delta_matrix(mats, delays, 0), B(Q, Qb))
    total = C(Q, Q, Qb) + 2 * B(Q, ext(h11, [1] * len(fac))) + B(Qb, ext(h20, [f * f for f in fac]))
    c1 = (pt.T * total)[0] / 2
    qq = sum(abs(x) ** 2 for x in q)
    return c1 / qq, q, qq


class _Problem:
    """The model's forms as mpmath functions of (x, mu)."""

    def __init__(self, model, mu, values) -> None:
        from .linearize import delay_forms
        fixed = {model.symbols[k]: v for k, v in values.items()}
        self.model, self.mu = model, mu
        states = list(model.state_symbols)
        forms = delay_forms(model, tuple(states)).substitute(fixed)
        self.forms = forms
        args = states + [mu]
        lam = lambda e: sympy.lambdify(args, e, modules="mpmath")  # noqa: E731
        self.f = lam([current_form(e).xreplace(fixed) for e in model.equations])
        self.mats = [lam(m.tolist()) for m in forms.matrices]
        self.delays = [lam(d) for d in forms.delays]
        self.second = [{k: lam(v) for k, v in t.items()} for t in forms.second]
        self.third = [{k: lam(v) for k, v in t.items()} for t in forms.third]
        leftover = set()
        for e in [*model.equations, *forms.delays]:
            leftover |= sympy.sympify(e, strict=True).xreplace(fixed).free_symbols
        leftover -= set(args)
        leftover = {s for s in leftover if not isinstance(s, sympy.Dummy)}
        if leftover:
            raise ParameterError("the numeric mode needs values for "
                                 + ", ".join(sorted(s.name for s in leftover)))

    def at(self, x, mu):
        mats = [mpmath.matrix(m(*x, mu)) for m in self.mats]
        delays = [mpmath.mpf(d(*x, mu)) if callable(d) else mpmath.mpf(d) for d in self.delays]
        return mats, delays

    def chi(self, x, mu, lam):
        mats, delays = self.at(x, mu)
        return mpmath.det(delta_matrix(mats, delays, lam))


def hopf_delay_numeric(model: Model, parameter: str, guess: Mapping, *,
                       values: Mapping | None = None, digits: int = 30) -> NumericDelayHopf:
    """Locate a Hopf point of a retarded equation from ``guess`` (every state and
    the parameter; optionally ``omega``) with every other parameter fixed by
    ``values`` or the model's defaults, and compute c1, l1 and the crossing speed.
    """
    values = {**model.defaults(), **dict(values or {})}
    mu = model.symbols[parameter]
    values.pop(parameter, None)
    values = {k: _number(v, k) for k, v in values.items()}
    missing = [s for s in model.states if s not in guess] + (
        [] if parameter in guess else [parameter])
    if missing:
        raise ParameterError("the guess needs starting values for " + ", ".join(missing))
    with mpmath.workdps(digits + 10):
        prob = _Problem(model, mu, values)
        n = len(model.states)
        x0 = [mpmath.mpf(str(_number(guess[s], s))) for s in model.states]
        mu0 = mpmath.mpf(str(_number(guess[parameter], parameter)))
        w0 = mpmath.mpf(str(_number(guess["omega"], "omega"))) if "omega" in guess else \
            _omega_guess(prob, x0, mu0)

        def G(*z):
            x, m, w = list(z[:n]), z[n], z[n + 1]
            chi = prob.chi(x, m, mpmath.mpc(0, w))
            return [*prob.f(*x, m), mpmath.re(chi), mpmath.im(chi)]
        try:
            sol = mpmath.findroot(G, [*x0, mu0, w0])
        except (ValueError, ZeroDivisionError) as exc:
            raise NoHopfPointError(f"no Hopf point found near the guess ({exc}); try another "
                                   "guess (or give omega)", reason="numeric_no_convergence") from None
        sol = [sol[i] for i in range(n + 2)]
        x, mu_c, omega = sol[:n], sol[n], abs(sol[n + 1])
        mats, delays = prob.at(x, mu_c)
        second = [{k: f(*x, mu_c) for k, f in t.items()} for t in prob.second]
        third = [{k: f(*x, mu_c) for k, f in t.items()} for t in prob.third]
        c1, q, qq = projection_c1(mats, delays, prob.forms.slots, second, third, omega)
        slope = _slope(prob, x, mu_c, omega, n)
        re_c1 = mpmath.re(c1)
        l1 = re_c1 / omega
        classification = (Classification.SUPERCRITICAL if l1 < 0 else Classification.SUBCRITICAL) \
            if abs(l1) > mpmath.mpf(10) ** (-digits // 2) else Classification.DEGENERATE
        coefficients = {s: -4 * mpmath.re(slope) * abs(q[i]) ** 2 / (qq * re_c1)
                        for i, s in enumerate(model.states)}
        residual = abs(prob.chi(x, mu_c, mpmath.mpc(0, omega)))
        return NumericDelayHopf(
            model=model, parameter=parameter, mode="delay" if mu in model.delays else "parameter",
            values=values, digits=digits,
            equilibrium={s: +v for s, v in zip(model.states, x)}, critical_value=+mu_c,
            omega=+omega, period=2 * mpmath.pi / omega, c1=+c1, l1=+l1,
            transversality=+mpmath.re(slope), eigenvalue_derivative=+slope,
            classification=classification, amplitude_coefficients=coefficients,
            residual=residual)


def _number(value, name):
    from ..model.expressions import convert_sympy, parse_expression
    if isinstance(value, str):
        value = parse_expression(value, {}, context=f"value of {name!r}")
    else:
        value = convert_sympy(value, {}, context=f"value of {name!r}")
    if value.free_symbols:
        raise ParameterError(f"the value of {name!r} must be a number")
    return sympy.Float(value, 40)


def _omega_guess(prob, x, mu):
    """The largest imaginary part among the eigenvalues of the undelayed linear part."""
    mats, _ = prob.at(x, mu)
    total = mats[0]
    for A in mats[1:]:
        total = total + A
    eig = mpmath.eig(total, left=False, right=False)
    if isinstance(eig, tuple):
        eig = eig[0]
    parts = [abs(mpmath.im(z)) for z in eig]
    return max(parts) if parts and max(parts) > 0 else mpmath.mpf(1)


def _slope(prob, x, mu_c, omega, n):
    h = mpmath.mpf(10) ** (-(mpmath.mp.dps // 3))
    roots = []
    for m in (mu_c - h, mu_c + h):
        xs = mpmath.findroot(lambda *z: prob.f(*z, m), x) if n > 1 else \
            [mpmath.findroot(lambda z: prob.f(z, m)[0], x[0])]
        xs = [xs[i] for i in range(n)]
        roots.append(mpmath.findroot(lambda z: prob.chi(xs, m, z), mpmath.mpc(0, omega)))
    return (roots[1] - roots[0]) / (2 * h)
