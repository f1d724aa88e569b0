"""Fuzzing the Python API: expressions, names, TOML documents, JSON documents
and the arguments of the analyses (about 10,200 generated inputs, about a
minute; the three largest are marked slow, so the quick loop keeps the
smaller ones and CI runs all).

Every input runs under a wall-clock limit (an alarm, and the package's own
budget for the analyses) and the whole module under an address-space limit
(``resource.setrlimit``, Linux).  Each must end in a result or an error of
the package (a subclass of :class:`~criticality.errors.CriticalityError`),
never in another exception, never past its limit, and no input may run
code: a canary file and a canary attribute are checked after every call
(common practice, no source).
"""

from __future__ import annotations

import builtins
import json
import math
import os
import resource
import signal
import string
from contextlib import contextmanager

import pytest
import sympy
from hypothesis import HealthCheck, given, settings, strategies as st

import criticality
from criticality import Model, hopf
from criticality.errors import CriticalityError
from criticality.model.expressions import parse_expression
from criticality.outputs.json_io import read_expressions

#: seconds one input may take before it counts as a hang (generous: the
#: package's own budget for an analysis is BUDGET)
LIMIT = 10.0
BUDGET = 3.0
#: bytes of address space the fuzzing may add to the test process
EXTRA_MEMORY = 3 * 2 ** 30

CANARY = os.path.join(os.path.abspath(os.path.dirname(__file__)), "FUZZ_CANARY_MUST_NOT_EXIST")
CANARY_ATTRIBUTE = "criticality_fuzz_canary"

#: inputs that would run code, touch files or reach objects if evaluated
ATTACKS = [
    f"__import__('os').system('touch {CANARY}')",
    f"open('{CANARY}', 'w').write('x')",
    f"__import__('builtins').__setattr__('{CANARY_ATTRIBUTE}', 1)",
    f"setattr(__builtins__, '{CANARY_ATTRIBUTE}', 1)",
    f"exec(\"open('{CANARY}', 'w')\")",
    f"eval(\"open('{CANARY}', 'w')\")",
    "().__class__.__base__.__subclasses__()",
    "x.__class__", "sin.__globals__", "lambda: 0", "globals()", "vars()",
    f"[open('{CANARY}', 'w') for _ in (1,)]",
    f"x if open('{CANARY}', 'w') else y",
    "sympy.sympify('x')", "S('x')", "Symbol('x')", "x.subs(x, 1)",
]

FUZZ = settings(deadline=None, derandomize=True, database=None,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large,
                                       HealthCheck.filter_too_much])


class Overrun(BaseException):
    """An input ran past LIMIT (a BaseException, so no except clause of the
    package can swallow it)."""


@contextmanager
def hard_limit(seconds: float = LIMIT):
    def alarm(signum, frame):
        raise Overrun(f"an input ran past {seconds} s")

    previous = signal.signal(signal.SIGALRM, alarm)
    signal.setitimer(signal.ITIMER_REAL, seconds)
    try:
        yield
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, previous)


def _address_space() -> int | None:
    try:
        with open("/proc/self/status") as handle:
            for line in handle:
                if line.startswith("VmSize:"):
                    return int(line.split()[1]) * 1024
    except OSError:
        return None
    return None


@pytest.fixture(scope="module", autouse=True)
def memory_limit():
    """Cap the address space of the process for the fuzzing (soft limit,
    restored afterwards)."""
    soft, hard = resource.getrlimit(resource.RLIMIT_AS)
    size = _address_space()
    if size is None:
        yield
        return
    cap = size + EXTRA_MEMORY
    if hard != resource.RLIM_INFINITY:
        cap = min(cap, hard)
    resource.setrlimit(resource.RLIMIT_AS, (cap, hard))
    try:
        yield
    finally:
        resource.setrlimit(resource.RLIMIT_AS, (soft, hard))


def survives(function, *args, **kwargs):
    """Run one input: a result or a package error; no hang, no execution."""
    try:
        with hard_limit():
            out = function(*args, **kwargs)
    except CriticalityError as exc:
        out = exc
    assert not os.path.exists(CANARY), "an input ran code: the canary file exists"
    assert not hasattr(builtins, CANARY_ATTRIBUTE), "an input ran code: builtins changed"
    return out


