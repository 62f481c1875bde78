"""Scenario sections ``[schedule]`` and ``[simulation]``: the morning and its run."""

from __future__ import annotations

import re

from simheat.scenario.common import MAX_PIPE_LENGTH_M
from simheat.scenario.fields import Table
from simheat.scenario.model import Schedule, Simulation

MAX_EMITTER_CELLS = 100  # water cells per radiator [-]
MAX_DURATION_H = 24.0 * 14  # two weeks [h]

_CLOCK = re.compile(r"^([01]?\d|2[0-3]):([0-5]\d)$")


def read_simulation(t: Table) -> Simulation:
    """The ``[simulation]`` table: duration, output step, tolerances, cells.

    Parameters
    ----------
    t : Table
        The ``[simulation]`` table (empty when absent).

    Returns
    -------
    Simulation
        Settings in SI units (durations [s], temperatures [°C], lengths [m]).
    """
    sim = Simulation(
        duration_s=3600.0
        * t.number("duration_h", 6.0, positive=True, high=MAX_DURATION_H),
        output_step_s=60.0 * t.number("output_step_min", 1.0, positive=True),
        initial_room_temp_C=t.number("initial_room_temp_C", 15.0, low=-20.0, high=40.0),
        initial_water_temp_C=t.number(
            "initial_water_temp_C", 15.0, low=0.0, high=100.0
        ),
        reached_tolerance_K=t.number(
            "reached_tolerance_K", 0.5, non_negative=True, high=3.0
        ),
        rtol=t.number("rtol", 1e-5, positive=True, high=1e-2),
        pipe_cell_length_m=t.number(
            "pipe_cell_length_m", 1.0, positive=True, high=MAX_PIPE_LENGTH_M
        ),
        emitter_cells=t.integer("emitter_cells", 4, low=1, high=MAX_EMITTER_CELLS),
    )
    if sim.output_step_s > sim.duration_s:
        raise t.fail("output_step_min", "must not exceed the duration")
    t.reject_unknown()
    return sim


def clock_seconds(value: object) -> float | None:
    """Seconds after midnight of a clock time ``"HH:MM"``, None if not one.

    Parameters
    ----------
    value : object
        The value read from the file. [-]

    Returns
    -------
    float or None
        Seconds after midnight. [s]

    Examples
    --------
    >>> clock_seconds("06:30"), clock_seconds("25:00")
    (23400.0, None)
    """
    match = _CLOCK.match(value) if isinstance(value, str) else None
    if not match:
        return None
    return 3600.0 * int(match.group(1)) + 60.0 * int(match.group(2))


def _clock_s(t: Table, key: str, default: str) -> float:
    value = t.text(key, default)
    seconds = clock_seconds(value)
    if seconds is None:
        raise t.fail(key, f"must be a clock time HH:MM, got {value!r}")
    return seconds


def read_schedule(t: Table) -> Schedule:
    """The ``[schedule]`` table: start clock, comfort start, before comfort.

    Parameters
    ----------
    t : Table
        The ``[schedule]`` table (empty when absent).

    Returns
    -------
    Schedule
        Start clock [s after midnight], comfort start [s from the start], what
        runs before comfort, setback setpoint. [°C]
    """
    start = _clock_s(t, "start_clock", "05:00")
    comfort = _clock_s(t, "comfort_from", t.data.get("start_clock", "05:00"))
    if comfort < start:
        raise t.fail(
            "comfort_from", "must not be before start_clock (times out of order)"
        )
    schedule = Schedule(
        start_clock_s=start,
        comfort_start_s=comfort - start,
        before_comfort=t.text("before_comfort", "off", choices={"off", "setback"}),
        setback_setpoint_C=t.number("setback_setpoint_C", 15.0, low=5.0, high=30.0),
    )
    t.reject_unknown()
    return schedule
