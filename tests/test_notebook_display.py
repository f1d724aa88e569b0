"""Notebook and terminal displays: HTML and Markdown for every kind, a short
print(result), the full text one call away."""

from __future__ import annotations

import importlib.util
import pathlib

import pytest

from criticality import Model, hopf

EXAMPLES = pathlib.Path(__file__).resolve().parent.parent / "examples"


def _convection():
    m = Model(["x", "y", "z"], {"x": "sigma*(y - x)", "y": "r*x - y - x*z", "z": "x*y - b*z"},
              {"sigma": "positive", "b": "positive", "r": "positive"}, name="convection")
    return hopf(m, "r", equilibrium={"x": "sqrt(b*(r - 1))", "y": "sqrt(b*(r - 1))",
                                     "z": "r - 1"})


def example(name: str):
    """The result of a bundled example, by its own analyse()."""
    spec = importlib.util.spec_from_file_location(f"example_{name}", EXAMPLES / f"{name}.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module.analyse()


#: the delay example's result kind has its own renderers (tests/test_delay.py)
#: and the map example's result is a Neimark-Sacker point (tests/test_maps.py);
#: the displays below belong to the Hopf results of ordinary equations
DELAY_EXAMPLES = {"cold_store_lag", "sampled_heater"}


@pytest.fixture(scope="module", params=sorted(p.stem for p in EXAMPLES.glob("*.py")
                                              if p.stem not in DELAY_EXAMPLES) + ["convection"])
def result(request):
    if request.param == "convection":
        return _convection()
    return example(request.param)


@pytest.mark.slow
def test_print_is_short_and_details_are_full(result):
    """print(result) shows at most 40 lines (verdict, critical value,
    frequency, l1, conventions, cautions); details() holds every convention."""
    text = str(result)
    lines = text.splitlines()
    assert len(lines) <= 40 and max(map(len, lines)) <= 100
    for piece in ("Verdict", "critical value", "omega ", "l1 = Re(c1)/omega", "Conventions:",
                  "Cautions:", "hysteretic", "licensed engineering practice"):
        assert piece in text, piece
    full = result.details()
    assert len(full.splitlines()) > len(lines)
    assert all(c.split(";")[0] in " ".join(full.split()) for c in result.conventions.lines())


def test_html_and_markdown_tables(result):
    """The notebook displays are a table of the main quantities with the
    verdict and the cautions."""
    html = result._repr_html_()
    assert html.startswith("<div") and "first Lyapunov coefficient l1" in html
    assert "Verdict" in html and "hysteretic" in html and "<script" not in html
    md = result._repr_markdown_()
    assert "| first Lyapunov coefficient l1 | $" in md and "hysteretic" in md


def test_numeric_point_displays():
    """An evaluation at a point has HTML and Markdown too, numbers as decimals."""
    num = _convection().evaluate({"sigma": 10, "b": "8/3"}, digits=20)
    assert "<table>" in num._repr_html_()
    md = num._repr_markdown_()
    assert "| critical value | 24.7368421052632 |" in md


def test_numeric_mode_period_is_a_decimal():
    """A result of the numeric mode prints its period as one decimal number,
    never as a decimal times pi."""
    m = Model(["x", "y"], {"x": "mu*x - y - x*(x^2 + y^2)", "y": "x + mu*y - y*(x^2 + y^2)"},
              {"mu": "real"})
    r = hopf(m, "mu", guess={"x": 0.01, "y": 0.0, "mu": 0.05})
    row = next(line for line in str(r).splitlines() if line.startswith("period"))
    value = row.split()[-1]
    assert "pi" not in value and value.startswith("6.28318530")
