"""Scenario sections ``[design]``, ``[[rooms]]`` and ``[[internal_walls]]``.

A room gives its heat loss as a loss coefficient or as a design heat load, or
describes its envelope (``[[rooms.elements]]`` and its ventilation) for the
heat-load calculation, or both; the resolve step derives what is not given
(:mod:`simheat.resolve.loads`), and the room capacities and couplings from the
floor area and mass class (:mod:`simheat.resolve.rooms`).
"""

from __future__ import annotations

from simheat.physics.room import MASS_CLASS_CAPACITY_J_M2_K
from simheat.scenario.common import (
    MAX_FLOOR,
    MAX_FLOW_TEMP_C,
    MAX_GAINS_W_PER_M2,
    MAX_LOAD_W_PER_M2,
    MAX_LOSS_W_PER_M2K,
    MAX_ROOM_C,
    MAX_SETPOINT_C,
    MIN_FLOOR,
    MIN_FLOW_TEMP_C,
    MIN_LOAD_W_PER_M2,
    MIN_LOSS_W_PER_M2K,
    MIN_OUTDOOR_C,
    MIN_ROOM_C,
    MIN_SETPOINT_C,
    exactly_one,
    per_area_bound,
)
from simheat.scenario.fields import Table, shown
from simheat.scenario.model import (
    Design,
    Envelope,
    EnvelopeElement,
    InternalWall,
    Room,
)

DEFAULT_AIR_LOSS_FRACTION = 0.4  # ventilation and windows; our modelling default
DEFAULT_HEIGHT_M = 2.5  # clear room height of a dwelling, common [m]
DEFAULT_MASS_CLASS = "medium"
# A room: a cupboard of 1 m2 to a hall of 1000 m2; a clear height of 1.5 m (an
# attic room) to 20 m (a stairwell over several storeys). [m2], [m]
MIN_ROOM_AREA_M2 = 1.0
MAX_ROOM_AREA_M2 = 1000.0
MIN_ROOM_HEIGHT_M = 1.5
MAX_ROOM_HEIGHT_M = 20.0
MAX_ROOM_LOSS_W_K = 1e4  # room heat loss coefficient [W/K]
MAX_ROOM_LOAD_W = 1e6  # room design heat load [W]
# Room node capacities: the air of the smallest room (1 m2 x 1.5 m, 1.8 kJ/K)
# to the structure of the largest (1000 m2 x 370 kJ/(m2 K), ISO 13790's very
# heavy class, is 3.7e5 kJ/K). [kJ/K]
MIN_CAPACITY_KJ_K = 1.0
MAX_CAPACITY_KJ_K = 1e6
# Design temperature drop: below about 1 K the design flows are out of all
# proportion (a room's load at 0.1 K is ten times the flow of a 1 K drop) and no
# valve or pump could carry them; 40 K is a 90/50 °C system. [K]
MIN_TEMPERATURE_DROP_K = 1.0
MAX_TEMPERATURE_DROP_K = 40.0
# Conductance of an internal wall between two rooms' air: an open archway of
# several m2 exchanges some hundreds of W/K. [W/K]
MAX_WALL_CONDUCTANCE_W_K = 1e4
# Envelope bounds: far beyond real building parts, they catch unit mistakes.
MAX_ELEMENT_AREA_M2 = 1000.0  # [m2]
MAX_U_W_M2K = 10.0  # single glazing is about 5.7, a bare metal door about 6 [W/(m2 K)]
MAX_TEMPERATURE_FACTOR = 1.5  # ground factors reach about 1.45 (f_g1) [-]
MAX_AIR_CHANGES_PER_H = 20.0  # [1/h]
MAX_VENTILATION_M3_H = 1e4  # [m3/h]
MAX_HEAT_RECOVERY = 0.95  # best heat-recovery units stay below this [-]
MAX_THERMAL_BRIDGE_W_M2K = 0.5  # [W/(m2 K)]
MAX_REHEAT_W_M2 = 100.0  # [W/m2]
# Thermal-bridge allowance added to the U of elements not toward a heated room
# when the room does not state one: 0.05 W/(m2 K), the simplified allowance for
# buildings built with attention to thermal bridges (EN 12831 simplified method;
# value from memory). [W/(m2 K)]
DEFAULT_THERMAL_BRIDGE_W_M2K = 0.05
# What may lie beyond an element besides another room of the scenario.
BEYOND_KINDS = ("outdoors", "ground", "unheated")
# Keys of a room that describe its envelope besides ``elements``.
ENVELOPE_KEYS = (
    "air_changes_per_h",
    "ventilation_m3_per_h",
    "heat_recovery",
    "thermal_bridge_W_per_m2K",
    "reheat_W_per_m2",
)


