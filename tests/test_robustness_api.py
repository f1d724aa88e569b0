"""Named regressions of issue 13 on the Python API: every reproducer ends in a
result or a project error (a subclass of CriticalityError) naming the option
or the term, within its budget (common practice, no source, unless a check
names one)."""

import json
import math

import mpmath
import pytest
import sympy

import criticality
from criticality import Model, hopf
from criticality.errors import (ClosedFormUnavailableError, ComputationLimitError,
                                CriticalityError, EquilibriumNotFoundError,
                                ExpressionLimitError, InvalidModelError, ModelFileError,
                                NoHopfPointError, NotAnalyticError, OrderError, ParameterError)
from criticality.outputs.json_io import read_expressions
from criticality.renderers import formats_of, render

ORIGIN = {"x": 0, "y": 0}


def planar(fx, fy, **parameters):
    """``M(fx, fy)`` of the issue: states x, y; mu and a real."""
    return Model(["x", "y"], {"x": fx, "y": fy}, parameters or {"mu": "real", "a": "real"})


CUBIC = planar("mu*x - y - a*x^3", "x + mu*y - y^3")
LORENZ = Model(["x", "y", "z"], {"x": "sigma*(y - x)", "y": "r*x - y - x*z", "z": "x*y - b*z"},
               {"sigma": "positive", "r": "positive", "b": "positive"})


def every_rendering(result):
    """Render ``result`` in every registered format and as str()."""
    out = {fmt: render(result, fmt) for fmt in formats_of(result.result_kind)}
    out["str"] = str(result)
    return out


# -- analyses that crashed -------------------------------------------------------------


def test_lorenz_positive_equilibrium_is_found_and_gives_the_textbook_critical_value():
    """equilibrium='positive' on Lorenz judged sqrt(b*r - b) where it is real (it
    raised PolynomialError); r_H = sigma (sigma + b + 3) / (sigma - b - 1)
    (Sparrow, The Lorenz Equations, 1982, section 1.2; Strogatz, Nonlinear
    Dynamics and Chaos, 1994, section 9.2)."""
    r = hopf(LORENZ, "r", equilibrium="positive")
    s, b = LORENZ.symbols["sigma"], LORENZ.symbols["b"]
    assert sympy.cancel(r.critical_value - s * (s + b + 3) / (s - b - 1)) == 0
    assert r.classification == "subcritical"
    given = hopf(LORENZ, "r", equilibrium={"x": "sqrt(b*(r - 1))", "y": "sqrt(b*(r - 1))",
                                           "z": "r - 1"})
    assert sympy.cancel(r.l1 - given.l1) == 0


@pytest.mark.parametrize("constant", ["pi", "sin(1)", "log(3)"])
def test_a_constant_raised_to_a_parameter_is_analysed(constant):
    """x*y*c^a with c = pi, sin(1), log(3) reached the sign decider as a number it
    could not convert (TypeError); such constants are positive by value."""
    r = hopf(planar(f"mu*x - y + x*y*{constant}^a", "x + mu*y - y^3"), "mu",
             equilibrium=ORIGIN)
    # f = c^a x y, g = -y^3: a = g_yyy/16 = -3/8 by the planar formula
    # (Guckenheimer and Holmes, Nonlinear Oscillations, 1983, eq. (3.4.11)),
    # l1 = 2a/omega = -3/4 (docs/conventions.md)
    assert r.classification == "supercritical"
    assert r.l1 == -sympy.Rational(3, 4)


def test_a_critical_set_with_only_complex_roots_has_no_hopf_point():
    """(mu^2 + 1) = 0 has no real root: NoHopfPointError, not an invalid comparison."""
    with pytest.raises(NoHopfPointError, match="complex"):
        hopf(planar("(mu^2+1)*x - y - x^3", "x + (mu^2+1)*y"), "mu", equilibrium=ORIGIN)


def test_zero_transversality_gives_no_verdict_and_every_renderer_works():
    """mu^2 on the diagonal touches the axis at mu = 0 without crossing."""
    r = hopf(planar("mu^2*x - y - x^3", "x + mu^2*y - y^3"), "mu", equilibrium=ORIGIN)
    assert r.classification == "nontransversal"
    assert r.verdict.startswith("no verdict")
    assert r.cycle.side_condition is None
    outputs = every_rendering(r)
    assert "No verdict" in outputs["text"] or "no verdict" in outputs["text"]
    assert json.loads(outputs["json"])["classification"] == "nontransversal"


