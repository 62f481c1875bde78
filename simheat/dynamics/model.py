"""Assemble the thermal model of a house and its network as flat arrays.

The state vector holds, in this order: the temperature of every water cell [°C],
every room's air node [°C], every room's structure node [°C], every thermostatic
head's sensor [°C], and the energy counters [J]: heat put in by the source, heat
given by the emitters to the rooms, heat lost by the pipes, of that the part lost
to unheated space (the rest warms the rooms the pipes run through), and for a
heat pump the electricity it uses (a boiler's run has no such counter, so its
state and its integration stay as they were before heat pumps).

Water is carried through each link by a chain of well-mixed cells (upwind transport,
which reverses with the flow); at nodes the incoming streams mix by mass flow.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from simheat.errors import ScenarioError
from simheat.hydraulics.network import LINK_EMITTER, LINK_PIPE, LINK_SOURCE, Network
from simheat.resolve import resolve
from simheat.scenario.model import Scenario

# Heat transport uses one specific heat and one density: 4190 J/(kg K) and 985 kg/m3
# are liquid water at about 55 °C (IAPWS-95); over 15-80 °C cp varies by under 0.6 %.
WATER_CP_J_KG_K = 4190.0
WATER_DENSITY_KG_M3 = 985.0
SOURCE_CELLS = 2
MIN_CELL_VOLUME_M3 = 1e-6

CELL_PIPE = 0
CELL_EMITTER = 1
CELL_SOURCE = 2
CELL_PLAIN = 3  # water volume without heat exchange (pump casing)

N_ENERGY = 4  # source, emitted to rooms, pipe losses, of which to unheated space
N_ENERGY_HEAT_PUMP = 5  # and a heat pump's electricity


@dataclass(frozen=True, eq=False)
class ThermalModel:
    """Flat arrays of the thermal model (SI units).

    Attributes
    ----------
    network : Network
        The hydraulic network the cells belong to. [-]
    cell_link : ndarray of int64
        Owning link of each cell. [-]
    link_cell_start, link_cell_count : ndarray of int64
        First cell and number of cells of each link, in flow order
        from_node -> to_node. [-]
    cell_kind : ndarray of int64
        ``CELL_PIPE``, ``CELL_EMITTER``, ``CELL_SOURCE`` or ``CELL_PLAIN``. [-]
    cell_water_kg : ndarray
        Water mass per cell. [kg]
    cell_capacity_J_K : ndarray
        Heat capacity per cell, water plus radiator metal. [J/K]
    cell_loss_W_K : ndarray
        Pipe heat loss conductance of the cell to its surroundings. [W/K]
    cell_room : ndarray of int64
        Room of the cell's surroundings or emitter, -1 for unheated space. [-]
    cell_nominal_W : ndarray
        EN 442 nominal output of the cell's share of its radiator (its nominal
        output over the number of cells). [W]
    cell_exponent : ndarray
        EN 442 exponent of the cell's radiator. [-]
    cell_convective : ndarray
        Convective fraction of the cell's radiator output. [-]
    cell_emitter : ndarray of int64
        Emitter of the cell, -1 for non-emitter cells. [-]
    room_air_loss_W_K, room_structure_loss_W_K : ndarray
        Conductances to outdoors from the air and the structure node. [W/K]
    room_air_structure_W_K : ndarray
        Conductance between air and structure. [W/K]
    room_air_capacity_J_K, room_structure_capacity_J_K : ndarray
        Heat capacities of the nodes. [J/K]
    room_gains_W : ndarray
        Internal gains into the air node. [W]
    wall_a, wall_b : ndarray of int64
        Rooms joined by each internal wall. [-]
    wall_W_K : ndarray
        Conductance of each internal wall. [W/K]
    sensor_emitter : ndarray of int64
        Emitter of each thermostatic head sensor. [-]
    sensor_link : ndarray of int64
        Link of each sensor's emitter. [-]
    sensor_room : ndarray of int64
        Room each sensor sits in. [-]
    sensor_band_K : ndarray
        Proportional band of each head. [K]
    sensor_time_constant_s : ndarray
        First-order time constant of each head's sensor. [s]
    source_cells : ndarray of int64
        Cells of the heat source (the water it heats). [-]
    source_buffer_cell : int
        The buffer tank's cell on the source's inlet (a heat pump's
        ``buffer_volume_L``), -1 without one. [-]
    n_energy : int
        Number of energy counters: ``N_ENERGY``, or ``N_ENERGY_HEAT_PUMP``
        with a heat pump's electricity. [-]
    """

    network: Network
    cell_link: np.ndarray
    link_cell_start: np.ndarray
    link_cell_count: np.ndarray
    cell_kind: np.ndarray
    cell_water_kg: np.ndarray
    cell_capacity_J_K: np.ndarray
    cell_loss_W_K: np.ndarray
    cell_room: np.ndarray
    cell_nominal_W: np.ndarray
    cell_exponent: np.ndarray
    cell_convective: np.ndarray
    cell_emitter: np.ndarray
    room_air_loss_W_K: np.ndarray
    room_structure_loss_W_K: np.ndarray
    room_air_structure_W_K: np.ndarray
    room_air_capacity_J_K: np.ndarray
    room_structure_capacity_J_K: np.ndarray
    room_gains_W: np.ndarray
    wall_a: np.ndarray
    wall_b: np.ndarray
    wall_W_K: np.ndarray
    sensor_emitter: np.ndarray
    sensor_link: np.ndarray
    sensor_room: np.ndarray
    sensor_band_K: np.ndarray
    sensor_time_constant_s: np.ndarray
    source_cells: np.ndarray
    source_buffer_cell: int = -1
    n_energy: int = N_ENERGY

    @property
    def n_cells(self) -> int:
        """Number of water cells."""
        return len(self.cell_link)

    @property
    def n_rooms(self) -> int:
        """Number of rooms."""
        return len(self.room_gains_W)

    @property
    def n_sensors(self) -> int:
        """Number of thermostatic head sensors."""
        return len(self.sensor_emitter)

    @property
    def n_states(self) -> int:
        """Length of the state vector."""
        return self.n_cells + 2 * self.n_rooms + self.n_sensors + self.n_energy

    def slices(self) -> dict[str, slice]:
        """Where each group of states sits in the state vector."""
        c, r, s = self.n_cells, self.n_rooms, self.n_sensors
        return {
            "cells": slice(0, c),
            "air": slice(c, c + r),
            "structure": slice(c + r, c + 2 * r),
            "sensors": slice(c + 2 * r, c + 2 * r + s),
            "energy": slice(c + 2 * r + s, c + 2 * r + s + self.n_energy),
        }

    def stored_heat_J(self, cell_temp_C: np.ndarray) -> np.ndarray:
        """Heat stored in water and radiator metal above 0 °C. [J].

        Parameters
        ----------
        cell_temp_C : ndarray, shape (n_cells,) or (n_times, n_cells)
            Temperature of each water cell. [°C]
        """
        return np.asarray(cell_temp_C) @ self.cell_capacity_J_K


def _structure_loss_W_K(
    h_fabric_W_K: float, h_air_structure_W_K: float, where: str
) -> float:
    """Structure-to-outdoor conductance giving the fabric loss from the air node.

    ``1/h_fabric = 1/h_air_structure + 1/h_structure_out`` (series path, as the
    ISO 13790:2008 split of opaque elements into H_tr,ms and H_tr,em).
    """
    if h_fabric_W_K <= 0.0:
        return 0.0
    if h_fabric_W_K >= h_air_structure_W_K:
        raise ScenarioError(
            f"{where}.air_loss_fraction: fabric heat loss {h_fabric_W_K:.0f} W/K "
            "(the loss not given to the air node) exceeds the "
            f"air-structure coupling {h_air_structure_W_K:.0f} W/K; raise "
            "air_loss_fraction or check the heat loss"
        )
    return 1.0 / (1.0 / h_fabric_W_K - 1.0 / h_air_structure_W_K)


def build_model(scenario: Scenario, network: Network) -> ThermalModel:
    """Cut the network into water cells and gather the room parameters.

    Parameters
    ----------
    scenario : Scenario
        The house; room capacities, couplings and heat losses and the radiator
        bodies' capacities come from its resolved form
        (:func:`simheat.resolve.resolve`). [-]
    network : Network
        A network built from the scenario. [-]

    Returns
    -------
    ThermalModel
        Arrays of the thermal model.
    """
    sim = scenario.simulation
    resolved = resolve(scenario)
    cell_link, kind, water, cap, loss, room, nominal, expo, conv, emit = (
        [] for _ in range(10)
    )
    starts = np.zeros(network.n_links, dtype=np.int64)
    counts = np.zeros(network.n_links, dtype=np.int64)
    source_cells = []
    buffer_cell = -1
    for link in range(network.n_links):
        starts[link] = len(cell_link)
        area = math.pi / 4.0 * network.inner_diameter_m[link] ** 2
        pipe_volume = area * network.length_m[link]
        link_kind = network.link_kind[link]
        surroundings = int(network.surroundings_room[link])
        if link_kind == LINK_PIPE and scenario.route.pipes_in_unheated_space:
            # Distribution pipes in a crawl space or loft: their heat is lost.
            surroundings = -1
        loss_per_m = network.loss_W_per_m_K[link]
        segments: list[
            tuple[int, float, float, float]
        ] = []  # kind, volume, metal, loss
        if link_kind == LINK_EMITTER:
            e_index = int(network.emitter_index[link])
            water_m3 = scenario.emitters[e_index].water_volume_m3
            metal_J_K = resolved.emitters[e_index].metal_capacity_J_K
            half = pipe_volume / 2.0
            half_loss = loss_per_m * network.length_m[link] / 2.0
            segments.append((CELL_PIPE, half, 0.0, half_loss))
            n = sim.emitter_cells
            for _ in range(n):
                segments.append((CELL_EMITTER, water_m3 / n, metal_J_K / n, 0.0))
            segments.append((CELL_PIPE, half, 0.0, half_loss))
        elif link_kind == LINK_SOURCE:
            volume = network.water_volume_m3[link]
            buffer_m3 = scenario.source.buffer_volume_m3
            if buffer_m3 > 0.0:
                # A buffer tank in series on the return: one well-mixed,
                # insulated volume ahead of the heated cells. The network's
                # source volume holds it (hydraulics.layouts.plant).
                buffer_cell = len(cell_link)
                segments.append((CELL_PLAIN, buffer_m3, 0.0, 0.0))
                volume -= buffer_m3
            for _ in range(SOURCE_CELLS):
                segments.append((CELL_SOURCE, volume / SOURCE_CELLS, 0.0, 0.0))
        elif link_kind == LINK_PIPE:
            n = max(
                1, math.ceil(network.length_m[link] / sim.pipe_cell_length_m - 1e-9)
            )
            for _ in range(n):
                segments.append(
                    (
                        CELL_PIPE,
                        pipe_volume / n,
                        0.0,
                        loss_per_m * network.length_m[link] / n,
                    )
                )
        else:
            segments.append((CELL_PLAIN, network.water_volume_m3[link], 0.0, 0.0))
        for cell_kind, volume, metal, cell_loss in segments:
            volume = max(volume, MIN_CELL_VOLUME_M3)
            if cell_kind == CELL_SOURCE:
                source_cells.append(len(cell_link))
            cell_link.append(link)
            kind.append(cell_kind)
            water.append(WATER_DENSITY_KG_M3 * volume)
            cap.append(WATER_DENSITY_KG_M3 * volume * WATER_CP_J_KG_K + metal)
            loss.append(cell_loss)
            room.append(surroundings)
            if cell_kind == CELL_EMITTER:
                e_index = int(network.emitter_index[link])
                e = scenario.emitters[e_index]
                nominal.append(e.nominal_power_W / sim.emitter_cells)
                expo.append(e.exponent)
                conv.append(e.convective_fraction)
                emit.append(e_index)
            else:
                nominal.append(0.0)
                expo.append(1.0)
                conv.append(1.0)
                emit.append(-1)
        counts[link] = len(cell_link) - starts[link]

    rooms = scenario.rooms
    params = resolved.rooms
    air_loss = np.array(
        [
            p.heat_loss_W_K * r.air_loss_fraction
            for r, p in zip(rooms, params, strict=True)
        ]
    )
    structure_loss = np.array(
        [
            _structure_loss_W_K(
                p.heat_loss_W_K * (1.0 - r.air_loss_fraction),
                p.air_structure_conductance_W_K,
                f"rooms[{i}]",
            )
            for i, (r, p) in enumerate(zip(rooms, params, strict=True))
        ]
    )
    links_of_emitters = network.emitter_links()
    sensors = [i for i, e in enumerate(scenario.emitters) if e.thermostatic]
    return ThermalModel(
        network=network,
        cell_link=np.array(cell_link, dtype=np.int64),
        link_cell_start=starts,
        link_cell_count=counts,
        cell_kind=np.array(kind, dtype=np.int64),
        cell_water_kg=np.array(water),
        cell_capacity_J_K=np.array(cap),
        cell_loss_W_K=np.array(loss),
        cell_room=np.array(room, dtype=np.int64),
        cell_nominal_W=np.array(nominal),
        cell_exponent=np.array(expo),
        cell_convective=np.array(conv),
        cell_emitter=np.array(emit, dtype=np.int64),
        room_air_loss_W_K=air_loss,
        room_structure_loss_W_K=structure_loss,
        room_air_structure_W_K=np.array(
            [p.air_structure_conductance_W_K for p in params]
        ),
        room_air_capacity_J_K=np.array([p.air_capacity_J_K for p in params]),
        room_structure_capacity_J_K=np.array(
            [p.structure_capacity_J_K for p in params]
        ),
        room_gains_W=np.array([r.internal_gains_W for r in rooms]),
        wall_a=np.array([w.room_a for w in scenario.internal_walls], dtype=np.int64),
        wall_b=np.array([w.room_b for w in scenario.internal_walls], dtype=np.int64),
        wall_W_K=np.array(
            [w.conductance_W_K for w in scenario.internal_walls], dtype=float
        ),
        sensor_emitter=np.array(sensors, dtype=np.int64),
        sensor_link=np.array([links_of_emitters[i] for i in sensors], dtype=np.int64),
        sensor_room=np.array(
            [scenario.emitters[i].room for i in sensors], dtype=np.int64
        ),
        sensor_band_K=np.array(
            [scenario.emitters[i].band_K for i in sensors], dtype=float
        ),
        sensor_time_constant_s=np.array(
            [scenario.emitters[i].sensor_time_constant_s for i in sensors], dtype=float
        ),
        source_cells=np.array(source_cells, dtype=np.int64),
        source_buffer_cell=buffer_cell,
        n_energy=N_ENERGY if scenario.source.heat_pump is None else N_ENERGY_HEAT_PUMP,
    )
