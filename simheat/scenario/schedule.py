"""Scenario sections ``[schedule]`` and ``[simulation]``: the morning and its run."""

from __future__ import annotations

import re

from simheat.scenario.common import (
    MAX_FLOW_TEMP_C,
    MAX_PIPE_LENGTH_M,
    MAX_ROOM_C,
    MAX_SETPOINT_C,
    MIN_ROOM_C,
    MIN_SETPOINT_C,
)
from simheat.scenario.fields import Table, shown
from simheat.scenario.model import Schedule, Simulation

MAX_EMITTER_CELLS = 100  # water cells per radiator [-]
# A run lasts from a minute to two weeks (a cold spell). [h]
MIN_DURATION_H = 1.0 / 60.0
MAX_DURATION_H = 24.0 * 14
# Output step: one second at the finest (the problem-size limit bounds the
# samples a long run may take). [min]
MIN_OUTPUT_STEP_MIN = 1.0 / 60.0
# Relative tolerance of the time integration: below 1e-9 the steps shrink to the
# round-off of double precision and the integrator stalls; above 1e-2 times to
# setpoint are off by more than a few percent. [-]
MIN_RTOL = 1e-9
MAX_RTOL = 1e-2
# Water cells along pipes: 0.1 m cells already resolve a hot front to a few
# seconds of travel at 0.5 m/s; shorter cells only cost memory and time. [m]
MIN_PIPE_CELL_LENGTH_M = 0.1
# The heating goes off at this clock time the evening before, by default. [-]
DEFAULT_OFF_FROM = "22:00"
# Water temperature at the start of a given initial state, by default. [°C]
DEFAULT_WATER_TEMP_C = 15.0
# Rooms' start before the night was simulated (run files of schema 2). [°C]
OLDER_START_C = 15.0

_CLOCK = re.compile(r"^([01]?\d|2[0-3]):([0-5]\d)$")


def read_simulation(t: Table) -> Simulation:
    """The ``[simulation]`` table: duration, output step, start, tolerances, cells.

    Parameters
    ----------
    t : Table
        The ``[simulation]`` table (empty when absent).

    Returns
    -------
    Simulation
        Settings in SI units (durations [s], temperatures [°C], lengths [m]);
        the initial temperatures are None where the file does not give them
        (``initial_room_temp_C``, the older key, gives air and structure).
    """
    legacy = t.number("initial_room_temp_C", None, low=MIN_ROOM_C, high=MAX_ROOM_C)
    air = t.number("initial_air_temp_C", None, low=MIN_ROOM_C, high=MAX_ROOM_C)
    structure = t.number(
        "initial_structure_temp_C", None, low=MIN_ROOM_C, high=MAX_ROOM_C
    )
    if legacy is not None:
        for key in ("initial_air_temp_C", "initial_structure_temp_C"):
            if t.has(key):
                raise t.fail(
                    key,
                    "give it or the older initial_room_temp_C (air and structure "
                    "alike), not both",
                )
        air = structure = legacy
    sim = Simulation(
        duration_s=3600.0
        * t.number("duration_h", 6.0, low=MIN_DURATION_H, high=MAX_DURATION_H),
        output_step_s=60.0
        * t.number(
            "output_step_min", 1.0, low=MIN_OUTPUT_STEP_MIN, high=60.0 * MAX_DURATION_H
        ),
        initial_air_temp_C=air,
        initial_structure_temp_C=structure,
        initial_water_temp_C=t.number(
            "initial_water_temp_C", None, low=0.0, high=MAX_FLOW_TEMP_C
        ),
        reached_tolerance_K=t.number(
            "reached_tolerance_K", 0.5, non_negative=True, high=3.0
        ),
        rtol=t.number("rtol", 1e-5, low=MIN_RTOL, high=MAX_RTOL),
        pipe_cell_length_m=t.number(
            "pipe_cell_length_m",
            1.0,
            low=MIN_PIPE_CELL_LENGTH_M,
            high=MAX_PIPE_LENGTH_M,
        ),
        emitter_cells=t.integer("emitter_cells", 4, low=1, high=MAX_EMITTER_CELLS),
    )
    if sim.output_step_s > sim.duration_s:
        raise t.fail("output_step_min", "must not exceed the duration")
    t.reject_unknown()
    return sim


def clock_seconds(value: object) -> float | None:
    """Seconds after midnight of a clock time ``"HH:MM"``; None if not one.

    Parameters
    ----------
    value : object
        The value read from the file: a clock time, 00:00 to 23:59. [-]

    Returns
    -------
    float or None
        Seconds after midnight. [s]

    Examples
    --------
    >>> clock_seconds("07:30"), clock_seconds("25:00"), clock_seconds(7)
    (27000.0, None, None)
    """
    match = _CLOCK.match(value) if isinstance(value, str) else None
    if not match:
        return None
    return 3600.0 * int(match.group(1)) + 60.0 * int(match.group(2))


def _clock_s(t: Table, key: str, default: str | None) -> float | None:
    if default is None and not t.has(key):
        return None
    value = t.text(key, default)
    seconds = clock_seconds(value)
    if seconds is None:
        raise t.fail(key, f"must be a clock time HH:MM, got {shown(value)}")
    return seconds


def read_schedule(t: Table) -> Schedule:
    """The ``[schedule]`` table: night, start clock, comfort start, before comfort.

    Parameters
    ----------
    t : Table
        The ``[schedule]`` table (empty when absent).

    Returns
    -------
    Schedule
        Start clock [s after midnight], comfort start [s from the start], what
        runs before comfort, setback setpoint [°C], and the clock time the
        heating went off the evening before [s after midnight] (None when the
        file does not say: :func:`simheat.scenario.load.parse_scenario` sets
        the default, or none when the scenario gives an initial state).
    """
    start = _clock_s(t, "start_clock", "05:00")
    comfort = _clock_s(t, "comfort_from", t.data.get("start_clock", "05:00"))
    if comfort < start:
        raise t.fail(
            "comfort_from", "must not be before start_clock (times out of order)"
        )
    off = _clock_s(t, "off_from", None)
    if off is not None and off == start:
        raise t.fail(
            "off_from", "must differ from start_clock (the night has no length)"
        )
    schedule = Schedule(
        start_clock_s=start,
        comfort_start_s=comfort - start,
        before_comfort=t.text("before_comfort", "off", choices={"off", "setback"}),
        setback_setpoint_C=t.number(
            "setback_setpoint_C", 15.0, low=MIN_SETPOINT_C, high=MAX_SETPOINT_C
        ),
        off_clock_s=off,
    )
    t.reject_unknown()
    return schedule