def read_design(t: Table) -> Design:
    """The ``[design]`` table: design outdoor and supply temperatures, drop.

    Parameters
    ----------
    t : Table
        The ``[design]`` table.

    Returns
    -------
    Design
        Design outdoor and supply temperatures [°C] and temperature drop [K].
    """
    design = Design(
        outdoor_temp_C=t.number("outdoor_temp_C", low=MIN_OUTDOOR_C, high=20.0),
        supply_temp_C=t.number(
            "supply_temp_C", low=MIN_FLOW_TEMP_C, high=MAX_FLOW_TEMP_C
        ),
        temperature_drop_K=t.number(
            "temperature_drop_K",
            low=MIN_TEMPERATURE_DROP_K,
            high=MAX_TEMPERATURE_DROP_K,
        ),
    )
    if design.supply_temp_C - design.temperature_drop_K <= MIN_SETPOINT_C:
        raise t.fail(
            "temperature_drop_K",
            f"the design return {design.supply_temp_C - design.temperature_drop_K:g}"
            f" °C must be above {MIN_SETPOINT_C:g} °C (warmer than any room), "
            f"got {design.temperature_drop_K:g}",
        )
    t.reject_unknown()
    return design


def read_room(t: Table, design: Design, room_ids: dict[str, int] | None = None) -> Room:
    """One ``[[rooms]]`` table; the setpoint must lie above the design outdoors.

    Parameters
    ----------
    t : Table
        The room's table. [-]
    design : Design
        Design conditions (outdoor temperature). [°C]
    room_ids : dict of str to int, optional
        Index of every room id, for envelope elements toward another room. [-]

    Returns
    -------
    Room
        The room in SI units, with the heat loss it states (coefficient or
        design load), its envelope and its capacities when given.
    """
    area = t.number("floor_area_m2", low=MIN_ROOM_AREA_M2, high=MAX_ROOM_AREA_M2)
    height = t.number(
        "height_m", DEFAULT_HEIGHT_M, low=MIN_ROOM_HEIGHT_M, high=MAX_ROOM_HEIGHT_M
    )
    setpoint = t.number("setpoint_C", low=MIN_SETPOINT_C, high=MAX_SETPOINT_C)
    if setpoint >= design.supply_temp_C - design.temperature_drop_K:
        raise t.fail(
            "setpoint_C",
            f"must be below the design return "
            f"{design.supply_temp_C - design.temperature_drop_K:g} °C "
            "(design.supply_temp_C - design.temperature_drop_K): radiators give "
            f"their design output only to a cooler room, got {setpoint:g}",
        )
    if setpoint <= design.outdoor_temp_C:
        raise t.fail(
            "setpoint_C",
            f"must be above design.outdoor_temp_C ({design.outdoor_temp_C:g}), "
            f"got {setpoint:g}",
        )
    envelope = read_envelope(t, room_ids or {})
    if envelope is None:
        exactly_one(t, "heat_loss_W_per_K", "design_heat_load_W")
    elif t.has("heat_loss_W_per_K") and t.has("design_heat_load_W"):
        exactly_one(t, "heat_loss_W_per_K", "design_heat_load_W")
    loss_W_K = load_W = None
    if t.has("heat_loss_W_per_K"):
        loss_W_K = t.number("heat_loss_W_per_K", positive=True, high=MAX_ROOM_LOSS_W_K)
        per_area_bound(
            t,
            "heat_loss_W_per_K",
            loss_W_K,
            area,
            MIN_LOSS_W_PER_M2K,
            MAX_LOSS_W_PER_M2K,
            "W/(m2 K)",
            "a room's loss per floor area",
        )
    elif t.has("design_heat_load_W"):
        load_W = t.number("design_heat_load_W", positive=True, high=MAX_ROOM_LOAD_W)
        per_area_bound(
            t,
            "design_heat_load_W",
            load_W,
            area,
            MIN_LOAD_W_PER_M2,
            MAX_LOAD_W_PER_M2,
            "W/m2",
            "a room's design load per floor area",
        )
    mass_class = t.text(
        "mass_class", DEFAULT_MASS_CLASS, choices=MASS_CLASS_CAPACITY_J_M2_K
    )
    c_air = c_struct = None
    if t.has("air_capacity_kJ_per_K") or t.has("structure_capacity_kJ_per_K"):
        c_air = 1e3 * t.number(
            "air_capacity_kJ_per_K", low=MIN_CAPACITY_KJ_K, high=MAX_CAPACITY_KJ_K
        )
        c_struct = 1e3 * t.number(
            "structure_capacity_kJ_per_K",
            low=MIN_CAPACITY_KJ_K,
            high=MAX_CAPACITY_KJ_K,
        )
    room = Room(
        id=t.text("id"),
        name=t.text("name", t.data.get("id", "")),
        floor=t.integer("floor", 0, low=MIN_FLOOR, high=MAX_FLOOR),
        floor_area_m2=area,
        height_m=height,
        setpoint_C=setpoint,
        heat_loss_W_K=loss_W_K,
        design_heat_load_W=load_W,
        mass_class=mass_class,
        air_capacity_J_K=c_air,
        structure_capacity_J_K=c_struct,
        air_loss_fraction=t.number(
            "air_loss_fraction", DEFAULT_AIR_LOSS_FRACTION, low=0.0, high=1.0
        ),
        internal_gains_W=_gains_W(t, area),
        envelope=envelope,
        initial_air_temp_C=t.number(
            "initial_air_temp_C", None, low=MIN_ROOM_C, high=MAX_ROOM_C
        ),
        initial_structure_temp_C=t.number(
            "initial_structure_temp_C", None, low=MIN_ROOM_C, high=MAX_ROOM_C
        ),
    )
    t.reject_unknown()
    return room


