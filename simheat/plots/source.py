"""Heat source figure: power and supply/return temperatures over the morning."""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from simheat.analysis.source import run_power_limit_time
from simheat.plots._style import (
    GRID_STYLE,
    RETURN_COLOUR,
    SUPPLY_COLOUR,
    WARNING_COLOUR,
    clock_axis,
    mark_comfort_start,
    new_axes,
    scheme_title,
)

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

    from simheat.runs.run import Run

POWER_COLOUR = "black"
LIMIT_COLOUR = WARNING_COLOUR  # the limit drawn over the power line, not under it
AT_LIMIT_ALPHA = 0.18  # shading of the time at the limit
W_PER_KW = 1000.0  # [W/kW]


def plot_source(run: Run, ax: Axes | None = None) -> Figure:
    """Plot the heat source's power and the supply and return temperatures.

    Source power (kW) on the left axis, the source's power limit dashed in the
    warning colour on top of it (so it stays visible where the power sits on
    it; a heat pump's capacity of the moment, from its rating table, as a line),
    the time at the limit shaded and given in the title
    (:func:`~simheat.analysis.source.power_limit_time`); supply and return
    temperatures (°C) on a second axis at the right, with the scenario's
    flow-temperature setpoint dotted. The x axis reads clock time.

    Parameters
    ----------
    run : Run
        A simulated run. [-]
    ax : matplotlib.axes.Axes, optional
        Axes to draw into (the power axis); a new figure is made when omitted. [-]

    Returns
    -------
    matplotlib.figure.Figure
        The figure. Lines carry the gids ``"source_power"``, ``"power_limit"``,
        ``"supply_temp"`` and ``"return_temp"``, shaded stretches at the limit
        ``"at_limit:<n>"``; the temperatures are on the figure's second axes.
    """
    fig, ax = new_axes(ax)
    time_h = np.asarray(run.time_s) / 3600.0
    power_kW = np.asarray(run.source_power_W) / W_PER_KW
    max_kW = run.scenario.source.max_power_W / W_PER_KW
    handles = []
    (line,) = ax.plot(
        time_h, power_kW, color=POWER_COLOUR, linewidth=1.8, label="Source power",
        gid="source_power", zorder=2,
    )  # fmt: skip
    handles.append(line)
    capacity = getattr(run, "source_capacity_W", None)
    if run.scenario.source.heat_pump is not None and capacity is not None:
        capacity_kW = np.asarray(capacity) / W_PER_KW
        max_kW = float(np.max(capacity_kW))
        (line,) = ax.plot(
            time_h, capacity_kW, color=LIMIT_COLOUR, linewidth=1.6,
            linestyle=(0, (5, 3)), zorder=3, gid="power_limit",
            label=f"Heat pump capacity {np.min(capacity_kW):.1f}-{max_kW:.1f} kW",
        )  # fmt: skip
        handles.append(line)
    else:
        handles.append(
            ax.axhline(
                max_kW, color=LIMIT_COLOUR, linewidth=1.6, linestyle=(0, (5, 3)),
                label=f"Power limit {max_kW:.1f} kW", gid="power_limit", zorder=3,
            )
        )  # fmt: skip
    limit = run_power_limit_time(run)
    for n, (start_s, end_s) in enumerate(limit.intervals_s):
        span = ax.axvspan(
            start_s / 3600.0, end_s / 3600.0, color=LIMIT_COLOUR,
            alpha=AT_LIMIT_ALPHA, linewidth=0, gid=f"at_limit:{n}",
            label="At the power limit",
        )  # fmt: skip
        if n == 0:
            handles.append(span)
    ax.set_ylim(0.0, 1.1 * max(max_kW, float(np.max(power_kW))))
    ax.set_xlim(float(time_h[0]), float(time_h[-1]))
    clock_axis(ax, run)
    ax.set_ylabel("Source power [kW]")
    ax.grid(True, **GRID_STYLE)
    mark_comfort_start(ax, run)

    twin = ax.twinx()
    (line,) = twin.plot(
        time_h, run.supply_temp_C, color=SUPPLY_COLOUR, linewidth=1.5,
        label="Supply temperature", gid="supply_temp",
    )  # fmt: skip
    handles.append(line)
    (line,) = twin.plot(
        time_h, run.return_temp_C, color=RETURN_COLOUR, linewidth=1.5,
        linestyle="--", label="Return temperature", gid="return_temp",
    )  # fmt: skip
    handles.append(line)
    source = run.scenario.source
    # Scheduled or weather-compensated flow temperatures vary: the dotted line is
    # then the highest setpoint the control asks for.
    fixed = getattr(source, "flow_control", "fixed") == "fixed"
    label = "Flow-temperature setpoint" if fixed else "Highest flow setpoint"
    handles.append(
        twin.axhline(
            source.flow_temp_C,
            color=SUPPLY_COLOUR,
            linewidth=0.8,
            linestyle=":",
            label=f"{label} {source.flow_temp_C:.0f} °C",
            gid="flow_setpoint",
        )  # fmt: skip
    )
    twin.set_ylabel("Water temperature [°C]")
    ax.set_title(scheme_title(run, "heat source") + "; " + limit_phrase(limit))
    ax.legend(
        handles=handles, loc="upper center", bbox_to_anchor=(0.5, -0.12), ncol=3,
        fontsize=8, frameon=False,
    )  # fmt: skip
    return fig


def limit_phrase(limit) -> str:
    """Title phrase of the time a source spent at its power limit.

    Parameters
    ----------
    limit : PowerLimitTime
        From :func:`~simheat.analysis.source.power_limit_time`. [-]

    Returns
    -------
    str
        ``"at its power limit 95 min (26 % of the run)"`` or ``"never at its
        power limit"``.

    Examples
    --------
    >>> from simheat.analysis.source import PowerLimitTime
    >>> limit_phrase(PowerLimitTime(9e3, ((600.0, 6300.0),), 21600.0))
    'at its power limit 95 min (26 % of the run)'
    """
    if not limit.intervals_s:
        return "never at its power limit"
    return (
        f"at its power limit {limit.total_s / 60.0:.0f} min "
        f"({100.0 * limit.share:.0f} % of the run)"
    )
