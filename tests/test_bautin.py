"""Bautin points (criticality.bifurcations.bautin): l1 = 0 on the Hopf set, l2 there, and
the side on which the fold of cycles and the hysteresis live."""

import json

import mpmath
import numpy as np
import pytest
import sympy

from criticality import Model, ParameterError, hopf
from criticality.bifurcations.bautin import bautin_points

# the Bautin normal form z' = (mu + i) z + k z|z|^2 + s z|z|^4 in z = x + i y
BAUTIN = {"x": "mu*x - y + k*x*(x^2 + y^2) + s*x*(x^2 + y^2)^2",
          "y": "x + mu*y + k*y*(x^2 + y^2) + s*y*(x^2 + y^2)^2"}


def _normal_form(s):
    eqs = {k: v.replace("s*", f"({s})*") for k, v in BAUTIN.items()}
    return Model(["x", "y"], eqs, parameters={"mu": "real", "k": "real"})


@pytest.mark.slow
@pytest.mark.parametrize("s,sign,side", [(-1, "negative", "k >"), (1, "positive", "k <")])
def test_bautin_normal_form(s, sign, side, backend):
    """The Bautin point of the normal form is k = 0 with l2 = 4 s (the 2^k
    convention factor, see criticality.local.lyapunov), and the fold of cycles lies
    where l1 l2 < 0 (common practice, no source: the radial equation)."""
    p = bautin_points(_normal_form(s), "mu", "k", equilibrium={"x": 0, "y": 0},
                      backend=backend)[0]
    assert p.second_value == 0 and p.critical_value == 0
    assert p.l2 == 4 * s and p.l2_sign == sign
    assert p.fold_of_cycles_side.startswith(side)
    assert ("hysteresis" in p.scenario) == (s < 0)


def _cycles(mu, k, s):
    """Number of cycles of r' = r (mu + k r^2 + s r^4), counted by numpy."""
    roots = np.roots([s, k, mu])
    return sum(1 for r in roots if abs(r.imag) < 1e-12 and r.real > 0)


def test_fold_of_cycles_side_matches_a_cycle_count():
    """Two cycles coexist just inside the stable side (mu < 0) only for k on
    the side the analysis names (an independent count of the roots of the
    radial equation with numpy)."""
    p = bautin_points(_normal_form(-1), "mu", "k", equilibrium={"x": 0, "y": 0})[0]
    assert p.fold_of_cycles_side.startswith("k >")
    assert _cycles(-0.001, 0.1, -1) == 2 and _cycles(-0.001, -0.1, -1) == 0


WATT = {"x": "y", "y": "z^2*sin(x)*cos(x) - sin(x) - eps*y", "z": "alpha*(cos(x) - b^2)"}


def _watt():
    return Model(["x", "y", "z"], WATT,
                 parameters={"eps": "positive", "alpha": "positive", "b": "positive"})


def test_watt_governor_critical_damping_and_l1_sign_change():
    """The Watt centrifugal governor in the form studied by Sotomayor, Mello
    and Braga ("Bifurcation analysis of the Watt governor system", Comput.
    Appl. Math. 26 (2007); arXiv math/0606230), written with beta = b^2: the
    critical damping is eps = 2 alpha beta^(3/2) = 2 alpha b^3 (the classical
    stability condition of the governor; from memory), and l1 changes sign on
    the Hopf surface, so Hopf points of codimension two exist (as they study)."""
    r = hopf(_watt(), "eps", equilibrium={"x": "acos(b^2)", "y": 0, "z": "1/b"})
    alpha, b = r.model.symbols["alpha"], r.model.symbols["b"]
    assert sympy.simplify(r.critical_value - 2 * alpha * b ** 3) == 0
    assert r.classification == "depends" and r.l1_zero_set is not None
    e_low = r.evaluate(alpha="1/2", b="9/10")
    e_high = r.evaluate(alpha=1, b="9/10")
    assert e_low.l1 * e_high.l1 < 0


