"""Tests of the Model value object: construction, validation, TOML files."""

from __future__ import annotations

import pickle
import re
from pathlib import Path

import pytest
import sympy

import criticality
from criticality import Model, Parameter
from criticality.errors import (ExpressionError, InvalidModelError, InvalidModelFileError,
                                ModelFileError, ModelFileSyntaxError, ParameterError,
                                UnknownSymbolError)

DOCS = Path(__file__).resolve().parents[1] / "docs" / "model-files.md"


def R(name):
    return sympy.Symbol(name, real=True)


def P(name):
    return sympy.Symbol(name, positive=True)


x, y, z, a, mu = (R(n) for n in ("x", "y", "z", "a", "mu"))
b = P("b")  # declared positive wherever these tests use it


def toy(**extra):
    """An invented two-state model used across these tests."""
    return Model(["x", "y"], {"x": "mu*x - y + a*x^2", "y": "x - b*y"},
                 {"a": "real", "b": {"assume": "positive", "value": "1/2"}}, **extra)


# -- construction from Python -------------------------------------------------------


def test_public_names_are_reachable_from_the_package():
    """The package root hands out Model, Parameter and the expression functions."""
    assert criticality.Model is Model and criticality.Parameter is Parameter
    assert callable(criticality.parse_expression) and callable(criticality.format_expression)


def test_basic_model_fields():
    """States keep their order, equations align with them, states are real
    symbols and each parameter's symbol carries its declared assumption."""
    m = toy(name="toy", description="invented")
    assert m.states == ("x", "y")
    assert m.equations == (mu * x - y + a * x**2, x - b * y)
    assert [p.name for p in m.parameters] == ["a", "b", "mu"]
    assert m.state_symbols == (x, y) and m.parameter_symbols == (a, b, mu)
    assert all(s.is_real for s in m.symbols.values())
    assert [n for n, s in m.symbols.items() if s.is_positive] == ["b"]
    assert m.symbols["b"] == sympy.Symbol("b", positive=True) != R("b")
    assert dict(m.symbols) == {"x": x, "y": y, "a": a, "b": b, "mu": mu}
    assert m.parameter("b") == Parameter("b", "positive", sympy.Rational(1, 2))
    assert m.parameter("mu").declared is False
    assert m.notes == ("parameter 'mu' was not declared; assumed real",)
    assert (m.name, m.description, m.source, dict(m.lines)) == ("toy", "invented", None, {})
    assert m.defaults() == {"b": sympy.Rational(1, 2)}
    assert repr(m) == "Model('toy', states=(x, y), parameters=(a, b, mu))"


def test_undeclared_parameters_come_after_the_declared_ones_alphabetically():
    """Names used but not declared become real parameters, sorted, each with a note."""
    m = Model(["u"], {"u": "zeta*u + kapa - alpha"}, {"kappa": "positive"})
    assert [p.name for p in m.parameters] == ["kappa", "alpha", "kapa", "zeta"]
    assert "parameter 'kapa' was not declared; assumed real (did you mean 'kappa'?)" in m.notes
    assert "parameter 'zeta' was not declared; assumed real" in m.notes


@pytest.mark.parametrize("spec, expected", [
    ({"a": "positive"}, Parameter("a", "positive")),
    ({"a": None}, Parameter("a", "real")),
    ({"a": 2}, Parameter("a", "real", sympy.Integer(2))),
    ({"a": 0.25}, Parameter("a", "real", sympy.Rational(1, 4))),
    ({"a": {"assume": "nonnegative", "value": "sqrt(2)/2", "description": "gain"}},
     Parameter("a", "nonnegative", sympy.sqrt(2) / 2, True, "gain")),
    ({"a": Parameter("a", "negative", "-3")}, Parameter("a", "negative", sympy.Integer(-3))),
    (["a"], Parameter("a", "real")),
    ([Parameter("a", "nonzero", "1e-3")], Parameter("a", "nonzero", sympy.Rational(1, 1000))),
    ({sympy.Symbol("a", positive=True): "positive"}, Parameter("a", "positive")),
])
def test_parameter_forms(spec, expected):
    """Every documented way of declaring a parameter gives the same kind of Parameter."""
    m = Model(["x"], {"x": "-a*x"}, spec)
    assert m.parameters == (expected,)


