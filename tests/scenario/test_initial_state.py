"""How a run starts: the night before it, or an initial state the scenario gives."""

from __future__ import annotations

import re

import pytest

from simheat.errors import ScenarioError
from simheat.scenario import parse_scenario

ORIGIN = "start.toml"
# Two rooms, one radiator each; [schedule] and [simulation] and the rooms' own
# keys are filled in per test. Invented for tests.
HOUSE = """
name = "Start test house"
[design]
outdoor_temp_C = -10.0
supply_temp_C = 70.0
temperature_drop_K = 15.0
[source]
max_power_kW = 6.0
flow_temp_C = 70.0
[pump]
flow_m3_per_h = [0.0, 0.5, 1.0]
head_kPa = [30.0, 25.0, 12.0]
[schedule]
{schedule}
[simulation]
{simulation}
[[rooms]]
id = "living"
floor_area_m2 = 20.0
design_heat_load_W = 1500
setpoint_C = 21.0
{living}
[[rooms]]
id = "bed"
floor_area_m2 = 12.0
design_heat_load_W = 800
setpoint_C = 18.0
{bed}
[[emitters]]
id = "rad_living"
room = "living"
nominal_power_kW = 1.8
kv_m3_per_h = 0.5
[[emitters]]
id = "rad_bed"
room = "bed"
nominal_power_kW = 1.0
kv_m3_per_h = 0.5
[route]
header_pipe = "cu_22x1"
branch_pipe = "cu_15x1"
feed_length_m = 3.0
[[route.floors]]
floor = 0
tees = [
  {{ emitter = "rad_living", header_length_m = 2.0, branch_length_m = 1.0 }},
  {{ emitter = "rad_bed", header_length_m = 4.0, branch_length_m = 0.5 }},
]
"""


def parse(schedule="", simulation="", living="", bed="", **options):
    text = HOUSE.format(
        schedule=schedule, simulation=simulation, living=living, bed=bed
    )
    return parse_scenario(text, origin=ORIGIN, **options)


def fails(path: str, problem: str) -> str:
    return "^" + re.escape(f"{path}: {problem}") + r".*\(" + re.escape(ORIGIN) + r"\)$"


def test_by_default_the_night_starts_at_22_00():
    scenario = parse()
    assert scenario.schedule.off_clock_s == 22 * 3600.0
    assert scenario.schedule.night_s == 7 * 3600.0  # 22:00 to the 05:00 start
    assert scenario.simulation.initial_water_temp_C is None
    assert all(room.initial_air_temp_C is None for room in scenario.rooms)


def test_the_night_runs_across_midnight_to_the_start():
    scenario = parse(schedule='off_from = "23:30"\nstart_clock = "06:15"')
    assert scenario.schedule.night_s == pytest.approx(6.75 * 3600.0)


def test_a_given_temperature_for_every_room_replaces_the_night():
    scenario = parse(simulation="initial_air_temp_C = 14.0")
    assert scenario.schedule.off_clock_s is None
    assert scenario.schedule.night_s == 0.0
    assert [r.initial_air_temp_C for r in scenario.rooms] == [14.0, 14.0]
    # the structure starts at the air's temperature, the water at 15 °C
    assert [r.initial_structure_temp_C for r in scenario.rooms] == [14.0, 14.0]
    assert scenario.simulation.initial_water_temp_C == 15.0


def test_a_room_s_own_start_comes_before_the_simulation_s():
    scenario = parse(
        simulation="initial_air_temp_C = 14.0\ninitial_structure_temp_C = 13.0",
        bed="initial_air_temp_C = 11.0\ninitial_structure_temp_C = 10.5",
    )
    living, bed = scenario.rooms
    assert (living.initial_air_temp_C, living.initial_structure_temp_C) == (14, 13)
    assert (bed.initial_air_temp_C, bed.initial_structure_temp_C) == (11.0, 10.5)


def test_the_older_key_starts_air_and_structure_alike():
    scenario = parse(simulation="initial_room_temp_C = 16.0\ninitial_water_temp_C = 20")
    assert [r.initial_structure_temp_C for r in scenario.rooms] == [16.0, 16.0]
    assert scenario.simulation.initial_water_temp_C == 20.0


def test_every_room_needs_an_air_temperature_once_one_is_given():
    with pytest.raises(ScenarioError, match=fails("rooms[0].initial_air_temp_C", "")):
        parse(bed="initial_air_temp_C = 11.0")


def test_a_given_start_and_a_night_do_not_mix():
    with pytest.raises(ScenarioError, match=fails("schedule.off_from", "a given")):
        parse(schedule='off_from = "22:00"', simulation="initial_air_temp_C = 14.0")


def test_water_alone_is_no_initial_state():
    with pytest.raises(
        ScenarioError, match=fails("simulation.initial_water_temp_C", "sets the water")
    ):
        parse(simulation="initial_water_temp_C = 30.0")


def test_older_and_newer_start_keys_do_not_mix():
    with pytest.raises(
        ScenarioError, match=fails("simulation.initial_air_temp_C", "give it or the")
    ):
        parse(simulation="initial_room_temp_C = 16.0\ninitial_air_temp_C = 14.0")


@pytest.mark.parametrize(
    ("schedule", "path", "problem"),
    [
        ('off_from = "05:00"', "schedule.off_from", "must differ from start_clock"),
        ('off_from = "25:00"', "schedule.off_from", "must be a clock time HH:MM"),
    ],
)
def test_bad_night_keys_name_the_key(schedule, path, problem):
    with pytest.raises(ScenarioError, match=fails(path, problem)):
        parse(schedule=schedule)


@pytest.mark.parametrize(
    ("where", "key", "value", "problem"),
    [
        ("simulation", "initial_air_temp_C", -30.0, "must be >= -20, got -30"),
        ("simulation", "initial_structure_temp_C", 45.0, "must be <= 40, got 45"),
        ("living", "initial_air_temp_C", 41.0, "must be <= 40, got 41"),
    ],
)
def test_initial_temperatures_out_of_range_name_the_key(where, key, value, problem):
    path = f"simulation.{key}" if where == "simulation" else f"rooms[0].{key}"
    with pytest.raises(ScenarioError, match=fails(path, problem)):
        parse(**{where: f"{key} = {value}"})


def test_text_read_as_before_nights_starts_at_15_degrees():
    # Run files of schema 2 hold scenarios read before nights were simulated:
    # without a given start the rooms started at 15 °C (the older default).
    scenario = parse(without_night=True)
    assert scenario.schedule.off_clock_s is None
    assert [r.initial_air_temp_C for r in scenario.rooms] == [15.0, 15.0]
    assert scenario.simulation.initial_water_temp_C == 15.0
