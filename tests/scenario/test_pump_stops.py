"""Scenario key stop_at_h in [pump], [layout.primary_pump] and [[layout.floor_pumps]].

Each table takes a stop time within the run; which pumps it stops is the
dynamics' business (tests/dynamics/test_pump_failure.py).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from simheat.errors import ScenarioError
from simheat.scenario import parse_scenario

SCENARIOS_DIR = Path(__file__).resolve().parents[2] / "scenarios"
TWO_STOREY = (SCENARIOS_DIR / "two_storey.toml").read_text(encoding="utf-8")
LAYOUT_PUMP = "flow_m3_per_h = [0.0, 1.0]\nhead_kPa = [30.0, 20.0]\n"


def two_storey(tail: str):
    """The two-storey demo (6 h run, floors 0 and 1) with tables appended."""
    return parse_scenario(TWO_STOREY + tail, origin="house.toml")


def test_floor_pump_stop_time_is_read_in_seconds():
    tail = (
        "\n[[layout.floor_pumps]]\nfloor = 0\n" + LAYOUT_PUMP + "\n"
        "[[layout.floor_pumps]]\nfloor = 1\n" + LAYOUT_PUMP + "stop_at_h = 2.0\n"
    )
    pumps = two_storey(tail).layout.floor_pumps
    assert pumps[0].stop_s is None
    assert pumps[1].stop_s == pytest.approx(7200.0, rel=1e-15)


def test_primary_pump_stop_time_is_read_in_seconds():
    tail = "\n[layout.primary_pump]\n" + LAYOUT_PUMP + "stop_at_h = 1.5\n"
    assert two_storey(tail).layout.primary_pump.stop_s == pytest.approx(5400.0)


@pytest.mark.parametrize(
    ("tail", "where"),
    [
        ("\n[layout.primary_pump]\n", "layout.primary_pump.stop_at_h"),
        ("\n[[layout.floor_pumps]]\nfloor = 1\n", r"layout.floor_pumps\[0\].stop_at_h"),
    ],
)
@pytest.mark.parametrize(
    ("value", "problem"),
    [
        ("6.5", r"must not be after the end of the simulation \(6 h\), got 6\.5"),
        ("-1.0", r"must be >= 0, got -1"),
        ('"07:00"', r"must be a number, got '07:00'"),
    ],
)
def test_pump_stop_outside_the_run_names_its_table(tail, where, value, problem):
    with pytest.raises(ScenarioError, match=rf"^{where}: {problem} \(house\.toml\)$"):
        two_storey(tail + LAYOUT_PUMP + f"stop_at_h = {value}\n")
