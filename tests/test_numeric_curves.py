"""Numeric Hopf curves, fast sweeps, the batch analysis, their command-line
subcommands, and the same work on a dask cluster."""

import pickle

import numpy as np
import pytest

from criticality import Model, ParameterError, analyse_many, hopf, hopf_curve, sweep
from criticality.cli import main

A, B = 0.6, 0.5  # invented parameter values for the FitzHugh-Nagumo checks


def fitzhugh_nagumo():
    """v' = v - v^3/3 - w + I, w' = eps (v + a - b w) (FitzHugh, Biophys. J. 1
    (1961) 445; Nagumo, Arimoto and Yoshizawa, Proc. IRE 50 (1962) 2061)."""
    return Model(["v", "w"], {"v": "v - v^3/3 - w + I", "w": "eps*(v + a - b*w)"},
                 {"I": "real", "eps": "positive", "a": "real", "b": "positive"})


def _fhn_closed_form(eps):
    """Trace zero at the equilibrium gives v* = -sqrt(1 - eps b) (the lower
    Hopf point), I_c = (v* + a)/b - v* + v*^3/3 and, with the determinant,
    omega^2 = eps (1 - b^2 eps)."""
    v = -np.sqrt(1 - eps * B)
    return (v + A) / B - v + v ** 3 / 3, np.sqrt(eps * (1 - B ** 2 * eps))


def _fhn_curve(eps, **kw):
    v0 = -np.sqrt(1 - eps[0] * B)
    I0 = _fhn_closed_form(eps[:1])[0][0]
    return hopf_curve(fitzhugh_nagumo(), "I", {"eps": eps},
                      {"v": v0, "w": (v0 + A) / B, "I": I0 + 0.01},
                      values={"a": "0.6", "b": "0.5"}, **kw)


def test_fitzhugh_nagumo_hopf_curve_matches_trace_zero():
    """The Hopf curve in the applied current I as eps moves agrees with the
    closed form from trace zero (FitzHugh 1961; Nagumo et al. 1962)."""
    eps = np.linspace(0.05, 0.5, 60)
    curve = _fhn_curve(eps)
    I_c, omega = _fhn_closed_form(eps)
    assert len(curve) == 60 and set(curve.status) == {"ok"}
    np.testing.assert_allclose(curve.along_values, eps)
    np.testing.assert_allclose(curve.critical_value, I_c, atol=1e-10)
    np.testing.assert_allclose(curve.omega, omega, rtol=1e-10)
    # each row agrees with the numeric mode at that point
    r = hopf(fitzhugh_nagumo(), "I", guess={"v": -0.9, "w": -0.6, "I": float(I_c[30]) + 0.01},
             values={"a": "0.6", "b": "0.5", "eps": repr(float(eps[30]))}, digits=10)
    assert abs(float(r.l1) - curve.l1[30]) < 1e-9 * abs(curve.l1[30])
    assert curve.verdict[30] == r.classification


def _circle_model():
    """Invented: in polar form r' = (a^2 + mu^2 - 1) r + (a - 1/2) r^3 - r^5,
    so the Hopf curve is the circle a^2 + mu^2 = 1, l1 changes sign at
    a = 1/2 (a Bautin point) and a is largest at (a, mu) = (1, 0)."""
    r2 = "(x^2 + y^2)"
    t = "(a^2 + mu^2 - 1)"
    return Model(["x", "y"], {"x": f"{t}*x - y + (a - 1/2)*x*{r2} - x*{r2}^2",
                              "y": f"x + {t}*y + (a - 1/2)*y*{r2} - y*{r2}^2"},
                 {"mu": "real", "a": "real"})


