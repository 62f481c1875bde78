"""Strict JSON text, files added before the caution, and the shared formatters."""

from __future__ import annotations

import json
import math

import pytest

from simheat.analysis.throttle import EmitterChange, ThrottleResult
from simheat.report import CAUTION, throttle_dict, to_json, with_files
from simheat.report.numbers import clock, finite_or_none, minutes, minutes_cell


@pytest.mark.parametrize("bad", [math.nan, math.inf, -math.inf])
def test_to_json_refuses_nan_and_infinity(bad):
    with pytest.raises(ValueError, match="not JSON compliant"):
        to_json({"value": bad})


def test_to_json_writes_none_as_null():
    assert json.loads(to_json({"a": None, "b": [1.5]})) == {"a": None, "b": [1.5]}


def test_with_files_keeps_the_caution_last_and_leaves_the_report_alone():
    report = {"scheme": "x", "caution": CAUTION}
    data = with_files(report, {"figure": "f.png"})
    assert list(data) == ["scheme", "files", "caution"]
    assert report == {"scheme": "x", "caution": CAUTION}


def test_with_files_without_a_caution_adds_none():
    assert with_files({"a": 1}, {}) == {"a": 1, "files": {}}


@pytest.mark.parametrize(
    ("seconds", "expected"), [(None, None), (0.0, 0.0), (90.0, 1.5), (-30.0, -0.5)]
)
def test_minutes_keep_none_and_round_to_a_tenth(seconds, expected):
    assert minutes(seconds) == expected


@pytest.mark.parametrize(
    ("seconds", "expected"), [(None, "--"), (29.0, "0 min"), (3600.0, "60 min")]
)
def test_minutes_cell(seconds, expected):
    assert minutes_cell(seconds) == expected


@pytest.mark.parametrize(
    ("start_s", "time_s", "expected"),
    [
        (0.0, 0.0, "00:00"),
        (5 * 3600.0, 5400.0, "06:30"),
        (23 * 3600.0, 7200.0, "01:00"),
    ],
)
def test_clock_wraps_at_midnight(start_s, time_s, expected):
    assert clock(start_s, time_s) == expected


def test_finite_or_none():
    assert finite_or_none(2.345678, 3) == 2.346
    assert finite_or_none(math.inf, 3) is None
    assert finite_or_none(math.nan, 3) is None


def test_throttle_change_from_zero_is_null_in_strict_json():
    # An emitter whose output was zero before (water no warmer than its room) has
    # no relative change: JSON gives null rather than Infinity.
    cold = EmitterChange("a", 0.01, 0.02, 0.0, 5.0)
    assert math.isinf(cold.output_change_pct)
    other = EmitterChange("b", 0.02, 0.0, 100.0, 0.0)
    result = ThrottleResult("direct_return", "b", 0.0, 20.0, other, (cold,))
    data = json.loads(to_json(throttle_dict(result)))
    assert data["changes"][0]["output_change_pct"] is None
    assert data["changes"][0]["flow_change_pct"] == 100.0
    assert data["throttled"]["flow_change_pct"] == -100.0
    assert data["caution"] == CAUTION