def test_parameter_checks_itself():
    """A Parameter built directly refuses unknown assumptions and bad values."""
    with pytest.raises(ParameterError, match="did you mean 'positive'"):
        Parameter("a", "postive")
    with pytest.raises(ParameterError, match="violates the assumption that 'a' is positive"):
        Parameter("a", "positive", "-1/2")
    with pytest.raises(ParameterError, match="constant"):
        Parameter("a", "real", "b + 1")
    with pytest.raises(ParameterError, match="constant pi"):
        Parameter("pi")
    assert Parameter("a", "positive", "pi/4").default == sympy.pi / 4
    assert Parameter("lambda").symbol == R("lambda")


def test_sympy_input_is_matched_by_name_whatever_the_assumptions():
    """User symbols are matched by name and become the model's own symbols; a
    symbol carrying the declared assumption is the model's symbol itself, one
    with other assumptions is noted."""
    bp, xs = sympy.Symbol("b", positive=True), sympy.Symbol("x")
    m = Model([xs, "y"], {xs: -bp * xs + sympy.sqrt(bp * (mu - 1)) * R("y"), "y": xs},
              {bp: "positive"})
    # sympy splits the radical with a positive b, the user's symbol and the model's alike
    assert m.equations[0] == -b * x + sympy.sqrt(b) * sympy.sqrt(mu - 1) * R("y")
    assert m.symbols["b"] == bp and m.equations[0].free_symbols == {b, x, R("y"), mu}
    assert m.parameter("b").assumption == "positive"
    assert not any("came with assumptions" in note for note in m.notes)
    text = Model(["x"], {"x": "-b*x + sqrt(b*(mu - 1))"}, {"b": "positive"})
    assert text.equations[0] == -b * x + sympy.sqrt(b) * sympy.sqrt(mu - 1)
    other = Model(["x"], {"x": -bp * x + sympy.sqrt(bp * (mu - 1))}, {"b": "real"})
    assert other.symbols["b"] == R("b") and other.equations[0].free_symbols == {R("b"), x, mu}
    assert any("'b' came with assumptions (positive=True)" in note and "own real symbol" in note
               for note in other.notes)
    negative = Model(["x"], {"x": -bp * x}, {"b": "negative"})
    assert negative.equations[0] == -sympy.Symbol("b", negative=True) * x
    assert any("own negative symbol" in note for note in negative.notes)


def test_sympy_floats_become_exact_with_a_note():
    """Floats in sympy equations are read by their decimal digits, and the model says so."""
    m = Model(["x"], {"x": sympy.Float(0.1) * x - x**3})
    assert m.equations == (x / 10 - x**3,)
    assert any("0.1" in note and "1/10" in note for note in m.notes)


def test_equations_as_a_list_in_state_order():
    """A list of right-hand sides is read in state order."""
    m = Model(["x", "y"], ["y", "-x"])
    assert m.equations == (y, -x)


def test_special_names_as_states_and_parameters():
    """E, I, S, N, O, Q, beta, gamma, lambda, zeta are ordinary names for states and parameters."""
    m = Model(["S", "I", "E"], {"S": "-beta*S*I/N + lambda", "I": "beta*S*I/N - gamma*I",
                                "E": "zeta*I - O*E + Q"},
              {"beta": "positive", "gamma": "positive", "N": "positive", "lambda": "positive"})
    assert m.states == ("S", "I", "E")
    assert {p.name for p in m.parameters} == {"beta", "gamma", "N", "lambda", "O", "Q", "zeta"}
    assert m.equations[1] == P("beta") * R("S") * R("I") / P("N") - P("gamma") * R("I")


# -- validation collects every problem --------------------------------------------------


def test_validation_collects_every_problem():
    """One InvalidModelError lists all problems, each naming its piece."""
    with pytest.raises(InvalidModelError) as info:
        Model(["x", "x", "pi", "1y", "sin", "in", "q"],
              {"x": "abs(x) + ", "z": "1", "b": "2"},
              {"a": "postive", "b": {"assume": "positive", "value": "-1"},
               "c": {"asume": "real"}, "x": "real", "d": {"value": "e + 1"}},
              equilibrium={"w": 0}, bifurcation_parameter="mux")
    problems = info.value.problems
    expected = [
        "the state 'x' is listed twice", "state 'pi': 'pi' is the constant pi",
        "state '1y'", "state 'sin'", "state 'in'", "did you mean 'positive'",
        "violates the assumption that 'b' is positive", "unknown key 'asume'; did you mean 'assume'",
        "parameter 'x': the name is also a state", "value of parameter 'd'",
        "equation for 'z': 'z' is not a state", "equation for 'b': 'b' is a parameter, not a state",
        "equation for 'x', column 1", "state 'q': has no equation",
        "equilibrium value for 'w'", "no value for the state(s) x, q",
        "bifurcation_parameter: 'mux' is not a parameter",
    ]
    for fragment in expected:
        assert any(fragment in p for p in problems), fragment
    assert len(problems) == len(expected)
    assert str(info.value).startswith(f"the model has {len(expected)} problems:")


