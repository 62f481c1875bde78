"""The resolve step as a whole: a pure function of the scenario, in scenario order."""

from __future__ import annotations

from resolve_house import house

from simheat.resolve import ResolvedScenario, resolve


def test_resolving_twice_gives_the_same_quantities():
    scenario = house()
    first, second = resolve(scenario), resolve(scenario)
    assert isinstance(first, ResolvedScenario)
    assert first.rooms == second.rooms
    assert first.emitters == second.emitters
    assert first.pump.coeffs == second.pump.coeffs


def test_records_follow_the_scenarios_rooms_and_emitters():
    scenario = house()
    resolved = resolve(scenario)
    assert len(resolved.rooms) == len(scenario.rooms) == 2
    assert len(resolved.emitters) == len(scenario.emitters) == 3
    assert resolved.design_mass_flow_kg_s.shape == (3,)


def test_design_water_temperature_is_supply_less_half_the_drop():
    # 70 °C supply, 15 K drop
    assert resolve(house()).design_water_temp_C == 62.5
