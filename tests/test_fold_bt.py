"""Zero eigenvalues: fold, transcritical and pitchfork points (criticality.fold)
and Bogdanov-Takens points (criticality.bogdanov_takens)."""

import numpy as np
import pytest
import sympy

from criticality import Model, hopf
from criticality.bifurcations.bogdanov_takens import bogdanov_takens, bogdanov_takens_all
from criticality.bifurcations.fold import fold, fold_all
from criticality.registry import analyses, get
from criticality.errors import ClosedFormUnavailableError


def test_fold_normal_form_read_off(backend):
    """x' = mu - x^2: a = -1, t = 1, fold at mu = 0 with two equilibria for
    mu > 0 (the saddle-node normal form; Kuznetsov, Elements of Applied
    Bifurcation Theory, 3rd ed., 2004, Section 3.2, from memory)."""
    m = Model(["x"], {"x": "mu - x^2"}, parameters={"mu": "real"})
    r = fold(m, "mu", eliminate=["mu"], backend=backend)
    assert r.kind == "fold"
    assert r.critical_values == {"x_eq": 0, "mu": 0}
    assert (r.a, r.transversality) == (-1, 1)
    assert "mu >" in r.verdict


def test_quadratic_critical_values_are_analytic_branches(backend):
    """x' = x (mu^2 - (a - 1)^2 b / 4) - x^3: det A = 0 at mu = +-(a - 1) sqrt(b)/2.
    Each branch is one analytic root, (a - 1) sqrt(b)/2 and its negative, not
    the principal |a - 1| sqrt(b)/2, which would jump from one root to the
    other where a crosses 1; the eigenvalue speed d(mu^2 - c)/dmu = 2 mu_c
    follows the same branch (common practice, no source)."""
    m = Model(["x", "y"], {"x": "x*(mu^2 - (a - 1)^2*b/4) - x^3", "y": "-y + x^2"},
              parameters={"mu": "real", "a": "real", "b": "positive"})
    results = fold_all(m, "mu", equilibrium={"x": 0, "y": 0}, backend=backend)
    a, b = sympy.Symbol("a", real=True), sympy.Symbol("b", positive=True)
    root = (a - 1) * sympy.sqrt(b) / 2
    values = [r.critical_values["mu"] for r in results]
    assert len(values) == 2
    assert sorted(sympy.expand(v * 2 / root) for v in values) == [-2, 2]
    for r in results:
        assert not r.critical_values["mu"].has(sympy.Abs)
        assert sympy.expand(r.eigenvalue_speed - 2 * r.critical_values["mu"]) == 0


def test_transcritical_and_pitchfork_normal_forms(backend):
    """x' = mu x - x^2 is transcritical (a = -1, lambda' = 1); x' = mu x -+ x^3
    are the super- and subcritical pitchforks (d = -+1) (common practice, no
    source)."""
    trans = fold(Model(["x"], {"x": "mu*x - x^2"}, parameters={"mu": "real"}), "mu",
                 equilibrium={"x": 0}, backend=backend)
    assert trans.kind == "transcritical" and trans.a == -1 and trans.eigenvalue_speed == 1
    assert trans.transversality == 0
    sup = fold(Model(["x"], {"x": "mu*x - x^3"}, parameters={"mu": "real"}), "mu",
               equilibrium={"x": 0}, backend=backend)
    assert sup.kind == "pitchfork" and sup.cubic == -1 and "supercritical" in sup.verdict
    assert any("symmetry" in n for n in sup.notes)
    sub = fold(Model(["x"], {"x": "mu*x + x^3"}, parameters={"mu": "real"}), "mu",
               equilibrium={"x": 0}, backend=backend)
    assert sub.kind == "pitchfork" and sub.cubic == 1 and "subcritical" in sub.verdict


def test_pitchfork_through_the_center_manifold(backend):
    """x' = mu x - x y, y' = -y + x^2: the center manifold y = x^2 + ... turns
    the quadratic coupling into the cubic coefficient d = -1 (common practice,
    no source: the reduction by hand)."""
    m = Model(["x", "y"], {"x": "mu*x - x*y", "y": "-y + x^2"}, parameters={"mu": "real"})
    r = fold(m, "mu", equilibrium={"x": 0, "y": 0}, backend=backend)
    assert r.kind == "pitchfork" and r.cubic == -1 and r.a == 0


def _real_equilibria(mu):
    """Real equilibria of x' = mu - x^2 - y, y' = x - 2y, counted with numpy."""
    roots = np.roots([1, 0.5, -mu])
    return sum(1 for r in roots if abs(r.imag) < 1e-12)


