"""Room heat loss: the loss coefficient and the design heat load of each room.

A room states one of the two (``heat_loss_W_per_K`` or ``design_heat_load_W``);
they are tied by the design temperature difference, ``Q = H (t_set - t_out)``
(steady-state heat loss, EN 12831-1:2017 in its simplest form). Rooms described
by their envelope (walls, windows, air change) will get their coefficient here
too, from the same design conditions.
"""

from __future__ import annotations

from simheat.scenario.model import Design, Room


def heat_loss_W_K(room: Room, design: Design) -> float:
    """Total heat loss coefficient of a room to outdoors.

    Parameters
    ----------
    room : Room
        The room: its given loss coefficient [W/K], or its design heat load [W]
        and setpoint [°C].
    design : Design
        Design conditions (outdoor temperature). [°C]

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
    return room.design_heat_load_W / (room.setpoint_C - design.outdoor_temp_C)


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
