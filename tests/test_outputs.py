"""Golden outputs of a Hopf result: the terminal table, the JSON, the LaTeX.

The small planar model ``x' = mu x - y + a x y``, ``y' = x + mu y - x^2 y`` is
used throughout; its coefficients are also checked against the classical
planar formula of Guckenheimer and Holmes (1983), so the goldens encode
values known from outside the project.
"""

from __future__ import annotations

import json

import pytest
import sympy

from criticality import Model, hopf
from criticality.outputs.latex_expr import Notation, TexWriter, latex_name
from criticality.outputs.render import split_complex, wrap_expression
from criticality.outputs.latex import result_to_latex, result_to_notebook_latex
from criticality.outputs.text import numeric_summary, result_summary

R = lambda name: sympy.Symbol(name, real=True)  # noqa: E731


@pytest.fixture(scope="module")
def pair():
    model = Model(["x", "y"], {"x": "mu*x - y + a*x*y", "y": "x + mu*y - x^2*y"},
                  {"mu": "real", "a": "real"}, name="Small test pair")
    return hopf(model, "mu", equilibrium={"x": 0, "y": 0})


@pytest.fixture(scope="module")
def stage():
    model = Model(["x", "v", "w"], {"x": "v", "v": "-x - k3*x^3 - zeta*v + w",
                                    "w": "(g*v - w)/tau"},
                  {"g": "positive", "zeta": "positive", "tau": "positive", "k3": "real"},
                  name="Lagged stage")
    return hopf(model, "g", equilibrium={"x": 0, "v": 0, "w": 0})


def test_planar_coefficient_matches_the_classical_formula(pair):
    """The coefficient a of Guckenheimer and Holmes (1983, Section 3.4, the
    formula for a in the planar normal form; equation number (3.4.11) from
    memory) computed here from f = a x y, g = -x^2 y with omega = 1 equals
    the result's planar coefficient, and l1 = 2 a / omega."""
    x, y, a = R("x"), R("y"), R("a")
    f, g, omega = a * x * y, -x**2 * y, 1
    d = lambda e, *v: sympy.diff(e, *v).subs({x: 0, y: 0})  # noqa: E731
    a_gh = (sympy.Rational(1, 16) * (d(f, x, x, x) + d(f, x, y, y) + d(g, x, x, y) + d(g, y, y, y))
            + sympy.Rational(1, 16) / omega * (d(f, x, y) * (d(f, x, x) + d(f, y, y))
                                               - d(g, x, y) * (d(g, x, x) + d(g, y, y))
                                               - d(f, x, x) * d(g, x, x)
                                               + d(f, y, y) * d(g, y, y)))
    assert a_gh == sympy.Rational(-1, 8)
    assert pair.planar_coefficient == a_gh
    assert pair.l1 == 2 * a_gh / omega


def test_predicted_amplitude_matches_the_planar_normal_form(pair):
    """In the planar normal form r' = (d mu + a r^2) r (Guckenheimer and Holmes
    1983, Section 3.4) the cycle has r^2 = -d mu / a = 8 mu here (d = 1,
    a = -1/8), so x oscillates with amplitude sqrt(8 mu)."""
    mu = R("mu")
    assert pair.cycle.amplitudes["x"] == sympy.sqrt(8) * sympy.sqrt(mu)


def test_terminal_table_golden(pair):
    """The table of quantities reads exactly as expected."""
    lines = result_summary(pair).splitlines()
    start = lines.index("quantity                    closed form")
    assert lines[start:start + 11] == [
        "quantity                    closed form",
        "--------------------------  ----------------------------------------",
        "critical value mu_c         0",
        "omega^2                     1",
        "omega                       1",
        "period 2*pi/omega           2*pi",
        "transversality Re dl/dmu    1",
        "l1 = Re(c1)/omega           -1/4",
        "Re c1                       -1/4",
        "Im c1                       -a**2/12",
        "<q, q>                      2",
    ]


def test_terminal_summary_sections(pair):
    """The summary has the verdict in words, the conditions with status, the
    cycle, the conventions and every caution, in that order."""
    text = result_summary(pair)
    assert text.splitlines()[0] == "Hopf bifurcation of 'Small test pair' in the parameter mu"
    order = ["Classification: supercritical", "Verdict", "Supercritical (l1 < 0)",
             "the equilibrium is unstable for mu >", "Conditions", "[holds] omega^2 > 0",
             "Cycle near onset", "The cycle exists for mu > mu_c",
             "It is orbitally stable", "squared radius rho^2 = K*(mu - mu_c)", "Conventions",
             "<a, b> = conj(a)^T b", "Cautions", "The analysis is local",
             "abrupt, hysteretic onset", "verify the result",
             "licensed engineering practice"]
    positions = [text.find(piece) for piece in order]
    assert all(p >= 0 for p in positions), [o for o, p in zip(order, positions) if p < 0]
    assert positions == sorted(positions)
    assert str(pair) == text and sympy.sstr(pair) == text