def test_the_tanh_ring_with_s_one_half_decides_the_cycle_side():
    """Four units, x1' = -x1 - tanh(g x4) + s x4^2, xi' = -xi + tanh(g x(i-1)):
    l1 < 0 and a positive transversality put the cycle above g_c."""
    ring = Model(["x1", "x2", "x3", "x4"],
                 {"x1": "-x1 - tanh(g*x4) + s*x4^2", "x2": "-x2 + tanh(g*x1)",
                  "x3": "-x3 + tanh(g*x2)", "x4": "-x4 + tanh(g*x3)"},
                 {"g": "positive", "s": "real"})
    r = hopf(ring, "g", values={"s": "1/2"}, equilibrium={k: 0 for k in ring.states})
    assert r.classification == "supercritical"
    assert r.cycle.side == "above"
    assert r.cycle.side_condition is None
    every_rendering(r)


@pytest.mark.parametrize("text", ["exp(exp(exp(exp(1000))))", "exp(exp(1000))",
                                  "exp(-exp(1000))"])
def test_a_constant_beyond_evaluation_is_refused_where_it_is_written(text):
    with pytest.raises(InvalidModelError, match="beyond 2\\^"):
        planar(f"mu*x - y + {text}*x^2", "x + mu*y")
    with pytest.raises(ExpressionLimitError):
        criticality.parse_expression(text)


def test_a_sympy_built_constant_beyond_evaluation_is_refused_too():
    x, y, mu = sympy.symbols("x y mu", real=True)
    huge = sympy.exp(sympy.exp(sympy.exp(sympy.exp(1000, evaluate=False), evaluate=False),
                               evaluate=False), evaluate=False)
    with pytest.raises(InvalidModelError, match="beyond 2\\^"):
        Model(["x", "y"], {"x": mu * x - y + huge * x ** 2, "y": x + mu * y})


def test_evaluate_refuses_a_point_beyond_evaluation():
    r = hopf(CUBIC, "mu", equilibrium=ORIGIN)
    with pytest.raises(CriticalityError):
        r.evaluate({"a": "exp(exp(exp(exp(1000))))"})


def test_bautin_with_a_degenerate_point_and_the_same_parameter_twice():
    """A point where l2 vanishes too had a bare-string scenario (ValueError on
    unpacking); second = first is a ParameterError."""
    model = planar("mu*x - y + a*x^3", "x + mu*y - y^3")
    point = criticality.bautin_points(model, "mu", "a", equilibrium=ORIGIN)[0]
    assert point.l2_sign == "zero" and point.fold_of_cycles_side == "undecided"
    str(point)
    with pytest.raises(ParameterError, match="must differ"):
        criticality.bautin_points(model, "mu", "mu", equilibrium=ORIGIN)


# -- options checked once, before any computation -------------------------------------


@pytest.mark.parametrize("order", [None, "3", 3.5, math.inf, 4, 1, 99999, True])
def test_order_of_the_wrong_kind_or_size(order):
    with pytest.raises(OrderError, match="order must be"):
        hopf(CUBIC, "mu", order=order, equilibrium=ORIGIN)


@pytest.mark.parametrize("option, value, words", [
    ("branch", "0", "branch must be"), ("branch", -1, "branch must be"),
    ("values", "a=1", "values must be a mapping"),
    ("assume", "positive", "assume must be a mapping"),
    ("assume", {"a": "big"}, "assume\\['a'\\] must be one of"),
    ("backend", "numpy", "backend must be one of"),
    ("equilibrium", {"x": None, "y": 0}, "equilibrium\\['x'\\]"),
    ("equilibrium", "", "equilibrium must be"), ("equilibrium", 1.5, "equilibrium must be"),
    ("equilibrium", True, "equilibrium must be"),
    ("eliminate", "a", "eliminate must be a list"),
    ("values", {"a": math.nan}, "finite"), ("values", {"a": math.inf}, "finite"),
])
def test_a_bad_option_is_named_before_the_equilibrium_is_solved(option, value, words):
    """CUBIC has nine equilibria; solving them takes far longer than the check."""
    with criticality.time_limit(5):
        with pytest.raises(ParameterError, match=words):
            hopf(CUBIC, "mu", **{option: value})


