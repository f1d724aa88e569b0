"""The simulation check of Hopf predictions, and vectorised sweeps.

The simulations integrate the original model with scipy's ``solve_ivp`` (a
general-purpose reference integrator, independent of the engine) and compare
with the engine's closed forms and with published or exact cycle amplitudes.
Each check names its source; "from memory" marks a value recalled rather than
looked up, "common practice, no source" a fact of the trade.  Simulation tests
are marked ``slow``.
"""

import math
import shutil
import subprocess

import numpy as np
import pytest
import sympy

from criticality import Model, hopf
from criticality.errors import MissingExtraError, ParameterError, ValidationRunError
from criticality.checks.sweeps import sweep
from criticality.checks.validation import default_offsets, natural_scale, validate


def _van_der_pol_type():
    m = Model(states=["x", "y"], equations={"x": "y", "y": "-x + mu*y - x^2*y"},
              parameters={"mu": "real"})
    return hopf(m, "mu", equilibrium={"x": 0, "y": 0})


def _quintic():
    """r' = mu r + r^3 - r^5 in Cartesian form: subcritical at mu = 0, with the
    unstable cycle r^2 = (1 - sqrt(1 + 4 mu)) / 2 for -1/4 < mu < 0 (solving
    the radial equation; common practice, no source)."""
    rr = "(x^2 + y^2)"
    m = Model(states=["x", "y"],
              equations={"x": f"mu*x - y + x*{rr} - x*{rr}^2",
                         "y": f"x + mu*y + y*{rr} - y*{rr}^2"})
    return hopf(m, "mu", equilibrium={"x": 0, "y": 0})


def _three_dimensional():
    """An invented model: a van der Pol-type pair driving a damped third state
    linearly and quadratically, which feeds back through u' = v - u w."""
    m = Model(states=["u", "v", "w"],
              equations={"u": "v - u*w", "v": "-u + mu*v - u^2*v", "w": "-2*w + u + v^2"})
    return hopf(m, "mu", equilibrium={"u": 0, "v": 0, "w": 0})


@pytest.fixture(scope="module")
def planar_report():
    return validate(_van_der_pol_type())


# -- simulations -----------------------------------------------------------------------------


@pytest.mark.slow
def test_van_der_pol_type_amplitude_by_simulation(planar_report):
    """x' = y, y' = -x + mu y - x^2 y: the simulated cycle has amplitude
    2 sqrt(mu) in x (common practice, no source) within 0.1 %, and period
    2 pi within 1e-4, at every default offset."""
    rep = planar_report
    assert rep.verdict == "confirmed" and rep.confirmed
    assert rep.classification == "supercritical" and rep.side == "above"
    assert len(rep.measurements) == 3
    for m in rep.measurements:
        assert m.measured and m.approach == "forward"
        assert m.offset > 0
        assert m.measured_amplitudes["x"] == pytest.approx(2 * math.sqrt(m.mu), rel=1e-3)
        assert m.measured_period == pytest.approx(2 * math.pi, rel=1e-4)


@pytest.mark.slow
def test_error_shrinks_with_offset_on_the_planar_case(planar_report):
    """The relative amplitude error falls at least linearly with the offset
    (the local prediction's leading correction is O(offset)); for this
    odd-symmetric field it falls quadratically."""
    errs = [m.worst_amplitude_error for m in planar_report.measurements]
    offs = [m.offset for m in planar_report.measurements]
    assert offs == sorted(offs, reverse=True)
    assert errs[0] > errs[1] > errs[2] > 0
    assert all(o is not None and o > 0.9 for o in planar_report.orders)
    assert errs[-1] < 1e-4


@pytest.mark.slow
def test_three_dimensional_supercritical_model():
    """An invented three-dimensional model: every state's simulated amplitude
    agrees with sqrt(k_j delta) within 0.5 % and the error shrinks; the period
    agrees with the first-order prediction within 1e-5."""
    r = _three_dimensional()
    assert r.classification == "supercritical"
    rep = validate(r)
    assert rep.confirmed, str(rep)
    for m in rep.measurements:
        assert all(abs(e) < 5e-3 for e in m.amplitude_errors.values())
        assert abs(m.corrected_period_error) < 1e-5
    assert all(0.8 < o < 1.3 for o in rep.orders)  # O(delta): no symmetry here