# -- strategies ---------------------------------------------------------------------------

NAMES = st.one_of(
    st.sampled_from(["x", "y", "z", "mu", "a", "b", "k", "x_eq", "lambda", "pi", "E", "I",
                     "sin", "exp", "oo", "nan", "zoo", "__class__", "__import__", "os", "None",
                     "True", "t", "tau", "kappa", "kapa", "x1", "_", "α", "µ", "xⁱ", "ｘ"]),
    st.text(alphabet=string.ascii_letters + string.digits + "_", min_size=1, max_size=12),
    st.text(max_size=8),
)

NUMBERS = st.one_of(
    st.integers(-10, 10).map(str), st.integers().map(str),
    st.sampled_from(["0", "1/2", "0.1", "1e308", "1e999", "1e-999", "2.5e-3", "10**300",
                     "9**9**9", "1_000", "0x10", "1j", ".5", "5.", "inf", "nan"]),
)

FUNCTIONS = st.sampled_from(["sin", "cos", "exp", "log", "sqrt", "tanh", "sinh", "atan",
                             "abs", "Abs", "max", "gamma", "erf", "foo", "__import__", "eval",
                             "getattr", "open", "print", "sympify"])

ATOMS = st.one_of(NAMES, NUMBERS, st.sampled_from(ATTACKS))


def _combine(children):
    binary = st.sampled_from(["+", "-", "*", "/", "^", "**", "%", "//", "@", "&", "|", "<",
                              "==", " and ", " if ", ", ", "."])
    return st.one_of(
        st.tuples(children, binary, children).map(lambda t: f"{t[0]}{t[1]}{t[2]}"),
        st.tuples(st.sampled_from(["-", "+", "~", "not "]), children).map("".join),
        st.tuples(FUNCTIONS, children).map(lambda t: f"{t[0]}({t[1]})"),
        children.map(lambda c: f"({c})"),
        st.tuples(children, st.integers(-2000, 2000)).map(lambda t: f"({t[0]})^{t[1]}"),
        st.tuples(children, st.sampled_from(["[0]", ".real", "(1)", "(", ")", "'", ";", "#"]))
        .map("".join),
    )


EXPRESSIONS = st.one_of(st.recursive(ATOMS, _combine, max_leaves=12), st.text(max_size=80))


def _toml_string(text: str) -> str:
    return json.dumps(text)  # a TOML basic string is a JSON string for these characters


IDENTIFIERS = st.one_of(st.sampled_from(["x", "y", "z", "mu", "a", "b", "k", "_", "nan", "lambda",
                                         "__class__", "sin", "α", "x_eq"]),
                        st.from_regex(r"[A-Za-z_][A-Za-z0-9_]{0,8}", fullmatch=True))


def _toml_value():
    scalar = st.one_of(st.integers().map(str),
                       st.floats(allow_nan=False, allow_infinity=False).map(repr),
                       st.booleans().map(lambda b: "true" if b else "false"),
                       st.text(max_size=20).map(_toml_string),
                       EXPRESSIONS.map(_toml_string))
    return st.recursive(scalar, lambda c: st.one_of(
        st.lists(c, max_size=4).map(lambda v: "[" + ", ".join(v) + "]"),
        st.dictionaries(IDENTIFIERS, c, max_size=3).map(
            lambda d: "{" + ", ".join(f"{k} = {v}" for k, v in d.items()) + "}")), max_leaves=6)


TOML_VALUES = _toml_value()
PARAMETER_SPECS = st.sampled_from(['"positive"', '"real"', '{ assume = "negative", value = "1/2" }',
                                   '{ value = "exp(exp(1000))" }', '{ assume = "huge" }'])


PARAMETER_VALUES = st.one_of(TOML_VALUES, PARAMETER_SPECS)


