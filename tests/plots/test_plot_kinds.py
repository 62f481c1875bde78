"""Every figure kind renders for both demo houses under every scheme.

Also the pressure picture's numbers against the flow solver, for both houses.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from simheat.analysis.flows import steady_flow_split
from simheat.analysis.pressure import design_pressure_profile
from simheat.dynamics.simulate import simulate
from simheat.plots import PLOT_KIND_NAMES, save_figure
from simheat.plots.pressure import plot_pressure
from simheat.report.figures import RUN_FIGURES, run_figure
from simheat.scenario import load_scenario

SCENARIOS_DIR = Path(__file__).resolve().parents[2] / "scenarios"
HOUSES = ["bungalow", "two_storey"]
SCHEMES = ["direct_return", "reverse_return"]

# Axis labels each kind must show (x and y labels over all of its axes).
EXPECTED_LABELS = {
    "warmup": {"Clock time", "Air temperature [°C]"},
    "flows": {"Emitter, in route order from the plant", "Mass flow [kg/h]"},
    "pressure": {"Pipe distance from the plant [m]", "Pressure above pump inlet [kPa]"},
    "source": {"Clock time", "Source power [kW]", "Water temperature [°C]"},
    "energy": {"Clock time", "Cumulative energy [kWh]"},
}


@pytest.fixture(scope="module")
def two_storey_runs():
    """The two-storey demo simulated once for this module, ``{scheme: Run}``."""
    scenario = load_scenario(SCENARIOS_DIR / "two_storey.toml")
    return {scheme: simulate(scenario, scheme) for scheme in SCHEMES}


@pytest.fixture
def runs_of(bungalow_runs, two_storey_runs):
    return {"bungalow": bungalow_runs, "two_storey": two_storey_runs}


def axis_labels(fig):
    return {a.get_xlabel() for a in fig.axes} | {a.get_ylabel() for a in fig.axes}


def test_every_kind_has_its_expected_labels():
    assert set(PLOT_KIND_NAMES) == set(EXPECTED_LABELS)


def test_run_figures_follow_the_light_kind_registry():
    assert tuple(RUN_FIGURES) == PLOT_KIND_NAMES


def test_unknown_kind_is_refused_naming_the_known_ones(bungalow_runs):
    with pytest.raises(ValueError, match="unknown figure kind 'nope'; known: warmup"):
        run_figure(bungalow_runs["direct_return"], "nope")


@pytest.mark.parametrize("kind", sorted(PLOT_KIND_NAMES))
@pytest.mark.parametrize("scheme", SCHEMES)
@pytest.mark.parametrize("house", HOUSES)
def test_kind_renders_a_substantial_png(runs_of, tmp_path, house, scheme, kind):
    path = save_figure(run_figure(runs_of[house][scheme], kind), tmp_path / "f.png")
    assert path.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    # A 10 x 6 in canvas at 150 dpi with only axes and a title compresses to a few
    # kB; every kind here draws far more than that.
    assert path.stat().st_size > 10_000


@pytest.mark.parametrize("kind", sorted(PLOT_KIND_NAMES))
@pytest.mark.parametrize("scheme", SCHEMES)
@pytest.mark.parametrize("house", HOUSES)
def test_kind_shows_its_axis_labels(runs_of, house, scheme, kind):
    fig = run_figure(runs_of[house][scheme], kind)
    assert EXPECTED_LABELS[kind] <= axis_labels(fig)


@pytest.mark.parametrize("kind", sorted(PLOT_KIND_NAMES))
def test_kind_renders_to_svg(two_storey_runs, tmp_path, kind):
    fig = run_figure(two_storey_runs["direct_return"], kind)
    path = save_figure(fig, tmp_path / "f.svg")
    assert b"<svg" in path.read_bytes()[:2000]


def dp_bars_Pa(fig):
    """Available differential pressure per emitter id read off the bars. [Pa]."""
    bars = {}
    for ax in fig.axes:
        for line in ax.lines:
            gid = line.get_gid() or ""
            if gid.startswith("dp:"):
                low, high = line.get_ydata()
                bars[gid.removeprefix("dp:")] = (high - low) * 1000.0
    return bars


@pytest.mark.parametrize("scheme", SCHEMES)
@pytest.mark.parametrize("house", HOUSES)
def test_pressure_bars_equal_solver_tee_differentials(runs_of, house, scheme):
    run = runs_of[house][scheme]
    bars = dp_bars_Pa(plot_pressure(design_pressure_profile(run)))
    # The steady split rebuilds the network from the scenario and solves it with
    # every valve open at the design supply temperature, from_node - to_node.
    split = steady_flow_split(run.scenario, scheme)
    expected = {e.id: e.dp_available_Pa for e in split.emitters}
    assert bars.keys() == expected.keys()
    for emitter_id, dp_Pa in expected.items():
        assert bars[emitter_id] == pytest.approx(dp_Pa, rel=1e-9)


def segments(line):
    """(x0, y0, x1, y1) of each two-point piece of a NaN-separated line."""
    x, y = np.asarray(line.get_xdata()), np.asarray(line.get_ydata())
    pieces = []
    for start in range(0, len(x), 3):
        pieces.append((x[start], y[start], x[start + 1], y[start + 1]))
    return pieces


def lines_with_prefix(fig, prefix):
    return [
        line
        for ax in fig.axes
        for line in ax.lines
        if (line.get_gid() or "").startswith(prefix)
    ]


@pytest.mark.parametrize("house", HOUSES)
def test_supply_pressure_falls_away_from_the_plant_in_direct_return(runs_of, house):
    fig = plot_pressure(design_pressure_profile(runs_of[house]["direct_return"]))
    pieces = [p for line in lines_with_prefix(fig, "supply:") for p in segments(line)]
    assert pieces
    for x0, y0, x1, y1 in pieces:
        # Water flows away from the plant and loses pressure to friction.
        assert x1 > x0
        assert y1 < y0


@pytest.mark.parametrize("house", HOUSES)
def test_return_pressure_falls_towards_the_plant_in_direct_return(runs_of, house):
    fig = plot_pressure(design_pressure_profile(runs_of[house]["direct_return"]))
    pieces = [p for line in lines_with_prefix(fig, "return:") for p in segments(line)]
    assert pieces
    for x0, y0, x1, y1 in pieces:
        assert x1 < x0
        assert y1 < y0


@pytest.mark.parametrize("scheme", SCHEMES)
def test_two_storey_pressure_has_one_panel_per_floor(two_storey_runs, scheme):
    run = two_storey_runs[scheme]
    fig = plot_pressure(design_pressure_profile(run))
    floors = run.scenario.route.floors
    panels = [ax for ax in fig.axes if ax.get_ylabel()]
    assert len(panels) == len(floors) == 2
    for ax, floor in zip(panels, floors, strict=True):
        ids = {
            line.get_gid().removeprefix("dp:")
            for line in ax.lines
            if (line.get_gid() or "").startswith("dp:")
        }
        assert ids == {run.scenario.emitters[t.emitter].id for t in floor.tees}
        gids = {line.get_gid() for line in ax.lines}
        assert {f"supply:floor{floor.floor}", f"return:floor{floor.floor}"} <= gids
