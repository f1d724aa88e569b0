"""Numerical integration of a model near its Hopf point (internal to validation).

Pipeline place: result -> **simulation** -> validation report.

:func:`prepare` turns a :class:`~criticality.hopf_analysis.results.HopfResult` and a
parameter point into plain floats and numpy callables (the right-hand side and
its Jacobian lambdified from the ORIGINAL model, the equilibrium as a function
of the bifurcation parameter).  :func:`measure_cycle` integrates past the
transient and measures amplitudes and period; :func:`bracket` starts inside
and outside a predicted unstable cycle and reports where each start goes.
numpy and scipy are imported by the caller and passed in (they are an
optional extra).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any, Callable, Mapping

import mpmath
import sympy

from ..errors import ParameterError, ValidationRunError
from ..kinds import RunStatus, coerce

if TYPE_CHECKING:
    from ..hopf_analysis.results import HopfResult

__all__ = ["Setup", "LocalFrame", "RunOutcome", "prepare", "local_frame", "measure_cycle",
           "shoot_cycle", "bracket", "settle_time"]

#: the residual transient, relative to the starting deviation, that the
#: integration waits for before measuring
_SETTLE = 1e-5


@dataclass(frozen=True)
class Setup:
    """Floats and callables of one validation problem.

    ``rhs(mu, y)`` and ``jac(mu, y)`` evaluate the original model with every
    other parameter fixed; ``equilibrium(mu)`` gives the equilibrium the result
    follows; ``k`` are the amplitude coefficients ``k_j`` (amplitude_j^2 =
    k_j (mu - mu_c)); ``others`` the eigenvalues at the critical point other
    than the pair +-i omega.
    """

    states: tuple
    values: Mapping[str, float]
    mu_c: float
    omega: float
    beta1: float
    re_c1: float
    l1: float
    slope: float
    k: Mapping[str, float]
    others: tuple
    rhs: Callable
    jac: Callable
    equilibrium: Callable

    @property
    def side_sign(self) -> int:
        """+1 when the cycle exists above mu_c, -1 below."""
        total = sum(self.k.values())
        if not math.isfinite(total) or total == 0:
            raise ValidationRunError(
                "the predicted cycle has no definite side at this parameter point (l1 = 0 or "
                "transversality 0): the local prediction says nothing to check here")
        return 1 if total > 0 else -1

    @property
    def radius_coefficient(self) -> float:
        """``rho^2 / |mu - mu_c|`` for the unit-normalised eigenvector."""
        return abs(sum(self.k.values())) / 4.0

    @property
    def gap(self) -> float:
        """The smallest |Re| of the other eigenvalues (inf in the plane)."""
        return min((abs(e.real) for e in self.others), default=math.inf)


def _float(x) -> float:
    if isinstance(x, (mpmath.mpc, complex)):
        return float(mpmath.re(x))
    return float(x)


def _substitute(expr, by_name: Mapping) -> sympy.Expr:
    repl = {s: by_name[s.name] for s in expr.free_symbols if s.name in by_name}
    return expr.xreplace(repl)


def prepare(result: HopfResult, values: Mapping, np: Any) -> Setup:
    """Evaluate ``result`` at ``values`` and lambdify the original model.

    Raises
    ------
    ParameterError
        If a parameter lacks a value or the branch has no Hopf point there
        (``InadmissiblePointError``; both from :meth:`HopfResult.evaluate`),
        or the model keeps a symbol with no value.
    ValidationRunError
        If the equilibrium or the right-hand side is not real and finite.
    """
    # evaluate raises the library's own errors, each saying what is undefined
    # where (InadmissiblePointError for a point with no Hopf point; a pole of
    # an amplitude coefficient, e.g. at l1 = 0, evaluates to NaN and is
    # reported below); anything else is a defect and is not renamed here
    num = result.evaluate(values, digits=20)
    by_name = dict(num.values)
    mu = result.parameter_symbol
    by_name.pop(result.parameter, None)
    # parameters eliminated in favour of equilibrium coordinates (parametrised families)
    for name, expr in result.substitutions.items():
        by_name[name] = _substitute(expr, by_name)
    model = result.model
    states = tuple(model.state_symbols)
    eqs = [_substitute(e, by_name) for e in model.equations]
    point = [_substitute(result.equilibrium[s], by_name) for s in model.states]
    allowed = set(states) | {mu}
    left = set().union(*(e.free_symbols for e in eqs + point)) - allowed
    if left:
        raise ParameterError(
            f"no value for {', '.join(sorted(map(str, left)))}: give "
            f"{'it' if len(left) == 1 else 'them'} as keyword arguments of validate()")
    jac = sympy.Matrix(eqs).jacobian(states)
    f_num = sympy.lambdify((mu, *states), eqs, modules="numpy", cse=True)
    j_num = sympy.lambdify((mu, *states), jac.tolist(), modules="numpy", cse=True)
    e_num = sympy.lambdify((mu,), point, modules="numpy")
    pair = {i for i, e in enumerate(num.eigenvalues) if abs(abs(mpmath.im(e)) - num.omega)
            < 1e-8 * (1 + num.omega) and abs(mpmath.re(e)) < 1e-8 * (1 + num.omega)}
    others = tuple(complex(e) for i, e in enumerate(num.eigenvalues) if i not in pair)
    slope = sympy.N(_substitute(result.cycle.frequency_slope, by_name), 20)
    return Setup(
        states=tuple(model.states),
        values={k: float(sympy.N(v)) for k, v in num.values.items() if k != result.parameter},
        mu_c=_float(num.critical_value), omega=_float(num.omega),
        beta1=_float(num.transversality), re_c1=_float(mpmath.re(num.c1)), l1=_float(num.l1),
        slope=float(sympy.re(slope)) if slope.is_number else math.nan,
        k={s: _float(v) for s, v in num.amplitude_coefficients.items()}, others=others,
        rhs=lambda m, y: np.asarray(f_num(m, *y), dtype=float),
        jac=lambda m, y: np.asarray(j_num(m, *y), dtype=float),
        equilibrium=lambda m: _real_point(np, e_num(m), m))


def _real_point(np, raw, m):
    arr = np.asarray(raw, dtype=complex)
    if not np.all(np.isfinite(arr)) or np.any(np.abs(arr.imag) > 1e-12 * (1 + np.abs(arr.real))):
        raise ValidationRunError(f"the equilibrium is not real and finite at the parameter value "
                                 f"{m!r}; choose a smaller offset")
    return arr.real.astype(float)


@dataclass(frozen=True)
class LocalFrame:
    """The equilibrium and the critical eigenvectors at one parameter value.

    ``q`` is the unit eigenvector of the eigenvalue next to ``i omega``;
    ``pbar`` the left eigenvector with ``pbar . q = 1``, so that
    ``z = pbar . (x - x0)`` is the complex center coordinate and ``|z|`` the
    radius in the convention of the result.
    """

    mu: float
    x0: object
    eigenvalue: complex
    q: object
    pbar: object

    def start(self, np: Any, radius: float) -> Any:
        """The point ``x0 + 2 radius Re(q)`` (the predicted cycle at phase 0)."""
        return self.x0 + 2.0 * radius * np.real(self.q)

    def radius(self, np: Any, y: Any) -> float:
        return float(abs(np.dot(self.pbar, np.asarray(y) - self.x0)))


def local_frame(setup: Setup, mu: float, np: Any) -> LocalFrame:
    """The :class:`LocalFrame` at ``mu`` (numeric eigenvectors from numpy)."""
    x0 = setup.equilibrium(mu)
    A = setup.jac(mu, x0)
    if not np.all(np.isfinite(A)):
        raise ValidationRunError(f"the Jacobian is not finite at the equilibrium for mu = {mu!r}")
    lam, V = np.linalg.eig(A)
    i = int(np.argmin(np.abs(lam - 1j * setup.omega)))
    q = V[:, i] / np.linalg.norm(V[:, i])
    lam_t, U = np.linalg.eig(A.T)
    j = int(np.argmin(np.abs(lam_t - lam[i])))
    u = U[:, j]
    pbar = u / np.dot(u, q)
    return LocalFrame(mu, x0, complex(lam[i]), q, pbar)


@dataclass(frozen=True)
class RunOutcome:
    """What one integration found.

    ``status`` is ``"measured"``, ``"escaped"`` (the orbit left the
    neighbourhood), ``"decayed"`` (it fell onto the equilibrium) or
    ``"undecided"``; amplitudes and period are set when measured;
    ``multiplier`` (shooting only) is the largest modulus of the nontrivial
    Floquet multipliers.
    """

    status: RunStatus
    time: float
    amplitudes: Mapping[str, float] | None = None
    period: float | None = None
    residual: float | None = None
    multiplier: float | None = None

    def __post_init__(self) -> None:
        coerce(self, status=RunStatus)


def _solve(ivp, fun, jac, span, y0, method, rtol, atol, **extra):
    try:
        sol = ivp(fun, span, y0, method=method, rtol=rtol, atol=atol,
                  **({"jac": jac} if method in ("Radau", "BDF", "LSODA") else {}), **extra)
    except (ValueError, FloatingPointError, OverflowError) as exc:
        raise ValidationRunError(f"the integrator failed: {exc}") from exc
    if sol.status < 0:
        raise ValidationRunError(f"the integrator failed at t = {sol.t[-1]:.6g}: {sol.message}")
    return sol


def _escape_event(frame, np, limit):
    def event(t, y):
        return limit - frame.radius(np, y)
    event.terminal = True
    return event


def measure_cycle(setup: Setup, frame: LocalFrame, radius: float, *, direction: int,
                  transient: float, window: float, method: str, rtol: float, np: Any,
                  ivp: Any) -> RunOutcome:
    """Integrate from the predicted cycle, wait ``transient``, then measure.

    Amplitudes (half peak-to-peak) come from the extrema of every state over
    the window, located as events where the state's derivative vanishes; the
    period from successive upward crossings of the mean of the state with the
    largest amplitude, located on the dense output.
    """
    mu = frame.mu
    fun = (lambda t, y: direction * setup.rhs(mu, y))
    jac = (lambda t, y: direction * setup.jac(mu, y))
    atol = rtol * 1e-2 * radius
    escape = _escape_event(frame, np, 8.0 * radius)
    y0 = frame.start(np, radius)
    first = _solve(ivp, fun, jac, (0.0, transient), y0, method, rtol, atol,
                   events=escape, t_eval=[transient])
    if first.status == 1:
        return RunOutcome(RunStatus.ESCAPED, float(first.t_events[0][0]))
    y1 = first.y[:, -1]
    sol = _solve(ivp, fun, jac, (transient, transient + window), y1, method, rtol, atol,
                 events=_extrema_events(setup, mu), dense_output=True)
    return _measurements(setup, sol, np, transient, window, radius, frame)


def _measurements(setup, sol, np, transient, window, radius, frame, least: int = 4):
    amps, halves = {}, []
    mid = transient + window / 2
    for j, name in enumerate(setup.states):
        times, ys = sol.t_events[j], sol.y_events[j]
        if len(times) < least:
            continue
        vals = ys[:, j]
        amps[name] = float(vals.max() - vals.min()) / 2
        early, late = vals[times < mid], vals[times >= mid]
        if len(early) >= 2 and len(late) >= 2:
            halves.append(((early.max() - early.min()) / 2, (late.max() - late.min()) / 2))
    if not amps or max(amps.values()) < 1e-3 * radius:
        # no state oscillates measurably: the orbit came to rest, here or elsewhere
        near = np.linalg.norm(sol.y[:, -1] - frame.x0) < 0.1 * radius
        return RunOutcome(RunStatus.DECAYED if near else RunStatus.ESCAPED, transient + window)
    ref = max(range(len(setup.states)), key=lambda j: amps.get(setup.states[j], -1.0))
    period = _period(sol, ref, np, transient, window, setup)
    drift = max((abs(b - a) / max(abs(b), 1e-300) for a, b in halves), default=0.0)
    return RunOutcome(RunStatus.MEASURED, transient + window, amps, period, drift)


def _period(sol, j, np, t0, window, setup):
    """Mean spacing of upward crossings of the mean, refined on the dense output."""
    from scipy.optimize import brentq

    per = 2 * math.pi / setup.omega
    n = max(64, int(64 * window / per))
    ts = np.linspace(t0, t0 + window, n + 1)
    xs = sol.sol(ts)[j]
    mean = (xs.max() + xs.min()) / 2
    g = xs - mean
    ups = np.nonzero((g[:-1] < 0) & (g[1:] >= 0))[0]
    if len(ups) < 2:
        return None
    roots = [brentq(lambda t: sol.sol(t)[j] - mean, ts[i], ts[i + 1], xtol=1e-14 * per)
             for i in ups]
    return float((roots[-1] - roots[0]) / (len(roots) - 1))


def _extrema_events(setup, mu):
    return [(lambda j: lambda t, y: setup.rhs(mu, y)[j])(j) for j in range(len(setup.states))]


def _newton_step(setup, frame, y, period, rtol, np, ivp):
    """One Newton step for (y(0), T) with y(T) = y(0) and Im(pbar . (y(0) - x0)) = 0."""
    n, mu = len(y), frame.mu

    def variational(t, big):
        state, mono = big[:n], big[n:].reshape(n, n)
        return np.concatenate([setup.rhs(mu, state), (setup.jac(mu, state) @ mono).ravel()])

    start = np.concatenate([y, np.eye(n).ravel()])
    sol = _solve(ivp, variational, None, (0.0, period), start, "DOP853", rtol,
                 rtol * 1e-3 * float(np.linalg.norm(y - frame.x0) + 1e-300), t_eval=[period])
    end, mono = sol.y[:n, -1], sol.y[n:, -1].reshape(n, n)
    phase = np.imag(frame.pbar)
    system = np.zeros((n + 1, n + 1))
    system[:n, :n] = mono - np.eye(n)
    system[:n, n] = setup.rhs(mu, end)
    system[n, :n] = phase
    residual = np.append(end - y, phase @ (y - frame.x0))
    try:
        return np.linalg.solve(system, -residual), mono
    except np.linalg.LinAlgError:
        return None, mono


def shoot_cycle(setup: Setup, frame: LocalFrame, radius: float, period: float, *, rtol: float,
                np: Any, ivp: Any, iterations: int = 30) -> RunOutcome:
    """Find the cycle by Newton's method on the periodic orbit (single shooting).

    For cycles that integration in neither time direction reaches (a
    subcritical cycle whose other eigenvalues are stable, a saddle-type
    cycle): unknowns are the start ``y(0)`` on the section
    ``Im(pbar . (y - x0)) = 0`` and the period ``T``; the monodromy matrix
    comes from the variational equations.  Steps are limited to half the
    predicted radius, so that Newton cannot jump onto the equilibrium.
    The converged orbit is integrated once more to measure the amplitudes.
    """
    y, T = frame.start(np, radius), float(period)
    tight = max(rtol * 1e-2, 1e-13)
    step = mono = None
    for _ in range(iterations):
        step, mono = _newton_step(setup, frame, y, T, tight, np, ivp)
        if step is None or not np.all(np.isfinite(step)):
            return RunOutcome(RunStatus.UNDECIDED, T)
        size = float(np.linalg.norm(step[:-1]))
        if size > 0.5 * radius:
            step = step * (0.5 * radius / size)
        y, T = y + step[:-1], T + step[-1]
        if T <= 0 or frame.radius(np, y) < 0.05 * radius:
            return RunOutcome(RunStatus.DECAYED, T)
        if size < 1e-10 * radius and abs(step[-1]) < 1e-10 * T:
            break
    else:
        return RunOutcome(RunStatus.UNDECIDED, T)
    mu = frame.mu
    sol = _solve(ivp, lambda t, v: setup.rhs(mu, v), None, (0.0, 1.25 * T), y, "DOP853", tight,
                 tight * 1e-2 * radius, events=_extrema_events(setup, mu), dense_output=True)
    out = _measurements(setup, sol, np, 0.0, 1.25 * T, radius, frame, least=2)
    return RunOutcome(out.status, T, out.amplitudes, T if out.amplitudes else None,
                      float(np.linalg.norm(step[:-1])) / radius, _largest_multiplier(np, mono))


def _largest_multiplier(np, mono) -> float | None:
    """The largest modulus of the Floquet multipliers other than the trivial 1."""
    if mono is None or not np.all(np.isfinite(mono)):
        return None
    values = np.linalg.eigvals(mono)
    rest = np.delete(values, int(np.argmin(np.abs(values - 1.0))))
    return float(np.max(np.abs(rest))) if rest.size else None


def bracket(setup: Setup, frame: LocalFrame, radius: float, factor: float, *, horizon: float,
            direction: int, method: str, rtol: float, np: Any, ivp: Any) -> RunOutcome:
    """Start at ``factor`` times the predicted radius; say where the orbit goes.

    The radius is measured in the center coordinate ``|pbar . (x - x0)|``,
    which does not oscillate along a cycle.  The run stops when the radius
    falls below half the starting radius (``"decayed"``) or grows past twice
    it (``"escaped"``); otherwise after ``horizon`` (``"undecided"``).
    """
    mu = frame.mu
    fun = (lambda t, y: direction * setup.rhs(mu, y))
    jac = (lambda t, y: direction * setup.jac(mu, y))
    start = factor * radius
    low = _escape_event(frame, np, 0.5 * start)
    low.direction = 1  # limit - radius goes from negative to positive as the radius falls
    high = _escape_event(frame, np, 2.0 * start)
    sol = _solve(ivp, fun, jac, (0.0, horizon), frame.start(np, start), method, rtol,
                 rtol * 1e-2 * radius, events=[low, high], t_eval=[horizon])
    if sol.status == 1:
        if len(sol.t_events[0]):
            return RunOutcome(RunStatus.DECAYED, float(sol.t_events[0][0]))
        return RunOutcome(RunStatus.ESCAPED, float(sol.t_events[1][0]))
    return RunOutcome(RunStatus.UNDECIDED, horizon)


def settle_time(setup: Setup, offset: float) -> float:
    """Time for the deviation from the cycle to shrink by ``_SETTLE``.

    The cycle attracts radially at the rate ``2 |beta'(mu_c) offset|``; the
    other eigenvalues pull onto the center manifold at the rate of the gap.
    """
    radial = 2.0 * abs(setup.beta1 * offset)
    span = math.log(1 / _SETTLE) / radial
    if math.isfinite(setup.gap) and setup.gap > 0:
        span += math.log(1 / _SETTLE) / setup.gap
    return span
