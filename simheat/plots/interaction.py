"""Throttle figures: the interaction heatmap and the room response in time."""

from __future__ import annotations

import numpy as np
from matplotlib.axes import Axes
from matplotlib.colors import ListedColormap, TwoSlopeNorm
from matplotlib.figure import Figure
from matplotlib.lines import Line2D

from simheat.analysis.throttle import InteractionMatrix, TransientThrottle
from simheat.plots._style import (
    FIGURE_SIZE_IN,
    GRID_STYLE,
    NEUTRAL_COLOUR,
    minus_sign,
    room_style,
)

# Diverging map that stays readable with the common colour-vision deficiencies
# (purple for less flow, orange for more, white at no change).
COLOUR_MAP = "PuOr_r"
DIAGONAL_COLOUR = "#d9d9d9"  # grey: the throttled emitter itself
CELL_SIZE_IN = 0.55  # [in] per emitter
MIN_SIZE_IN = 5.0  # [in]
RESPONSE_SIZE_IN = FIGURE_SIZE_IN  # [in]
MARK_COLOUR = NEUTRAL_COLOUR  # grey: the time of the throttle
# Matrices up to this many emitters get the value written in every cell.
MAX_ANNOTATED = 16


def plot_interaction(matrix: InteractionMatrix, ax: Axes | None = None) -> Figure:
    """Heatmap of relative flow changes with every emitter throttled in turn.

    Rows: the emitter throttled; columns: the emitter whose flow changes. The
    diagonal (the throttled emitter's own change) is drawn grey and left out of
    the colour scale, so the scale shows the interaction only.

    Parameters
    ----------
    matrix : InteractionMatrix
        Result of :func:`simheat.analysis.throttle.throttle_matrix`. [-]
    ax : matplotlib.axes.Axes, optional
        Axes to draw into; a new figure is made when omitted. [-]

    Returns
    -------
    matplotlib.figure.Figure
        The figure; the image carries the gid ``"interaction"``.

    Notes
    -----
    Built without pyplot; write it with :func:`simheat.plots.save_figure`.
    """
    ids = matrix.emitter_ids
    n = len(ids)
    if ax is None:
        side = max(MIN_SIZE_IN, CELL_SIZE_IN * n + 2.5)
        fig = Figure(figsize=(side + 1.0, side), layout="constrained")
        ax = fig.add_subplot()
    else:
        fig = ax.figure
    values = np.array(matrix.flow_change_pct, dtype=float)
    diagonal = np.eye(n, dtype=bool)
    shown = np.ma.masked_array(values, mask=diagonal)
    limit = float(np.max(np.abs(values[~diagonal]), initial=0.0)) or 1.0
    ax.imshow(
        np.where(diagonal, 1.0, np.nan), cmap=ListedColormap([DIAGONAL_COLOUR]),
        interpolation="nearest",
    )  # fmt: skip
    image = ax.imshow(
        shown, cmap=COLOUR_MAP, norm=TwoSlopeNorm(0.0, -limit, limit),
        interpolation="nearest", gid="interaction",
    )  # fmt: skip
    if n <= MAX_ANNOTATED:
        for i in range(n):
            for j in range(n):
                text = minus_sign(f"{values[i, j]:+.1f}")
                strong = not diagonal[i, j] and abs(values[i, j]) > 0.6 * limit
                ax.text(
                    j, i, text, ha="center", va="center", fontsize=7,
                    color="white" if strong else "black",
                    fontstyle="italic" if diagonal[i, j] else "normal",
                )  # fmt: skip
    ax.set_xticks(range(n), ids, rotation=60, ha="right", fontsize=8)
    ax.set_yticks(range(n), ids, fontsize=8)
    ax.set_xlabel("Emitter whose flow changes")
    ax.set_ylabel("Emitter throttled")
    bar = fig.colorbar(image, ax=ax, shrink=0.8)
    bar.set_label("Flow change [%] (diagonal: own change, grey)")
    ax.set_title(
        f"Throttle interaction, {matrix.scheme.replace('_', ' ')} scheme, "
        f"valve to {matrix.opening:g} open\n"
        f"interaction index: mean {matrix.interaction_mean_pct:.1f} %, "
        f"max {matrix.interaction_max_pct:.1f} %"
    )
    return fig


def plot_throttle_response(result: TransientThrottle, ax: Axes | None = None) -> Figure:
    """Room air temperatures with and without a valve throttled during the run.

    Each room in its own colour (as in the warm-up figure): solid with the
    throttle, thin dotted without; a grey vertical line at the throttle.

    Parameters
    ----------
    result : TransientThrottle
        Result of :func:`simheat.analysis.throttle.throttle_transient`. [-]
    ax : matplotlib.axes.Axes, optional
        Axes to draw into; a new figure is made when omitted. [-]

    Returns
    -------
    matplotlib.figure.Figure
        The figure; lines carry the gids ``"with:<room id>"`` and
        ``"without:<room id>"``.

    Notes
    -----
    Built without pyplot; write it with :func:`simheat.plots.save_figure`.
    """
    if ax is None:
        fig = Figure(figsize=RESPONSE_SIZE_IN, layout="constrained")
        ax = fig.add_subplot()
    else:
        fig = ax.figure
    scenario = result.throttled.scenario
    handles = []
    for r, room in enumerate(scenario.rooms):
        colour, style = room_style(r)
        for run, gid, width, line_style in (
            (result.baseline, "without", 1.0, ":"),
            (result.throttled, "with", 1.6, style),
        ):
            (line,) = ax.plot(
                np.asarray(run.time_s) / 3600.0, run.air_temp_C[:, r],
                color=colour, linestyle=line_style, linewidth=width,
                gid=f"{gid}:{room.id}", label=room.name,
            )  # fmt: skip
        handles.append(line)
    ax.axvline(result.at_s / 3600.0, color=MARK_COLOUR, linewidth=1.0)
    ax.set_xlabel("Time since start [h]")
    ax.set_ylabel("Air temperature [°C]")
    ax.grid(True, **GRID_STYLE)
    ax.set_title(
        f"{scenario.name}\n{result.emitter_id} valve to {result.opening:g} open "
        f"at {result.at_s / 60.0:g} min, {result.scheme.replace('_', ' ')} scheme"
    )
    handles.append(
        Line2D([], [], color="0.3", linestyle=":", linewidth=1.0,
               label="Without the throttle")
    )  # fmt: skip
    handles.append(
        Line2D([], [], color=MARK_COLOUR, linewidth=1.0, label="Throttle")
    )  # fmt: skip
    ax.legend(
        handles=handles, loc="upper center", bbox_to_anchor=(0.5, -0.12),
        ncol=min(4, len(handles)), fontsize=8, frameon=False,
    )  # fmt: skip
    return fig
