"""Rooms and what they are built of: envelope elements, rooms, internal walls.

Part of :mod:`simheat.scenario.model` (values as given, SI units, validated;
nothing computed).
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class EnvelopeElement:
    """One element of a room's envelope (wall, window, floor, ceiling, door).

    Attributes
    ----------
    name : str
        Display name (``"element 2"`` when not given). [-]
    area_m2 : float
        Area through which heat flows. [m2]
    u_W_m2K : float
        Thermal transmittance. [W/(m2 K)]
    beyond : str
        What lies beyond it: ``"outdoors"``, ``"ground"``, ``"unheated"`` or
        ``"room"`` (another heated room of the scenario). [-]
    temperature_factor : float
        Temperature reduction factor of an unheated space or of the ground
        (``b_u``, ``f_g``): the share of the inside-outside difference that
        drives the loss; 1 for outdoors, unused for a room. [-]
    room : int
        Index of the room beyond (``beyond == "room"``), else -1. [-]
    """

    name: str
    area_m2: float
    u_W_m2K: float
    beyond: str
    temperature_factor: float = 1.0
    room: int = -1


@dataclass(frozen=True)
class Envelope:
    """A room described by its envelope, for the heat-load calculation.

    Attributes
    ----------
    elements : tuple of EnvelopeElement
        Walls, windows, floors, ceilings. [-]
    air_changes_per_h : float or None
        Air change rate of the room, when given. [1/h]
    ventilation_m3_s : float or None
        Outdoor air volume flow, when given instead. [m3/s]
    heat_recovery : float
        Efficiency of heat recovery on the ventilation air. [-]
    thermal_bridge_W_m2K : float
        Thermal-bridge allowance added to the U of every element that is not
        toward another heated room. [W/(m2 K)]
    reheat_W_m2 : float
        Reheat allowance per m2 of floor, reported beside the load. [W/m2]
    """

    elements: tuple[EnvelopeElement, ...]
    air_changes_per_h: float | None
    ventilation_m3_s: float | None
    heat_recovery: float
    thermal_bridge_W_m2K: float
    reheat_W_m2: float


@dataclass(frozen=True)
class Room:
    """One heated room as a two-node (air and structure) lumped RC model.

    Attributes
    ----------
    id, name : str
        Identifier used in files and the display name. [-]
    floor : int
        Storey number, 0 for the ground floor. [-]
    floor_area_m2, height_m : float
        Floor area [m2] and clear height [m].
    setpoint_C : float
        Comfort air temperature setpoint. [°C]
    heat_loss_W_K : float or None
        Total heat loss coefficient to outdoors (fabric plus ventilation), when
        given (``heat_loss_W_per_K``). [W/K]
    design_heat_load_W : float or None
        Heat loss at the design outdoor temperature and the setpoint, when given
        instead. [W] At most one of the two is given; the resolve step derives
        the other (:mod:`simheat.resolve.loads`), or both from the envelope
        when neither is given.
    mass_class : str
        Construction class of ISO 13790:2008 Table 12 (``very_light`` ...
        ``very_heavy``). [-]
    air_capacity_J_K, structure_capacity_J_K : float or None
        Heat capacities of the air node (air and furnishings) and of the structure
        node when given (both or neither); None to derive them from the floor
        area, height and mass class. [J/K]
    air_loss_fraction : float
        Share of the heat loss coefficient leaving from the air node (ventilation
        and light elements such as windows); the rest leaves from the structure
        node. [-]
    internal_gains_W : float
        Constant internal gains into the air node. [W]
    envelope : Envelope or None
        The room's envelope, when described; the resolve step computes the
        design load from it unless a load or loss coefficient is given too. [-]
    initial_air_temp_C, initial_structure_temp_C : float or None
        Air and structure temperature at the start of the run when the scenario
        gives the initial state (the room's own or ``[simulation]``'s); None
        when the night sets it. [°C]
    """

    id: str
    name: str
    floor: int
    floor_area_m2: float
    height_m: float
    setpoint_C: float
    heat_loss_W_K: float | None
    design_heat_load_W: float | None
    mass_class: str
    air_capacity_J_K: float | None
    structure_capacity_J_K: float | None
    air_loss_fraction: float
    internal_gains_W: float
    envelope: Envelope | None = None
    initial_air_temp_C: float | None = None
    initial_structure_temp_C: float | None = None


@dataclass(frozen=True)
class InternalWall:
    """A conductance between the air nodes of two rooms. [W/K].

    Attributes
    ----------
    room_a, room_b : int
        Indices of the two rooms. [-]
    conductance_W_K : float
        Conductance of the wall between their air nodes. [W/K]
    """

    room_a: int
    room_b: int
    conductance_W_K: float
