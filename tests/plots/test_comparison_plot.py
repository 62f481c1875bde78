"""Small multiples of a comparison: shared setpoint lines, honest legend, clock."""

from __future__ import annotations

import dataclasses

from matplotlib.colors import to_hex

from simheat.plots.comparison import plot_scheme_comparison


def _legend_labels(fig):
    return [t.get_text() for t in fig.legends[0].get_texts()]


def _never_reached(run):
    rooms = tuple(
        dataclasses.replace(r, time_to_setpoint_s=None) if i == 0 else r
        for i, r in enumerate(run.summary.rooms)
    )
    return dataclasses.replace(
        run, summary=dataclasses.replace(run.summary, rooms=rooms)
    )


def _all_reached(run):
    rooms = tuple(
        dataclasses.replace(r, time_to_setpoint_s=600.0 * (i + 1))
        for i, r in enumerate(run.summary.rooms)
    )
    return dataclasses.replace(
        run, summary=dataclasses.replace(run.summary, rooms=rooms)
    )


def test_no_all_rooms_entry_when_no_scheme_gets_every_room_there(bungalow_runs):
    runs = [_never_reached(r) for r in bungalow_runs.values()]
    fig = plot_scheme_comparison(runs)
    assert "All rooms at setpoint" not in _legend_labels(fig)
    assert not [
        line
        for ax in fig.axes
        for line in ax.lines
        if str(line.get_gid()).startswith("all_rooms:")
    ]


def test_all_rooms_line_and_entry_when_one_scheme_gets_there(bungalow_runs):
    first, second = bungalow_runs.values()
    fig = plot_scheme_comparison([_all_reached(first), _never_reached(second)])
    assert "All rooms at setpoint" in _legend_labels(fig)
    marks = [
        line
        for ax in fig.axes
        for line in ax.lines
        if str(line.get_gid()).startswith("all_rooms:")
    ]
    assert [m.get_gid() for m in marks] == [f"all_rooms:{first.scheme}"]
    comfort_h = first.scenario.schedule.comfort_start_s / 3600.0
    last_h = comfort_h + 600.0 * len(first.summary.rooms) / 3600.0
    assert marks[0].get_xdata()[0] == last_h


def test_setpoints_are_grey_lines_one_per_value(bungalow_runs):
    run = next(iter(bungalow_runs.values()))
    fig = plot_scheme_comparison([run])
    ax = fig.axes[0]
    setpoints = [
        line for line in ax.lines if str(line.get_gid()).startswith("setpoint:")
    ]
    values = sorted({r.setpoint_C for r in run.scenario.rooms})
    assert [line.get_ydata()[0] for line in setpoints] == values
    room_colours = {
        to_hex(line.get_color())
        for line in ax.lines
        if str(line.get_gid()).startswith("air:")
    }
    assert all(to_hex(line.get_color()) not in room_colours for line in setpoints)


def test_panels_read_clock_time(bungalow_runs):
    fig = plot_scheme_comparison(list(bungalow_runs.values()))
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    FigureCanvasAgg(fig).draw()
    labels = [t.get_text() for t in fig.axes[0].get_xticklabels()]
    assert labels[0] == "05:00"  # the demo starts at 05:00
    assert fig.axes[0].get_xlabel() == "Clock time"
