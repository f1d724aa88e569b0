"""The model's symbols carry the declared assumptions, and every result speaks
in exactly these symbols: a user's own ``sympy.Symbol("A", positive=True)``
substitutes into a result, through JSON and pickling too."""

from __future__ import annotations

import dataclasses
import json
import pickle

import sympy

from criticality import (Model, bautin_points, bogdanov_takens, flip, fold, hopf, hopf_all,
                         neimark_sacker)
from criticality.algebra import Tower
from criticality.local.prepare import prepare
from criticality.outputs.json_io import read_expressions
from models import BRUSSELATOR, LORENZ, LORENZ_EQUILIBRIUM, WRIGHT

A = sympy.Symbol("A", positive=True)  # what a user writes for a parameter declared positive


def _expressions(value, seen=None):
    """Every sympy expression inside a result (fields, containers, nested values)."""
    seen = set() if seen is None else seen
    if id(value) in seen:
        return
    seen.add(id(value))
    if isinstance(value, (sympy.Basic, sympy.MatrixBase)):
        yield value
    elif isinstance(value, dict) or hasattr(value, "items"):
        for k, v in value.items():
            yield from _expressions(k, seen)
            yield from _expressions(v, seen)
    elif isinstance(value, (tuple, list)):
        for v in value:
            yield from _expressions(v, seen)
    elif dataclasses.is_dataclass(value) and not isinstance(value, type):
        for f in dataclasses.fields(value):
            if f.name != "model":
                yield from _expressions(getattr(value, f.name), seen)


def _foreign(result, model) -> list:
    """Symbols of a result that share a name with a model symbol without being it."""
    own = model.symbols
    return sorted({str(s) for e in _expressions(result) for s in e.free_symbols
                   if s.name in own and s != own[s.name]})


# -- the symbols ----------------------------------------------------------------------------


def test_each_assumption_is_the_keyword_a_user_writes():
    """positive, negative, nonnegative, nonzero and real become Symbol(name, <word>=True);
    states and undeclared names are real."""
    m = Model(["x"], {"x": "a + b + c + d + e + u - x"},
              {"a": "positive", "b": "negative", "c": "nonnegative", "d": "nonzero",
               "e": "real"})
    for name in "abcde":
        word = m.parameter(name).assumption
        assert m.symbols[name] == sympy.Symbol(name, **{word: True})
        assert m.symbols[name].is_real
    assert m.symbols["x"] == sympy.Symbol("x", real=True)
    assert m.symbols["u"] == sympy.Symbol("u", real=True)
    assert m.declared_symbols == m.symbols  # the compatibility alias
    assert pickle.loads(pickle.dumps(m)).symbols == m.symbols


def test_sympy_applies_the_assumptions_when_the_model_is_read():
    """The root of a positive parameter's square is the parameter, of a negative
    one's its opposite, and a product of roots splits off the positive factor
    (common practice, no source)."""
    m = Model(["x"], {"x": "sqrt(b^2)*x - sqrt(n^2)*x^3 + sqrt(b*(x^2 + 1))"},
              {"b": "positive", "n": "negative"})
    b, n, x = (m.symbols[k] for k in "bnx")
    assert m.equations[0] == b * x + n * x ** 3 + sympy.sqrt(b) * sympy.sqrt(x ** 2 + 1)


# -- every result kind ----------------------------------------------------------------------


def test_hopf_quantities_take_a_users_positive_symbol():
    """Brusselator: B_c = 1 + A^2, omega = A, l1 = -(A^2 + 2)/(2 A (A^2 + 1)) with the
    unit normalisation (Prigogine and Lefever 1968 for B_c and omega; l1 as
    tests/test_canonical_forms.py checks it)."""
    r = hopf(BRUSSELATOR, "B")
    assert r.critical_value.subs(A, 3) == 10
    assert r.omega.subs(A, 2) == 2
    assert r.l1.subs(A, 1) == sympy.Rational(-1, 2)
    assert r.jacobian.free_symbols == {A}
    assert r.cycle.amplitude_coefficients["x"].subs(A, 1) == sympy.Rational(4, 3)
    for c in r.conditions:
        value = c.expr.subs(A, 2)
        assert value.free_symbols == set(), c.key
    assert r.with_declared_symbols() is r
    assert r.evaluate({"A": 1}).classification == "supercritical"
    assert _foreign(r, BRUSSELATOR) == []


def test_hopf_all_and_pickling_keep_the_symbols():
    """Every branch of hopf_all, and a pickled result, use the model's symbols."""
    results = hopf_all(LORENZ, "r", equilibrium=LORENZ_EQUILIBRIUM)
    assert results and all(_foreign(r, LORENZ) == [] for r in results)
    sigma, b = sympy.Symbol("sigma", positive=True), sympy.Symbol("b", positive=True)
    back = pickle.loads(pickle.dumps(results[0]))
    assert back.critical_value.free_symbols <= {sigma, b}
    # r_H = sigma (sigma + b + 3)/(sigma - b - 1) (Strogatz 1994, Section 9.2)
    assert back.critical_value.subs({sigma: 10, b: sympy.Rational(8, 3)}) == sympy.Rational(470, 19)


