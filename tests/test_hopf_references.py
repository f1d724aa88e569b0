"""The Hopf engine against published results and textbook examples.

Each test names its source; "from memory" marks a value recalled rather than
looked up, "common practice, no source" a fact of the trade.
"""

import mpmath
import pytest
import sympy

from criticality import Model, hopf

from models import (BRUSSELATOR, BRUSSELATOR_EQUILIBRIUM, LORENZ, LORENZ_EQUILIBRIUM,
                    ORIGIN_2D, VAN_DER_POL)
from reference_numeric import numeric_first_lyapunov


def _planar_general():
    """x' = mu x - w y + f, y' = w x + mu y + g with all 14 quadratic and cubic
    coefficients symbolic."""
    f = "a20*x^2 + a11*x*y + a02*y^2 + a30*x^3 + a21*x^2*y + a12*x*y^2 + a03*y^3"
    g = "b20*x^2 + b11*x*y + b02*y^2 + b30*x^3 + b21*x^2*y + b12*x*y^2 + b03*y^3"
    return Model(states=["x", "y"],
                 equations={"x": f"mu*x - w*y + {f}", "y": f"w*x + mu*y + {g}"},
                 parameters={"w": "positive", "mu": "real"})


def test_planar_formula_of_guckenheimer_holmes(backend):
    """l1 = 2a/omega with a from Guckenheimer and Holmes, Nonlinear Oscillations,
    Dynamical Systems, and Bifurcations of Vector Fields, 1983, Section 3.4
    (eq. 3.4.11, equation number from memory), all 14 coefficients symbolic."""
    m = _planar_general()
    r = hopf(m, "mu", equilibrium={"x": 0, "y": 0}, backend=backend)
    s = m.symbols
    w = s["w"]
    a20, a11, a02, a30, a21, a12, a03 = (s[k] for k in ("a20", "a11", "a02", "a30", "a21", "a12", "a03"))
    b20, b11, b02, b30, b21, b12, b03 = (s[k] for k in ("b20", "b11", "b02", "b30", "b21", "b12", "b03"))
    fxxx, fxyy, gxxy, gyyy = 6 * a30, 2 * a12, 2 * b21, 6 * b03
    fxy, fxx, fyy = a11, 2 * a20, 2 * a02
    gxy, gxx, gyy = b11, 2 * b20, 2 * b02
    a = (fxxx + fxyy + gxxy + gyyy) / 16 + (fxy * (fxx + fyy) - gxy * (gxx + gyy)
                                            - fxx * gxx + fyy * gyy) / (16 * w)
    assert r.critical_value == 0
    assert r.omega == w
    assert sympy.cancel(r.l1 - 2 * a / w) == 0
    assert sympy.cancel(r.planar_coefficient - a) == 0
    assert r.routes_agree


def test_van_der_pol_type_amplitude(backend):
    """x' = y, y' = -x + mu y - x^2 y: supercritical, cycle amplitude 2 sqrt(mu)
    in x (common practice, no source)."""
    m = VAN_DER_POL
    r = hopf(m, "mu", equilibrium=ORIGIN_2D, backend=backend)
    mu = m.symbols["mu"]
    assert r.critical_value == 0 and r.omega == 1
    assert r.classification == "supercritical"
    assert r.cycle.side == "above" and r.cycle.stable is True
    assert sympy.simplify(r.cycle.amplitudes["x"] - 2 * sympy.sqrt(mu)) == 0
    assert r.cycle.period == 2 * sympy.pi


def test_brusselator(backend):
    """Brusselator x' = A - (B+1) x + x^2 y, y' = B x - x^2 y: Hopf at B = 1 + A^2
    with omega = A (Strogatz, Nonlinear Dynamics and Chaos, 1994, Exercise 8.3.1,
    from memory); supercritical for every A > 0 (from memory)."""
    m = BRUSSELATOR
    r = hopf(m, "B", equilibrium=BRUSSELATOR_EQUILIBRIUM, backend=backend)
    A = m.symbols["A"]
    assert sympy.expand(r.critical_value - (1 + A ** 2)) == 0
    assert r.omega == A
    assert r.classification == "supercritical"
    assert r.verdict.startswith("supercritical for all admissible parameters")


