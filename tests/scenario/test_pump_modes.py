"""Scenario keys of pump control: mode, setpoint_kPa and check_valve.

The same keys are read in ``[pump]``, ``[layout] primary_pump`` and each
``[[layout.floor_pumps]]`` table; bad values raise ScenarioError naming the key.
Set heads against the fitted curve's shut-off head are checked by the resolve
step (tests/resolve/test_pumps.py).
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from simheat.errors import ScenarioError
from simheat.scenario import parse_scenario

SCENARIOS_DIR = Path(__file__).resolve().parents[2] / "scenarios"
BUNGALOW = (SCENARIOS_DIR / "bungalow.toml").read_text(encoding="utf-8")
PUMP_HEAD_LINE = "head_kPa = [45.0, 42.0, 35.0, 24.0, 10.0]\n"
LAYOUT_PUMP = "flow_m3_per_h = [0.0, 1.0]\nhead_kPa = [30.0, 20.0]\n"  # shut-off 30


def bungalow(pump_keys: str = "", tail: str = ""):
    """The demo bungalow with extra ``[pump]`` keys and tables appended."""
    assert PUMP_HEAD_LINE in BUNGALOW  # the demo still holds the line we extend
    text = BUNGALOW.replace(PUMP_HEAD_LINE, PUMP_HEAD_LINE + pump_keys, 1) + tail
    return parse_scenario(text, origin="house.toml")


def test_pump_defaults_to_fixed_speed_without_set_head_or_check_valve():
    pump = bungalow().pump
    assert (pump.mode, pump.setpoint_Pa, pump.check_valve) == ("fixed_speed", 0.0, None)


@pytest.mark.parametrize("mode", ["constant_dp", "proportional_dp"])
def test_setpoint_kPa_becomes_Pa(mode):
    pump = bungalow(f'mode = "{mode}"\nsetpoint_kPa = 25.5\n').pump
    assert pump.mode == mode
    assert pump.setpoint_Pa == pytest.approx(25.5e3, rel=1e-15)


@pytest.mark.parametrize("value", [True, False])
def test_check_valve_is_read(value):
    pump = bungalow(f"check_valve = {str(value).lower()}\n").pump
    assert pump.check_valve is value


def test_primary_pump_takes_mode_set_head_and_check_valve():
    tail = (
        "\n[layout.primary_pump]\n" + LAYOUT_PUMP + 'mode = "constant_dp"\n'
        "setpoint_kPa = 12.0\ncheck_valve = true\n"
    )
    primary = bungalow(tail=tail).layout.primary_pump
    assert (primary.mode, primary.setpoint_Pa, primary.check_valve) == (
        "constant_dp",
        12e3,
        True,
    )


def test_floor_pump_takes_mode_set_head_and_check_valve():
    tail = (
        "\n[[layout.floor_pumps]]\nfloor = 0\n"
        + LAYOUT_PUMP
        + 'mode = "proportional_dp"\nsetpoint_kPa = 20.0\ncheck_valve = false\n'
    )
    pump = bungalow(tail=tail).layout.floor_pumps[0]
    assert (pump.mode, pump.setpoint_Pa, pump.check_valve) == (
        "proportional_dp",
        20e3,
        False,
    )


@pytest.mark.parametrize(
    ("pump_keys", "message"),
    [
        (
            'mode = "constant_dp"\n',
            "pump.setpoint_kPa: required key is missing for mode constant_dp",
        ),
        (
            'mode = "proportional_dp"\n',
            "pump.setpoint_kPa: required key is missing for mode proportional_dp",
        ),
        (
            'mode = "constant_dp"\nsetpoint_kPa = 0.0\n',
            "pump.setpoint_kPa: must be > 0",
        ),
        (
            'mode = "constant_dp"\nsetpoint_kPa = -5.0\n',
            "pump.setpoint_kPa: must be > 0, got -5",
        ),
        (
            'mode = "constant_dp"\nsetpoint_kPa = "25"\n',
            "pump.setpoint_kPa: must be a number",
        ),
        (
            "setpoint_kPa = 25.0\n",
            "pump.setpoint_kPa: applies only to mode constant_dp or proportional_dp, "
            "but mode is fixed_speed",
        ),
        (
            'mode = "variable_speed"\n',
            "pump.mode: must be one of constant_dp, fixed_speed, proportional_dp, "
            "got 'variable_speed'",
        ),
        ('check_valve = "yes"\n', "pump.check_valve: must be true or false"),
        ("setpoint_Pa = 25000.0\n", "pump.setpoint_Pa: unknown key"),
    ],
    ids=[
        "cdp_no_setpoint",
        "pdp_no_setpoint",
        "zero",
        "negative",
        "text",
        "fixed_speed_setpoint",
        "unknown_mode",
        "check_valve_text",
        "wrong_unit",
    ],
)
def test_bad_pump_control_names_the_key(pump_keys, message):
    with pytest.raises(ScenarioError, match=re.escape(message)):
        bungalow(pump_keys)
