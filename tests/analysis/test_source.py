"""Time a source spends at its power limit."""

from __future__ import annotations

import numpy as np
import pytest

from simheat.analysis.source import power_limit_time
from simheat.dynamics._kernels import smooth_clip
from simheat.dynamics.controls import SOURCE_LIMIT_SMOOTHING
from simheat.runs.metrics import AT_LIMIT_FRACTION

MAX_W = 10_000.0


def test_stretches_run_from_first_to_last_sample_at_the_limit():
    t = np.arange(0.0, 600.0, 60.0)
    p = np.array([1, 10, 10, 5, 10, 10, 10, 2, 1, 1], dtype=float) * 1000.0
    limit = power_limit_time(t, p, MAX_W)
    assert limit.intervals_s == ((60.0, 120.0), (240.0, 360.0))
    assert limit.total_s == pytest.approx(180.0)
    assert limit.share == pytest.approx(180.0 / 540.0)


def test_the_smooth_clip_saturated_counts_as_at_the_limit():
    # The model's source output for a demand well above the limit lies inside
    # the clip's corner; at a demand of the limit itself it sits half a corner
    # below (smooth_clip(P, P, w) = P - w/2), which still counts: the corner
    # (0.5 % of the limit) lies within the 1 % band of AT_LIMIT_FRACTION.
    width = SOURCE_LIMIT_SMOOTHING * MAX_W
    saturated = smooth_clip.py_func(3.0 * MAX_W, MAX_W, width)
    at_demand = smooth_clip.py_func(MAX_W, MAX_W, width)
    assert at_demand == pytest.approx(MAX_W - width / 2.0, rel=1e-3)
    below = 0.98 * MAX_W
    p = np.array([saturated, at_demand, below])
    limit = power_limit_time(np.array([0.0, 60.0, 120.0]), p, MAX_W)
    assert limit.intervals_s == ((0.0, 60.0),)


def test_never_at_the_limit_gives_no_stretch():
    limit = power_limit_time(np.array([0.0, 60.0]), np.array([1.0, 2.0]), MAX_W)
    assert limit.intervals_s == ()
    assert limit.total_s == 0.0


def test_stretches_agree_with_the_run_summarys_share(bungalow_runs):
    from simheat.analysis.source import run_power_limit_time

    run = bungalow_runs["direct_return"]  # comfort from the start of the run
    assert run.scenario.schedule.comfort_start_s == 0.0
    limit = run_power_limit_time(run)
    # Same rule, same grid: the first-to-last-sample stretches and the summary's
    # trapezoidal share differ by at most half an output step per stretch end.
    step = float(run.time_s[1] - run.time_s[0])
    tolerance = len(limit.intervals_s) * step / limit.duration_s
    assert limit.share == pytest.approx(run.summary.source_at_limit, abs=tolerance)
    assert AT_LIMIT_FRACTION < 1.0 - SOURCE_LIMIT_SMOOTHING / 2.0
