"""The cycle prediction with k = -beta'/Re c1 kept as a quotient.

Where Re c1 is large (the eight-parameter food chain: 83,000 terms) the result
never forms k in the field: the division would take the norm of Re c1, which
cost most of the analysis.  Both routes describe the same cycle; these tests
force the quotient route on small models and compare every cycle quantity with
the route that divides, numerically at a sample point (internal consistency:
the division route itself is checked against published values in
test_hopf_references.py).  The two models are invented for these tests.
"""

import mpmath
import pytest
import sympy

from criticality import Model, hopf_all
from criticality.hopf_analysis import assemble

LOSSY = Model(states=["x", "y"],
              equations={"x": "A - (B + 1)*x + x**2*y - c*x**2", "y": "B*x - x**2*y"},
              parameters={"A": "positive", "B": "positive", "c": "positive"})
OSCILLATOR = Model(["x", "v", "w"], {"x": "v", "v": "-x - k3*x^3 - zeta*v + w",
                                     "w": "(g*v - w)/tau"},
                   {"g": "positive", "zeta": "positive", "tau": "positive", "k3": "real"})


def _value(expr, point):
    expr = sympy.sympify(expr)
    by_name = {s: point[s.name] for s in expr.free_symbols if s.name in point}
    return complex(expr.xreplace(by_name).evalf(30))


def _both(model, parameter, **kwargs):
    divided = hopf_all(model, parameter, **kwargs)
    saved = assemble._QUOTIENT_TERMS
    assemble._QUOTIENT_TERMS = -1
    try:
        quotient = hopf_all(model, parameter, **kwargs)
    finally:
        assemble._QUOTIENT_TERMS = saved
    assert len(divided) == len(quotient)
    return list(zip(divided, quotient))


@pytest.mark.parametrize("model, parameter, kwargs, point", [
    (LOSSY, "A", {"equilibrium": 0}, {"B": sympy.Rational(5, 2), "c": sympy.Rational(3, 10)}),
    (OSCILLATOR, "g", {"equilibrium": {"x": 0, "v": 0, "w": 0}},
     {"zeta": sympy.Rational(1, 3), "tau": sympy.Rational(7, 5), "k3": sympy.Rational(-2, 3)}),
])
def test_quotient_route_describes_the_same_cycle(model, parameter, kwargs, point):
    for divided, quotient in _both(model, parameter, **kwargs):
        mu = divided.parameter_symbol
        mu_c = _value(divided.critical_value, point)
        assert abs(mu_c - _value(quotient.critical_value, point)) < 1e-25
        k = _value(divided.cycle.radius_squared, {**point, mu.name: mu_c.real + 1}) - \
            _value(divided.cycle.radius_squared, {**point, mu.name: mu_c.real})
        # mu on the side where the cycle exists (k delta > 0)
        at = {**point, mu.name: sympy.Float(mu_c.real + (1e-3 if k.real > 0 else -1e-3), 30)}
        cd, cq = divided.cycle, quotient.cycle
        for a, b in [(cd.radius_squared, cq.radius_squared),
                     (cd.frequency_slope, cq.frequency_slope),
                     *[(cd.amplitudes[s], cq.amplitudes[s]) for s in model.states],
                     *[(cd.amplitude_coefficients[s], cq.amplitude_coefficients[s])
                       for s in model.states]]:
            va, vb = _value(a, at), _value(b, at)
            assert abs(va - vb) <= 1e-20 * max(1.0, abs(va)), (a, b)
        assert cd.side == cq.side
        if cd.side_condition is not None:
            # the two conditions (k > 0 and -beta' Re c1 > 0) agree at the point
            ta = bool(sympy.sympify(cd.side_condition.lhs).xreplace(
                {s: at[s.name] for s in cd.side_condition.free_symbols if s.name in at}) > 0)
            lhs = cq.side_condition.lhs
            tb = _value(lhs, at).real > 0
            assert ta == tb
        assert mpmath.almosteq(_value(divided.l1, point), _value(quotient.l1, point), 1e-25)


def test_amplitude_below_the_critical_value_is_positive():
    """A subcritical planar normal form x' = mu x - y + a x r^2, y' = x + mu y
    + a y r^2 (a > 0): in polar form r' = r (mu + a r^2), the cycle exists for
    mu < 0 with r = sqrt(-mu/a), and each coordinate's half peak-to-peak
    amplitude is r (Kuznetsov, Elements of Applied Bifurcation Theory, 3rd ed.,
    2004, the polar normal form of section 3.4; section number from memory).
    The amplitude was once written sqrt(-1/a) sqrt(mu), i.e. I sqrt(mu)/sqrt(a):
    negative for mu < 0."""
    m = Model(["x", "y"], {"x": "mu*x - y + a*x*(x^2 + y^2)",
                           "y": "x + mu*y + a*y*(x^2 + y^2)"},
              {"mu": "real", "a": "positive"})
    (r,) = hopf_all(m, "mu", equilibrium={"x": 0, "y": 0})
    assert r.cycle.side == "below"
    for mu, a in ((-0.01, 1), (-0.5, 3)):
        for amp in r.cycle.amplitudes.values():
            value = _value(amp, {"mu": sympy.Float(mu, 30), "a": sympy.Integer(a)})
            assert abs(value - (-mu / a) ** 0.5) < 1e-12
