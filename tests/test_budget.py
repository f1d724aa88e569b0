"""The wall-clock budget (criticality.budget): hopf(..., time_limit=...)."""

import time

import pytest
import sympy

from criticality import Model, budget, hopf
from criticality.hopf_analysis import engine
from criticality.cli.main import main
from criticality.errors import ComputationLimitError, ParameterError


def _food_chain():
    """Three species with four symbolic parameters; with K as the bifurcation
    parameter the critical value needs a square root, and the critical set is
    linear in eps (invented test model)."""
    m = Model(["R", "C", "P"], {"R": "R*(1 - R/K) - R*C",
                                "C": "C*(R - mm) - 2*C*P/(1 + C)",
                                "P": "eps*P*(2*C/(1 + C) - d)"},
              parameters={"K": "positive", "mm": "positive", "d": "positive", "eps": "positive"})
    eq = {"R": "K*(1 - d/(2 - d))", "C": "d/(2 - d)",
          "P": "(K*(1 - d/(2 - d)) - mm)*(1 + d/(2 - d))/2"}
    return m, eq


class _Clock:
    """A clock that stands still until told to jump past any budget."""

    def __init__(self):
        self.now = 0.0

    def __call__(self):
        return self.now


def _jump_at(monkeypatch, clock, prefix):
    """Spend the budget the moment the engine enters the stage ``prefix``."""
    original = engine.stage

    def stage(name):
        if name.startswith(prefix):
            clock.now = 1e6
        original(name)

    monkeypatch.setattr(engine, "stage", stage)


@pytest.mark.slow
def test_a_spent_budget_names_the_stage_the_root_and_the_linear_parameter(monkeypatch):
    clock = _Clock()
    monkeypatch.setattr(budget, "_clock", clock)
    _jump_at(monkeypatch, clock, "reducing to the center manifold")
    m, eq = _food_chain()
    with pytest.raises(ComputationLimitError) as info:
        hopf(m, "K", equilibrium=eq, time_limit=60)
    text = str(info.value)
    assert "time limit 60 s" in text and "reducing to the center manifold" in text
    assert "needs a square root" in text and "linear in 'eps'" in text
    assert "values={...}" in text and "guess={...}" in text
    assert info.value.exit_code == 7


def test_the_budget_is_released_after_a_stop(monkeypatch):
    """A stopped analysis leaves no budget behind: the next call (no limit)
    runs to the end, and a generous limit changes nothing."""
    clock = _Clock()
    monkeypatch.setattr(budget, "_clock", clock)
    _jump_at(monkeypatch, clock, "computing the characteristic polynomial")
    m = Model(["x", "y"], {"x": "y", "y": "-x + mu*y - x^2*y"}, parameters={"mu": "real"})
    with pytest.raises(ComputationLimitError, match="characteristic polynomial"):
        hopf(m, "mu", equilibrium={"x": 0, "y": 0}, time_limit=5)
    assert budget._current.get() is None
    monkeypatch.undo()
    assert hopf(m, "mu", equilibrium={"x": 0, "y": 0}).l1 == sympy.Rational(-1, 4)
    assert hopf(m, "mu", equilibrium={"x": 0, "y": 0}, time_limit=600).classification == \
        "supercritical"


def test_a_real_clock_stops_a_long_analysis_early():
    """With the real clock and a budget far below the run time the analysis
    stops within a few seconds (a check runs between steps)."""
    m, eq = _food_chain()
    start = time.monotonic()
    with pytest.raises(ComputationLimitError, match="stopped after"):
        hopf(m, "K", equilibrium=eq, time_limit=0.05)
    assert time.monotonic() - start < 30


@pytest.mark.parametrize("bad", [0, -1, "soon"])
def test_time_limit_must_be_a_positive_number(bad):
    m = Model(["x", "y"], {"x": "y", "y": "-x + mu*y - x^2*y"}, parameters={"mu": "real"})
    with pytest.raises(ParameterError, match="time_limit"):
        hopf(m, "mu", equilibrium={"x": 0, "y": 0}, time_limit=bad)


def test_order_hint_only_when_a_higher_order_was_asked(monkeypatch):
    clock = _Clock()
    monkeypatch.setattr(budget, "_clock", clock)
    _jump_at(monkeypatch, clock, "computing the n-dimensional normal form")
    m = Model(["x", "y"], {"x": "y", "y": "-x + mu*y - x^2*y + x^5"}, parameters={"mu": "real"})
    with pytest.raises(ComputationLimitError, match="order=5 was asked"):
        hopf(m, "mu", equilibrium={"x": 0, "y": 0}, order=5, time_limit=5)


def test_cli_time_limit_exits_with_code_7(tmp_path, capsys):
    m, eq = _food_chain()
    path = tmp_path / "chain.toml"
    path.write_text(m.to_toml())
    code = main(["analyse", str(path), "-p", "K", "-e",
                 ", ".join(f"{k}={v}" for k, v in eq.items()), "--time-limit", "0.05", "-q"])
    err = capsys.readouterr().err
    assert code == ComputationLimitError.exit_code == 7
    assert "stopped after" in err and "Traceback" not in err


