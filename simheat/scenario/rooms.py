"""Scenario sections ``[design]``, ``[[rooms]]`` and ``[[internal_walls]]``.

A room gives its heat loss either as a loss coefficient or as a design heat load;
the resolve step derives the other (:mod:`simheat.resolve.loads`), and the room
capacities and couplings from the floor area and mass class
(:mod:`simheat.resolve.rooms`).
"""

from __future__ import annotations

from simheat.physics.room import MASS_CLASS_CAPACITY_J_M2_K
from simheat.scenario.common import MAX_FLOOR, exactly_one
from simheat.scenario.fields import Table
from simheat.scenario.model import Design, InternalWall, Room

DEFAULT_AIR_LOSS_FRACTION = 0.4  # ventilation and windows; our modelling default
DEFAULT_HEIGHT_M = 2.5  # clear room height of a dwelling, common [m]
DEFAULT_MASS_CLASS = "medium"
MAX_ROOM_AREA_M2 = 1000.0  # [m2]
MAX_ROOM_HEIGHT_M = 20.0  # [m]
MAX_ROOM_LOSS_W_K = 1e4  # room heat loss coefficient [W/K]
MAX_ROOM_LOAD_W = 1e6  # room design heat load [W]
MAX_CAPACITY_KJ_K = 1e6  # room node heat capacity [kJ/K]


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
        outdoor_temp_C=t.number("outdoor_temp_C", low=-50.0, high=20.0),
        supply_temp_C=t.number("supply_temp_C", low=25.0, high=95.0),
        temperature_drop_K=t.number("temperature_drop_K", positive=True, high=40.0),
    )
    t.reject_unknown()
    return design


def read_room(t: Table, design: Design) -> Room:
    """One ``[[rooms]]`` table; the setpoint must lie above the design outdoors.

    Parameters
    ----------
    t : Table
        The room's table. [-]
    design : Design
        Design conditions (outdoor temperature). [°C]

    Returns
    -------
    Room
        The room in SI units, with the heat loss it states (coefficient or
        design load) and its capacities when given.
    """
    area = t.number("floor_area_m2", positive=True, high=MAX_ROOM_AREA_M2)
    height = t.number(
        "height_m", DEFAULT_HEIGHT_M, positive=True, high=MAX_ROOM_HEIGHT_M
    )
    setpoint = t.number("setpoint_C", low=5.0, high=30.0)
    if setpoint <= design.outdoor_temp_C:
        raise t.fail(
            "setpoint_C",
            f"must be above design.outdoor_temp_C ({design.outdoor_temp_C:g}), "
            f"got {setpoint:g}",
        )
    exactly_one(t, "heat_loss_W_per_K", "design_heat_load_W")
    loss_W_K = load_W = None
    if t.has("heat_loss_W_per_K"):
        loss_W_K = t.number("heat_loss_W_per_K", positive=True, high=MAX_ROOM_LOSS_W_K)
    else:
        load_W = t.number("design_heat_load_W", positive=True, high=MAX_ROOM_LOAD_W)
    mass_class = t.text(
        "mass_class", DEFAULT_MASS_CLASS, choices=MASS_CLASS_CAPACITY_J_M2_K
    )
    c_air = c_struct = None
    if t.has("air_capacity_kJ_per_K") or t.has("structure_capacity_kJ_per_K"):
        c_air = 1e3 * t.number(
            "air_capacity_kJ_per_K", positive=True, high=MAX_CAPACITY_KJ_K
        )
        c_struct = 1e3 * t.number(
            "structure_capacity_kJ_per_K", positive=True, high=MAX_CAPACITY_KJ_K
        )
    room = Room(
        id=t.text("id"),
        name=t.text("name", t.data.get("id", "")),
        floor=t.integer("floor", 0, low=-5, high=MAX_FLOOR),
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
        internal_gains_W=t.number("internal_gains_W", 0.0, non_negative=True),
    )
    t.reject_unknown()
    return room


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
        raise t.fail("rooms", f"must name two rooms, got {pair!r}")
    for name in pair:
        if name not in room_ids:
            raise t.fail("rooms", f"unknown room {name!r}")
    if pair[0] == pair[1]:
        raise t.fail("rooms", f"a wall joins two different rooms, got {pair!r}")
    wall = InternalWall(
        room_ids[pair[0]],
        room_ids[pair[1]],
        t.number("conductance_W_per_K", positive=True),
    )
    t.reject_unknown()
    return wall
