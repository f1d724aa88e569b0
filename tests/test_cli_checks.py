"""The command-line subcommands for the simulation check and the diagrams.

They run in-process through the main command, :func:`criticality.cli.main.main`,
which registers them.
"""

import argparse
import io
import struct

import pytest

from criticality.cli.main import main
from criticality.cli.checks import EXIT_INCONCLUSIVE, EXIT_NOT_CONFIRMED, register
from criticality.errors import OutputExistsError, ParameterError

MODEL = """
name = "Invented damped pair with a slow store"
states = ["u", "v", "w"]
bifurcation_parameter = "mu"
[parameters]
mu = "real"
a = { assume = "real", value = "1" }
[equations]
u = "v - u*w"
v = "-u + (mu - a^2)*v - u^2*v + a*u*w"
w = "-w + u^2"
[equilibrium]
u = "0"
v = "0"
w = "0"
"""

LORENZ = """
states = ["x", "y", "z"]
[parameters]
sigma = "positive"
b = "positive"
r = "positive"
[equations]
x = "sigma*(y - x)"
y = "r*x - y - x*z"
z = "x*y - b*z"
"""


def run(argv):
    return main([str(a) for a in argv] + ["--quiet"])


def test_register_adds_the_subcommands():
    """register() adds confirm, plane and survey, each with a handler, to any parser."""
    parser = argparse.ArgumentParser(prog="criticality")
    sub = parser.add_subparsers(dest="command")
    assert register(sub) is None
    plane = ["--x", "a", "--x-range", "0", "1", "--y-range", "0", "1"]
    for argv in (["confirm", "m.toml"], ["plane", "m.toml", *plane, "-o", "f.png"],
                 ["survey", "m.toml", *plane, "--out-dir", "d"]):
        assert callable(parser.parse_args(argv).handler)
    assert EXIT_NOT_CONFIRMED not in (0, 2) and EXIT_INCONCLUSIVE not in (0, 2)


@pytest.fixture
def model_file(tmp_path):
    path = tmp_path / "pair.toml"
    path.write_text(MODEL)
    return path


@pytest.mark.slow
def test_confirm_prints_the_report(model_file, capsys):
    code = run(["confirm", model_file, "--offsets", "0.08", "0.04"])
    out = capsys.readouterr().out
    assert code == 0
    assert "Simulation check of the Hopf prediction in mu at a = 1" in out
    assert "Verdict: confirmed" in out


@pytest.mark.slow
def test_confirm_writes_latex_and_refuses_to_overwrite(model_file, tmp_path, capsys):
    target = tmp_path / "report.tex"
    argv = ["confirm", model_file, "--offsets", "0.08", "--at", "a=1/2", "--format", "latex",
            "-o", target]
    assert run(argv) == 0
    assert "\\begin{tabular}" in target.read_text()
    assert run(argv) == OutputExistsError.exit_code
    assert "exists" in capsys.readouterr().err
    assert run(argv + ["--force"]) == 0


@pytest.mark.slow
def test_confirm_reports_a_poor_prediction_by_its_exit_status(model_file, capsys):
    """Far from onset (offset 30 at a = 1) the check does not confirm."""
    code = run(["confirm", model_file, "--offsets", "30", "--max-periods", "400"])
    assert code == EXIT_NOT_CONFIRMED
    assert "not confirmed" in capsys.readouterr().out


@pytest.mark.slow
def test_plane_writes_png_and_csv(model_file, tmp_path, capsys):
    png, table = tmp_path / "plane.png", tmp_path / "curve.csv"
    code = run(["plane", model_file, "--x", "a", "--x-range", "-12", "4", "--y-range", "-5",
                "100", "--size", "4", "3", "--dpi", "50", "-o", png, "--csv", table,
                "--points", "80"])
    assert code == 0
    data = png.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n" and struct.unpack(">II", data[16:24]) == (200, 150)
    lines = table.read_text().splitlines()
    assert lines[0] == "segment,a,mu,l1,classification,others_stable"
    assert len(lines) == 81


@pytest.mark.slow
def test_equilibrium_option_and_standard_input(tmp_path, monkeypatch, capsys):
    """An equilibrium with a comma-free function call, and the model from stdin."""
    monkeypatch.setattr("sys.stdin", io.StringIO(LORENZ))
    png = tmp_path / "lorenz.svg"
    code = run(["plane", "-", "-p", "r", "--equilibrium",
                "x=sqrt(b*(r-1)), y=sqrt(b*(r-1)), z=r-1", "--at", "b=8/3", "--x", "sigma",
                "--x-range", "1", "30", "--y-range", "0", "100", "-o", png])
    assert code == 0 and png.read_text().lstrip().startswith("<?xml")


def test_bad_input_gives_the_package_error(model_file, tmp_path, capsys):
    assert run(["confirm", model_file, "--at", "a"]) == 2  # a usage error of argparse
    assert "NAME=VALUE" in capsys.readouterr().err
    assert run(["confirm", model_file, "--at", "zeta=1"]) == ParameterError.exit_code
    assert "zeta" in capsys.readouterr().err
    code = run(["plane", model_file, "--x", "b", "--x-range", "0", "1", "--y-range", "0", "1",
                "-o", tmp_path / "p.png"])
    assert code == ParameterError.exit_code
    assert "'b'" in capsys.readouterr().err
    assert not (tmp_path / "p.png").exists()


@pytest.mark.slow
def test_survey_writes_every_file(model_file, tmp_path, capsys):
    out = tmp_path / "survey"
    code = run(["survey", model_file, "--x", "a", "--x-range", "-12", "4", "--y-range", "-5",
                "100", "--offsets", "0.08", "0.04", "--out-dir", out, "--points", "60",
                "--at", "a=1/2"])
    assert code == 0
    names = sorted(p.name for p in out.iterdir())
    assert names == sorted(["report.txt", "report.tex", "plane.png", "plane.svg", "curve.csv",
                            "amplitude.png"])
    assert run(["survey", model_file, "--x", "a", "--x-range", "-12", "4", "--y-range", "-5",
                "100", "--offsets", "0.08", "--out-dir", out]) == OutputExistsError.exit_code