@pytest.mark.slow
def test_lorenz_subcritical_bracketing(lorenz):
    """Lorenz system at sigma = 10, b = 8/3: the Hopf point r = 470/19 is
    subcritical (Strogatz, Nonlinear Dynamics and Chaos, 1994, Section 9.2;
    from memory); before onset a start at 0.7 of the predicted unstable cycle
    falls back onto the equilibrium and a start at 1.3 of it leaves."""
    r = lorenz
    num = r.evaluate(sigma=10, b="8/3")
    assert sympy.nsimplify(float(num.critical_value), rational=True, tolerance=1e-12) == \
        sympy.Rational(470, 19)
    rep = validate(r, sigma=10, b="8/3", offsets=[0.2, 0.08])
    assert rep.classification == "subcritical" and rep.side == "below"
    assert len(rep.brackets) == 2
    for b in rep.brackets:
        assert b.offset < 0 and b.mu < 470 / 19
        assert (b.inside, b.outside) == ("decayed", "escaped")
    assert rep.confirmed, str(rep)


@pytest.mark.slow
def test_lorenz_unstable_cycle_by_shooting(lorenz):
    """The unstable cycle of the Lorenz system below r = 470/19 (sigma = 10,
    b = 8/3), found by Newton's method on the periodic orbit, has the predicted
    amplitudes within 1 % and the error falls like the offset."""
    rep = validate(lorenz, sigma=10, b="8/3", offsets=[0.2, 0.08, 0.032],
                   bracket_factors=(0.5, 1.5))
    assert [m.approach for m in rep.measurements] == ["shooting"] * 3
    for m in rep.measurements:
        assert m.measured and m.worst_amplitude_error < 1e-2
        assert abs(m.corrected_period_error) < 1e-5
        # the cycle repels radially with multiplier exp(2 |beta'(r_c) (r - r_c)| T)
        assert m.floquet > 1 and abs(m.floquet_error) < 2e-2
    assert all(0.8 < o < 1.3 for o in rep.orders)
    assert rep.confirmed, str(rep)


@pytest.mark.slow
def test_long_transient_falls_back_to_shooting():
    """The lagged spring-mass example (invented, examples/lagged_oscillator.toml)
    has a weak nonlinearity: its transients would take thousands of periods, so
    the cycle is located by shooting; the Floquet multipliers show that it
    attracts, with the predicted radial multiplier exp(-2 beta' (g - g_c) T)."""
    from pathlib import Path

    path = Path(__file__).resolve().parents[1] / "examples" / "lagged_oscillator.toml"
    if not path.exists():
        pytest.skip("the example model files are not in this checkout")
    rep = validate(hopf(Model.from_file(path)))
    assert rep.confirmed, str(rep)
    assert any("shooting instead" in w for w in rep.warnings)
    for m in rep.measurements:
        assert m.approach == "shooting" and m.floquet < 1
        assert abs(m.floquet_error) < 2e-2 and m.worst_amplitude_error < 1.5e-2


def _saddle_model():
    """Invented: the three-dimensional pair with a fourth state that grows on
    its own (eigenvalue +1/2) and feeds the third, so that the cycle born at
    mu = 0 attracts on the center manifold but repels along s: a saddle."""
    m = Model(states=["u", "v", "w", "s"],
              equations={"u": "v - u*w", "v": "-u + mu*v - u^2*v", "w": "-w + u^2 + s*u",
                         "s": "s/2 + u^2"})
    return hopf(m, "mu", equilibrium={"u": 0, "v": 0, "w": 0, "s": 0})


@pytest.mark.slow
def test_saddle_type_cycle_by_shooting():
    """No integration reaches a saddle-type cycle; shooting finds it, with the
    predicted amplitudes of u and v within 0.2 %."""
    rep = validate(_saddle_model())
    assert rep.brackets == ()
    assert rep.confirmed, str(rep)
    for m in rep.measurements:
        assert m.approach == "shooting"
        assert abs(m.amplitude_errors["u"]) < 2e-3 and abs(m.amplitude_errors["v"]) < 2e-3
        assert m.amplitude_errors["s"] is None and m.measured_amplitudes["s"] > 0


