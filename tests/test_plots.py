"""Parameter-plane diagrams, amplitude plots, image files and curve data.

Image files are checked as files (PNG signature and header dimensions, SVG
parsed as XML); curve data against closed forms from the literature or an
independent numeric Lyapunov coefficient.  Each check names its source;
"from memory" marks a value recalled rather than looked up.
"""

import csv
import struct
import xml.etree.ElementTree as ET

import numpy as np
import pytest
import sympy

from criticality import Model, hopf
from criticality.errors import MissingExtraError, OutputExistsError, ParameterError
from criticality.checks.plane import curve_data, stability_grid, write_curve_csv
from criticality.outputs.plots import plot_amplitude, plot_parameter_plane, save_figure
from criticality.checks.validation import validate

from reference_numeric import numeric_first_lyapunov


def _bautin_model():
    """Invented: a van der Pol-type pair whose damping shifts with a^2 and whose
    coupling a u w to a damped third state makes l1 change sign."""
    return Model(states=["u", "v", "w"],
                 equations={"u": "v - u*w", "v": "-u + (mu - a^2)*v - u^2*v + a*u*w",
                            "w": "-w + u^2"})


@pytest.fixture(scope="module")
def bautin():
    return hopf(_bautin_model(), "mu", equilibrium={"u": 0, "v": 0, "w": 0})


def _png_size(path):
    data = path.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n"
    assert data[12:16] == b"IHDR"
    return struct.unpack(">II", data[16:24])


def test_plane_png_and_svg_have_the_expected_size(lorenz, tmp_path):
    """A 5 x 4 inch figure at 80 dpi is a 400 x 320 PNG and a 360 x 288 pt SVG."""
    d = plot_parameter_plane(lorenz, "sigma", "r", values={"b": "8/3"}, x_range=(1, 30),
                             y_range=(0, 100), figsize=(5, 4), dpi=80, shade_points=60)
    png = tmp_path / "plane.png"
    svg = tmp_path / "plane.svg"
    assert save_figure(d.figure, png) == str(png)
    save_figure(d.figure, svg)
    assert _png_size(png) == (400, 320)
    root = ET.parse(svg).getroot()
    assert root.tag.endswith("svg")
    assert root.get("width").startswith("360") and root.get("height").startswith("288")
    assert d.ax.get_xlabel() == "sigma" and d.ax.get_ylabel() == "r"


@pytest.mark.slow
def test_files_are_not_overwritten_without_force(lorenz, tmp_path):
    d = plot_parameter_plane(lorenz, "sigma", "r", values={"b": "8/3"}, x_range=(4, 30),
                             y_range=(0, 100), shade=False, points=50)
    path = tmp_path / "plane.png"
    save_figure(d.figure, path)
    with pytest.raises(OutputExistsError):
        save_figure(d.figure, path)
    save_figure(d.figure, path, force=True)
    with pytest.raises(OutputExistsError):
        write_curve_csv(d.curve, path)
    with pytest.raises(ParameterError, match="image format"):
        save_figure(d.figure, tmp_path / "plane.bmp")
    assert [p.name for p in tmp_path.iterdir()] == ["plane.png"]  # no temporary files left


def test_lorenz_curve_csv_matches_the_published_closed_form(lorenz, tmp_path):
    """The CSV curve is r_H = sigma (sigma + b + 3) / (sigma - b - 1) (Strogatz,
    Nonlinear Dynamics and Chaos, 1994, Section 9.2, from memory) at every
    row, subcritical throughout at b = 8/3 (same source, from memory)."""
    c = curve_data(lorenz, "sigma", "r", values={"b": "8/3"}, x_range=(1, 30), y_range=(0, 100),
                   points=120)
    path = write_curve_csv(c, tmp_path / "curve.csv")
    rows = list(csv.DictReader(open(path)))
    assert len(rows) == np.count_nonzero(c.segment >= 0) > 50
    b = 8 / 3
    for row in rows:
        s = float(row["sigma"])
        assert s > b + 1
        assert float(row["r"]) == pytest.approx(s * (s + b + 3) / (s - b - 1), rel=1e-12)
        assert row["classification"] == "subcritical" and float(row["l1"]) > 0
    assert c.zeros == ()


