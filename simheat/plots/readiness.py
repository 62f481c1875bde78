"""Low-temperature readiness figure: radiator output as % of load against flow."""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from simheat.plots._style import (
    GRID_STYLE,
    NEUTRAL_COLOUR,
    SETPOINT_COLOUR,
    new_axes,
    room_style,
)

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

    from simheat.analysis.readiness import Readiness

# The y axis shows up to this share of the load, so 100 % sits mid-height. [%]
TOP_PERCENT = 200.0
# Line widths of a radiator's curve, and of one that sets the lowest flow
# temperature. [pt]
LINE_WIDTH = 1.4
LIMITING_WIDTH = 2.6


def _same_curves(percent: np.ndarray) -> list[list[int]]:
    """Rows grouped where their curves coincide (drawn once, labelled by all).

    Radiators of one room with the same exponent take shares in proportion to
    their nominal outputs, so their curves are the same line; drawn apart, the
    later would hide the earlier.

    Parameters
    ----------
    percent : ndarray, shape (n_radiators, n)
        Output over share per radiator; NaN where undefined. [%]

    Returns
    -------
    list of list of int
        Row indices per drawn line, in the order of their first row.
    """
    groups: list[list[int]] = []
    for i, row in enumerate(percent):
        for group in groups:
            if np.allclose(percent[group[0]], row, rtol=1e-9, atol=0.0, equal_nan=True):
                group.append(i)
                break
        else:
            groups.append([i])
    return groups


def plot_readiness(result: Readiness, ax: Axes | None = None) -> Figure:
    """Each radiator's output as a share of its load against the flow temperature.

    One line per radiator (its output on the result's basis, the design drop
    kept or a fixed return, its room at setpoint, over its share of the room's
    design load; one line for radiators whose curves coincide), the load at
    100 % as a grey line, the target flow temperatures dotted, and the house's
    lowest flow temperature marked, the radiators that set it drawn thick.

    Parameters
    ----------
    result : Readiness
        What :func:`simheat.analysis.readiness.readiness` found. [-]
    ax : matplotlib.axes.Axes, optional
        Axes to draw into; a new figure is made when omitted. [-]

    Returns
    -------
    matplotlib.figure.Figure
        The figure. Radiator lines carry the gid ``"radiator:<id>"`` (ids
        joined by commas where radiators share one curve, as those of one room
        with the same exponent do), drawn thick for the radiators that set the
        lowest flow temperature; the load line ``"load"``, the targets
        ``"target:<°C>"`` and the lowest flow temperature ``"lowest"``.
    """
    fig, ax = new_axes(ax)
    curves = result.curves
    limiting = set(result.limiting)
    for n, rows in enumerate(_same_curves(curves.percent_of_share)):
        colour, style = room_style(n)
        ids = [curves.ids[i] for i in rows]
        ax.plot(
            curves.flow_temp_C, curves.percent_of_share[rows[0]], color=colour,
            linestyle=style,
            linewidth=LIMITING_WIDTH if limiting & set(ids) else LINE_WIDTH,
            label=", ".join(ids), gid="radiator:" + ",".join(ids),
        )  # fmt: skip
    ax.axhline(
        100.0, color=NEUTRAL_COLOUR, linewidth=1.2, label="Load (its share)", gid="load"
    )
    for target in result.targets_C:
        ax.axvline(
            target, color=NEUTRAL_COLOUR, linewidth=0.8, linestyle=":",
            gid=f"target:{target:g}",
        )  # fmt: skip
        ax.annotate(
            f"{target:g} °C", xy=(target, 1.0), xycoords=("data", "axes fraction"),
            xytext=(2, -10), textcoords="offset points", fontsize=8,
            color=NEUTRAL_COLOUR,
        )  # fmt: skip
    lowest = result.lowest_flow_temp_C
    if lowest is not None and curves.flow_temp_C[0] <= lowest <= curves.flow_temp_C[-1]:
        ax.axvline(
            lowest, color=SETPOINT_COLOUR, linewidth=1.4, linestyle="--",
            label=f"Lowest flow temperature {lowest:.1f} °C (thick: set by)",
            gid="lowest",
        )  # fmt: skip
    basis = result.basis
    rule = (
        f"return = flow - {basis.drop_K:g} K"
        if basis.drop_K is not None
        else f"return {basis.return_C:g} °C"
    )
    ax.set_xlim(float(curves.flow_temp_C[0]), float(curves.flow_temp_C[-1]))
    top = (
        np.nanmax(curves.percent_of_share)
        if np.isfinite(curves.percent_of_share).any()
        else 0
    )
    ax.set_ylim(0.0, max(TOP_PERCENT, min(float(top), 400.0)) * 1.02)
    ax.set_xlabel("Flow temperature [°C]")
    ax.set_ylabel("Radiator output [% of its share of the room load]")
    ax.set_title(
        f"{result.scenario_name}: radiator output against flow temperature "
        f"({rule}, rooms at setpoint, EN 442)",
        fontsize=10,
    )
    ax.grid(True, **GRID_STYLE)
    ax.legend(
        loc="upper center", bbox_to_anchor=(0.5, -0.12), ncol=5, fontsize=8,
        frameon=False,
    )  # fmt: skip
    return fig
