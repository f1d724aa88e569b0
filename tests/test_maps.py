"""Maps x -> F(x): the model kind, flip, Neimark-Sacker and the fold of maps,
checked against published results, truncated normal forms and iteration."""

import pickle

import pytest
import sympy

from criticality import Model, flip, fold, hopf, neimark_sacker, validate_map
from criticality.bifurcations.maps import flip_all
from criticality.cli.main import main
from criticality.errors import InvalidModelError, ModelKindError, NoHopfPointError

from models import DELAYED_LOGISTIC_MAP as DELAYED_LOGISTIC
from models import HENON_MAP as HENON
from models import LOGISTIC_MAP as LOGISTIC


def _eq(a, b):
    return sympy.simplify(sympy.sympify(a) - sympy.sympify(b)) == 0


# -- the model kind ---------------------------------------------------------------------


def test_kind_defaults_to_flow_and_is_kept_by_copies_and_files():
    """A map keeps its kind through with_values, pickling and its TOML text."""
    flow = Model(["x"], {"x": "-x"})
    assert flow.kind == "flow"
    m = Model(["x"], {"x": "r*x*(1 - x)"}, kind="map")
    assert m.kind == "map" and m != Model(["x"], {"x": "r*x*(1 - x)"})
    assert m.with_values(r=2).kind == "map"
    assert pickle.loads(pickle.dumps(m)) == m
    text = m.to_toml()
    assert 'kind = "map"' in text and Model.from_text(text) == m
    assert "x -> " in str(m) and "kind='map'" in repr(m)


def test_bad_kind_is_named_in_python_and_in_files():
    """An unknown kind is an InvalidModelError naming the two allowed words (and the line)."""
    with pytest.raises(InvalidModelError, match='"flow".*"map"'):
        Model(["x"], {"x": "x"}, kind="difference")
    text = 'states = ["x"]\nkind = "mapp"\n[equations]\nx = "x/2"\n'
    with pytest.raises(InvalidModelError, match="line 2"):
        Model.from_text(text)


def test_analyses_refuse_the_other_kind():
    """hopf() on a map and flip() on a flow raise ModelKindError with the way out."""
    with pytest.raises(ModelKindError, match="neimark_sacker"):
        hopf(DELAYED_LOGISTIC, "r", equilibrium=1)
    with pytest.raises(ModelKindError, match="needs a map"):
        flip(Model(["x"], {"x": "r*x*(1 - x)"}), "r")
    with pytest.raises(ModelKindError):
        neimark_sacker(Model(["x", "y"], {"x": "y", "y": "-x + mu*y"}), "mu")


# -- outside checks -----------------------------------------------------------------------


def test_logistic_map_period_doubling_at_three_supercritical():
    """Period doubling of x -> r x (1 - x) at r = 3, supercritical (May, Simple mathematical
    models with very complicated dynamics, Nature 261, 1976); the predicted half-width of
    the 2-cycle matches the exact 2-cycle x = (r + 1 +- sqrt((r + 1)(r - 3)))/(2 r) (same
    source) to leading order."""
    r = flip(LOGISTIC, "r", equilibrium=1)
    assert r.critical_values == {"r": 3}
    assert r.coefficient_sign == "positive" and r.verdict.startswith("supercritical")
    rr = sympy.Symbol("r", positive=True)  # r is declared positive, and so is r_c
    exact_half_width_sq = (rr + 1) * (rr - 3) / (4 * rr ** 2)
    slope = sympy.limit(exact_half_width_sq / (rr - 3), rr, 3)
    predicted = r.amplitude_squared["x"].subs(sympy.Symbol("r_c", positive=True), 3)
    assert _eq(predicted, slope * (rr - 3))


def test_henon_map_period_doubling_symbolic_in_b():
    """The Henon map's fixed point doubles its period at a = 3 (1 - b)^2 / 4 (Henon, A
    two-dimensional mapping with a strange attractor, Commun. Math. Phys. 50, 1976; from
    memory); for 0 < b < 1 the flip coefficient is positive (supercritical)."""
    (r,) = flip_all(HENON, "a", eliminate=["a", "y"])
    assert _eq(r.critical_values["a"], sympy.Rational(3, 4) * (1 - sympy.Symbol("b", real=True)) ** 2)
    b = sympy.Symbol("b", real=True)
    for value in (sympy.Rational(3, 10), sympy.Rational(1, 2), sympy.Rational(9, 10)):
        assert r.coefficient.subs(b, value) > 0