def _gains_W(t: Table, area_m2: float) -> float:
    """``internal_gains_W``: at least 0, at most :data:`MAX_GAINS_W_PER_M2`."""
    gains = t.number("internal_gains_W", 0.0, non_negative=True)
    per_area_bound(
        t,
        "internal_gains_W",
        gains,
        area_m2,
        0.0,
        MAX_GAINS_W_PER_M2,
        "W/m2",
        "internal gains per floor area",
    )
    return gains


def read_envelope(t: Table, room_ids: dict[str, int]) -> Envelope | None:
    """A room's envelope: ``[[rooms.elements]]`` and its ventilation keys.

    Parameters
    ----------
    t : Table
        The room's table. [-]
    room_ids : dict of str to int
        Index of every room id (an element may face another room). [-]

    Returns
    -------
    Envelope or None
        The envelope in SI units; None when the room has no ``elements``.

    Raises
    ------
    ScenarioError
        For a ventilation key without elements, neither or both of
        ``air_changes_per_h`` and ``ventilation_m3_per_h``, an element toward
        an unknown room or the room itself, a temperature factor missing
        (``ground``, ``unheated``) or out of place (``outdoors``, a room).
    """
    if not t.has("elements"):
        for key in ENVELOPE_KEYS:
            if t.has(key):
                raise t.fail(
                    key, "describes the envelope: give the room's elements too"
                )
        return None
    own = t.data.get("id")
    elements = tuple(
        _read_element(e, i, own, room_ids)
        for i, e in enumerate(t.tables("elements", min_len=1))
    )
    exactly_one(t, "air_changes_per_h", "ventilation_m3_per_h")
    changes = flow_m3_s = None
    if t.has("air_changes_per_h"):
        changes = t.number(
            "air_changes_per_h", non_negative=True, high=MAX_AIR_CHANGES_PER_H
        )
    else:
        flow_m3_s = (
            t.number(
                "ventilation_m3_per_h", non_negative=True, high=MAX_VENTILATION_M3_H
            )
            / 3600.0
        )
    return Envelope(
        elements=elements,
        air_changes_per_h=changes,
        ventilation_m3_s=flow_m3_s,
        heat_recovery=t.number("heat_recovery", 0.0, low=0.0, high=MAX_HEAT_RECOVERY),
        thermal_bridge_W_m2K=t.number(
            "thermal_bridge_W_per_m2K",
            DEFAULT_THERMAL_BRIDGE_W_M2K,
            non_negative=True,
            high=MAX_THERMAL_BRIDGE_W_M2K,
        ),
        reheat_W_m2=t.number(
            "reheat_W_per_m2", 0.0, non_negative=True, high=MAX_REHEAT_W_M2
        ),
    )


