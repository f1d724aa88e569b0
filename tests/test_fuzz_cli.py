"""Fuzzing the command line: generated argv for every subcommand on small
models, run in-process through ``main(argv)`` under a short budget.

Asserted for every run: the exit status is one of the documented statuses
(docs/cli.md; never 70, the internal error), standard error carries no
Python traceback, and no run outlives its budget by more than the watchdog's
margin.  The options are drawn from the real option names with values that
are mostly out of range or malformed (so each run stays cheap) and sometimes
valid (so the analyses run too, on a tiny invented model)."""

from __future__ import annotations

import contextlib
import io
import os
import sys
import time
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from criticality import budget
from criticality.cli.main import main

EXAMPLES = Path(__file__).resolve().parent.parent / "examples"

# Invented two-state model: a Hopf point at mu = 0, cheap to analyse.
TINY = """\
name = "tiny"
states = ["x", "y"]
bifurcation_parameter = "mu"
[parameters]
mu = { assume = "real" }
a = { assume = "real", value = "1/2" }
[equations]
x = "mu*x - y - a*x^3"
y = "x + mu*y - y^3 + a*x^2*y"
[equilibrium]
x = "0"
y = "0"
"""

#: every status docs/cli.md documents (70 is a bug and must never appear)
DOCUMENTED = set(range(0, 13)) | {130}
#: seconds each run may take; a longer one must stop with status 7
BUDGET = 0.5
MARGIN = 3.0
#: generated command lines per run (about 25 ms each; more in a long CI job)
EXAMPLES_RUN = int(os.environ.get("CRITICALITY_FUZZ_CLI_EXAMPLES", "2000"))

CHEAP = ["analyse", "report", "json", "evaluate", "fold", "bautin", "bogdanov-takens", "flip",
         "neimark-sacker", "fold-hopf", "hopf-hopf", "export", "list"]
COSTLY = ["confirm", "plane", "survey", "curve", "batch", "delay-confirm"]

NAMES = st.sampled_from(["mu", "a", "x", "y", "zz", "", "mu ", "x_eq", "sin", "__import__",
                         "1", "é"])
NUMBER_TEXT = st.one_of(
    st.integers(-10 ** 12, 10 ** 12).map(str),
    st.floats(allow_nan=True, allow_infinity=True).map(repr),
    st.sampled_from(["0", "-1", "1e308", "1e-300", "nan", "inf", "none", "3", "5", "1/2", "",
                     "2**64", "x", "0x10", "1_000", " 7 ", "0.01", "0.2"]),
)
EXPR_TEXT = st.one_of(NUMBER_TEXT, st.sampled_from([
    "1/3", "sqrt(2)", "exp(exp(exp(exp(1000))))", "x^99999", "(", "a*", "mu", "pi", "I",
    "__import__('os')", "1e400", "-0", "log(0)", "1/0"]))
PAIR = st.builds(lambda n, v: f"{n}={v}", NAMES, EXPR_TEXT) | st.sampled_from(
    ["a", "=1", "a==1", "a=1,a=2", "x=0, y=0"])


def _option(name, value_strategy, count=1):
    return st.tuples(*([value_strategy] * count)).map(lambda vals: [name, *vals])