def _watt_bautin(b):
    bb = sympy.Rational(b)
    return bautin_points(_watt(), "eps", "alpha",
                         equilibrium={"x": f"acos({bb ** 2})", "y": 0, "z": str(1 / bb)},
                         values={"b": b})


@pytest.mark.slow
def test_watt_governor_second_coefficient_takes_both_signs():
    """On the curve l1 = 0 of the Watt governor, l2 is positive at b = 9/10 and
    negative at b = 24/25: a codimension-three point lies between, and where
    l2 < 0 an attracting cycle coexists with an attracting equilibrium --
    both as stated in the abstract of Sotomayor, Mello and Braga (2007)."""
    low, high = _watt_bautin("9/10"), _watt_bautin("24/25")
    assert [p.l2_sign for p in low] == ["positive"]
    assert [p.l2_sign for p in high] == ["negative"]
    assert "bistability" in high[0].scenario
    assert high[0].fold_of_cycles_side.startswith("alpha <")


@pytest.mark.slow
def test_watt_governor_l2_agrees_with_the_numeric_mode():
    """At the Bautin point for b = 24/25 the numeric mode (mpmath, from a
    guess) finds l1 = 0 to the accuracy of the given alpha and the same l2."""
    p = _watt_bautin("24/25")[0]
    at = p.evaluate(digits=40)
    alpha = sympy.Float(at["second_value"], 40)
    r = hopf(_watt(), "eps", guess={"x": 0.4, "y": 0, "z": 1.04, "eps": 1.6},
             values={"b": "24/25", "alpha": alpha}, digits=25, order=5)
    with mpmath.workdps(40):
        assert abs(mpmath.mpf(str(r.critical_value)) - mpmath.mpf(str(at["critical_value"]))) \
            < 1e-20
        assert abs(mpmath.mpf(str(r.l1))) < 1e-20
        assert abs(mpmath.mpf(str(r.l2)) - mpmath.mpf(str(at["l2"]))) < 1e-20
    # l1 vanishes to the computed digits, so l2 < 0 decides: an attracting cycle whose
    # amplitude grows like the fourth root of the distance to the critical value
    assert r.cycle.amplitude_power == 4 and r.cycle.stable is True


def test_bautin_errors_and_renderers():
    """An unknown second parameter is refused by name; the result renders to
    text, LaTeX and JSON."""
    with pytest.raises(ParameterError, match="'q'"):
        bautin_points(_normal_form(-1), "mu", "q", equilibrium={"x": 0, "y": 0})
    p = bautin_points(_normal_form(-1), "mu", "k", equilibrium={"x": 0, "y": 0})[0]
    assert "l2" in p.summary() and "fold of cycles" in p.summary()
    assert "\\begin{align*}" in p.to_latex()
    assert json.loads(p.to_json())["quantities"]["l2"] == "-4"


def test_evaluate_where_the_bautin_point_has_no_pair():
    """x'' = -q x + (mu + k x^2 - x^4) x' (invented) has its Bautin point at
    mu = k = 0 with omega^2 = q; at q = -2 (a saddle) and q = 0 evaluate()
    raises the project's error naming omega^2 instead of returning the
    complex l2 (a root of q) or a division by zero."""
    from criticality import InadmissiblePointError
    m = Model(["x", "y"], {"x": "y", "y": "-q*x + mu*y + k*x**2*y - x**4*y"},
              parameters={"q": "real", "mu": "real", "k": "real"})
    (p,) = bautin_points(m, "mu", "k", equilibrium={"x": 0, "y": 0})
    assert abs(p.evaluate({"q": 2})["omega_squared"] - 2) < 1e-25
    for q in (-2, 0):
        with pytest.raises(InadmissiblePointError, match="omega\\^2 = .* <= 0") as info:
            p.evaluate({"q": q})
        assert info.value.quantity == "omega_squared"
