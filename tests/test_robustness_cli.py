"""Named regressions for the command-line side of issue 13: budgets that hold
in every stage, Ctrl-C, value ranges (exit 2, never 70), files that are never
damaged or half-written, capped input, the typo warning and byte-identical
output under any hash seed.

The timings are generous bounds on a stop that must happen at all (a limit of
2 s, a bound of 6 s): machines are noisy, and speed itself lives in
benchmarks/."""

from __future__ import annotations

import os
import signal
import stat
import subprocess
import sys
import time
from pathlib import Path

import pytest

from criticality import files
from criticality.cli import guard
from criticality.cli.main import build_parser, main
from criticality.cli.ranges import DEFAULT_TIME_LIMIT
from criticality.errors import OutputError, OutputExistsError

EXAMPLES = Path(__file__).resolve().parent.parent / "examples"
PLANKTON = str(EXAMPLES / "plankton_grazer.toml")

# Invented three-level food chain: logistic algae A, grazers G with a Holling
# type II intake, predators P with linear predation (no real data).  sympy's
# solve of its positive equilibrium runs for minutes.
CHAIN = """\
name = "Algae, grazers and a predator"
states = ["A", "G", "P"]
bifurcation_parameter = "K"

[parameters]
r = { assume = "positive" }
K = { assume = "positive" }
g = { assume = "positive" }
h = { assume = "positive" }
e = { assume = "positive" }
d = { assume = "positive" }
q = { assume = "positive" }
c = { assume = "positive" }
m = { assume = "positive" }

[equations]
A = "r*A*(1 - A/K) - g*A*G/(h + A)"
G = "e*g*A*G/(h + A) - d*G - q*G*P"
P = "c*q*G*P - m*P"
"""

# Invented two-state model with a second parameter a (Bautin at a = -1).
FAST = """\
name = "fast"
states = ["x", "y"]
bifurcation_parameter = "mu"
[parameters]
mu = { assume = "real" }
a = { assume = "real", value = "1" }
[equations]
x = "mu*x - y - a*x^3"
y = "x + mu*y - y^3"
[equilibrium]
x = "0"
y = "0"
"""


@pytest.fixture
def chain(tmp_path):
    path = tmp_path / "chain.toml"
    path.write_text(CHAIN)
    return str(path)


@pytest.fixture
def fast(tmp_path):
    path = tmp_path / "fast.toml"
    path.write_text(FAST)
    return str(path)


def run(argv, capsys):
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


def command(*argv, **kwargs):
    """The real command in a child process (the process-level guards on)."""
    return subprocess.Popen([sys.executable, "-m", "criticality.cli.main", *map(str, argv)],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, **kwargs)


# -- the budget ---------------------------------------------------------------------------


def test_time_limit_stops_sympys_equilibrium_solve_on_the_command_line(chain):
    """`analyse chain.toml -e positive --time-limit 60` ran 621 s inside
    sympy's solve; with a 2 s limit the real command stops well within 6 s
    with status 7 and names the stage."""
    start = time.monotonic()
    child = command("analyse", chain, "-e", "positive", "--time-limit", "2")
    out, err = child.communicate(timeout=120)
    elapsed = time.monotonic() - start
    text = err.decode()
    assert child.returncode == 7, text
    assert elapsed < 6, elapsed
    assert "time limit 2 s" in text and "solving f(x) = 0 for the equilibria" in text
    assert "Traceback" not in text and out == b""


def test_the_default_budget_and_none(chain):
    parser = build_parser()
    assert parser.parse_args(["analyse", chain]).time_limit == DEFAULT_TIME_LIMIT
    assert parser.parse_args(["analyse", chain, "--time-limit", "none"]).time_limit is None
    assert parser.parse_args(["bautin", chain, "--second", "r"]).time_limit == DEFAULT_TIME_LIMIT
    assert parser.parse_args(["analyse", chain, "--time-limit", "2.5"]).time_limit == 2.5


def test_progress_names_the_slow_stage_on_a_terminal_and_q_silences_it(chain, capsys,
                                                                      monkeypatch):
    monkeypatch.setattr(guard, "is_terminal", lambda stream: True)
    code, _, err = run(["analyse", chain, "-e", "positive", "--time-limit", "2"], capsys)
    assert code == 7
    assert "criticality:   solving f(x) = 0 for the equilibria (sympy's solve) ..." in err
    code, _, err = run(["analyse", chain, "-e", "positive", "--time-limit", "1.5", "-q"], capsys)
    assert code == 7 and " ...\n" not in err


