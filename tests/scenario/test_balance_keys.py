"""Scenario keys that balancing reads and writes: their units, defaults and errors."""

from __future__ import annotations

import pytest
from test_load import error_pattern, parse

from simheat.errors import ScenarioError
from simheat.scenario.model import CircuitValves

LOCKSHIELD = {"presets": [0.5, 1, 2, 4], "kv_m3_per_h": [0.1, 0.25, 0.6, 1.2]}


def test_design_flow_kg_per_h_becomes_kg_s():
    s = parse((("emitters", 0, "design_flow_kg_per_h"), 90.0))
    assert s.emitters[0].design_flow_kg_s == pytest.approx(90.0 / 3600.0, rel=1e-15)
    assert s.emitters[1].design_flow_kg_s is None


@pytest.mark.parametrize(
    ("value", "problem"),
    [(0.5, "must be >= 1, got 0.5"), (2e4, "must be <= 10000, got 20000")],
)
def test_design_flow_out_of_bounds(value, problem):
    pattern = error_pattern("emitters[0].design_flow_kg_per_h", problem)
    with pytest.raises(ScenarioError, match=pattern):
        parse((("emitters", 0, "design_flow_kg_per_h"), value))


def test_lockshield_turns_default_to_fully_open():
    s = parse(
        (("valve_types", "ls"), LOCKSHIELD),
        (("emitters", 1, "lockshield_type"), "ls"),
    )
    assert (s.emitters[1].lockshield_type, s.emitters[1].lockshield_turns) == (
        "ls",
        4.0,
    )


def test_lockshield_turns_outside_its_table():
    pattern = error_pattern(
        "emitters[1].lockshield_turns",
        "lockshield turns must be within the table's 0.5 to 4, got 5",
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse(
            (("valve_types", "ls"), LOCKSHIELD),
            (("emitters", 1, "lockshield_type"), "ls"),
            (("emitters", 1, "lockshield_turns"), 5.0),
        )


def test_lockshield_turns_without_a_type():
    pattern = error_pattern(
        "emitters[1].lockshield_turns", "needs lockshield_type naming"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("emitters", 1, "lockshield_turns"), 2.0))


def test_unknown_lockshield_type():
    pattern = error_pattern(
        "emitters[1].lockshield_type", "unknown valve type 'ls'; known types: trv"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("emitters", 1, "lockshield_type"), "ls"))


def test_pump_speed_and_steps_are_read():
    s = parse(
        (("pump", "speed"), 0.8),
        (("pump", "speed_steps"), [0.6, 0.8, 1.0]),
    )
    assert (s.pump.speed, s.pump.speed_steps) == (0.8, (0.6, 0.8, 1.0))
    assert parse().pump.speed == 1.0


@pytest.mark.parametrize(
    ("key", "value", "problem"),
    [
        ("speed", 0.1, "must be >= 0.2, got 0.1"),
        ("speed", 1.2, "must be <= 1, got 1.2"),
        ("speed_steps", [0.6, 0.5], "must be strictly increasing"),
        ("speed_steps", [0.1, 0.5], "speeds must lie within 0.2 to 1"),
        ("setpoint_steps_kPa", [10.0], "applies only to mode constant_dp"),
    ],
)
def test_fixed_speed_pump_settings_out_of_bounds(key, value, problem):
    with pytest.raises(ScenarioError, match=error_pattern(f"pump.{key}", problem)):
        parse((("pump", key), value))


def test_regulated_pump_takes_set_head_steps_in_kPa():
    s = parse(
        (("pump", "mode"), "constant_dp"),
        (("pump", "setpoint_kPa"), 20.0),
        (("pump", "setpoint_steps_kPa"), [10.0, 20.0, 25.0]),
    )
    assert s.pump.setpoint_steps_Pa == (10e3, 20e3, 25e3)


@pytest.mark.parametrize(
    ("key", "value"), [("speed", 0.8), ("speed_steps", [0.5, 1.0])]
)
def test_regulated_pump_has_no_speed_setting(key, value):
    pattern = error_pattern(f"pump.{key}", "applies only to mode fixed_speed")
    with pytest.raises(ScenarioError, match=pattern):
        parse(
            (("pump", "mode"), "constant_dp"),
            (("pump", "setpoint_kPa"), 20.0),
            (("pump", key), value),
        )


def test_circuit_valves_are_read():
    s = parse(
        (
            ("layout", "circuit_valves"),
            {
                "valve_type": "trv",
                "circuits": ["floor0", "floor0:rad_bed"],
                "presets": {"floor0": 2.5},
            },
        ),
    )
    assert s.layout.circuit_valves == CircuitValves(
        "trv", ("floor0", "floor0:rad_bed"), {"floor0": 2.5}
    )
    assert parse().layout.circuit_valves is None


@pytest.mark.parametrize(
    ("table", "path", "problem"),
    [
        ({"valve_type": "gate"}, "valve_type", "unknown valve type 'gate'"),
        (
            {"valve_type": "trv", "circuits": ["floor3"]},
            "circuits[0]",
            "unknown circuit 'floor3'",
        ),
        (
            {"valve_type": "trv", "presets": {"floor0:nowhere": 2}},
            "presets.floor0:nowhere",
            "unknown circuit 'floor0:nowhere'",
        ),
        (
            {"valve_type": "trv", "presets": {"primary": 4}},
            "presets.primary",
            "preset must be within the table's 1 to 3, got 4",
        ),
        (
            {"valve_type": "trv", "preset": {"primary": 2}},
            "preset",
            "unknown key",
        ),
    ],
)
def test_circuit_valves_errors_name_the_key(table, path, problem):
    pattern = error_pattern(f"layout.circuit_valves.{path}", problem)
    with pytest.raises(ScenarioError, match=pattern):
        parse((("layout", "circuit_valves"), table))
