"""The ``criticality`` command line, in-process through ``main([...])`` and
through the installed console script."""

from __future__ import annotations

import io
import json
import os
import shutil
import subprocess
import sys

import pytest

from criticality.cli.main import EXIT_USAGE, main
from criticality.cli.support import Stage
from criticality.errors import (InvalidModelFileError, ModelFileError, NoHopfPointError,
                                OutputExistsError, ParameterError)

STAGE = """
name = "Lagged stage"
states = ["x", "v", "w"]
bifurcation_parameter = "g"
[parameters]
g = "positive"
zeta = { assume = "positive", value = "1/10" }
tau = { assume = "positive", value = "1/2" }
k3 = { assume = "real", value = "1/4" }
[equations]
x = "v"
v = "-x - k3*x^3 - zeta*v + w"
w = "(g*v - w)/tau"
[equilibrium]
x = "0"
v = "0"
w = "0"
"""

NO_HOPF = """
states = ["x", "y"]
[parameters]
mu = "real"
[equations]
x = "mu*x"
y = "-y"
"""


@pytest.fixture
def model_file(tmp_path):
    path = tmp_path / "stage.toml"
    path.write_text(STAGE)
    return str(path)


def run(argv, capsys):
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


# -- subcommands ---------------------------------------------------------------------------


def test_analyse_prints_the_summary(model_file, capsys):
    """``analyse`` prints the table, the verdict and the cautions."""
    code, out, err = run(["analyse", model_file], capsys)
    assert code == 0, err
    assert "Hopf bifurcation of 'Lagged stage' in the parameter g" in out
    assert "Classification: depends" in out and "k3" in out and "Cautions" in out


def test_analyse_accepts_the_american_spelling_and_a_point(model_file, capsys):
    code, out, _ = run(["analyze", model_file, "--at", "k3=-1/4", "--digits", "12"], capsys)
    assert code == 0
    assert "Numeric values at k3 = -1/4" in out and "subcritical" in out


def test_set_fixes_values_before_the_analysis(model_file, capsys):
    """``--set`` gives exact closed forms at the fixed values."""
    code, out, _ = run(["analyse", model_file, "--set", "zeta=1/10", "--set", "tau=1/2",
                        "--set", "k3=1/4"], capsys)
    assert code == 0
    assert "critical value g_c          13/105" in out
    assert "supercritical for all admissible parameters" in out


@pytest.mark.slow
def test_report_writes_a_document_atomically_and_never_overwrites(model_file, tmp_path, capsys):
    """The report is a standalone document; a second run refuses to overwrite
    without --force and leaves no temporary file behind."""
    target = tmp_path / "out" / "stage.tex"
    target.parent.mkdir()
    code, _, err = run(["report", model_file, "-o", target], capsys)
    assert code == 0 and "wrote" in err
    text = target.read_text()
    assert text.startswith("\\documentclass") and text.rstrip().endswith("\\end{document}")
    target.write_text("keep me")
    code, _, err = run(["report", model_file, "-o", target], capsys)
    assert code == OutputExistsError.exit_code == 9
    assert "exists" in err and "--force" in err
    assert target.read_text() == "keep me"
    assert sorted(os.listdir(target.parent)) == ["stage.tex"]
    code, _, _ = run(["report", model_file, "-o", target, "--force", "-q"], capsys)
    assert code == 0 and target.read_text().startswith("\\documentclass")


def test_report_fragment_to_stdout(model_file, capsys):
    code, out, _ = run(["report", model_file, "--fragment"], capsys)
    assert code == 0 and out.startswith("\\begin{align*}") and "\\ell_{1}" in out


def test_json_with_a_point(model_file, tmp_path, capsys):
    target = tmp_path / "stage.json"
    code, _, _ = run(["json", model_file, "--at", "k3=-1/4", "--digits", "15", "-o", target],
                     capsys)
    assert code == 0
    doc = json.loads(target.read_text())
    assert doc["numeric"]["digits"] == 15 and doc["numeric"]["classification"] == "subcritical"
    assert doc["numeric"]["point"]["k3"] == "-1/4"


