"""Scenario loader: unit conversion, defaults, and the error contract.

Every bad input must raise ScenarioError whose message names the dotted field path,
the problem and (where there is one) the value, followed by the file name.
"""

from __future__ import annotations

import copy
import json
import math
import re
from pathlib import Path

import numpy as np
import pytest

from simheat.errors import ScenarioError
from simheat.scenario import load_scenario, parse_scenario
from simheat.scenario.emitters import (
    DEFAULT_BAND_K,
    DEFAULT_CONVECTIVE_FRACTION,
    DEFAULT_EXPONENT,
    DEFAULT_STEEL_KG_PER_KW,
    DEFAULT_WATER_L_PER_KW,
)
from simheat.scenario.fittings import FittingTable
from simheat.scenario.rooms import DEFAULT_AIR_LOSS_FRACTION

SCENARIOS_DIR = Path(__file__).resolve().parents[2] / "scenarios"
ORIGIN = "house.toml"

# A minimal valid house: two rooms (one given by design load, one by loss
# coefficient), two radiators (one by preset, one by Kv), one floor.
BASE: dict = {
    "name": "Two-room test house",
    "design": {
        "outdoor_temp_C": -10.0,
        "supply_temp_C": 70.0,
        "temperature_drop_K": 15.0,
    },
    "source": {"max_power_kW": 6.0, "flow_temp_C": 70.0},
    "pump": {"flow_m3_per_h": [0.0, 0.5, 1.0], "head_kPa": [30.0, 26.0, 16.0]},
    "valve_types": {"trv": {"presets": [1, 2, 3], "kv_m3_per_h": [0.1, 0.2, 0.4]}},
    "rooms": [
        {
            "id": "living",
            "floor_area_m2": 20.0,
            "setpoint_C": 21.0,
            "design_heat_load_W": 1550.0,
        },
        {
            "id": "bed",
            "floor_area_m2": 12.0,
            "setpoint_C": 18.0,
            "heat_loss_W_per_K": 30.0,
        },
    ],
    "emitters": [
        {
            "id": "rad_living",
            "room": "living",
            "nominal_power_kW": 1.2,
            "preset": 2,
            "valve_type": "trv",
        },
        {
            "id": "rad_bed",
            "room": "bed",
            "nominal_power_kW": 0.8,
            "kv_m3_per_h": 0.3,
        },
    ],
    "route": {
        "header_pipe": "cu_22x1",
        "branch_pipe": "cu_15x1",
        "feed_length_m": 3.0,
        "floors": [
            {
                "floor": 0,
                "tees": [
                    {
                        "emitter": "rad_living",
                        "header_length_m": 2.0,
                        "branch_length_m": 1.0,
                    },
                    {
                        "emitter": "rad_bed",
                        "header_length_m": 4.0,
                        "branch_length_m": 0.5,
                    },
                ],
            }
        ],
    },
}


def toml_value(value) -> str:
    """Render a JSON-like value as a TOML inline value."""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if math.isnan(value):
            return "nan"
        if math.isinf(value):
            return "inf" if value > 0 else "-inf"
        return repr(value)
    if isinstance(value, str):
        return json.dumps(value)
    if isinstance(value, list):
        return "[" + ", ".join(toml_value(v) for v in value) + "]"
    if isinstance(value, dict):
        items = (f"{json.dumps(k)} = {toml_value(v)}" for k, v in value.items())
        return "{" + ", ".join(items) + "}"
    raise TypeError(f"cannot render {value!r} as TOML")


def render_toml(document: dict) -> str:
    """Render a document as TOML, one top-level key per line, values inline."""
    return "\n".join(f"{json.dumps(k)} = {toml_value(v)}" for k, v in document.items())


_DELETE = object()


def changed(*edits) -> str:
    """BASE with ``(path, value)`` edits applied, as TOML text.

    ``path`` is a tuple of keys and list indices; ``value`` ``_DELETE`` removes the
    key.
    """
    document = copy.deepcopy(BASE)
    for path, value in edits:
        parent = document
        for step in path[:-1]:
            parent = (
                parent.setdefault(step, {}) if isinstance(step, str) else parent[step]
            )
        if value is _DELETE:
            del parent[path[-1]]
        else:
            parent[path[-1]] = value
    return render_toml(document)


