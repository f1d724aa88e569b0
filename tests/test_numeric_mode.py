"""The numeric mode (hopf(..., guess=...)) and non-polynomial fields in the
exact engine: exponentials, Hill functions with a symbolic exponent, and the
Hodgkin-Huxley equations, whose equilibrium has no closed form."""

import mpmath
import pytest
import sympy

from criticality import Model, ParameterError, hopf, hopf_all

from test_routes_agree import random_hopf_model

# Hodgkin and Huxley, J. Physiol. 117 (1952) 500-544: the squid-axon equations
# with V the depolarisation from rest in mV, C = 1 uF/cm^2, g_Na = 120,
# g_K = 36, g_L = 0.3 mS/cm^2, E_Na = 115, E_K = -12, E_L = 10.6 mV (from memory).
HODGKIN_HUXLEY = {
    "V": "I - 120*m^3*h*(V - 115) - 36*n^4*(V + 12) - 3/10*(V - 106/10)",
    "m": "(1/10)*(25 - V)/(exp((25 - V)/10) - 1)*(1 - m) - 4*exp(-V/18)*m",
    "h": "(7/100)*exp(-V/20)*(1 - h) - h/(exp((30 - V)/10) + 1)",
    "n": "(1/100)*(10 - V)/(exp((10 - V)/10) - 1)*(1 - n) - (1/8)*exp(-V/80)*n",
}


def test_hodgkin_huxley_subcritical_onset_near_9_78():
    """The squid-axon model loses stability by a subcritical Hopf bifurcation
    at an applied current of about 9.78 uA/cm^2 (Rinzel and Miller, Math.
    Biosci. 49 (1980) 27-59, numerical continuation of the Hodgkin-Huxley
    equations; value from memory), located here from a rough guess."""
    model = Model(states=["V", "m", "h", "n"], equations=HODGKIN_HUXLEY,
                  parameters={"I": "real"})
    r = hopf(model, "I", guess={"V": 5, "m": 0.08, "h": 0.45, "n": 0.38, "I": 10},
             digits=15, order=5)
    assert r.status.startswith("numeric")
    assert abs(float(r.critical_value) - 9.78) < 0.01
    assert r.classification == "subcritical" and r.l1 > 0
    assert r.condition("others_stable").status == "holds"
    assert r.condition("transversal").status == "holds" and r.transversality > 0
    assert r.cycle.side == "below" and r.cycle.stable is False
    assert 0 < float(r.equilibrium["V"]) < 10
    assert r.routes_agree and r.l2 is not None


@pytest.mark.slow
@pytest.mark.parametrize("n,seed", [(2, 3), (3, 4), (4, 9)])
def test_numeric_mode_agrees_with_exact_engine(n, seed):
    """On random polynomial models the numeric mode, started away from the
    point, reproduces the exact critical value, omega, l1 and l2 to the digits
    it claims (the exact results evaluated by mpmath)."""
    model, origin = random_hopf_model(n, seed)
    exact = hopf(model, "mu", equilibrium=origin, order=5)
    guess = {s: 0.01 * (i + 1) for i, s in enumerate(model.states)}
    guess["mu"] = 0.03
    num = hopf(model, "mu", guess=guess, digits=25, order=5)
    claimed = int(num.status.split("(")[1].split()[0])
    assert claimed >= 20
    tol = 10.0 ** (-claimed + 2)
    e = exact.evaluate(digits=40)
    with mpmath.workdps(40):
        assert abs(mpmath.mpf(str(num.critical_value))) < tol
        assert abs(mpmath.mpf(str(num.omega)) - e.omega) < tol * e.omega
        assert abs(mpmath.mpf(str(num.l1)) - e.l1) < tol * max(1, abs(e.l1))
        assert abs(mpmath.mpf(str(num.l2)) - e.lyapunov_coefficients[1]) < \
            tol * max(1, abs(e.lyapunov_coefficients[1]))


