"""Hostile and random input: every call ends quickly in a result or a package error.

No input may run code, create files, hang, or escape as another exception
(RecursionError, MemoryError, OverflowError, a sympy or TOML reader error).
The wall-clock bound per call only guards against hangs; speed targets live in
benchmarks/.
"""

from __future__ import annotations

import time

import pytest
import sympy
from hypothesis import HealthCheck, given, settings, strategies as st

from criticality import Model
from criticality.errors import CriticalityError
from criticality.model.expressions import parse_expression

HANG_GUARD = 2.0  # seconds; generous, a hang would take far longer

HOSTILE = [
    "__import__('os').system('touch CANARY')",
    "__import__(\"os\").system(\"touch CANARY\")",
    "open('CANARY','w')",
    "open(\"CANARY\", \"w\").write(\"x\")",
    "().__class__.__bases__[0].__subclasses__()",
    "x.__class__.__mro__",
    "exec('open(\"CANARY\",\"w\")')",
    "eval('1+1')",
    "compile('1', 'f', 'eval')",
    "globals()['__builtins__']",
    "getattr(x, '__class__')",
    "lambda: open('CANARY','w')",
    "(lambda f: f(f))(lambda f: f(f))",
    "[c for c in ().__class__.__base__.__subclasses__()]",
    "x if open('CANARY','w') else y",
    "sin.__globals__",
    "sympy.sympify('x')",
    "9**9**9**9",
    "2**2**2**2**2**2**2",
    "10**(10**10)",
    "(2**1000)**(2**1000)",
    "(" * 10000 + "x" + ")" * 10000,
    "(" * 99 + "x" + ")" * 99,
    "-" * 100000 + "x",
    "-" * 99 + "x",
    "x" + "**x" * 5000,
    "x" + "**x" * 90,
    "x" + "*x" * 5000,
    "+".join(["x"] * 6000),
    "sin(" * 60 + "x" + ")" * 60,
    "1" * 5000,
    "1" * 999,
    "1e999",
    "1e-99999999999999",
    "1e308*1e308",
    "0.1**-1000",
    "(10**300)**(1/3)",
    "sqrt(10**299 + 1)",
    "x\0y",
    "\0",
    "x\r\n+\ty",
    "\uff58 + \uff59",          # fullwidth letters
    "\u0455in(x)",               # Cyrillic s
    "x \u2212 y",                # minus sign
    "\u200bx",                   # zero-width space
    "\U0001d465",                # mathematical italic x
    "\ufeffx",                   # byte-order mark
    "x\u0301",                   # combining accent
    "\ud800",                    # lone surrogate
    "1j*x",
    "x[::-1]",
    "{**x}",
    "f'{x}'",
    "b'x'",
    "x; import os",
    "x # comment",
    "x\\\n+1",
    "@x",
    "x := 5",
    "await x",
    "yield x",
    "*x",
    "...",
    "log(0)",
    "1/0",
    "0**-1",
    "tan(pi/2)",
    "atanh(1)",
    "sqrt(-1)",
    "exp(exp(exp(exp(1000))))",
    "exp(1e300)",
]


@pytest.fixture
def canary(tmp_path, monkeypatch):
    """Work in an empty directory so that any file an input manages to create shows up."""
    monkeypatch.chdir(tmp_path)
    yield tmp_path / "CANARY"
    assert not (tmp_path / "CANARY").exists()
    assert list(tmp_path.iterdir()) == []


def _survives(call, *args, **kwargs):
    """Run one call: it returns or raises a CriticalityError, within the hang guard."""
    start = time.perf_counter()
    try:
        result = call(*args, **kwargs)
    except CriticalityError as exc:
        result = exc
        assert str(exc)
    elapsed = time.perf_counter() - start
    assert elapsed < HANG_GUARD, f"took {elapsed:.2f} s"
    return result


def _toml_string(text: str) -> str:
    escaped = text.replace("\\", "\\\\").replace('"', '\\"')
    return '"' + "".join(c if 32 <= ord(c) != 127 else f"\\u{ord(c):04X}" for c in escaped) + '"'