def parse(*edits):
    return parse_scenario(changed(*edits), origin=ORIGIN)


def error_pattern(path: str, problem: str) -> str:
    """Regex for ``<path>: <problem>...(<origin>)``, path and problem escaped."""
    return "^" + re.escape(f"{path}: {problem}") + r".*\(" + re.escape(ORIGIN) + r"\)$"


# --- the base itself ------------------------------------------------------------------


def test_base_scenario_is_valid():
    scenario = parse()
    assert [r.id for r in scenario.rooms] == ["living", "bed"]


@pytest.mark.parametrize("name", ["bungalow.toml", "two_storey.toml"])
def test_bundled_scenario_loads(name):
    scenario = load_scenario(SCENARIOS_DIR / name)
    assert scenario.source_path == str(SCENARIOS_DIR / name)
    assert len(scenario.emitters) >= 2


def test_load_missing_file_names_the_path(tmp_path):
    path = tmp_path / "absent.toml"
    with pytest.raises(ScenarioError, match=re.escape(f"{path}: cannot read")):
        load_scenario(path)


def test_load_non_utf8_file_is_a_scenario_error(tmp_path):
    path = tmp_path / "latin1.toml"
    path.write_bytes(b"name = '\xe9t\xe9'\n")
    with pytest.raises(ScenarioError, match="not a UTF-8 text file"):
        load_scenario(path)


# --- unit conversion (exact by construction; rel 1e-12 covers float rounding) -------


def test_nominal_power_kW_becomes_W():
    assert parse().emitters[0].nominal_power_W == pytest.approx(1200.0, rel=1e-12)


def test_water_volume_L_becomes_m3():
    scenario = parse((("emitters", 0, "water_volume_L"), 4.5))
    assert scenario.emitters[0].water_volume_m3 == pytest.approx(4.5e-3, rel=1e-12)


def test_metal_mass_kg_is_kept_in_kg():
    scenario = parse((("emitters", 0, "metal_mass_kg"), 20.0))
    assert scenario.emitters[0].metal_mass_kg == 20.0


def test_pump_head_kPa_becomes_Pa():
    np.testing.assert_allclose(parse().pump.head_Pa, [30e3, 26e3, 16e3], rtol=1e-12)


def test_pump_flow_m3_per_h_becomes_m3_s():
    expected = [0.0, 0.5 / 3600.0, 1.0 / 3600.0]
    np.testing.assert_allclose(parse().pump.flow_m3_s, expected, rtol=1e-12)


def test_duration_h_becomes_s():
    scenario = parse((("simulation",), {"duration_h": 2.5}))
    assert scenario.simulation.duration_s == pytest.approx(9000.0, rel=1e-12)


def test_output_step_min_becomes_s():
    scenario = parse((("simulation",), {"output_step_min": 2.0}))
    assert scenario.simulation.output_step_s == pytest.approx(120.0, rel=1e-12)


def test_room_keeps_the_heat_loss_it_was_given():
    # the other of the two is derived by the resolve step (tests/resolve)
    living, bed = parse().rooms
    assert (living.design_heat_load_W, living.heat_loss_W_K) == (1550.0, None)
    assert (bed.design_heat_load_W, bed.heat_loss_W_K) == (None, 30.0)


def test_given_capacities_kJ_per_K_become_J_per_K():
    room = parse(
        (("rooms", 0, "air_capacity_kJ_per_K"), 300.0),
        (("rooms", 0, "structure_capacity_kJ_per_K"), 4000.0),
    ).rooms[0]
    assert (room.air_capacity_J_K, room.structure_capacity_J_K) == (3e5, 4e6)


def test_one_capacity_without_the_other_is_missing():
    pattern = error_pattern(
        "rooms[0].structure_capacity_kJ_per_K", "required key is missing"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("rooms", 0, "air_capacity_kJ_per_K"), 300.0))


