"""Warm-up figure: renders for both demo schemes, labels, one line per room."""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.colors import to_hex
from matplotlib.figure import Figure

from simheat.plots import save_figure
from simheat.plots._style import PALETTE, room_style
from simheat.plots.warmup import plot_warmup, room_legend_label

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
    assert ax.get_xlabel() == "Clock time"
    assert ax.get_ylabel() == "Air temperature [°C]"


def test_x_axis_reads_clock_time_from_the_schedule(bungalow_runs):
    run = bungalow_runs["direct_return"]  # starts 05:00, runs 6 h
    fig = plot_warmup(run)
    FigureCanvasAgg(fig).draw()
    ax = fig.axes[0]
    labels = [t.get_text() for t in ax.get_xticklabels()]
    assert labels == [f"{h:02d}:00" for h in range(5, 12)]
    np.testing.assert_allclose(ax.get_xticks(), np.arange(0.0, 7.0))


def test_x_ticks_fall_on_whole_clock_hours_for_an_odd_start(bungalow_runs):
    run = bungalow_runs["direct_return"]
    schedule = dataclasses.replace(run.scenario.schedule, start_clock_s=5.5 * 3600.0)
    scenario = dataclasses.replace(run.scenario, schedule=schedule)
    fig = plot_warmup(dataclasses.replace(run, scenario=scenario))
    FigureCanvasAgg(fig).draw()
    ax = fig.axes[0]
    assert ax.get_xticks()[0] == pytest.approx(0.5)  # 06:00 is 0.5 h after 05:30
    assert ax.get_xticklabels()[0].get_text() == "06:00"


def test_title_names_scenario_scheme_and_outdoor_temperature(bungalow_runs):
    run = bungalow_runs["reverse_return"]
    title = plot_warmup(run).axes[0].get_title()
    assert run.scenario.name in title
    assert "reverse return" in title
    assert "\u221210.0 °C" in title  # the demo's constant -10 °C morning


@pytest.mark.parametrize("scheme", SCHEMES)
def test_one_air_line_per_room_and_one_grey_line_per_setpoint(bungalow_runs, scheme):
    run = bungalow_runs[scheme]
    ax = plot_warmup(run).axes[0]
    rooms = run.scenario.rooms
    air = lines_with_prefix(ax, "air:")
    setpoints = lines_with_prefix(ax, "setpoint:")
    assert [line.get_gid() for line in air] == [f"air:{r.id}" for r in rooms]
    values = sorted({r.setpoint_C for r in rooms})
    assert len(values) < len(rooms)  # the demo's rooms share setpoints
    assert [line.get_gid() for line in setpoints] == [f"setpoint:{v:g}" for v in values]
    room_colours = {to_hex(line.get_color()) for line in air}
    for line, value in zip(setpoints, values, strict=True):
        assert to_hex(line.get_color()) not in room_colours
        assert line.get_linestyle() == "--"
        np.testing.assert_array_equal(line.get_ydata(), [value] * 2)


def test_air_lines_plot_the_run_in_hours(bungalow_runs):
    run = bungalow_runs["direct_return"]
    ax = plot_warmup(run).axes[0]
    for r, line in enumerate(lines_with_prefix(ax, "air:")):
        np.testing.assert_allclose(line.get_xdata(), run.time_s / 3600.0, rtol=1e-15)
        np.testing.assert_array_equal(line.get_ydata(), run.air_temp_C[:, r])


def _legend_texts(ax):
    return [text.get_text() for text in ax.get_legend().get_texts()]


def test_legend_names_every_room_with_setpoint_and_minutes(bungalow_runs):
    run = bungalow_runs["direct_return"]
    ax = plot_warmup(run).axes[0]
    labels = _legend_texts(ax)
    dots = lines_with_prefix(ax, "reached:")
    reached = [r for r in run.summary.rooms if r.time_to_setpoint_s is not None]
    assert [d.get_gid() for d in dots] == [f"reached:{r.id}" for r in reached]
    for room, result in zip(run.scenario.rooms, run.summary.rooms, strict=True):
        assert room_legend_label(room.name, result) in labels
    for result in reached:
        minutes = f"{result.time_to_setpoint_s / 60.0:.0f} min"
        assert any(label.endswith(minutes) for label in labels)


def test_unreached_room_is_written_as_not_reached(bungalow_runs):
    run = bungalow_runs["direct_return"]
    rooms = list(run.summary.rooms)
    rooms[0] = dataclasses.replace(rooms[0], time_to_setpoint_s=None)
    summary = dataclasses.replace(run.summary, rooms=tuple(rooms))
    ax = plot_warmup(dataclasses.replace(run, summary=summary)).axes[0]
    name = run.scenario.rooms[0].name
    final = rooms[0].final_air_temp_C
    assert f"{name}, 21 °C: not reached ({final:.1f} °C)" in _legend_texts(ax)
    assert not lines_with_prefix(ax, f"reached:{rooms[0].id}")


def test_no_label_is_written_over_the_curves(bungalow_runs):
    # Times go in the legend below the axes: nothing inside the plot area can
    # collide ("not reached" used to sit on the minute labels).
    fig = plot_warmup(bungalow_runs["direct_return"])
    renderer = FigureCanvasAgg(fig).get_renderer()
    fig.draw(renderer)
    ax = fig.axes[0]
    assert len(ax.texts) == 0
    legend_box = ax.get_legend().get_window_extent(renderer)
    assert legend_box.y1 < ax.get_window_extent(renderer).y0


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
