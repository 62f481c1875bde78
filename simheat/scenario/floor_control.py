"""Floor thermostats and shut-off periods of the floor pumps.

Read from each ``[[layout.floor_pumps]]`` table.

In the ``_floor_pumps`` schemes each floor's pump may follow a floor thermostat:
the air temperature of a reference room on that floor, an on/off switch with a
hysteresis, and minimum run and off times. A floor may also be shut off for
clock periods: its pump stops and its check valve holds the floor still. The
keys sit in the floor pump's own table, beside its curve; what they do over a
run is decided by :mod:`simheat.dynamics.floor_control`.
"""

from __future__ import annotations

from collections.abc import Sequence

from simheat.scenario.fields import Table
from simheat.scenario.model import FloorControl, Route
from simheat.scenario.schedule import clock_seconds

__all__ = ["CONTROL_KEYS", "read_floor_control"]

# Switching differential of a room thermostat: 0.5 K is a common setting of
# on/off room thermostats (common trade practice, from memory). [K]
DEFAULT_HYSTERESIS_K = 0.5
MAX_HYSTERESIS_K = 5.0
# Shortest run and off times that keep a pump from short-cycling: a few minutes
# (common trade practice, from memory; our default). [min]
DEFAULT_MIN_RUN_MIN = 5.0
DEFAULT_MIN_OFF_MIN = 5.0
MAX_MIN_TIME_MIN = 240.0
CONTROL_KEYS = (
    "thermostat_room",
    "thermostat_setpoint_C",
    "thermostat_hysteresis_K",
    "min_run_min",
    "min_off_min",
    "shut_off",
)
"""Keys of a ``[[layout.floor_pumps]]`` table that set its floor control."""


def _floor_rooms(route: Route, floor: int, emitter_rooms: Sequence[int]) -> set[int]:
    """Rooms heated by an emitter on the floor's run."""
    run = next(f for f in route.floors if f.floor == floor)
    return {emitter_rooms[t.emitter] for t in run.tees}


def read_floor_control(
    t: Table,
    floor: int,
    route: Route,
    room_ids: dict[str, int],
    emitter_rooms: Sequence[int],
) -> FloorControl | None:
    """The floor control keys of one ``[[layout.floor_pumps]]`` table.

    Parameters
    ----------
    t : Table
        The floor pump's table. [-]
    floor : int
        Its floor number (checked against the route). [-]
    route : Route
        The route: the reference room must be heated from this floor's run. [-]
    room_ids : dict of str to int
        Index of each room id. [-]
    emitter_rooms : sequence of int
        Room of each emitter. [-]

    Returns
    -------
    FloorControl or None
        The control, None when the table gives none of :data:`CONTROL_KEYS`.
    """
    if not any(t.has(key) for key in CONTROL_KEYS):
        return None
    room = None
    if t.has("thermostat_room"):
        name = t.text("thermostat_room")
        if name not in room_ids:
            raise t.fail("thermostat_room", f"unknown room {name!r}")
        room = room_ids[name]
        if room not in _floor_rooms(route, floor, emitter_rooms):
            raise t.fail(
                "thermostat_room",
                f"room {name!r} has no emitter on floor {floor}'s run; a floor "
                "thermostat reads a room of its own floor",
            )
    else:
        for key in ("thermostat_setpoint_C", "thermostat_hysteresis_K"):
            if t.has(key):
                raise t.fail(
                    key, "needs thermostat_room (the room the thermostat reads)"
                )
    setpoint = None
    if t.has("thermostat_setpoint_C"):
        setpoint = t.number("thermostat_setpoint_C", low=5.0, high=30.0)
    if t.has("check_valve") and t.raw("check_valve") is False:
        raise t.fail(
            "check_valve",
            "a floor pump that a thermostat or a shut-off switches off needs its "
            "check valve, or the other floors draw water backwards through it",
        )
    return FloorControl(
        floor=floor,
        reference_room=room,
        setpoint_C=setpoint,
        hysteresis_K=t.number(
            "thermostat_hysteresis_K",
            DEFAULT_HYSTERESIS_K,
            positive=True,
            high=MAX_HYSTERESIS_K,
        ),
        min_run_s=60.0
        * t.number(
            "min_run_min", DEFAULT_MIN_RUN_MIN, non_negative=True, high=MAX_MIN_TIME_MIN
        ),
        min_off_s=60.0
        * t.number(
            "min_off_min", DEFAULT_MIN_OFF_MIN, non_negative=True, high=MAX_MIN_TIME_MIN
        ),
        shut_off=_shut_off(t),
        where=t.path,
    )


def _shut_off(t: Table) -> tuple[tuple[float, float], ...]:
    """``shut_off``: a list of ``["HH:MM", "HH:MM"]`` clock periods (from, until)."""
    periods = t.raw("shut_off", [])
    if not isinstance(periods, list):
        raise t.fail(
            "shut_off", f"must be a list of [from, until] clock pairs, got {periods!r}"
        )
    read = []
    for i, pair in enumerate(periods):
        key = f"shut_off[{i}]"
        if not (isinstance(pair, list) and len(pair) == 2):
            raise t.fail(key, f'must be a pair ["HH:MM", "HH:MM"], got {pair!r}')
        start, end = (clock_seconds(v) for v in pair)
        if start is None or end is None:
            raise t.fail(key, f"must be two clock times HH:MM, got {pair!r}")
        if start == end:
            raise t.fail(key, f"from and until must differ, got {pair!r}")
        read.append((start, end))
    return tuple(read)
