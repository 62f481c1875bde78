"""Controls of the warm-up run: valve events, pump stop, flow-temperature control,
head sensor time constant, and the scenario keys behind them."""

import numpy as np
import pytest

from simheat.dynamics import controls
from simheat.dynamics.integrate import WarmUpModel, integrate
from simheat.dynamics.simulate import simulate
from simheat.errors import ScenarioError

CURVE = (
    "[source.heating_curve]\noutdoor_temp_C = [-10.0, 15.0]\nflow_temp_C = [70.0, 35.0]"
)


def _at(run, time_s):
    return int(np.searchsorted(run.time_s, time_s))


def test_closing_a_valve_cuts_its_emitter_to_leakage_flow(small_house):
    run = simulate(small_house(), valve_events=[(1800.0, 0, 0.0)])
    before = run.emitter_flow_kg_s[_at(run, 1800.0) - 1, 0]
    after = run.emitter_flow_kg_s[_at(run, 1800.0), 0]
    # A closed valve passes LEAKAGE_FRACTION of its Kv (0.5 %): its flow falls to a
    # few per cent of the open flow at most (the rest of the circuit then carries
    # the whole pump head, so the fall is less than Kv's). Loose bound, physics.
    assert after < 0.05 * before


def test_closing_one_valve_pushes_water_to_the_other_emitter(small_house):
    # Closing one branch raises the differential pressure across the others
    # (common trade experience; follows from the falling pump curve).
    run = simulate(small_house(), valve_events=[(1800.0, 0, 0.0)])
    i = _at(run, 1800.0)
    assert run.emitter_flow_kg_s[i, 1] > run.emitter_flow_kg_s[i - 1, 1]


def test_valve_event_time_starts_a_new_segment(small_house):
    solution = integrate(
        small_house(), "direct_return", valve_events=[(1234.0, 1, 0.3)]
    )
    assert 1234.0 in [seg.start_s for seg, _ in solution.segments]


def test_later_valve_event_overrides_an_earlier_one():
    events = [(600.0, 1, 0.2), (100.0, 1, 0.0), (900.0, 0, 0.5)]
    sorted_events = tuple(sorted(events))
    assert controls.valve_openings(2, sorted_events, 700.0).tolist() == [1.0, 0.2]
    assert controls.valve_openings(2, sorted_events, 50.0).tolist() == [1.0, 1.0]


@pytest.mark.parametrize(
    ("event", "message"),
    [
        ((-1.0, 0, 0.5), r"valve_events\[0\]: time must lie within 0 to 3600 s"),
        ((4000.0, 0, 0.5), r"valve_events\[0\]: time must lie within 0 to 3600 s"),
        ((100.0, 2, 0.5), r"valve_events\[0\]: emitter index must be in 0\.\.1"),
        ((100.0, 0.5, 0.5), r"valve_events\[0\]: emitter index must be an integer"),
        ((100.0, 0, 1.5), r"valve_events\[0\]: opening must lie within 0 to 1"),
        ((100.0, 0), r"valve_events\[0\]: must be \(time_s, emitter_index, opening\)"),
    ],
)
def test_bad_valve_events_are_refused(small_house, event, message):
    with pytest.raises(ScenarioError, match=message):
        controls.check_valve_events(small_house(), [event])


def test_stopped_pump_leaves_no_flow_anywhere(small_house):
    run = simulate(small_house(), pump_stop_s=1800.0)
    i = _at(run, 1800.0)
    assert np.all(run.emitter_flow_kg_s[i - 1] > 0.0)
    assert np.all(run.emitter_flow_kg_s[i:] == 0.0)


def test_pump_stop_time_comes_from_the_scenario(small_house):
    scenario = small_house(pump="stop_at_h = 0.5")
    stop = controls.pump_stop_time_s(scenario, None)
    assert stop == pytest.approx(1800.0)
    wm = WarmUpModel(scenario, "direct_return", (), stop)
    assert wm.segment(1700.0, 1799.0).circulating
    assert not wm.segment(1800.0, 1900.0).circulating


def test_energy_books_close_after_a_pump_failure(small_house):
    # DESIGN: source = room gains + pipe losses + change of stored heat, < 0.5 %.
    run = simulate(small_house(), pump_stop_s=1200.0)
    assert run.summary.energy.balance_error_pct < 0.5


@pytest.mark.parametrize(
    ("outdoor_C", "flow_C"),
    [(-20.0, 70.0), (-10.0, 70.0), (4.0, 50.4), (15.0, 35.0), (25.0, 35.0)],
)
def test_heating_curve_is_linear_between_its_points_and_held_beyond(
    small_house, outdoor_C, flow_C
):
    # Straight line through (-10, 70) and (15, 35), clamped at its ends (our choice,
    # as weather-compensating controllers hold their curve's limits).
    scenario = small_house(source=CURVE, weather=f"outdoor_temp_C = {outdoor_C}")
    assert controls.flow_temp_setpoint_C(scenario, 0.0) == pytest.approx(flow_C)


def test_supply_follows_the_heating_curve(small_house):
    # 0 °C outdoors on the curve above asks for 70 - 35 * 10 / 25 = 56 °C.
    run = simulate(small_house(source=CURVE, weather="outdoor_temp_C = 0.0", hours=2))
    # The source's control loop (60 s) settles the flow within 0.5 K once the rooms
    # draw less than the power limit.
    assert run.supply_temp_C[-1] == pytest.approx(56.0, abs=0.5)


