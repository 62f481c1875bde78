"""Design-point pressure profile: the numbers the pressure figure draws."""

from pathlib import Path

import numpy as np
import pytest

from simheat.analysis.flows import STARVING_FRACTION, steady_flow_split
from simheat.analysis.pressure import floor_lines, pressure_profile
from simheat.hydraulics.layouts import describe
from simheat.scenario import load_scenario

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"
SCHEMES = ["direct_return", "reverse_return", "direct_return_floor_pumps"]


@pytest.fixture(scope="module", params=["bungalow", "two_storey"])
def house(request):
    return load_scenario(SCENARIOS / f"{request.param}.toml")


def profile_of(scenario, scheme):
    built = describe(scenario, scheme)
    return pressure_profile(built.network, scenario, built.emitter_design_flow_kg_s)


def tee_of(profile):
    """Emitter id -> (tee pair, flow share) over every floor."""
    found = {}
    for floor in profile.floors:
        for tee in floor.tees:
            for emitter_id, share in zip(tee.emitter_ids, tee.flow_share, strict=True):
                found[emitter_id] = (tee, share)
    return found


@pytest.mark.parametrize("scheme", SCHEMES)
def test_tee_differentials_and_shares_match_the_steady_flow_split(house, scheme):
    # The steady split solves the same all-open design point on its own path and
    # reads each emitter's dp from its two end nodes; the two must agree to the
    # round-off of the subtraction (same solve, same arithmetic).
    profile = profile_of(house, scheme)
    split = steady_flow_split(house, scheme)
    tees = tee_of(profile)
    assert tees.keys() == {e.id for e in split.emitters}
    for e in split.emitters:
        tee, share = tees[e.id]
        assert tee.dp_Pa == pytest.approx(e.dp_available_Pa, rel=1e-12)
        assert share == pytest.approx(e.flow_kg_s / e.design_flow_kg_s, rel=1e-12)
        assert tee.starving == (e.flow_kg_s < STARVING_FRACTION * e.design_flow_kg_s)


@pytest.mark.parametrize("scheme", SCHEMES)
def test_largest_pump_rise_equals_the_largest_pump_head(house, scheme):
    # The pressure rise across a pump link is a node-pressure difference of the
    # Newton solve; the duty-point head is the pump curve at the solved flow. They
    # agree once the loop equations are converged (solver tolerance far below
    # 1e-9 of a head of tens of kPa).
    profile = profile_of(house, scheme)
    split = steady_flow_split(house, scheme)
    assert profile.pump_rise_Pa == pytest.approx(
        max(head for _, _, head in split.pumps), rel=1e-9
    )


def test_single_pump_outlet_is_the_highest_pressure(house):
    # Pressures are gauge against the pump inlet; with one pump nothing in the
    # circuit is above its outlet (every other link only loses pressure).
    profile = profile_of(house, "direct_return")
    assert profile.highest_pressure_Pa == pytest.approx(profile.pump_rise_Pa, rel=1e-12)


def test_supply_pressure_falls_and_return_pressure_rises_along_direct_return(house):
    profile = profile_of(house, "direct_return")
    for floor in profile.floors:
        for x, p in (
            (floor.supply_distance_m, floor.supply_pressure_Pa),
            (floor.return_distance_m, floor.return_pressure_Pa),
        ):
            # Each link is a (start, end, NaN) triple; friction loses pressure in
            # the flow direction, which is away from the plant on the supply line
            # and towards it on the return line.
            start_x, end_x = x[0::3], x[1::3]
            start_p, end_p = p[0::3], p[1::3]
            assert np.all(end_p < start_p)
            assert np.all(np.isnan(x[2::3]))
            if p is floor.supply_pressure_Pa:
                assert np.all(end_x > start_x)
            else:
                assert np.all(end_x < start_x)


def test_every_floor_of_the_route_has_its_emitters(house):
    profile = profile_of(house, "reverse_return")
    assert [f.floor for f in profile.floors] == [f.floor for f in house.route.floors]
    for floor, route_floor in zip(profile.floors, house.route.floors, strict=True):
        assert set(floor.emitter_ids) == {
            house.emitters[t.emitter].id for t in route_floor.tees
        }


def test_floor_lines_reach_every_tee(house):
    network = describe(house, "direct_return").network
    links = network.emitter_links()
    for lines in floor_lines(network, house.route):
        supply_nodes = set(network.to_node[list(lines.supply_links)])
        return_nodes = set(network.from_node[list(lines.return_links)])
        emitter_links = links[list(lines.emitters)]
        assert set(network.from_node[emitter_links]) <= supply_nodes
        assert set(network.to_node[emitter_links]) <= return_nodes


def test_profile_names_the_scenario_scheme_and_water_temperature(house):
    profile = profile_of(house, "reverse_return")
    assert profile.scenario_name == house.name
    assert profile.scheme == "reverse_return"
    assert profile.water_temp_C == house.design.supply_temp_C