def test_parse_errors_in_several_equations_are_all_reported():
    """Each broken equation gets its own problem with its own context."""
    with pytest.raises(InvalidModelError) as info:
        Model(["x", "y", "z"], {"x": "x.y", "y": "2y", "z": "max(x, y)"})
    assert [p.split(",")[0] for p in info.value.problems] == [
        "equation for 'x'", "equation for 'y'", "equation for 'z'"]


@pytest.mark.parametrize("states, fragment", [
    ([], "no states"), (None, "no states"), ("x y", "expected a list"), ([1], "must be a string"),
])
def test_states_must_be_a_list_of_names(states, fragment):
    """An empty or malformed state list is reported."""
    with pytest.raises(InvalidModelError, match=re.escape(fragment)):
        Model(states, {})


@pytest.mark.parametrize("value, fragment", [
    (sympy.I * x, "imaginary"), (x + sympy.oo, "not finite"), (sympy.Abs(x), "not analytic"),
    (sympy.Function("f")(x), "undefined function"), (sympy.nan, "not finite"), (True, "bool"),
    (sympy.Symbol("in"), "keyword"),
])
def test_sympy_equations_get_the_same_whitelist(value, fragment):
    """Sympy right-hand sides are refused for the same reasons as text."""
    with pytest.raises(InvalidModelError) as info:
        Model(["x"], {"x": value})
    assert "equation for 'x'" in str(info.value) and fragment in str(info.value)


def test_equilibrium_hint_and_bifurcation_parameter():
    """A valid equilibrium is kept in state order; the bifurcation parameter is checked."""
    m = toy(equilibrium={"y": "0", "x": 0}, bifurcation_parameter="mu")
    assert dict(m.equilibrium_hint) == {"x": 0, "y": 0}
    assert list(m.equilibrium_hint) == ["x", "y"]
    assert m.bifurcation_parameter == "mu"
    with pytest.raises(InvalidModelError, match="uses the state"):
        toy(equilibrium={"x": "y", "y": "0"})
    with pytest.raises(InvalidModelError, match="did you mean 'mu'"):
        toy(equilibrium={"x": "muu", "y": "0"})
    with pytest.raises(InvalidModelError, match="'x' is a state"):
        toy(bifurcation_parameter="x")


# -- methods ------------------------------------------------------------------------------


def test_parse_uses_the_model_symbols():
    """model.parse reads text and sympy in the model's symbols; unknown names are errors."""
    m = toy()
    assert m.parse("mu - 2*b") == mu - 2 * b
    assert m.parse(sympy.Symbol("mu", positive=True) + 1) == mu + 1
    with pytest.raises(UnknownSymbolError, match="did you mean 'mu'") as info:
        m.parse("muu + 1", context="condition")
    assert str(info.value).startswith("condition, column 1")


def test_parameter_lookup_errors():
    """Unknown names get a suggestion; states are told apart from parameters."""
    m = toy()
    with pytest.raises(ParameterError, match="did you mean 'mu'"):
        m.parameter("nu")
    with pytest.raises(ParameterError, match="is a state"):
        m.parameter("x")


def test_with_values_substitutes_and_removes_parameters():
    """Exact values replace parameters; the copy no longer lists them."""
    m = toy(equilibrium={"x": "0", "y": "a"}, bifurcation_parameter="a")
    fixed = m.with_values({"a": "1/3"}, b=0.25)
    assert fixed.equations == (mu * x - y + x**2 / 3, x - y / 4)
    assert [p.name for p in fixed.parameters] == ["mu"]
    assert fixed.equilibrium_hint["y"] == sympy.Rational(1, 3)
    assert fixed.bifurcation_parameter is None
    assert "parameter 'a' was set to 1/3" in fixed.notes
    assert fixed.symbols.keys() == {"x", "y", "mu"}
    assert m.parameter("a").default is None          # the original is untouched