def test_supply_follows_a_flow_temperature_schedule(small_house):
    schedule = (
        "[source.flow_temp_schedule]\ntime_h = [0.0, 1.0, 1.5]\n"
        "flow_temp_C = [60.0, 60.0, 45.0]"
    )
    run = simulate(small_house(source=schedule, hours=2))
    assert controls.flow_temp_setpoint_C(run.scenario, 4500.0) == pytest.approx(52.5)
    assert run.supply_temp_C[-1] == pytest.approx(45.0, abs=0.5)


def test_head_sensor_lags_the_air_with_its_time_constant(small_house):
    # First-order sensor: dT_sensor/dt = (T_air - T_sensor) / tau.
    wm = WarmUpModel(
        small_house(emitter="sensor_time_constant_min = 4.0"), "direct_return"
    )
    y = wm.initial_state()
    s = wm.slices
    y[s["air"]] = 20.0
    y[s["sensors"]] = 17.0
    seg = wm.segment(0.0, 60.0)
    rate = wm.rhs(0.0, y, seg)[s["sensors"]]
    np.testing.assert_allclose(rate, (20.0 - 17.0) / 240.0, rtol=1e-12)


def test_head_sensor_time_constant_defaults_to_ten_minutes(small_house):
    scenario = small_house()
    assert [e.sensor_time_constant_s for e in scenario.emitters] == [600.0, 600.0]


@pytest.mark.parametrize(
    ("parts", "message"),
    [
        (
            {"source": "flow_temp_C = 60.0\n" + CURVE},
            r"source\.flow_temp_C: give exactly one flow-temperature control",
        ),
        (
            {"source": "max_flow = 1"},
            r"source\.flow_temp_C: give exactly one flow-temperature control",
        ),
        (
            {
                "source": "[source.flow_temp_schedule]\ntime_h = [0.0, 2.0, 1.0]\n"
                "flow_temp_C = [60.0, 55.0, 50.0]"
            },
            r"source\.flow_temp_schedule\.time_h: times must be strictly increasing",
        ),
        (
            {
                "source": "[source.flow_temp_schedule]\ntime_h = [0.0, 1.0]\n"
                "flow_temp_C = [60.0, 19.0]"
            },
            r"source\.flow_temp_schedule\.flow_temp_C: values must lie within 25",
        ),
        (
            {
                "source": "[source.heating_curve]\noutdoor_temp_C = [-10.0, 15.0]\n"
                "flow_temp_C = [35.0, 70.0]"
            },
            r"source\.heating_curve\.flow_temp_C: must not rise",
        ),
        (
            {
                "source": "[source.heating_curve]\noutdoor_temp_C = [15.0, -10.0]\n"
                "flow_temp_C = [70.0, 35.0]"
            },
            r"source\.heating_curve\.outdoor_temp_C: must be strictly increasing",
        ),
        (
            {"pump": "stop_at_h = 2.0"},
            r"pump\.stop_at_h: must not be after the end of the simulation",
        ),
        (
            {"emitter": "sensor_time_constant_min = -3.0"},
            r"emitters\[0\]\.sensor_time_constant_min: must be >= 1",
        ),
    ],
)
def test_bad_control_keys_are_refused(small_house, parts, message):
    with pytest.raises(ScenarioError, match=message):
        small_house(**parts)


@pytest.mark.parametrize(
    ("source", "key"),
    [
        ("flow_temp_C = 27.0", r"source\.flow_temp_C"),
        (
            "[source.flow_temp_schedule]\ntime_h = [0.0, 1.0]\n"
            "flow_temp_C = [60.0, 27.0]",
            r"source\.flow_temp_schedule\.flow_temp_C",
        ),
        (
            "[source.heating_curve]\noutdoor_temp_C = [-10.0, 15.0]\n"
            "flow_temp_C = [60.0, 27.0]",
            r"source\.heating_curve\.flow_temp_C",
        ),
    ],
)
def test_flow_temperature_below_a_setpoint_is_refused(small_house, source, key):
    # Issue 5, bad input: a flow temperature at or below a room's setpoint can never
    # heat it; the lowest value the control can ask for is checked.
    with pytest.raises(ScenarioError, match=key + r": must be above the setpoint 28"):
        small_house(source=source, front_setpoint_C=28.0)


def test_schedule_above_every_setpoint_is_accepted(small_house):
    schedule = "[source.flow_temp_schedule]\ntime_h = [0.0]\nflow_temp_C = [29.0]"
    scenario = small_house(source=schedule, front_setpoint_C=28.0)
    assert scenario.source.lowest_flow_temp_C == 29.0


def test_supply_tracks_the_heating_curve_as_the_weather_changes(small_house):
    # Outdoors warming from -10 to +5 °C over 2 h: the curve asks for 70 °C at the
    # start and 70 - 35 * 15 / 25 = 49 °C at the end. A 60 s control loop lags a
    # ramp of 21 K / 2 h by about 0.2 K.
    weather = "time_h = [0.0, 2.0]\noutdoor_temp_C = [-10.0, 5.0]"
    run = simulate(small_house(source=CURVE, weather=weather, hours=2, power_kW=8))
    assert run.supply_temp_C[-1] == pytest.approx(49.0, abs=0.5)