def test_delayed_logistic_neimark_sacker_at_two():
    """The delayed logistic map (x, y) -> (r x (1 - y), x) has a Neimark-Sacker point at
    r = 2 with angle pi/3, supercritical (Maynard Smith, Mathematical Ideas in Biology,
    1968; from memory)."""
    r = neimark_sacker(DELAYED_LOGISTIC, "r", equilibrium=1)
    assert r.critical_values == {"r": 2}
    assert sympy.simplify(r.angle - sympy.pi / 3) == 0
    assert r.cos_angle == sympy.Rational(1, 2)
    assert r.status == "nondegenerate"
    assert r.lyapunov < 0 and r.verdict.startswith("supercritical")
    assert _eq(r.multiplier, sympy.exp(sympy.I * sympy.pi / 3).rewrite(sympy.cos))


@pytest.mark.slow
def test_delayed_logistic_invariant_curve_confirmed_by_iteration():
    """Iterating the delayed logistic map at r = 2.001 settles on a closed curve whose
    half range per component matches 2 rho |q_j| (prediction from the normal form)."""
    r = neimark_sacker(DELAYED_LOGISTIC, "r", equilibrium=1)
    check = validate_map(r, DELAYED_LOGISTIC, offset=1e-3)
    assert check.agrees, check.summary()


def test_logistic_two_cycle_confirmed_by_iteration():
    """Iterating the logistic map at r = 3.001 settles on the predicted 2-cycle."""
    r = flip(LOGISTIC, "r", equilibrium=1)
    check = validate_map(r, LOGISTIC, offset=1e-3)
    assert check.agrees and check.offset > 0, check.summary()


# -- truncated normal forms with chosen coefficients ----------------------------------------


def test_flip_normal_form_coefficient_is_a_squared_plus_b():
    """For y -> -(1 + mu) y + a y^2 + b y^3 the flip coefficient is c = a^2 + b (the second
    iterate is y -> (1 + 2 mu) y - 2 (a^2 + b) y^3 + ..., common practice, no source)."""
    m = Model(["y"], {"y": "-(1 + mu)*y + a*y^2 + b*y^3"}, kind="map")
    r = flip(m, "mu", equilibrium=0)
    a, b = sympy.symbols("a b", real=True)
    assert r.critical_values == {"mu": 0}
    assert _eq(r.coefficient, a ** 2 + b)
    assert r.multiplier_speed == -1


def test_flip_two_cycle_is_invariant_under_linear_changes():
    """Under x = T u the predicted 2-cycle offsets y q (as the matrix y^2 q q^T) transform
    as T M T^T, and the sign of c is unchanged."""
    base = {"x": "-(1 + mu)*x + 2*x^2 + x*y - x^3", "y": "y/3 + x^2"}
    T = sympy.Matrix([[2, 1], [1, 1]])
    results = []
    for matrix in (sympy.eye(2), T):
        u, v = sympy.symbols("u v", real=True)
        x, y = matrix * sympy.Matrix([u, v])
        subs = {sympy.Symbol("x", real=True): x, sympy.Symbol("y", real=True): y}
        mu = sympy.Symbol("mu", real=True)
        F = sympy.Matrix([sympy.sympify(base[k].replace("^", "**"),
                                        locals={"mu": mu, "x": subs[sympy.Symbol("x", real=True)],
                                                "y": subs[sympy.Symbol("y", real=True)]})
                          for k in ("x", "y")])
        G = matrix.inv() * F
        model = Model(["u", "v"], {"u": sympy.expand(G[0]), "v": sympy.expand(G[1])},
                      kind="map")
        r = flip(model, "mu", equilibrium={"u": 0, "v": 0})
        q = sympy.Matrix(r.q)
        qq = (q.T * q)[0]
        M = (-r.multiplier_speed / (r.coefficient * qq)) * q * q.T
        results.append((r, M))
    (r0, M0), (r1, M1) = results
    assert r0.coefficient_sign == r1.coefficient_sign
    assert sympy.simplify(T * M1 * T.T - M0) == sympy.zeros(2, 2)