def test_custom_pipe_mm_becomes_m():
    pipe = {"inner_diameter_mm": 20.0, "roughness_mm": 0.0015}
    spec = parse((("route", "header_pipe"), pipe)).route.floors[0].header_pipe
    assert (spec.inner_diameter_m, spec.roughness_m) == pytest.approx(
        (0.020, 1.5e-6), rel=1e-12
    )


def test_catalog_pipe_resolves_to_its_dimensions():
    # cu_22x1: 22 mm outside, 1 mm wall, so 20 mm inside
    spec = parse().route.feed_pipe
    assert (spec.name, spec.inner_diameter_m) == ("cu_22x1", pytest.approx(0.020))


def test_preset_and_valve_type_are_kept_for_the_resolve_step():
    # the Kv at a preset is read from the table by the resolve step (tests/resolve)
    scenario = parse((("emitters", 0, "preset"), 2.5))
    emitter = scenario.emitters[0]
    assert (emitter.preset, emitter.valve_type, emitter.kv_m3_h) == (2.5, "trv", None)
    assert scenario.valve_types["trv"].presets == (1.0, 2.0, 3.0)
    assert scenario.valve_types["trv"].kv_m3_h == (0.1, 0.2, 0.4)


def test_kv_given_directly_is_kept():
    emitter = parse().emitters[1]
    assert (emitter.kv_m3_h, emitter.preset, emitter.valve_type) == (0.3, None, None)


def test_clock_times_become_seconds():
    schedule = {"start_clock": "05:00", "comfort_from": "06:30"}
    scenario = parse((("schedule",), schedule))
    assert (scenario.schedule.start_clock_s, scenario.schedule.comfort_start_s) == (
        18000.0,
        5400.0,
    )


def test_weather_time_h_becomes_s():
    weather = {"time_h": [0.0, 3.0, 6.0], "outdoor_temp_C": [-10.0, -8.0, -5.0]}
    np.testing.assert_allclose(
        parse((("weather",), weather)).weather.time_s, [0.0, 10800.0, 21600.0]
    )


# --- defaults ------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("attribute", "expected"),
    [
        ("exponent", DEFAULT_EXPONENT),
        ("band_K", DEFAULT_BAND_K),
        ("convective_fraction", DEFAULT_CONVECTIVE_FRACTION),
        ("thermostatic", True),
        ("water_volume_m3", DEFAULT_WATER_L_PER_KW * 1.2 / 1e3),
        ("metal_mass_kg", DEFAULT_STEEL_KG_PER_KW * 1.2),
    ],
)
def test_emitter_default(attribute, expected):
    assert getattr(parse().emitters[0], attribute) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize(
    ("attribute", "expected"),
    [
        ("height_m", 2.5),
        ("floor", 0),
        ("air_loss_fraction", DEFAULT_AIR_LOSS_FRACTION),
        ("internal_gains_W", 0.0),
        ("name", "living"),
        ("mass_class", "medium"),
        ("air_capacity_J_K", None),
        ("structure_capacity_J_K", None),
    ],
)
def test_room_default(attribute, expected):
    assert getattr(parse().rooms[0], attribute) == expected


@pytest.mark.parametrize(
    ("attribute", "expected"),
    [
        ("duration_s", 6.0 * 3600.0),
        ("output_step_s", 60.0),
        ("initial_air_temp_C", None),
        ("initial_structure_temp_C", None),
        ("initial_water_temp_C", None),
        ("reached_tolerance_K", 0.5),
        ("rtol", 1e-5),
        ("emitter_cells", 4),
    ],
)
def test_simulation_default(attribute, expected):
    assert getattr(parse().simulation, attribute) == expected


def test_default_schemes():
    assert parse().schemes == ("direct_return", "reverse_return")


def test_default_weather_holds_design_outdoor_temperature():
    np.testing.assert_array_equal(parse().weather.outdoor_temp_C, [-10.0, -10.0])


def test_default_feed_pipe_is_the_header_pipe():
    assert parse().route.feed_pipe.name == "cu_22x1"


