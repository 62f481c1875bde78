"""Schematic drawing positions of the layouts (drawing units, about metres in x).

Floors are drawn as horizontal bands stacked upwards: each floor's return line at
:func:`floor_y`, its supply line :data:`SUPPLY_Y` above, emitter boxes between
them. The plant is drawn below the foot of the riser. A pipe that would lie on
top of another when drawn straight between its nodes (the tail of a reverse
return, a one-pipe loop's way back) is given waypoints
(:attr:`~simheat.hydraulics.layouts.records.BuiltLayout.link_via`) that put it on
a lane of its own below the floor.
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
# Floor-pump schemes: a vertical low-loss header left of the floors, each floor
# pump on a horizontal run of its own off the header's supply end, stacked
# upwards, each floor's return on a lane of its own left of the header.
LOW_LOSS_HEADER_X = -3.2  # the header bar
FLOOR_PUMP_OUTLET_X = -0.6  # end of every floor pump's run
FLOOR_PUMP_DY = 0.7  # floor pumps' runs stacked upwards from floor 0's supply line
FLOOR_FLOW_LANE_DX = 0.3  # floors' flow pipes rise on lanes right of the outlets
FLOOR_RETURN_LANE_DX = 0.6  # floors' return pipes fall on lanes left of the header
RETURN_STUB_DY = 0.4  # returns enter the header from below, one height each
RETURN_TAIL_DY = 0.45  # reverse return: the tail back to the riser, below the floor
RETURN_TAIL_DX = 0.5  # and joining the riser from its left


def floor_y(index: int) -> float:
    """Drawing height of the return line of the floor with route index ``index``.

    Parameters
    ----------
    index : int
        Route index of the floor (0 for the first floor listed). [-]

    Returns
    -------
    float
        Height of its return line. [drawing units]

    Examples
    --------
    >>> floor_y(1)
    4.0
    """
    return FLOOR_SPACING * index


def tail_lane(
    far_xy: tuple[float, float], end_xy: tuple[float, float]
) -> tuple[tuple[float, float], ...]:
    """Waypoints of a return pipe drawn back below its floor to ``end_xy``.

    The pipe drops from its far end to a lane :data:`RETURN_TAIL_DY` below the
    floor's return line, runs back past ``end_xy`` and joins it from the left, so
    it never lies on the return header it runs beside nor on the riser below its
    end.

    Parameters
    ----------
    far_xy : (float, float)
        Drawing position of the pipe's far (upstream) end. [drawing units]
    end_xy : (float, float)
        Drawing position of the node it returns to. [drawing units]

    Returns
    -------
    tuple of (float, float)
        Three waypoints. [drawing units]

    Examples
    --------
    >>> tail_lane((10.0, 4.0), (-0.6, 4.0))
    ((10.0, 3.55), (-1.1, 3.55), (-1.1, 4.0))
    """
    lane_y = round(end_xy[1] - RETURN_TAIL_DY, 9)
    left_x = round(end_xy[0] - RETURN_TAIL_DX, 9)
    return ((far_xy[0], lane_y), (left_x, lane_y), (left_x, end_xy[1]))


def floor_pump_run_y(index: int) -> float:
    """Height of the horizontal run that carries floor ``index``'s pump.

    Parameters
    ----------
    index : int
        Route index of the floor. [-]

    Returns
    -------
    float
        Height of the run. [drawing units]

    Examples
    --------
    >>> round(floor_pump_run_y(1), 9)
    1.9
    """
    return floor_y(0) + SUPPLY_Y + FLOOR_PUMP_DY * index


def floor_flow_lane_x(index: int) -> float:
    """Drawing x of the lane on which floor ``index``'s flow pipe rises.

    Parameters
    ----------
    index : int
        Route index of the floor. [-]

    Returns
    -------
    float
        Lane position. [drawing units]
    """
    return FLOOR_PUMP_OUTLET_X + FLOOR_FLOW_LANE_DX * index


def floor_return_lane_x(index: int) -> float:
    """Drawing x of the lane on which floor ``index``'s return pipe falls.

    Parameters
    ----------
    index : int
        Route index of the floor. [-]

    Returns
    -------
    float
        Lane position, left of the low-loss header. [drawing units]
    """
    return LOW_LOSS_HEADER_X - FLOOR_RETURN_LANE_DX * (index + 1)


def floor_pump_plant_origin(n_floors: int) -> tuple[float, float]:
    """Where the plant of a floor-pump scheme is drawn: left of every return lane.

    Parameters
    ----------
    n_floors : int
        Number of floors. [-]

    Returns
    -------
    (float, float)
        Offset added to the plant's drawing positions. [drawing units]
    """
    x = floor_return_lane_x(n_floors - 1) - 0.8 - PLANT_SUPPLY_XY[0]
    y = -RETURN_STUB_DY * (n_floors + 1) - 0.8 - PLANT_SUPPLY_XY[1]
    return (x, y)