def test_a_fold_takes_the_users_symbols():
    """Harvested logistic growth x' = r x (1 - x/K) - h (invented): fold at x = K/2,
    h_c = r K/4, a = -r/K (common practice, no source); x_eq carries the sign
    given by assume= and h_c the sign of h."""
    m = Model(["x"], {"x": "r*x*(1 - x/K) - h"}, {"r": "positive", "K": "positive",
                                                  "h": "positive"})
    f = fold(m, "h", eliminate=["h"], assume={"x_eq": "positive"})
    r_, K = sympy.Symbol("r", positive=True), sympy.Symbol("K", positive=True)
    assert f.critical_values["h"].subs({r_: 2, K: 4}) == 2
    assert f.critical_values["x_eq"].subs(K, 4) == 2
    assert f.a.subs({r_: 2, K: 4}) == sympy.Rational(-1, 2)
    h, h_c = sympy.Symbol("h", positive=True), sympy.Symbol("h_c", positive=True)
    assert f.normal_form.subs({h: 1, h_c: 1, r_: 1, K: 1}) == -sympy.Symbol("y") ** 2
    assert _foreign(f, m) == []


def test_map_results_take_the_users_symbols():
    """x -> r x (1 - x/K): flip at r = 3 at x = 2K/3; (x, y) -> (r x (1 - y/K), x):
    Neimark-Sacker at r = 2 (May 1976 and Maynard Smith 1968 for K = 1, from
    memory; K scales the state)."""
    r_, K = sympy.Symbol("r", positive=True), sympy.Symbol("K", positive=True)
    m = Model(["x"], {"x": "r*x*(1 - x/K)"}, {"r": "positive", "K": "positive"}, kind="map")
    g = flip(m, "r", equilibrium={"x": "K*(1 - 1/r)"})
    assert g.fixed_point["x"].subs(K, 3) == 2
    r_c = sympy.Symbol("r_c", positive=True)
    assert g.amplitude_squared["x"].subs({K: 3, r_: 4, r_c: 3}) == 1
    assert _foreign(g, m) == []
    m2 = Model(["x", "y"], {"x": "r*x*(1 - y/K)", "y": "x"}, {"r": "positive", "K": "positive"},
               kind="map")
    n = neimark_sacker(m2, "r", equilibrium={"x": "K*(1 - 1/r)", "y": "K*(1 - 1/r)"})
    assert n.critical_values == {"r": 2} and n.lyapunov.subs(K, 1) == -1
    assert n.radius_squared.subs({K: 2, r_: 3, r_c: 2}) == 2
    assert _foreign(n, m2) == []


def test_bautin_and_bogdanov_takens_take_the_users_symbols():
    """The truncated Bautin form with a positive quintic scale c (l2 < 0 for every c
    > 0), and the Bogdanov-Takens form with a positive quadratic coefficient s
    (common practice, no source)."""
    c = sympy.Symbol("c", positive=True)
    m = Model(["x", "y"], {"x": "mu*x - y + k*x*(x^2 + y^2) - c*x*(x^2 + y^2)^2",
                           "y": "x + mu*y + k*y*(x^2 + y^2) - c*y*(x^2 + y^2)^2"},
              {"mu": "real", "k": "real", "c": "positive"})
    (b,) = bautin_points(m, "mu", "k", equilibrium={"x": 0, "y": 0})
    assert b.l2 is not None and b.l2.subs(c, 1).is_negative and b.l2.free_symbols <= {c}
    assert _foreign(b, m) == []
    s = sympy.Symbol("s", positive=True)
    bt_model = Model(["x", "y"], {"x": "y", "y": "b1 + b2*x + s*x^2 - x*y"},
                     {"b1": "real", "b2": "real", "s": "positive"})
    bt = bogdanov_takens(bt_model, "b2", "x_eq", eliminate=["b1", "y"])
    assert _foreign(bt, bt_model) == []
    assert any(e.has(s) for e in _expressions(bt))


