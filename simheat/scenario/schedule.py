"""Scenario sections ``[schedule]`` and ``[simulation]``: the morning and its run."""

from __future__ import annotations

import re

from simheat.scenario.common import (
    MAX_FLOW_TEMP_C,
    MAX_PIPE_LENGTH_M,
    MAX_SETPOINT_C,
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
# Initial room temperatures: a house left unheated in deep frost to a hot day. [°C]
MIN_INITIAL_ROOM_C = -20.0
MAX_INITIAL_ROOM_C = 40.0

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
        * t.number("duration_h", 6.0, low=MIN_DURATION_H, high=MAX_DURATION_H),
        output_step_s=60.0
        * t.number(
            "output_step_min", 1.0, low=MIN_OUTPUT_STEP_MIN, high=60.0 * MAX_DURATION_H
        ),
        initial_room_temp_C=t.number(
            "initial_room_temp_C",
            15.0,
            low=MIN_INITIAL_ROOM_C,
            high=MAX_INITIAL_ROOM_C,
        ),
        initial_water_temp_C=t.number(
            "initial_water_temp_C", 15.0, low=0.0, high=MAX_FLOW_TEMP_C
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


def _clock_s(t: Table, key: str, default: str) -> float:
    value = t.text(key, default)
    match = _CLOCK.match(value)
    if not match:
        raise t.fail(key, f"must be a clock time HH:MM, got {shown(value)}")
    return 3600.0 * int(match.group(1)) + 60.0 * int(match.group(2))


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
        setback_setpoint_C=t.number(
            "setback_setpoint_C", 15.0, low=MIN_SETPOINT_C, high=MAX_SETPOINT_C
        ),
    )
    t.reject_unknown()
    return schedule