def test_an_equilibrium_index_beyond_bezouts_bound_is_refused_before_solving():
    """CUBIC is cubic in both equations: at most 3 * 3 = 9 isolated equilibria
    (Bezout's theorem; Cox, Little and O'Shea, Ideals, Varieties, and
    Algorithms, 2015, Ch. 8 section 7)."""
    with criticality.time_limit(5):
        with pytest.raises(EquilibriumNotFoundError, match="at most 9"):
            hopf(CUBIC, "mu", equilibrium=10 ** 20)


@pytest.mark.parametrize("option", ["equilibrium", "branch", "assume", "eliminate"])
def test_the_numeric_mode_refuses_options_it_cannot_use(option):
    value = {"equilibrium": ORIGIN, "branch": 1, "assume": {"a": "positive"},
             "eliminate": ["a", "y"]}[option]
    with pytest.raises(ParameterError, match=f"does not use {option}="):
        hopf(CUBIC, "mu", guess={"x": 0, "y": 0, "mu": 0.1}, values={"a": 1},
             **{option: value})


@pytest.mark.parametrize("digits", ["30", 4, 501, 2.5])
def test_numeric_mode_digits(digits):
    with pytest.raises(ParameterError, match="digits must be"):
        hopf(CUBIC, "mu", guess={"x": 0, "y": 0, "mu": 0.1}, values={"a": 1}, digits=digits)


@pytest.mark.parametrize("value", [math.nan, math.inf, -math.inf, None, True, 1j])
def test_evaluate_refuses_values_that_are_not_finite_numbers(value):
    r = hopf(CUBIC, "mu", equilibrium=ORIGIN)
    with pytest.raises(ParameterError, match="values\\['a'\\]"):
        r.evaluate({"a": value})


def test_evaluate_at_ten_thousand_digits():
    """Python's 4300-digit limit on int <-> str conversion must not fire.  l1 =
    -3(a + 1)/4 by the planar formula (Guckenheimer and Holmes, Nonlinear
    Oscillations, 1983, eq. (3.4.11), with l1 = 2a/omega), so -1 at a = 1/3."""
    r = hopf(CUBIC, "mu", equilibrium=ORIGIN)
    num = r.evaluate({"a": "1/3"}, digits=10000)
    with mpmath.workdps(10000):
        assert abs(num.l1 + 1) < mpmath.mpf(10) ** -9990
    assert len(str(num)) > 0
    with pytest.raises(ParameterError, match="digits must be"):
        r.evaluate({"a": 1}, digits="30")


def test_delay_evaluation_at_many_digits_and_bad_points():
    """The delay result's evaluation converts through binary values and prints
    at its own precision; bad points and digits are named."""
    model = Model(["x"], {"x": "-k*x(t - tau) - x^3"}, {"k": "positive", "tau": "positive"})
    r = hopf(model, "tau", equilibrium={"x": 0})
    num = r.evaluate({"k": 1}, digits=5000)
    assert len(repr(num)) > 5000
    with pytest.raises(ParameterError, match="values must be a mapping"):
        r.evaluate("k=1")
    with pytest.raises(ParameterError, match="digits must be"):
        r.evaluate({"k": 1}, digits="30")
    with pytest.raises(CriticalityError, match="not finite"):
        r.evaluate({"k": math.nan})


@pytest.mark.parametrize("path", ["\x00", "a\x00b.toml"])
def test_a_model_path_with_a_nul_character(path):
    with pytest.raises(ModelFileError, match="NUL"):
        Model.from_file(path)


@pytest.mark.parametrize("call", ["fold", "bogdanov_takens", "fold_hopf", "hopf_hopf"])
def test_branch_indices_of_the_other_analyses(call):
    model = Model(["x", "y"], {"x": "y", "y": "b1 + b2*x + 2*x^2 - 3*x*y"})
    args = {"fold": ("b1",), "bogdanov_takens": ("b2", "x_eq"),
            "fold_hopf": (("b1", "b2"),), "hopf_hopf": (("b1", "b2"),)}[call]
    with pytest.raises(ParameterError, match="branch must be"):
        getattr(criticality, call)(model, *args, branch="0")


