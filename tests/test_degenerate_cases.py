"""Degenerate and bad cases get specific, explained errors or statuses."""

import pytest

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
