"""Emitter flows figure: time-mean flow during comfort against design flow."""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from simheat.analysis.flows import STARVING_FRACTION
from simheat.plots._style import (
    ACCENT_COLOUR,
    GRID_STYLE,
    NEUTRAL_COLOUR,
    WARNING_COLOUR,
    new_axes,
    scheme_title,
)

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

    from simheat.runs.run import Run

KG_S_TO_KG_H = 3600.0  # [s/h]
BAR_WIDTH = 0.6  # share of an emitter's slot taken by its bar [-]


def route_order(run: Run) -> list[int]:
    """Emitter indices in route order: floor by floor, tee by tee from the plant.

    Parameters
    ----------
    run : Run
        The run. [-]

    Returns
    -------
    list of int
        Indices into ``run.scenario.emitters`` (and ``run.summary.emitters``).
    """
    return [tee.emitter for floor in run.scenario.route.floors for tee in floor.tees]


def plot_flows(run: Run, ax: Axes | None = None) -> Figure:
    """Plot each emitter's mean flow during comfort against its design flow.

    One bar per emitter in route order (from the plant along each floor's header,
    floor by floor) of its time-mean mass flow during comfort; a black tick at its
    design flow and a grey tick at :data:`~simheat.analysis.flows.STARVING_FRACTION`
    of it. Bars below that mark are drawn hatched in the warning colour and the
    share of design is written above every bar.

    Parameters
    ----------
    run : Run
        A simulated run. [-]
    ax : matplotlib.axes.Axes, optional
        Axes to draw into; a new figure is made when omitted. [-]

    Returns
    -------
    matplotlib.figure.Figure
        The figure. Bars carry the gid ``"flow:<emitter id>"``, design ticks
        ``"design:<emitter id>"``; heights are in kg/h.

    Notes
    -----
    Design flows are those of the run summary (the room's design heat load shared
    among its radiators by nominal output, carried at the design temperature drop).
    """
    own_figure = ax is None
    fig, ax = new_axes(ax)
    order = route_order(run)
    emitters = [run.summary.emitters[i] for i in order]
    x = np.arange(len(order), dtype=float)
    half = BAR_WIDTH / 2.0
    for xi, result in zip(x, emitters, strict=True):
        mean_kg_h = result.mean_flow_kg_s * KG_S_TO_KG_H
        design_kg_h = result.design_flow_kg_s * KG_S_TO_KG_H
        starving = result.mean_flow_kg_s < STARVING_FRACTION * result.design_flow_kg_s
        ax.bar(
            xi, mean_kg_h, width=BAR_WIDTH,
            color=WARNING_COLOUR if starving else ACCENT_COLOUR,
            hatch="//" if starving else None, edgecolor="white", linewidth=0.5,
            gid=f"flow:{result.id}",
        )  # fmt: skip
        ax.plot(
            [xi - half, xi + half], [design_kg_h, design_kg_h], color="black",
            linewidth=2.0, solid_capstyle="butt", gid=f"design:{result.id}",
        )  # fmt: skip
        ax.plot(
            [xi - half, xi + half], [STARVING_FRACTION * design_kg_h] * 2,
            color=NEUTRAL_COLOUR, linewidth=1.2, linestyle=(0, (2, 1)),
            gid=f"limit:{result.id}",
        )  # fmt: skip
        share = (
            f"{100.0 * result.mean_flow_kg_s / result.design_flow_kg_s:.0f} %"
            if result.design_flow_kg_s > 0.0
            else "closed"  # shut for good: no design flow
        )
        ax.annotate(
            share, xy=(xi, max(mean_kg_h, design_kg_h)), xytext=(0, 3),
            textcoords="offset points", ha="center", va="bottom", fontsize=8,
            fontweight="bold" if starving else "normal", gid=f"share:{result.id}",
        )  # fmt: skip

    _mark_floors(ax, run)
    ax.set_xticks(x, [e.id for e in emitters], rotation=45, ha="right")
    ax.set_xlim(-0.6, len(order) - 0.4)
    ax.set_ylim(0.0, None)
    ax.margins(y=0.12)
    ax.set_xlabel("Emitter, in route order from the plant")
    ax.set_ylabel("Mass flow [kg/h]")
    ax.grid(True, axis="y", **GRID_STYLE)
    ax.set_title(
        scheme_title(run, "mean emitter flow during comfort vs design"), pad=16
    )

    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch

    pct = f"{100.0 * STARVING_FRACTION:.0f} %"
    handles = [
        Patch(facecolor=ACCENT_COLOUR, label=f"Mean flow, at least {pct} of design"),
        Patch(
            facecolor=WARNING_COLOUR,
            hatch="//",
            edgecolor="white",
            label=f"Mean flow, below {pct} of design (starving)",
        ),  # fmt: skip
        Line2D([], [], color="black", linewidth=2.0, label="Design flow"),
        Line2D(
            [],
            [],
            color=NEUTRAL_COLOUR,
            linewidth=1.2,
            linestyle=(0, (2, 1)),
            label=f"{pct} of design flow",
        ),  # fmt: skip
    ]
    if own_figure:  # below everything, whatever the length of the emitter ids
        fig.legend(
            handles=handles, loc="outside lower center", ncol=2, fontsize=8,
            frameon=False,
        )  # fmt: skip
    else:
        ax.legend(handles=handles, loc="upper right", fontsize=8)
    return fig


def _mark_floors(ax: Axes, run: Run) -> None:
    """Separate and name the floors when the route has more than one."""
    floors = run.scenario.route.floors
    if len(floors) < 2:
        return
    start = 0
    for floor in floors:
        end = start + len(floor.tees)
        if start > 0:
            ax.axvline(start - 0.5, color=NEUTRAL_COLOUR, linewidth=0.8)
        ax.annotate(
            f"floor {floor.floor}", xy=((start + end - 1) / 2.0, 1.0),
            xycoords=("data", "axes fraction"), xytext=(0, 3),
            textcoords="offset points", ha="center", va="bottom", fontsize=8,
            color=NEUTRAL_COLOUR, gid=f"floor:{floor.floor}",
        )  # fmt: skip
        start = end
