"""The LaTeX derivation report compiles with pdflatex.

Where pdflatex is missing the tests skip with a message, unless the
environment variable CRITICALITY_REQUIRE_LATEX=1 is set (CI sets it, after
installing Debian's texlive-latex-base and texlive-latex-recommended): then a
missing pdflatex is a failure.
"""

from __future__ import annotations

import os
import shutil
import subprocess
from pathlib import Path

import pytest

from criticality import Model, hopf, latex_report

EXAMPLES = Path(__file__).resolve().parent.parent / "examples"


def _pdflatex():
    found = shutil.which("pdflatex")
    if found:
        return found
    if os.environ.get("CRITICALITY_REQUIRE_LATEX") == "1":
        pytest.fail("pdflatex is required (CRITICALITY_REQUIRE_LATEX=1) but not installed; "
                    "install texlive-latex-base and texlive-latex-recommended")
    pytest.skip("pdflatex is not installed (apt-get install texlive-latex-base "
                "texlive-latex-recommended); set CRITICALITY_REQUIRE_LATEX=1 to make this fail")


def compile_report(tex: str, folder: Path, name: str = "report") -> str:
    """Compile ``tex`` in ``folder``; returns the log; fails with the first
    error lines of the log if pdflatex does not produce a PDF."""
    pdflatex = _pdflatex()
    (folder / f"{name}.tex").write_text(tex)
    done = subprocess.run([pdflatex, "-interaction=nonstopmode", "-halt-on-error",
                           f"{name}.tex"], cwd=folder, capture_output=True, text=True,
                          timeout=180)
    log = (folder / f"{name}.log").read_text(errors="replace") if (
        folder / f"{name}.log").exists() else done.stdout
    if done.returncode != 0 or not (folder / f"{name}.pdf").exists():
        errors = [line for line in log.splitlines() if line.startswith("!")]
        pytest.fail(f"pdflatex failed ({done.returncode}): {errors[:5]}\n{log[-2000:]}")
    return log


def test_names_that_look_like_macros_compile(tmp_path):
    """Parameters named E, I, lambda, gamma (and beta_1, a state theta) give a
    report that compiles, with no line running into the margin."""
    model = Model(["theta", "y"],
                  {"theta": "lambda*theta - gamma*y + E*theta^2 - theta^3 + beta_1*theta*y",
                   "y": "gamma*theta + lambda*y + I*theta*y - y^3"},
                  {"lambda": "real", "gamma": "positive", "E": "real", "I": "real",
                   "beta_1": "real"}, name="Names like E, I, lambda & gamma: 100% safe")
    result = hopf(model, "lambda", equilibrium={"theta": 0, "y": 0})
    tex = latex_report(result)
    assert "\\lambda" in tex and "\\gamma" in tex and "\\beta_{1}" in tex
    log = compile_report(tex, tmp_path)
    assert "Overfull \\hbox" not in log


@pytest.mark.slow
def test_radicals_and_long_coefficients_compile(tmp_path):
    """A three-state model with a radical equilibrium and long Lyapunov
    coefficients (named factors, broken sums, the reduced system) compiles."""
    model = Model(["x", "y", "z"], {"x": "sigma*(y - x)", "y": "r*x - y - x*z",
                                    "z": "x*y - b*z"},
                  {"sigma": "positive", "b": "positive", "r": "positive"},
                  name="Convection cell")
    result = hopf(model, "r", equilibrium={"x": "sqrt(b*(r - 1))", "y": "sqrt(b*(r - 1))",
                                           "z": "r - 1"})
    tex = latex_report(result)
    for section in ("Model", "Equilibrium", "Linearisation at the critical point",
                    "Frequency and transversality", "Eigenvectors",
                    "Reduced system on the center manifold", "Normal-form coefficients",
                    "Criticality", "Predicted cycle", "Conditions", "Conventions", "Cautions"):
        assert f"\\section*{{{section}}}" in tex
    assert "P_{1} &= " in tex
    log = compile_report(tex, tmp_path)
    assert log.count("Overfull \\hbox") <= 2


@pytest.mark.slow
@pytest.mark.parametrize("name, options", [
    ("plankton_grazer", {}), ("firing_rate_unit", {}), ("lagged_oscillator", {}),
    ("plankton_grazer", {"eliminate": "auto"}),
    ("cooled_reactor", {"eliminate": ["k", "T0"],
                        "assume": {"c_eq": "positive", "T_eq": "positive"}}),
])
def test_example_reports_compile(name, options, tmp_path):
    """The report of every example compiles to a PDF."""
    result = hopf(Model.from_file(EXAMPLES / f"{name}.toml"), **options)
    compile_report(latex_report(result), tmp_path, name)


@pytest.mark.slow
def test_demo_report_compiles(tmp_path):
    from criticality.cli.demo import demo_text

    result = hopf(Model.from_text(demo_text()))
    log = compile_report(latex_report(result), tmp_path, "demo")
    assert "Overfull \\hbox" not in log


def test_report_where_l2_decides_compiles(tmp_path):
    """l1 vanishes identically: the report states the fourth-root law, gives
    the amplitudes and names l2 as the deciding coefficient, and compiles."""
    model = Model(["x", "y"], {"x": "mu*x - y - x*(x^2 + y^2)^2",
                               "y": "x + mu*y - y*(x^2 + y^2)^2"}, {"mu": "real"},
                  name="Quintic oscillator")
    result = hopf(model, "mu", equilibrium={"x": 0, "y": 0})
    tex = latex_report(result)
    assert "A_{x} &= \\sqrt[4]{\\mu}" in tex and "\\ell_{2} < 0" in tex
    compile_report(tex, tmp_path)
