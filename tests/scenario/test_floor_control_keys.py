"""Reading the floor thermostats and shut-off periods of ``[[layout.floor_pumps]]``."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from simheat.errors import ScenarioError
from simheat.scenario import parse_scenario

TWO_STOREY = (
    Path(__file__).resolve().parents[2] / "scenarios/two_storey.toml"
).read_text()
PUMP = (
    "[[layout.floor_pumps]]\nfloor = 1\nflow_m3_per_h = [0.0, 0.5, 1.0]\n"
    "head_kPa = [30.0, 25.0, 10.0]\n"
)


def with_floor_pump(keys: str) -> str:
    return TWO_STOREY + "\n" + PUMP + keys + "\n"


def test_floor_thermostat_is_read_in_si():
    text = with_floor_pump(
        'thermostat_room = "bed2"\nthermostat_setpoint_C = 19.5\n'
        "thermostat_hysteresis_K = 1.0\nmin_run_min = 3\nmin_off_min = 10\n"
        'shut_off = [["09:00", "16:30"], ["23:00", "05:00"]]'
    )
    scenario = parse_scenario(text)
    control = scenario.layout.floor_controls[1]
    assert control.reference_room == scenario.room_index("bed2")
    assert (control.setpoint_C, control.hysteresis_K) == (19.5, 1.0)
    assert (control.min_run_s, control.min_off_s) == (180.0, 600.0)
    assert control.shut_off == ((9 * 3600.0, 16.5 * 3600.0), (23 * 3600.0, 5 * 3600.0))
    assert control.switched
    assert control.where == "layout.floor_pumps[0]"


def test_defaults_of_a_thermostat():
    control = parse_scenario(
        with_floor_pump('thermostat_room = "bath"')
    ).layout.floor_controls[1]
    # 0.5 K differential and 5 min run and off times (common trade practice)
    assert (control.setpoint_C, control.hysteresis_K) == (None, 0.5)
    assert (control.min_run_s, control.min_off_s) == (300.0, 300.0)
    assert control.shut_off == ()


def test_a_floor_pump_without_control_keys_has_no_control():
    scenario = parse_scenario(with_floor_pump(""))
    assert scenario.layout.floor_controls == {}
    assert 1 in scenario.layout.floor_pumps


def test_shut_off_alone_is_a_control_without_thermostat():
    control = parse_scenario(
        with_floor_pump('shut_off = [["08:00", "09:00"]]')
    ).layout.floor_controls[1]
    assert control.reference_room is None
    assert control.switched


@pytest.mark.parametrize(
    ("keys", "key", "problem"),
    [
        ('thermostat_room = "attic"', "thermostat_room", "unknown room 'attic'"),
        (
            'thermostat_room = "kitchen"',
            "thermostat_room",
            "room 'kitchen' has no emitter on floor 1's run; a floor thermostat reads "
            "a room of its own floor",
        ),
        (
            "thermostat_setpoint_C = 20.0",
            "thermostat_setpoint_C",
            "needs thermostat_room (the room the thermostat reads)",
        ),
        (
            'thermostat_room = "bath"\nthermostat_hysteresis_K = 0',
            "thermostat_hysteresis_K",
            "must be > 0, got 0",
        ),
        (
            'thermostat_room = "bath"\nthermostat_setpoint_C = 45',
            "thermostat_setpoint_C",
            "must be <= 30, got 45",
        ),
        (
            'thermostat_room = "bath"\nmin_run_min = -1',
            "min_run_min",
            "must be >= 0, got -1",
        ),
        (
            'shut_off = ["09:00", "16:00"]',
            "shut_off[0]",
            'must be a pair ["HH:MM", "HH:MM"], got \'09:00\'',
        ),
        (
            'shut_off = [["09:00", "25:00"]]',
            "shut_off[0]",
            "must be two clock times HH:MM, got ['09:00', '25:00']",
        ),
        (
            'shut_off = [["09:00", "09:00"]]',
            "shut_off[0]",
            "from and until must differ",
        ),
        (
            'thermostat_room = "bath"\ncheck_valve = false',
            "check_valve",
            "a floor pump that a thermostat or a shut-off switches off needs its "
            "check valve",
        ),
        (
            'thermostat_room = "bath"\nthermostat_band_K = 1.0',
            "thermostat_band_K",
            "unknown key",
        ),
    ],
)
def test_bad_floor_control_names_its_key(keys, key, problem):
    with pytest.raises(
        ScenarioError,
        match="^" + re.escape(f"layout.floor_pumps[0].{key}: {problem}"),
    ):
        parse_scenario(with_floor_pump(keys), origin="house.toml")