def test_default_fittings_are_the_handbook_table():
    assert parse().layout.fittings == FittingTable()


def test_fitting_overrides_replace_only_their_entries():
    layout = {"fittings": {"elbow_zeta": 0.4, "elbows_per_riser": 3}}
    fittings = parse((("layout",), layout)).layout.fittings
    assert (fittings.elbow_zeta, fittings.elbows_per_riser) == (0.4, 3)
    assert fittings.tee_run_zeta == FittingTable().tee_run_zeta


def test_default_schedule_is_off_until_comfort_at_start():
    schedule = parse().schedule
    assert (schedule.before_comfort, schedule.comfort_start_s) == ("off", 0.0)


# --- error contract ------------------------------------------------------------------


def test_malformed_toml():
    with pytest.raises(ScenarioError, match=f"^{ORIGIN}: malformed TOML"):
        parse_scenario('name = "unterminated\n', origin=ORIGIN)


@pytest.mark.parametrize(
    "path",
    [
        ("rooms", 0, "floor_area_m2"),
        ("rooms", 1, "setpoint_C"),
        ("emitters", 1, "nominal_power_kW"),
        ("design",),
        ("pump",),
        ("source",),
        ("route",),
        ("name",),
        ("route", "floors", 0, "tees", 1, "branch_length_m"),
    ],
)
def test_missing_required_key(path):
    dotted = _dotted(path)
    with pytest.raises(
        ScenarioError, match=error_pattern(dotted, "required key is missing")
    ):
        parse((path, _DELETE))


def _dotted(path) -> str:
    out = ""
    for step in path:
        out += f"[{step}]" if isinstance(step, int) else (f".{step}" if out else step)
    return out


@pytest.mark.parametrize(
    ("path", "value", "message"),
    [
        (("rooms", 0, "floor_area_m2"), -12, "must be >= 1, got -12"),
        (("rooms", 1, "floor_area_m2"), 0, "must be >= 1, got 0"),
        (("emitters", 1, "nominal_power_kW"), 0.0, "must be >= 0.05, got 0"),
        (("emitters", 0, "water_volume_L"), -1.0, "must be >= 0.001, got -1"),
        (("route", "feed_length_m"), 0.0, "must be 0.01 to 1000 m, got 0"),
        (("rooms", 0, "internal_gains_W"), -5, "must be >= 0, got -5"),
        (
            ("route", "floors", 0, "tees", 0, "header_length_m"),
            -1,
            "must be 0 or 0.01 to 1000 m, got -1",
        ),
    ],
)
def test_size_out_of_range(path, value, message):
    with pytest.raises(ScenarioError, match=error_pattern(_dotted(path), message)):
        parse((path, value))


@pytest.mark.parametrize(
    ("path", "value", "message"),
    [
        (("rooms", 0, "floor_area_m2"), 1e308, "must be <= 1000, got 1e+308"),
        (("rooms", 1, "heat_loss_W_per_K"), 1e308, "must be <= 10000, got 1e+308"),
        (
            ("rooms", 1, "heat_loss_W_per_K"),
            300.0,
            "25 W/(m2 K) of floor area is outside 0.0125 to 20",
        ),
        (("emitters", 0, "nominal_power_kW"), 1e308, "must be <= 50, got 1e+308"),
        (("emitters", 0, "metal_mass_kg"), 1e308, "must be <= 120, got 1e+308"),
        (("source", "max_power_kW"), 1e308, "must be <= 1000, got 1e+308"),
        (("route", "feed_length_m"), 1e308, "must be 0.01 to 1000 m, got 1e+308"),
        (("simulation", "emitter_cells"), 10**6, "must be <= 100, got 1000000"),
        (("weather", "time_h"), [0.0, 1e308], "times must lie within -8760 to 8760 h"),
    ],
)
def test_implausibly_large_value(path, value, message):
    # Limits far beyond any house; they catch unit mistakes and prevent overflow.
    edits = [(path, value)]
    if path[0] == "weather":
        edits.append((("weather", "outdoor_temp_C"), [-10.0, -10.0]))
    with pytest.raises(ScenarioError, match=error_pattern(_dotted(path), message)):
        parse(*edits)