def _ns_normal_form(alpha, beta, cos=sympy.Rational(3, 5), sin=sympy.Rational(4, 5)):
    mu, x, y = sympy.symbols("mu x y", real=True)
    r2 = x ** 2 + y ** 2
    fx = (1 + mu) * (cos * x - sin * y) + r2 * (alpha * x - beta * y)
    fy = (1 + mu) * (sin * x + cos * y) + r2 * (beta * x + alpha * y)
    return Model(["x", "y"], {"x": fx, "y": fy}, kind="map")


def test_neimark_sacker_normal_form_coefficients_after_the_unit_scaling():
    """w -> lambda (1 + mu) w + d w|w|^2 with w = x + i y and chosen d = alpha + i beta:
    with <q, q> = 1 one has w = sqrt(2) z, so c1 = 2 d and l1 = 2 Re(exp(-i theta) d)
    (common practice, no source); the radius satisfies |w|^2 = 2 rho^2."""
    alpha, beta = sympy.symbols("alpha beta", real=True)
    r = neimark_sacker(_ns_normal_form(alpha, beta), "mu", equilibrium=0)
    assert r.critical_values == {"mu": 0}
    assert _eq(r.cos_angle, sympy.Rational(3, 5))
    assert _eq(r.c1, 2 * (alpha + sympy.I * beta))
    assert _eq(r.lyapunov, 2 * (alpha * sympy.Rational(3, 5) + beta * sympy.Rational(4, 5)))
    assert r.modulus_speed == 1
    mu = sympy.Symbol("mu", real=True)
    rho2 = r.radius_squared.subs(sympy.Symbol("mu_c", real=True), 0)
    d = alpha * sympy.Rational(3, 5) + beta * sympy.Rational(4, 5)
    assert _eq(2 * rho2, -mu / d)


def test_neimark_sacker_against_the_planar_formula():
    """The planar formula for the map's Lyapunov coefficient, a = Re(e^{-i theta} g21)/2 -
    Re[(1 - 2 lambda) conj(lambda)^2 / (1 - lambda) g20 g11]/2 - |g11|^2/2 - |g02|^2/4
    (Guckenheimer and Holmes, Nonlinear Oscillations, Dynamical Systems, and Bifurcations
    of Vector Fields, 1983, Section 3.5, from memory), agrees with l1 on a planar map with
    quadratic terms, where the complex coordinate is z with x = z + conj z up to the
    unit scaling."""
    cos, sin = sympy.Rational(3, 5), sympy.Rational(4, 5)
    lam = cos + sympy.I * sin
    mu, x, y = sympy.symbols("mu x y", real=True)
    fx = (1 + mu) * (cos * x - sin * y) + x ** 2 - 2 * x * y + 3 * x ** 3
    fy = (1 + mu) * (sin * x + cos * y) + y ** 2 / 2 + x * y - x * y ** 2
    r = neimark_sacker(Model(["x", "y"], {"x": fx, "y": fy}, kind="map"), "mu", equilibrium=0)
    # complex coordinate w = x + i y: w -> lam w + g(w, conj w); expand g
    w, wb = sympy.symbols("w wb")
    X, Y = (w + wb) / 2, (w - wb) / (2 * sympy.I)
    g = sympy.expand((fx - (cos * x - sin * y) + sympy.I * (fy - (sin * x + cos * y)))
                     .subs(mu, 0).subs({x: X, y: Y}, simultaneous=True))
    P = sympy.Poly(g, w, wb)

    def coeff(j, k):
        return P.coeff_monomial(w ** j * wb ** k) * sympy.factorial(j) * sympy.factorial(k)

    g20, g11, g02, g21 = coeff(2, 0), coeff(1, 1), coeff(0, 2), coeff(2, 1)
    a = (sympy.re(sympy.expand(sympy.conjugate(lam) * g21)) / 2
         - sympy.re(sympy.expand((1 - 2 * lam) * sympy.conjugate(lam) ** 2 / (1 - lam)
                                 * g20 * g11)) / 2
         - sympy.Abs(g11) ** 2 / 2 - sympy.Abs(g02) ** 2 / 4)
    # w = sqrt(2) z for the unit eigenvector: l1 = 2 a
    assert sympy.nsimplify(sympy.N(r.lyapunov - 2 * a, 40), tolerance=1e-30) == 0