def test_curve_through_a_bautin_point_and_a_turning_point():
    """l1 changes sign at a = 1/2 (refined as a Bautin point with l2 < 0), the
    curve turns at a = 1 and comes back on the other half of the circle."""
    a = np.linspace(0.0, 1.2, 41)
    curve = hopf_curve(_circle_model(), "mu", {"a": a}, {"x": 0.0, "y": 0.0, "mu": 1.02},
                       order=5)
    ok = [i for i, s in enumerate(curve.status) if s == "ok"]
    assert len(ok) == 68  # each value up to 0.99 twice: both halves of the circle
    assert curve.status.count("not reached") == 7  # no Hopf point for a > 1
    mu, along = curve.critical_value[ok], curve.along_values[ok]
    np.testing.assert_allclose(mu ** 2 + along ** 2, 1, atol=1e-9)
    assert len(curve.bautin_points) == 2
    for p in curve.bautin_points:
        assert abs(p.along_value - 0.5) < 1e-8 and p.l2 < 0
    assert len(curve.turning_points) == 1
    turn = curve.turning_points[0]
    assert abs(turn.along_value - 1) < 1e-6 and abs(turn.critical_value) < 1e-3
    rows = [(v, x) for v, x, s in zip(curve.verdict, curve.along_values, curve.status)
            if s == "ok"]
    assert {v for v, x in rows if x < 0.45} == {"supercritical"}
    assert {v for v, x in rows if x > 0.55} == {"subcritical"}
    assert curve.l2 is not None and np.all(curve.l2[ok] < 0)
    copy = pickle.loads(pickle.dumps(curve))
    np.testing.assert_array_equal(copy.l1, curve.l1)
    with pytest.raises(ValueError):
        curve.l1[0] = 1.0  # frozen: the columns are read-only


def test_curve_table_outputs(tmp_path):
    """CSV, pandas and the plot of a curve."""
    curve = _fhn_curve(np.linspace(0.05, 0.3, 8))
    text = curve.to_csv()
    assert text.splitlines()[0] == "eps,I,omega,l1,transversality,status,verdict"
    assert len(text.splitlines()) == 9
    path = tmp_path / "curve.csv"
    curve.to_csv(path)
    assert path.read_text() == text
    pandas = pytest.importorskip("pandas")
    frame = curve.to_pandas()
    assert isinstance(frame, pandas.DataFrame) and list(frame["status"]) == ["ok"] * 8
    ax = curve.plot()
    assert ax.get_xlabel() == "eps"


def test_curve_bad_input():
    """Options of hopf_curve are checked with specific messages."""
    with pytest.raises(ParameterError, match="one entry"):
        hopf_curve(fitzhugh_nagumo(), "I", {"eps": [0.1, 0.2], "a": [1, 2]}, {})
    with pytest.raises(ParameterError, match="two finite"):
        hopf_curve(fitzhugh_nagumo(), "I", {"eps": [0.1]}, {})
    with pytest.raises(ParameterError, match="'a'"):
        hopf_curve(fitzhugh_nagumo(), "I", {"eps": [0.1, 0.2]},
                   {"v": 0, "w": 0, "I": 0}, values={"b": 1})


def test_sweep_compiled_once_agrees_with_lambdify(lorenz):
    """The compiled sweep gives sympy.lambdify's values (common practice, no
    source), and admissibility as before."""
    import sympy

    sigma = np.linspace(4, 20, 50)
    s = sweep(lorenz, "l1", {"sigma": sigma}, values={"b": "8/3"}, progress=False)
    expr = lorenz.l1.xreplace({lorenz.model.symbols["b"]: sympy.Rational(8, 3)})
    ref = sympy.lambdify([lorenz.model.symbols["sigma"]], expr, "numpy")(sigma)
    np.testing.assert_allclose(s.values, ref, rtol=1e-12)

    assert s.sampled_points == 12 and s.sampled_error < 1e-12


def test_sweep_warns_where_float64_cancels(lorenz):
    """An expression that cancels in float64, (sigma + 10^8)^2 - sigma^2 -
    2 10^8 sigma - 10^16 + 1 (exactly 1), is caught by the 30-digit spot check
    (mpmath: reference library) with a PrecisionWarning and a sampled error
    far above 1e-6."""
    import sympy
    from criticality.errors import PrecisionWarning

    sig = lorenz.model.symbols["sigma"]
    big = sympy.Integer(10) ** 8
    expr = (sig + big) ** 2 - sig ** 2 - 2 * big * sig - big ** 2 + 1
    with pytest.warns(PrecisionWarning, match="lost digits"):
        s = sweep(lorenz, expr,
                  {"sigma": np.linspace(4.1, 20.3, 40)}, values={"b": "8/3"}, progress=False)
    assert s.sampled_error > 1e-6


