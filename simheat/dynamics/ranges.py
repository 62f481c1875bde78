"""The model's valid range, watched during a run: a run that leaves it stops.

The scenario's bounds keep every input physical, but some combinations still
drive a run where the model no longer describes a house (a room's radiators far
too large for its loss, gains and no thermostat). Rather than return numbers
from outside its range, the integration watches, through ``solve_ivp`` terminal
events, for:

- water colder than 0 °C or hotter than 100 °C: ice, or boiling at the 1-3 bar of
  a house system (the water properties are fitted over 0-100 °C, IAPWS-95);
- room air or structure outside -50 to 60 °C: colder than the coldest design
  outdoor temperature the scenario allows, or hotter than any occupied room
  (the lumped room model and EN 442's room-side relation stop holding).

An event stops the run at the moment the limit is crossed (located on the dense
output), and :func:`out_of_range_error` names the part, its value and the time.
Events are evaluated after each accepted step and do not change the steps taken,
so runs that stay in range are unchanged.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence

import numpy as np

from simheat.errors import ModelRangeError

WATER_MIN_C = 0.0
WATER_MAX_C = 100.0
ROOM_MIN_C = -50.0
ROOM_MAX_C = 60.0

__all__ = [
    "ROOM_MAX_C",
    "ROOM_MIN_C",
    "WATER_MAX_C",
    "WATER_MIN_C",
    "out_of_range_error",
    "range_events",
    "state_names",
    "stop_error",
]

# (state group, lowest, highest, what it is) for each watched group. A new
# group needs its part names in state_names too.
_WATCHED = (
    ("cells", WATER_MIN_C, WATER_MAX_C, "water"),
    ("air", ROOM_MIN_C, ROOM_MAX_C, "room air"),
    ("structure", ROOM_MIN_C, ROOM_MAX_C, "room structure"),
)


def _event(group: slice, low: float, high: float) -> Callable:
    """A terminal event: positive while every state of ``group`` is in range."""

    def margin_K(t: float, y: np.ndarray, *args) -> float:
        values = y[group]
        return float(min(values.min() - low, high - values.max()))

    margin_K.terminal = True
    margin_K.direction = -1.0
    return margin_K


def range_events(slices: dict[str, slice]) -> list[Callable]:
    """The ``solve_ivp`` events watching the model's valid range.

    Parameters
    ----------
    slices : dict of str to slice
        Where each group of states sits (:meth:`ThermalModel.slices`). [-]

    Returns
    -------
    list of callable
        One terminal event per watched group, in the order of ``_WATCHED``:
        ``f(t, y, *args)`` is the smallest margin to the group's limits. [K]
    """
    return [_event(slices[group], low, high) for group, low, high, _ in _WATCHED]


def out_of_range_error(
    event: int,
    time_s: float,
    y: np.ndarray,
    slices: dict[str, slice],
    names: dict[str, list[str]],
    start_clock_s: float,
) -> ModelRangeError:
    """The error of a run stopped by range event ``event``.

    Parameters
    ----------
    event : int
        Index of the event that fired (:func:`range_events` order). [-]
    time_s : float
        When it fired, from the start of the run. [s]
    y : ndarray
        The state then. [°C, J]
    slices : dict of str to slice
        Where each group of states sits. [-]
    names : dict of str to list of str
        Per watched group, what each of its states is (a link name for water
        cells, a room's position and id for room nodes). [-]
    start_clock_s : float
        Clock time of the start of the run, since midnight. [s]

    Returns
    -------
    ModelRangeError
        One line: what left the range, its temperature, the limit, and when.
    """
    group, low, high, what = _WATCHED[event]
    values = y[slices[group]]
    index = int(np.argmax(np.maximum(low - values, values - high)))
    value = float(values[index])
    limit = f"above {high:g}" if value > (low + high) / 2.0 else f"below {low:g}"
    total_min = int(round((start_clock_s + time_s) / 60.0))
    clock = f"{total_min // 60 % 24:02d}:{total_min % 60:02d}"
    return ModelRangeError(
        f"{what} of {names[group][index]} reached {value:.1f} °C ({limit} °C) at "
        f"{time_s / 3600.0:.2f} h ({clock}): outside the range the model holds; "
        "check this part's heat load, radiators and gains"
    )


def state_names(
    room_ids: Sequence[str], link_names: Sequence[str], cell_link: np.ndarray
) -> dict[str, list[str]]:
    """What each watched state is, for a range error's message.

    Parameters
    ----------
    room_ids : sequence of str
        The scenario's room ids, in order. [-]
    link_names : sequence of str
        The network's link names. [-]
    cell_link : ndarray of int
        The link each water cell lies on (``ThermalModel.cell_link``). [-]

    Returns
    -------
    dict of str to list of str
        Per watched group (:data:`_WATCHED`), one name per state: water cells
        by their link, room nodes by position and id (``rooms[1] (back)``).
    """
    rooms = [f"rooms[{i}] ({room_id})" for i, room_id in enumerate(room_ids)]
    return {
        "cells": [f"link {link_names[k]!r}" for k in cell_link],
        "air": rooms,
        "structure": rooms,
    }


def stop_error(
    result,
    slices: dict[str, slice],
    names: dict[str, list[str]],
    start_clock_s: float,
) -> ModelRangeError:
    """The error of a ``solve_ivp`` segment that a range event stopped.

    Parameters
    ----------
    result : scipy.integrate OdeResult
        The segment's result, with ``status == 1`` (an event fired). [-]
    slices : dict of str to slice
        Where each group of states sits. [-]
    names : dict of str to list of str
        What each watched state is (:func:`state_names`). [-]
    start_clock_s : float
        Clock time of the start of the run, since midnight. [s]

    Returns
    -------
    ModelRangeError
        As :func:`out_of_range_error`, for the first event that fired.
    """
    event = next(i for i, t in enumerate(result.t_events) if len(t))
    return out_of_range_error(
        event,
        float(result.t_events[event][0]),
        result.y_events[event][0],
        slices,
        names,
        start_clock_s,
    )
