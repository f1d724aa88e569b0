"""Delay equations: the x(t - tau) syntax, critical delays, crossing direction and c1.

Outside checks (each named beside its test): Wright's equation (Hassard,
Kazarinoff and Wan, Theory and Applications of Hopf Bifurcation, 1981, from
memory), Hutchinson's delayed logistic equation (Hutchinson 1948, from memory),
the Mackey-Glass equation (Mackey and Glass 1977, from memory), the sign
criterion of Cooke and van den Driessche (1986), the ordinary-equation result at
delay 0, and mpmath (roots of the quasi-polynomial by findroot, numeric linear
algebra for c1).
"""

from __future__ import annotations

import json
import pickle
from types import SimpleNamespace

import mpmath
import pytest
import sympy
from hypothesis import given, settings, strategies as st

from criticality import Model, hopf, format_expression, parse_expression
from criticality.errors import (ClosedFormUnavailableError, ForbiddenExpressionError,
                                InvalidModelError, NoHopfPointError)
from criticality.model.delayed import Delayed
from models import WRIGHT

pi = sympy.pi


def R(name, **kw):
    return sympy.Symbol(name, real=True, **kw)


def P(name):
    """A user's own symbol for a parameter declared positive (the model's symbol)."""
    return sympy.Symbol(name, positive=True)


@pytest.fixture(scope="module")
def wright():
    return hopf(WRIGHT, "alpha", equilibrium={"y": 0})


@pytest.fixture(scope="module")
def hutchinson():
    m = Model(["x"], {"x": "r*x*(1 - x(t - tau)/K)"},
              {"r": "positive", "K": "positive", "tau": "positive"})
    return hopf(m, "tau", equilibrium={"x": "K"})


# -- the syntax ---------------------------------------------------------------------------------


def test_delayed_state_is_an_object_tied_to_state_and_delay():
    """x(t - tau) becomes Delayed(x, tau); the same text gives the same object."""
    m = Model(["x"], {"x": "x(t - tau) - x(t - tau)^3 + x(t - 1/2)"}, {"tau": "positive"})
    x, tau = m.symbols["x"], m.symbols["tau"]
    terms = m.equations[0].atoms(Delayed)
    assert terms == {Delayed(x, tau), Delayed(x, sympy.Rational(1, 2))}
    assert m.delays == (sympy.Rational(1, 2), tau)
    assert Delayed(x, 0) == x


@pytest.mark.parametrize("text, words", [
    ("x(t)", "write x for the current value"),
    ("x(t + 1)", "future value"),
    ("x(t - 2*tau)", "one parameter name or a positive number"),
    ("x(s - 1)", "the time must be written t"),
    ("x(t - y)", "is a state"),
    ("x(t - 0)", "is 0"),
    ("x(t - 1, 2)", "one argument"),
    ("x(2)", "the only call of a state"),
    ("x(t - q)", "not declared"),
    ("x(t - tau)", "declared real"),
    ("z(t - 1)", "not a known function"),
    ("x(tau=1)", "one argument"),
])
def test_every_other_form_is_refused_with_a_clear_message(text, words):
    with pytest.raises(InvalidModelError, match=words.replace("(", r"\(")):
        Model(["x", "y"], {"x": text, "y": "x"}, {"tau": "real"})


def test_delays_only_in_equations():
    with pytest.raises(InvalidModelError, match="not a known function|only in an equation"):
        Model(["x"], {"x": "-x(t - 1)"}, equilibrium={"x": "x(t - 1)"})


def test_parser_without_states_still_refuses_calls():
    with pytest.raises(ForbiddenExpressionError, match="not a known function"):
        parse_expression("x(t - 1)")
    assert parse_expression("x(t - 1)", delayed=["x"]) == Delayed(R("x"), 1)