def test_floor_area_message_is_exact():
    expected = f"rooms[0].floor_area_m2: must be >= 1, got -12 ({ORIGIN})"
    with pytest.raises(ScenarioError, match=f"^{re.escape(expected)}$"):
        parse((("rooms", 0, "floor_area_m2"), -12))


@pytest.mark.parametrize("bore_mm", [0.0, 1e-6, 3.9])
def test_too_small_bore_in_custom_pipe(bore_mm):
    # The narrowest heating pipe (microbore copper 6 mm outside) has a 4.8 mm
    # bore; a 1e-6 mm bore made the flow solver's pressure matrix singular.
    pipe = {"inner_diameter_mm": bore_mm, "roughness_mm": 0.0015}
    pattern = error_pattern(
        "route.branch_pipe.inner_diameter_mm", f"must be >= 4, got {bore_mm:g}"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("route", "branch_pipe"), pipe))


def test_custom_pipe_outer_not_above_inner():
    pipe = {
        "inner_diameter_mm": 20.0,
        "roughness_mm": 0.0015,
        "outer_diameter_mm": 18.0,
    }
    pattern = error_pattern(
        "route.header_pipe.outer_diameter_mm", "must exceed inner_diameter_mm"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("route", "header_pipe"), pipe))


@pytest.mark.parametrize(
    ("path", "value", "where", "message"),
    [
        (("rooms", 0, "floor_area_m2"), "big", "", "must be a number, got 'big'"),
        (("rooms", 0, "floor_area_m2"), True, "", "must be a number, got True"),
        (("rooms", 0, "floor_area_m2"), math.inf, "", "must be finite, got inf"),
        (("rooms", 0, "floor_area_m2"), 10**400, "", "must be finite, got 1000"),
        (("pump", "head_kPa"), [30.0, "x", 10.0], "[1]", "must be a number, got 'x'"),
        (("pump", "head_kPa"), [30.0, 20.0, 2**1100], "[2]", "must be finite, got"),
        (
            ("pump", "head_kPa"),
            30.0,
            "",
            "must be a list of at least 2 numbers, got 30",
        ),
        (("rooms", 0, "floor"), 1.5, "", "must be an integer, got 1.5"),
        (("rooms", 0, "id"), 7, "", "must be a string, got 7"),
        (("route", "insulated"), "yes", "", "must be true or false, got 'yes'"),
        (("design",), 5, "", "must be a table, got 5"),
        (("rooms",), {"id": "x"}, "", "must be an array of tables, got {"),
        (("emitters",), [], "", "needs at least 1 entries, got 0"),
    ],
)
def test_wrong_type(path, value, where, message):
    pattern = error_pattern(_dotted(path) + where, message)
    with pytest.raises(ScenarioError, match=pattern):
        parse((path, value))


def test_emitter_in_unknown_room():
    pattern = error_pattern("emitters[1].room", "unknown room 'attic'")
    with pytest.raises(ScenarioError, match=pattern):
        parse((("emitters", 1, "room"), "attic"))


def test_route_names_unknown_emitter():
    pattern = error_pattern(
        "route.floors[0].tees[1].emitter", "unknown emitter 'rad_x'"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("route", "floors", 0, "tees", 1, "emitter"), "rad_x"))


def test_route_misses_an_emitter():
    tees = copy.deepcopy(BASE["route"]["floors"][0]["tees"][:1])
    pattern = error_pattern(
        "route.floors", "the route does not visit emitter(s) rad_bed"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("route", "floors", 0, "tees"), tees))


def test_route_visits_an_emitter_twice():
    tees = copy.deepcopy(BASE["route"]["floors"][0]["tees"])
    tees.append(dict(tees[0]))
    pattern = error_pattern(
        "route.floors[0].tees[2].emitter",
        "emitter 'rad_living' is already on the route at route.floors[0].tees[0]",
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("route", "floors", 0, "tees"), tees))