def test_saddle_type_cycle_without_shooting_is_inconclusive():
    rep = validate(_saddle_model(), shooting=False)
    assert rep.verdict == "inconclusive" and rep.measurements == () and rep.brackets == ()
    assert "saddle" in rep.reasons[0]


@pytest.mark.slow
def test_planar_subcritical_exact_unstable_cycle():
    """The unstable cycle of r' = mu r + r^3 - r^5, measured in reversed time,
    has the exact radius sqrt((1 - sqrt(1 + 4 mu)) / 2) (see _quintic) to 1e-6;
    the bracketing confirms the subcritical onset."""
    rep = validate(_quintic(), offsets=[0.02, 0.008])
    assert rep.classification == "subcritical" and rep.confirmed, str(rep)
    for m in rep.measurements:
        assert m.approach == "backward" and m.measured
        exact = math.sqrt((1 - math.sqrt(1 + 4 * m.mu)) / 2)
        assert m.measured_amplitudes["x"] == pytest.approx(exact, rel=1e-6)
    assert all(b.as_predicted for b in rep.brackets)


@pytest.mark.slow
def test_prediction_beyond_the_fold_is_flagged():
    """Beyond mu = -1/4 the quintic model has no small cycle (its unstable cycle
    meets the outer one in a fold): the check must not confirm the local
    prediction there, and must say it is poor."""
    rep = validate(_quintic(), offsets=[0.4, 0.3])
    assert rep.verdict == "not confirmed"
    assert any("poor" in w for w in rep.warnings)
    assert any(not b.as_predicted for b in rep.brackets)


# -- report, options and errors (fast) ---------------------------------------------------------


@pytest.fixture(scope="module")
def quick_report():
    return validate(_quintic(), offsets=[0.05, 0.03])


@pytest.mark.slow
def test_report_prints_a_table(quick_report):
    """str(report) is a table with one row per state and offset, and the verdict."""
    text = str(quick_report)
    assert "mu - mu_c" in text and "rel. error" in text
    assert text.count("(reversed time)") == 2
    assert "Verdict: " in text and "Bracketing" in text


def test_report_latex_compiles(quick_report, tmp_path):
    """to_latex() is a fragment that compiles in a plain LaTeX document."""
    tex = quick_report.to_latex()
    assert tex.count("\\begin{tabular}") == 2 and "\\mu_c" in tex
    if shutil.which("pdflatex") is None:
        pytest.skip("pdflatex is not installed")
    doc = tmp_path / "r.tex"
    doc.write_text("\\documentclass{article}\\begin{document}\n" + tex + "\n\\end{document}\n")
    run = subprocess.run(["pdflatex", "-interaction=nonstopmode", "-halt-on-error", doc.name],
                         cwd=tmp_path, capture_output=True, timeout=120)
    assert run.returncode == 0, run.stdout.decode(errors="replace")[-2000:]


def test_report_is_frozen(quick_report):
    with pytest.raises(AttributeError):
        quick_report.verdict = "confirmed"


def test_default_offsets_follow_the_natural_scale():
    """omega / |beta'| = 2 for the van der Pol-type model (beta' = 1/2)."""
    r = _van_der_pol_type()
    assert natural_scale(1.0, math.inf, 0.5, 0.0) == 2.0
    assert default_offsets(r) == pytest.approx((0.02, 0.008, 0.0032))


def test_missing_parameter_value_is_reported(lorenz):
    with pytest.raises(ParameterError, match="sigma"):
        validate(lorenz, b=2)


@pytest.mark.parametrize("kwargs, match", [
    ({"offsets": [-0.1]}, "positive"), ({"offsets": []}, "at least one"),
    ({"method": "Euler"}, "unknown integrator"), ({"tolerance": 2}, "tolerance"),
    ({"bracket_factors": (1.2, 1.3)}, "bracket_factors"), ({"rtol": 1e-2}, "rtol"),
])
def test_bad_options_are_reported(kwargs, match):
    with pytest.raises(ParameterError, match=match):
        validate(_van_der_pol_type(), **kwargs)


