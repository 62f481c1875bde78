"""Run metrics: crossings and maxima from dense output, and the summary they build."""

import math

import numpy as np
import pytest

from simheat.runs import metrics

SCHEMES = ["direct_return", "reverse_return"]


def test_first_crossing_is_refined_between_samples():
    # 1 - exp(-t / tau) crosses 1/2 at tau ln 2 (closed form); coarse samples only
    # bracket it, Brent's method must find it to its 1e-3 s tolerance.
    tau = 700.0
    time_s = np.linspace(0.0, 3000.0, 7)

    def f(t):
        return 1.0 - math.exp(-t / tau)

    crossing = metrics.first_crossing_s(
        f, time_s, np.array([f(t) for t in time_s]), 0.5
    )
    assert crossing == pytest.approx(tau * math.log(2.0), abs=2e-3)


def test_first_crossing_is_none_when_never_reached():
    time_s = np.linspace(0.0, 10.0, 11)
    assert (
        metrics.first_crossing_s(lambda t: 0.1 * t, time_s, 0.1 * time_s, 5.0) is None
    )


def test_dense_maximum_finds_a_peak_between_samples():
    # A parabola peaking at t = 37 with value 3, sampled every 10 s.
    def f(t):
        return 3.0 - (t - 37.0) ** 2 / 100.0

    time_s = np.arange(0.0, 101.0, 10.0)
    peak = metrics.dense_maximum(f, time_s, np.array([f(t) for t in time_s]))
    assert peak == pytest.approx(3.0, abs=1e-6)


@pytest.mark.parametrize(("reached_s", "expected"), [(None, 0.0), (10.0, 0.5)])
def test_overshoot_counts_only_after_the_setpoint_is_reached(reached_s, expected):
    # Air rising to 20.5 °C at t = 50 s, then falling: 0.5 K over a 20 °C setpoint.
    def air(t):
        return 20.5 - (t - 50.0) ** 2 / 1000.0

    time_s = np.arange(0.0, 101.0, 20.0)
    samples = np.array([air(t) for t in time_s])
    result = metrics.overshoot_K(air, time_s, samples, 20.0, reached_s)
    assert result == pytest.approx(expected, abs=1e-6)


def test_overshoot_is_zero_when_the_air_stays_below_the_setpoint():
    time_s = np.arange(0.0, 101.0, 20.0)
    assert (
        metrics.overshoot_K(lambda t: 19.8, time_s, 19.8 + 0 * time_s, 20.0, 0.0) == 0
    )


def test_hot_water_level_is_ninety_percent_of_the_way():
    # Issue 5: 90 % of the way from the initial water to the flow temperature.
    assert metrics.hot_water_level_C(10.0, 70.0) == pytest.approx(64.0)


@pytest.mark.parametrize("scheme", SCHEMES)
def test_operative_temperature_lags_the_air_in_a_warm_up(bungalow_runs, scheme):
    # Heat enters mostly by convection (70 %) into the light air node, so the heavy
    # structure, and with it the operative temperature, trails the air.
    for room in bungalow_runs[scheme].summary.rooms:
        if room.time_to_setpoint_operative_s is not None:
            assert room.time_to_setpoint_operative_s >= room.time_to_setpoint_s
        assert room.final_operative_temp_C < room.final_air_temp_C


@pytest.mark.parametrize("scheme", SCHEMES)
def test_overshoot_matches_the_sampled_air_peak(bungalow_runs, scheme):
    run = bungalow_runs[scheme]
    for r, room in enumerate(run.summary.rooms):
        if room.time_to_setpoint_s is None:
            assert room.overshoot_K == 0.0
            continue
        after = run.time_s >= room.time_to_setpoint_s
        sampled = max(0.0, run.air_temp_C[after, r].max() - room.setpoint_C)
        # The dense maximum is at least the sampled one and, with 2 min samples of
        # a room whose air changes by well under 0.1 K per 2 min near its peak,
        # above it by less than 0.05 K.
        assert sampled - 1e-9 <= room.overshoot_K <= sampled + 0.05


def test_hot_water_reaches_the_direct_return_run_in_route_order(bungalow_runs):
    # Transport delay: the front moves from the first tee to the last (plug flow
    # along the header), so arrival times grow along the route.
    run = bungalow_runs["direct_return"]
    tees = [t.emitter for f in run.scenario.route.floors for t in f.tees]
    arrivals = [run.summary.emitters[e].hot_water_arrival_s for e in tees]
    assert all(a is not None for a in arrivals)
    assert all(b >= a for a, b in zip(arrivals, arrivals[1:], strict=False))


@pytest.mark.parametrize("scheme", SCHEMES)
def test_hot_water_arrival_is_bracketed_by_the_sampled_inlet(bungalow_runs, scheme):
    run = bungalow_runs[scheme]
    level = run.summary.hot_water_level_C
    for e, result in enumerate(run.summary.emitters):
        i = int(np.searchsorted(run.time_s, result.hot_water_arrival_s))
        assert run.emitter_inlet_temp_C[i - 1, e] < level
        assert run.emitter_inlet_temp_C[i, e] >= level


@pytest.mark.parametrize("scheme", SCHEMES)
def test_peak_source_power_is_the_refined_maximum(bungalow_runs, scheme):
    run = bungalow_runs[scheme]
    limit = run.scenario.source.max_power_W
    assert run.summary.peak_source_power_W >= run.source_power_W.max()
    # smooth power limiter: within its 0.5 % corner width of the limit
    assert run.summary.peak_source_power_W <= 1.005 * limit


def test_json_summary_carries_the_issue_keys_in_practical_units(bungalow_runs):
    from simheat.report import CAUTION, run_summary_dict

    run = bungalow_runs["direct_return"]
    data = run_summary_dict(run)
    for room, result in zip(data["rooms"], run.summary.rooms, strict=True):
        assert room["overshoot_K"] == pytest.approx(result.overshoot_K, abs=1e-3)
        operative = result.time_to_setpoint_operative_s
        expected = (
            None if operative is None else pytest.approx(operative / 60, abs=0.05)
        )
        assert room["time_to_setpoint_operative_min"] == expected
    for emitter, result in zip(data["emitters"], run.summary.emitters, strict=True):
        expected = pytest.approx(result.hot_water_arrival_s / 60.0, abs=0.05)
        assert emitter["hot_water_arrival_min"] == expected
    expected_kw = pytest.approx(run.summary.peak_source_power_W / 1e3, abs=1e-3)
    assert data["peak_source_power_kW"] == expected_kw
    assert set(data["energy"]) == {
        "source_kWh",
        "room_gains_kWh",
        "pipe_losses_kWh",
        "pipe_to_rooms_kWh",
        "pipe_to_unheated_kWh",
        "stored_change_kWh",
        "balance_error_pct",
    }
    assert data["caution"] == CAUTION
