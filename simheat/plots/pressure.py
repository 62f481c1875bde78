"""Pressure figure: pressure along supply and return, and what each tee gets.

The picture that shows where emitters starve: the supply line's pressure falls
away from the plant, the return line's rises towards it, and the gap between them
at an emitter's tee points is the differential pressure that drives water through
that emitter. It is drawn for the steady design point: every valve fully open,
water everywhere at the design supply temperature.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from simheat.analysis.flows import STARVING_FRACTION
from simheat.hydraulics.network import (
    LINE_RETURN,
    LINE_SUPPLY,
    LINK_PIPE,
    LINK_PUMP,
    Network,
)
from simheat.hydraulics.solver import Flows, solve_flows
from simheat.plots._style import (
    ACCENT_COLOUR,
    FIGURE_SIZE_IN,
    GRID_STYLE,
    NEUTRAL_COLOUR,
    RETURN_COLOUR,
    SUPPLY_COLOUR,
    WARNING_COLOUR,
    scheme_title,
)

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

    from simheat.runs.run import Run

PA_PER_KPA = 1000.0  # [Pa/kPa]
FLOOR_MARKERS = ("o", "s", "^", "D", "v")  # one node marker per floor, cycled
STARVING_BAR_STYLE = (0, (1.0, 0.6))  # dotted: a starving tee, not by colour alone
# Share of the pressure range kept free below zero for the tee labels. [-]
LABEL_STRIP = 0.2
PANEL_HEIGHT_IN = 4.2  # height of each floor's panel in a new figure [in]


@dataclass(frozen=True)
class FloorLines:
    """Links drawn for one floor: the supply and return paths and its emitters.

    Attributes
    ----------
    floor : int
        Storey number. [-]
    supply_links, return_links : tuple of int
        Pipe links on the supply path from the plant to the floor's supply tees,
        and on the return path from its return tees back to the plant.
    emitters : tuple of int
        Emitter indices on this floor, in route order.
    """

    floor: int
    supply_links: tuple[int, ...]
    return_links: tuple[int, ...]
    emitters: tuple[int, ...]


def design_point_flows(run: Run) -> Flows:
    """Steady flow split of the run's network at its design point.

    Parameters
    ----------
    run : Run
        A simulated (or loaded) run; its stored network is solved. [-]

    Returns
    -------
    Flows
        Link flows and node pressures with every valve fully open and water at
        the scenario's design supply temperature everywhere.

    Raises
    ------
    ConvergenceError
        When the flow solve does not converge.
    """
    return solve_flows(run.network, water_temp_C=run.scenario.design.supply_temp_C)


def floor_lines(run: Run) -> tuple[FloorLines, ...]:
    """Split the network's supply and return pipes by the floor they serve.

    Walks upstream along supply-line pipes from each emitter's supply tee to the
    plant, and downstream along return-line pipes from each return tee to the
    plant; the links met serve that emitter's floor. Pipes shared by several
    floors (feed, risers) belong to each of them.

    Parameters
    ----------
    run : Run
        The run; its network and route are used. [-]

    Returns
    -------
    tuple of FloorLines
        One per floor of the route, in route order.
    """
    network = run.network
    scenario = run.scenario
    into_supply = _pipes_by_node(network, LINE_SUPPLY, network.to_node)
    out_of_return = _pipes_by_node(network, LINE_RETURN, network.from_node)
    links = network.emitter_links()
    result = []
    for floor in scenario.route.floors:
        emitters = tuple(tee.emitter for tee in floor.tees)
        supply: dict[int, None] = {}  # ordered set
        returns: dict[int, None] = {}
        for e in emitters:
            link = links[e]
            supply.update(
                dict.fromkeys(
                    _walk(network.from_node[link], into_supply, network.from_node)
                )
            )
            returns.update(
                dict.fromkeys(
                    _walk(network.to_node[link], out_of_return, network.to_node)
                )
            )
        result.append(FloorLines(floor.floor, tuple(supply), tuple(returns), emitters))
    return tuple(result)


def _pipes_by_node(network: Network, line: int, node_of_link: np.ndarray) -> dict:
    """Map node -> pipe link of ``line`` that has the node at the given end."""
    on_line = network.node_line == line
    found = {}
    for k in np.flatnonzero(network.link_kind == LINK_PIPE):
        if on_line[network.from_node[k]] and on_line[network.to_node[k]]:
            found.setdefault(int(node_of_link[k]), int(k))
    return found


def _walk(start: int, next_link: dict, other_end: np.ndarray) -> list[int]:
    """Follow ``next_link`` from node to node; return the links met."""
    met: list[int] = []
    node = int(start)
    while node in next_link and next_link[node] not in met:
        link = next_link[node]
        met.append(link)
        node = int(other_end[link])
    return met


def plot_pressure(run: Run, ax: Axes | None = None) -> Figure:
    """Plot pressure along the supply and return lines and each tee's differential.

    Solves the run's network at its design point (every valve fully open, water
    at the design supply temperature) and draws the gauge pressure of every
    supply and return node against its pipe distance from the plant. At each
    emitter's tee points a vertical bar spans the differential pressure available
    to the emitter. Its value and the emitter's flow as a share of its design
    flow are written in a strip below zero pressure (emitters on the same pair of
    nodes, as at a manifold, share one bar and one label); tees below
    :data:`~simheat.analysis.flows.STARVING_FRACTION` of design are drawn dotted
    in the warning colour, their share in bold. Emitter ids run along the top.

    Parameters
    ----------
    run : Run
        A simulated (or loaded) run. [-]
    ax : matplotlib.axes.Axes, optional
        Axes to draw every floor into; when omitted a new figure gets one panel
        per floor, stacked, sharing both axes. [-]

    Returns
    -------
    matplotlib.figure.Figure
        The figure. Lines carry the gids ``"supply:floor<n>"`` and
        ``"return:floor<n>"`` (segments separated by NaN, x in m, y in kPa) and
        ``"dp:<emitter id>"`` (y from return to supply pressure, in kPa).

    Raises
    ------
    ConvergenceError
        When the design-point flow solve does not converge.

    Notes
    -----
    Pressures are relative to the pump inlet, where the expansion vessel holds
    the pressure. Distances are pipe lengths along each line from the plant.
    """
    flows = design_point_flows(run)
    floors = floor_lines(run)
    if ax is None:
        from matplotlib.figure import Figure

        height = max(FIGURE_SIZE_IN[1], PANEL_HEIGHT_IN * len(floors) + 1.4)
        fig = Figure(figsize=(FIGURE_SIZE_IN[0], height), layout="constrained")
        panels = fig.subplots(len(floors), 1, sharex=True, sharey=True, squeeze=False)
        axes = list(panels[:, 0])
    else:
        fig = ax.figure
        axes = [ax] * len(floors)

    pressure_kPa = flows.pressure_Pa / PA_PER_KPA
    for j, (panel, lines) in enumerate(zip(axes, floors, strict=True)):
        _draw_floor(panel, run, flows, pressure_kPa, lines, j)

    top_kPa = float(np.max(pressure_kPa))
    for panel in dict.fromkeys(axes):
        panel.set_ylim(-LABEL_STRIP * top_kPa, (1.0 + 0.05) * top_kPa)
        # No ticks in the label strip: no pressure there is below the pump inlet's.
        panel.set_yticks([t for t in panel.get_yticks() if 0.0 <= t <= top_kPa])
        panel.axhline(0.0, color=NEUTRAL_COLOUR, linewidth=0.6)
        panel.set_ylabel("Pressure above pump inlet [kPa]")
        panel.grid(True, **GRID_STYLE)
        panel.set_xlim(left=-0.5)
    axes[-1].set_xlabel("Pipe distance from the plant [m]")
    temp_C = run.scenario.design.supply_temp_C
    title = (
        scheme_title(run, "pressure along supply and return")
        + f"\ndesign point: all valves fully open, water at {temp_C:.0f} °C;"
        + f" pump rise {_pump_rise_kPa(run.network, pressure_kPa):.1f} kPa"
    )
    if len(dict.fromkeys(axes)) > 1:
        fig.suptitle(title)
        for panel, lines in zip(axes, floors, strict=True):
            panel.set_title(f"floor {lines.floor}", loc="left", fontsize=9)
    else:
        axes[0].set_title(title)
    _legend(axes[-1], floors, len(dict.fromkeys(axes)) > 1)
    return fig


def _pump_rise_kPa(network: Network, pressure_kPa: np.ndarray) -> float:
    """Largest pressure rise across a pump link. [kPa]."""
    pumps = np.flatnonzero(network.link_kind == LINK_PUMP)
    rise = pressure_kPa[network.to_node[pumps]] - pressure_kPa[network.from_node[pumps]]
    return float(np.max(rise)) if len(rise) else 0.0


def _segments(network: Network, links: tuple[int, ...], pressure_kPa: np.ndarray):
    """Coordinates of the links as one NaN-separated polyline (m, kPa)."""
    x, y = [], []
    for k in links:
        a, b = network.from_node[k], network.to_node[k]
        x += [network.node_distance_m[a], network.node_distance_m[b], np.nan]
        y += [pressure_kPa[a], pressure_kPa[b], np.nan]
    return np.array(x[:-1]), np.array(y[:-1])


def _draw_floor(
    ax: Axes,
    run: Run,
    flows: Flows,
    pressure_kPa: np.ndarray,
    lines: FloorLines,
    index: int,
) -> None:
    """Supply and return lines, tee bars and their labels of one floor."""
    network = run.network
    marker = FLOOR_MARKERS[index % len(FLOOR_MARKERS)]
    for which, links, colour, style in (
        ("supply", lines.supply_links, SUPPLY_COLOUR, "-"),
        ("return", lines.return_links, RETURN_COLOUR, "--"),
    ):
        x, y = _segments(network, links, pressure_kPa)
        ax.plot(
            x, y, color=colour, linestyle=style, linewidth=1.6, marker=marker,
            markersize=4, gid=f"{which}:floor{lines.floor}",
        )  # fmt: skip

    # Emitters on the same pair of nodes (a manifold) share one bar and one label.
    emitter_links = network.emitter_links()
    groups: dict[tuple[int, int], list[int]] = {}
    for e in lines.emitters:
        link = emitter_links[e]
        key = (int(network.from_node[link]), int(network.to_node[link]))
        groups.setdefault(key, []).append(e)
    positions, names = [], []
    for (supply_node, return_node), members in groups.items():
        x = float(network.node_distance_m[supply_node])
        low, high = pressure_kPa[return_node], pressure_kPa[supply_node]
        shares = [
            flows.mass_flow_kg_s[emitter_links[e]]
            / run.summary.emitters[e].design_flow_kg_s
            for e in members
        ]
        starving = min(shares) < STARVING_FRACTION
        for e in members:
            ax.plot(
                [x, x], [low, high],
                color=WARNING_COLOUR if starving else ACCENT_COLOUR,
                linestyle=STARVING_BAR_STYLE if starving else "-", linewidth=2.4,
                solid_capstyle="butt", gid=f"dp:{run.summary.emitters[e].id}",
            )  # fmt: skip
        if len(members) == 1:
            share_text = f"{100.0 * shares[0]:.0f} %"
            names.append(run.summary.emitters[members[0]].id)
        else:
            share_text = f"{100.0 * min(shares):.0f}\u2013{100.0 * max(shares):.0f} %"
            names.append(f"{len(members)} emitters")
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


def _legend(ax: Axes, floors: tuple[FloorLines, ...], panels: bool) -> None:
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
