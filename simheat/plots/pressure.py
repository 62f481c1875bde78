"""Pressure figure: pressure along supply and return, and what each tee gets.

Draws a :class:`~simheat.analysis.pressure.PressureProfile` (computed by
:func:`~simheat.analysis.pressure.design_pressure_profile` for a run: every valve
fully open, water everywhere at the design supply temperature). The supply line's
pressure falls away from the plant, the return line's rises towards it, and the
gap between them at an emitter's tee points is the differential pressure that
drives water through that emitter.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from simheat.analysis.flows import STARVING_FRACTION
from simheat.plots._style import (
    ACCENT_COLOUR,
    FIGURE_SIZE_IN,
    GRID_STYLE,
    NEUTRAL_COLOUR,
    RETURN_COLOUR,
    SUPPLY_COLOUR,
    WARNING_COLOUR,
)

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

    from simheat.analysis.pressure import FloorPressure, PressureProfile

PA_PER_KPA = 1000.0  # [Pa/kPa]
FLOOR_MARKERS = ("o", "s", "^", "D", "v")  # one node marker per floor, cycled
STARVING_BAR_STYLE = (0, (1.0, 0.6))  # dotted: a starving tee, not by colour alone
# Share of the pressure range kept free below zero for the tee labels. [-]
LABEL_STRIP = 0.2
PANEL_HEIGHT_IN = 4.2  # height of each floor's panel in a new figure [in]


def plot_pressure(profile: PressureProfile, ax: Axes | None = None) -> Figure:
    """Plot pressure along the supply and return lines and each tee's differential.

    Draws the gauge pressure of every supply and return node of each floor
    against its pipe distance from the plant. At each emitter's tee points a
    vertical bar spans the differential pressure available to the emitter. Its
    value and the emitter's flow as a share of its design flow are written in a
    strip below zero pressure (emitters on the same pair of nodes, as at a
    manifold, share one bar and one label); tees below
    :data:`~simheat.analysis.flows.STARVING_FRACTION` of design are drawn dotted
    in the warning colour, their share in bold. Emitter ids run along the top.

    Parameters
    ----------
    profile : PressureProfile
        Pressures along the lines, from
        :func:`~simheat.analysis.pressure.design_pressure_profile`. [-]
    ax : matplotlib.axes.Axes, optional
        Axes to draw every floor into; when omitted a new figure gets one panel
        per floor, stacked, sharing both axes. [-]

    Returns
    -------
    matplotlib.figure.Figure
        The figure. Lines carry the gids ``"supply:floor<n>"`` and
        ``"return:floor<n>"`` (segments separated by NaN, x in m, y in kPa) and
        ``"dp:<emitter id>"`` (y from return to supply pressure, in kPa).

    Notes
    -----
    Pressures are relative to the pump inlet, where the expansion vessel holds
    the pressure. Distances are pipe lengths along each line from the plant.
    """
    floors = profile.floors
    if ax is None:
        from matplotlib.figure import Figure

        height = max(FIGURE_SIZE_IN[1], PANEL_HEIGHT_IN * len(floors) + 1.4)
        fig = Figure(figsize=(FIGURE_SIZE_IN[0], height), layout="constrained")
        panels = fig.subplots(len(floors), 1, sharex=True, sharey=True, squeeze=False)
        axes = list(panels[:, 0])
    else:
        fig = ax.figure
        axes = [ax] * len(floors)

    for j, (panel, floor) in enumerate(zip(axes, floors, strict=True)):
        _draw_floor(panel, floor, j)

    top_kPa = profile.highest_pressure_Pa / PA_PER_KPA
    for panel in dict.fromkeys(axes):
        panel.set_ylim(-LABEL_STRIP * top_kPa, (1.0 + 0.05) * top_kPa)
        # No ticks in the label strip: no pressure there is below the pump inlet's.
        panel.set_yticks([t for t in panel.get_yticks() if 0.0 <= t <= top_kPa])
        panel.axhline(0.0, color=NEUTRAL_COLOUR, linewidth=0.6)
        panel.set_ylabel("Pressure above pump inlet [kPa]")
        panel.grid(True, **GRID_STYLE)
        panel.set_xlim(left=-0.5)
    axes[-1].set_xlabel("Pipe distance from the plant [m]")
    title = (
        f"{profile.scenario_name}\npressure along supply and return, "
        f"{profile.scheme.replace('_', ' ')} scheme"
        f"\ndesign point: all valves fully open, water at "
        f"{profile.water_temp_C:.0f} °C;"
        f" pump rise {profile.pump_rise_Pa / PA_PER_KPA:.1f} kPa"
    )
    if len(dict.fromkeys(axes)) > 1:
        fig.suptitle(title)
        for panel, floor in zip(axes, floors, strict=True):
            panel.set_title(f"floor {floor.floor}", loc="left", fontsize=9)
    else:
        axes[0].set_title(title)
    _legend(axes[-1], floors, len(dict.fromkeys(axes)) > 1)
    return fig


def _draw_floor(ax: Axes, floor: FloorPressure, index: int) -> None:
    """Supply and return lines, tee bars and their labels of one floor."""
    marker = FLOOR_MARKERS[index % len(FLOOR_MARKERS)]
    for which, x, y_Pa, colour, style in (
        ("supply", floor.supply_distance_m, floor.supply_pressure_Pa,
         SUPPLY_COLOUR, "-"),
        ("return", floor.return_distance_m, floor.return_pressure_Pa,
         RETURN_COLOUR, "--"),
    ):  # fmt: skip
        ax.plot(
            x, np.asarray(y_Pa) / PA_PER_KPA, color=colour, linestyle=style,
            linewidth=1.6, marker=marker, markersize=4,
            gid=f"{which}:floor{floor.floor}",
        )  # fmt: skip

    positions, names = [], []
    for tee in floor.tees:
        x = tee.distance_m
        low = tee.return_pressure_Pa / PA_PER_KPA
        high = tee.supply_pressure_Pa / PA_PER_KPA
        shares = tee.flow_share
        starving = tee.starving
        for emitter_id in tee.emitter_ids:
            ax.plot(
                [x, x], [low, high],
                color=WARNING_COLOUR if starving else ACCENT_COLOUR,
                linestyle=STARVING_BAR_STYLE if starving else "-", linewidth=2.4,
                solid_capstyle="butt", gid=f"dp:{emitter_id}",
            )  # fmt: skip
        if len(tee.emitter_ids) == 1:
            share_text = f"{100.0 * shares[0]:.0f} %"
            names.append(tee.emitter_ids[0])
        else:
            share_text = f"{100.0 * min(shares):.0f}\u2013{100.0 * max(shares):.0f} %"
            names.append(f"{len(tee.emitter_ids)} emitters")
        positions.append(x)
        # Labels sit in a strip below zero pressure, where no line runs (the pump
        # inlet is the lowest pressure of the circuit).
        ax.annotate(
            f"{high - low:.1f} kPa\n{share_text}",
            xy=(x, 0.0), xycoords=("data", "axes fraction"), xytext=(0, 3),
            textcoords="offset points", ha="center", va="bottom", fontsize=7,
            fontweight="bold" if starving else "normal",
        )  # fmt: skip
    top = ax.secondary_xaxis("top")
    top.set_xticks(positions, names, rotation=45, ha="left", fontsize=7)
    top.tick_params(length=2)


def _legend(ax: Axes, floors: tuple[FloorPressure, ...], panels: bool) -> None:
    """Legend below the lowest axes."""
    from matplotlib.lines import Line2D

    pct = f"{100.0 * STARVING_FRACTION:.0f} %"
    handles = []
    for j, lines in enumerate(floors if not panels else floors[:1]):
        marker = FLOOR_MARKERS[j % len(FLOOR_MARKERS)]
        suffix = "" if panels or len(floors) == 1 else f", floor {lines.floor}"
        handles += [
            Line2D(
                [],
                [],
                color=SUPPLY_COLOUR,
                marker=marker,
                markersize=4,
                label=f"Supply line{suffix}",
            ),  # fmt: skip
            Line2D(
                [],
                [],
                color=RETURN_COLOUR,
                linestyle="--",
                marker=marker,
                markersize=4,
                label=f"Return line{suffix}",
            ),  # fmt: skip
        ]
    handles += [
        Line2D(
            [],
            [],
            color=ACCENT_COLOUR,
            linewidth=2.4,
            label=f"Differential pressure at a tee (flow at least {pct} of design)",
        ),  # fmt: skip
        Line2D(
            [],
            [],
            color=WARNING_COLOUR,
            linewidth=2.4,
            linestyle=STARVING_BAR_STYLE,
            label=f"Differential pressure at a tee (flow below {pct}: starving)",
        ),  # fmt: skip
    ]
    ax.legend(
        handles=handles, loc="upper center", bbox_to_anchor=(0.5, -0.14), ncol=2,
        fontsize=8, frameon=False,
    )  # fmt: skip
