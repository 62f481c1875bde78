"""Reverse return across the floors: one loop through every floor, reverse risers."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import dijkstra

from simheat.hydraulics import layouts
from simheat.hydraulics.network import LINK_PIPE
from simheat.hydraulics.solver import solve_flows
from simheat.resolve.route import tee_positions_m
from simheat.scenario import parse_scenario

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"
BUNGALOW = (SCENARIOS / "bungalow.toml").read_text()
TWO_STOREY = (SCENARIOS / "two_storey.toml").read_text()
# The two-storey house with its upper run split over two floors (a third floor
# up a 2.8 m riser) and a given drop from the top floor: a three-floor route.
THREE_FLOORS = TWO_STOREY.replace(
    '  { emitter = "box",         header_length_m = 3.0, branch_length_m = 0.6 },\n',
    "]\n\n[[route.floors]]\nfloor = 2\nriser_length_m = 2.8\ndrop_length_m = 6.5\n"
    "tees = [\n"
    '  { emitter = "box",         header_length_m = 3.0, branch_length_m = 0.6 },\n',
)
HOUSES = {"bungalow": BUNGALOW, "two_storey": TWO_STOREY, "three_floors": THREE_FLOORS}
SCHEMES = ("reverse_return_single_loop", "reverse_return_risers")
TOL_M = 1e-9  # equal lengths: sums of a few tens of lengths, round-off 1e-13 m


@pytest.fixture(scope="module")
def scenarios():
    return {name: parse_scenario(text) for name, text in HOUSES.items()}


def _loop_lengths(net, roles=None, built=None):
    """Pipe length from the plant's supply through each emitter to its return.

    With ``roles`` only pipes of those roles count (the others add 1e-12 m so
    the paths stay the same); paths follow the built flow direction.
    """
    pipe = net.link_kind == LINK_PIPE
    weight = net.length_m.copy()
    if roles is not None:
        counted = np.array([spec.role in roles for spec in built.links])
        weight = np.where(counted, weight, 0.0)
    graph = coo_matrix(
        (weight[pipe] + 1e-12, (net.from_node[pipe], net.to_node[pipe])),
        shape=(net.n_nodes, net.n_nodes),
    )
    out = dijkstra(graph, directed=True, indices=net.node_names.index("plant:supply"))
    back = dijkstra(
        graph.T, directed=True, indices=net.node_names.index("plant:return")
    )
    links = net.emitter_links()
    return out[net.from_node[links]] + back[net.to_node[links]]


def test_three_floor_route_reads(scenarios):
    floors = scenarios["three_floors"].route.floors
    assert [len(f.tees) for f in floors] == [5, 2, 3]


@pytest.mark.parametrize("house", HOUSES)
def test_single_loop_gives_every_emitter_the_same_loop_length(scenarios, house):
    net = layouts.build(scenarios[house], "reverse_return_single_loop")
    lengths = _loop_lengths(net)
    assert np.ptp(lengths) <= TOL_M


@pytest.mark.parametrize("house", HOUSES)
def test_single_loop_length_by_hand(scenarios, house):
    # feed both ways + risers up to the top + every run and drop once + the
    # lowest run and its riser back down to the plant.
    scenario = scenarios[house]
    route = scenario.route
    floors = route.floors
    runs = [float(tee_positions_m(f)[-1]) for f in floors]
    drops = [
        f.drop_length_m if f.drop_length_m is not None else runs[i] + f.riser_length_m
        for i, f in enumerate(floors)
    ][1:]
    expected = (
        2 * route.feed_length_m
        + sum(f.riser_length_m for f in floors)
        + sum(runs)
        + sum(drops)
        + runs[0]
        + floors[0].riser_length_m
    )
    net = layouts.build(scenario, "reverse_return_single_loop")
    assert _loop_lengths(net)[0] == pytest.approx(expected, abs=TOL_M)


@pytest.mark.parametrize("house", HOUSES)
def test_reverse_risers_give_every_floor_the_same_riser_length(scenarios, house):
    scenario = scenarios[house]
    built = layouts.describe(scenario, "reverse_return_risers")
    risers = _loop_lengths(built.network, {"feed", "riser"}, built)
    assert np.ptp(risers) <= TOL_M
    # feed both ways and twice the whole riser height (up on the supply to the
    # floor, up on the return from it, and the drop from the top)
    route = scenario.route
    expected = 2 * route.feed_length_m + 2 * sum(f.riser_length_m for f in route.floors)
    assert risers[0] == pytest.approx(expected, abs=TOL_M)
    # and each floor in reverse return: equal header loops within the floor
    headers = _loop_lengths(built.network, {"header"}, built)
    for floor in route.floors:
        assert np.ptp(headers[[t.emitter for t in floor.tees]]) <= TOL_M


@pytest.mark.parametrize("house", ["two_storey", "three_floors"])
def test_plain_reverse_return_risers_differ_between_floors(scenarios, house):
    # The contrast: with direct-return risers each floor's riser loop is twice
    # its own height, so the floors differ by twice the risers between them.
    scenario = scenarios[house]
    built = layouts.describe(scenario, "reverse_return")
    risers = _loop_lengths(built.network, {"feed", "riser"}, built)
    up = sum(f.riser_length_m for f in scenario.route.floors[1:])
    assert np.ptp(risers) == pytest.approx(2 * up, abs=TOL_M)


def test_single_loop_serves_the_top_floor_first(scenarios):
    scenario = scenarios["three_floors"]
    built = layouts.describe(scenario, "reverse_return_single_loop")
    order = [t.emitter for f in scenario.route.floors[::-1] for t in f.tees]
    flows = built.emitter_design_flow_kg_s
    # supply segment into each tee carries that emitter and all after it
    for i, emitter in enumerate(order):
        name = f"header:supply:{scenario.emitters[emitter].id}"
        spec = next(s for s in built.links if s.name == name)
        assert spec.design_flow_kg_s == pytest.approx(sum(flows[order[i:]]))


def test_the_given_drop_replaces_the_way_back_along_the_run(scenarios):
    built = layouts.describe(scenarios["three_floors"], "reverse_return_single_loop")
    drops = {s.name: s.length_m for s in built.links if ":drop:" in s.name}
    run1 = float(tee_positions_m(scenarios["three_floors"].route.floors[1])[-1])
    assert drops == {
        "floor2:drop:supply": 6.5,
        "floor2:drop:return": 6.5,
        "floor1:drop:supply": run1 + 3.0,
        "floor1:drop:return": run1 + 3.0,
    }


@pytest.mark.parametrize("scheme", SCHEMES)
def test_house_schemes_on_one_floor_are_reverse_return(scenarios, scheme):
    # With one floor both are plain reverse return: the same flows.
    scenario = scenarios["bungalow"]
    ours = solve_flows(layouts.build(scenario, scheme), water_temp_C=60.0)
    plain = solve_flows(layouts.build(scenario, "reverse_return"), water_temp_C=60.0)
    a = ours.mass_flow_kg_s[layouts.build(scenario, scheme).emitter_links()]
    b = plain.mass_flow_kg_s[layouts.build(scenario, "reverse_return").emitter_links()]
    np.testing.assert_allclose(a, b, rtol=1e-9)