@st.composite
def toml_documents(draw):
    """A model file: some sections right, others of a random shape."""
    states = draw(st.lists(st.sampled_from(["x", "y", "z"]) | IDENTIFIERS | NAMES, max_size=3))
    lines = []
    if draw(st.booleans()):
        lines.append("states = [" + ", ".join(_toml_string(s) for s in states) + "]")
    else:
        lines.append(f"states = {draw(TOML_VALUES)}")
    for key in draw(st.lists(st.sampled_from(["name", "bifurcation_parameter", "kind",
                                              "description", "unknown_key"]), max_size=2,
                             unique=True)):
        lines.append(f"{key} = {draw(TOML_VALUES)}")
    lines.append("[parameters]")
    for name in draw(st.lists(IDENTIFIERS, max_size=3, unique=True)):
        lines.append(f"{name} = {draw(PARAMETER_VALUES)}")
    lines.append("[equations]")
    for name in states:
        if name.isidentifier():
            lines.append(f"{name} = {_toml_string(draw(EXPRESSIONS))}")
    if draw(st.booleans()):
        lines.append("[equilibrium]")
        for name in states[:2]:
            if name.isidentifier():
                lines.append(f"{name} = {draw(TOML_VALUES)}")
    text = "\n".join(lines) + "\n"
    cut = draw(st.integers(0, len(text)))
    return text if draw(st.integers(0, 4)) else text[:cut] + draw(st.text(max_size=5)) + \
        text[cut:]


JSON_VALUES = st.recursive(
    st.one_of(st.none(), st.booleans(), st.integers(), st.floats(allow_nan=False),
              st.text(max_size=10), EXPRESSIONS),
    lambda c: st.one_of(st.lists(c, max_size=3), st.dictionaries(st.text(max_size=6), c,
                                                                 max_size=3)),
    max_leaves=8)

PYTHON_VALUES = st.one_of(
    st.none(), st.booleans(), st.integers(), st.integers(-3, 30),
    st.floats(), st.text(max_size=12), NAMES, st.sampled_from([math.nan, math.inf, 10 ** 20,
                                                               -1, 0, 3, 5, 2 ** 64, 1j]),
    st.lists(NAMES, max_size=3), st.tuples(NAMES, NAMES),
    st.dictionaries(NAMES, st.one_of(st.none(), st.booleans(), st.integers(), st.floats(),
                                     NAMES, EXPRESSIONS), max_size=3),
)


# -- the model the argument fuzzing uses ------------------------------------------------

#: x' = mu x - y - a x^3, y' = x + mu y - y^3 with its equilibrium given (so an
#: omitted equilibrium does not start a solve of nine equilibria); a, b have values
FUZZ_MODEL = Model(["x", "y"], {"x": "mu*x - y - a*x^3 + b*x*y", "y": "x + mu*y - y^3"},
                   {"mu": "real", "a": {"assume": "positive", "value": "1"},
                    "b": {"assume": "real", "value": "1/2"}},
                   equilibrium={"x": "0", "y": "0"}, bifurcation_parameter="mu")
FUZZ_RESULT = hopf(FUZZ_MODEL, "mu")
FUZZ_DOCUMENT = json.loads(FUZZ_RESULT.to_json())


# -- the fuzz tests ---------------------------------------------------------------------


@pytest.mark.slow
@settings(FUZZ, max_examples=3000)
@given(EXPRESSIONS)
def test_fuzz_expressions(text):
    """Generated expression text: a real sympy expression or a package error."""
    out = survives(parse_expression, text)
    if isinstance(out, sympy.Expr):
        assert not out.has(sympy.I, sympy.zoo, sympy.nan, sympy.oo)


@settings(FUZZ, max_examples=800)
@given(st.lists(NAMES, min_size=1, max_size=3), st.dictionaries(NAMES, PYTHON_VALUES,
                                                                 max_size=3), EXPRESSIONS)
def test_fuzz_names_and_python_models(states, parameters, equation):
    """Models built in Python from generated names, parameter specifications
    and equations."""
    survives(Model, states, {s: equation for s in states}, parameters)
    survives(Model, states, [equation] * len(states), list(parameters))


@pytest.mark.slow
@settings(FUZZ, max_examples=1800)
@given(toml_documents())
def test_fuzz_toml_documents(text):
    """Generated model files, well formed or not."""
    out = survives(Model.from_text, text)
    assert isinstance(out, (Model, CriticalityError))