def test_a_branch_that_does_not_exist_is_a_parameter_error():
    model = Model(["x"], {"x": "mu - x^2"}, parameters={"mu": "real"})
    with pytest.raises(ParameterError, match="branch 5 does not exist"):
        criticality.fold(model, "mu", eliminate=["mu"], branch=5)


# -- limits by value --------------------------------------------------------------------


@pytest.mark.parametrize("text", ["((x^1000)^1000)^1000", "x^600*x^600", "(x^2)^501"])
def test_the_exponent_limit_holds_on_the_evaluated_power(text):
    with pytest.raises(ExpressionLimitError, match="beyond"):
        criticality.parse_expression(text)


def test_the_largest_allowed_power_still_parses():
    assert criticality.parse_expression("(x^2)^500") == sympy.Symbol("x", real=True) ** 1000


def test_a_power_of_a_sum_too_large_to_expand_is_refused_at_once():
    """(x + y + 1)^200 expands to C(202, 2) = 20301 terms."""
    model = planar("mu*x - y + (x + y + 1)^200", "x + mu*y")
    with criticality.time_limit(5):
        with pytest.raises(ComputationLimitError, match="expand to more than"):
            hopf(model, "mu", equilibrium=ORIGIN)


def test_a_moderate_power_of_a_sum_is_still_expanded():
    """(x + y)^4 has 5 terms: far below the limit, analysed as usual; quartic
    terms leave l1 = 2a/omega with a = (f_xxx + g_yyy)/16 = -3/4
    (Guckenheimer and Holmes, Nonlinear Oscillations, 1983, eq. (3.4.11))."""
    r = hopf(planar("mu*x - y - x^3 + (x + y)^4", "x + mu*y - y^3"), "mu",
             equilibrium=ORIGIN)
    assert r.l1 == -sympy.Rational(3, 2)


# -- degenerate mathematics answered truthfully ------------------------------------------


def test_a_critical_value_outside_the_declared_sign_gives_no_verdict():
    """mu_c = -1 while mu is declared positive: the admissible set is empty."""
    model = Model(["x", "y"], {"x": "(mu+1)*x - y - x^3", "y": "x + (mu+1)*y - y^3"},
                  {"mu": "positive"})
    r = hopf(model, "mu", equilibrium=ORIGIN)
    assert r.critical_value == -1
    assert r.classification == "inadmissible"
    assert "admissible parameters" not in r.verdict
    every_rendering(r)


def test_branch_minus_one_is_refused_not_answered_with_omega_squared():
    with pytest.raises(ParameterError) as info:
        hopf(CUBIC, "mu", equilibrium=ORIGIN, branch=-1)
    assert "omega^2" not in str(info.value)


def test_a_complex_model_is_refused_with_the_term_named():
    model = Model(["x", "y"], {"x": "mu*x - y + sqrt(b)*x^2", "y": "x + mu*y - y^3"},
                  {"mu": "real", "b": "negative"})
    with pytest.raises(NotAnalyticError, match="sqrt\\(b\\)"):
        hopf(model, "mu", equilibrium=ORIGIN)


def test_log_of_a_negative_parameter_is_refused():
    model = Model(["x", "y"], {"x": "mu*x - y + log(-b)*x^2 - log(b)*x^3", "y": "x + mu*y"},
                  {"mu": "real", "b": "positive"})
    with pytest.raises(NotAnalyticError, match="log"):
        hopf(model, "mu", equilibrium=ORIGIN)


# -- foreign exceptions at the boundary ----------------------------------------------------


@pytest.mark.parametrize("foreign, project", [
    (sympy.PolynomialError("a radical met a generator"), ClosedFormUnavailableError),
    (RecursionError("maximum recursion depth exceeded"), ComputationLimitError),
    (OverflowError("int too large to convert to float"), ComputationLimitError),
])
def test_a_foreign_exception_becomes_a_project_error_naming_the_stage(monkeypatch, foreign,
                                                                         project):
    import criticality.local.prepare as prepare

    def fails(*args, **kwargs):
        raise foreign

    monkeypatch.setattr(prepare, "raw_taylor", fails)
    with pytest.raises(project, match="the Hopf analysis stopped while preparing") as info:
        hopf(CUBIC, "mu", equilibrium=ORIGIN)
    assert info.value.__cause__ is foreign


