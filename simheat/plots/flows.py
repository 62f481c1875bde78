"""Emitter flows figure: flow during comfort against design, starving judged at design.

The mean flow of a run is what the radiators got while their thermostatic heads
regulated; whether a radiator starves is judged at design conditions (heads
open, design supply temperature), as ``simheat flows`` does.
"""

from __future__ import annotations

import math
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

    from simheat.analysis.flows import FlowSplit
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


def _share(flow_kg_s: float, design_kg_s: float) -> float | None:
    """Flow as a share of design; None for an emitter shut for good (no design flow)."""
    return flow_kg_s / design_kg_s if design_kg_s > 0.0 else None


def share_text(share: float, mark: float = STARVING_FRACTION) -> str:
    """A flow's share of design as the figure writes it, never contradicting its flag.

    Whole percent, unless rounding would carry a share across the starving mark
    (:data:`~simheat.analysis.flows.STARVING_FRACTION`): then one decimal,
    rounded towards the side the share is on, so a hatched bar never reads
    "90 %".

    Parameters
    ----------
    share : float
        Flow as a share of design flow. [-]
    mark : float, optional
        The share below which it is flagged. [-]

    Returns
    -------
    str
        E.g. ``"87 %"`` or ``"89.9 %"``.

    Examples
    --------
    >>> share_text(0.874), share_text(0.8997), share_text(0.9004)
    ('87 %', '89.9 %', '90 %')
    >>> share_text(0.9996, mark=1.0)
    '99.9 %'
    """
    pct = 100.0 * share
    mark = 100.0 * mark
    whole = f"{pct:.0f} %"
    if (pct < mark) == (float(f"{pct:.0f}") < mark):
        return whole
    tenth = (
        math.floor(pct * 10.0) / 10.0 if pct < mark else math.ceil(pct * 10.0) / 10.0
    )
    return f"{tenth:.1f} %"


def plot_flows(
    run: Run, design: FlowSplit | None = None, ax: Axes | None = None
) -> Figure:
    """Plot each emitter's flow during comfort against its design flow.

    One bar per emitter in route order (from the plant along each floor's header,
    floor by floor) of its time-mean mass flow during comfort, while the
    thermostatic heads regulate: a room at its setpoint throttles its radiator,
    so a bar below design there is no fault. A black tick marks the design flow
    and a grey tick :data:`~simheat.analysis.flows.STARVING_FRACTION` of it.

    Starving is judged at design conditions only: given ``design`` (the steady
    flow split with every head open at the design supply temperature,
    :func:`~simheat.analysis.flows.steady_flow_split`, the judgement of
    :func:`simheat.analysis.check.starving_at_design`), each emitter's flow
    there is drawn as a diamond, the bars of emitters below the mark there are
    hatched in the warning colour, and the share written above each bar is that
    design-condition share (:func:`share_text`: label and hatching follow one
    rule). Without ``design`` nothing is judged: the share written is the mean
    flow's, and no bar is hatched.

    Parameters
    ----------
    run : Run
        A simulated run. [-]
    design : FlowSplit, optional
        The run's scheme at design conditions (heads open, design supply
        temperature), to judge starving. [-]
    ax : matplotlib.axes.Axes, optional
        Axes to draw into; a new figure is made when omitted. [-]

    Returns
    -------
    matplotlib.figure.Figure
        The figure. Bars carry the gid ``"flow:<emitter id>"``, design ticks
        ``"design:<emitter id>"``, design-condition diamonds
        ``"at_design:<emitter id>"``, share labels ``"share:<emitter id>"``;
        heights are in kg/h.

    Notes
    -----
    Design flows are those of the run summary (the room's design heat load shared
    among its radiators by nominal output, carried at the design temperature drop).
    """
    own_figure = ax is None
    fig, ax = new_axes(ax)
    order = route_order(run)
    emitters = [run.summary.emitters[i] for i in order]
    at_design = None
    if design is not None:
        by_id = {e.id: e for e in design.emitters}
        at_design = [by_id[e.id] for e in emitters]
    x = np.arange(len(order), dtype=float)
    half = BAR_WIDTH / 2.0
    for j, (xi, result) in enumerate(zip(x, emitters, strict=True)):
        mean_kg_h = result.mean_flow_kg_s * KG_S_TO_KG_H
        design_kg_h = result.design_flow_kg_s * KG_S_TO_KG_H
        top_kg_h = max(mean_kg_h, design_kg_h)
        if at_design is None:
            starving = False
            share = _share(result.mean_flow_kg_s, result.design_flow_kg_s)
        else:
            flow = at_design[j]
            starving = flow.starving
            share = _share(flow.flow_kg_s, flow.design_flow_kg_s)
            design_point_kg_h = flow.flow_kg_s * KG_S_TO_KG_H
            top_kg_h = max(top_kg_h, design_point_kg_h)
            ax.plot(
                [xi], [design_point_kg_h], marker="D", markersize=6,
                markerfacecolor="white", markeredgecolor="black", linestyle="none",
                zorder=4, gid=f"at_design:{result.id}",
            )  # fmt: skip
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
        ax.annotate(
            share_text(share) if share is not None else "closed",
            xy=(xi, top_kg_h), xytext=(0, 5),
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
    what = (
        "flow at design conditions (heads open) and mean during comfort"
        if design is not None
        else "mean flow during comfort against design, heads regulating"
    )
    ax.set_title(scheme_title(run, what), pad=16)

    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch

    pct = f"{100.0 * STARVING_FRACTION:.0f} %"
    if design is None:
        handles = [
            Patch(
                facecolor=ACCENT_COLOUR,
                label="Mean flow during comfort (heads regulating; % of design)",
            )
        ]
    else:
        handles = [
            Patch(facecolor=ACCENT_COLOUR, label="Mean flow during comfort"),
            Patch(
                facecolor=WARNING_COLOUR, hatch="//", edgecolor="white",
                label=f"Starving: below {pct} of design at design conditions",
            ),
            Line2D(
                [], [], marker="D", markerfacecolor="white", markeredgecolor="black",
                linestyle="none",
                label="Flow at design conditions (heads open; % of design)",
            ),
        ]  # fmt: skip
    handles += [
        Line2D([], [], color="black", linewidth=2.0, label="Design flow"),
        Line2D(
            [], [], color=NEUTRAL_COLOUR, linewidth=1.2, linestyle=(0, (2, 1)),
            label=f"{pct} of design flow",
        ),
    ]  # fmt: skip
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