def test_evaluate_to_many_digits(model_file, capsys):
    code, out, _ = run(["evaluate", model_file, "--digits", "40"], capsys)
    assert code == 0
    line = next(l for l in out.splitlines() if l.strip().startswith("critical value"))
    assert len(line.split()[-1].lstrip("0.").replace(".", "")) == 40


def test_standard_input(model_file, capsys, monkeypatch):
    """``-`` reads the model from standard input."""
    monkeypatch.setattr(sys, "stdin", io.StringIO(STAGE))
    code, out, _ = run(["json", "-", "--compact"], capsys)
    assert code == 0 and json.loads(out)["critical_value"].startswith("zeta*")


def test_list_comes_from_the_registry(capsys):
    from criticality.registry import analyses

    code, out, _ = run(["list"], capsys)
    assert code == 0
    for a in analyses():
        assert a.name in out


@pytest.mark.slow
def test_demo_shows_every_output(tmp_path, capsys):
    """The demo needs no model file and shows summary, LaTeX, JSON and numbers;
    with --output-dir it writes three files and then refuses to overwrite."""
    code, out, _ = run(["demo", "--output-dir", tmp_path / "d"], capsys)
    assert code == 0
    for piece in ("Greenhouse heating loop", "Classification: depends", "\\begin{align*}",
                  '"schema": "criticality/hopf-result"', "Numeric values at",
                  "supercritical", "subcritical", "Cautions"):
        assert piece in out
    assert sorted(os.listdir(tmp_path / "d")) == ["demo-model.toml", "demo-report.tex",
                                                   "demo-result.json"]
    code, _, err = run(["demo", "--output-dir", tmp_path / "d"], capsys)
    assert code == 9 and "exists" in err


# -- bad command lines and bad files --------------------------------------------------------


@pytest.mark.parametrize("argv", [
    [], ["frobnicate"], ["analyse"], ["analyse", "m.toml", "--set", "a"],
    ["analyse", "m.toml", "--equilibrium", "somewhere"], ["analyse", "m.toml", "--order", "x"],
    ["evaluate", "m.toml", "--at", "=3"],
])
def test_bad_command_lines_exit_2(argv, capsys):
    code, _, err = run(argv, capsys)
    assert code == EXIT_USAGE == 2
    assert "usage" in err.lower() or "error" in err.lower()


def test_repeated_values_are_a_usage_error(model_file, capsys):
    code, _, err = run(["analyse", model_file, "--set", "tau=1", "--set", "tau=2"], capsys)
    assert code == 2 and "'tau' is given twice" in err


def test_missing_file(tmp_path, capsys):
    code, _, err = run(["analyse", tmp_path / "nope.toml"], capsys)
    assert code == ModelFileError.exit_code == 3
    assert "not found" in err and "Traceback" not in err


def test_invalid_file_names_the_line(tmp_path, capsys):
    path = tmp_path / "bad.toml"
    path.write_text(STAGE.replace('x = "v"', 'x = "v +* 2"').replace("states", "sates"))
    code, _, err = run(["analyse", path], capsys)
    assert code == InvalidModelFileError.exit_code == 3
    assert "did you mean 'states'" in err and "line" in err
    assert err.startswith("criticality: error: ") and "Traceback" not in err


def test_unknown_parameter_and_debug(model_file, capsys):
    """Errors are one paragraph; --debug adds the traceback."""
    code, _, err = run(["analyse", model_file, "-p", "gg"], capsys)
    assert code == ParameterError.exit_code == 4
    assert "did you mean 'g'" in err and "Traceback" not in err
    code, _, err = run(["analyse", model_file, "-p", "gg", "--debug"], capsys)
    assert code == 4 and "Traceback" in err


def test_no_hopf_point(tmp_path, capsys):
    path = tmp_path / "none.toml"
    path.write_text(NO_HOPF)
    code, _, err = run(["analyse", path, "-p", "mu", "-e", "x=0, y=0"], capsys)
    assert code == NoHopfPointError.exit_code == 6
    assert "imaginary axis" in err or "no pair" in err


