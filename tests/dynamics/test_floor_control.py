"""The floor-pump switching rules, decided in Python between integration segments."""

from __future__ import annotations

from pathlib import Path
from types import SimpleNamespace

import numpy as np
import pytest

from simheat.dynamics.floor_control import (
    FloorSwitch,
    crossing_event,
    decide,
    held_until_s,
    initial_state,
    pump_summary,
    shut_periods_s,
)
from simheat.scenario import parse_scenario
from simheat.scenario.model import FloorControl

TWO_STOREY = (
    Path(__file__).resolve().parents[2] / "scenarios/two_storey.toml"
).read_text()
H = 3600.0


@pytest.fixture(scope="module")
def scenario():
    # comfort from 06:30, 1.5 h after the 05:00 start; setback 16 °C before it
    return parse_scenario(TWO_STOREY)


def _switch(scenario, **keys) -> FloorSwitch:
    control = FloorControl(floor=1, reference_room=scenario.room_index("bed2"), **keys)
    return FloorSwitch(
        link=7,
        name="pump:floor1",
        control=control,
        air_state=0,
        shut_s=shut_periods_s(control, scenario.schedule.start_clock_s, 6 * H),
    )


def _air(temp_C: float) -> np.ndarray:
    return np.array([temp_C])


@pytest.mark.parametrize(
    ("period", "start", "expected"),
    [
        # 09:00-16:00 in a run from 05:00 for 6 h: from 4 h to the end
        (("09:00", "16:00"), 5.0, ((4 * H, 6 * H),)),
        # 22:00-06:00 wraps midnight: from the start to 1 h
        (("22:00", "06:00"), 5.0, ((0.0, 1 * H),)),
        # 04:00-05:30 starts before the run
        (("04:00", "05:30"), 5.0, ((0.0, 0.5 * H),)),
        # a run from 23:00 over midnight, shut 00:00-01:00
        (("00:00", "01:00"), 23.0, ((1 * H, 2 * H),)),
        # not within the run
        (("12:00", "13:00"), 5.0, ()),
    ],
)
def test_shut_periods_in_run_time(period, start, expected):
    clock = [3600.0 * int(p[:2]) + 60.0 * int(p[3:]) for p in period]
    control = FloorControl(floor=0, shut_off=(tuple(clock),))
    # exact: whole hours and minutes in seconds
    assert shut_periods_s(control, start * H, 6 * H) == expected


def test_shut_periods_repeat_every_day_of_a_long_run():
    control = FloorControl(floor=0, shut_off=((0.0, 3600.0),))  # 00:00-01:00
    periods = shut_periods_s(control, 0.0, 3 * 86400.0)
    assert periods == ((0.0, H), (86400.0, 86400.0 + H), (172800.0, 172800.0 + H))


def test_thresholds_follow_the_room_setpoint_and_setback(scenario):
    switch = _switch(scenario, hysteresis_K=1.0)
    # bed2's setpoint is 20 °C in comfort, setback 16 °C before it
    assert switch.thresholds_C(scenario, True) == (20.5, 19.5)
    assert switch.thresholds_C(scenario, False) == (16.5, 15.5)
    given = _switch(scenario, setpoint_C=18.0, hysteresis_K=1.0)
    assert given.thresholds_C(scenario, False) == (18.5, 17.5)


def test_hysteresis_keeps_the_call_inside_the_band(scenario):
    switch = _switch(scenario, hysteresis_K=1.0, min_run_s=0.0, min_off_s=0.0)
    t = 2 * H  # in comfort: stop at 20.5, call again at 19.5
    state = initial_state(switch, scenario, _air(15.0))
    assert (state.calling, state.running) == (True, True)
    for air, calling in [(20.0, True), (20.5, False), (20.0, False), (19.5, True)]:
        decide(switch, state, scenario, _air(air), t)
        assert state.calling is calling
        assert state.running is calling
        t += 60.0
    assert [on for _, on in state.log] == [True, False, True]


def test_minimum_run_time_holds_a_stop_back(scenario):
    switch = _switch(scenario, hysteresis_K=1.0, min_run_s=600.0, min_off_s=600.0)
    state = initial_state(switch, scenario, _air(15.0))
    decide(switch, state, scenario, _air(19.0), 2 * H)  # still calling
    state.since_s = 2 * H  # started just now (as at a switch)
    decide(switch, state, scenario, _air(20.6), 2 * H + 120.0)
    assert not state.calling
    assert state.running  # held: it has run only 2 of its 10 minutes
    assert (
        held_until_s(switch, state, scenario, _air(20.6), 2 * H + 120.0)
        == 2 * H + 600.0
    )
    decide(switch, state, scenario, _air(20.7), 2 * H + 600.0)
    assert not state.running
    assert state.log[-1] == (2 * H + 600.0, False)


def test_a_held_stop_is_dropped_when_the_room_cools_again(scenario):
    switch = _switch(scenario, hysteresis_K=1.0, min_run_s=600.0)
    state = initial_state(switch, scenario, _air(15.0))
    state.since_s = 2 * H
    decide(switch, state, scenario, _air(20.6), 2 * H + 60.0)
    decide(switch, state, scenario, _air(19.4), 2 * H + 300.0)
    assert state.calling
    assert state.running
    assert held_until_s(switch, state, scenario, _air(19.4), 2 * H + 300.0) is None


def test_shut_off_stops_the_pump_at_once_and_lets_it_start_after(scenario):
    # 08:00-09:00: 3 h to 4 h into the run; minimum run time not binding
    control_keys = {"shut_off": ((8 * H, 9 * H),), "min_run_s": 7200.0}
    switch = _switch(scenario, **control_keys)
    state = initial_state(switch, scenario, _air(15.0))
    state.since_s = 2.9 * H
    decide(switch, state, scenario, _air(18.0), 3 * H)
    assert not state.running  # shut, though it ran only 6 minutes
    decide(switch, state, scenario, _air(17.0), 4 * H)
    assert state.running  # the period is over and the room calls
    assert switch.edges_s() == {3 * H, 4 * H}


def test_crossing_event_watches_the_way_the_call_would_change(scenario):
    switch = _switch(scenario, hysteresis_K=1.0)
    calling = initial_state(switch, scenario, _air(15.0))
    event = crossing_event(switch, calling, scenario, True)
    assert (event.terminal, event.direction) == (True, 1.0)
    assert event(0.0, _air(20.5)) == pytest.approx(0.0)
    calling.calling = False
    event = crossing_event(switch, calling, scenario, True)
    assert event.direction == -1.0
    assert event(0.0, _air(19.5)) == pytest.approx(0.0)


def test_pump_summary_counts_starts_stops_and_running_time():
    def seg(start, end, circulating, speed):
        return (SimpleNamespace(start_s=start, end_s=end, circulating=circulating,
                                pump_speed=np.array([0.0, speed])), None)  # fmt: skip

    segments = [
        seg(0.0, 100.0, False, 1.0),  # heating off: not running
        seg(100.0, 400.0, True, 1.0),  # start
        seg(400.0, 500.0, True, 0.0),  # stop
        seg(500.0, 900.0, True, 1.0),  # start
    ]
    assert pump_summary(1, segments, 900.0) == {
        "on_time_s": 700.0,
        "switches": 3,
        "switched_s": [[0.0, False], [100.0, True], [400.0, False], [500.0, True]],
    }
