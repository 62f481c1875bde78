"""Warm-up figure: room air temperatures against time, setpoints, arrival times."""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from simheat.plots._style import (
    FIGURE_SIZE_IN,
    GRID_STYLE,
    NEUTRAL_COLOUR,
    SETPOINT_COLOUR,
    clock_axis,
    mark_comfort_start,
    minus_sign,
    room_style,
)

if TYPE_CHECKING:  # matplotlib is imported on first plot, not with the package
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

    from simheat.runs.run import RoomResult, Run

OUTDOOR_COLOUR = NEUTRAL_COLOUR
# Outdoor temperature spread below which it is written in the title rather than
# drawn on a second axis. [K]
CONSTANT_OUTDOOR_SPREAD_K = 0.05

__all__ = ["plot_warmup", "room_legend_label"]


def plot_warmup(run: Run, ax: Axes | None = None) -> Figure:
    """Plot each room's air temperature during warm-up against its setpoint.

    One line per room of air temperature; one thin dashed grey line per setpoint
    value from the start of comfort (rooms share setpoints, so the lines take no
    room's colour); a dot where a room reached its setpoint. The x axis reads
    clock time. What each room did is written in the legend, not on the curves,
    so no two labels can collide: ``"Living room, 21 °C: 42 min"`` (minutes after
    the start of comfort) or ``"Bathroom, 24 °C: not reached (22.9 °C)"`` (the
    air temperature at the end). The outdoor temperature is in the title when it
    is constant, on a second axis when it varies.

    Parameters
    ----------
    run : Run
        A simulated run. [-]
    ax : matplotlib.axes.Axes, optional
        Axes to draw into; a new figure is made when omitted. [-]

    Returns
    -------
    matplotlib.figure.Figure
        The figure holding the axes. Room air lines carry the gid ``"air:<room
        id>"`` (x in hours since the start), setpoint lines
        ``"setpoint:<value>"``, dots ``"reached:<room id>"``.

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
    for r, (room, result) in enumerate(
        zip(scenario.rooms, run.summary.rooms, strict=True)
    ):
        colour, style = room_style(r)
        air_C = run.air_temp_C[:, r]
        (line,) = ax.plot(
            time_h, air_C, color=colour, linestyle=style, linewidth=1.8,
            label=room_legend_label(room.name, result), gid=f"air:{room.id}",
        )  # fmt: skip
        handles.append(line)
        if result.time_to_setpoint_s is not None:
            reached_s = comfort_start_s + result.time_to_setpoint_s
            ax.plot(
                [reached_s / 3600.0], [float(np.interp(reached_s, run.time_s, air_C))],
                marker="o", markersize=5, color=colour, linestyle="none",
                gid=f"reached:{room.id}",
            )  # fmt: skip
    for setpoint_C in sorted({room.setpoint_C for room in scenario.rooms}):
        ax.plot(
            [comfort_start_h, end_h], [setpoint_C, setpoint_C],
            color=SETPOINT_COLOUR, linestyle="--", linewidth=0.8, zorder=1.5,
            gid=f"setpoint:{setpoint_C:g}",
        )  # fmt: skip

    mark_comfort_start(ax, run)
    ax.set_xlim(float(time_h[0]), end_h)
    clock_axis(ax, run)
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
        Line2D(
            [], [], color=SETPOINT_COLOUR, linestyle="--", linewidth=0.8,
            label="Setpoint (from comfort start)",
        )
    )  # fmt: skip
    handles.append(
        Line2D(
            [], [], color="0.3", marker="o", markersize=5, linestyle="none",
            label="Setpoint reached (minutes after comfort start)",
        )
    )  # fmt: skip
    ax.legend(
        handles=handles, loc="upper center", bbox_to_anchor=(0.5, -0.12),
        ncol=min(3, len(handles)), fontsize=8, frameon=False,
    )  # fmt: skip
    return fig


def room_legend_label(name: str, result: RoomResult) -> str:
    """Legend text of a room: name, setpoint and what it reached.

    Parameters
    ----------
    name : str
        The room's display name. [-]
    result : RoomResult
        Its warm-up result. [-]

    Returns
    -------
    str
        ``"<name>, <setpoint> °C: <minutes> min"`` when it reached its setpoint,
        else ``"<name>, <setpoint> °C: not reached (<final air> °C)"``.

    Examples
    --------
    >>> from simheat.runs.run import RoomResult
    >>> r = RoomResult("bath", 24.0, None, 22.94, None, 21.0, 0.0)
    >>> room_legend_label("Bathroom", r)
    'Bathroom, 24 °C: not reached (22.9 °C)'
    """
    head = f"{name}, {result.setpoint_C:g} °C"
    if result.time_to_setpoint_s is None:
        return minus_sign(f"{head}: not reached ({result.final_air_temp_C:.1f} °C)")
    return f"{head}: {result.time_to_setpoint_s / 60.0:.0f} min"
