"""Choosing the equilibrium: solved, selected, parametrised, given with fixed values."""

import mpmath
import pytest
import sympy

from criticality import EquilibriumNotFoundError, Model, hopf

from models import BRUSSELATOR, LORENZ, LORENZ_EQUILIBRIUM
from reference_numeric import numeric_first_lyapunov


def test_solved_equilibrium_when_unique():
    """The Brusselator has one equilibrium; the engine finds it."""
    m = BRUSSELATOR
    r = hopf(m, "B")
    assert r.equilibrium == {"x": m.symbols["A"], "y": m.symbols["B"] / m.symbols["A"]}
    assert r.equilibrium_how == "solved"


def test_several_equilibria_are_listed_and_chosen_by_index():
    m = LORENZ
    with pytest.raises(EquilibriumNotFoundError, match="3 equilibria"):
        hopf(m, "r")
    r1, r2 = hopf(m, "r", equilibrium=1), hopf(m, "r", equilibrium=2)
    assert sympy.cancel(r1.critical_value - r2.critical_value) == 0
    assert sympy.cancel(r1.l1 - r2.l1) == 0  # the two symmetric equilibria agree
    with pytest.raises(EquilibriumNotFoundError, match="out of range"):
        hopf(m, "r", equilibrium=7)


def test_values_fix_parameters_named_in_a_given_equilibrium():
    """The equilibrium may name a parameter that values= fixes."""
    m = LORENZ
    r = hopf(m, "r", values={"b": "8/3"},
             equilibrium=LORENZ_EQUILIBRIUM)
    s = m.symbols["sigma"]
    assert sympy.cancel(r.critical_value - s * (3 * s + 17) / (3 * s - 11)) == 0


def test_parametrised_family():
    """x' = y - x^2 + k, y' = -x + mu y - x^2 y: eliminating k and y makes x_eq the
    family parameter; the critical value mu_c = x_eq (x_eq + 2) follows from the
    trace of the Jacobian (common practice, no source), and l1 agrees with the
    projection formula evaluated by mpmath (Kuznetsov, Elements of Applied
    Bifurcation Theory, 3rd ed., 2004, Section 3.5)."""
    m = Model(states=["x", "y"], equations={"x": "y - x^2 + k", "y": "-x + mu*y - x^2*y"},
              parameters={"mu": "real", "k": "real"})
    r = hopf(m, "mu", eliminate=["k", "y"])
    xe = sympy.Symbol("x_eq", real=True)
    assert sympy.expand(r.critical_value - xe * (xe + 2)) == 0
    assert r.equilibrium_how == "parametrised"
    x_eq = sympy.Rational(1, 5)
    mu_c = r.critical_value.subs(xe, x_eq)
    at = {m.symbols["mu"]: mu_c, m.symbols["x"]: x_eq,
          m.symbols["y"]: r.equilibrium["y"].subs({xe: x_eq, m.symbols["mu"]: mu_c})}
    at[m.symbols["k"]] = (x_eq ** 2 - at[m.symbols["y"]])
    _, l1, _ = numeric_first_lyapunov(m.equations, m.state_symbols, at, digits=30)
    with mpmath.workdps(30):
        assert abs(r.evaluate(x_eq=x_eq).l1 - l1) < 1e-25


@pytest.mark.slow
def test_disguised_algebraic_atoms_are_recognised():
    """A solved equilibrium with atanh written as a logarithm makes the
    tanh term an algebraic function of the equilibrium; the engine must see
    that f(x0) = 0 and find the critical gain a_c = (1 + c eps)/(1 - u_eq^2)
    (trace of the Jacobian; common practice, no source)."""
    m = Model(states=["u", "w"], equations={"u": "-u + tanh(a*u - b*w + I)", "w": "eps*(u - c*w)"},
              parameters={"a": "positive", "b": "positive", "eps": "positive", "c": "positive",
                          "I": "real"})
    r = hopf(m, "a", eliminate=["I", "w"])
    s = {"u_eq": sympy.Symbol("u_eq", real=True), "c": m.symbols["c"], "eps": m.symbols["eps"]}
    expected = (1 + s["c"] * s["eps"]) / (1 - s["u_eq"] ** 2)
    assert sympy.cancel(r.critical_value - expected) == 0
    assert r.routes_agree