def test_no_progress_when_stderr_is_not_a_terminal(chain, capsys):
    code, _, err = run(["analyse", chain, "-e", "positive", "--time-limit", "1.5"], capsys)
    assert code == 7 and " ...\n" not in err and err.startswith("criticality: error:")


@pytest.mark.skipif(not hasattr(signal, "SIGINT") or os.name != "posix", reason="POSIX signals")
def test_ctrl_c_stops_within_a_second_without_a_traceback(chain):
    """Ctrl-C took 25 s during sympy's solve; now exit 130 within about a
    second (bound 3 s), a one-line message and no traceback."""
    child = command("analyse", chain, "-e", "positive", "--time-limit", "none",
                    preexec_fn=lambda: signal.signal(signal.SIGINT, signal.SIG_DFL))
    time.sleep(3)
    assert child.poll() is None, "the analysis ended before it could be interrupted"
    start = time.monotonic()
    child.send_signal(signal.SIGINT)
    _, err = child.communicate(timeout=60)
    assert child.returncode == 130
    assert time.monotonic() - start < 3
    assert "interrupted" in err.decode() and "Traceback" not in err.decode()


# -- values out of range: exit 2 naming the option ----------------------------------------

_PLANE = ["--x", "k3", "--y", "g", "--x-range", "0", "1", "--y-range", "0", "1"]


@pytest.mark.parametrize("argv, option", [
    (["analyse", "{L}", "--width", "0"], "--width"),
    (["analyse", "{L}", "--order", "99999"], "--order"),
    (["analyse", "{L}", "--order", "4"], "--order"),
    (["analyse", "{L}", "--branch", "-1"], "--branch"),
    (["evaluate", "{L}", "--digits", "100000"], "--digits"),
    (["analyse", "{L}", "--time-limit", "0"], "--time-limit"),
    (["analyse", "{L}", "--time-limit", "nan"], "--time-limit"),
    (["plane", "{L}", *_PLANE, "-o", "{T}/p.png", "--dpi", "0"], "--dpi"),
    (["plane", "{L}", *_PLANE, "-o", "{T}/p.png", "--dpi", "100000"], "--dpi"),
    (["plane", "{L}", *_PLANE, "-o", "{T}/p.png", "--size", "0", "0"], "--size"),
    (["plane", "{L}", *_PLANE, "-o", "{T}/p.png", "--size", "nan", "1"], "--size"),
    (["plane", "{L}", *_PLANE, "-o", "{T}/p.png", "--size", "100", "100", "--dpi", "1200"],
     "--size"),
    (["plane", "{L}", *_PLANE, "-o", "{T}/p.png", "--points", "100000000"], "--points"),
    (["plane", "{L}", "--x", "k3", "--x-range", "1e308", "1.7e308", "--y-range", "0", "1",
      "-o", "{T}/p.png"], "--x-range"),
    (["plane", "{L}", "--x", "k3", "--x-range", "1", "0", "--y-range", "0", "1",
      "-o", "{T}/p.png"], "--x-range"),
    (["confirm", "{L}", "--offsets", "1e300"], "--offsets"),
    (["confirm", "{L}", "--offsets", "1e-300"], "--offsets"),
    (["confirm", "{L}", "--max-periods", "0"], "--max-periods"),
    (["bautin", "{F}", "-p", "mu", "--second", "mu"], "--second"),
])
def test_values_out_of_range_exit_2_naming_the_option(argv, option, fast, tmp_path, capsys):
    lagged = str(EXAMPLES / "lagged_oscillator.toml")
    argv = [a.format(L=lagged, F=fast, T=tmp_path) for a in argv]
    start = time.monotonic()
    code, out, err = run(argv, capsys)
    assert code == 2, err
    assert option in err and "Traceback" not in err and "internal error" not in err
    assert time.monotonic() - start < 30  # refused before any long run
    assert not (tmp_path / "p.png").exists()