def _replace(doc, path, value):
    doc = json.loads(json.dumps(doc))
    target = doc
    for key in path[:-1]:
        target = target[key]
    target[path[-1]] = value
    return doc


def _paths(value, path=()):
    out = [path] if path else []
    if isinstance(value, dict):
        for k, v in value.items():
            out += _paths(v, path + (k,))
    elif isinstance(value, list):
        for k, v in enumerate(value):
            out += _paths(v, path + (k,))
    return out


DOCUMENT_PATHS = _paths(FUZZ_DOCUMENT)


@pytest.mark.slow
@settings(FUZZ, max_examples=1500)
@given(st.sampled_from(DOCUMENT_PATHS), JSON_VALUES, st.integers(0, 9), st.text(max_size=20))
def test_fuzz_json_documents(path, value, how, noise):
    """A result document with one field replaced, cut short or spliced with
    noise, read back."""
    text = json.dumps(_replace(FUZZ_DOCUMENT, path, value))
    if how == 0:
        text = text[:len(text) * 2 // 3]
    elif how == 1:
        text = noise + text
    elif how == 2:
        text = json.dumps(value)
    survives(read_expressions, text)


ANALYSIS_OPTIONS = ("equilibrium", "eliminate", "branch", "order", "values", "assume",
                    "backend", "guess", "digits", "time_limit")


#: values close to valid ones, so that generated calls also reach the engine
NEAR_VALID = {
    "equilibrium": st.sampled_from([None, {"x": 0, "y": 0}, {"x": "0", "y": "a - a"},
                                    {"x": 1, "y": 0}, {"x": 0}, 0, "positive", 3]),
    "eliminate": st.sampled_from([None, ["a", "y"], ["mu", "y"], ["x"], [], "auto"]),
    "branch": st.sampled_from([None, 0, 1, 2]),
    "order": st.sampled_from([3, 5, 7, 21, 23]),
    "values": st.sampled_from([None, {"a": 2}, {"a": "1/3", "b": 0}, {"a": -1}, {"mu": 1},
                               {"a": "exp(1)"}, {"zz": 1}]),
    "assume": st.sampled_from([None, {"mu": "positive"}, {"a": "negative"}, {"b": "nonzero"},
                               {"x_eq": "positive"}]),
    "backend": st.sampled_from(["flint", "sympy"]),
    "guess": st.sampled_from([None, {"x": 0, "y": 0, "mu": 0.01}, {"x": 0, "y": 0},
                              {"x": 0, "y": 0, "mu": "0"}]),
    "digits": st.sampled_from([5, 15, 30, 60]),
    "time_limit": st.sampled_from([BUDGET, 0.5, None]),
}


@settings(FUZZ, max_examples=1200)
@given(st.one_of(PYTHON_VALUES, st.sampled_from(["mu", "a", "b", None])), st.data())
def test_fuzz_hopf_arguments(parameter, data):
    """hopf() with generated arguments of every type (and some close to
    valid), under the package's budget as well as the hard limit."""
    keys = data.draw(st.lists(st.sampled_from(ANALYSIS_OPTIONS), max_size=4, unique=True))
    options = {k: data.draw(st.one_of(NEAR_VALID[k], PYTHON_VALUES)) for k in keys}
    options.setdefault("time_limit", BUDGET)
    if not isinstance(options["time_limit"], (int, float)) or not 0 < options["time_limit"] \
            <= BUDGET:
        options["time_limit"] = BUDGET  # the budget itself is fuzzed in test_budget_values
    survives(hopf, FUZZ_MODEL, parameter, **options)


@settings(FUZZ, max_examples=500)
@given(st.sampled_from(["fold", "bautin_points", "bogdanov_takens"]), PYTHON_VALUES,
       PYTHON_VALUES, st.dictionaries(st.sampled_from(("equilibrium", "values", "assume",
                                                        "backend", "branch", "eliminate")),
                                      PYTHON_VALUES, max_size=2))
def test_fuzz_other_analyses(name, first, second, options):
    """fold / bautin_points / bogdanov_takens with generated arguments."""
    function = getattr(criticality, name)
    if name == "fold":
        options = {k: v for k, v in options.items()}
        call = lambda: function(FUZZ_MODEL, first, **options)  # noqa: E731
    else:
        options.pop("branch", None) if name == "bautin_points" else None
        call = lambda: function(FUZZ_MODEL, first, second, **options)  # noqa: E731
    with criticality.time_limit(BUDGET):
        survives(call)


#: a planar map with a fixed point at the origin (flip at r = -1, a
#: Neimark-Sacker point at a = 1 for the rotation part); invented
FUZZ_MAP = Model(["x", "y"], {"x": "r*x - y + x^2", "y": "a*x + r*y - y^3"},
                 {"r": "real", "a": {"assume": "positive", "value": "1"}}, kind="map",
                 equilibrium={"x": "0", "y": "0"})


@settings(FUZZ, max_examples=400)
@given(st.sampled_from(["flip", "neimark_sacker", "fold_hopf", "hopf_hopf"]),
       st.one_of(PYTHON_VALUES, st.sampled_from(["r", "a", "mu", ("mu", "a"), ("mu", "b")])),
       st.dictionaries(st.sampled_from(("equilibrium", "values", "assume", "backend",
                                        "branch", "eliminate", "solve_for", "point")),
                       PYTHON_VALUES, max_size=2))
def test_fuzz_map_and_codimension_two_analyses(name, first, options):
    """flip / neimark_sacker on a map, fold_hopf / hopf_hopf on a flow, with
    generated arguments."""
    function = getattr(criticality, name)
    if name in ("fold_hopf", "hopf_hopf"):
        options.pop("solve_for", None)
        model = FUZZ_MODEL
    else:
        options.pop("point", None)
        model = FUZZ_MAP
    with criticality.time_limit(BUDGET):
        survives(function, model, first, **options)


@settings(FUZZ, max_examples=500)
@given(st.dictionaries(NAMES, PYTHON_VALUES, max_size=3), PYTHON_VALUES)
def test_fuzz_evaluate(values, digits):
    """HopfResult.evaluate with generated points and digits."""
    if isinstance(digits, int) and not isinstance(digits, bool) and digits > 2000:
        digits = 2000  # correct but slow; 10000 digits is a named regression test
    survives(FUZZ_RESULT.evaluate, values, digits=digits)


@settings(FUZZ, max_examples=300)
@given(st.sampled_from(["sweep", "evaluate_many", "to_json"]),
       st.one_of(PYTHON_VALUES, st.dictionaries(NAMES, st.one_of(
           PYTHON_VALUES, st.lists(st.one_of(st.floats(), st.integers(), NAMES), max_size=3)),
           max_size=2)),
       st.one_of(PYTHON_VALUES, st.sampled_from(["l1", "omega", "critical_value",
                                                 "amplitude:x"])))
def test_fuzz_checks_and_outputs(name, points, quantity):
    """sweep / evaluate_many / to_json(point=...) with generated grids and
    points."""
    if name == "sweep":
        survives(criticality.sweep, FUZZ_RESULT, quantity, points, progress=False)
    elif name == "evaluate_many":
        survives(FUZZ_RESULT.evaluate_many, points)
    else:
        survives(FUZZ_RESULT.to_json, point=points, digits=15)


@settings(FUZZ, max_examples=200)
@given(PYTHON_VALUES)
def test_budget_values(seconds):
    """time_limit= of any type: a result within it, or a package error."""
    survives(hopf, FUZZ_MODEL, "mu", time_limit=seconds)


@pytest.mark.parametrize("attack", ATTACKS)
def test_attacks_in_every_place_run_no_code(attack):
    """Each attack as an expression, a name, a model-file value and a JSON
    field: nothing runs (the canary stays absent)."""
    survives(parse_expression, attack)
    survives(Model, [attack], {attack: "1"})
    survives(Model, ["x"], {"x": attack}, {"a": attack})
    survives(Model.from_text, f'states = ["x"]\n[equations]\nx = {_toml_string(attack)}\n')
    survives(read_expressions, json.dumps(_replace(FUZZ_DOCUMENT, ("l1",), attack)))
    survives(hopf, FUZZ_MODEL, "mu", equilibrium={"x": attack, "y": "0"}, time_limit=BUDGET)
    survives(FUZZ_RESULT.evaluate, {"a": attack})
