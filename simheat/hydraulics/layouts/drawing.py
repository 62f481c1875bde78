"""Schematic drawing positions of the layouts (drawing units, about metres in x).

Floors are drawn as horizontal bands stacked upwards: each floor's return line at
:func:`floor_y`, its supply line :data:`SUPPLY_Y` above, emitter boxes between
them. The plant is drawn below the foot of the riser.
"""

from __future__ import annotations

PLANT_RETURN_XY = (-2.0, -1.8)
PLANT_PUMP_OUTLET_XY = (-1.0, -3.0)
PLANT_SUPPLY_XY = (0.0, -1.8)
RETURN_RISER_X = -0.6  # return riser drawn beside the supply riser
FLOOR_SPACING = 4.0  # vertical distance between floors' bands
SUPPLY_Y = 1.2  # supply line above the floor's return line
EMITTER_Y = 0.6  # emitter boxes between the lines
ONE_PIPE_EMITTER_Y = 2.2  # one-pipe emitters above the loop
LOW_LOSS_HEADER_X = -1.5  # low-loss header left of the riser
FLOOR_PUMP_DX = 0.8  # floor pumps right of the low-loss header
FLOOR_PUMP_DY = 1.0  # and stacked one above the other


def floor_y(index: int) -> float:
    """Drawing height of the return line of the floor with route index ``index``.

    Parameters
    ----------
    index : int
        Route index of the floor. [-]
    """
    return FLOOR_SPACING * index