def test_summary_wraps_long_expressions(stage):
    """No line of the summary of a symbolic model is wider than asked."""
    text = result_summary(stage, width=80)
    assert max(len(line) for line in text.splitlines()) <= 80
    assert "supercritical exactly where" in text


def test_latex_block_golden(pair):
    """Every quantity as a row of one align* block."""
    assert result_to_latex(pair) == (
        "\\begin{align*}\n"
        "{\\mu}_{\\mathrm{c}} &= 0 \\\\\n"
        "\\omega^{2} &= 1 \\\\\n"
        "\\omega &= 1 \\\\\n"
        "T &= \\frac{2 \\pi}{\\omega} \\\\\n"
        "\\operatorname{Re}\\frac{d\\lambda}{d\\mu}\\Big|_{{\\mu}_{\\mathrm{c}}} &= 1 \\\\\n"
        "\\operatorname{Re} c_{1} &= - \\frac{1}{4} \\\\\n"
        "\\operatorname{Im} c_{1} &= - \\frac{a^{2}}{12} \\\\\n"
        "\\ell_{1} &= - \\frac{1}{4} \\\\\n"
        "&\\text{classification: supercritical}\n"
        "\\end{align*}")
    assert sympy.latex(pair) == result_to_latex(pair)


def test_notebook_latex_golden(pair):
    """The Jupyter block is a compact aligned environment between $$."""
    assert pair._repr_latex_() == result_to_notebook_latex(pair) == (
        "$$\\begin{aligned}\n"
        "{\\mu}_{\\mathrm{c}} &= 0 \\\\\n"
        "\\omega^{2} &= 1 \\\\\n"
        "\\ell_{1} &= - \\frac{1}{4} \\\\\n"
        "&\\text{classification: supercritical}\n"
        "\\end{aligned}$$")


def test_latex_names_long_factors_and_states_the_condition(stage):
    """A wide denominator becomes a named factor defined after the block, l1
    is written over omega, and the condition reads k_3 > 0 (the deciding
    expression on the left, 0 on the right)."""
    tex = result_to_latex(stage)
    assert ("\\ell_{1} &= - \\frac{3 k_{3} \\tau^{2} \\zeta \\left(\\tau \\zeta + 1\\right)^{3}}"
            "{2 P_{1} \\omega} \\\\") in tex
    assert "k_{3} &> 0 \\\\" in tex
    where = tex.index("\\intertext{where}")
    assert tex.index("P_{1} &= ") > where
    assert "&\\qquad {}\\cdot " in tex  # the product is broken between factors
    assert "\\intertext{where} \\\\" not in tex


def test_json_golden(pair):
    """The main keys of the JSON document, exactly."""
    doc = json.loads(pair.to_json())
    assert doc["schema"] == "criticality/hopf-result" and doc["schema_version"] == 1
    expected = {
        "parameter": "mu", "status": "closed form", "critical_value": "0",
        "omega_squared": "1", "omega": "1", "period": "2*pi", "transversality": "1",
        "eigenvalue_derivative": {"re": "1", "im": "0"},
        "c1": {"re": "-1/4", "im": "-a**2/12"}, "l1": "-1/4", "planar_coefficient": "-1/8",
        "lyapunov_coefficients": ["-1/4"], "q_norm_squared": "2",
        "classification": "supercritical",
        "verdict": "supercritical for all admissible parameters",
        "supercritical_where": None, "l1_zero_set": None,
        "equilibrium": {"method": "given", "point": {"x": "0", "y": "0"}, "eliminated": {}},
        "branch": {"index": 0, "count": 1}, "assumptions": {"mu": "real", "a": "real"},
        "cycle": {"side": "above", "side_condition": None, "stable": True,
                  "radius_squared": "4*mu", "amplitude_squared_slopes": {"x": "8", "y": "8"},
                  "amplitudes": {"x": "2*sqrt(2)*sqrt(mu)", "y": "2*sqrt(2)*sqrt(mu)"},
                  "amplitude_power": 2, "period": "2*pi", "frequency_slope": "-a**2/3"},
    }
    assert {k: doc[k] for k in expected} == expected
    assert doc["conditions"][0] == {
        "key": "omega_squared_positive",
        "description": "omega^2 > 0: the pair is imaginary, not a real pair +-kappa",
        "expression": "1", "relation": ">", "status": "holds"}
    assert doc["model"]["equations"] == {"x": "a*x*y + mu*x - y", "y": "mu*y - y*x**2 + x"}