def test_fold_in_two_dimensions_matches_an_equilibrium_count(backend):
    """x' = mu - x^2 - y, y' = x - 2 y folds at x0 = -1/4, mu = -1/16; the
    predicted side (two equilibria above mu_c) agrees with counting the real
    roots of mu = x^2 + x/2 by numpy on either side."""
    m = Model(["x", "y"], {"x": "mu - x^2 - y", "y": "x - 2*y"}, parameters={"mu": "real"})
    r = fold(m, "mu", eliminate=["mu", "y"], backend=backend)
    assert r.kind == "fold"
    assert r.critical_values["x_eq"] == sympy.Rational(-1, 4)
    assert r.critical_values["mu"] == sympy.Rational(-1, 16)
    assert "mu >" in r.verdict
    assert _real_equilibria(-1 / 16 + 0.01) == 2 and _real_equilibria(-1 / 16 - 0.01) == 0


def test_fold_product_a_t_is_invariant_under_linear_changes():
    """a t does not depend on the scaling of q or on linear coordinates:
    the same fold written in u = x + y, v = x - 2 y has the same a t
    (common practice, no source)."""
    m = Model(["x", "y"], {"x": "mu - x^2 - y", "y": "x - 2*y"}, parameters={"mu": "real"})
    r = fold(m, "mu", eliminate=["mu", "y"])
    # x = (2u + v)/3, y = (u - v)/3; u' = x' + y', v' = x' - 2 y'
    x, y = "((2*u + v)/3)", "((u - v)/3)"
    fx, fy = f"(mu - {x}^2 - {y})", f"({x} - 2*{y})"
    m2 = Model(["u", "v"], {"u": f"{fx} + {fy}", "v": f"{fx} - 2*{fy}"},
               parameters={"mu": "real"})
    r2 = fold(m2, "mu", eliminate=["mu", "v"])
    assert r2.kind == "fold"
    assert sympy.simplify(r.a * r.transversality - r2.a * r2.transversality) == 0
    assert r2.critical_values["mu"] == sympy.Rational(-1, 16)


def _bt_model(a, b, extra=""):
    return Model(["x", "y"], {"x": "y", "y": f"b1 + b2*x + ({a})*x^2 + ({b})*x*y{extra}"},
                 parameters={"b1": "real", "b2": "real"})


def test_bogdanov_takens_normal_form_read_off():
    """x' = y, y' = b1 + b2 x + a x^2 + b x y: the double zero at b1 = b2 = 0
    with exactly these a and b (the normal form of Kuznetsov 2004, Section
    8.4, from memory), for numbers and for symbols."""
    r = bogdanov_takens(_bt_model(2, -3), "b2", "x_eq", eliminate=["b1", "y"])
    assert (r.a, r.b, r.ab_sign) == (2, -3, "negative")
    assert r.values == {"b2": 0, "x_eq": 0, "b1": 0}
    m = Model(["x", "y"], {"x": "y", "y": "b1 + b2*x + A*x^2 + B*x*y"},
              parameters={"b1": "real", "b2": "real", "A": "positive", "B": "positive"})
    r = bogdanov_takens(m, "b2", "x_eq", eliminate=["b1", "y"])
    assert (r.a, r.b) == (m.symbols["A"], m.symbols["B"]) and r.ab_sign == "positive"


def test_bogdanov_takens_invariants_under_linear_coordinates():
    """In coordinates u = x + y, v = 2 y the double-zero point is the same and
    a/b and the sign of a b are unchanged (they are invariants of the normal
    form; common practice, no source)."""
    x, y = "(u - v/2)", "(v/2)"
    rhs = f"(b1 + b2*{x} + 2*{x}^2 - 3*{x}*{y})"
    m = Model(["u", "v"], {"u": f"{y} + {rhs}", "v": f"2*{rhs}"},
              parameters={"b1": "real", "b2": "real"})
    r = bogdanov_takens_all(m, "b2", "u_eq", eliminate=["b1", "v"])[0]
    assert r.values["b1"] == 0 and r.values["b2"] == 0
    assert sympy.simplify(r.a / r.b - sympy.Rational(-2, 3)) == 0
    assert r.ab_sign == "negative"


