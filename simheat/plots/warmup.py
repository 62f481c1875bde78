"""Warm-up figure: room air temperatures against time, setpoints, arrival times."""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from simheat.plots._style import (
    FIGURE_SIZE_IN,
    GRID_STYLE,
    NEUTRAL_COLOUR,
    mark_comfort_start,
    minus_sign,
    room_style,
)

if TYPE_CHECKING:  # matplotlib is imported on first plot, not with the package
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

    from simheat.runs.run import Run

OUTDOOR_COLOUR = NEUTRAL_COLOUR
# Outdoor temperature spread below which it is written in the title rather than
# drawn on a second axis. [K]
CONSTANT_OUTDOOR_SPREAD_K = 0.05
# Dots closer than this in time (and 0.5 K) get their labels stacked. [h]
LABEL_CLEARANCE_H = 0.4

__all__ = ["plot_warmup"]


def plot_warmup(run: Run, ax: Axes | None = None) -> Figure:
    """Plot each room's air temperature during warm-up against its setpoint.

    One solid line per room of air temperature, the room's setpoint as a thin dashed
    line of the same colour from the start of comfort, a dot where the room reached
    its setpoint with the minutes since the start of comfort written beside it (or
    "not reached" at the right edge), and the outdoor temperature in the title when
    it is constant or on a second axis when it varies.

    Parameters
    ----------
    run : Run
        A simulated run. [-]
    ax : matplotlib.axes.Axes, optional
        Axes to draw into; a new figure is made when omitted. [-]

    Returns
    -------
    matplotlib.figure.Figure
        The figure holding the axes. Room air lines carry the gid ``"air:<room id>"``,
        setpoint lines ``"setpoint:<room id>"``.

    Notes
    -----
    The figure is built without pyplot, so it works under any backend and never
    opens a window; write it with :func:`simheat.plots.save_figure`.
    """
    from matplotlib.figure import Figure
    from matplotlib.lines import Line2D

    if ax is None:
        fig = Figure(figsize=FIGURE_SIZE_IN, layout="constrained")
        ax = fig.add_subplot()
    else:
        fig = ax.figure
    scenario = run.scenario
    time_h = np.asarray(run.time_s) / 3600.0
    comfort_start_s = scenario.schedule.comfort_start_s
    comfort_start_h = comfort_start_s / 3600.0
    end_h = float(time_h[-1])

    handles = []
    placed: list[tuple[float, float]] = []  # (time [h], temperature [°C]) of dots
    for r, (room, result) in enumerate(
        zip(scenario.rooms, run.summary.rooms, strict=True)
    ):
        colour, style = room_style(r)
        air_C = run.air_temp_C[:, r]
        (line,) = ax.plot(
            time_h, air_C, color=colour, linestyle=style, linewidth=1.8,
            label=room.name, gid=f"air:{room.id}",
        )  # fmt: skip
        handles.append(line)
        ax.plot(
            [comfort_start_h, end_h], [room.setpoint_C, room.setpoint_C],
            color=colour, linestyle="--", linewidth=0.8, gid=f"setpoint:{room.id}",
        )  # fmt: skip
        if result.time_to_setpoint_s is None:
            ax.annotate(
                "not reached", xy=(end_h, float(air_C[-1])), xytext=(-3, 4),
                textcoords="offset points", ha="right", va="bottom",
                color=colour, fontsize=8,
            )  # fmt: skip
        else:
            reached_s = comfort_start_s + result.time_to_setpoint_s
            reached_h = reached_s / 3600.0
            reached_C = float(np.interp(reached_s, run.time_s, air_C))
            ax.plot(
                [reached_h], [reached_C], marker="o", markersize=5, color=colour,
                linestyle="none", gid=f"reached:{room.id}",
            )  # fmt: skip
            # Step the label down past labels already placed close by.
            crowding = sum(
                abs(reached_h - h) < LABEL_CLEARANCE_H and abs(reached_C - c) < 0.5
                for h, c in placed
            )
            placed.append((reached_h, reached_C))
            near_right_edge = reached_h > time_h[0] + 0.9 * (end_h - time_h[0])
            ax.annotate(
                f"{result.time_to_setpoint_s / 60.0:.0f} min",
                xy=(reached_h, reached_C),
                xytext=(-5 if near_right_edge else 5, -10 - 10 * crowding),
                textcoords="offset points", ha="right" if near_right_edge else "left",
                color=colour, fontsize=8,
            )  # fmt: skip

    mark_comfort_start(ax, run)
    ax.set_xlim(float(time_h[0]), end_h)
    ax.set_xlabel("Time since start [h]")
    ax.set_ylabel("Air temperature [°C]")
    ax.grid(True, **GRID_STYLE)

    title = f"{scenario.name}\nwarm-up, {run.scheme.replace('_', ' ')} scheme"
    outdoor_C = np.asarray(run.outdoor_temp_C)
    if np.ptp(outdoor_C) < CONSTANT_OUTDOOR_SPREAD_K:
        title += minus_sign(f", outdoor {float(outdoor_C[0]):.1f} °C")
    else:
        twin = ax.twinx()
        twin.plot(time_h, outdoor_C, color=OUTDOOR_COLOUR, linewidth=1.0, gid="outdoor")
        twin.set_ylabel("Outdoor temperature [°C]", color=OUTDOOR_COLOUR)
        twin.tick_params(axis="y", colors=OUTDOOR_COLOUR)
        handles.append(
            Line2D([], [], color=OUTDOOR_COLOUR, linewidth=1.0, label="Outdoor")
        )
    ax.set_title(title)

    handles.append(
        Line2D([], [], color="0.3", linestyle="--", linewidth=0.8, label="Setpoint")
    )
    handles.append(
        Line2D(
            [], [], color="0.3", marker="o", markersize=5, linestyle="none",
            label="Setpoint reached (minutes after comfort start)",
        )
    )  # fmt: skip
    ax.legend(
        handles=handles, loc="upper center", bbox_to_anchor=(0.5, -0.12),
        ncol=min(4, len(handles)), fontsize=8, frameon=False,
    )  # fmt: skip
    return fig
