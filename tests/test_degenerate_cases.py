"""Degenerate and bad cases get specific, explained errors or statuses."""

import json

import pytest
import sympy

from criticality import (DegenerateHopfError, Model, NoHopfPointError, NotAnalyticError,
                         NotAnEquilibriumError, ParameterError, hopf)

ORIGIN2 = {"x": 0, "y": 0}


def _model(equations, **params):
    states = list(equations)
    return Model(states=states, equations=equations, parameters=params or {"mu": "real"})


def test_no_crossing():
    """Eigenvalues -1, -1 for every mu: the critical set is empty."""
    m = _model({"x": "-x + mu*y", "y": "-y"})
    with pytest.raises(NoHopfPointError) as err:
        hopf(m, "mu", equilibrium=ORIGIN2)
    assert err.value.reason == "empty_critical_set"


def test_neutral_saddle_is_not_hopf():
    """x' = y, y' = x + mu y: the trace vanishes at mu = 0 but the eigenvalues
    are +-1 (omega^2 = -1)."""
    m = _model({"x": "y", "y": "x + mu*y"})
    with pytest.raises(NoHopfPointError) as err:
        hopf(m, "mu", equilibrium=ORIGIN2)
    assert err.value.reason == "omega_squared_nonpositive"
    assert "neutral saddle" in str(err.value)


def test_double_zero_eigenvalue():
    """x' = y, y' = mu y + x^2 has a double zero eigenvalue at mu = 0."""
    m = _model({"x": "y", "y": "mu*y + x^2"})
    with pytest.raises(DegenerateHopfError) as err:
        hopf(m, "mu", equilibrium=ORIGIN2)
    assert err.value.reason == "zero_eigenvalue"
    assert "Bogdanov-Takens" in str(err.value)


def test_fold_hopf():
    """A zero eigenvalue beside the crossing pair."""
    m = _model({"x": "mu*x - y + x*z", "y": "x + mu*y", "z": "z^2 + x^2"})
    with pytest.raises(DegenerateHopfError) as err:
        hopf(m, "mu", equilibrium={"x": 0, "y": 0, "z": 0})
    assert err.value.reason == "zero_eigenvalue"


def test_two_critical_pairs():
    """Two pairs cross at mu = 0 (frequencies 1 and 2)."""
    m = _model({"a": "mu*a - b + a^2", "b": "a + mu*b", "c": "mu*c - 2*d", "d": "2*c + mu*d + c^3"})
    with pytest.raises(DegenerateHopfError) as err:
        hopf(m, "mu", equilibrium={"a": 0, "b": 0, "c": 0, "d": 0})
    assert err.value.reason == "two_critical_pairs"


def test_l1_identically_zero():
    """A linear rotation has l1 = l2 = 0: the result says degenerate."""
    m = _model({"x": "mu*x - y", "y": "x + mu*y"})
    r = hopf(m, "mu", equilibrium=ORIGIN2)
    assert r.classification == "degenerate" and r.l1 == 0 and r.l2 == 0
    assert "l1 = l2 = 0 identically" in r.verdict


def test_l2_decides_where_l1_vanishes_identically():
    """With only a quintic term, l1 = 0 and the engine goes on to l2 by itself
    (l2 = 4a for this planar normal form: see test_higher_order)."""
    m = Model(states=["x", "y"], equations={"x": "mu*x - y + a*x*(x^2 + y^2)^2",
                                            "y": "x + mu*y + a*y*(x^2 + y^2)^2"},
              parameters={"mu": "real", "a": "real"})
    r = hopf(m, "mu", equilibrium=ORIGIN2)
    assert r.l1 == 0 and r.l2 == 4 * m.symbols["a"]
    assert r.verdict.startswith("l1 = 0 identically; by l2: supercritical exactly where a < 0")


def test_parameter_absent():
    m = Model(states=["x", "y"], equations={"x": "-y", "y": "x - y"}, parameters={"mu": "real"})
    with pytest.raises(NoHopfPointError) as err:
        hopf(m, "mu", equilibrium=ORIGIN2)
    assert err.value.reason == "parameter_absent"


def test_unknown_parameter_suggests():
    m = _model({"x": "mu*x - y", "y": "x + mu*y"})
    with pytest.raises(ParameterError, match="mu"):
        hopf(m, "nu", equilibrium=ORIGIN2)


def test_not_analytic():
    m = _model({"x": "mu*x - y + sqrt(x)", "y": "x + mu*y"})
    with pytest.raises(NotAnalyticError, match="'x'.*with respect to x"):
        hopf(m, "mu", equilibrium=ORIGIN2)


