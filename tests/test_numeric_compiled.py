"""The compiled numeric mode, its code generation, and the numeric mode against
the exact engine and against published closed forms."""

import math
import pickle
import random
import sys
from pathlib import Path

import mpmath
import pytest
import sympy

from criticality import EquilibriumNotFoundError, Model, ParameterError, hopf
from criticality.hopf_analysis.numeric_mode import numeric_setup
from criticality.local.codegen import UnsupportedExpression, compile_expressions
from criticality.local.dag import ExpressionGraph

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "benchmarks"))
from cases import CASE_NAMES, case_model, exact_hopf_point, get_case  # noqa: E402


def goodwin(stages: int, hill: int) -> Model:
    """Goodwin's loop: x0' = a/(1 + x_last^hill) - x0, x_i' = x_(i-1) - x_i."""
    states = [f"x{i}" for i in range(stages)]
    eqs = {"x0": f"a/(1 + x{stages - 1}^{hill}) - x0"}
    eqs.update({f"x{i}": f"x{i - 1} - x{i}" for i in range(1, stages)})
    return Model(states, eqs, {"a": "positive"})


def _secant_point(stages, hill):
    """Critical a and omega from the secant condition (all rates 1): the loop
    gain g = hill z^hill / (1 + z^hill) equals sec(pi/n)^n, omega = tan(pi/n)."""
    g = mpmath.sec(mpmath.pi / stages) ** stages
    s = g / (hill - g)                       # z^hill
    z = s ** (mpmath.mpf(1) / hill)
    return z * (1 + s), mpmath.tan(mpmath.pi / stages), z


@pytest.mark.slow
@pytest.mark.parametrize("stages,hill,digits", [(3, 12, 25), (30, 2, 12)])
def test_goodwin_secant_condition(stages, hill, digits):
    """Goodwin's oscillator with a steep Hill repression loses stability where
    the loop gain equals sec(pi/n)^n, with omega = tan(pi/n) (Goodwin, Adv.
    Enzyme Regul. 3 (1965) 425; Griffith, J. Theor. Biol. 20 (1968) 202;
    Tyson, J. Math. Biol. 1 (1975) 311, the secant condition)."""
    with mpmath.workdps(40):
        a_c, omega, z = _secant_point(stages, hill)
    model = goodwin(stages, hill)
    guess = {s: float(z) * 1.05 for s in model.states}
    guess["a"] = float(a_c) * 1.1
    r = hopf(model, "a", guess=guess, digits=digits)
    claimed = int(r.status.split("(")[1].split()[0])
    assert claimed >= digits
    tol = 10.0 ** (-digits + 1)
    with mpmath.workdps(40):
        assert abs(mpmath.mpf(str(r.critical_value)) - a_c) < tol * a_c
        assert abs(mpmath.mpf(str(r.omega)) - omega) < tol * omega
        assert abs(mpmath.mpf(str(r.equilibrium["x0"])) - z) < tol * z


def _within_stated_digits(value, exact, claimed, digits):
    """Whether ``value`` (a sympy Float) is within one unit of the
    ``claimed``-th significant digit of ``exact`` (an mpmath number); below
    ``10^-digits`` in size, within ``10^-claimed`` absolutely (as the numeric
    mode judges its own digits)."""
    err = abs(mpmath.mpf(str(value)) - exact)
    if abs(exact) < mpmath.mpf(10) ** (-digits):
        return err <= mpmath.mpf(10) ** (-claimed)
    lead = int(mpmath.floor(mpmath.log10(abs(exact))))
    return err <= mpmath.mpf(10) ** (lead - claimed + 1)


@pytest.mark.slow
#: the largest cases are left to the benchmarks: foodchain_K8 alone takes the exact engine
#: about three minutes
@pytest.mark.parametrize("name", [n for n in CASE_NAMES
                                  if not n.endswith(("_20", "_30", "_K8"))])