@pytest.mark.slow
@pytest.mark.parametrize("text", HOSTILE, ids=[f"h{i}" for i in range(len(HOSTILE))])
def test_hostile_text_directly(text, canary):
    """Each hostile text gives an expression or a package error, quickly."""
    result = _survives(parse_expression, text)
    assert isinstance(result, (sympy.Expr, CriticalityError))
    _survives(parse_expression, text, exact=False)
    _survives(parse_expression, text, {"x": sympy.Symbol("x", real=True)})


@pytest.mark.slow
@pytest.mark.parametrize("text", HOSTILE, ids=[f"h{i}" for i in range(len(HOSTILE))])
def test_hostile_text_in_models(text, canary):
    """The same texts inside Python-built models and model files are handled alike."""
    _survives(Model, ["x", "y"], {"x": text, "y": "x"})
    _survives(Model, ["x"], {"x": "x"}, {"a": {"value": text}})
    _survives(Model, ["x"], {"x": "-x"}, equilibrium={"x": text})
    _survives(Model, [text], {text: "1"})
    _survives(Model, ["x"], {"x": "x"}, {text: "real"})
    if "\ud800" in text:
        return      # a lone surrogate cannot be written into TOML text at all
    body = _toml_string(text)
    for file_text in (
        f'states = ["x", "y"]\n[equations]\nx = {body}\ny = "x"\n',
        f'states = ["x"]\n[parameters]\nk = {{ value = {body} }}\n[equations]\nx = "k"\n',
        f'states = [{body}]\n[equations]\n{body} = "1"\n',
        f'name = {body}\nstates = ["x"]\n[equations]\nx = "x"\n[equilibrium]\nx = {body}\n',
    ):
        result = _survives(Model.from_text, file_text)
        assert isinstance(result, (Model, CriticalityError))


def test_deeply_nested_toml_is_refused(canary):
    """TOML nesting that would exhaust the reader's recursion is a ModelFileError."""
    for text in ("a = " + "[" * 5000 + "]" * 5000, "a = " + "{b = " * 3000 + "1" + "}" * 3000,
                 "[" * 5000):
        assert isinstance(_survives(Model.from_text, text), CriticalityError)


def test_sympy_objects_that_are_not_expressions(canary):
    """Arbitrary Python objects as equations are refused with package errors."""
    for value in (object(), [1, 2], {"a": 1}, sympy.Matrix([1]), sympy.Eq(sympy.Symbol("x"), 1),
                  sympy.Interval(0, 1), float("nan"), float("inf"), None, b"x"):
        assert isinstance(_survives(Model, ["x"], {"x": value}), CriticalityError)


_ALPHABET = st.sampled_from(list("xyab01239.eE+-*/^()[]{},:;'\"_ \n\t#@%&|~<>=!") +
                            ["**", "lambda", "exp(", "sqrt(", "log(", "pi", "__", "sin", "1e9",
                             "abs(", "if", "not", "\0", "\u2212", "\u03b1", "9**9"])
_TOKEN_TEXT = st.lists(_ALPHABET, max_size=60).map("".join)
_FUZZ = settings(max_examples=400, deadline=None, suppress_health_check=[HealthCheck.too_slow])


@pytest.mark.slow
@_FUZZ
@given(st.one_of(st.text(max_size=200), _TOKEN_TEXT))
def test_fuzz_parse_expression(text):
    """Random text and random token soup never escape as another exception or hang."""
    result = _survives(parse_expression, text)
    if isinstance(result, sympy.Expr):
        assert not result.has(sympy.I, sympy.zoo, sympy.nan)


@pytest.mark.slow
@_FUZZ
@given(_TOKEN_TEXT, st.sampled_from(["equations", "value", "equilibrium", "state", "whole"]))
def test_fuzz_model_files(text, where):
    """Random text placed anywhere in a model file gives a Model or a package error."""
    body = _toml_string(text)
    files = {
        "equations": f'states = ["x"]\n[equations]\nx = {body}\n',
        "value": f'states = ["x"]\n[parameters]\nk = {{ value = {body} }}\n[equations]\nx = "k*x"\n',
        "equilibrium": f'states = ["x"]\n[equations]\nx = "-x"\n[equilibrium]\nx = {body}\n',
        "state": f'states = [{body}]\n[equations]\n{body} = "1"\n',
        "whole": text,
    }
    result = _survives(Model.from_text, files[where])
    assert isinstance(result, (Model, CriticalityError))