def test_a_bug_is_not_disguised_as_a_project_error(monkeypatch):
    """TypeError and the like mean a mistake in the package: they pass through."""
    import criticality.local.prepare as prepare

    def fails(*args, **kwargs):
        raise TypeError("a bug")

    monkeypatch.setattr(prepare, "raw_taylor", fails)
    with pytest.raises(TypeError, match="a bug"):
        hopf(CUBIC, "mu", equilibrium=ORIGIN)


# -- JSON read-back --------------------------------------------------------------------------


def _paths(value, path=()):
    yield path
    if isinstance(value, dict):
        for k, v in value.items():
            yield from _paths(v, path + (k,))
    elif isinstance(value, list):
        for k, v in enumerate(value):
            yield from _paths(v, path + (k,))


def test_json_read_back_of_every_structural_substitution():
    """Every field of a result document replaced by each of 8 values of
    another shape: a result or a ModelFileError/expression error, never a
    foreign exception."""
    doc = json.loads(hopf(CUBIC, "mu", equilibrium=ORIGIN).to_json())
    count = 0
    for path in list(_paths(doc)):
        if not path:
            continue
        for value in (1, True, "(", [], {}, None, [1], {"a": 1}):
            changed = json.loads(json.dumps(doc))
            target = changed
            for key in path[:-1]:
                target = target[key]
            target[path[-1]] = value
            count += 1
            try:
                read_expressions(json.dumps(changed))
            except CriticalityError:
                pass
    assert count > 400


@pytest.mark.parametrize("field, value", [("conditions", [1]), ("cycle", True),
                                          ("equilibrium", 1), ("c1", "x"),
                                          ("lyapunov_coefficients", {"a": 1})])
def test_json_fields_of_the_wrong_shape_are_named(field, value):
    doc = json.loads(hopf(CUBIC, "mu", equilibrium=ORIGIN).to_json())
    doc[field] = value
    with pytest.raises(ModelFileError, match=f"JSON field '{field}"):
        read_expressions(json.dumps(doc))


def test_json_nested_too_deeply():
    with pytest.raises(ModelFileError, match="nested too deeply"):
        read_expressions("[" * 100000)


# -- the checks and outputs take the same care -----------------------------------------------


def test_sweep_and_evaluate_many_name_a_bad_grid():
    r = hopf(CUBIC, "mu", equilibrium=ORIGIN)
    with pytest.raises(ParameterError, match="grid must be a mapping"):
        criticality.sweep(r, "l1", "a")
    with pytest.raises(ParameterError, match="grid values of 'a' must be numbers"):
        r.evaluate_many({"a": "x"})


def test_validate_refuses_a_bad_point_and_a_result_without_verdict():
    r = hopf(CUBIC, "mu", equilibrium=ORIGIN)
    with pytest.raises(ParameterError, match="values must be a mapping"):
        criticality.validate(r, "a=1")
    flat = hopf(planar("mu^2*x - y - x^3", "x + mu^2*y - y^3"), "mu", equilibrium=ORIGIN)
    with pytest.raises(criticality.ValidationRunError, match="no verdict"):
        criticality.validate(flat)


def test_json_output_with_a_point_that_is_not_a_mapping():
    r = hopf(CUBIC, "mu", equilibrium=ORIGIN)
    with pytest.raises(ParameterError, match="point must be a mapping"):
        r.to_json(point="a")


def test_values_keyed_by_sympy_symbols_are_still_accepted():
    """The option check normalises symbol keys to their names."""
    a = CUBIC.symbols["a"]
    r = hopf(CUBIC, "mu", equilibrium=ORIGIN, values={a: 1})
    assert r.l1 == -sympy.Rational(3, 2)  # -3(a + 1)/4 at a = 1 (see above)


def test_model_from_file_refuses_a_named_pipe_and_a_folder(tmp_path):
    """Model.from_file on a FIFO used to block forever (the CLI checked, the
    Python API did not); the check now sits where the file is opened."""
    import os

    from criticality import Model
    from criticality.errors import ModelFileError

    fifo = tmp_path / "model.toml"
    os.mkfifo(fifo)
    with pytest.raises(ModelFileError, match="not a regular file"):
        Model.from_file(fifo)
    with pytest.raises(ModelFileError, match="it is a folder"):
        Model.from_file(tmp_path)