def test_numeric_mode_agrees_with_exact_engine_on_benchmark_cases(name):
    """On every benchmark case, at a sampled admissible point, the numeric mode
    started 2 % away reproduces the exact engine's critical value, omega and
    l1 to within one unit of the last digit it states, at 15 digits (one
    mpmath run judged from float64) and at 30 digits (the default) (common
    practice, no source: two independent routes to the same numbers)."""
    case = get_case(name)
    model = case_model(case)
    point = case.sample_points(1, seed=11)[0] if case.free_parameters else {}
    values = {p.name: v for p, v in point.items()}
    mu = case.bifurcation
    e = exact_hopf_point(case, values, 45)
    with mpmath.workdps(45):
        mu_c = float(e.critical_value)
        x0 = {s.name: float(sympy.N(v.xreplace(point).xreplace({mu: e.critical_value}), 20))
              for s, v in case.equilibrium.items()}
    guess = {**x0, mu.name: mu_c + 0.02 * max(1.0, abs(mu_c))}
    for digits in (15, 30):
        num = hopf(model, mu.name, guess=guess, values=values or None, digits=digits)
        claimed = int(num.status.split("(")[1].split()[0])
        assert claimed == digits, num.notes[-1]
        with mpmath.workdps(45):
            for got, want in [(num.critical_value, e.critical_value), (num.omega, e.omega),
                              (num.l1, e.l1)]:
                assert _within_stated_digits(got, want, claimed, digits), (digits, got, want)


@pytest.mark.slow
@pytest.mark.parametrize("name", ["rational_20", "rational_30"])
def test_numeric_mode_agrees_on_the_largest_benchmark_cases(name):
    """The largest benchmark cases, as above (30 digits)."""
    case = get_case(name)
    model = case_model(case)
    mu = case.bifurcation
    exact = hopf(model, mu.name, equilibrium={s.name: v for s, v in case.equilibrium.items()})
    e = exact.evaluate(digits=40)
    guess = {s.name: 0.01 for s in case.states}
    guess[mu.name] = 0.02
    num = hopf(model, mu.name, guess=guess, digits=30)
    claimed = int(num.status.split("(")[1].split()[0])
    assert claimed >= 28
    with mpmath.workdps(40):
        assert abs(mpmath.mpf(str(num.l1)) - e.l1) < 10.0 ** (-claimed + 1) * max(1, abs(e.l1))


def _two_point_model():
    """An invented planar field with Hopf points at mu = 1 and mu = 100."""
    return Model(["x", "y"], {"x": "(mu - 1)*(mu - 100)/100*x - y - x^3",
                              "y": "x + (mu - 1)*(mu - 100)/100*y - y^3"}, {"mu": "real"})


def test_newton_stays_near_the_guess_and_reports_its_distance():
    """From a guess near one of two Hopf points the numeric mode returns that
    one and says how far it was; a trust region that holds neither refuses."""
    model = _two_point_model()
    r = hopf(model, "mu", guess={"x": 0.01, "y": 0, "mu": 1.3}, digits=10)
    assert abs(float(r.critical_value) - 1) < 1e-9
    assert any("distance" in n for n in r.notes)
    r = hopf(model, "mu", guess={"x": 0.01, "y": 0, "mu": 90}, digits=10)
    assert abs(float(r.critical_value) - 100) < 1e-7
    from criticality.hopf_analysis.numeric_mode import hopf_numeric
    with pytest.raises(EquilibriumNotFoundError, match="distance"):
        hopf_numeric(model, "mu", {"x": 0.01, "y": 0, "mu": 40}, digits=10, radius=0.3)


def _tanh_ring():
    """An invented ring of three tanh units with one inhibitory link and a bias."""
    return Model(["x", "y", "z"], {"x": "b - x - g*tanh(z)", "y": "-y + g*tanh(x)",
                                   "z": "-z + g*tanh(y)"}, {"g": "positive", "b": "real"})


def test_a_further_point_reuses_the_compiled_model():
    """The model is compiled once: another parameter value or guess reuses it."""
    model = _tanh_ring()
    first = numeric_setup(model, "g", {"b": "1/10"})
    second = numeric_setup(model, "g", {"b": "1/5"})
    assert first.compiled is second.compiled
    guess = {"x": 0.0, "y": 0.0, "z": 0.0, "g": 2.1}
    r1 = hopf(model, "g", guess=guess, values={"b": "1/10"}, digits=10)
    r2 = hopf(model, "g", guess=guess, values={"b": "1/5"}, digits=10)
    assert float(r1.critical_value) != float(r2.critical_value)
    assert pickle.loads(pickle.dumps(r2)).critical_value == r2.critical_value