def test_bautin_second_parameter_with_a_degenerate_point(fast, capsys):
    """`bautin fast.toml -p mu --second a` was a ValueError (status 70)."""
    code, out, err = run(["bautin", fast, "-p", "mu", "--second", "a"], capsys)
    assert code == 0, err
    assert "degenerate" in out and "Traceback" not in err


# -- files --------------------------------------------------------------------------------


def test_force_keeps_the_mode_and_writes_through_a_symlink(tmp_path, capsys):
    target = tmp_path / "result.json"
    target.write_text("old")
    target.chmod(0o600)
    link = tmp_path / "link.json"
    link.symlink_to(target)
    code, _, err = run(["json", PLANKTON, "-o", link, "--force", "-q"], capsys)
    assert code == 0, err
    assert link.is_symlink() and os.readlink(link) == str(target)
    assert stat.S_IMODE(target.stat().st_mode) == 0o600
    assert target.read_text().startswith("{")


def test_a_character_device_is_written_as_a_stream_never_replaced(capsys):
    before = os.stat("/dev/null")
    code, _, err = run(["json", PLANKTON, "-o", "/dev/null", "--force", "-q"], capsys)
    assert code == 0, err
    after = os.stat("/dev/null")
    assert stat.S_ISCHR(after.st_mode) and after.st_ino == before.st_ino


@pytest.mark.parametrize("make, cause", [
    (lambda p: p.mkdir(), "folder"),
    (lambda p: os.mkfifo(p), "nobody reads"),
    (lambda p: p.symlink_to(p.parent / "missing"), "missing file"),
    (lambda p: (p.write_text("x"), os.link(p, p.parent / "twin")), "hard link"),
])
def test_outputs_that_cannot_be_written_are_status_9_with_the_cause(make, cause, tmp_path,
                                                                    capsys):
    path = tmp_path / "out.json"
    make(path)
    code, _, err = run(["json", PLANKTON, "-o", path, "--force"], capsys)
    assert code == OutputError.exit_code == 9
    assert cause in err and "Traceback" not in err


def test_a_missing_folder_is_status_9_like_every_cannot_write(tmp_path, capsys):
    """It was status 1 from one path and 9 from another."""
    code, _, err = run(["json", PLANKTON, "-o", tmp_path / "no" / "out.json"], capsys)
    assert code == 9 and "does not exist" in err


def test_survey_refuses_before_writing_anything(tmp_path, capsys):
    """A failed survey left plane.png, plane.svg and curve.csv behind; now a
    target in the way stops it before any file is written."""
    out = tmp_path / "survey"
    out.mkdir()
    (out / "amplitude.png").mkdir()
    code, _, err = run(["survey", str(EXAMPLES / "lagged_oscillator.toml"), "--x", "k3",
                        "--x-range", "-1", "1", "--y-range", "0", "2", "--out-dir", out, "-q"],
                       capsys)
    assert code == 9 and "folder" in err
    assert sorted(p.name for p in out.iterdir()) == ["amplitude.png"]


def test_write_all_is_all_or_nothing(tmp_path, monkeypatch):
    """A failure while the temporary files are written leaves no target and
    no temporary file; existing targets keep their text."""
    keep = tmp_path / "b.csv"
    keep.write_text("kept")
    original, calls = files._temporary, []

    def failing(target, data):
        calls.append(target)
        if len(calls) == 3:
            raise OSError(28, "No space left on device")
        return original(target, data)

    monkeypatch.setattr(files, "_temporary", failing)
    items = {tmp_path / "a.png": b"png", keep: "new", tmp_path / "c.svg": "svg"}
    with pytest.raises(OutputError, match="c.svg: No space left"):
        files.write_all(items, force=True)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["b.csv"]
    assert keep.read_text() == "kept"
    with pytest.raises(OutputExistsError):
        files.write_all({tmp_path / "new.txt": "x", keep: "y"})
    assert not (tmp_path / "new.txt").exists()


# -- input --------------------------------------------------------------------------------


def test_standard_input_is_capped_like_a_file():
    """`analyse - < /dev/zero` ran out of memory; now it refuses at 4 MB."""
    with open("/dev/zero", "rb") as zeros:
        child = command("analyse", "-", stdin=zeros)
        _, err = child.communicate(timeout=60)
    assert child.returncode == 3 and "4 MB" in err.decode()
    assert "Traceback" not in err.decode()


