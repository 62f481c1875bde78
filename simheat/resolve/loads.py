"""Room heat loss: the loss coefficient and the design heat load of each room.

A room states its loss coefficient (``heat_loss_W_per_K``) or its design heat
load (``design_heat_load_W``); they are tied by the design temperature
difference, ``Q = H (t_set - t_out)``. A room may instead, or as well, describe
its envelope (``[[rooms.elements]]`` and its ventilation): :func:`envelope_load`
computes its design load by the simplified method of EN 12831-1:2017, and the
loss coefficient follows from that load as from a given one. Where a room gives
both a figure and an envelope, the given figure (the designer's explicit value)
drives the model and the computed load is reported beside it.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from simheat.scenario.model import Design, Envelope, Room

# Volumetric heat capacity of air used by EN 12831 for the ventilation loss,
# rho c_p = 1.2 kg/m3 * 1005 J/(kg K) / 3600 s/h = 0.34 Wh/(m3 K). [Wh/(m3 K)]
AIR_HEAT_CAPACITY_WH_M3K = 0.34
S_PER_H = 3600.0


@dataclass(frozen=True)
class ElementLoss:
    """Design heat loss through one envelope element.

    Attributes
    ----------
    name : str
        The element's name. [-]
    beyond : str
        ``outdoors``, ``ground``, ``unheated`` or the id of the room beyond. [-]
    conductance_W_K : float
        ``A (U + dU_tb) f`` (or ``A U`` toward a room). [W/K]
    temp_difference_K : float
        Inside setpoint minus the outdoor design temperature, or minus the
        setpoint of the room beyond. [K]
    loss_W : float
        ``conductance * difference``; negative toward a warmer room. [W]
    """

    name: str
    beyond: str
    conductance_W_K: float
    temp_difference_K: float
    loss_W: float


@dataclass(frozen=True)
class EnvelopeLoad:
    """Design heat load of a room computed from its envelope.

    Attributes
    ----------
    elements : tuple of ElementLoss
        Loss through each element, thermal bridges included. [W]
    fabric_W : float
        Sum of the element losses. [W]
    thermal_bridges_W : float
        The part of ``fabric_W`` due to the thermal-bridge allowance. [W]
    ventilation_W : float
        Ventilation loss after heat recovery. [W]
    total_W : float
        Design heat load, fabric plus ventilation. [W]
    reheat_W : float
        Reheat allowance, reported beside the load, not part of it. [W]
    """

    elements: tuple[ElementLoss, ...]
    fabric_W: float
    thermal_bridges_W: float
    ventilation_W: float
    total_W: float
    reheat_W: float

    @property
    def with_reheat_W(self) -> float:
        """Load plus the reheat allowance. [W]."""
        return self.total_W + self.reheat_W


def envelope_load(
    room: Room, rooms: Sequence[Room], design: Design
) -> EnvelopeLoad | None:
    """Design heat load of a room from its envelope, EN 12831 simplified.

    Parameters
    ----------
    room : Room
        The room: setpoint [°C], floor area [m2], height [m] and envelope
        (element areas [m2], U [W/(m2 K)], temperature factors [-], air change
        [1/h] or ventilation flow [m3/s], heat recovery [-], thermal-bridge
        allowance [W/(m2 K)], reheat [W/m2]).
    rooms : sequence of Room
        Every room of the scenario (setpoints of the rooms beyond). [°C]
    design : Design
        Design conditions (outdoor temperature). [°C]

    Returns
    -------
    EnvelopeLoad or None
        The load and its parts; None for a room without an envelope.

    Notes
    -----
    EN 12831-1:2017, simplified method (and EN 12831:2003, section 9):

    - fabric: ``sum_k A_k (U_k + dU_tb) f_k (t_int - t_e)`` over elements to
      outdoors (``f = 1``), to an unheated space (``f = b_u``) and to the
      ground (``f`` the ground factor, e.g. ``f_g1 f_g2`` of the 2003 edition,
      with ``U`` the ground's equivalent U); toward another heated room
      ``A_k U_k (t_int - t_room)`` without the allowance, negative when the
      other room is warmer;
    - ventilation: ``0.34 V_dot (1 - eta) (t_int - t_e)`` W with ``V_dot`` in
      m3/h, ``n V_room`` from the air change rate or given, and ``eta`` the
      heat-recovery efficiency (the supply air is taken as preheated by
      ``eta (t_int - t_e)``);
    - reheat: ``f_RH A_floor``, kept apart ("load plus reheat").

    Limits: no solar or internal gains, no separate infiltration and
    mechanical flows, no intermittent-heating detail beyond the reheat
    allowance, and the ground as a factor on the outdoor difference rather than
    the ISO 13370 calculation.

    Examples
    --------
    A worked room, computed by hand: 21 °C inside, -10 °C outside (31 K);
    12 m2 of wall at U 0.30 to outdoors, 3 m2 of window at 1.4, 16 m2 of floor
    at 0.25 over an unheated cellar (b_u 0.5), 8 m2 of wall at 1.0 to a hall
    at 18 °C; 40 m3 of room at 0.5 air changes per hour with heat recovery
    0.6; thermal-bridge allowance 0.05 W/(m2 K).

    - wall: 12 * 0.35 * 31 = 130.2 W; window: 3 * 1.45 * 31 = 134.85 W;
    - floor: 16 * 0.30 * 0.5 * 31 = 74.4 W; hall wall: 8 * 1.0 * 3 = 24 W;
    - fabric 363.45 W, of which bridges (12 + 3) * 0.05 * 31 +
      16 * 0.05 * 0.5 * 31 = 23.25 + 12.4 = 35.65 W;
    - ventilation: 0.34 * 20 m3/h * 0.4 * 31 = 84.32 W;
    - load 447.77 W.

    >>> from simheat.scenario.model import Envelope, EnvelopeElement as El
    >>> import dataclasses
    >>> hall = Room("hall", "hall", 0, 8.0, 2.5, 18.0, 30.0, None, "medium",
    ...             None, None, 0.4, 0.0)
    >>> env = Envelope((El("wall", 12.0, 0.3, "outdoors"),
    ...                 El("window", 3.0, 1.4, "outdoors"),
    ...                 El("floor", 16.0, 0.25, "unheated", 0.5),
    ...                 El("hall wall", 8.0, 1.0, "room", room=0)),
    ...                0.5, None, 0.6, 0.05, 0.0)
    >>> room = dataclasses.replace(hall, id="bed", setpoint_C=21.0,
    ...     floor_area_m2=16.0, height_m=2.5, heat_loss_W_K=None, envelope=env)
    >>> load = envelope_load(room, [hall, room], Design(-10.0, 55.0, 10.0))
    >>> round(load.fabric_W, 2), round(load.ventilation_W, 2)
    (363.45, 84.32)
    >>> round(load.total_W, 2), round(load.thermal_bridges_W, 2)
    (447.77, 35.65)
    """
    env: Envelope | None = room.envelope
    if env is None:
        return None
    outdoor_K = room.setpoint_C - design.outdoor_temp_C
    parts = []
    bridges = 0.0
    for e in env.elements:
        if e.beyond == "room":
            other = rooms[e.room]
            dt = room.setpoint_C - other.setpoint_C
            h = e.area_m2 * e.u_W_m2K
            beyond = other.id
        else:
            dt = outdoor_K
            h = (
                e.area_m2
                * (e.u_W_m2K + env.thermal_bridge_W_m2K)
                * e.temperature_factor
            )
            bridges += e.area_m2 * env.thermal_bridge_W_m2K * e.temperature_factor * dt
            beyond = e.beyond
        parts.append(ElementLoss(e.name, beyond, h, dt, h * dt))
    if env.air_changes_per_h is not None:
        flow_m3_h = env.air_changes_per_h * room.floor_area_m2 * room.height_m
    else:
        flow_m3_h = env.ventilation_m3_s * S_PER_H
    ventilation = (
        AIR_HEAT_CAPACITY_WH_M3K * flow_m3_h * (1.0 - env.heat_recovery) * outdoor_K
    )
    fabric = sum(p.loss_W for p in parts)
    return EnvelopeLoad(
        elements=tuple(parts),
        fabric_W=fabric,
        thermal_bridges_W=bridges,
        ventilation_W=ventilation,
        total_W=fabric + ventilation,
        reheat_W=env.reheat_W_m2 * room.floor_area_m2,
    )


def heat_loss_W_K(
    room: Room, design: Design, computed_load_W: float | None = None
) -> float:
    """Total heat loss coefficient of a room to outdoors.

    Parameters
    ----------
    room : Room
        The room: its given loss coefficient [W/K], or its design heat load [W]
        and setpoint [°C].
    design : Design
        Design conditions (outdoor temperature). [°C]
    computed_load_W : float, optional
        Design load computed from the room's envelope (:func:`envelope_load`),
        used when the room gives neither figure. [W]

    Returns
    -------
    float
        Heat loss coefficient, fabric plus ventilation. [W/K]

    Notes
    -----
    From a design heat load: ``H = Q / (t_set - t_out,design)``; the loader has
    checked that the setpoint lies above the design outdoor temperature.

    Examples
    --------
    1550 W at 21 °C inside and -10 °C outside is 1550 / 31 = 50 W/K.
    """
    if room.heat_loss_W_K is not None:
        return room.heat_loss_W_K
    load = room.design_heat_load_W
    if load is None:
        load = computed_load_W
    return load / (room.setpoint_C - design.outdoor_temp_C)


def design_heat_load_W(loss_W_K: float, room: Room, design: Design) -> float:
    """Heat loss of a room at its setpoint and the design outdoor temperature.

    Parameters
    ----------
    loss_W_K : float
        Heat loss coefficient of the room (:func:`heat_loss_W_K`). [W/K]
    room : Room
        The room (setpoint). [°C]
    design : Design
        Design conditions (outdoor temperature). [°C]

    Returns
    -------
    float
        ``H (t_set - t_out,design)``. [W]
    """
    return loss_W_K * (room.setpoint_C - design.outdoor_temp_C)