def test_float64_and_mpmath_routes_agree():
    """The float64 route (up to 13 digits) and the mpmath route give the same
    point and l1 to the float64 digits."""
    model = _tanh_ring()
    guess = {"x": 0.0, "y": 0.0, "z": 0.0, "g": 2.1}
    low = hopf(model, "g", guess=guess, values={"b": "1/10"}, digits=10)
    high = hopf(model, "g", guess=guess, values={"b": "1/10"}, digits=30)
    assert "float64" in low.notes[-1] and "float64" not in high.notes[-1]
    assert abs(float(low.l1) - float(high.l1)) < 1e-9 * abs(float(high.l1))
    assert abs(float(low.critical_value) - float(high.critical_value)) < 1e-9


def test_compiled_expressions_match_sympy_on_every_backend():
    """The generated code evaluates like sympy (common practice, no source)."""
    x, y = sympy.symbols("x y")
    exprs = [x * sympy.exp(y) + sympy.Rational(1, 3), sympy.tanh(x) ** 3 / y,
             sympy.sqrt(1 + x ** 2) - sympy.sech(y), sympy.log(2 + x) * sympy.atan(y) ** -2]
    at = {x: sympy.Rational(3, 7), y: sympy.Rational(-5, 4)}
    want = [complex(sympy.N(e.xreplace(at), 30)) for e in exprs]
    for backend in ("math", "numpy", "mpmath"):
        got = compile_expressions(exprs, [x, y], backend)([3 / 7, -5 / 4])
        for g, w in zip(got, want):
            assert abs(complex(g) - w) < 1e-13 * max(1, abs(w))
    with pytest.raises(UnsupportedExpression):
        compile_expressions([sympy.gamma(x)], [x], "math")
    assert issubclass(UnsupportedExpression, ParameterError)


@pytest.mark.slow
def test_graph_derivatives_match_sympy():
    """Derivatives taken on the expression graph equal sympy's, numerically,
    up to the third order on random expressions (common practice, no source)."""
    rng = random.Random(5)
    x, y = sympy.symbols("x y")
    atoms = [x, y, x * y, x + 2 * y, x ** 2 - y]
    funcs = [sympy.tanh, sympy.exp, sympy.sin, sympy.atan, lambda u: sympy.sqrt(2 + u ** 2),
             lambda u: 1 / (3 + u ** 2), lambda u: (1 + u ** 2) ** sympy.Rational(3, 2)]
    for _ in range(12):
        e = sum(rng.choice(funcs)(rng.choice(atoms)) * rng.choice(atoms) for _ in range(3))
        g = ExpressionGraph()
        root = g.from_sympy(e, {x: 0, y: 1})
        nodes = [root, g.diff(root, 0), g.diff(g.diff(root, 0), 1),
                 g.diff(g.diff(g.diff(root, 1), 1), 0)]
        ref = [e, e.diff(x), e.diff(x, y), e.diff(y, y, x)]
        fn_src = g.source(nodes, 2, "math")
        namespace = {"tanh": math.tanh, "exp": math.exp, "sin": math.sin, "cos": math.cos,
                     "atan": math.atan, "sqrt": math.sqrt, "log": math.log}
        exec(compile(fn_src, "<test>", "exec"), namespace)
        got = namespace["_generated"]([0.3, -0.7])
        for gv, r in zip(got, ref):
            want = float(r.subs({x: 0.3, y: -0.7}))
            assert abs(gv - want) < 1e-10 * max(1, abs(want))


def test_numeric_guess_and_radius_errors():
    """Bad options of the numeric mode name what was expected."""
    model = _two_point_model()
    from criticality.hopf_analysis.numeric_mode import hopf_numeric
    with pytest.raises(ParameterError, match="radius"):
        hopf_numeric(model, "mu", {"x": 0, "y": 0, "mu": 1}, radius=-1)
    with pytest.raises(ParameterError, match="digits"):
        hopf(model, "mu", guess={"x": 0, "y": 0, "mu": 1}, digits=2)
    with pytest.raises(ParameterError, match="mapping"):
        hopf(model, "mu", guess=[0, 0, 1])