def test_neimark_sacker_curve_is_invariant_under_linear_changes():
    """Under x = T u the predicted curve rho^2 Re(q q^H)/<q, q> transforms as T P T^T and
    the sign of l1 is unchanged."""
    cos, sin = sympy.Rational(3, 5), sympy.Rational(4, 5)
    mu, x, y, u, v = sympy.symbols("mu x y u v", real=True)
    fx = (1 + mu) * (cos * x - sin * y) + x ** 2 - x * y ** 2 - x ** 3
    fy = (1 + mu) * (sin * x + cos * y) + x * y - y ** 3
    T = sympy.Matrix([[1, 2], [0, 1]])
    out = []
    for matrix in (sympy.eye(2), T):
        X = matrix * sympy.Matrix([u, v])
        G = matrix.inv() * sympy.Matrix([fx, fy]).subs({x: X[0], y: X[1]}, simultaneous=True)
        r = neimark_sacker(Model(["u", "v"], {"u": sympy.expand(G[0]), "v": sympy.expand(G[1])},
                                 kind="map"), "mu", equilibrium={"u": 0, "v": 0})
        q = sympy.Matrix(r.q)
        qq = sum(sympy.Abs(e) ** 2 for e in q)
        rho2 = r.radius_squared.subs(sympy.Symbol("mu_c", real=True), 0).subs(mu, 1)
        P = (rho2 / qq * q * q.H).applyfunc(lambda e: sympy.re(sympy.expand(e)))
        out.append((r, P))
    (r0, P0), (r1, P1) = out
    assert r0.lyapunov_sign == r1.lyapunov_sign
    diff = (T * P1 * T.T - P0).applyfunc(lambda e: sympy.N(e, 30))
    assert max(abs(e) for e in diff) < 1e-25


# -- degenerate cases, fold, outputs, command line --------------------------------------------


@pytest.mark.slow
def test_strong_resonances_are_named():
    """At theta = pi/2 the status is resonance_1_4 (c1 still given); at theta = 2 pi/3 it is
    resonance_1_3 and no c1 exists."""
    r4 = neimark_sacker(_ns_normal_form(-1, 0, cos=0, sin=1), "mu", equilibrium=0)
    assert r4.status == "resonance_1_4" and r4.c1 is not None and not r4.amplitude_squared
    half = sympy.sqrt(3) / 2
    m3 = Model(["x", "y"], {"x": sympy.sympify("(1 + mu)*(-x/2 - s*y) + x^2".replace("^", "**"),
                                               locals={"s": half}),
                            "y": sympy.sympify("(1 + mu)*(s*x - y/2) + x*y",
                                               locals={"s": half})}, kind="map")
    r3 = neimark_sacker(m3, "mu", equilibrium=0)
    assert r3.status == "resonance_1_3" and r3.c1 is None and "1:3" in r3.verdict


def test_no_unit_circle_pair_in_one_dimension():
    """A scalar map has no pair of multipliers: a clear NoHopfPointError."""
    with pytest.raises(NoHopfPointError, match="exp"):
        neimark_sacker(LOGISTIC, "r", equilibrium=1)


def test_fold_of_a_map_is_the_multiplier_plus_one():
    """x -> x + mu - x^2 has a fold at mu = 0 (two fixed points sqrt(mu) for mu > 0), and the
    logistic map's trivial fixed point is transcritical at r = 1 (May 1976)."""
    m = Model(["x"], {"x": "x + mu - x^2"}, {"mu": "real"}, kind="map")
    r = fold(m, "mu", eliminate=["mu"])
    assert r.kind == "fold" and r.a == -1 and r.transversality == 1
    assert any("map" in c for c in r.conventions) and "multiplier is +1" in r.notes[0]
    t = fold(LOGISTIC, "r", equilibrium=0)
    assert t.kind == "transcritical" and t.critical_values == {"r": 1}