def test_text_toml_pickle_and_latex_round_trips():
    m = Model(["u", "v"], {"u": "-a*u(t - tau) + v", "v": "-u - v(t - 0.25)^2"},
              {"a": "positive", "tau": "positive"})
    assert format_expression(m.equations[0]) == "-a*u(t - tau) + v"
    assert Model.from_text(m.to_toml()) == m
    assert pickle.loads(pickle.dumps(m)) == m
    assert r"u\left(t - \tau\right)" in sympy.latex(m.equations[0])
    built = -R("a") * Delayed(R("u"), R("tau")) + R("v")
    assert Model(["u", "v"], [built, -R("u")], {"a": "positive", "tau": "positive"}
                 ).equations[0] == m.equations[0]


def test_with_values_fixes_a_delay():
    m = Model(["x"], {"x": "-k*x(t - tau)"}, {"k": "positive", "tau": "positive"})
    fixed = m.with_values(tau="1/3")
    assert fixed.delays == (sympy.Rational(1, 3),)


# -- outside references -------------------------------------------------------------------------


def test_wright_equation(wright):
    """Wright's equation y' = -alpha y(t-1)(1+y): Hopf at alpha = pi/2 with
    omega = pi/2, supercritical, amplitude^2 = 40 (alpha - pi/2)/(3 pi - 2)
    (Hassard, Kazarinoff and Wan 1981; from memory; the slow test simulates it
    and agrees)."""
    r = wright
    assert r.mode == "parameter"
    assert sympy.simplify(r.critical_value - pi / 2) == 0
    assert sympy.simplify(r.omega - pi / 2) == 0
    assert r.classification == "supercritical"
    assert sympy.simplify(r.cycle.amplitude_coefficients["y"] - 40 / (3 * pi - 2)) == 0
    assert r.cycle.side == "above"
    assert r.routes_agree
    assert sympy.simplify(r.critical_values(2)[1] - 5 * pi / 2) == 0


def test_hutchinson_equation(hutchinson):
    """Hutchinson's x' = r x (1 - x(t - tau)/K): tau_c = pi/(2 r), omega = r,
    supercritical for all r, K > 0 (Hutchinson 1948; from memory).  The
    amplitude law follows from Wright's by the scaling x = K (1 + y), s = r t
    (derived here, common practice)."""
    r = hutchinson
    rr, K = P("r"), P("K")
    assert r.mode == "delay"
    assert sympy.simplify(r.critical_value - pi / (2 * rr)) == 0
    assert r.omega == rr
    assert r.classification == "supercritical"
    assert r.crossing_direction == 1
    j = sympy.Symbol("j", integer=True, nonnegative=True)
    assert sympy.simplify(r.critical_sequence - (pi / 2 + 2 * pi * j) / rr) == 0
    k = r.cycle.amplitude_coefficients["x"]
    assert sympy.simplify(k - 40 * rr * K ** 2 / (3 * pi - 2)) == 0
    assert r.routes_agree


def test_cooke_van_den_driessche_sign_matches_findroot(hutchinson):
    """sign Re(d lambda/d tau) = sign F'(omega^2) at every tau_j (Cooke and van
    den Driessche 1986); checked against roots located by mpmath.findroot."""
    num = hutchinson.evaluate({"r": "3/2", "K": 2}, digits=25)
    assert num.residual < mpmath.mpf(10) ** -20
    assert abs(num.numeric_slope.real - num.transversality) < mpmath.mpf(10) ** -6
    assert hutchinson.crossing_indicator == 1 and num.transversality > 0


@pytest.mark.slow
def test_mackey_glass_published_hopf_condition():
    """Mackey-Glass x' = beta x_tau/(1 + x_tau^n) - gamma x with beta = 2 gamma,
    n = 10 (equilibrium x = 1): the linearisation lambda + gamma + b
    exp(-lambda tau) with b = -f'(1) = 4 gamma gives the published Hopf
    condition tau_c = arccos(-gamma/b)/sqrt(b^2 - gamma^2) and omega =
    sqrt(b^2 - gamma^2) (Mackey and Glass, Science 197, 1977; from memory)."""
    m = Model(["x"], {"x": "2*g*x(t - tau)/(1 + x(t - tau)^10) - g*x"},
              {"g": "positive", "tau": "positive"})
    r = hopf(m, "tau", equilibrium={"x": 1})
    g = sympy.Symbol("g", positive=True)
    b = 4 * g
    assert sympy.simplify(r.omega - sympy.sqrt(b ** 2 - g ** 2)) == 0
    expected = sympy.acos(-g / b) / sympy.sqrt(b ** 2 - g ** 2)
    assert sympy.simplify(r.critical_value - expected) == 0
    assert r.crossing_direction == 1
    num = r.evaluate({"g": "1/3"}, digits=25)
    assert abs(num.numeric_c1 - num.c1) < mpmath.mpf(10) ** -18
    assert r.routes_agree


