"""Schematic of a piping layout: supply and return lines, emitters, tees, pumps.

The drawing follows the route, not the floor plan: x is the position along each
floor's run (metres), floors are stacked bands. Supply lines are solid and
warm-coloured, return lines dashed and cool-coloured (line style carries the
meaning as well as colour); emitters are labelled boxes, tee points small dots,
pumps circles with an arrowhead in the flow direction, the heat source a
hatched box and a low-loss header a thick grey bar.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from simheat.hydraulics.network import (
    LINE_RETURN,
    LINK_EMITTER,
    LINK_PUMP,
    LINK_SOURCE,
)
from simheat.plots._style import RETURN_COLOUR, SUPPLY_COLOUR

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

    from simheat.hydraulics.layouts import BuiltLayout

EMITTER_FILL = "#fbf3e4"  # pale sand
HEADER_COLOUR = "#6b6b6b"  # low-loss header bar
BOX_WIDTH = 1.7  # emitter box, drawing units (about metres)
BOX_HEIGHT = 0.42
LINE_WIDTH = 1.6
INCHES_PER_UNIT_X = 0.3  # figure width per drawing unit
FIGURE_HEIGHT_PER_FLOOR_IN = 2.6


def _line_style(returning: bool) -> dict:
    if returning:
        return {"color": RETURN_COLOUR, "linestyle": (0, (4, 2)), "lw": LINE_WIDTH}
    return {"color": SUPPLY_COLOUR, "linestyle": "-", "lw": LINE_WIDTH}


def _draw_pump(ax: Axes, a: np.ndarray, b: np.ndarray, name: str) -> None:
    mid = 0.5 * (a + b)
    ax.plot(*zip(a, b, strict=True), color="black", lw=LINE_WIDTH, zorder=2)
    ax.plot(*mid, marker="o", markersize=13, mfc="white", mec="black", zorder=4)
    dx, dy = b - a
    if abs(dx) >= abs(dy):
        arrow = ">" if dx > 0 else "<"
    else:
        arrow = "^" if dy > 0 else "v"
    ax.plot(*mid, marker=arrow, markersize=6, color="black", zorder=5)
    ax.annotate(
        name,
        mid,
        xytext=(-10, 0),
        textcoords="offset points",
        ha="right",
        va="center",
        fontsize=6.5,
    )


def _draw_source(ax: Axes, a: np.ndarray, b: np.ndarray) -> None:
    from matplotlib.patches import Rectangle

    mid = 0.5 * (a + b)
    ax.plot(*zip(a, b, strict=True), color="black", lw=LINE_WIDTH, zorder=2)
    ax.add_patch(
        Rectangle(
            mid - (0.45, 0.3),
            0.9,
            0.6,
            facecolor="white",
            edgecolor="black",
            hatch="////",
            lw=1.2,
            zorder=4,
        )
    )
    ax.annotate(
        "heat source",
        mid,
        xytext=(14, 0),
        textcoords="offset points",
        ha="left",
        va="center",
        fontsize=6.5,
    )


def _draw_emitter(
    ax: Axes, supply: np.ndarray, ret: np.ndarray, box: np.ndarray, label: str
) -> None:
    from matplotlib.patches import FancyBboxPatch

    half_w, half_h = 0.5 * BOX_WIDTH, 0.5 * BOX_HEIGHT
    inlet = box + (-0.5 * half_w, half_h if supply[1] > box[1] else -half_h)
    outlet = box + (0.5 * half_w, half_h if ret[1] > box[1] else -half_h)
    ax.plot(*zip(supply, inlet, strict=True), zorder=1, **_line_style(False))
    ax.plot(*zip(outlet, ret, strict=True), zorder=1, **_line_style(True))
    ax.add_patch(
        FancyBboxPatch(
            box - (half_w, half_h),
            BOX_WIDTH,
            BOX_HEIGHT,
            boxstyle="round,pad=0.02,rounding_size=0.08",
            facecolor=EMITTER_FILL,
            edgecolor="black",
            lw=0.9,
            zorder=3,
        )
    )
    ax.text(*box, label, ha="center", va="center", fontsize=6, zorder=4)


def plot_schematic(
    built: BuiltLayout, title: str | None = None, ax: Axes | None = None
) -> Figure:
    """Draw a built layout as a schematic.

    Parameters
    ----------
    built : BuiltLayout
        The layout, from :func:`simheat.hydraulics.layouts.describe`. [-]
    title : str, optional
        Figure title; the scheme name by default. [-]
    ax : matplotlib.axes.Axes, optional
        Axes to draw into; a new figure when omitted. [-]

    Returns
    -------
    Figure
        The figure (never shown).
    """
    from matplotlib.figure import Figure
    from matplotlib.lines import Line2D

    net = built.network
    xy = built.node_xy
    if ax is None:
        span_x = float(np.ptp(xy[:, 0])) + 6.0
        span_y = float(np.ptp(xy[:, 1]))
        n_floors = max(1, round(span_y / 4.0) + 1)
        width = min(24.0, max(8.0, INCHES_PER_UNIT_X * span_x))
        fig = Figure(
            figsize=(width, 1.2 + FIGURE_HEIGHT_PER_FLOOR_IN * n_floors),
            layout="constrained",
        )
        ax = fig.add_subplot()
    else:
        fig = ax.figure
    degree = np.bincount(
        np.concatenate([net.from_node, net.to_node]), minlength=net.n_nodes
    )
    for k in range(net.n_links):
        a, b = xy[net.from_node[k]], xy[net.to_node[k]]
        kind = net.link_kind[k]
        if kind == LINK_EMITTER:
            e = int(net.emitter_index[k])
            box = np.asarray(built.emitter_xy[e])
            _draw_emitter(ax, a, b, box, net.emitter_ids[e])
        elif kind == LINK_PUMP:
            _draw_pump(ax, a, b, net.link_names[k])
        elif kind == LINK_SOURCE:
            _draw_source(ax, a, b)
        elif built.links[k].role == "low_loss_header":
            ax.plot(*zip(a, b, strict=True), color=HEADER_COLOUR, lw=7.0, zorder=2)
            ax.annotate(
                "low-loss header",
                0.5 * (a + b),
                xytext=(-10, 0),
                textcoords="offset points",
                ha="right",
                va="center",
                fontsize=6.5,
            )
        else:
            returning = LINE_RETURN in (
                net.node_line[net.from_node[k]],
                net.node_line[net.to_node[k]],
            )
            ax.plot(*zip(a, b, strict=True), zorder=1, **_line_style(returning))
    tees = np.flatnonzero(degree >= 3)
    ax.scatter(
        xy[tees, 0], xy[tees, 1], s=14, color="black", zorder=5, label="tee point"
    )
    handles = [
        Line2D([], [], **_line_style(False), label="supply"),
        Line2D([], [], **_line_style(True), label="return"),
        Line2D([], [], marker="o", color="black", lw=0, markersize=4, label="tee"),
    ]
    ax.legend(handles=handles, loc="upper right", fontsize=7, frameon=False)
    ax.set_title(title or net.scheme.replace("_", " "), fontsize=10)
    ax.set_xlabel("position along the run [m]")
    ax.set_yticks([])
    for side in ("left", "right", "top"):
        ax.spines[side].set_visible(False)
    ax.margins(x=0.03, y=0.25)
    return fig