@pytest.mark.parametrize("backend", ["flint", pytest.param("sympy", marks=pytest.mark.slow)])
def test_lorenz(backend):
    """Lorenz system: r_H = sigma (sigma + b + 3)/(sigma - b - 1), and the Hopf
    bifurcation is subcritical (Strogatz, Nonlinear Dynamics and Chaos, 1994,
    Section 9.2; Sparrow, The Lorenz Equations, 1982)."""
    m = LORENZ
    r = hopf(m, "r", equilibrium=LORENZ_EQUILIBRIUM, backend=backend)
    s, b = m.symbols["sigma"], m.symbols["b"]
    assert sympy.cancel(r.critical_value - s * (s + b + 3) / (s - b - 1)) == 0
    assert r.classification == "subcritical"
    n = r.evaluate(sigma=10, b="8/3")
    with mpmath.workdps(40):
        assert abs(n.critical_value - mpmath.mpf(470) / 19) < 1e-25
    assert n.l1 > 0
    assert n.pair_error < 1e-25 and n.others_stable


@pytest.mark.slow
def test_rosenzweig_macarthur_paradox_of_enrichment(backend):
    """Predator-prey with Holling type II response x' = x(1 - x/K) - x y/(1 + x),
    y' = y(e x/(1 + x) - d): the equilibrium loses stability at
    K = (e + d)/(e - d) (Rosenzweig, Science 171, 1971, 'Paradox of
    enrichment'); the Hopf bifurcation is supercritical (from memory)."""
    m = Model(states=["x", "y"],
              equations={"x": "x*(1 - x/K) - x*y/(1 + x)", "y": "y*(e*x/(1 + x) - d)"},
              parameters={"K": "positive", "e": "positive", "d": "positive"})
    r = hopf(m, "K", equilibrium={"x": "d/(e - d)", "y": "(1 - d/(e - d)/K)*(1 + d/(e - d))"},
             backend=backend)
    K, e, d = (m.symbols[k] for k in "Ked")
    assert sympy.cancel(r.critical_value - (e + d) / (e - d)) == 0
    assert r.routes_agree
    n = r.evaluate(e=2, d="1/2")
    assert n.l1 < 0
    assert r.classification in ("supercritical", "depends")
    if r.classification == "depends":  # must be supercritical wherever the Hopf point exists
        assert n.classification == "supercritical"


@pytest.mark.parametrize("point", [{"e": 2, "d": sympy.Rational(1, 2)},
                                   {"e": 3, "d": sympy.Rational(5, 4)}])
def test_rosenzweig_macarthur_against_numeric_projection(point):
    """l1 agrees with the projection formula evaluated numerically by mpmath
    (Kuznetsov, Elements of Applied Bifurcation Theory, 3rd ed., 2004, Section 3.5)."""
    m = Model(states=["x", "y"],
              equations={"x": "x*(1 - x/K) - x*y/(1 + x)", "y": "y*(e*x/(1 + x) - d)"},
              parameters={"K": "positive", "e": "positive", "d": "positive"})
    r = hopf(m, "K", equilibrium={"x": "d/(e - d)", "y": "(1 - d/(e - d)/K)*(1 + d/(e - d))"})
    n = r.evaluate(point, digits=30)
    at = {m.symbols[k]: v for k, v in point.items()}
    at[m.symbols["K"]] = r.critical_value.xreplace(at)
    for name, value in r.equilibrium.items():
        at[m.symbols[name]] = value.xreplace(at)
    omega, l1, _ = numeric_first_lyapunov(m.equations, m.state_symbols, at, digits=30)
    with mpmath.workdps(40):
        assert abs(omega - n.omega) < 1e-25
        assert abs(l1 - n.l1) < 1e-25 * max(1, abs(l1))