def test_with_values_refuses_bad_values():
    """Broken assumptions, unknown names, singular or non-real results are refused."""
    m = Model(["x"], {"x": "x/(c - 1) + sqrt(d)*x"},
              {"b": "positive", "c": "real", "d": "real", "lambda": "real"})
    with pytest.raises(ParameterError, match="violates the assumption that 'b' is positive"):
        m.with_values(b=-1)
    with pytest.raises(ParameterError, match="did you mean 'b'"):
        m.with_values(bb=1)
    with pytest.raises(ParameterError, match="undefined"):
        m.with_values(c=1)
    with pytest.raises(ParameterError, match="non-real"):
        m.with_values(d=-1)
    with pytest.raises(ParameterError, match="constant"):
        m.with_values(d="x")
    assert m.with_values({"lambda": 2}).parameter_symbols == (P("b"), R("c"), R("d"))


def test_models_are_immutable_values():
    """Models compare by content, hash, pickle, and refuse attribute assignment."""
    m = toy()
    assert m == toy() and hash(m) == hash(toy()) and m != toy(name="other")
    assert pickle.loads(pickle.dumps(m)) == m
    with pytest.raises(AttributeError):
        m.states = ("y",)
    with pytest.raises(TypeError):
        m.symbols["z"] = z


# -- TOML files -------------------------------------------------------------------------

GOOD = """\
name = "Invented relay"
states = ["x", "y"]
bifurcation_parameter = "mu"

[parameters]
mu = "real"
b = { assume = "positive", value = "1/2" }

[equations]
x = "mu*x - y - x^3"
y = '''
x
- b*y'''

[equilibrium]
x = "0"
y = "0"
"""


def test_documented_example_file_reads():
    """The commented example in docs/model-files.md is a valid model file."""
    block = re.search(r"```toml\n(.*?)```", DOCS.read_text(encoding="utf-8"), re.S).group(1)
    m = Model.from_text(block, source="docs")
    assert m.states == ("u", "v", "w") and m.bifurcation_parameter == "mu"
    assert [p.name for p in m.parameters] == ["mu", "gamma", "lambda", "E", "K"]
    assert m.notes == ()
    assert m.equations[2] == -P("lambda") * R("w") + R("u")**2 / (P("K")**2 + R("u")**2)
    assert m.symbols["E"] == sympy.Symbol("E", nonnegative=True)
    lines = block.split("\n")
    assert lines[m.lines["u"] - 1].startswith("u = ")
    assert lines[m.lines["w"] - 1] == "-lambda*w"


def test_good_file_and_lines(tmp_path):
    """A valid file reads, with equation lines and the source path."""
    path = tmp_path / "relay.toml"
    path.write_text(GOOD, encoding="utf-8")
    m = Model.from_file(path)
    assert m.source == str(path) and m.name == "Invented relay"
    assert m.equations == (mu * x - y - x**3, x - b * y)
    assert dict(m.lines) == {"x": 10, "y": 12}
    assert m.equilibrium_hint == {"x": 0, "y": 0}
    assert Model.from_text(GOOD).source == "<text>"


def test_toml_syntax_errors_give_line_and_column():
    """Text that is not TOML raises ModelFileSyntaxError with its position."""
    with pytest.raises(ModelFileSyntaxError) as info:
        Model.from_text('states = ["x"]\n[equations]\nx = "x\n', source="bad.toml")
    err = info.value
    assert (err.line, err.source) == (3, "bad.toml") and err.column is not None
    assert "bad.toml is not valid TOML at line 3" in str(err)
    assert isinstance(err, ModelFileError)


@pytest.mark.parametrize("text, fragment", [
    ('sates = ["x"]\n[equations]\nx = "1"\n', "line 1: unknown key 'sates'; did you mean 'states'?"),
    ('states = ["x"]\n[equation]\nx = "1"\n', "line 2: unknown key 'equation'; did you mean 'equations'?"),
    ('[equations]\nx = "1"\n', "missing key 'states'"),
    ('states = "x"\n[equations]\nx = "1"\n', "states, line 1: expected a list"),
    ('states = ["x"]\n[parameters]\nk = { asume = "real" }\n[equations]\nx = "k"\n',
     "parameter 'k', line 3: unknown key 'asume'; did you mean 'assume'?"),
    ('states = ["x"]\n[parameters]\nk = "postive"\n[equations]\nx = "k"\n',
     "parameter 'k', line 3: unknown assumption 'postive'; did you mean 'positive'?"),
    ('states = ["x"]\n[parameters]\nk = { assume = "positive", value = "-2" }\n[equations]\nx = "k"\n',
     "parameter 'k', line 3: the value -2 violates"),
    ('states = ["x"]\n[parameters]\nk = { value = "2q" }\n[equations]\nx = "k"\n',
     "value of parameter 'k', line 3, column"),
    ('states = ["x"]\n[equations]\nx = "1"\nz = "2"\n', "equation for 'z', line 4: 'z' is not a state"),
    ('states = ["x", "y"]\n[equations]\nx = "1"\n', "state 'y', line 2: has no equation"),
    ('states = ["x"]\n[equations]\nx = true\n', "equation for 'x', line 3: expected an expression"),
    ('states = ["x"]\n\n[equations]\n\nx = "a +* b"\n', "equation for 'x', line 5, column 4"),
    ('states = ["x"]\n[equations]\nx = """\n  a +\n  b.c"""\n', "equation for 'x', line 5, column 3"),
    ('states = ["x"]\n[equations]\nx = "1"\n[equilibrium]\nx = "kk"\n',
     "equilibrium value for 'x', line 5, column 1: unknown name 'kk'"),
    ('states = ["x"]\nbifurcation_parameter = "k"\n[equations]\nx = "1"\n',
     "bifurcation_parameter, line 2: 'k' is not a parameter"),
])
def test_schema_errors_name_their_line(text, fragment):
    """Each schema or content error in a file is reported with its line."""
    with pytest.raises(InvalidModelFileError) as info:
        Model.from_text(text, source="m.toml")
    assert any(fragment in p for p in info.value.problems), info.value.problems
    assert info.value.source == "m.toml"
    assert isinstance(info.value, ModelFileError) and isinstance(info.value, InvalidModelError)