def _options(folder: str):
    out_file = st.sampled_from([f"{folder}/o.txt", f"{folder}/o.png", f"{folder}/o.svg",
                                f"{folder}/none/o.txt", folder, "-", "/dev/null",
                                f"{folder}/o.csv"])
    return st.one_of(
        _option("-p", NAMES), _option("--second", NAMES),
        _option("-e", st.one_of(PAIR, st.sampled_from(["0", "1", "99", "nonzero",
                                                       "nonnegative", "", "x=0, y=0"]))),
        _option("--eliminate", st.sampled_from(["a", "a,mu", "x", "", "zz,zz", "auto"])),
        _option("--set", PAIR), _option("--assume", PAIR), _option("--at", PAIR),
        _option("--order", NUMBER_TEXT), _option("--branch", NUMBER_TEXT),
        _option("--backend", st.sampled_from(["flint", "sympy", "numpy"])),
        _option("--time-limit", NUMBER_TEXT), _option("--digits", NUMBER_TEXT),
        _option("--width", NUMBER_TEXT), _option("--guess", PAIR),
        _option("--format", st.sampled_from(["text", "latex", "json", "xml"])),
        _option("--to", st.sampled_from(["numpy", "c", "fortran"])),
        _option("-o", out_file), _option("--csv", out_file), _option("--plot", out_file),
        _option("--out-dir", st.sampled_from([folder, f"{folder}/sub", "/dev/null"])),
        _option("--x", NAMES), _option("--y", NAMES),
        _option("--x-range", NUMBER_TEXT, 2), _option("--y-range", NUMBER_TEXT, 2),
        _option("--size", NUMBER_TEXT, 2), _option("--dpi", NUMBER_TEXT),
        _option("--points", NUMBER_TEXT), _option("--offsets", NUMBER_TEXT),
        _option("--tolerance", NUMBER_TEXT), _option("--max-periods", NUMBER_TEXT),
        _option("--along", st.builds(lambda n, a, b, c: f"{n}={a}:{b}:{c}", NAMES, NUMBER_TEXT,
                                     NUMBER_TEXT, NUMBER_TEXT)),
        st.sampled_from([["-f"], ["--force"], ["-q"], ["--compact"], ["--fragment"],
                         ["--debug"], ["--bogus"], ["--"]]),
    )


def _argv(folder: str, tiny: str):
    models = st.sampled_from([tiny, tiny, tiny, str(EXAMPLES / "plankton_grazer.toml"),
                              f"{folder}/missing.toml", folder, "-", "/dev/null"])
    command = st.one_of(st.sampled_from(CHEAP), st.sampled_from(CHEAP),
                        st.sampled_from(CHEAP), st.sampled_from(COSTLY))
    options = st.lists(_options(folder), max_size=4).map(lambda xs: [a for x in xs for a in x])
    return st.builds(lambda c, m, o: [c, m, *o], command, models, options)


@pytest.fixture(scope="module")
def place(tmp_path_factory):
    folder = tmp_path_factory.mktemp("fuzz-cli")
    tiny = folder / "tiny.toml"
    tiny.write_text(TINY)
    return str(folder), str(tiny)


_STDIN = st.sampled_from([TINY, "", "states = [", "\x00" * 100, TINY.replace("x =", "x ==")])


def _run(argv, stdin_text):
    err, out = io.StringIO(), io.StringIO()
    saved = sys.stdin
    sys.stdin = io.StringIO(stdin_text)
    start = time.monotonic()
    try:
        with contextlib.redirect_stderr(err), contextlib.redirect_stdout(out):
            with budget.time_limit(BUDGET, "the fuzzed command"):
                code = main(argv)
    except Exception as exc:  # main must not raise; record it as a failure
        code = f"raised {type(exc).__name__}: {exc}"
    finally:
        sys.stdin = saved
    return code, err.getvalue(), time.monotonic() - start


def test_generated_command_lines_end_in_a_documented_status(place):
    folder, tiny = place
    seen = {}

    @settings(max_examples=EXAMPLES_RUN, deadline=None, derandomize=True, database=None,
              suppress_health_check=list(HealthCheck))
    @given(data=st.data())
    def check(data):
        argv = data.draw(_argv(folder, tiny), label="argv")
        stdin_text = data.draw(_STDIN, label="stdin")
        code, err, elapsed = _run(argv, stdin_text)
        seen[code] = seen.get(code, 0) + 1
        assert code in DOCUMENTED, (argv, code, err[-2000:])
        assert "Traceback" not in err or "--debug" in argv, (argv, err[-2000:])
        assert "internal error" not in err, (argv, err[-2000:])
        assert elapsed < BUDGET + MARGIN, (argv, elapsed)

    check()
    # the generated lines reach the analyses, not only the argument parser
    assert seen.get(0, 0) > EXAMPLES_RUN // 100 and seen.get(2, 0) > EXAMPLES_RUN // 20, seen