@pytest.mark.parametrize("make", [lambda p: os.mkfifo(p), None])
def test_pipes_and_devices_are_refused_as_model_paths(make, tmp_path, capsys):
    """A FIFO as the model path blocked forever."""
    if make is None:
        path = "/dev/zero"
    else:
        path = tmp_path / "model.toml"
        make(path)
    code, _, err = run(["analyse", path], capsys)
    assert code == 3 and "not a regular file" in err


def test_a_typo_of_a_declared_parameter_is_warned_on_stderr(tmp_path, capsys):
    """'bta' beside a declared 'beta' is accepted (a new real parameter) and
    the command says so on stderr, for every subcommand that reads a model."""
    path = tmp_path / "typo.toml"
    path.write_text(FAST.replace('a = { assume = "real", value = "1" }',
                                 'beta = { assume = "real", value = "1" }')
                    .replace("- a*x^3", "- bta*x^3 - beta*x^3"))
    for argv in (["analyse", path, "-q"], ["fold", path, "-q"], ["batch", path, "--out-dir",
                                                                  tmp_path, "-q"]):
        code, _, err = run(argv, capsys)
        assert "criticality: warning:" in err and "'bta'" in err and "did you mean 'beta'" in err


# -- determinism --------------------------------------------------------------------------

_OUTPUTS = """
import sys
from criticality.cli.main import main
model, folder = sys.argv[1], sys.argv[2]
for name, argv in (("json", ["json", model, "--at", "r=1"]), ("tex", ["report", model]),
                   ("txt", ["analyse", model, "--at", "r=1"])):
    assert main(argv + ["-q", "-o", f"{folder}/out.{name}"]) == 0
"""


def test_outputs_are_byte_identical_under_any_hash_seed(tmp_path):
    """The key order of numeric.point followed a set; JSON, LaTeX and text
    must not depend on PYTHONHASHSEED."""
    runs = []
    for seed in ("0", "1", "271828"):
        folder = tmp_path / seed
        folder.mkdir()
        env = dict(os.environ, PYTHONHASHSEED=seed)
        subprocess.run([sys.executable, "-c", _OUTPUTS, PLANKTON, str(folder)], env=env,
                       check=True, timeout=300)
        runs.append({n: (folder / f"out.{n}").read_bytes() for n in ("json", "tex", "txt")})
    assert runs[0] == runs[1] == runs[2]


def test_batch_refuses_pipes_and_devices_and_writes_all_or_nothing(tmp_path, capsys):
    """batch read its model files without a cap (a FIFO blocked, /dev/zero
    filled the memory) and wrote one JSON at a time; a target in the way now
    stops every write."""
    fifo = tmp_path / "pipe.toml"
    os.mkfifo(fifo)
    out = tmp_path / "out"
    out.mkdir()
    code, _, err = run(["batch", fifo, "/dev/zero", PLANKTON, "--out-dir", out], capsys)
    assert code == 1 and err.count("not a regular file") == 2
    assert sorted(p.name for p in out.iterdir()) == ["plankton_grazer.json", "summary.csv"]
    (out / "summary.csv").unlink()
    (out / "summary.csv").mkdir()
    (out / "plankton_grazer.json").unlink()
    code, _, err = run(["batch", PLANKTON, "--out-dir", out, "--force"], capsys)
    assert code == 9 and "folder" in err
    assert sorted(p.name for p in out.iterdir()) == ["summary.csv"]


_STUCK = """
import sys, time
from criticality.cli import options
from criticality.cli.main import main
options.read_model = lambda path, **kw: time.sleep(60)  # stands for a long compiled call
sys.argv = ["criticality", "analyse", sys.argv[1], "--time-limit", "1"]
sys.exit(main())
"""


def test_a_command_stuck_in_compiled_code_ends_two_seconds_after_its_limit():
    """A call the watchdog cannot interrupt (here a sleep) must not keep the
    real command past its budget: it ends with status 7 about two seconds
    after the limit (bound 8 s)."""
    start = time.monotonic()
    done = subprocess.run([sys.executable, "-c", _STUCK, PLANKTON], capture_output=True,
                          timeout=120)
    assert done.returncode == 7, done.stderr
    assert time.monotonic() - start < 8
    assert b"stopped after" in done.stderr and b"Traceback" not in done.stderr