def test_bogdanov_takens_in_three_dimensions():
    """A stable third direction coupled only at cubic order leaves a and b of
    x' = y, y' = b2 x + c y + 2 x^2 - 3 x y + x w, w' = -w + x^2 unchanged;
    after a linear change of all three coordinates the generalised
    eigenvectors are non-trivial and a/b is still -2/3 (common practice, no
    source: a/b is invariant)."""
    xs, ys, ws = sympy.symbols("xs ys ws")
    b2, c = sympy.symbols("b2 c")
    f = sympy.Matrix([ys, b2 * xs + c * ys + 2 * xs ** 2 - 3 * xs * ys + xs * ws,
                      -ws + xs ** 2])
    T = sympy.Matrix([[1, -1, 0], [0, 1, sympy.Rational(1, 2)], [-1, 0, 1]])
    u, v, w2 = sympy.symbols("u v w2")
    sub = dict(zip((xs, ys, ws), list(T * sympy.Matrix([u, v, w2]))))
    g = T.inv() * f.xreplace(sub)
    eqs = {name: str(sympy.expand(gi)) for name, gi in zip(("u", "v", "w2"), g)}
    m = Model(["u", "v", "w2"], eqs, parameters={"b2": "real", "c": "real"})
    direct = Model(["x", "y", "w"], {"x": "y", "y": "b2*x + c*y + 2*x^2 - 3*x*y + x*w",
                                     "w": "-w + x^2"}, parameters={"b2": "real", "c": "real"})
    r0 = bogdanov_takens(direct, "b2", "c", equilibrium={"x": 0, "y": 0, "w": 0})
    assert (r0.a, r0.b) == (2, -3)
    r = bogdanov_takens(m, "b2", "c", equilibrium={"u": 0, "v": 0, "w2": 0})
    assert r.values == {"b2": 0, "c": 0}
    assert sympy.simplify(r.a / r.b + sympy.Rational(2, 3)) == 0
    assert r.ab_sign == "negative"
    assert sum(1 for x in r.q0 if x != 0) >= 2


@pytest.mark.parametrize("s,expected", [(-1, "supercritical"), (1, "subcritical")])
def test_bogdanov_takens_scenario_agrees_with_the_hopf_analysis(s, expected):
    """The sign of a b predicts the criticality of the Hopf points next to the
    double zero; the package's own Hopf analysis of the unfolding
    x' = y, y' = -w^2 x + x^2 + s x y + mu y (the Hopf curve of the unfolding
    of Kuznetsov 2004, Section 8.4, from memory) agrees."""
    bt = bogdanov_takens(_bt_model(1, s), "b2", "x_eq", eliminate=["b1", "y"])
    m = Model(["x", "y"], {"x": "y", "y": f"-w2*x + x^2 + ({s})*x*y + mu*y"},
              parameters={"w2": "positive", "mu": "real"})
    h = hopf(m, "mu", equilibrium={"x": 0, "y": 0})
    assert h.classification == expected
    assert expected in bt.scenario


def test_registry_lists_the_analyses():
    """fold, bautin and bogdanov_takens are registered with the symbols they
    need; calling an entry runs the analysis."""
    names = [a.name for a in analyses()]
    assert {"hopf", "fold", "bautin", "bogdanov_takens"} <= set(names)
    assert get("bautin").needs == ("parameter", "second")
    m = Model(["x"], {"x": "mu - x^2"}, parameters={"mu": "real"})
    assert get("fold")(m, "mu", eliminate=["mu"]).kind == "fold"
    with pytest.raises(KeyError, match="known"):
        get("cusp")


def test_renderers_of_zero_eigenvalue_results():
    """summary, LaTeX and JSON carry the coefficients and the conventions."""
    r = bogdanov_takens(_bt_model(2, -3), "b2", "x_eq", eliminate=["b1", "y"])
    assert "a b" in r.summary() and "<p0, q0>" in r.summary()
    assert r.to_latex().startswith("% Bogdanov-Takens") and "\\begin{align*}" in r.to_latex()
    import json
    doc = json.loads(r.to_json())
    assert doc["quantities"]["a"] == "2" and doc["quantities"]["b"] == "-3"
    assert doc["schema"] == "criticality.bogdanov_takens"


def _fitzhugh_nagumo():
    return Model(["v", "w"], {"v": "v - v^3/3 - w + I", "w": "eps*(v + a - b*w)"},
                 parameters={"I": "real", "a": "real", "b": "positive", "eps": "positive"})


