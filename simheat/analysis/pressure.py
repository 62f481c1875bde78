"""Pressure along the supply and return lines, and what each tee gets.

The picture that shows where emitters starve: the supply line's pressure falls
away from the plant, the return line's rises towards it, and the gap between them
at an emitter's tee points is the differential pressure that drives water through
that emitter. Computed at the steady design point: every valve fully open, water
everywhere at the design supply temperature.
:func:`simheat.plots.pressure.plot_pressure` draws the result.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from simheat.analysis.flows import STARVING_FRACTION
from simheat.hydraulics.network import (
    LINE_RETURN,
    LINE_SUPPLY,
    LINK_PIPE,
    LINK_PUMP,
    Network,
)
from simheat.hydraulics.solver import solve_flows
from simheat.runs.run import Run
from simheat.scenario.model import Route, Scenario

__all__ = [
    "FloorLines",
    "FloorPressure",
    "PressureProfile",
    "TeePressure",
    "design_pressure_profile",
    "floor_lines",
    "pressure_profile",
]


@dataclass(frozen=True)
class FloorLines:
    """Links that serve one floor: the supply and return paths and its emitters.

    Attributes
    ----------
    floor : int
        Storey number. [-]
    supply_links, return_links : tuple of int
        Pipe links on the supply path from the plant to the floor's supply tees,
        and on the return path from its return tees back to the plant. [-]
    emitters : tuple of int
        Emitter indices on this floor, in route order. [-]
    """

    floor: int
    supply_links: tuple[int, ...]
    return_links: tuple[int, ...]
    emitters: tuple[int, ...]


@dataclass(frozen=True)
class TeePressure:
    """Pressures at one pair of supply and return tee points, and their emitters.

    Emitters on the same pair of nodes (as at a manifold) share one entry.

    Attributes
    ----------
    distance_m : float
        Pipe distance of the supply tee from the plant. [m]
    supply_pressure_Pa, return_pressure_Pa : float
        Gauge pressure at the supply and return tee points. [Pa]
    emitter_ids : tuple of str
        Emitters between these two nodes, in route order. [-]
    flow_share : tuple of float
        Each emitter's flow as a share of its design flow (1 for one shut for
        good, which has none). [-]
    """

    distance_m: float
    supply_pressure_Pa: float
    return_pressure_Pa: float
    emitter_ids: tuple[str, ...]
    flow_share: tuple[float, ...]

    @property
    def dp_Pa(self) -> float:
        """Differential pressure available to the emitters. [Pa]."""
        return self.supply_pressure_Pa - self.return_pressure_Pa

    @property
    def starving(self) -> bool:
        """Whether an emitter gets less than :data:`STARVING_FRACTION` of design."""
        return min(self.flow_share) < STARVING_FRACTION


@dataclass(frozen=True)
class FloorPressure:
    """Pressure along one floor's supply and return paths, and its tees.

    Attributes
    ----------
    floor : int
        Storey number. [-]
    supply_distance_m, supply_pressure_Pa : ndarray
        The supply path as a polyline: pipe distance from the plant [m] and gauge
        pressure [Pa] at both ends of each pipe link, links separated by NaN.
    return_distance_m, return_pressure_Pa : ndarray
        The return path, the same way. [m], [Pa]
    tees : tuple of TeePressure
        The floor's tee pairs in route order. [-]
    """

    floor: int
    supply_distance_m: np.ndarray
    supply_pressure_Pa: np.ndarray
    return_distance_m: np.ndarray
    return_pressure_Pa: np.ndarray
    tees: tuple[TeePressure, ...]

    @property
    def emitter_ids(self) -> tuple[str, ...]:
        """Every emitter of the floor, in route order."""
        return tuple(i for tee in self.tees for i in tee.emitter_ids)


@dataclass(frozen=True)
class PressureProfile:
    """Pressures along supply and return of one scheme at one operating point.

    Attributes
    ----------
    scenario_name : str
        The house. [-]
    scheme : str
        Piping scheme. [-]
    water_temp_C : float
        Uniform water temperature of the flow solve. [°C]
    pump_rise_Pa : float
        Largest pressure rise across a pump. [Pa]
    highest_pressure_Pa : float
        Highest gauge pressure of any node. [Pa]
    floors : tuple of FloorPressure
        One per floor of the route, in route order. [-]

    Notes
    -----
    Pressures are relative to the pump inlet, where the expansion vessel holds
    the pressure. Distances are pipe lengths along each line from the plant.
    """

    scenario_name: str
    scheme: str
    water_temp_C: float
    pump_rise_Pa: float
    highest_pressure_Pa: float
    floors: tuple[FloorPressure, ...]


def floor_lines(network: Network, route: Route) -> tuple[FloorLines, ...]:
    """Split the network's supply and return pipes by the floor they serve.

    Walks upstream along supply-line pipes from each emitter's supply tee to the
    plant, and downstream along return-line pipes from each return tee to the
    plant; the links met serve that emitter's floor. Pipes shared by several
    floors (feed, risers) belong to each of them.

    Parameters
    ----------
    network : Network
        The built network. [-]
    route : Route
        The scenario's route (floors and their tees). [-]

    Returns
    -------
    tuple of FloorLines
        One per floor of the route, in route order.
    """
    into_supply = _pipes_by_node(network, LINE_SUPPLY, network.to_node)
    out_of_return = _pipes_by_node(network, LINE_RETURN, network.from_node)
    links = network.emitter_links()
    result = []
    for floor in route.floors:
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


def _polyline(
    network: Network, links: tuple[int, ...], pressure_Pa: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """Distance [m] and pressure [Pa] at both ends of each link, NaN-separated."""
    x: list[float] = []
    y: list[float] = []
    for k in links:
        a, b = network.from_node[k], network.to_node[k]
        x += [network.node_distance_m[a], network.node_distance_m[b], np.nan]
        y += [pressure_Pa[a], pressure_Pa[b], np.nan]
    return np.array(x[:-1]), np.array(y[:-1])


def _tees(
    network: Network,
    emitter_ids: Sequence[str],
    lines: FloorLines,
    pressure_Pa: np.ndarray,
    mass_flow_kg_s: np.ndarray,
    design_flow_kg_s: Sequence[float],
) -> tuple[TeePressure, ...]:
    """The floor's emitters grouped by their pair of tee nodes, in route order."""
    emitter_links = network.emitter_links()
    groups: dict[tuple[int, int], list[int]] = {}
    for e in lines.emitters:
        link = emitter_links[e]
        key = (int(network.from_node[link]), int(network.to_node[link]))
        groups.setdefault(key, []).append(e)
    return tuple(
        TeePressure(
            distance_m=float(network.node_distance_m[supply_node]),
            supply_pressure_Pa=float(pressure_Pa[supply_node]),
            return_pressure_Pa=float(pressure_Pa[return_node]),
            emitter_ids=tuple(emitter_ids[e] for e in members),
            flow_share=tuple(
                float(mass_flow_kg_s[emitter_links[e]] / design_flow_kg_s[e])
                if design_flow_kg_s[e] > 0.0
                else 1.0  # shut for good: not starving
                for e in members
            ),
        )
        for (supply_node, return_node), members in groups.items()
    )