def _models(tmp_path):
    good = tmp_path / "good.toml"
    good.write_text('states = ["x", "y"]\nbifurcation_parameter = "mu"\n'
                    '[parameters]\nmu = "real"\n[equations]\nx = "mu*x - y - x^3"\n'
                    'y = "x + mu*y - y^3"\n[equilibrium]\nx = "0"\ny = "0"\n')
    bad = tmp_path / "bad.toml"
    bad.write_text('states = ["x", "y"]\nbifurcation_parameter = "mu"\n'
                   '[parameters]\nmu = "real"\n[equations]\nx = "mu*x"\ny = "-y"\n'
                   '[equilibrium]\nx = "0"\ny = "0"\n')
    return [good, bad]


def test_analyse_many_records_failures(tmp_path):
    """One JSON per model that succeeds, a summary row per model, and the
    failing model recorded with its error instead of stopping the batch."""
    out = tmp_path / "out"
    out.mkdir()
    summary = analyse_many(_models(tmp_path) + [tmp_path / "missing.toml"], out_dir=out)
    assert [r.status for r in summary.rows] == ["ok", "failed", "failed"]
    assert summary.rows[0].classification == "supercritical"
    assert "NoHopfPointError" in summary.rows[1].error
    assert "cannot read" in summary.rows[2].error
    assert (out / "good.json").exists() and not (out / "bad.json").exists()
    assert (out / "summary.csv").read_text().count("\n") == 4


@pytest.mark.slow
def test_cli_curve_and_batch(tmp_path, capsys):
    """The curve and batch subcommands run the library and write their files."""
    model = tmp_path / "fhn.toml"
    model.write_text('states = ["v", "w"]\nbifurcation_parameter = "I"\n'
                     '[parameters]\nI = "real"\neps = "positive"\n[equations]\n'
                     'v = "v - v^3/3 - w + I"\nw = "eps*(v + 6/10 - w/2)"\n')
    csv_path, png = tmp_path / "c.csv", tmp_path / "c.png"
    code = main(["curve", str(model), "--along", "eps=0.05:0.3:6", "--guess",
                 "v=-0.987,w=-0.77,I=-0.098", "--csv", str(csv_path), "--plot", str(png), "-q"])
    assert code == 0
    assert csv_path.read_text().count("\n") == 7 and png.stat().st_size > 1000
    out = tmp_path / "out"
    out.mkdir()
    code = main(["batch", *map(str, _models(tmp_path)), "--out-dir", str(out), "-q"])
    assert code == 1 and (out / "summary.csv").exists()


@pytest.fixture(scope="module")
def cluster():
    """A LocalCluster of two worker processes (closed after the module)."""
    distributed = pytest.importorskip("distributed")
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                  dashboard_address=None) as lc:
        with distributed.Client(lc) as client:
            yield client


@pytest.mark.slow
def test_cluster_runs_equal_serial_runs(cluster, tmp_path, lorenz):
    """Sweep, Hopf curve and batch analysis on two worker processes give
    exactly the serial results."""
    sigma, b = np.meshgrid(np.linspace(4, 20, 300), np.linspace(1, 4, 300))
    serial = sweep(lorenz, "l1", {"sigma": sigma, "b": b}, progress=False)
    spread = sweep(lorenz, "l1", {"sigma": sigma, "b": b}, progress=False, scheduler=cluster)
    np.testing.assert_array_equal(serial.values, spread.values)
    np.testing.assert_array_equal(serial.admissible, spread.admissible)
    eps = np.linspace(0.05, 0.4, 12)
    one, two = _fhn_curve(eps), _fhn_curve(eps, scheduler=cluster)
    np.testing.assert_array_equal(one.l1, two.l1)
    np.testing.assert_array_equal(one.critical_value, two.critical_value)
    assert one.verdict == two.verdict
    paths = _models(tmp_path)
    assert analyse_many(paths) == analyse_many(paths, scheduler=cluster)