def test_numeric_route_and_residual(wright):
    """mpmath: the quasi-polynomial vanishes at i omega, c1 from numeric matrices and
    d lambda/d alpha from findroot agree with the closed forms."""
    num = wright.evaluate({}, digits=30)
    assert num.residual < mpmath.mpf(10) ** -25
    assert abs(num.numeric_c1 - num.c1) < mpmath.mpf(10) ** -25
    assert abs(num.numeric_slope.real - num.transversality) < mpmath.mpf(10) ** -8


# -- delay 0 and two routes ---------------------------------------------------------------------


def _c1_at_zero_delay(model, mu_name, mu_c, omega):
    """The delay room's c1 (unit normalisation) with every delay set to 0."""
    from dataclasses import replace
    from criticality.delay.critical import positive_symbols
    from criticality.delay.cx import Cx
    from criticality.delay.linearize import delay_forms
    from criticality.delay.normal_form import center_data
    forms = delay_forms(model, (0,) * len(model.states))
    forms = replace(forms, delays=(sympy.S.Zero,) * len(forms.delays))
    forward, _ = positive_symbols(model)
    mu = forward.get(model.symbols[mu_name], model.symbols[mu_name])
    crossing = SimpleNamespace(mode="parameter", w=omega, T=sympy.Dummy("T"), factor=Cx(1),
                               mu_of_w=mu_c)
    data = center_data(forms.substitute(forward), crossing, mu)
    return sympy.nsimplify(sympy.S(data.c1_projection.re) / data.qq)


_coef = st.integers(-3, 3)


@pytest.mark.slow
@settings(max_examples=8, deadline=None)
@given(a=_coef, b=_coef, c=_coef, e=_coef)
def test_delay_zero_gives_the_ordinary_result(a, b, c, e):
    """With every delay 0 the delay room's c1 equals criticality.hopf on the
    ordinary equation (projection formula, common practice)."""
    text = f"-x + mu*y(t - 1) + ({a})*x^2 + ({b})*x*y(t - 1) + ({c})*x^3 + ({e})*x^2*y(t - 1)"
    dde = Model(["x", "y"], {"x": "y", "y": text}, {"mu": "real"})
    ode = Model(["x", "y"], {"x": "y", "y": text.replace("y(t - 1)", "y")}, {"mu": "real"})
    ref = hopf(ode, "mu", equilibrium={"x": 0, "y": 0})
    assert ref.critical_value == 0 and ref.omega == 1
    re_c1 = _c1_at_zero_delay(dde, "mu", sympy.S.Zero, sympy.S.One)
    assert sympy.simplify(re_c1 - ref.l1 * ref.omega) == 0


@pytest.mark.slow
@settings(max_examples=6, deadline=None)
@given(k=st.sampled_from([2, 5, 10]), b=_coef, c=_coef, d=st.integers(-2, 2))
def test_two_routes_agree_on_random_delay_models(k, b, c, d):
    """The projection form and the Hassard-Kazarinoff-Wan procedure give the same
    c1 exactly, and the mpmath route agrees numerically (F(s) = (s + 1)^2 - k^2,
    omega^2 = k - 1)."""
    m = Model(["x", "y"], {"x": "-x + y", "y": f"-{k}*x(t - tau) + ({b})*x(t - tau)^2 + "
                           f"({c})*x*y + ({d})*x^3 - y"},
              {"tau": "positive"})
    r = hopf(m, "tau", equilibrium={"x": 0, "y": 0})
    assert r.routes_agree
    num = r.evaluate({}, digits=20)
    assert abs(num.numeric_c1 - num.c1) < mpmath.mpf(10) ** -12