def test_degenerate_point_is_refused():
    """At a = -8 the invented model below has l1 = 0: nothing to check."""
    m = Model(states=["u", "v", "w"],
              equations={"u": "v - u*w", "v": "-u + mu*v - u^2*v + a*u*w", "w": "-w + u^2"})
    r = hopf(m, "mu", equilibrium={"u": 0, "v": 0, "w": 0})
    with pytest.raises(ValidationRunError):
        validate(r, a=-8)


def test_missing_scipy_names_the_extra(hide_package):
    hide_package("scipy")
    with pytest.raises(MissingExtraError, match=r"pip install 'criticality\[validate\]'"):
        validate(_van_der_pol_type())


# -- sweeps -------------------------------------------------------------------------------


def test_sweep_matches_the_closed_form_at_sampled_points(lorenz):
    """l1 of the Lorenz result over a (sigma, b) grid equals the closed form
    evaluated by sympy at sampled points, and the Hopf point is admissible
    exactly where sigma > b + 1 (omega^2 > 0; common practice, no source)."""
    r = lorenz
    S, B = np.meshgrid(np.linspace(0.5, 30, 40), np.linspace(0.2, 5, 30))
    sw = sweep(r, "l1", {"sigma": S, "b": B}, progress=False)
    assert sw.shape == (30, 40)
    syms = {s.name: s for s in r.l1.free_symbols}
    rng = np.random.default_rng(1)
    for _ in range(12):
        i, j = rng.integers(0, 30), rng.integers(0, 40)
        if not sw.admissible[i, j]:
            continue
        exact = sympy.N(r.l1.xreplace({syms["sigma"]: sympy.Float(S[i, j], 30),
                                       syms["b"]: sympy.Float(B[i, j], 30)}), 20)
        assert float(exact) == pytest.approx(sw.values[i, j], rel=1e-9)
    assert np.array_equal(sw.admissible, S > B + 1)
    assert np.all(np.isnan(sw.masked()[~sw.admissible]))


def test_sweep_of_a_named_amplitude_and_errors():
    r = _van_der_pol_type()
    sw = sweep(r, "amplitude:x", {"mu": [0.01, 0.04]}, progress=False)
    assert sw.values == pytest.approx([0.2, 0.4])
    with pytest.raises(ParameterError, match="unknown quantity"):
        sweep(r, "lambda2", {"mu": [0.1]})
    with pytest.raises(ParameterError, match="not a state"):
        sweep(r, "amplitude:q", {"mu": [0.1]})
    with pytest.raises(ParameterError, match="grid is empty"):
        sweep(r, "l1", {})


def test_sweep_reports_progress(lorenz, monkeypatch, capsys):
    """A sweep past the delay writes a progress line on stderr; a callable
    receives (done, total)."""
    import criticality.checks.sweeps as sweeps

    r = lorenz
    grid = {"sigma": np.linspace(5, 30, 70000), "b": 1.0}
    calls = []
    sweep(r, "critical_value", grid, progress=lambda d, t: calls.append((d, t)))
    assert calls[-1] == (70000, 70000) and len(calls) >= 2
    monkeypatch.setattr(sweeps, "PROGRESS_AFTER", 0.0)
    sweep(r, "critical_value", grid)
    assert "100% of 70000 points" in capsys.readouterr().err
    sweep(r, "critical_value", grid, progress=False)
    assert capsys.readouterr().err == ""


@pytest.mark.slow
def test_family_parametrised_by_the_equilibrium():
    """An invented model analysed with eliminate=["k", "y"]: the eliminated
    parameter k = x_eq - mu moves with mu, and the simulation follows the same
    family (amplitude error within 2 %, shrinking like the offset)."""
    m = Model(states=["x", "y"], equations={"x": "k - x + x^2*y", "y": "mu - x^2*y"})
    r = hopf(m, "mu", eliminate=["k", "y"])
    assert r.substitutions and "k" in r.substitutions
    rep = validate(r, x_eq=1, offsets=[0.006, 0.003])
    assert rep.critical_value == pytest.approx(1.0)
    assert rep.confirmed, str(rep)
    assert rep.measurements[-1].worst_amplitude_error < 2e-2
    assert 0.8 < rep.orders[0] < 1.3
