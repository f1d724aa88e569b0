"""Plots speak the model's language: axis labels from the descriptions and
units, infeasible equilibria shaded apart, titles in math, save_figure
takes every plot object."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from criticality import Model, hopf
from criticality.checks.plane import feasibility_grid
from criticality.errors import ParameterError
from criticality.outputs.plots import axis_label, plot_amplitude, plot_parameter_plane, save_figure

pytest.importorskip("matplotlib")

EXAMPLE = Path(__file__).resolve().parent.parent / "examples" / "plankton_grazer.toml"


@pytest.fixture(scope="module")
def plankton():
    return hopf(Model.from_file(EXAMPLE))


def test_units_are_read_and_written(plankton):
    """The optional unit key (parameters) and the units table (states) are
    read, written back by to_toml, and appear in the JSON."""
    import json

    m = plankton.model
    assert m.parameter("v").unit == "1/day" and m.state_units == {"P": "ug C/l", "Z": "ug C/l"}
    assert Model.from_text(m.to_toml()).state_units == m.state_units
    doc = json.loads(plankton.to_json())
    assert doc["model"]["state_units"]["P"] == "ug C/l"
    assert {p["name"]: p["unit"] for p in doc["model"]["parameters"]}["v"] == "1/day"


def test_a_unit_for_an_unknown_state_is_refused():
    """A units entry naming no state is an error naming it."""
    text = EXAMPLE.read_text().replace('P = "ug C/l"\nZ', 'Pz = "ug C/l"\nZ')
    with pytest.raises(Exception, match="'Pz' is not a state"):
        Model.from_text(text)


def test_labels_from_descriptions_and_title_in_math(plankton):
    """Axes carry the description, the name in math and the unit; the title
    is mathtext."""
    d = plot_parameter_plane(plankton, "m", "v", values={}, x_range=(0.02, 0.4),
                             y_range=(0.0, 1.0), shade_points=40, points=80,
                             feasible="nonnegative")
    assert d.ax.get_xlabel() == "copepod mortality $m$ [1/day]"
    assert d.ax.get_ylabel() == "sinking loss rate $v$ [1/day]"
    assert "$" in d.ax.get_title() and "\\mathrm{c}" in d.ax.get_title()
    assert axis_label(plankton.model, "P") == "$P$ [ug C/l]"


def test_infeasible_region_is_shaded_apart_and_never_stable(plankton):
    """Where the coexistence state has P < 0 (m > e g: Rosenzweig-MacArthur
    type grazing, common practice, no source) the plane is marked not
    feasible, and no point there is shaded stable."""
    window = dict(values={}, x_range=(0.02, 0.4), y_range=(0.0, 1.0))
    X, Y, ok = feasibility_grid(plankton, "m", "v", feasible="nonnegative", points=40, **window)
    e, g = 0.3, 0.8
    assert not ok[X > e * g + 0.01].any()
    d = plot_parameter_plane(plankton, "m", "v", shade_points=40, points=80,
                             feasible="nonnegative", **window)
    assert "equilibrium not feasible" in d.artists
    with pytest.raises(ParameterError, match="not a state"):
        feasibility_grid(plankton, "m", "v", feasible={"Q": "positive"}, **window)


@pytest.mark.slow
def test_save_figure_takes_every_plot_object(plankton, tmp_path):
    """save_figure accepts a PlaneDiagram, an AmplitudePlot, an Axes and a Figure."""
    d = plot_parameter_plane(plankton, "m", "v", values={}, x_range=(0.02, 0.2),
                             y_range=(0.0, 1.0), shade=False, points=40)
    a = plot_amplitude(plankton, {"v": 0.1}, figsize=(3, 2), dpi=40)
    for k, thing in enumerate((d, a, d.ax, a.figure)):
        path = tmp_path / f"plot{k}.png"
        assert save_figure(thing, path) == str(path) and path.stat().st_size > 0
    with pytest.raises(ParameterError, match="save_figure needs a figure"):
        save_figure(object(), tmp_path / "x.png")
    assert np.all(np.isfinite(a.mu))