# -- refusals -----------------------------------------------------------------------------------


def test_no_crossing_is_reported():
    m = Model(["x"], {"x": "-2*x - x(t - tau)"}, {"tau": "positive"})
    with pytest.raises(NoHopfPointError, match="no positive root"):
        hopf(m, "tau", equilibrium={"x": 0})


def test_two_delays_have_no_closed_crossing():
    m = Model(["x"], {"x": "-x(t - tau) - x(t - 1)"}, {"tau": "positive"})
    with pytest.raises(ClosedFormUnavailableError, match="2 distinct delays.*guess="):
        hopf(m, "tau", equilibrium={"x": 0})


def test_two_delays_in_the_numeric_mode():
    """x' = -x(t - tau) - x(t - 1): at lambda = i omega, cos(omega tau) + cos(omega) = 0 and
    omega = sin(omega tau) + sin(omega) (common practice, no source), so omega tau =
    pi - omega with omega = 2 sin(omega); the numeric mode locates that crossing."""
    m = Model(["x"], {"x": "-x(t - tau) - x(t - 1) - x^3"}, {"tau": "positive"})
    r = hopf(m, "tau", guess={"x": 0, "tau": 0.6, "omega": 1.9})
    with mpmath.workdps(40):
        w = mpmath.findroot(lambda w: w - 2 * mpmath.sin(w), 1.9)
        assert abs(r.omega - w) < 1e-25 and abs(r.critical_value - (mpmath.pi - w) / w) < 1e-25


# -- outputs and the command line ---------------------------------------------------------------


def test_delay_results_render_through_the_registry(hutchinson):
    """Text, LaTeX, JSON, HTML and Markdown come from the renderers registered
    for the kind hopf_delay; the notebook displays carry the caution."""
    from criticality.renderers import formats_of
    assert {"text", "latex", "report", "json", "dict", "html", "markdown"} <= set(
        formats_of("hopf_delay"))
    html, md = hutchinson._repr_html_(), hutchinson._repr_markdown_()
    assert "<table>" in html and "licensed engineering practice" in html
    assert "| frequency omega |" in md and "hysteretic" in md
    assert hutchinson.to_dict()["analysis"] == "hopf_delay"


def test_json_latex_and_text(hutchinson):
    from criticality.delay.render import read_delay_json
    text = hutchinson.to_json()
    doc = json.loads(text)
    assert doc["schema"] == "criticality.hopf_delay" and doc["schema_version"] == 1
    assert list(doc)[:6] == ["schema", "schema_version", "generator", "analysis", "status",
                             "conventions"] and doc["cautions"]
    back = read_delay_json(text)
    assert back["critical_value"] == hutchinson.critical_value == pi / (2 * P("r"))
    assert back["equations"]["x"] == hutchinson.model.equations[0]
    tex = hutchinson.latex_document()
    assert tex.startswith(r"\documentclass") and r"\tau_0 &= \frac{\pi}{2 r}" in tex
    assert "supercritical" in str(hutchinson) and "local" in str(hutchinson)


@pytest.mark.slow
def test_cli_runs_a_delay_model(tmp_path, capsys):
    from criticality.cli.main import main
    path = tmp_path / "lag.toml"
    path.write_text('states = ["x"]\n[parameters]\nk = "positive"\ntau = "positive"\n'
                    '[equations]\nx = "-k*x(t - tau) - x^3"\n[equilibrium]\nx = "0"\n')
    assert main(["analyse", str(path), "-p", "tau", "-q"]) == 0
    assert "pi/(2*k)" in capsys.readouterr().out
    assert main(["json", str(path), "-p", "tau", "-q"]) == 0
    assert json.loads(capsys.readouterr().out)["omega"] == "k"
    assert main(["hopf-delay", str(path), "-p", "tau", "--format", "latex", "-q"]) == 0
    assert r"\ell_1" in capsys.readouterr().out
    assert main(["evaluate", str(path), "-p", "tau", "--at", "k=2", "-q"]) == 0
    assert "residual" in capsys.readouterr().out