def test_delay_and_numeric_results_use_the_model_symbols():
    """Wright's equation: alpha_c = pi/2 (Wright 1955); the numeric mode at a
    parameter value leaves no foreign symbol either."""
    alpha = sympy.Symbol("alpha", positive=True)
    d = hopf(WRIGHT, "alpha", equilibrium={"y": 0})
    assert d.critical_value == sympy.pi / 2 and _foreign(d, WRIGHT) == []
    m = Model(["x", "y"], {"x": "A - (B + 1)*x + x^2*y", "y": "B*x - x^2*y"},
              {"A": "positive", "B": "positive"})
    num = hopf(m, "B", guess={"x": 1, "y": 2, "B": 2}, values={"A": 1})
    assert abs(float(num.critical_value) - 2) < 1e-12 and _foreign(num, m) == []
    tau = Model(["x"], {"x": "-alpha*x(t - tau)"}, {"alpha": "positive", "tau": "positive"})
    t = hopf(tau, "tau", equilibrium={"x": 0})
    # x' = -alpha x(t - tau): tau_c = pi/(2 alpha), omega = alpha (Hayes 1950, from memory)
    assert t.critical_value == sympy.pi / (2 * alpha) and t.omega == alpha


# -- signs other than positive ----------------------------------------------------------------


def test_a_nonnegative_and_a_negative_parameter():
    """x' = (mu - d) x - y + n x (x^2 + y^2), y' = x + (mu - d) y + n y (x^2 + y^2):
    mu_c = d, omega = 1, l1 = 2 n (the planar formula of Guckenheimer and Holmes 1983,
    Section 3.4: a = n, l1 = 2 a/omega), so n < 0 makes it supercritical for every
    admissible d."""
    m = Model(["x", "y"], {"x": "(mu - d)*x - y + n*x*(x^2 + y^2)",
                           "y": "x + (mu - d)*y + n*y*(x^2 + y^2)"},
              {"mu": "real", "d": "nonnegative", "n": "negative"})
    d, n = sympy.Symbol("d", nonnegative=True), sympy.Symbol("n", negative=True)
    r = hopf(m, "mu", equilibrium={"x": 0, "y": 0})
    assert r.critical_value == d and r.critical_value.subs(d, 3) == 3
    assert r.omega == 1 and r.l1 == 2 * n and r.l1.is_negative
    assert r.classification == "supercritical"
    assert sympy.Abs(r.l1) == -2 * n  # sympy knows the sign of the negative n
    back = read_expressions(r.to_json())
    assert back["critical_value"] == d and back["l1"] == 2 * n
    assert _foreign(r, m) == []


# -- JSON ------------------------------------------------------------------------------------


def test_json_read_back_gives_the_same_symbols():
    """Expressions read back from a Hopf document are in the declared symbols,
    free equilibrium coordinates included (assume= gave them their sign)."""
    r = hopf(BRUSSELATOR, "B")
    back = read_expressions(r.to_json())
    assert back["critical_value"] == r.critical_value == A ** 2 + 1
    assert back["l1"].free_symbols == {A}
    assert back["omega"].subs(A, 5) == 5
    m = Model(["c", "T"], {"c": "q*(1 - c) - k*c*exp(-E/T)",
                           "T": "q*(T0 - T) + h*k*c*exp(-E/T) - U*(T - T0)"},
              {"q": "positive", "k": "positive", "E": "positive", "h": "positive",
               "U": "positive", "T0": "positive"})
    family = hopf(m, "U", eliminate=["k", "T0"], assume={"c_eq": "positive", "T_eq": "positive"})
    T_eq = sympy.Symbol("T_eq", positive=True)
    assert T_eq in family.critical_value.free_symbols
    doc = family.to_json()
    assert json.loads(doc)["assumptions"]["T_eq"] == "positive"
    again = read_expressions(doc)
    assert again["critical_value"].free_symbols == family.critical_value.free_symbols


# -- the radicals sympy splits ------------------------------------------------------------------


def test_split_radicals_become_one_generator_again():
    """With b declared positive sympy writes sqrt(b*(r - 1)) as sqrt(b)*sqrt(r - 1); the
    tower takes the product as one radical, so the Lorenz equilibrium adds one
    quadratic extension, not two."""
    prep = prepare(LORENZ, "r", equilibrium=LORENZ_EQUILIBRIUM)
    b, r = LORENZ.symbols["b"], LORENZ.symbols["r"]
    assert prep.equilibrium[0] == sympy.sqrt(b) * sympy.sqrt(r - 1)
    assert len(prep.tower.levels) == 1


def test_roots_of_two_radicands_of_unknown_sign_stay_apart():
    """sqrt(a) sqrt(c) = sqrt(a c) fails for a, c < 0 (common practice, no source), so
    two real radicands of unknown sign keep two generators; one positive radicand
    lets them merge."""
    a, c = sympy.Symbol("a", real=True), sympy.Symbol("c", real=True)
    tower = Tower([a, c])
    x = tower.convert(sympy.sqrt(a) * sympy.sqrt(c))
    assert len(tower.levels) == 2 and tower.to_sympy(x * x) == a * c
    p = sympy.Symbol("p", positive=True)
    merged = Tower([p, c])
    y = merged.convert(sympy.sqrt(p) * sympy.sqrt(c))
    assert len(merged.levels) == 1 and merged.to_sympy(y * y) == p * c