class _Spent:
    """A clock whose every reading after the first lies past any budget."""

    def __init__(self):
        self.calls = 0

    def __call__(self):
        self.calls += 1
        return 0.0 if self.calls == 1 else 1e6


_BAUTIN = {"x": "mu*x - y + k*x*(x^2 + y^2) - x*(x^2 + y^2)^2",
           "y": "x + mu*y + k*y*(x^2 + y^2) - y*(x^2 + y^2)^2"}


def test_the_other_analyses_stop_under_the_context_manager(monkeypatch):
    """criticality.time_limit bounds any analysis: the checkpoints are shared."""
    import criticality

    monkeypatch.setattr(budget, "_clock", _Spent())
    m = Model(["x", "y"], _BAUTIN, parameters={"mu": "real", "k": "real"})
    with pytest.raises(ComputationLimitError, match="the Bautin search stopped"):
        with criticality.time_limit(5, "the Bautin search"):
            criticality.bautin_points(m, "mu", "k", equilibrium={"x": 0, "y": 0})
    assert budget._current.get() is None
    assert criticality.bautin_points(m, "mu", "k", equilibrium={"x": 0, "y": 0})


def test_cli_subcommands_of_other_analyses_take_a_time_limit(tmp_path, capsys, monkeypatch):
    monkeypatch.setattr(budget, "_clock", _Spent())
    path = tmp_path / "bautin.toml"
    path.write_text(Model(["x", "y"], _BAUTIN, parameters={"mu": "real", "k": "real"}).to_toml())
    code = main(["bautin", str(path), "-p", "mu", "--second", "k", "-e", "x=0, y=0",
                 "--time-limit", "5", "-q"])
    err = capsys.readouterr().err
    # the command's budget covers reading the model too, so the fake clock stops it there
    assert code == 7 and "the bautin command stopped" in err and "reading the model" in err


def test_the_numeric_mode_honours_the_budget(monkeypatch):
    """time_limit also bounds hopf(..., guess=...): Newton's iterations and the
    numeric normal form share the checkpoints."""
    monkeypatch.setattr(budget, "_clock", _Spent())
    m = Model(["x", "y"], {"x": "y", "y": "-x + mu*y - x^2*y + (exp(x) - 1 - x)"},
              parameters={"mu": "real"})
    with pytest.raises(ComputationLimitError, match="the numeric Hopf analysis stopped"):
        hopf(m, "mu", guess={"x": 0.01, "y": 0.0, "mu": 0.05}, time_limit=5)
    monkeypatch.undo()
    assert hopf(m, "mu", guess={"x": 0.01, "y": 0.0, "mu": 0.05}, time_limit=600).l1 < 0


_CHAIN_TOML = """\
# Invented three-level food chain: logistic algae A, grazers G with a
# Holling type II intake, predators P with linear predation (no real data).
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


def test_the_watchdog_stops_sympys_equilibrium_solve():
    """Regression (issue 13): sympy's solve of the positive equilibrium of a
    three-level chain never reaches a checkpoint (it ran 621 s past a 60 s
    limit); the watchdog interrupts it and the error names the stage.  The
    margin is generous: machines are noisy."""
    m = Model.from_text(_CHAIN_TOML)
    start = time.monotonic()
    with pytest.raises(ComputationLimitError) as info:
        hopf(m, "K", equilibrium="positive", time_limit=2)
    assert time.monotonic() - start < 6
    assert "solving f(x) = 0 for the equilibria" in str(info.value)
    assert "time limit 2 s" in str(info.value)
    assert budget._current.get() is None


def test_the_watchdog_reports_slow_stages_and_calls_on_overdue():
    """progress hears of a stage that lasts over a second; a call stuck where
    the stop cannot reach it (a sleep) triggers on_overdue two seconds after
    the limit and is stopped when it returns."""
    heard, overdue = [], []
    with pytest.raises(ComputationLimitError, match="napping"):
        with budget.time_limit(0.2, "the nap", progress=heard.append,
                               on_overdue=overdue.append):
            budget.stage("napping")
            time.sleep(2.6)
    assert heard == ["napping ..."]
    assert overdue and "the nap stopped" in overdue[0]


def test_a_budget_that_ends_in_time_leaves_nothing_pending():
    """No stop is delivered after a budget ends, even one that ends just at
    its limit; progress alone (no limit) is allowed."""
    import contextlib

    for _ in range(3):
        with contextlib.suppress(ComputationLimitError):  # ends just before or at the limit
            with budget.time_limit(0.05):
                deadline = time.monotonic() + 0.045
                while time.monotonic() < deadline:
                    pass
    with budget.time_limit(None, progress=lambda text: None):
        budget.stage("quick")
    time.sleep(0.7)  # a pending stop would surface here
    assert budget._current.get() is None