# -- simulation (slow) --------------------------------------------------------------------------


@pytest.mark.slow
def test_wright_simulation_confirms_the_amplitude_law(wright):
    """Method-of-steps RK4 with Hermite history: the simulated amplitudes of
    Wright's equation agree with 40 (alpha - pi/2)/(3 pi - 2) and the error
    shrinks with the offset (the leading-order law of Hassard, Kazarinoff and
    Wan 1981 agrees with our simulation)."""
    report = wright.validate({})
    assert report.status == "confirmed", str(report)
    errors = [row["relative_error"] for row in report.rows]
    assert errors[-1] < errors[0] and errors[-1] < 0.005


@pytest.mark.slow
def test_hutchinson_simulation_in_the_delay(hutchinson):
    """Hutchinson's equation at r = 1, K = 2 simulated at three delays past pi/2."""
    report = hutchinson.validate({"r": 1.0, "K": 2.0})
    assert report.agrees and report.converging, str(report)
    assert all(row["period_error"] < 0.01 for row in report.rows)


@pytest.mark.slow
def test_bundled_example_runs():
    """examples/cold_store_lag.py prints its verdict (an invented scenario)."""
    import subprocess
    import sys
    from pathlib import Path
    script = Path(__file__).resolve().parent.parent / "examples" / "cold_store_lag.py"
    done = subprocess.run([sys.executable, str(script)], capture_output=True, text=True,
                          timeout=300)
    assert done.returncode == 0, done.stderr
    assert "supercritical" in done.stdout and "first critical lags" in done.stdout


@pytest.mark.slow
def test_bundled_example_simulation():
    """The cold store's predicted hunting cycle is confirmed by simulation."""
    model = Model.from_file(__import__("pathlib").Path(__file__).resolve().parent.parent
                            / "examples" / "cold_store_lag.toml")
    r = hopf(model, "tau", values=model.defaults())
    report = r.validate({})
    assert report.status == "confirmed", str(report)


def test_latex_document_compiles(hutchinson, tmp_path):
    """The delay report is a document pdflatex compiles (skips without pdflatex)."""
    import os
    import shutil
    import subprocess
    pdflatex = shutil.which("pdflatex")
    if pdflatex is None:
        if os.environ.get("CRITICALITY_REQUIRE_LATEX") == "1":
            pytest.fail("pdflatex is required (CRITICALITY_REQUIRE_LATEX=1) but not installed")
        pytest.skip("pdflatex is not installed")
    (tmp_path / "delay.tex").write_text(hutchinson.latex_document())
    done = subprocess.run([pdflatex, "-interaction=nonstopmode", "-halt-on-error", "delay.tex"],
                          cwd=tmp_path, capture_output=True, text=True, timeout=180)
    assert done.returncode == 0 and (tmp_path / "delay.pdf").exists(), done.stdout[-2000:]


def test_numeric_mode_from_a_guess_matches_the_closed_form(wright):
    """hopf(..., guess=...) locates Wright's Hopf point with mpmath.findroot and
    reproduces the closed forms (alpha = pi/2, c1) to the working precision."""
    m = Model(["y"], {"y": "-alpha*y(t - 1)*(1 + y)"}, {"alpha": "positive"})
    n = hopf(m, "alpha", guess={"y": "0.1", "alpha": "1.4"}, digits=25)
    assert n.status == "numeric" and n.classification == "supercritical"
    exact = wright.evaluate({}, digits=25)
    with mpmath.workdps(25):
        assert abs(n.critical_value - mpmath.pi / 2) < mpmath.mpf(10) ** -20
        assert abs(n.c1 - exact.c1) < mpmath.mpf(10) ** -15
        assert abs(n.amplitude_coefficients["y"] - 40 / (3 * mpmath.pi - 2)) < \
            mpmath.mpf(10) ** -6