@pytest.mark.slow
def test_hill_function_with_symbolic_exponent():
    """A Goodwin-type loop with repression a/(1 + z^p), p symbolic: the exact
    engine, with the family parametrised by the equilibrium, agrees with the
    numeric mode at p = 20, z0 = 1 (critical c = (3 + sqrt 5)/2, checked by
    hand from the Hurwitz condition 2 (1 + c)^2 (1 + z^p) = c p z^p)."""
    model = Model(states=["x", "y", "z"],
                  parameters={"a": "positive", "p": "positive", "c": "positive"},
                  equations={"x": "a/(1 + z^p) - x", "y": "x - y", "z": "y - c*z"})
    results = hopf_all(model, "c", eliminate=["a", "x", "y"], assume={"z_eq": "positive"})
    at = [r.evaluate(p=20, z_eq=1, digits=25) for r in results]
    upper = max(at, key=lambda e: e.critical_value)
    with mpmath.workdps(30):
        assert abs(upper.critical_value - (3 + mpmath.sqrt(5)) / 2) < 1e-22
    num = hopf(model, "c", guess={"x": 2.5, "y": 2.5, "z": 1.1, "c": 2.5},
               values={"a": "3 + sqrt(5)", "p": 20}, digits=20)
    with mpmath.workdps(30):
        assert abs(mpmath.mpf(str(num.critical_value)) - upper.critical_value) < 1e-17
        assert abs(mpmath.mpf(str(num.l1)) - upper.l1) < 1e-17
        assert abs(mpmath.mpf(str(num.omega)) - upper.omega) < 1e-17
    assert abs(float(num.equilibrium["z"]) - 1) < 1e-15


@pytest.mark.slow
def test_exothermic_reactor_with_exponential_rate():
    """An exothermic stirred-tank reactor u' = -u + Da (1 - u) e^T,
    T' = -(1 + beta) T + B Da (1 - u) e^T (the large-activation-energy limit):
    the exact engine (parametrised by T0) and the numeric mode agree on l1 at
    B = 14, T0 = 3."""
    model = Model(states=["u", "T"],
                  parameters={"Da": "positive", "B": "positive", "beta": "positive"},
                  equations={"u": "-u + Da*(1 - u)*exp(T)",
                             "T": "-(1 + beta)*T + B*Da*(1 - u)*exp(T)"})
    results = hopf_all(model, "beta", eliminate=["Da", "u"], assume={"T_eq": "positive"})
    B, T0, beta = model.symbols["B"], sympy.Symbol("T_eq", positive=True), model.symbols["beta"]
    point = {B: 14, T0: 3}
    r = next(r for r in results if r.omega_squared.xreplace(point) > 0)
    e = r.evaluate(B=14, T_eq=3, digits=30)
    da = sympy.sympify(r.substitutions["Da"]).xreplace(point).xreplace(
        {beta: r.critical_value.xreplace(point)})
    num = hopf(model, "beta", guess={"u": 0.6, "T": 3.1, "beta": float(e.critical_value) + 0.05},
               values={"B": 14, "Da": da}, digits=20)
    with mpmath.workdps(30):
        assert abs(mpmath.mpf(str(num.critical_value)) - e.critical_value) < 1e-17
        assert abs(mpmath.mpf(str(num.l1)) - e.l1) < 1e-16 * max(1, abs(e.l1))
    assert abs(float(num.equilibrium["T"]) - 3) < 1e-15


def test_guess_errors_are_specific():
    """A guess missing a state, naming an unknown key, or a parameter without a
    value gives a ParameterError that names it."""
    model = Model(states=["x", "y"], parameters={"mu": "real", "k": "real"},
                  equations={"x": "mu*x - y + k*x^3", "y": "x + mu*y"})
    with pytest.raises(ParameterError, match="'y'"):
        hopf(model, "mu", guess={"x": 0, "mu": 0}, values={"k": -1})
    with pytest.raises(ParameterError, match="'z'"):
        hopf(model, "mu", guess={"x": 0, "y": 0, "z": 1, "mu": 0}, values={"k": -1})
    with pytest.raises(ParameterError, match="'k'"):
        hopf(model, "mu", guess={"x": 0, "y": 0, "mu": 0})


def test_numeric_result_states_its_accuracy():
    """The status and a note say that the result is numeric and how many
    digits are correct."""
    model = Model(states=["x", "y"], parameters={"mu": "real"},
                  equations={"x": "mu*x - y - x^3", "y": "x + mu*y - y^3 + x*y"})
    r = hopf(model, "mu", guess={"x": 0.1, "y": 0.1, "mu": 0.1}, digits=12)
    assert r.status == "numeric (12 correct digits)"
    assert any("numeric mode" in n for n in r.notes)
    assert r.classification == "supercritical"
    assert abs(float(r.l1) + 1.5) < 1e-11  # 2a/omega, a = (f_xxx + g_yyy)/16 = -3/4
