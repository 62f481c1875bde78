"""Sweep figures: metrics against parameters, and the probability of warm rooms.

Both draw what :mod:`simheat.batch.analysis` computed from a sweep file; neither
runs anything. matplotlib is imported on the first call.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import TYPE_CHECKING

import numpy as np

from simheat.plots import SWEEP_PLOT_KIND_NAMES
from simheat.plots._style import PALETTE, room_style

if TYPE_CHECKING:
    from matplotlib.figure import Figure

    from simheat.batch.analysis import MetricPoints

# Figure kinds of ``simheat plot SWEEP.h5 --kind``.
SWEEP_PLOT_KINDS = SWEEP_PLOT_KIND_NAMES
PANEL_SIZE_IN = (3.2, 2.3)  # one small multiple [in]
MIN_METRICS_WIDTH_IN = 9.0  # room for the legend row under one or two columns [in]
MAX_PROBABILITY_COLUMNS = 3  # scheme panels per row
POINT_SIZE = 14.0  # scatter marker area [pt^2]
NOT_REACHED_MARK = "x"
ALL_ROOMS_COLOUR = "#7f7f7f"  # grey: no room has it (the palette holds black)


def plot_sweep_metrics(points: MetricPoints) -> Figure:
    """Small multiples: each summary metric (rows) against each parameter (columns).

    Every finished variant is a dot, coloured by scheme. When values repeat along
    a parameter (grid and zip sweeps), a line per scheme joins the means at each
    value. In the all-rooms panel a cross at the top marks a variant in which a
    room never reached its setpoint.

    Parameters
    ----------
    points : MetricPoints
        From :func:`simheat.batch.analysis.metric_points`. [-]

    Returns
    -------
    matplotlib.figure.Figure
        The figure; panel axes carry the gid ``"panel:<metric>:<key>"``.

    Notes
    -----
    Built without pyplot; write it with :func:`simheat.plots.save_figure`.
    """
    from matplotlib.figure import Figure
    from matplotlib.lines import Line2D

    n_rows, n_cols = len(points.metrics), len(points.parameters)
    width_in = max(PANEL_SIZE_IN[0] * n_cols + 1.0, MIN_METRICS_WIDTH_IN)
    fig = Figure(
        figsize=(width_in, PANEL_SIZE_IN[1] * n_rows + 1.2), layout="constrained"
    )
    axes = fig.subplots(n_rows, n_cols, sharex="col", sharey="row", squeeze=False)
    colours = {s: PALETTE[k % len(PALETTE)] for k, s in enumerate(points.scheme_names)}
    for i, (metric, label, y) in enumerate(points.metrics):
        for j, parameter in enumerate(points.parameters):
            ax = axes[i][j]
            ax.set_gid(f"panel:{metric}:{parameter.key}")
            for scheme, colour in colours.items():
                mine = points.schemes == scheme
                x, v = parameter.x[mine], y[mine]
                ax.scatter(x, v, s=POINT_SIZE, color=colour, alpha=0.6, linewidths=0)
                distinct = np.unique(x)
                if points.mode != "random" and len(distinct) < len(x):
                    means = [np.nanmean(v[x == d]) if np.any(np.isfinite(v[x == d]))
                             else np.nan for d in distinct]  # fmt: skip
                    ax.plot(distinct, means, color=colour, linewidth=1.2)
                missing = ~np.isfinite(v)
                if metric == "all_rooms_at_setpoint_s" and missing.any():
                    # (an empty unclipped line would break the constrained layout)
                    ax.plot(
                        x[missing], np.full(missing.sum(), 0.97),
                        NOT_REACHED_MARK, color=colour, markersize=5,
                        transform=ax.get_xaxis_transform(), clip_on=False,
                    )  # fmt: skip
            if parameter.categories is not None and i == n_rows - 1:
                ax.set_xticks(range(len(parameter.categories)))
                ax.set_xticklabels(parameter.categories, rotation=30, ha="right")
            ax.grid(linewidth=0.4, alpha=0.5)
            ax.ticklabel_format(axis="y", useOffset=False)  # plain numbers
            if i == n_rows - 1:
                ax.set_xlabel(parameter.label)
            if j == 0:
                ax.set_ylabel(label)
    handles = [
        Line2D([], [], color=c, marker="o", linestyle="-", label=s.replace("_", " "))
        for s, c in colours.items()
    ]
    handles.append(
        Line2D([], [], color="#7f7f7f", marker=NOT_REACHED_MARK, linestyle="none",
               label="a room never at setpoint")
    )  # fmt: skip
    fig.legend(handles=handles, loc="outside lower center", ncols=len(handles))
    failed = f", {points.n_failed} failed (not drawn)" if points.n_failed else ""
    fig.suptitle(
        f"{points.name}\nsummary metrics against each swept parameter "
        f"({len(points.schemes)} variants{failed})"
    )
    return fig


def plot_setpoint_probability(
    time_min: np.ndarray,
    probability: Mapping[str, Mapping[str, np.ndarray]],
    *,
    title: str,
    comfort_clock: str,
    n_variants: Mapping[str, int],
) -> Figure:
    """Probability that each room is at setpoint by a time, one panel per scheme.

    Parameters
    ----------
    time_min : ndarray
        Times after the start of comfort. [min]
    probability : mapping
        Scheme -> {room id or ``"all rooms"`` -> probability at each time}, from
        :func:`simheat.batch.analysis.setpoint_probability`. [-]
    title : str
        First title line (the sweep's name). [-]
    comfort_clock : str
        Clock time comfort starts (``"HH:MM"``), for the axis label. [-]
    n_variants : mapping
        Scheme -> number of finished variants behind its curves. [-]

    Returns
    -------
    matplotlib.figure.Figure
        The figure; panels carry the gid ``"panel:<scheme>"`` and curves
        ``"probability:<scheme>:<room>"``.
    """
    from matplotlib.figure import Figure

    from simheat.batch.analysis import ALL_ROOMS

    schemes = list(probability)
    columns = max(1, min(len(schemes), MAX_PROBABILITY_COLUMNS))
    rows = max(1, -(-len(schemes) // columns))
    fig = Figure(figsize=(5.0 * columns + 1.5, 3.6 * rows + 1.0), layout="constrained")
    axes = fig.subplots(rows, columns, sharex=True, sharey=True, squeeze=False)
    for k, scheme in enumerate(schemes):
        ax = axes[k // columns][k % columns]
        ax.set_gid(f"panel:{scheme}")
        curves = probability[scheme]
        rooms = [room for room in curves if room != ALL_ROOMS]
        for r, room in enumerate(rooms):
            colour, style = room_style(r)
            ax.plot(
                time_min, curves[room], color=colour, linestyle=style,
                drawstyle="steps-post", linewidth=1.3, label=room,
                gid=f"probability:{scheme}:{room}",
            )  # fmt: skip
        ax.plot(
            time_min, curves[ALL_ROOMS], color=ALL_ROOMS_COLOUR, linewidth=3.0,
            drawstyle="steps-post", label=ALL_ROOMS, zorder=1.8,  # under the rooms
            gid=f"probability:{scheme}:{ALL_ROOMS}",
        )  # fmt: skip
        ax.set_title(
            f"{scheme.replace('_', ' ')} ({n_variants.get(scheme, 0)} variants)"
        )
        ax.set_ylim(-0.02, 1.02)
        ax.grid(linewidth=0.4, alpha=0.5)
        ax.set_xlabel(f"Time after comfort starts at {comfort_clock} [min]")
        ax.set_ylabel("Probability at setpoint [-]")
    for k in range(len(schemes), rows * columns):
        axes[k // columns][k % columns].set_visible(False)
    axes[0][0].legend(fontsize="small", loc="lower right")
    fig.suptitle(f"{title}\nprobability that each room is at setpoint by time T")
    return fig