def test_not_an_equilibrium_names_component_and_residual():
    m = _model({"x": "mu*x - y + 1", "y": "x + mu*y"})
    with pytest.raises(NotAnEquilibriumError, match="'x' equals 1"):
        hopf(m, "mu", equilibrium=ORIGIN2)


def test_equilibrium_must_name_states():
    m = _model({"x": "mu*x - y", "y": "x + mu*y"})
    with pytest.raises(Exception, match="not a state"):
        hopf(m, "mu", equilibrium={"x": 0, "z": 0})


def _quintic(s):
    return Model(states=["x", "y"], equations={"x": f"mu*x - y + ({s})*x*(x^2 + y^2)^2",
                                               "y": f"x + mu*y + ({s})*y*(x^2 + y^2)^2"},
                 parameters={"mu": "real"})


@pytest.mark.parametrize("s,side,stable,root", [(-1, "above", True, "mu"),
                                                 (1, "below", False, "-mu")])
def test_cycle_prediction_when_l2_decides(s, side, stable, root):
    """z' = (mu + i) z + s z|z|^4 (z = x + i y) has the cycle |z|^4 = -mu/s, so
    x and y oscillate with half peak-to-peak amplitude (-mu/s)^(1/4) on the
    side where -mu/s > 0 (the radial equation r' = mu r + s r^5; common
    practice, no source).  The result states the fourth-root law and keeps
    the square-root slopes empty."""
    r = hopf(_quintic(s), "mu", equilibrium=ORIGIN2)
    mu = r.parameter_symbol
    c = r.cycle
    assert (c.side, c.stable, c.amplitude_power, c.amplitude_coefficients) == \
        (side, stable, 4, {})
    expected = sympy.Pow(sympy.sympify(root, locals={"mu": mu}), sympy.Rational(1, 4))
    for state in ("x", "y"):
        assert sympy.simplify(c.amplitudes[state] - expected) == 0
    # unit normalisation: |q_x|^2 = 1/2, so amplitude^2 = 2 rho^2
    assert sympy.simplify(2 * c.radius_squared - expected ** 2) == 0
    assert c.frequency_slope == 0
    text = " ".join(r.summary().split())
    assert "|mu - mu_c|^(1/4)" in text and "l2 decides" in text
    assert ("fourth root" in text) == (s == -1)  # the supercritical sentence names the law
    assert json.loads(r.to_json())["cycle"]["amplitude_power"] == 4


@pytest.mark.slow
def test_fourth_root_amplitude_against_scipy():
    """scipy's solve_ivp (a general-purpose reference integrator) run to the
    attracting cycle of x' = mu x - y - x (x^2 + y^2)^2, y' = x + mu y -
    y (x^2 + y^2)^2 at mu = 1/625 and 16/625: the amplitude of x matches the
    predicted mu^(1/4) (0.2 and 0.4) and doubles when mu grows 16-fold."""
    import numpy as np
    from scipy.integrate import solve_ivp

    r = hopf(_quintic(-1), "mu", equilibrium=ORIGIN2)
    mu_sym = r.parameter_symbol
    for mu in (sympy.Rational(1, 625), sympy.Rational(16, 625)):
        predicted = float(r.cycle.amplitudes["x"].subs(mu_sym, mu))
        m = float(mu)

        def f(t, u):
            x, y = u
            q = (x * x + y * y) ** 2
            return [m * x - y - x * q, x + m * y - y * q]

        # the cycle attracts at rate 4 mu (r' = mu r - r^5 linearised at r^4 = mu)
        end = 3 / m
        sol = solve_ivp(f, (0, end), [0.9 * predicted, 0.0], rtol=1e-10, atol=1e-12,
                        dense_output=True)
        tail = sol.sol(np.linspace(end - 20, end, 2001))[0]
        measured = (np.max(tail) - np.min(tail)) / 2
        assert abs(measured - predicted) / predicted < 0.02


def test_square_root_quantities_refuse_the_fourth_root_law():
    """The sweep's radius coefficient assumes amplitude^2 ~ (mu - mu_c); where
    l2 decides it says so instead of returning 0."""
    from criticality.checks.sweeps import quantity_expression

    r = hopf(_quintic(-1), "mu", equilibrium=ORIGIN2)
    with pytest.raises(ParameterError, match="1/4 power law"):
        quantity_expression(r, "radius_coefficient")
    assert quantity_expression(r, "amplitude:x") == r.cycle.amplitudes["x"]


def test_validation_says_it_does_not_simulate_the_fourth_root_law():
    from criticality import ValidationRunError, validate

    r = hopf(_quintic(-1), "mu", equilibrium=ORIGIN2)
    with pytest.raises(ValidationRunError, match="1/4 power law from l2"):
        validate(r)
