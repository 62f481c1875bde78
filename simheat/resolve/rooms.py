"""Room parameters of the two-node RC model, resolved from the scenario.

Capacities and the air-structure coupling follow the simple method of ISO
13790:2008 (:mod:`simheat.physics.room`) from the floor area, height and mass
class, unless the scenario gives the capacities; the heat loss comes from
:mod:`simheat.resolve.loads`.
"""

from __future__ import annotations

from dataclasses import dataclass

from simheat.physics import room as room_physics
from simheat.resolve.loads import design_heat_load_W, heat_loss_W_K
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
    """

    heat_loss_W_K: float
    design_heat_load_W: float
    air_capacity_J_K: float
    structure_capacity_J_K: float
    air_structure_conductance_W_K: float


def resolve_room(room: Room, design: Design) -> ResolvedRoom:
    """Heat loss, capacities and coupling of one room.

    Parameters
    ----------
    room : Room
        The room as the scenario gives it (floor area [m2], height [m], mass
        class, optional capacities [J/K], heat loss [W/K] or load [W]).
    design : Design
        Design conditions. [°C]

    Returns
    -------
    ResolvedRoom
        The room's model parameters.

    Notes
    -----
    ISO 13790:2008: structure capacity ``C_m = kappa A_f`` (Table 12), coupling
    the series value of ``H_is`` (eq. 9) and ``H_ms`` (eq. 64); air capacity
    from the room air volume plus furnishings.
    """
    loss_W_K = heat_loss_W_K(room, design)
    area = room.floor_area_m2
    if room.air_capacity_J_K is not None:
        c_air = room.air_capacity_J_K
        c_structure = room.structure_capacity_J_K
    else:
        c_air = room_physics.air_capacity_J_K(area, room.height_m)
        c_structure = room_physics.structure_capacity_J_K(area, room.mass_class)
    return ResolvedRoom(
        heat_loss_W_K=loss_W_K,
        design_heat_load_W=design_heat_load_W(loss_W_K, room, design),
        air_capacity_J_K=c_air,
        structure_capacity_J_K=c_structure,
        air_structure_conductance_W_K=room_physics.air_structure_conductance_W_K(
            area, room.mass_class
        ),
    )