def test_progress_is_reported_for_slow_stages_only():
    """A stage longer than the threshold prints its name and its time; quiet
    silences it; a fast stage prints nothing."""
    stream = io.StringIO()
    with Stage("slow thing", after=0.0, stream=stream):
        pass
    assert "slow thing" in stream.getvalue() and " s" in stream.getvalue()
    quiet = io.StringIO()
    with Stage("slow thing", after=0.0, quiet=True, stream=quiet):
        pass
    fast = io.StringIO()
    with Stage("fast thing", after=60.0, stream=fast):
        pass
    assert quiet.getvalue() == "" and fast.getvalue() == ""


def test_extension_subcommands_are_registered(capsys):
    """The simulation-check subcommands of criticality.cli.checks appear."""
    pytest.importorskip("criticality.cli.checks")
    code, out, _ = run(["--help"], capsys)
    assert code == 0 and "confirm" in out


# -- the installed script ------------------------------------------------------------------


def _script():
    found = shutil.which("criticality")
    if found:
        return [found]
    return [sys.executable, "-c", "import sys; from criticality.cli.main import main; "
                                  "sys.exit(main())"]


@pytest.mark.slow
def test_installed_script_reads_stdin_and_reports_errors(model_file):
    """The console script works end to end, with stdin and exit codes."""
    done = subprocess.run(_script() + ["analyse", "-", "-q"], input=STAGE, text=True,
                          capture_output=True, timeout=120)
    assert done.returncode == 0 and "Classification: depends" in done.stdout
    done = subprocess.run(_script() + ["analyse", "no-such-file.toml"], text=True,
                          capture_output=True, timeout=120)
    assert done.returncode == 3 and "not found" in done.stderr
    assert "Traceback" not in done.stderr and done.stdout == ""
    done = subprocess.run(_script() + ["--version"], text=True, capture_output=True, timeout=60)
    assert done.returncode == 0 and "criticality" in done.stdout


@pytest.mark.slow
def test_installed_script_demo():
    done = subprocess.run(_script() + ["demo", "-q"], text=True, capture_output=True,
                          timeout=180)
    assert done.returncode == 0, done.stderr
    assert "Greenhouse heating loop" in done.stdout and done.stderr == ""


def test_other_analyses_have_subcommands(tmp_path, capsys):
    """fold, bautin and bogdanov-takens run from the command line through the
    registry; the double-zero normal form x' = y, y' = b1 + b2 y + x^2 + x y
    has a = b = 1 (Kuznetsov, Elements of Applied Bifurcation Theory, 3rd ed.,
    2004, Section 8.4: the normal form read off)."""
    model = tmp_path / "bt.toml"
    model.write_text('name = "double zero"\nstates = ["x", "y"]\n[parameters]\nb1 = "real"\n'
                     'b2 = "real"\n[equations]\nx = "y"\ny = "b1 + b2*y + x^2 + x*y"\n')
    assert main(["bogdanov-takens", str(model), "-p", "b2", "--second", "x_eq",
                 "--eliminate", "b1,y", "-q"]) == 0
    out = capsys.readouterr().out
    assert "Bogdanov-Takens point" in out and "sign of a b        positive" in out
    assert main(["fold", str(model), "-p", "b1", "--eliminate", "b1,y", "--set", "b2=-1",
                 "-q"]) == 0
    assert "fold" in capsys.readouterr().out.lower()


def test_numeric_mode_from_the_command_line(tmp_path, capsys):
    """--guess runs the numeric mode on a model whose equilibrium has no closed
    form (x' = y, y' = -x + mu y - x^2 y + e (exp(x) - 1 - x), solved from a
    guess); the critical value mu = 0 is exact (common practice, no source)."""
    model = tmp_path / "num.toml"
    model.write_text('name = "numeric"\nstates = ["x", "y"]\n[parameters]\nmu = "real"\n'
                     'e = { assume = "real", value = "1/10" }\n[equations]\nx = "y"\n'
                     'y = "-x + mu*y - x^2*y + e*(exp(x) - 1 - x)"\n')
    assert main(["analyse", str(model), "-p", "mu", "--guess", "x=0.01,y=0,mu=0.1", "-q"]) == 0
    out = capsys.readouterr().out
    assert "numeric" in out.lower()