def test_route_floor_listed_twice():
    floors = copy.deepcopy(BASE["route"]["floors"])
    moved = floors[0]["tees"].pop()
    floors.append({"floor": 0, "tees": [moved]})
    pattern = error_pattern(
        "route.floors", "each floor may appear once, got floors [0, 0]"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("route", "floors"), floors))


def test_unknown_pipe_type_lists_known_types():
    pattern = re.escape("route.header_pipe: unknown pipe type 'cu_99x9'; known types: ")
    with pytest.raises(ScenarioError, match=f"^{pattern}.*cu_15x1, .*pex_16x2"):
        parse((("route", "header_pipe"), "cu_99x9"))


def test_unknown_pipe_type_in_floor_names_the_floor_key():
    pattern = error_pattern("route.floors[0].branch_pipe", "unknown pipe type 'garden'")
    with pytest.raises(ScenarioError, match=pattern):
        parse((("route", "floors", 0, "branch_pipe"), "garden"))


@pytest.mark.parametrize(("section", "index"), [("rooms", 1), ("emitters", 1)])
def test_duplicate_ids(section, index):
    first = BASE[section][0]["id"]
    pattern = error_pattern(
        f"{section}[{index}].id", f"duplicate id {first!r} (also {section}[0])"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse(((section, index, "id"), first))


def test_empty_id():
    with pytest.raises(
        ScenarioError, match=error_pattern("rooms[0].id", "must not be empty")
    ):
        parse((("rooms", 0, "id"), " "))


def test_both_heat_loss_and_design_load():
    pattern = error_pattern(
        "rooms[0].heat_loss_W_per_K",
        "give only one of heat_loss_W_per_K or design_heat_load_W, got both",
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("rooms", 0, "heat_loss_W_per_K"), 50.0))


def test_neither_heat_loss_nor_design_load():
    pattern = error_pattern(
        "rooms[1].heat_loss_W_per_K",
        "give one of heat_loss_W_per_K or design_heat_load_W, got neither",
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("rooms", 1, "heat_loss_W_per_K"), _DELETE))


def test_both_kv_and_preset():
    pattern = error_pattern(
        "emitters[0].kv_m3_per_h", "give only one of kv_m3_per_h or preset, got both"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("emitters", 0, "kv_m3_per_h"), 0.3))


@pytest.mark.parametrize("preset", [0.5, 3.5])
def test_preset_outside_valve_table(preset):
    pattern = error_pattern(
        "emitters[0].preset", "preset must be within the table's 1 to 3, got"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("emitters", 0, "preset"), preset))


def test_unknown_valve_type_lists_known_types():
    pattern = error_pattern(
        "emitters[0].valve_type", "unknown valve type 'gate'; known types: trv"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("emitters", 0, "valve_type"), "gate"))


def test_valve_type_without_any_table():
    pattern = error_pattern(
        "emitters[0].valve_type",
        "unknown valve type 'trv'; known types: none, add a [valve_types] table",
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("valve_types",), _DELETE))


@pytest.mark.parametrize(
    ("table", "key", "message"),
    [
        (
            {"presets": [1, 2], "kv_m3_per_h": [0.1]},
            "kv_m3_per_h",
            "must be a list of at",
        ),
        (
            {"presets": [1, 2, 3], "kv_m3_per_h": [0.1, 0.2]},
            "kv_m3_per_h",
            "must have one Kv per preset",
        ),
        (
            {"presets": [2, 1], "kv_m3_per_h": [0.1, 0.2]},
            "presets",
            "must be strictly increasing",
        ),
        (
            {"presets": [1, 2], "kv_m3_per_h": [0.0, 0.2]},
            "kv_m3_per_h",
            "every Kv must be > 0",
        ),
    ],
)
def test_bad_valve_table(table, key, message):
    with pytest.raises(
        ScenarioError, match=error_pattern(f"valve_types.trv.{key}", message)
    ):
        parse((("valve_types", "trv"), table))


