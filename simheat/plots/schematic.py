"""Schematic of a piping layout: supply and return lines, emitters, tees, pumps.

The drawing follows the route, not the floor plan: x is the position along each
floor's run (metres), floors are stacked bands named at their left. Supply lines
are solid and warm-coloured, return lines dashed and cool-coloured (line style
carries the meaning as well as colour); a pipe that would lie on another when
drawn straight (the tail of a reverse return) follows its own lane. Pipe sizes
are written along the lines, once per run of one size; emitters are labelled
boxes, tee points small dots, pumps circles with an arrowhead in the flow
direction and their name clear of every pipe, the heat source a hatched box, a
low-loss header a thick grey bar, and the split point of a split circuit a
dash-dotted mark.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from simheat.hydraulics.network import (
    LINE_RETURN,
    LINK_EMITTER,
    LINK_PIPE,
    LINK_PUMP,
    LINK_SOURCE,
)
from simheat.plots._style import NEUTRAL_COLOUR, RETURN_COLOUR, SUPPLY_COLOUR

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

    from simheat.hydraulics.layouts import BuiltLayout
    from simheat.scenario.model import PipeSpec

EMITTER_FILL = "#fbf3e4"  # pale sand
HEADER_COLOUR = "#6b6b6b"  # low-loss header bar
BOX_WIDTH = 1.7  # emitter box, drawing units (about metres)
BOX_HEIGHT = 0.42
LINE_WIDTH = 1.6
INCHES_PER_UNIT_X = 0.3  # figure width per drawing unit
FIGURE_HEIGHT_PER_FLOOR_IN = 2.6
SIZE_FONT = 5.5  # pipe-size labels [pt]
LABEL_FONT = 6.5  # pump, source, header and floor labels [pt]
SPLIT_MARK_SPAN = (-0.3, 1.5)  # split mark, relative to the floor's return line
COLLINEAR_TOL = 1e-6  # drawing units

__all__ = ["pipe_label", "plot_schematic", "return_segments"]


def pipe_label(pipe: PipeSpec) -> str:
    """Short text of a pipe size: its catalog name, or its bore when custom.

    Parameters
    ----------
    pipe : PipeSpec
        The pipe type. [-]

    Returns
    -------
    str
        E.g. ``"cu_22x1"`` or ``"ID 20.0 mm"``.

    Examples
    --------
    >>> from simheat.scenario.model import PipeSpec
    >>> pipe_label(PipeSpec("custom", 0.02, 1e-6, 0.022))
    'ID 20.0 mm'
    """
    if pipe.name in ("custom", "low_loss_header"):
        return f"ID {pipe.inner_diameter_m * 1e3:.1f} mm"
    return pipe.name


def _line_style(returning: bool) -> dict:
    if returning:
        return {"color": RETURN_COLOUR, "linestyle": (0, (4, 2)), "lw": LINE_WIDTH}
    return {"color": SUPPLY_COLOUR, "linestyle": "-", "lw": LINE_WIDTH}


def _is_return(built: BuiltLayout, link: int) -> bool:
    net = built.network
    return LINE_RETURN in (
        net.node_line[net.from_node[link]],
        net.node_line[net.to_node[link]],
    )


def return_segments(built: BuiltLayout) -> list[tuple[tuple[float, float], ...]]:
    """Distinct straight pieces of the return pipes as the schematic draws them.

    Every return pipe's drawn path is cut into its straight segments, and
    collinear segments that overlap are merged into one: two pipes drawn on top
    of each other count once. A drawing shows the return path distinctly when
    no two return pipes share a piece.

    Parameters
    ----------
    built : BuiltLayout
        The layout. [-]

    Returns
    -------
    list of tuple of (float, float)
        Each distinct piece as its two end points. [drawing units]
    """
    net = built.network
    pieces: list[tuple[np.ndarray, np.ndarray]] = []
    for k in range(net.n_links):
        if net.link_kind[k] != LINK_PIPE or built.links[k].role == "low_loss_header":
            continue
        if not _is_return(built, k):
            continue
        path = built.link_path_xy(k)
        for a, b in zip(path[:-1], path[1:], strict=True):
            if np.hypot(*(b - a)) > COLLINEAR_TOL:
                pieces.append((a, b))
    merged: list[tuple[np.ndarray, np.ndarray]] = []
    for a, b in pieces:
        for i, (c, d) in enumerate(merged):
            if _overlapping(a, b, c, d):
                points = np.array([a, b, c, d])
                direction = (d - c) / np.hypot(*(d - c))
                t = points @ direction
                merged[i] = (points[np.argmin(t)], points[np.argmax(t)])
                break
        else:
            merged.append((a, b))
    return [(tuple(map(float, a)), tuple(map(float, b))) for a, b in merged]


def _overlapping(a, b, c, d) -> bool:
    """Whether segments ab and cd are collinear and share more than a point."""
    u = b - a
    length = np.hypot(*u)
    u = u / length
    for p in (c, d):
        if abs(u[0] * (p - a)[1] - u[1] * (p - a)[0]) > COLLINEAR_TOL:
            return False
    t_c, t_d = float(u @ (c - a)), float(u @ (d - a))
    low, high = min(t_c, t_d), max(t_c, t_d)
    return min(high, length) - max(low, 0.0) > COLLINEAR_TOL


def _draw_path(ax: Axes, path: np.ndarray, gid: str, zorder: float, **style) -> None:
    ax.plot(path[:, 0], path[:, 1], zorder=zorder, gid=gid, **style)


def _draw_pump(ax: Axes, path: np.ndarray, name: str) -> None:
    """Pump symbol on the middle of its path's last segment, its name clear of it.

    A pump on a horizontal run is labelled above the run, any other beside it.
    """
    _draw_path(ax, path, f"link:{name}", 2, color="black", lw=LINE_WIDTH)
    a, b = path[-2], path[-1]
    mid = 0.5 * (a + b)
    ax.plot(
        *mid, marker="o", markersize=13, mfc="white", mec="black", zorder=4,
        gid=f"pump:{name}",
    )  # fmt: skip
    dx, dy = b - a
    if abs(dx) >= abs(dy):
        arrow = ">" if dx > 0 else "<"
    else:
        arrow = "^" if dy > 0 else "v"
    ax.plot(*mid, marker=arrow, markersize=6, color="black", zorder=5)
    if abs(dy) < COLLINEAR_TOL:  # horizontal run: name above it
        offset, ha, va = (0, 9), "center", "bottom"
    else:
        offset, ha, va = (-10, 0), "right", "center"
    ax.annotate(
        name, mid, xytext=offset, textcoords="offset points", ha=ha, va=va,
        fontsize=LABEL_FONT, gid=f"pump_label:{name}",
    )  # fmt: skip


def _draw_source(ax: Axes, a: np.ndarray, b: np.ndarray) -> None:
    from matplotlib.patches import Rectangle

    mid = 0.5 * (a + b)
    ax.plot(*zip(a, b, strict=True), color="black", lw=LINE_WIDTH, zorder=2)
    ax.add_patch(
        Rectangle(
            mid - (0.45, 0.3), 0.9, 0.6, facecolor="white", edgecolor="black",
            hatch="////", lw=1.2, zorder=4, gid="source",
        )
    )  # fmt: skip
    ax.annotate(
        "heat source", mid, xytext=(14, 0), textcoords="offset points", ha="left",
        va="center", fontsize=LABEL_FONT,
    )  # fmt: skip


def _draw_emitter(
    ax: Axes, path: np.ndarray, box: np.ndarray, label: str, name: str
) -> None:
    from matplotlib.patches import FancyBboxPatch

    supply, ret = path[0], path[-1]
    half_w, half_h = 0.5 * BOX_WIDTH, 0.5 * BOX_HEIGHT
    inlet = box + (-0.5 * half_w, half_h if supply[1] > box[1] else -half_h)
    outlet = box + (0.5 * half_w, half_h if ret[1] > box[1] else -half_h)
    ax.plot(
        *zip(supply, inlet, strict=True), zorder=1, gid=f"branch:{name}:supply",
        **_line_style(False),
    )  # fmt: skip
    ax.plot(
        *zip(outlet, ret, strict=True), zorder=1, gid=f"branch:{name}:return",
        **_line_style(True),
    )  # fmt: skip
    ax.add_patch(
        FancyBboxPatch(
            box - (half_w, half_h), BOX_WIDTH, BOX_HEIGHT,
            boxstyle="round,pad=0.02,rounding_size=0.08", facecolor=EMITTER_FILL,
            edgecolor="black", lw=0.9, zorder=3, gid=f"emitter:{name}",
        )
    )  # fmt: skip
    ax.text(*box, label, ha="center", va="center", fontsize=6, zorder=4)


def _size_runs(built: BuiltLayout) -> list[tuple[str, bool, np.ndarray, np.ndarray]]:
    """Runs of one pipe size to label: (label, return?, start, end) in drawing units.

    Each pipe's longest drawn segment stands for it; horizontal segments of the
    same size, line and height that touch are merged into one run, so a header
    of one size is labelled once.
    """
    net = built.network
    runs: list[tuple[str, bool, np.ndarray, np.ndarray]] = []
    for k, spec in enumerate(built.links):
        if (
            net.link_kind[k] != LINK_PIPE
            or spec.pipe is None
            or spec.length_m <= 0.0
            or spec.role == "low_loss_header"
        ):
            continue
        path = built.link_path_xy(k)
        steps = np.hypot(*np.diff(path, axis=0).T)
        if steps.max() <= COLLINEAR_TOL:
            continue
        i = int(np.argmax(steps))
        a, b = path[i], path[i + 1]
        if a[0] > b[0] or (a[0] == b[0] and a[1] > b[1]):
            a, b = b, a
        runs.append((pipe_label(spec.pipe), _is_return(built, k), a, b))
    merged: list[tuple[str, bool, np.ndarray, np.ndarray]] = []
    lines: dict[tuple, list[tuple[np.ndarray, np.ndarray]]] = {}
    for label, returning, a, b in runs:
        if abs(a[1] - b[1]) < COLLINEAR_TOL:
            lines.setdefault((label, returning, round(float(a[1]), 6)), []).append(
                (a, b)
            )
        else:
            merged.append((label, returning, a, b))
    for (label, returning, _), pieces in lines.items():
        pieces.sort(key=lambda p: p[0][0])
        start, end = pieces[0]
        for a, b in pieces[1:]:
            if a[0] <= end[0] + COLLINEAR_TOL:
                end = b if b[0] > end[0] else end
                continue
            merged.append((label, returning, start, end))
            start, end = a, b
        merged.append((label, returning, start, end))
    return merged


def _draw_sizes(ax: Axes, built: BuiltLayout) -> None:
    for n, (label, returning, a, b) in enumerate(_size_runs(built)):
        mid = 0.5 * (a + b)
        colour = RETURN_COLOUR if returning else SUPPLY_COLOUR
        if abs(a[1] - b[1]) < COLLINEAR_TOL:  # horizontal: above supply, below return
            offset, va, rotation, ha = (
                ((0, -3), "top", 0, "center")
                if returning
                else ((0, 2), "bottom", 0, "center")
            )
        else:  # vertical or sloping: beside it
            offset, va, rotation = ((-3, 0) if returning else (3, 0)), "center", 90
            ha = "right" if returning else "left"
        ax.annotate(
            label, mid, xytext=offset, textcoords="offset points", ha=ha, va=va,
            rotation=rotation, fontsize=SIZE_FONT, color=colour,
            gid=f"size:{label}:{n}",
        )  # fmt: skip


def _branch_note(built: BuiltLayout) -> str:
    """Sizes of the emitter branches (or home runs), for a note under the drawing."""
    net = built.network
    by_role: dict[str, set[str]] = {}
    for k in net.emitter_links():
        spec = built.links[int(k)]
        if spec.pipe is not None:
            by_role.setdefault(spec.role, set()).add(pipe_label(spec.pipe))
    names = {"emitter": "radiator branches", "home_run": "home runs"}
    return "; ".join(
        f"{names.get(role, role)}: {', '.join(sorted(sizes))}"
        for role, sizes in sorted(by_role.items())
    )


def _draw_marks(ax: Axes, built: BuiltLayout, left_x: float) -> None:
    for mark in built.marks:
        x, y = mark.xy
        if mark.kind == "floor":
            ax.text(
                left_x, y + 0.6, mark.label, ha="right", va="center",
                fontsize=LABEL_FONT + 1.5, fontweight="bold", color=NEUTRAL_COLOUR,
                gid=f"floor:{mark.label}",
            )  # fmt: skip
        elif mark.kind == "split":
            low, high = SPLIT_MARK_SPAN
            ax.plot(
                [x, x], [y + low, y + high], color="black", lw=1.0,
                linestyle="-.", zorder=6, gid=f"split:{x:g}:{y:g}",
            )  # fmt: skip
            ax.annotate(
                mark.label, (x, y + high), xytext=(0, 2), textcoords="offset points",
                ha="center", va="bottom", fontsize=LABEL_FONT,
            )  # fmt: skip


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
        The figure (never shown). Pipes and pumps carry the gid
        ``"link:<link name>"``, pump symbols ``"pump:<name>"`` and their names
        ``"pump_label:<name>"``, pipe-size labels ``"size:<size>:<n>"``, floor names
        ``"floor:<label>"``, split marks ``"split:<x>:<y>"``.
    """
    from matplotlib.figure import Figure
    from matplotlib.lines import Line2D

    net = built.network
    xy = built.node_xy
    every_x = np.concatenate(
        [
            xy[:, 0],
            [p[0] for via in built.link_via.values() for p in via],
            [x - 0.5 * BOX_WIDTH for x, _ in built.emitter_xy.values()],
            [x + 0.5 * BOX_WIDTH for x, _ in built.emitter_xy.values()],
        ]
    )
    if ax is None:
        span_x = float(np.ptp(every_x)) + 6.0
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
        path = built.link_path_xy(k)
        kind = net.link_kind[k]
        name = net.link_names[k]
        if kind == LINK_EMITTER:
            e = int(net.emitter_index[k])
            box = np.asarray(built.emitter_xy[e])
            _draw_emitter(ax, path, box, net.emitter_ids[e], name)
        elif kind == LINK_PUMP:
            _draw_pump(ax, path, name)
        elif kind == LINK_SOURCE:
            _draw_source(ax, path[0], path[-1])
        elif built.links[k].role == "low_loss_header":
            # Above the pipes that join it, so their stubs along it stay hidden.
            _draw_path(ax, path, f"link:{name}", 3.5, color=HEADER_COLOUR, lw=7.0)
            ax.annotate(
                "low-loss header", 0.5 * (path[0] + path[-1]), xytext=(8, 0),
                textcoords="offset points", ha="left", va="center",
                fontsize=LABEL_FONT,
            )  # fmt: skip
        else:
            _draw_path(ax, path, f"link:{name}", 1, **_line_style(_is_return(built, k)))
    tees = np.flatnonzero(degree >= 3)
    ax.scatter(
        xy[tees, 0], xy[tees, 1], s=14, color="black", zorder=5, label="tee point"
    )
    _draw_sizes(ax, built)
    _draw_marks(ax, built, float(every_x.min()) - 0.4)
    handles = [
        Line2D([], [], **_line_style(False), label="supply"),
        Line2D([], [], **_line_style(True), label="return"),
        Line2D([], [], marker="o", color="black", lw=0, markersize=4, label="tee"),
    ]
    if any(m.kind == "split" for m in built.marks):
        handles.append(
            Line2D([], [], color="black", lw=1.0, linestyle="-.", label="split point")
        )
    ax.legend(handles=handles, loc="upper right", fontsize=7, frameon=False)
    ax.set_title(title or net.scheme.replace("_", " "), fontsize=10)
    note = _branch_note(built)
    ax.set_xlabel(
        "position along the run [m]" + (f"    ({note})" if note else ""), fontsize=8
    )
    ax.set_yticks([])
    for side in ("left", "right", "top"):
        ax.spines[side].set_visible(False)
    ax.margins(x=0.06, y=0.25)
    return fig