def test_results_are_frozen_picklable_and_render():
    """Flip and Neimark-Sacker results pickle, and their text, LaTeX and JSON say map."""
    for r in (flip(LOGISTIC, "r", equilibrium=1),
              neimark_sacker(DELAYED_LOGISTIC, "r", equilibrium=1)):
        assert pickle.loads(pickle.dumps(r)) == r
        with pytest.raises(Exception):
            r.status = "x"
        assert "map x -> F(x)" in r.summary()
        assert "map x -" in r.to_latex() and r.to_latex().count("\\begin{align*}") == 1
        assert '"system": "map x -> F(x) (discrete time)"' in r.to_json()


def test_cli_flip_and_neimark_sacker(tmp_path, capsys):
    """The flip and neimark-sacker subcommands read a kind = "map" file."""
    path = tmp_path / "dl.toml"
    path.write_text('kind = "map"\nstates = ["x", "y"]\nbifurcation_parameter = "r"\n'
                    '[equations]\nx = "r*x*(1 - y)"\ny = "x"\n')
    assert main(["neimark-sacker", str(path), "-e", "1", "-q", "--format", "json"]) == 0
    out = capsys.readouterr().out
    assert '"angle": "pi/3"' in out and '"lyapunov_sign": "negative"' in out
    lpath = tmp_path / "lg.toml"
    lpath.write_text('kind = "map"\nstates = ["x"]\n[equations]\nx = "r*x*(1 - x)"\n')
    assert main(["flip", str(lpath), "-p", "r", "-e", "1", "-q"]) == 0
    assert "supercritical" in capsys.readouterr().out


def test_subcritical_invariant_curve_bracketed_by_iteration():
    """For a chosen subcritical normal form (l1 = 6/5 > 0) an orbit started inside the
    predicted unstable curve returns to the fixed point and one started outside leaves."""
    m = _ns_normal_form(1, 0)
    r = neimark_sacker(m, "mu", equilibrium=0)
    assert r.verdict.startswith("subcritical") and r.lyapunov == sympy.Rational(6, 5)
    check = validate_map(r, m, offset=1e-3)
    assert check.agrees and check.offset < 0, check.summary()


from hypothesis import given, settings, strategies as st  # noqa: E402


@pytest.mark.slow
@settings(max_examples=8, deadline=None)
@given(st.integers(-3, 3), st.integers(-3, 3), st.integers(-3, 3), st.integers(-3, 3))
def test_flip_sign_and_two_cycle_invariant_under_random_linear_changes(a, b, c, d):
    """For random invertible T the sign of the flip coefficient is unchanged and the
    predicted 2-cycle offsets transform as T M T^T."""
    from hypothesis import assume
    T = sympy.Matrix([[a, b], [c, d]])
    assume(T.det() != 0)
    x, y, u, v, mu = sympy.symbols("x y u v mu", real=True)
    F = sympy.Matrix([-(1 + mu) * x + x ** 2 - x * y + 2 * x ** 3, y / 2 + x ** 2 - y ** 2])
    out = []
    for matrix in (sympy.eye(2), T):
        X = matrix * sympy.Matrix([u, v])
        G = matrix.inv() * F.subs({x: X[0], y: X[1]}, simultaneous=True)
        r = flip(Model(["u", "v"], {"u": sympy.expand(G[0]), "v": sympy.expand(G[1])},
                       kind="map"), "mu", equilibrium={"u": 0, "v": 0})
        q = sympy.Matrix(r.q)
        out.append((r, (-r.multiplier_speed / (r.coefficient * (q.T * q)[0])) * q * q.T))
    (r0, M0), (r1, M1) = out
    assert r0.coefficient_sign == r1.coefficient_sign
    assert sympy.simplify(T * M1 * T.T - M0) == sympy.zeros(2, 2)


