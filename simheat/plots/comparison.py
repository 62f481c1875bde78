"""Schemes side by side: one warm-up panel per scheme on shared axes."""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np
from matplotlib.figure import Figure
from matplotlib.lines import Line2D

from simheat.plots._style import (
    GRID_STYLE,
    NEUTRAL_COLOUR,
    SETPOINT_COLOUR,
    clock_axis,
    room_style,
)
from simheat.runs.run import Run

PANEL_SIZE_IN = (5.0, 3.6)  # size of one scheme's panel [in]
MAX_COLUMNS = 3  # panels per row before wrapping
MARK_COLOUR = NEUTRAL_COLOUR  # grey: comfort start and "all rooms" marks


def plot_scheme_comparison(runs: Sequence[Run]) -> Figure:
    """Small multiples: each room's air temperature under each scheme.

    One panel per run (scheme), all on the same clock-time and temperature axes;
    in each panel one line per room in that room's colour and line style (the
    same in every panel), each setpoint value as a thin dashed grey line (rooms
    share setpoints), and a grey vertical line at the time every room has
    reached setpoint (the panel title says when, or how many rooms never do). The
    legend lists that line only when some panel has it.

    Parameters
    ----------
    runs : sequence of Run
        Runs of the same scenario under different schemes. [-]

    Returns
    -------
    matplotlib.figure.Figure
        The figure; panel axes carry the gid ``"panel:<scheme>"`` and room lines
        ``"air:<scheme>:<room id>"``, setpoint lines ``"setpoint:<scheme>:<value>"``,
        all-rooms lines ``"all_rooms:<scheme>"``.

    Raises
    ------
    ValueError
        When ``runs`` is empty.

    Notes
    -----
    Built without pyplot; write it with :func:`simheat.plots.save_figure`.
    """
    if not runs:
        raise ValueError("runs: give at least one run to plot")
    n = len(runs)
    columns = min(n, MAX_COLUMNS)
    rows = math.ceil(n / columns)
    fig = Figure(
        figsize=(PANEL_SIZE_IN[0] * columns, PANEL_SIZE_IN[1] * rows + 1.0),
        layout="constrained",
    )
    axes = fig.subplots(rows, columns, sharex=True, sharey=True, squeeze=False)
    scenario = runs[0].scenario
    comfort_start_s = scenario.schedule.comfort_start_s
    any_all_rooms = False
    for k, run in enumerate(runs):
        ax = axes[k // columns][k % columns]
        ax.set_gid(f"panel:{run.scheme}")
        time_h = np.asarray(run.time_s) / 3600.0
        end_h = float(time_h[-1])
        for r, room in enumerate(run.scenario.rooms):
            colour, style = room_style(r)
            ax.plot(
                time_h, run.air_temp_C[:, r], color=colour, linestyle=style,
                linewidth=1.5, gid=f"air:{run.scheme}:{room.id}",
            )  # fmt: skip
        for setpoint_C in sorted({room.setpoint_C for room in run.scenario.rooms}):
            ax.plot(
                [comfort_start_s / 3600.0, end_h], [setpoint_C] * 2,
                color=SETPOINT_COLOUR, linestyle="--", linewidth=0.7,
                gid=f"setpoint:{run.scheme}:{setpoint_C:g}",
            )  # fmt: skip
        times = [r.time_to_setpoint_s for r in run.summary.rooms]
        if times and all(t is not None for t in times):
            all_h = (comfort_start_s + max(times)) / 3600.0
            ax.axvline(
                all_h, color=MARK_COLOUR, linewidth=1.0, gid=f"all_rooms:{run.scheme}"
            )
            any_all_rooms = True
            status = f"all rooms at setpoint after {max(times) / 60.0:.0f} min"
        else:
            missing = sum(t is None for t in times)
            status = f"{missing} of {len(times)} rooms never reach setpoint"
        if comfort_start_s > 0.0:
            ax.axvline(
                comfort_start_s / 3600.0, color=MARK_COLOUR, linewidth=0.8,
                linestyle=":",
            )  # fmt: skip
        ax.set_title(f"{run.scheme.replace('_', ' ')}\n{status}", fontsize=10)
        ax.grid(True, **GRID_STYLE)
        ax.set_xlim(float(time_h[0]), end_h)
        clock_axis(ax, run)
        ax.set_xlabel("")
    for k in range(n, rows * columns):
        axes[k // columns][k % columns].set_visible(False)
    for row in axes:
        row[0].set_ylabel("Air temperature [°C]")
    for k in range(columns):
        bottom = min(rows - 1, (n - 1 - k) // columns)
        axes[bottom][k].set_xlabel("Clock time")
        axes[bottom][k].xaxis.set_tick_params(labelbottom=True)
    handles = []
    for r, room in enumerate(scenario.rooms):
        colour, style = room_style(r)
        handles.append(
            Line2D(
                [], [], color=colour, linestyle=style, linewidth=1.5, label=room.name
            )
        )
    handles.append(
        Line2D(
            [], [], color=SETPOINT_COLOUR, linestyle="--", linewidth=0.7,
            label="Setpoint",
        )
    )  # fmt: skip
    if any_all_rooms:
        handles.append(
            Line2D(
                [], [], color=MARK_COLOUR, linewidth=1.0, label="All rooms at setpoint"
            )
        )
    fig.legend(handles=handles, loc="outside lower center", ncol=4, fontsize=8,
               frameon=False)  # fmt: skip
    fig.suptitle(f"{scenario.name}\nwarm-up by piping scheme")
    return fig