def pressure_profile(
    network: Network,
    scenario: Scenario,
    design_flow_kg_s: Sequence[float],
    water_temp_C: float | None = None,
    *,
    scheme: str | None = None,
) -> PressureProfile:
    """Solve a network with every valve open and read pressures along its lines.

    Parameters
    ----------
    network : Network
        The built network of one scheme for ``scenario``. [-]
    scenario : Scenario
        The house; its route splits the lines by floor. [-]
    design_flow_kg_s : sequence of float
        Design mass flow of each emitter, in scenario order. [kg/s]
    water_temp_C : float, optional
        Uniform water temperature; the design supply temperature by default. [°C]
    scheme : str, optional
        Scheme name to report; the network's own by default. [-]

    Returns
    -------
    PressureProfile
        Node pressures along each floor's supply and return paths and the
        differential pressure and flow share at each tee pair.

    Raises
    ------
    ConvergenceError
        When the flow solve does not converge.

    Notes
    -----
    One steady solve (:func:`simheat.hydraulics.solver.solve_flows`) with every
    valve fully open; the flow share of an emitter is its flow over its design
    flow.
    """
    temp_C = scenario.design.supply_temp_C if water_temp_C is None else water_temp_C
    flows = solve_flows(network, water_temp_C=temp_C)
    pressure_Pa = np.asarray(flows.pressure_Pa)
    mass_flow_kg_s = np.asarray(flows.mass_flow_kg_s)
    floors = []
    for lines in floor_lines(network, scenario.route):
        supply_x, supply_p = _polyline(network, lines.supply_links, pressure_Pa)
        return_x, return_p = _polyline(network, lines.return_links, pressure_Pa)
        floors.append(
            FloorPressure(
                floor=lines.floor,
                supply_distance_m=supply_x,
                supply_pressure_Pa=supply_p,
                return_distance_m=return_x,
                return_pressure_Pa=return_p,
                tees=_tees(
                    network,
                    [e.id for e in scenario.emitters],
                    lines,
                    pressure_Pa,
                    mass_flow_kg_s,
                    design_flow_kg_s,
                ),
            )
        )
    pumps = np.flatnonzero(network.link_kind == LINK_PUMP)
    rise_Pa = (
        pressure_Pa[network.to_node[pumps]] - pressure_Pa[network.from_node[pumps]]
    )
    return PressureProfile(
        scenario_name=scenario.name,
        scheme=network.scheme if scheme is None else scheme,
        water_temp_C=float(temp_C),
        pump_rise_Pa=float(np.max(rise_Pa)) if len(rise_Pa) else 0.0,
        highest_pressure_Pa=float(np.max(pressure_Pa)),
        floors=tuple(floors),
    )


def design_pressure_profile(run: Run) -> PressureProfile:
    """Pressure profile of a run's network at its design point.

    Parameters
    ----------
    run : Run
        A simulated (or loaded) run; its stored network is solved. [-]

    Returns
    -------
    PressureProfile
        The profile with every valve fully open and water at the scenario's
        design supply temperature everywhere; flow shares against the run
        summary's design flows.

    Raises
    ------
    ConvergenceError
        When the flow solve does not converge.
    """
    design = [e.design_flow_kg_s for e in run.summary.emitters]
    return pressure_profile(run.network, run.scenario, design, scheme=run.scheme)
