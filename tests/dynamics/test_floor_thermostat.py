"""Floor pumps following a floor thermostat and a shut-off schedule, simulated."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from simheat.dynamics.integrate import integrate
from simheat.dynamics.simulate import simulate
from simheat.scenario import parse_scenario

TWO_STOREY = (
    Path(__file__).resolve().parents[2] / "scenarios/two_storey.toml"
).read_text()
SCHEME = "direct_return_floor_pumps"
# The upper floor's pump follows bed2 at 18 °C; bed2 starts at 16 °C (no night
# simulated) and the heating runs in setback from the start, so the room
# overheats past 18.25 °C well within 3 h. A copy of the [pump] curve for the
# floor pump.
FLOOR_1 = """
[[layout.floor_pumps]]
floor = 1
flow_m3_per_h = [0.0, 0.4, 0.8, 1.2, 1.6]
head_kPa = [40.0, 38.0, 32.0, 22.0, 8.0]
thermostat_room = "bed2"
thermostat_setpoint_C = 18.0
thermostat_hysteresis_K = 0.5
min_run_min = 5
min_off_min = 5
"""
SHORT = TWO_STOREY.replace("duration_h = 6.0", "duration_h = 3.0")
# Without the night: every room starts at 16 °C and the water at 25 °C.
MORNING_ONLY = SHORT.replace('off_from = "22:30"', "#").replace(
    "output_step_min = 2.0\n",
    "output_step_min = 2.0\ninitial_room_temp_C = 16.0\ninitial_water_temp_C = 25.0\n",
)


@pytest.fixture(scope="module")
def thermostat_run():
    scenario = parse_scenario(MORNING_ONLY + FLOOR_1)
    assert scenario.schedule.off_clock_s is None  # the night is gone
    return integrate(scenario, SCHEME)


def _first_stop(solution):
    """The first segment boundary where floor 1's pump stops."""
    wm = solution.model
    link = wm.network.link_names.index("pump:floor1")
    for (before, _), (after, _) in zip(
        solution.segments[:-1], solution.segments[1:], strict=True
    ):
        if before.pump_speed[link] > 0.0 and after.pump_speed[link] == 0.0:
            return before, after
    raise AssertionError("floor 1's pump never stopped")


def test_the_pump_stops_where_the_room_reaches_the_stop_temperature(thermostat_run):
    before, after = _first_stop(thermostat_run)
    t = after.start_s
    assert before.end_s == t  # the segment ended at the crossing
    wm = thermostat_run.model
    bed2 = wm.slices["air"].start + wm.scenario.room_index("bed2")
    air = thermostat_run.state_at([t])[0, bed2]
    # 18 °C + half of 0.5 K; root finding on the dense output (solve_ivp's
    # event location, about 4 machine epsilons in time) leaves the air within
    # the integration's own tolerance (atol 1e-4 K) of it
    assert air == pytest.approx(18.25, abs=1e-4)


def test_a_stopped_floor_leaves_the_other_floors_flows_unchanged(thermostat_run):
    # Same state, the floor 1 pump running (the segment before) and stopped
    # (after): the ground floor's emitters behind the low-loss header keep
    # their flows within 0.1 % (measured: 0.004 %); the upper floor's fall to
    # what the header's small pressure difference pushes through the stopped
    # pump (measured: under 0.8 % of each emitter's flow before).
    before, after = _first_stop(thermostat_run)
    wm = thermostat_run.model
    t = after.start_s
    y = thermostat_run.state_at([t])[0]
    links = wm.network.emitter_links()
    ground = [tee.emitter for tee in wm.scenario.route.floors[0].tees]
    upper = [tee.emitter for tee in wm.scenario.route.floors[1].tees]
    on = wm.evaluate(t, y, before)["flows"][links]
    off = wm.evaluate(t, y, after)["flows"][links]
    assert np.max(np.abs(off[ground] / on[ground] - 1.0)) < 1e-3
    assert np.all(np.abs(off[upper]) < 0.01 * on[upper])


def test_the_pump_keeps_its_minimum_times(thermostat_run):
    wm = thermostat_run.model
    link = wm.network.link_names.index("pump:floor1")
    changes = []
    running = None
    for seg, _ in thermostat_run.segments:
        now = seg.pump_speed[link] > 0.0
        if running is not None and now != running:
            changes.append(seg.start_s)
        running = now
    assert len(changes) >= 3  # it cycles
    assert np.min(np.diff(changes)) >= 300.0 - 1e-6


def test_shut_off_stops_the_floor_for_its_clock_period():
    # 06:00-07:00 is 1 h to 2 h into a run from 05:00; no thermostat. The night
    # before 05:00 (heating off) is simulated but not counted: the record
    # starts at 0 and the start of heating is no switch.
    shut = FLOOR_1.split("thermostat_room")[0] + 'shut_off = [["06:00", "07:00"]]\n'
    scenario = parse_scenario(SHORT + shut)
    run = simulate(scenario, SCHEME)
    record = run.floor_pumps["pump:floor1"]
    assert record["switched_s"] == [[0.0, True], [3600.0, False], [7200.0, True]]
    assert record["on_time_s"] == pytest.approx(2 * 3600.0, rel=1e-12)
    assert record["switches"] == 2
    # the unswitched ground-floor pump runs throughout, and the books close
    assert run.floor_pumps["pump:floor0"]["switches"] == 0
    assert abs(run.summary.energy.balance_error_pct) < 0.5
    upper = [tee.emitter for tee in scenario.route.floors[1].tees]
    during = (run.time_s > 3700.0) & (run.time_s < 7100.0)
    assert np.max(np.abs(run.emitter_flow_kg_s[np.ix_(during, upper)])) < 1e-3


def test_schemes_without_floor_pumps_ignore_the_floor_controls():
    run = simulate(parse_scenario(SHORT + FLOOR_1), "direct_return")
    assert run.floor_pumps == {}


def test_a_heating_start_before_the_morning_keeps_the_shut_off_before_it():
    # A start-time trial (as simheat run --ready-by makes them): heating from
    # 02:00 (-3 h) to 06:30 (the ready time). The floor is shut 03:00-04:00,
    # before the morning's 0 (05:00): its pump stands exactly then, and the
    # integration ends at the trial's end, not the run's.
    import dataclasses

    from simheat.dynamics.integrate import WarmUpModel, integrate_model, tolerances

    shut = FLOOR_1.split("thermostat_room")[0] + 'shut_off = [["03:00", "04:00"]]\n'
    scenario = parse_scenario(TWO_STOREY + shut)
    wm = WarmUpModel(scenario, SCHEME)
    evening = wm.initial_state(tolerances(wm, scenario.simulation.rtol))
    start, end = -3 * 3600.0, 1.5 * 3600.0
    heated = wm.with_schedule(
        dataclasses.replace(
            scenario.schedule, comfort_start_s=start, before_comfort="off"
        )
    )
    solution = integrate_model(heated, start_s=start, end_s=end, initial_state=evening)
    link = wm.network.link_names.index("pump:floor1")
    spans = [
        (s.start_s, s.end_s, s.pump_speed[link] > 0.0) for s, _ in solution.segments
    ]
    assert spans[0][0] == start
    assert spans[-1][1] == end
    stopped = [(a, b) for a, b, running in spans if not running]
    assert stopped == [(-2 * 3600.0, -3600.0)]