def test_bogdanov_takens_of_the_fitzhugh_nagumo_model_matches_a_hand_derivation(backend):
    """The FitzHugh-Nagumo model (FitzHugh, "Impulses and physiological states
    in theoretical models of nerve membrane", Biophys. J. 1, 1961;
    Nagumo, Arimoto and Yoshizawa, Proc. IRE 50, 1962)
        v' = v - v^3/3 - w + I,   w' = eps (v + a - b w).
    Derived by hand with the projection formulas of Kuznetsov (Elements of
    Applied Bifurcation Theory, 3rd ed., 2004, Section 8.7, from memory),
    at an equilibrium v0 (parametrised: I and w eliminated):
      A = [[1 - v0^2, -1], [eps, -eps b]]; trace = det = 0 give
      b = 1/(1 - v0^2) and eps = (1 - v0^2)^2, so A = [[1/b, -1], [1/b^2, -1/b]];
      q0 = (b, 1), q1 = (0, -b) + t q0, p1 = (1/b^2, -1/b), p0 = (1/b, 0);
      the only quadratic term is -v0 x^2 in v', so B(x, y) = (-2 v0 x1 y1, 0),
      B(q0, q0) = (-2 v0 b^2, 0), <p1, B(q0, q1)> = 0 for every t, hence
      a = <p1, B(q0, q0)>/2 = -v0 and b_BT = <p0, B(q0, q0)> = -2 v0 b,
    so a/b_BT = (1 - v0^2)/2 and a b_BT = 2 v0^2 b > 0: next to every such
    point the Hopf bifurcation is subcritical."""
    r = bogdanov_takens(_fitzhugh_nagumo(), "b", "eps", eliminate=["I", "w"], backend=backend)
    v0 = sympy.Symbol("v0")

    def plain(e):  # the package's v_eq carries assumptions; compare with a plain symbol
        e = sympy.sympify(e)
        return e.xreplace({s: v0 for s in e.free_symbols if s.name == "v_eq"})

    beta = 1 / (1 - v0 ** 2)
    assert sympy.simplify(plain(r.values["b"]) - beta) == 0
    assert sympy.simplify(plain(r.values["eps"]) - (1 - v0 ** 2) ** 2) == 0
    a, b = plain(r.a), plain(r.b)
    # The package scales q0 as the derivation does (second component 1) ...
    assert sympy.simplify(plain(r.q0[0]) - beta) == 0 and r.q0[1] == 1
    assert sympy.simplify(a + v0) == 0
    assert sympy.simplify(b + 2 * v0 * beta) == 0
    # ... and the invariant a/b needs no normalisation at all.
    assert sympy.simplify(a / b - (1 - v0 ** 2) / 2) == 0


def test_fitzhugh_nagumo_scenario_at_a_numeric_point_and_its_hopf_neighbours():
    """At v0 = 1/2 the hand derivation above gives b = 4/3, eps = 9/16,
    a = -1/2, b_BT = -4/3: a b_BT > 0, so the Hopf points next to the double
    zero (same b, 1/2 < v0 < 1) are subcritical; the package's own Hopf
    analysis of the same family agrees there."""
    m = _fitzhugh_nagumo()
    r = bogdanov_takens(m, "b", "eps", eliminate=["I", "w"])
    half = {s: sympy.Rational(1, 2) for s in r.a.free_symbols}
    assert (r.a.xreplace(half), r.b.xreplace(half)) == (sympy.Rational(-1, 2), sympy.Rational(-4, 3))
    h = hopf(m, "eps", eliminate=["I", "w"], values={"b": sympy.Rational(4, 3)})
    for v in ("0.55", "0.7", "0.9"):
        assert float(h.l1.xreplace({s: sympy.Rational(v) for s in h.l1.free_symbols})) > 0


def test_a_parameter_inside_a_transcendental_atom_is_not_solved_as_a_polynomial():
    """x' = x exp(r (1 - x)) - (1 + h) x (a harvested Ricker-type growth law,
    invented): on the branch x* = 1 - log(1 + h)/r, det A = -(1 + h) r x*
    vanishes only where log(1 + h) = r, which is transcendental in h. The
    factor 1 + h is not a solution (the logarithm is undefined there) and
    the transcendental factor is reported, not dropped. On the branch x = 0
    the two branches cross at h = exp(r) - 1 (common practice, no source)."""
    m = Model(["x"], {"x": "x*exp(r*(1 - x)) - h*x - x"}, {"r": "positive", "h": "positive"})
    # sympy writes log(1/(h + 1)) as -log(h + 1) for the positive h
    with pytest.raises(ClosedFormUnavailableError, match=r"r - log\(h \+ 1\) = 0"):
        fold(m, "h", equilibrium=1)
    at_zero = fold(m, "h", equilibrium=0)
    r = next(s for s in at_zero.critical_values["h"].free_symbols if s.name == "r")
    assert at_zero.kind == "transcritical"
    assert sympy.simplify(at_zero.critical_values["h"] - (sympy.exp(r) - 1)) == 0