def test_numeric_mode_without_a_closed_equilibrium():
    """An equilibrium of x' = -x + k tanh(x(t - 1)) + 1/10 has no closed form; the
    numeric mode still finds the crossing (the residual of chi vanishes)."""
    m = Model(["x"], {"x": "-x + k*tanh(x(t - 1)) + h"}, {"k": "real", "h": {"value": "1/10"}})
    n = hopf(m, "k", guess={"x": 0, "k": "-2.2"}, digits=20)
    assert n.residual < mpmath.mpf(10) ** -15
    x = n.equilibrium["x"]
    assert abs(-x + n.critical_value * mpmath.tanh(x) + mpmath.mpf(1) / 10) < mpmath.mpf(10) ** -15


def test_cli_numeric_mode_for_two_delays(tmp_path, capsys):
    """A model with two delays runs from the command line with --guess: text,
    JSON in the shared envelope and a LaTeX report; evaluating elsewhere is
    refused with a parameter error (exit 4), not an internal error."""
    from criticality.cli.main import main
    path = tmp_path / "two.toml"
    path.write_text('states = ["x", "y"]\n[parameters]\ntau1 = "positive"\n'
                    'tau2 = { assume = "positive", value = "1/2" }\n'
                    'a = { assume = "positive", value = "2" }\n[equations]\n'
                    'x = "-x(t - tau1) + a*y - x^3"\ny = "-x(t - tau2) - y"\n'
                    '[equilibrium]\nx = "0"\ny = "0"\n')
    guess = ["-p", "tau1", "-q", "--guess", "x=0,y=0,tau1=0.7,omega=1.8"]
    assert main(["analyse", str(path), *guess]) == 0
    assert "located numerically" in capsys.readouterr().out
    assert main(["json", str(path), *guess]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["schema"] == "criticality.hopf_delay_numeric" and doc["cautions"]
    assert abs(float(doc["critical_value"]) - 0.651889755831243) < 1e-12
    assert main(["report", str(path), *guess]) == 0
    assert r"{\tau_{1}}_0 &= 0.65188975583124" in capsys.readouterr().out
    from criticality.errors import ParameterError
    assert main(["evaluate", str(path), *guess]) == ParameterError.exit_code
    assert "no closed form to evaluate" in capsys.readouterr().err


def test_latex_of_a_delay_named_with_a_subscript_compiles(tmp_path):
    """A delay called tau1 prints as tau_{1}; its critical value is braced
    before the subscript 0, and the report compiles."""
    from test_latex_compile import compile_report
    m = Model(["x"], {"x": "-k*x(t - tau1) - x^3"}, {"k": "positive", "tau1": "positive"})
    r = hopf(m, "tau1", equilibrium={"x": 0})
    tex = r.latex_document()
    assert r"{\tau_{1}}_{0} &=" in tex and r"\tau_{1}_" not in tex
    compile_report(tex, tmp_path)


@pytest.mark.slow
def test_evaluate_where_no_root_crosses_raises_the_projects_error():
    """x' = -a x - b x(t - tau) - x^3 has roots i omega with
    omega^2 = b^2 - a^2 (for b > a > 0; Hayes, J. London Math. Soc. 25 (1950),
    from memory); at a = 2, b = 1 evaluate() says omega^2 = -3 < 0 instead of
    letting sympy's comparison of a complex number fail."""
    from criticality import InadmissiblePointError
    m = Model(states=["x"], equations={"x": "-a*x - b*x(t - tau) - x**3"},
              parameters={"a": "positive", "b": "positive", "tau": "positive"})
    r = hopf(m, "tau", equilibrium={"x": 0})
    with mpmath.workdps(30):
        assert abs(r.evaluate({"a": 1, "b": 2}).omega - mpmath.sqrt(3)) < 1e-25
    with pytest.raises(InadmissiblePointError, match=r"omega\^2 = -3\.0 < 0") as info:
        r.evaluate({"a": 2, "b": 1})
    assert info.value.quantity == "omega_squared"