def test_file_with_several_problems_lists_them_all_with_lines():
    """A broken file is fixed in one pass: every problem is listed with its line."""
    text = ('states = ["x", "y"]\nnme = "typo"\n[parameters]\na = "postive"\n'
            '[equations]\nx = "abs(x)"\ny = "2y"\n')
    with pytest.raises(InvalidModelFileError) as info:
        Model.from_text(text)
    problems = info.value.problems
    assert len(problems) == 4
    assert [re.search(r"line (\d+)", p).group(1) for p in problems] == ["2", "4", "6", "7"]


def test_file_errors_on_disk(tmp_path):
    """Missing, unreadable and non-UTF-8 files raise ModelFileError."""
    with pytest.raises(ModelFileError, match="not found"):
        Model.from_file(tmp_path / "missing.toml")
    with pytest.raises(ModelFileError, match="cannot read"):
        Model.from_file(tmp_path)
    bad = tmp_path / "latin1.toml"
    bad.write_bytes(b'states = ["x"]\nname = "caf\xe9"\n')
    with pytest.raises(ModelFileSyntaxError, match="not UTF-8 text .*line 2"):
        Model.from_file(bad)
    with pytest.raises(ModelFileError, match="expected a file path"):
        Model.from_file(3.5)


def test_toml_floats_are_read_exactly():
    """TOML numbers are accepted and read by their decimal digits."""
    m = Model.from_text('states = ["x"]\n[parameters]\nk = { value = 0.1 }\n'
                        '[equations]\nx = 2\n')
    assert m.parameter("k").default == sympy.Rational(1, 10) and m.equations == (2,)


@pytest.mark.parametrize("model", [
    toy(name='a "quoted"\nname', description="back\\slash\ttab", equilibrium={"x": 0, "y": "a"},
        bifurcation_parameter="mu"),
    Model(["S", "I"], {"S": "-beta*S*I + lambda*exp(-E/T)", "I": "beta*S*I - gamma*I/(1 + I^2)"},
          {"beta": {"assume": "positive", "value": "2.5e-3", "description": "contact rate"},
           "lambda": "nonnegative"}),
    Model(["u"], {"u": sympy.sqrt(2) * R("u") - sympy.pi * R("u")**3 + sympy.E}),
    Model(["u", "v"], {"u": "log(1 + exp(k*v)) - u", "v": "tanh(sqrt(1 + u^2)) - v^(3/2)"}),
    toy().with_values(b="1/3"),
])
def test_to_toml_round_trip(model):
    """to_toml writes a file that reads back to an equal model."""
    again = Model.from_text(model.to_toml())
    assert again == model
    assert again.notes == tuple(n for n in model.notes if "was not declared" in n)


def test_not_text_and_too_large():
    """from_text refuses non-text and oversized files with ModelFileError."""
    with pytest.raises(ModelFileError):
        Model.from_text(b"states = []")
    with pytest.raises(ModelFileError, match="limited"):
        Model.from_text("#" * 1_000_001)


def test_errors_of_expressions_are_model_errors():
    """Expression problems in a model are ModelErrors too (one except clause catches them)."""
    assert issubclass(ExpressionError, criticality.ModelError)
    assert issubclass(InvalidModelError, criticality.ModelError)
