"""The LaTeX report a referee would accept: every formula in math mode, no
code syntax in the text, quantities named in words, fixed parameters listed;
the fragment drops into a minimal article and compiles."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from criticality import Model, hopf, latex_report
from criticality.outputs.prose import prose_to_tex

from test_latex_compile import compile_report

EXAMPLES = Path(__file__).resolve().parent.parent / "examples"
OPTIONS = {"cooled_reactor": {"eliminate": ["k", "T0"],
                              "assume": {"c_eq": "positive", "T_eq": "positive"}}}
#: what code syntax looks like once escaped for LaTeX text mode
CODE = [r"\*\\allowbreak", r"\\_", r"\\\^\{\}", r"\\textless", r"\\textgreater", r"\*\*",
        r"engine's words", r"\bl1\b", r"\bomega\b", r"\+-"]


def text_only(tex: str) -> str:
    """The report with its mathematics (inline and displayed) removed."""
    tex = re.sub(r"\\begin\{(align\*|aligned|tabular)\}.*?\\end\{\1\}", " ", tex, flags=re.S)
    tex = re.sub(r"\$[^$]*\$", " ", tex)
    return tex


#: delay models render through the delay room's own report (tests/test_delay.py)
#: and maps have their own analyses (tests/test_maps.py); the rules below are
#: checked on the Hopf reports of ordinary differential equations
ODE_EXAMPLES = sorted(p.stem for p in EXAMPLES.glob("*.toml")
                      if not Model.from_file(p).delays and Model.from_file(p).kind == "flow")


@pytest.fixture(scope="module", params=ODE_EXAMPLES)
def report(request):
    result = hopf(Model.from_file(EXAMPLES / f"{request.param}.toml"),
                  **OPTIONS.get(request.param, {}))
    return request.param, result, latex_report(result)


@pytest.mark.slow
def test_no_code_syntax_in_the_text(report):
    """Outside math mode no report contains escaped code: no *, _, ^, <, >,
    no l1 or omega spelled in letters."""
    name, _, tex = report
    body = text_only(tex[tex.index("\\begin{document}"):])
    found = {pattern: re.findall(r".{30}" + pattern + r".{0,30}", body)
             for pattern in CODE if re.search(pattern, body)}
    assert found == {}, (name, found)


@pytest.mark.slow
def test_quantities_are_named_in_words(report):
    """The report names the first Lyapunov coefficient, the frequency and the
    transversality in words."""
    _, _, tex = report
    for words in ("first Lyapunov coefficient", "frequency", "transversality"):
        assert words in tex


@pytest.mark.slow
def test_fixed_parameters_are_listed(tmp_path):
    """A parameter fixed with values= appears in the parameter table with its
    value, in the text summary and in the JSON."""
    import json

    result = hopf(Model.from_file(EXAMPLES / "lagged_oscillator.toml"), values={"k3": "1/4"})
    tex = latex_report(result)
    assert "$k_{3}$ & fixed & $\\frac{1}{4}$" in tex
    assert "Fixed before the analysis: k3 = 1/4" in str(result)
    assert json.loads(result.to_json())["model"]["fixed"] == {"k3": "1/4"}
    compile_report(tex, tmp_path, "fixed")


def test_inequalities_read_expression_then_zero(report):
    """Conditions are written with the deciding expression on the left and 0
    on the right (no row starts with "0 <" or "0 >")."""
    _, _, tex = report
    assert not re.search(r"^0 &[<>]", tex, flags=re.M)


MINIMAL = ("\\documentclass{article}\n\\usepackage{amsmath}\n\\usepackage{amssymb}\n"
           "\\usepackage{booktabs}\n\\begin{document}\nSome text of the paper.\n%s\n"
           "More text.\n\\end{document}\n")


@pytest.mark.slow
def test_fragments_compile_inside_a_minimal_article(tmp_path):
    """latex_report(fragment=True) and the equation block drop into an
    existing article (amsmath, amssymb, booktabs) and compile."""
    result = hopf(Model.from_file(EXAMPLES / "plankton_grazer.toml"))
    fragment = latex_report(result, fragment=True)
    assert "\\documentclass" not in fragment and "\\begin{document}" not in fragment
    compile_report(MINIMAL % fragment, tmp_path, "fragment")
    compile_report(MINIMAL % result.to_latex(), tmp_path, "block")


def test_description_math_is_converted():
    """A model description's formulas become math: x*y^2 is $x\\,y^{2}$,
    never the escaped x*y^{} of plain text."""
    out = prose_to_tex("the term x*y^2 saturates; pair +-kappa; omega^2 > 0", ["x", "y"])
    assert out == "the term $x\\,y^{2}$ saturates; pair $\\pm\\kappa$; $\\omega^{2} > 0$"