def test_supercritical_and_subcritical_segments_and_the_zero_of_l1(bautin):
    """On the invented model l1 changes sign once along mu_c = a^2, at a = -8;
    an independent numeric Lyapunov coefficient (Kuznetsov 2004, Section 3.5,
    via tests/reference_numeric.py) changes sign there too."""
    d = plot_parameter_plane(bautin, "a", "mu", x_range=(-12, 4), y_range=(-5, 150),
                             shade_points=80)
    labels = list(d.artists)
    assert "supercritical (l1 < 0)" in labels and "subcritical (l1 > 0)" in labels
    assert "l1 = 0 (degenerate Hopf point)" in labels and "equilibrium stable" in labels
    (za, zmu), = d.curve.zeros
    assert za == pytest.approx(-8, abs=1e-9) and zmu == pytest.approx(64, abs=1e-7)
    m = _bautin_model()
    s = m.symbols
    signs = []
    for a in (sympy.Rational(-17, 2), sympy.Rational(-15, 2)):
        at = {s["a"]: a, s["mu"]: a * a, s["u"]: 0, s["v"]: 0, s["w"]: 0}
        _, l1, _ = numeric_first_lyapunov(m.equations, m.state_symbols, at)
        signs.append(l1 > 0)
    assert signs == [True, False]
    left = d.curve.l1[(d.curve.x < -8) & (d.curve.segment >= 0)]
    assert np.all(left > 0)
    legend = [t.get_text() for t in d.ax.get_legend().get_texts()]
    assert legend == labels


def test_drawing_on_a_given_axes(bautin):
    from matplotlib.figure import Figure

    fig = Figure()
    ax = fig.add_subplot()
    d = plot_parameter_plane(bautin, "mu", "a", x_range=(-5, 100), y_range=(-12, 4),
                             ax=ax, shade=False)
    assert d.ax is ax and d.figure is fig and d.stability is None
    assert d.curve.zeros[0] == pytest.approx((64, -8))
    assert len(ax.lines) >= 2


def test_level_set_when_neither_axis_is_the_bifurcation_parameter(lorenz):
    """With r fixed at 30, the curve in the (sigma, b) plane is where 30 is the
    critical value: sigma (sigma + b + 3) = 30 (sigma - b - 1) along it."""
    c = curve_data(lorenz, "sigma", "b", values={"r": 30}, x_range=(1, 30), y_range=(0.1, 5),
                   points=150)
    assert c.mode == "level set" and c.fixed["r"] == 30
    ok = c.segment >= 0
    s, b = c.x[ok], c.y[ok]
    assert ok.sum() > 50
    assert np.max(np.abs(s * (s + b + 3) / (s - b - 1) - 30)) < 1e-9
    with pytest.raises(ParameterError, match="bifurcation parameter"):
        curve_data(lorenz, "sigma", "b", values={}, x_range=(1, 30), y_range=(0.1, 5))


def test_closed_form_stability_agrees_with_eigenvalues(lorenz):
    """The shaded region from the transversality and the conditions agrees with
    the numeric eigenvalues of the Jacobian wherever both can tell."""
    kw = dict(values={"b": "8/3"}, x_range=(1, 30), y_range=(0, 100), points=60)
    closed = stability_grid(lorenz, "sigma", "r", **kw)
    eig = stability_grid(lorenz, "sigma", "r", method="eigenvalues", **kw)
    both = closed.known & eig.known
    assert both.mean() > 0.8
    assert np.mean(closed.stable[both] == eig.stable[both]) > 0.98
    with pytest.raises(ParameterError, match="stability method"):
        stability_grid(lorenz, "sigma", "r", method="guess", **kw)


def test_axis_errors(lorenz):
    with pytest.raises(ParameterError, match="different"):
        curve_data(lorenz, "sigma", "sigma", values={"b": 1})
    with pytest.raises(ParameterError, match="state"):
        curve_data(lorenz, "x", "r", values={"b": 1})
    with pytest.raises(ParameterError, match="low < high"):
        curve_data(lorenz, "sigma", "r", values={"b": 1}, x_range=(3, 2))


@pytest.mark.slow
def test_amplitude_plot_with_simulated_points(tmp_path):
    """The predicted sqrt law and the simulated points of a quick check on
    x' = y, y' = -x + mu y - x^2 y (amplitude 2 sqrt(mu); common practice,
    no source)."""
    m = Model(states=["x", "y"], equations={"x": "y", "y": "-x + mu*y - x^2*y"})
    r = hopf(m, "mu", equilibrium={"x": 0, "y": 0})
    rep = validate(r, offsets=[0.05])
    p = plot_amplitude(r, simulated=rep, figsize=(4, 3), dpi=50)
    assert np.allclose(p.predicted["x"], 2 * np.sqrt(p.mu))
    assert "x: simulated" in p.artists and "x: predicted stable cycle" in p.artists
    (pt,) = p.artists["x: simulated"]
    assert pt.get_ydata()[0] == pytest.approx(2 * np.sqrt(0.05), rel=1e-3)
    save_figure(p.figure, tmp_path / "amp.png")
    assert _png_size(tmp_path / "amp.png") == (200, 150)


def test_missing_matplotlib_names_the_extra(lorenz, hide_package):
    hide_package("matplotlib")
    with pytest.raises(MissingExtraError, match=r"criticality\[plot\]"):
        plot_parameter_plane(lorenz, "sigma", "r", values={"b": 1})
