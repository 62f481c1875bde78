"""The resolve step: a validated scenario turned into what the solvers need.

:func:`resolve` derives, once per scenario object, every quantity the layouts,
the flow solver and the thermal model take that the scenario file does not state
directly: each room's heat loss, design load, capacities and coupling; each
emitter's Kv, body capacity and design flow; every pump's fitted curve; and it
checks what needs those derived quantities (set heads against the curves,
manifold positions and split points against the runs).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from simheat.physics.water import specific_heat_J_kg_K
from simheat.resolve.emitters import (
    STEEL_CP_J_KG_K,
    ResolvedEmitter,
    design_mass_flows_kg_s,
    emitter_kv_m3_h,
    lockshield_kv_m3_h,
    valve_kv_m3_h,
)
from simheat.resolve.pumps import ResolvedPump, resolve_pump
from simheat.resolve.rooms import ResolvedRoom, resolve_room
from simheat.resolve.route import check_route
from simheat.scenario.model import Scenario


@dataclass(frozen=True, eq=False)
class ResolvedScenario:
    """Derived quantities of a scenario, in the order of its rooms and emitters.

    Attributes
    ----------
    rooms : tuple of ResolvedRoom
        One per ``scenario.rooms``: heat loss, design load, capacities, coupling. [-]
    emitters : tuple of ResolvedEmitter
        One per ``scenario.emitters``: Kv, body capacity, design flow. [-]
    pump : ResolvedPump
        The ``[pump]`` table's pump with its fitted curve. [-]
    primary_pump : ResolvedPump or None
        ``[layout.primary_pump]``, when given. [-]
    floor_pumps : dict of int to ResolvedPump
        ``[[layout.floor_pumps]]`` by floor number, in file order. [-]
    design_water_temp_C : float
        Mean design water temperature: supply minus half the drop. [°C]
    """

    rooms: tuple[ResolvedRoom, ...]
    emitters: tuple[ResolvedEmitter, ...]
    pump: ResolvedPump
    primary_pump: ResolvedPump | None
    floor_pumps: dict[int, ResolvedPump]
    design_water_temp_C: float

    @property
    def design_mass_flow_kg_s(self) -> np.ndarray:
        """Design mass flow of each emitter, in scenario order. [kg/s]."""
        return np.array([e.design_mass_flow_kg_s for e in self.emitters])

    def plant_pump(self) -> ResolvedPump:
        """The pump at the heat source behind a low-loss header.

        The primary pump when the scenario gives one, else the ``[pump]``.
        """
        return self.primary_pump or self.pump

    def floor_pump(self, floor: int) -> ResolvedPump:
        """The pump of a floor's own circuit: its own table, else the ``[pump]``.

        Parameters
        ----------
        floor : int
            Storey number. [-]

        Returns
        -------
        ResolvedPump
            The floor's pump.
        """
        return self.floor_pumps.get(floor, self.pump)


def resolve(scenario: Scenario) -> ResolvedScenario:
    """Derive what the solvers need from a validated scenario.

    Parameters
    ----------
    scenario : Scenario
        A scenario from :func:`simheat.scenario.load_scenario` or
        :func:`simheat.scenario.parse_scenario`. [-]

    Returns
    -------
    ResolvedScenario
        The derived quantities. A pure function of the scenario, computed
        afresh on each call (well under a millisecond for a house); callers
        that need it many times keep the result.

    Raises
    ------
    ScenarioError
        When a check that needs a derived quantity fails: a pump whose points
        give no usable curve or whose set head is not below the curve's
        shut-off head (``pump.setpoint_kPa`` ...), a manifold position off its
        run or a split point that leaves a circuit empty
        (``route.floors[i]....``). Messages name the scenario key, as the
        loader's do.

    Notes
    -----
    Design flows use the specific heat of water at the mean design water
    temperature (IAPWS-95 fit of :mod:`simheat.physics.water`).
    """
    origin = scenario.source_path
    design = scenario.design
    rooms = tuple(
        resolve_room(room, design, scenario.rooms, f"rooms[{i}]", origin)
        for i, room in enumerate(scenario.rooms)
    )
    water_temp_C = design.supply_temp_C - 0.5 * design.temperature_drop_K
    flows = design_mass_flows_kg_s(
        scenario.emitters,
        [room.design_heat_load_W for room in rooms],
        design.temperature_drop_K,
        float(specific_heat_J_kg_K(water_temp_C)),
    )
    emitters = tuple(
        ResolvedEmitter(
            kv_m3_h=emitter_kv_m3_h(e, scenario.valve_types),
            metal_capacity_J_K=e.metal_mass_kg * STEEL_CP_J_KG_K,
            design_mass_flow_kg_s=float(flow),
            valve_kv_m3_h=valve_kv_m3_h(e, scenario.valve_types),
            lockshield_kv_m3_h=lockshield_kv_m3_h(e, scenario.valve_types),
        )
        for e, flow in zip(scenario.emitters, flows, strict=True)
    )
    check_route(scenario.route, flows, origin)
    layout = scenario.layout
    pump = resolve_pump(scenario.pump, "pump", origin)
    primary = (
        None
        if layout.primary_pump is None
        else resolve_pump(layout.primary_pump, "layout.primary_pump", origin)
    )
    floor_pumps = {
        floor: resolve_pump(p, f"layout.floor_pumps[{i}]", origin)
        for i, (floor, p) in enumerate(layout.floor_pumps.items())
    }
    return ResolvedScenario(
        rooms=rooms,
        emitters=emitters,
        pump=pump,
        primary_pump=primary,
        floor_pumps=floor_pumps,
        design_water_temp_C=water_temp_C,
    )
