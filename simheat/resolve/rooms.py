"""Room parameters of the two-node RC model, resolved from the scenario.

Capacities and the air-structure coupling follow the simple method of ISO
13790:2008 (:mod:`simheat.physics.room`) from the floor area, height and mass
class, unless the scenario gives the capacities; the heat loss comes from
:mod:`simheat.resolve.loads`.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from simheat.errors import ScenarioError
from simheat.physics import room as room_physics
from simheat.resolve.loads import (
    EnvelopeLoad,
    design_heat_load_W,
    envelope_load,
    heat_loss_W_K,
)
from simheat.scenario.model import Design, Room


@dataclass(frozen=True)
class ResolvedRoom:
    """What the thermal model needs of a room beyond the scenario's values.

    Attributes
    ----------
    heat_loss_W_K : float
        Total heat loss coefficient to outdoors (fabric plus ventilation). [W/K]
    design_heat_load_W : float
        Heat loss at the design outdoor temperature and the setpoint. [W]
    air_capacity_J_K, structure_capacity_J_K : float
        Heat capacities of the air node (air and furnishings) and of the
        structure node. [J/K]
    air_structure_conductance_W_K : float
        Conductance between the air and structure nodes. [W/K]
    envelope_load : EnvelopeLoad or None
        The design load computed from the room's envelope, when it has one;
        it drives the model only when the room gives no load or coefficient. [-]
    load_given : bool
        Whether the scenario gives the load or loss coefficient (which then
        drives the model); False when the load is computed from the envelope. [-]
    """

    heat_loss_W_K: float
    design_heat_load_W: float
    air_capacity_J_K: float
    structure_capacity_J_K: float
    air_structure_conductance_W_K: float
    envelope_load: EnvelopeLoad | None = None
    load_given: bool = True


def resolve_room(
    room: Room,
    design: Design,
    rooms: Sequence[Room] = (),
    where: str = "rooms",
    origin: str = "",
) -> ResolvedRoom:
    """Heat loss, capacities and coupling of one room.

    Parameters
    ----------
    room : Room
        The room as the scenario gives it (floor area [m2], height [m], mass
        class, optional capacities [J/K], heat loss [W/K], load [W] or
        envelope).
    design : Design
        Design conditions. [°C]
    rooms : sequence of Room
        Every room of the scenario (setpoints beyond envelope elements). [°C]
    where : str
        Key path of the room's table, for messages (``rooms[2]``). [-]
    origin : str
        The scenario's origin, for messages. [-]

    Returns
    -------
    ResolvedRoom
        The room's model parameters.

    Raises
    ------
    ScenarioError
        When an envelope gives no load, or the internal gains exceed the
        design heat load (the room would need no heating).

    Notes
    -----
    ISO 13790:2008: structure capacity ``C_m = kappa A_f`` (Table 12), coupling
    the series value of ``H_is`` (eq. 9) and ``H_ms`` (eq. 64); air capacity
    from the room air volume plus furnishings.
    """
    computed = envelope_load(room, rooms, design)
    given = room.heat_loss_W_K is not None or room.design_heat_load_W is not None
    if computed is not None and not given and computed.total_W <= 0.0:
        raise ScenarioError(
            f"{where}.elements: the design load computed from the envelope is "
            f"{computed.total_W:.0f} W; a heated room needs a load above 0 "
            f"({origin})"
        )
    loss_W_K = heat_loss_W_K(
        room, design, None if computed is None else computed.total_W
    )
    load_W = design_heat_load_W(loss_W_K, room, design)
    if room.internal_gains_W > load_W:
        # Gains above the design load heat the room past its setpoint with no
        # heating at all, at the design outdoor temperature: not a heated room.
        raise ScenarioError(
            f"{where}.internal_gains_W: {room.internal_gains_W:g} W exceed the "
            f"room's design heat load {load_W:.0f} W, so it needs no heating; "
            f"lower the gains ({origin})"
        )
    area = room.floor_area_m2
    if room.air_capacity_J_K is not None:
        c_air = room.air_capacity_J_K
        c_structure = room.structure_capacity_J_K
    else:
        c_air = room_physics.air_capacity_J_K(area, room.height_m)
        c_structure = room_physics.structure_capacity_J_K(area, room.mass_class)
    return ResolvedRoom(
        heat_loss_W_K=loss_W_K,
        design_heat_load_W=load_W,
        air_capacity_J_K=c_air,
        structure_capacity_J_K=c_structure,
        air_structure_conductance_W_K=room_physics.air_structure_conductance_W_K(
            area, room.mass_class
        ),
        envelope_load=computed,
        load_given=given,
    )
