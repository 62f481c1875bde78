"""The resolve step as a whole: one result per scenario object, in scenario order."""

from __future__ import annotations

import gc
import weakref

from resolve_house import house

from simheat.resolve import ResolvedScenario, resolve


def test_result_is_kept_per_scenario_object():
    scenario = house()
    first = resolve(scenario)
    assert isinstance(first, ResolvedScenario)
    assert resolve(scenario) is first
    # an equal scenario parsed again is another object with its own result
    assert resolve(house()) is not first


def test_kept_result_does_not_keep_the_scenario_alive():
    scenario = house()
    resolve(scenario)
    alive = weakref.ref(scenario)
    del scenario
    gc.collect()
    assert alive() is None


def test_records_follow_the_scenarios_rooms_and_emitters():
    scenario = house()
    resolved = resolve(scenario)
    assert len(resolved.rooms) == len(scenario.rooms) == 2
    assert len(resolved.emitters) == len(scenario.emitters) == 3
    assert resolved.design_mass_flow_kg_s.shape == (3,)


def test_design_water_temperature_is_supply_less_half_the_drop():
    # 70 °C supply, 15 K drop
    assert resolve(house()).design_water_temp_C == 62.5
