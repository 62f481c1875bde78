"""Steady water temperatures of a network at given flows, rooms at setpoint.

The as-piped half of ``simheat readiness``: with the flows of a scheme's flow
split, the heat source holding its outlet at the flow temperature and every
room at its setpoint, what temperature reaches each radiator and what does it
give? In a two-pipe scheme nearly the flow temperature (less the pipes'
losses); in a one-pipe loop each radiator's return cools the water of the next;
behind a low-loss header the floors' water mixes with their own return when
they circulate more than the primary side.

Each link turns its inlet temperature into an outlet temperature: the source
gives the flow temperature; a pipe loses heat to its surroundings,
``T_out = T_s + (T_in - T_s) exp(-U L / (m c_p))`` (the steady solution along
a pipe of loss ``U L`` [W/K]); a radiator branch is half its branch pipe, the
radiator at its EN 442 steady output
(:func:`simheat.physics.emitter.steady_output_W`) and the other half; pumps
pass the water on. Nodes mix their inflows by mass. Node temperatures are
swept in flow order from the source (Gauss-Seidel) until they change by less
than :data:`TEMPERATURE_TOL_K`; a loop that does not pass the source (a floor
circuit through a low-loss header) converges as its water loses heat on the
way round.
"""

from __future__ import annotations

import math
from collections import deque
from dataclasses import dataclass

import numpy as np

from simheat.errors import ConvergenceError
from simheat.hydraulics.network import LINK_EMITTER, LINK_PIPE, LINK_SOURCE, Network
from simheat.physics.emitter import steady_output_W
from simheat.physics.water import specific_heat_J_kg_K
from simheat.scenario.model import Scenario

TEMPERATURE_TOL_K = 1e-9  # sweeps stop when no node moves more than this [K]
MAX_SWEEPS = 1000
# Flows below this carry no heat in the mixing (a closed valve's leakage is
# counted; zero flow is not). [kg/s]
NO_FLOW_KG_S = 1e-12


@dataclass(frozen=True)
class SteadyHeat:
    """Steady temperatures of a network and what each radiator gives.

    Attributes
    ----------
    node_temp_C : ndarray
        Water temperature at every node. [°C]
    emitter_inlet_C : ndarray
        Temperature reaching each radiator (after its branch pipe), scenario
        order. [°C]
    emitter_output_W : ndarray
        Each radiator's steady output, scenario order. [W]
    sweeps : int
        Sweeps taken. [-]
    """

    node_temp_C: np.ndarray
    emitter_inlet_C: np.ndarray
    emitter_output_W: np.ndarray
    sweeps: int


def _flow_order(network: Network, flow_kg_s: np.ndarray, start: int) -> list[int]:
    """Nodes in breadth-first order along the flow from ``start``, then the rest."""
    downstream: list[list[int]] = [[] for _ in range(network.n_nodes)]
    for link in range(network.n_links):
        m = flow_kg_s[link]
        a, b = int(network.from_node[link]), int(network.to_node[link])
        if m > NO_FLOW_KG_S:
            downstream[a].append(b)
        elif m < -NO_FLOW_KG_S:
            downstream[b].append(a)
    seen = {start}
    order = []
    queue = deque([start])
    while queue:
        node = queue.popleft()
        order.append(node)
        for nxt in downstream[node]:
            if nxt not in seen:
                seen.add(nxt)
                queue.append(nxt)
    order.extend(n for n in range(network.n_nodes) if n not in seen)
    return order


def _along_pipe(inlet_C: float, around_C: float, loss_W_K: float, m_cp: float) -> float:
    """Outlet of a pipe losing heat to its surroundings (steady). [°C]."""
    if loss_W_K <= 0.0:
        return inlet_C
    return around_C + (inlet_C - around_C) * math.exp(-loss_W_K / m_cp)