def test_spectrum_check_of_map_points():
    """mpmath's eigenvalues of DF at the reported fixed points contain -1 (Henon, b = 3/10)
    and exp(+-i pi/3) (delayed logistic map)."""
    from criticality import spectrum_check
    (h,) = flip_all(HENON, "a", eliminate=["a", "y"])
    assert spectrum_check(h, HENON, {"b": "3/10"}).agrees
    ns = neimark_sacker(DELAYED_LOGISTIC, "r", equilibrium=1)
    assert spectrum_check(ns, DELAYED_LOGISTIC).agrees


def test_degenerate_map_points_are_named():
    """A multiplier +1 beside -1 is a fold-flip point (an error naming it); c = 0 gives the
    status degenerate_coefficient; a multiplier +1 beside the pair stops Neimark-Sacker."""
    from criticality.errors import DegenerateBifurcationError
    ff = Model(["x", "y"], {"x": "-(1 + mu)*x + x^2", "y": "y + y^2 + x*y"}, kind="map")
    with pytest.raises(DegenerateBifurcationError, match="fold-flip") as info:
        flip(ff, "mu", equilibrium={"x": 0, "y": 0})
    assert info.value.reason == "fold_flip"
    lin = flip(Model(["y"], {"y": "-(1 + mu)*y"}, kind="map"), "mu", equilibrium=0)
    assert lin.status == "degenerate_coefficient" and lin.verdict.startswith("degenerate")
    c, s = sympy.Rational(3, 5), sympy.Rational(4, 5)
    x, y, z, mu = sympy.symbols("x y z mu", real=True)
    fns = Model(["x", "y", "z"], {"x": (1 + mu) * (c * x - s * y) + x * z,
                                  "y": (1 + mu) * (s * x + c * y), "z": z + x ** 2},
                kind="map")
    with pytest.raises(DegenerateBifurcationError, match=r"\+1"):
        neimark_sacker(fns, "mu", equilibrium={"x": 0, "y": 0, "z": 0})


def test_bundled_sampled_heater_example(tmp_path, capsys):
    """examples/sampled_heater (an invented scenario): the Neimark-Sacker gain
    is where det J = 1, k = a/h, with cos(theta) = trace(J)/2 = 1 - a h/2
    (common practice, no source); the predicted invariant curve is measured
    by iterating the map in plain floating point, independently of
    validate_map; the script and the command line run."""
    from pathlib import Path
    import subprocess
    import sys

    folder = Path(__file__).resolve().parent.parent / "examples"
    model = Model.from_file(folder / "sampled_heater.toml")
    symbolic = neimark_sacker(model, "k")
    k_c = symbolic.critical_values["k"]
    names = {str(s): s for s in k_c.free_symbols | symbolic.cos_angle.free_symbols}
    a, h = names["a"], names["h"]
    assert _eq(k_c, a / h)
    assert _eq(symbolic.cos_angle, 1 - a * h / 2)
    result = neimark_sacker(model, "k", values=model.defaults())
    assert result.critical_values["k"] == 2 and result.lyapunov_sign == "negative"
    assert result.verdict.startswith("supercritical")
    # iterate at k = 2 + 1e-3 from near the predicted curve
    offset = 1e-3
    amplitude = result.amplitude_squared["T"]
    names = {str(s): s for s in amplitude.free_symbols}
    predicted = float(sympy.sqrt(amplitude.subs({names["k"]: 2 + sympy.Rational(1, 1000),
                                                 names["k_c"]: 2})))
    T, I, k = predicted / 2, 0.0, 2 + offset
    peak = 0.0
    for step in range(60000):
        T, I = T + 0.5 * (-T - k * I - T ** 3), I + 0.5 * T
        if step > 50000:
            peak = max(peak, abs(T))
    assert abs(peak - predicted) < 0.05 * predicted
    done = subprocess.run([sys.executable, str(folder / "sampled_heater.py")],
                          capture_output=True, text=True, timeout=300)
    assert done.returncode == 0, done.stderr
    assert "supercritical" in done.stdout
    assert main(["neimark-sacker", str(folder / "sampled_heater.toml"), "--set", "h=1/2",
                 "--set", "a=1", "--set", "q=1", "-q"]) == 0
    assert "Cautions:" in capsys.readouterr().out
