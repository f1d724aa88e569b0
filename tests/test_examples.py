"""The examples in examples/: each script runs and prints its verdict, each
verdict is the expected one, and the closed forms are checked against
reference libraries (mpmath eigenvalues; scipy simulation, marked slow)."""

from __future__ import annotations

import importlib.util
import subprocess
import sys
from pathlib import Path

import mpmath
import pytest
import sympy

EXAMPLES = Path(__file__).resolve().parent.parent / "examples"
NAMES = ("plankton_grazer", "firing_rate_unit", "cooled_reactor", "lagged_oscillator")


def load(name):
    spec = importlib.util.spec_from_file_location(f"example_{name}", EXAMPLES / f"{name}.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


@pytest.fixture(scope="module")
def results():
    return {name: load(name).analyse() for name in NAMES}


def test_every_example_has_a_model_file_and_a_script():
    for name in NAMES:
        assert (EXAMPLES / f"{name}.toml").is_file() and (EXAMPLES / f"{name}.py").is_file()


@pytest.mark.slow
@pytest.mark.parametrize("name", NAMES)
def test_scripts_run_and_print_the_verdict(name):
    done = subprocess.run([sys.executable, str(EXAMPLES / f"{name}.py")], capture_output=True,
                          text=True, timeout=300)
    assert done.returncode == 0, done.stderr
    assert "supercritical" in done.stdout or "subcritical" in done.stdout


@pytest.mark.slow
def test_plankton_grazer_is_supercritical_wherever_grazers_can_persist(results):
    """Supercritical exactly where e*g > m, the condition for a positive
    diatom steady state P = m*s/(e*g - m)."""
    r = results["plankton_grazer"]
    assert r.classification == "depends"
    where = r.supercritical_where
    e, g, m = (r.model.symbols[n] for n in ("e", "g", "m"))
    assert isinstance(where, sympy.StrictGreaterThan) and sympy.expand(where.lhs - (e * g - m)) == 0
    assert r.evaluate({}).classification == "supercritical"


@pytest.mark.slow
def test_firing_rate_unit_is_supercritical(results):
    r = results["firing_rate_unit"]
    assert r.classification == "supercritical"
    assert r.verdict == "supercritical for all admissible parameters"
    c, eps = r.model.symbols["c"], r.model.symbols["eps"]  # the declared symbols
    assert r.critical_value == c * eps + 1


def test_cooled_reactor_verdict_depends_on_the_steady_state(results):
    """Parametrised by (c_eq, T_eq): supercritical at low conversion,
    subcritical at c_eq = 1/2 (both with a positive critical cooling)."""
    module = load("cooled_reactor")
    r = results["cooled_reactor"]
    assert r.classification == "depends" and r.equilibrium_how == "parametrised"
    assert set(r.substitutions) == {"k", "T0"}
    low, high = (r.evaluate(p) for p in module.POINTS)
    assert low.classification == "supercritical" and high.classification == "subcritical"
    assert low.critical_value > 0 and high.critical_value > 0


def test_lagged_oscillator_verdict_is_the_sign_of_the_cubic_stiffness(results):
    r = results["lagged_oscillator"]
    assert r.classification == "depends"
    assert r.supercritical_where == sympy.StrictGreaterThan(r.model.symbols["k3"], 0)
    assert r.evaluate({"k3": "1/4"}).classification == "supercritical"
    assert r.evaluate({"k3": "-1/4"}).classification == "subcritical"


POINTS = {"plankton_grazer": {}, "firing_rate_unit": {}, "lagged_oscillator": {},
          "cooled_reactor": {"c_eq": "1/4", "T_eq": "1"}}


@pytest.mark.parametrize("name", NAMES)
def test_critical_pair_against_mpmath_eigenvalues(name, results):
    """At the critical value the Jacobian, differentiated numerically by
    mpmath from the model's own right-hand sides (mpmath.diff, mpmath.eig:
    reference library), has eigenvalues +-i*omega."""
    r = results[name]
    num = r.evaluate(POINTS[name], digits=30)
    with mpmath.workdps(40):
        own = dict(r.model.symbols, **{s.name: s for s in r.l1.free_symbols})
        values = {own[k]: v for k, v in num.values.items()}
        values[r.parameter_symbol] = sympy.Float(mpmath.nstr(num.critical_value, 35), 35)
        for k, v in r.substitutions.items():
            values[own[k]] = sympy.N(v.xreplace(values), 40)
        states = [own[s] for s in r.model.states]
        rhs = [sympy.lambdify(states, e.xreplace(values), "mpmath") for e in r.model.equations]
        x0 = [mpmath.mpf(mpmath.nstr(num.equilibrium[s], 35)) for s in r.model.states]
        n = len(states)
        J = mpmath.matrix(n, n)
        for i in range(n):
            for j in range(n):
                J[i, j] = mpmath.diff(lambda t: rhs[i](*[t if k == j else x0[k]
                                                          for k in range(n)]), x0[j])
        eigs = mpmath.eig(J, left=False, right=False)
        assert min(abs(e - mpmath.mpc(0, num.omega)) for e in eigs) < mpmath.mpf(10) ** -15
        others = [e for e in eigs if abs(abs(mpmath.im(e)) - num.omega) > 1e-10]
        assert all(mpmath.re(e) < 0 for e in others)


def _simulate_lagged(k3, offset):
    """Simulate the lagged oscillator slightly past onset (scipy's DOP853)."""
    import numpy as np
    from scipy.integrate import solve_ivp

    zeta, tau = 0.1, 0.5
    g = zeta * (tau**2 + tau * zeta + 1) / (tau * zeta + 1) + offset

    def field(t, s):
        x, v, w = s
        return [v, -x - k3 * x**3 - zeta * v + w, (g * v - w) / tau]

    def escape(t, s):
        return 2.0 - abs(s[0])
    escape.terminal = True
    sol = solve_ivp(field, (0, 6000), [1e-3, 0, 0], method="DOP853", rtol=1e-9, atol=1e-12,
                    events=escape, dense_output=True)
    if sol.status == 1:
        return float("inf")
    t = np.linspace(5000, 6000, 20000)
    x = sol.sol(t)[0]
    return (x.max() - x.min()) / 2


@pytest.mark.slow
def test_lagged_oscillator_onset_by_simulation(results):
    """scipy's DOP853 confirms the verdict: for k3 = 1/4 a small cycle with the
    predicted amplitude appears just past onset; for k3 = -1/4 the motion
    leaves the neighbourhood (a jump to large amplitude)."""
    r = results["lagged_oscillator"]
    offset = 0.004
    predicted = r.evaluate({"k3": "1/4"}).amplitude(offset)["x"]
    simulated = _simulate_lagged(0.25, offset)
    assert abs(simulated - float(predicted)) < 0.1 * float(predicted)
    assert _simulate_lagged(-0.25, offset) > 10 * float(predicted)