def _read_element(
    t: Table, index: int, own_id: object, room_ids: dict[str, int]
) -> EnvelopeElement:
    """One ``[[rooms.elements]]`` table."""
    beyond = t.text("beyond")
    room = -1
    if beyond not in BEYOND_KINDS:
        if beyond == own_id:
            raise t.fail(
                "beyond", f"an element cannot face its own room {shown(beyond)}"
            )
        if beyond not in room_ids:
            kinds = ", ".join(BEYOND_KINDS)
            raise t.fail(
                "beyond", f"must be one of {kinds} or a room id, got {shown(beyond)}"
            )
        room = room_ids[beyond]
    factor = 1.0
    if beyond in ("ground", "unheated"):
        factor = t.number(
            "temperature_factor", positive=True, high=MAX_TEMPERATURE_FACTOR
        )
    elif t.has("temperature_factor"):
        raise t.fail(
            "temperature_factor",
            f"applies to ground and unheated spaces only, not to {shown(beyond)}",
        )
    element = EnvelopeElement(
        name=t.text("name", f"element {index + 1}"),
        area_m2=t.number("area_m2", positive=True, high=MAX_ELEMENT_AREA_M2),
        u_W_m2K=t.number("u_W_per_m2K", positive=True, high=MAX_U_W_M2K),
        beyond="room" if room >= 0 else beyond,
        temperature_factor=factor,
        room=room,
    )
    t.reject_unknown()
    return element


def read_wall(t: Table, room_ids: dict[str, int]) -> InternalWall:
    """One ``[[internal_walls]]`` table: two different known rooms, a conductance.

    Parameters
    ----------
    t : Table
        The wall's table. [-]
    room_ids : dict of str to int
        Index of each room id. [-]

    Returns
    -------
    InternalWall
        The rooms' indices and the conductance. [W/K]
    """
    pair = t.raw("rooms")
    if (
        not isinstance(pair, list)
        or len(pair) != 2
        or not all(isinstance(name, str) for name in pair)
    ):
        raise t.fail("rooms", f"must name two rooms, got {shown(pair)}")
    for name in pair:
        if name not in room_ids:
            raise t.fail("rooms", f"unknown room {shown(name)}")
    if pair[0] == pair[1]:
        raise t.fail("rooms", f"a wall joins two different rooms, got {shown(pair)}")
    wall = InternalWall(
        room_ids[pair[0]],
        room_ids[pair[1]],
        t.number("conductance_W_per_K", positive=True, high=MAX_WALL_CONDUCTANCE_W_K),
    )
    t.reject_unknown()
    return wall
