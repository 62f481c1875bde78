"""Warm-up figure: renders for both demo schemes, labels, one line per room."""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
from matplotlib.figure import Figure

from simheat.plots import save_figure
from simheat.plots._style import PALETTE, room_style
from simheat.plots.warmup import plot_warmup

SCHEMES = ["direct_return", "reverse_return"]


def lines_with_prefix(ax, prefix):
    return [line for line in ax.lines if (line.get_gid() or "").startswith(prefix)]


@pytest.mark.parametrize("scheme", SCHEMES)
def test_figure_renders_to_a_substantial_png(bungalow_runs, tmp_path, scheme):
    path = save_figure(plot_warmup(bungalow_runs[scheme]), tmp_path / "warmup.png")
    assert path.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    # 8 rooms at 150 dpi: a blank canvas of this size compresses to a few kB.
    assert path.stat().st_size > 20_000


def test_figure_renders_to_svg(bungalow_runs, tmp_path):
    path = save_figure(plot_warmup(bungalow_runs["direct_return"]), tmp_path / "w.svg")
    assert b"<svg" in path.read_bytes()[:2000]


def test_save_figure_rejects_other_suffixes(bungalow_runs, tmp_path):
    fig = plot_warmup(bungalow_runs["direct_return"])
    with pytest.raises(ValueError, match=r"w\.pdf: figure suffix must be one of"):
        save_figure(fig, tmp_path / "w.pdf")


@pytest.mark.parametrize("scheme", SCHEMES)
def test_axis_labels(bungalow_runs, scheme):
    ax = plot_warmup(bungalow_runs[scheme]).axes[0]
    assert ax.get_xlabel() == "Time since start [h]"
    assert ax.get_ylabel() == "Air temperature [°C]"


def test_title_names_scenario_scheme_and_outdoor_temperature(bungalow_runs):
    run = bungalow_runs["reverse_return"]
    title = plot_warmup(run).axes[0].get_title()
    assert run.scenario.name in title
    assert "reverse return" in title
    assert "\u221210.0 °C" in title  # the demo's constant -10 °C morning


@pytest.mark.parametrize("scheme", SCHEMES)
def test_one_air_line_and_one_setpoint_line_per_room(bungalow_runs, scheme):
    run = bungalow_runs[scheme]
    ax = plot_warmup(run).axes[0]
    rooms = run.scenario.rooms
    air = lines_with_prefix(ax, "air:")
    setpoints = lines_with_prefix(ax, "setpoint:")
    assert [line.get_gid() for line in air] == [f"air:{r.id}" for r in rooms]
    assert [line.get_gid() for line in setpoints] == [f"setpoint:{r.id}" for r in rooms]
    for line, setpoint in zip(air, setpoints, strict=True):
        assert setpoint.get_color() == line.get_color()
        assert setpoint.get_linestyle() == "--"


def test_air_lines_plot_the_run_in_hours(bungalow_runs):
    run = bungalow_runs["direct_return"]
    ax = plot_warmup(run).axes[0]
    for r, line in enumerate(lines_with_prefix(ax, "air:")):
        np.testing.assert_allclose(line.get_xdata(), run.time_s / 3600.0, rtol=1e-15)
        np.testing.assert_array_equal(line.get_ydata(), run.air_temp_C[:, r])


def test_setpoint_lines_sit_at_each_rooms_setpoint(bungalow_runs):
    run = bungalow_runs["direct_return"]
    ax = plot_warmup(run).axes[0]
    setpoints = lines_with_prefix(ax, "setpoint:")
    for room, line in zip(run.scenario.rooms, setpoints, strict=True):
        np.testing.assert_array_equal(line.get_ydata(), [room.setpoint_C] * 2)


def test_legend_names_every_room(bungalow_runs):
    run = bungalow_runs["direct_return"]
    legend = plot_warmup(run).axes[0].get_legend()
    labels = [text.get_text() for text in legend.get_texts()]
    assert all(room.name in labels for room in run.scenario.rooms)


def test_reached_rooms_get_a_dot_and_their_minutes(bungalow_runs):
    run = bungalow_runs["direct_return"]
    ax = plot_warmup(run).axes[0]
    texts = [t.get_text() for t in ax.texts]
    dots = lines_with_prefix(ax, "reached:")
    reached = [r for r in run.summary.rooms if r.time_to_setpoint_s is not None]
    assert [d.get_gid() for d in dots] == [f"reached:{r.id}" for r in reached]
    for result in reached:
        assert f"{result.time_to_setpoint_s / 60.0:.0f} min" in texts


def test_unreached_room_is_written_as_not_reached(bungalow_runs):
    run = bungalow_runs["direct_return"]
    rooms = list(run.summary.rooms)
    rooms[0] = dataclasses.replace(rooms[0], time_to_setpoint_s=None)
    summary = dataclasses.replace(run.summary, rooms=tuple(rooms))
    ax = plot_warmup(dataclasses.replace(run, summary=summary)).axes[0]
    unreached = [r for r in rooms if r.time_to_setpoint_s is None]
    # one label per room that never got there, the one made so among them
    assert [t.get_text() for t in ax.texts].count("not reached") == len(unreached)
    assert not lines_with_prefix(ax, f"reached:{rooms[0].id}")


def test_varying_outdoor_temperature_goes_on_a_second_axis(bungalow_runs):
    run = bungalow_runs["direct_return"]
    outdoor = np.linspace(-10.0, -4.0, len(run.time_s))
    fig = plot_warmup(dataclasses.replace(run, outdoor_temp_C=outdoor))
    assert len(fig.axes) == 2
    (line,) = lines_with_prefix(fig.axes[1], "outdoor")
    np.testing.assert_array_equal(line.get_ydata(), outdoor)


def test_draws_into_given_axes(bungalow_runs):
    fig = Figure()
    ax = fig.add_subplot()
    assert plot_warmup(bungalow_runs["direct_return"], ax=ax) is fig
    assert len(lines_with_prefix(ax, "air:")) == 8


def test_rooms_past_the_palette_change_line_style():
    assert room_style(0) == (PALETTE[0], "-")
    assert room_style(len(PALETTE)) == (PALETTE[0], "-.")
    assert len({room_style(i) for i in range(3 * len(PALETTE))}) == 3 * len(PALETTE)