def test_numeric_summary_uses_the_requested_digits(stage):
    """Numbers appear with the number of digits asked for."""
    text = numeric_summary(stage.evaluate({"zeta": "1/10", "tau": "1/2", "k3": "1/4"},
                                          digits=25))
    line = next(l for l in text.splitlines() if l.strip().startswith("critical value"))
    digits = line.split()[-1].lstrip("0.").replace(".", "")
    assert len(digits) == 25 and digits.isdigit()
    assert "classification              supercritical" in text


@pytest.mark.parametrize("name, expected", [
    ("sigma", "\\sigma"), ("beta_1", "\\beta_{1}"), ("x_eq", "x_{\\mathrm{eq}}"),
    ("E", "E"), ("I", "I"), ("lambda", "\\lambda"), ("gamma", "\\gamma"), ("T0", "T_{0}"),
    ("eps", "\\mathit{eps}"), ("Da", "\\mathit{Da}"), ("k_on_2", "k_{\\mathrm{on},2}"),
    ("x_eq_", "{x_{\\mathrm{eq}}'}"), ("_a", "\\mathit{\\_a}"),
])
def test_latex_names(name, expected):
    """Model names become LaTeX that never calls an unknown macro."""
    assert latex_name(name) == expected


def test_notation_avoids_model_names():
    """A model with a parameter omega or lambda gets other report symbols."""
    n = Notation(["omega", "lambda", "xi", "P"])
    assert n.names["~omega"] != "\\omega" and n.names["~lambda"] != "\\lambda"
    assert n.names["~xi"] != "\\xi" and n.factor_letter != "P"


def test_sum_breaks_between_terms():
    """A long sum is broken into rows no wider than asked, with signs kept."""
    b, s = R("b"), R("sigma")
    poly = sympy.Add(*[(k + 1) * b**k * s**(7 - k) for k in range(8)]) - 1
    writer = TexWriter(Notation(["b", "sigma"]), width=30, threshold=20)
    rows = writer.align_rows("P", poly)
    assert len(rows) > 1 and rows[0].startswith("P &= ")
    assert all(r.startswith("&\\qquad {}+ ") or r.startswith("&\\qquad {}- ") for r in rows[1:])


def test_split_complex_and_wrap():
    """Complex quantities split structurally; wrapping prefers sums."""
    a = R("a")
    assert split_complex(a - sympy.I * a**2 / 3) == (a, -a**2 / 3)
    assert wrap_expression("a*(b + c) + d*(e + f) - g", 15) == ["a*(b + c)", "+ d*(e + f) - g"]


def test_planar_conversion_factor_with_a_symbolic_frequency():
    """For x' = mu x - w y - x^3, y' = w x + mu y the coefficient of
    Guckenheimer and Holmes (1983, Section 3.4) is a = f_xxx/16 = -3/8
    (common practice to evaluate, formula from the same source), and the
    reported l1 = 2 a / omega = -3/(4 w): the factor 2/omega of
    docs/conventions.md, checked with omega != 1."""
    w = sympy.Symbol("w", positive=True)  # as declared
    model = Model(["x", "y"], {"x": "mu*x - w*y - x^3", "y": "w*x + mu*y"},
                  {"mu": "real", "w": "positive"})
    result = hopf(model, "mu", equilibrium={"x": 0, "y": 0})
    a_gh = sympy.Rational(1, 16) * sympy.diff(-R("x")**3, R("x"), 3)
    assert result.planar_coefficient == a_gh == sympy.Rational(-3, 8)
    assert sympy.simplify(result.l1 - 2 * a_gh / w) == 0


def test_verdict_words_do_not_spell_out_huge_factors():
    """Printing a factor of thousands of terms can take longer than computing
    it: the verdict's words then name the factor, and the relation itself is
    still kept whole in supercritical_where and zero_set."""
    from criticality.hopf_analysis.classify import classify
    from criticality.algebra.signs import UNDECIDED, FactoredSign, FactorSign

    x, y = sympy.symbols("x y", real=True)
    big = sympy.Add(*(x ** i * y ** (i % 7) for i in range(300)))
    fs = FactoredSign(sympy.Integer(-1), (FactorSign(big, 1, False, UNDECIDED),), UNDECIDED)
    v = classify(fs)
    assert v.classification == "depends"
    assert "not spelled out" in v.text and "supercritical_where" in v.text
    assert v.supercritical_where.lhs == big and v.zero_set.lhs == big
    small = FactoredSign(sympy.Integer(-1), (FactorSign(x - y, 1, False, UNDECIDED),), UNDECIDED)
    assert "x - y > 0" in classify(small).text
