"""The renderer registry: results ask it for their printers, every kind
shares one JSON envelope, and LaTeX text is escaped by one function."""

from __future__ import annotations

import ast
import json
import pathlib

import pytest
import sympy

import criticality
from criticality import Model, hopf
from criticality.bifurcations.bogdanov_takens import bogdanov_takens
from criticality.bifurcations.fold import fold
from criticality.errors import ModelFileError
from criticality.outputs.envelope import read_document, read_envelope
from criticality.outputs.escape import tex_text
from criticality.renderers import formats_of, register_renderer, render, renderer

SRC = pathlib.Path(criticality.__file__).parent
RESULT_MODULES = ["hopf_analysis/results.py", "bifurcations/fold.py", "bifurcations/bautin.py",
                  "bifurcations/bogdanov_takens.py", "checks/numeric.py"]
HEAD = ["schema", "schema_version", "generator", "analysis", "status", "conventions"]


def _imports(path: pathlib.Path) -> set:
    out = set()
    for node in ast.walk(ast.parse(path.read_text())):
        if isinstance(node, ast.ImportFrom):
            out.add(("." * node.level) + (node.module or ""))
        elif isinstance(node, ast.Import):
            out.update(a.name for a in node.names)
    return out


@pytest.mark.parametrize("module", RESULT_MODULES)
def test_results_do_not_import_their_printers(module):
    """No result module imports an output module, not even inside a method."""
    imported = _imports(SRC / module)
    assert not [m for m in imported if "outputs" in m], imported


def test_one_latex_escape_table():
    """Only outputs/escape.py spells out the LaTeX escape of a backslash."""
    holders = [p.relative_to(SRC).as_posix() for p in SRC.rglob("*.py")
               if "\\textbackslash" in p.read_text()]
    assert holders == ["outputs/escape.py"]


@pytest.fixture(scope="module")
def pair():
    m = Model(["x", "y"], {"x": "mu*x - y", "y": "x + mu*y - x^2*y"}, {"mu": "real"})
    return hopf(m, "mu", equilibrium={"x": 0, "y": 0})


@pytest.fixture(scope="module")
def others():
    f = fold(Model(["x"], {"x": "mu - x^2"}, parameters={"mu": "real"}), "mu", eliminate=["mu"])
    bt = bogdanov_takens(Model(["x", "y"], {"x": "y", "y": "b1 + b2*x + 2*x^2 - 3*x*y"},
                               parameters={"b1": "real", "b2": "real"}),
                         "b2", "x_eq", eliminate=["b1", "y"])
    return f, bt


def test_every_kind_has_every_format(pair, others):
    """Each kind registers text, LaTeX, JSON, HTML and Markdown."""
    for result in (pair, *others):
        have = set(formats_of(result.result_kind))
        assert {"text", "details", "latex", "json", "html", "markdown"} <= have
        assert result._repr_html_().startswith("<div") and "<table>" in result._repr_html_()
        assert "| quantity | value |" in result._repr_markdown_()


def test_one_envelope_for_every_kind(pair, others):
    """The documents of every kind start with the same keys, version the
    integer 1, and carry notes and cautions."""
    for result in (pair, *others):
        doc = json.loads(result.to_json())
        assert list(doc)[:6] == HEAD, list(doc)[:6]
        assert doc["schema_version"] == 1 and doc["analysis"] == result.result_kind
        assert "notes" in doc and any("local" in c for c in doc["cautions"])
        assert read_document(result.to_json())["schema"] == doc["schema"]


def test_old_documents_with_a_string_version_still_read():
    """A document written with ``"schema_version": "1"`` reads back; an
    unknown version is refused by name."""
    old = {"schema": "criticality.fold", "schema_version": "1", "quantities": {"a": "-1"}}
    assert read_envelope(old)["quantities"] == {"a": "-1"}
    with pytest.raises(ModelFileError, match="schema_version 7"):
        read_envelope(dict(old, schema_version=7))
    with pytest.raises(ModelFileError, match="criticality/hopf-result"):
        read_envelope(old, "criticality/hopf-result")


def test_hopf_read_back_accepts_version_string(pair):
    """read_expressions reads a Hopf document whose version is the string "1"."""
    from criticality.outputs.json_io import read_expressions

    doc = json.loads(pair.to_json())
    doc["schema_version"] = "1"
    assert read_expressions(json.dumps(doc))["l1"] == sympy.Rational(-1, 4)


def test_unknown_format_names_what_exists(pair):
    """Asking for a format nobody registered says which formats exist."""
    assert isinstance(render(pair, "dict"), dict)
    with pytest.raises(LookupError, match="registered formats: text"):
        renderer("fold", "report")


def test_a_new_kind_plugs_in():
    """A new kind registers its renderers without touching the results."""
    class Toy:
        result_kind = "toy_for_test"

    register_renderer("toy_for_test", "text", lambda r: "toy")
    assert render(Toy(), "text") == "toy"
    with pytest.raises(ValueError, match="unknown output format"):
        register_renderer("toy_for_test", "pdf", lambda r: "")


def test_escape():
    """Specials and non-ASCII text are made safe for LaTeX."""
    assert tex_text("50% of x_1 & {y}") == "50\\% of x\\_1 \\& \\{y\\}"