def steady_heat(
    scenario: Scenario, network: Network, flow_kg_s: np.ndarray, flow_temp_C: float
) -> SteadyHeat:
    """Steady water temperatures and radiator outputs at given link flows.

    Parameters
    ----------
    scenario : Scenario
        The house: room setpoints, radiators, where pipes run. [-]
    network : Network
        The scheme's network. [-]
    flow_kg_s : ndarray
        Mass flow of every link (a converged flow split). [kg/s]
    flow_temp_C : float
        Temperature the source holds at its outlet. [°C]

    Returns
    -------
    SteadyHeat
        Node temperatures, each radiator's inlet temperature and output.

    Raises
    ------
    ConvergenceError
        When the sweeps do not settle within :data:`MAX_SWEEPS`.

    Notes
    -----
    One specific heat, the water's at the flow temperature (IAPWS-95 fit),
    for every link: over 30-80 °C it varies by under 0.5 %.
    """
    cp = float(specific_heat_J_kg_K(flow_temp_C))
    flow = np.asarray(flow_kg_s, dtype=float)
    setpoints = np.array([r.setpoint_C for r in scenario.rooms])
    unheated = scenario.route.unheated_space_temp_C
    source = int(network.source_links()[0])
    outlet_node = int(
        network.to_node[source] if flow[source] >= 0.0 else network.from_node[source]
    )
    order = _flow_order(network, flow, outlet_node)
    into: list[list[int]] = [[] for _ in range(network.n_nodes)]
    for link in range(network.n_links):
        m = flow[link]
        if abs(m) > NO_FLOW_KG_S:
            into[
                int(network.to_node[link] if m > 0 else network.from_node[link])
            ].append(link)
    around = np.empty(network.n_links)
    for link in range(network.n_links):
        room = int(network.surroundings_room[link])
        in_room = room >= 0 and not (
            network.link_kind[link] == LINK_PIPE
            and scenario.route.pipes_in_unheated_space
        )
        around[link] = setpoints[room] if in_room else unheated
    loss_W_K = network.loss_W_per_m_K * network.length_m
    node_C = np.full(network.n_nodes, float(flow_temp_C))
    inlet_C = np.zeros(len(scenario.emitters))
    output_W = np.zeros(len(scenario.emitters))

    def outlet(link: int) -> float:
        m = flow[link]
        upstream = int(network.from_node[link] if m > 0 else network.to_node[link])
        t_in = node_C[upstream]
        kind = network.link_kind[link]
        m_cp = abs(m) * cp
        if kind == LINK_SOURCE:
            return float(flow_temp_C)
        if kind == LINK_PIPE:
            return _along_pipe(t_in, around[link], loss_W_K[link], m_cp)
        if kind == LINK_EMITTER:
            e = int(network.emitter_index[link])
            emitter = scenario.emitters[e]
            half = 0.5 * loss_W_K[link]
            t_rad = _along_pipe(t_in, around[link], half, m_cp)
            room_C = setpoints[emitter.room]
            q = steady_output_W(
                emitter.nominal_power_W, emitter.exponent, t_rad, abs(m), room_C, cp
            )
            inlet_C[e] = t_rad
            output_W[e] = q
            return _along_pipe(t_rad - q / m_cp, around[link], half, m_cp)
        return t_in

    for sweep in range(1, MAX_SWEEPS + 1):
        change = 0.0
        for node in order:
            if node == outlet_node or not into[node]:
                continue
            mass = sum(abs(flow[k]) for k in into[node])
            mixed = sum(abs(flow[k]) * outlet(k) for k in into[node]) / mass
            change = max(change, abs(mixed - node_C[node]))
            node_C[node] = mixed
        if change < TEMPERATURE_TOL_K:
            for link in network.emitter_links():  # outputs at the settled state
                if abs(flow[link]) > NO_FLOW_KG_S:
                    outlet(int(link))
            return SteadyHeat(node_C.copy(), inlet_C, output_W, sweep)
    raise ConvergenceError(
        f"steady network temperatures did not settle in {MAX_SWEEPS} sweeps "
        f"(last change {change:.2e} K)",
        iterations=MAX_SWEEPS,
        residual=change,
        residual_unit="K",
    )
