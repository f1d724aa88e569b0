"""Names that look like typos of declared ones are warned about: a Python
warning from the API, a line on standard error from the command line."""

from __future__ import annotations

import warnings

import pytest

from criticality import Model
from criticality.cli.main import main
from criticality.errors import NameTypoWarning


def test_python_warning_names_the_typo_and_the_suggestion():
    """kapa next to a declared kappa: a NameTypoWarning with both names and
    the equation; the model still builds (kapa becomes a real parameter)."""
    with pytest.warns(NameTypoWarning, match=r"equation for 'y' uses 'kapa'.*did you mean "
                                             r"'kappa'"):
        m = Model(["x", "y"], {"x": "y", "y": "-x + kapa*y"}, {"kappa": "positive"})
    assert "kapa" in m.symbols


def test_no_warning_for_a_name_unlike_any_declared():
    """An undeclared name unlike any declared one is only noted, not warned."""
    with warnings.catch_warnings():
        warnings.simplefilter("error", NameTypoWarning)
        m = Model(["x", "y"], {"x": "y", "y": "-x + mu*y"}, {"kappa": "positive"})
    assert any("'mu' was not declared" in n for n in m.notes)


def test_command_line_prints_the_warning_on_stderr(tmp_path, capsys):
    """The CLI writes 'criticality: warning: ...' on standard error."""
    model = tmp_path / "typo.toml"
    model.write_text('states = ["x", "y"]\nbifurcation_parameter = "mu"\n[parameters]\n'
                     'mu = { assume = "real" }\nsigma = { assume = "positive" }\n'
                     '[equations]\nx = "y"\ny = "-x + mu*y - sigam*x^2*y"\n')
    assert main(["analyse", str(model), "-e", "x=0, y=0", "-q"]) == 0
    err = capsys.readouterr().err
    assert "criticality: warning:" in err and "'sigam'" in err and "'sigma'" in err