@pytest.mark.parametrize(
    ("heads", "message"),
    [
        ([30.0, 32.0, 16.0], "head_kPa must fall with flow, got [30.0, 32.0, 16.0]"),
        ([0.0, 0.0, 0.0], "the highest head must be at least 1 kPa"),
        ([20.0, 20.0, 20.0], "head_kPa must fall with flow, got [20.0, 20.0, 20.0]"),
    ],
)
def test_pump_that_cannot_deliver_flow(heads, message):
    # points that give no usable fitted curve are the resolve step's
    # (tests/resolve/test_pumps.py)
    with pytest.raises(ScenarioError, match=error_pattern("pump.head_kPa", message)):
        parse((("pump", "head_kPa"), heads))


def test_falling_heads_are_checked_in_order_of_flow():
    # points out of order but falling once sorted by flow are a falling curve
    scenario = parse(
        (("pump", "flow_m3_per_h"), [1.0, 0.0, 0.5]),
        (("pump", "head_kPa"), [16.0, 30.0, 26.0]),
    )
    np.testing.assert_array_equal(scenario.pump.head_Pa, [16e3, 30e3, 26e3])
    pattern = error_pattern(
        "pump.head_kPa",
        "head_kPa must fall with flow, got [30.0, 32.0, 16.0] at flows "
        "[0.0, 0.5, 1.0] m3/h",
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse(
            (("pump", "flow_m3_per_h"), [1.0, 0.0, 0.5]),
            (("pump", "head_kPa"), [16.0, 30.0, 32.0]),
        )


def test_pump_flow_and_head_lengths_differ():
    pattern = error_pattern(
        "pump.head_kPa", "must have one head per flow point (3), got 2"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("pump", "head_kPa"), [30.0, 20.0]))


@pytest.mark.parametrize(
    ("flows", "message"),
    [
        ([0.0, -0.5, 1.0], "flows must lie within 0 to 100 m3/h"),
        ([0.0, 1e300, 2e300], "flows must lie within 0 to 100 m3/h"),
        ([0.0, 0.5, 0.5], "flows must be distinct"),
    ],
)
def test_bad_pump_flows(flows, message):
    with pytest.raises(
        ScenarioError, match=error_pattern("pump.flow_m3_per_h", message)
    ):
        parse((("pump", "flow_m3_per_h"), flows))


@pytest.mark.parametrize(
    ("path", "hint"),
    [
        (("rooms", 0, "mass_clas"), "; did you mean 'mass_class'?"),
        (("emitters", 1, "exponant"), "; did you mean 'exponent'?"),
        (("design", "wind_speed_m_s"), ""),
        (("colour",), ""),
    ],
)
def test_misspelt_optional_key_is_unknown(path, hint):
    problem = "unknown key (check the spelling and the unit)" + hint
    with pytest.raises(ScenarioError, match=error_pattern(_dotted(path), problem)):
        parse((path, 1.0))


def test_misspelt_required_key_names_the_missing_and_the_unknown_key():
    pattern = error_pattern(
        "rooms[0].floor_area_m2",
        "required key is missing; unknown key 'floor_area_m3' may be a misspelling",
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse(
            (("rooms", 0, "floor_area_m2"), _DELETE),
            (("rooms", 0, "floor_area_m3"), 20),
        )


def test_distinct_keys_are_not_taken_for_misspellings():
    pipe = {"outer_diameter_mm": 22.0, "roughness_mm": 0.0015}
    expected = (
        f"route.header_pipe.inner_diameter_mm: required key is missing ({ORIGIN})"
    )
    with pytest.raises(ScenarioError, match=f"^{re.escape(expected)}$"):
        parse((("route", "header_pipe"), pipe))


def test_comfort_before_start_clock():
    schedule = {"start_clock": "06:00", "comfort_from": "05:30"}
    pattern = error_pattern(
        "schedule.comfort_from", "must not be before start_clock (times out of order)"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("schedule",), schedule))


def test_comfort_after_simulation_end():
    pattern = error_pattern(
        "schedule.comfort_from", "comfort starts after the simulation ends (3 h > 2 h)"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse(
            (("schedule",), {"start_clock": "05:00", "comfort_from": "08:00"}),
            (("simulation",), {"duration_h": 2.0}),
        )


@pytest.mark.parametrize(
    ("key", "clock"),
    [("start_clock", "25:00"), ("comfort_from", "7:60"), ("start_clock", "5h")],
)
def test_bad_clock(key, clock):
    pattern = error_pattern(
        f"schedule.{key}", f"must be a clock time HH:MM, got {clock!r}"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("schedule",), {key: clock}))


