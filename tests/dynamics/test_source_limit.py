"""A heat source held at its power limit: time at the limit, hot-water arrival."""

from __future__ import annotations

import numpy as np
import pytest

from simheat.dynamics.simulate import simulate
from simheat.runs.metrics import AT_LIMIT_FRACTION, HOT_WATER_FRACTION


@pytest.fixture
def limited_run(small_house):
    """The small house with a 0.8 kW source against 1.3 kW of load, 1 h."""
    return simulate(small_house(power_kW=0.8))


def test_source_at_limit_is_the_share_of_comfort_at_99_percent(limited_run):
    run = limited_run
    at = run.source_power_W >= AT_LIMIT_FRACTION * run.scenario.source.max_power_W
    # the metric is the trapezoidal time mean of that indicator over comfort
    expected = np.trapezoid(at.astype(float), run.time_s) / run.time_s[-1]
    assert run.summary.source_at_limit == pytest.approx(expected, rel=1e-12)
    # 0.8 kW cannot warm 1.3 kW of rooms and the water: at the limit almost always
    assert run.summary.source_at_limit > 0.9


def test_hot_water_is_measured_against_the_supply_reached(limited_run):
    run = limited_run
    reached = run.supply_temp_C.max()
    assert reached < 60.0 - 5.0  # far below the 60 °C setpoint
    initial = run.scenario.simulation.initial_water_temp_C
    # dense maximum refines the sampled one by at most the change over a step
    assert run.summary.hot_water_level_C == pytest.approx(
        initial + HOT_WATER_FRACTION * (reached - initial), abs=0.05
    )
    arrivals = [e.hot_water_arrival_s for e in run.summary.emitters]
    assert all(a is not None and a > 0.0 for a in arrivals)


def test_bungalow_source_reaches_its_limit_for_part_of_the_morning(bungalow_runs):
    # 16 kW against a cold start: at the limit early, then modulating
    share = bungalow_runs["direct_return"].summary.source_at_limit
    assert 0.0 < share < 0.5
