"""Comfort shortfall of a run: degree-hours below setpoint after comfort start."""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

from simheat.analysis.compare import comfort_shortfall_Kh


def _with_air(run, air_C):
    return dataclasses.replace(run, air_temp_C=air_C)


def test_rooms_at_setpoint_have_no_shortfall(bungalow_runs):
    run = bungalow_runs["direct_return"]
    setpoints = np.array([r.setpoint_C for r in run.scenario.rooms])
    air = np.broadcast_to(setpoints, run.air_temp_C.shape).copy()
    assert comfort_shortfall_Kh(_with_air(run, air)) == 0.0


def test_constant_deficit_gives_deficit_times_comfort_hours(bungalow_runs):
    run = bungalow_runs["direct_return"]
    scenario = run.scenario
    tolerance = scenario.simulation.reached_tolerance_K
    setpoints = np.array([r.setpoint_C for r in scenario.rooms])
    air = np.broadcast_to(setpoints, run.air_temp_C.shape).copy()
    air[:, 0] = setpoints[0] - tolerance - 2.0  # one room 2 K below the reached level
    comfort_h = (run.time_s[-1] - scenario.schedule.comfort_start_s) / 3600.0
    # Exact: the trapezoidal rule integrates a constant without error.
    assert comfort_shortfall_Kh(_with_air(run, air)) == pytest.approx(
        2.0 * comfort_h, rel=1e-12
    )


def test_linear_recovery_gives_the_triangle(bungalow_runs):
    run = bungalow_runs["direct_return"]  # comfort from the start of the run
    scenario = run.scenario
    assert scenario.schedule.comfort_start_s == 0.0
    tolerance = scenario.simulation.reached_tolerance_K
    level = np.array([r.setpoint_C for r in scenario.rooms]) - tolerance
    time_h = run.time_s / 3600.0
    air = np.broadcast_to(level, run.air_temp_C.shape).copy()
    # Room 1 starts 3 K short and recovers linearly over the first 2 h: the
    # shortfall is the triangle 3 K x 2 h / 2 = 3 K h (exact on the output grid,
    # whose points include t = 2 h).
    air[:, 1] = level[1] - np.maximum(0.0, 3.0 * (1.0 - time_h / 2.0))
    assert np.any(np.isclose(time_h, 2.0))
    assert comfort_shortfall_Kh(_with_air(run, air)) == pytest.approx(3.0, rel=1e-12)