def test_flow_temperature_not_above_setpoint():
    pattern = error_pattern(
        "source.flow_temp_C",
        "must be above the setpoint 28 °C of room 'bed' "
        "(heated by emitters[1]), got 26",
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("rooms", 1, "setpoint_C"), 28.0), (("source", "flow_temp_C"), 26.0))


@pytest.mark.parametrize(
    ("value", "message"),
    [(-1.0, "must be >= 0, got -1"), (101.0, "must be <= 95, got 101")],
)
def test_initial_water_temperature_out_of_range(value, message):
    pattern = error_pattern("simulation.initial_water_temp_C", message)
    with pytest.raises(ScenarioError, match=pattern):
        parse((("simulation",), {"initial_water_temp_C": value}))


def test_setpoint_not_above_design_outdoor():
    pattern = error_pattern(
        "rooms[1].setpoint_C", "must be above design.outdoor_temp_C (12), got 10"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("design", "outdoor_temp_C"), 12.0), (("rooms", 1, "setpoint_C"), 10.0))


def test_weather_lengths_differ():
    weather = {"time_h": [0.0, 3.0, 6.0], "outdoor_temp_C": [-10.0, -8.0]}
    pattern = error_pattern(
        "weather.outdoor_temp_C", "must have one value per entry of time_h"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("weather",), weather))


@pytest.mark.parametrize("times", [[0.0, 3.0, 3.0], [0.0, 4.0, 2.0]])
def test_weather_times_not_increasing(times):
    weather = {"time_h": times, "outdoor_temp_C": [-10.0, -8.0, -5.0]}
    pattern = error_pattern("weather.time_h", "times must be strictly increasing")
    with pytest.raises(ScenarioError, match=pattern):
        parse((("weather",), weather))


def test_weather_series_out_of_range():
    weather = {"time_h": [0.0, 6.0], "outdoor_temp_C": [-10.0, 45.0]}
    pattern = error_pattern(
        "weather.outdoor_temp_C",
        "values must lie within -50 to 40 °C, got [-10.0, 45.0]",
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("weather",), weather))


@pytest.mark.parametrize(
    ("schemes", "path", "message"),
    [
        (["direct_return", "spiral"], "schemes[1]", "unknown scheme 'spiral'; known: "),
        (
            [["direct_return"]],
            "schemes[0]",
            "unknown scheme ['direct_return']; known: ",
        ),
        ([], "schemes", "must be a non-empty list of scheme names"),
    ],
)
def test_bad_scheme_names(schemes, path, message):
    with pytest.raises(ScenarioError, match=error_pattern(path, message)):
        parse((("schemes",), schemes))


@pytest.mark.parametrize(
    ("rooms", "message"),
    [
        (["living", "attic"], "unknown room 'attic'"),
        (["living", "living"], "a wall joins two different rooms"),
        (["living"], "must name two rooms, got ['living']"),
        ([["living"], ["bed"]], "must name two rooms, got [['living'], ['bed']]"),
    ],
)
def test_bad_internal_wall(rooms, message):
    wall = {"rooms": rooms, "conductance_W_per_K": 10.0}
    pattern = error_pattern("internal_walls[0].rooms", message)
    with pytest.raises(ScenarioError, match=pattern):
        parse((("internal_walls",), [wall]))


def test_output_step_longer_than_duration():
    pattern = error_pattern(
        "simulation.output_step_min", "must not exceed the duration"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("simulation",), {"duration_h": 1.0, "output_step_min": 90.0}))


def test_neither_kv_nor_preset():
    pattern = error_pattern(
        "emitters[1].kv_m3_per_h", "give one of kv_m3_per_h or preset, got neither"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("emitters", 1, "kv_m3_per_h"), _DELETE))
