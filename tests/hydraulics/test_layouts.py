"""Invariants of every piping scheme built from the bundled houses."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import dijkstra

from simheat.hydraulics import layouts
from simheat.hydraulics.network import LINK_EMITTER, LINK_PIPE
from simheat.hydraulics.solver import solve_flows
from simheat.physics.emitter import steady_output_W
from simheat.resolve import resolve
from simheat.resolve.route import route_distance_m, tee_positions_m
from simheat.scenario import load_scenario, parse_scenario

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"
HOUSES = ("bungalow", "two_storey")
DESIGN_MEAN_TEMP_C = 57.5  # two_storey design 65 °C supply, 15 K drop


@pytest.fixture(scope="module")
def houses():
    return {name: load_scenario(SCENARIOS / f"{name}.toml") for name in HOUSES}


def _mean_temp(scenario) -> float:
    d = scenario.design
    return d.supply_temp_C - 0.5 * d.temperature_drop_K


def _links(built, role):
    return [spec for spec in built.links if spec.role == role]


@pytest.mark.parametrize("scheme", sorted(layouts.SCHEMES))
@pytest.mark.parametrize("house", HOUSES)
def test_every_scheme_solves_with_mass_balance(houses, house, scheme):
    scenario = houses[house]
    net = layouts.build(scenario, scheme)
    flows = solve_flows(net, water_temp_C=_mean_temp(scenario))
    m = flows.mass_flow_kg_s
    net_out = net.incidence() @ m
    # Kirchhoff's node law to round-off: 1e-12 of the largest link flow.
    assert np.max(np.abs(net_out)) <= 1e-12 * np.max(np.abs(m))
    assert np.all(m[net.emitter_links()] > 0.0)


@pytest.mark.parametrize("scheme", sorted(layouts.SCHEMES))
def test_every_emitter_appears_once(houses, scheme):
    net = layouts.build(houses["two_storey"], scheme)
    links = net.emitter_links()
    assert np.all(links >= 0)
    assert len(set(links.tolist())) == len(net.emitter_ids)


@pytest.mark.parametrize("house", HOUSES)
@pytest.mark.parametrize("scheme", ["direct_return", "reverse_return"])
def test_supply_header_length_is_the_route_length(houses, house, scheme):
    scenario = houses[house]
    built = layouts.describe(scenario, scheme)
    supply = sum(
        s.length_m
        for s in _links(built, "header")
        if s.name.startswith("header:supply")
    )
    route = sum(t.header_length_m for f in scenario.route.floors for t in f.tees)
    assert supply == pytest.approx(route, rel=1e-12)


@pytest.mark.parametrize("house", HOUSES)
def test_reverse_return_header_is_twice_the_run_less_the_first_tee(houses, house):
    # The return header starts at the first tee, runs to the last and back to the
    # riser: 2 * x_last - x_first per floor (route geometry).
    scenario = houses[house]
    built = layouts.describe(scenario, "reverse_return")
    returned = sum(s.length_m for s in _links(built, "header") if "return" in s.name)
    expected = sum(
        2 * tee_positions_m(f)[-1] - tee_positions_m(f)[0]
        for f in scenario.route.floors
    )
    assert returned == pytest.approx(expected, rel=1e-12)


def _loop_lengths(net):
    """Supply plus return pipe length from the plant through each emitter. [m]."""
    pipe = net.link_kind == LINK_PIPE
    graph = coo_matrix(
        (net.length_m[pipe] + 1e-12, (net.from_node[pipe], net.to_node[pipe])),
        shape=(net.n_nodes, net.n_nodes),
    )
    plant_supply = net.node_names.index("plant:supply")
    plant_return = net.node_names.index("plant:return")
    out = dijkstra(graph, directed=True, indices=plant_supply)
    back = dijkstra(graph.T, directed=True, indices=plant_return)
    links = net.emitter_links()
    return out[net.from_node[links]] + back[net.to_node[links]]


def test_reverse_return_loops_are_equally_long_on_each_floor(houses):
    scenario = houses["two_storey"]
    lengths = _loop_lengths(layouts.build(scenario, "reverse_return"))
    for floor in scenario.route.floors:
        on_floor = lengths[[t.emitter for t in floor.tees]]
        assert np.ptp(on_floor) == pytest.approx(0.0, abs=1e-9)


def test_direct_return_loops_differ_by_twice_the_run(houses):
    # The contrast that makes the previous test meaningful: under direct return
    # the last emitter's loop is longer by twice the header between first and
    # last tee (route geometry).
    scenario = houses["bungalow"]
    lengths = _loop_lengths(layouts.build(scenario, "direct_return"))
    x = tee_positions_m(scenario.route.floors[0])
    assert np.ptp(lengths) == pytest.approx(2 * (x[-1] - x[0]), rel=1e-9)


@pytest.mark.parametrize("house", HOUSES)
def test_home_run_pairs_follow_the_route(houses, house):
    scenario = houses[house]
    net = layouts.build(scenario, "home_run_manifold")
    links = net.emitter_links()
    for floor in scenario.route.floors:
        p = floor.manifold_position_m or 0.0
        for tee, x in zip(floor.tees, tee_positions_m(floor), strict=True):
            leg = route_distance_m(floor, p, float(x)) + tee.branch_length_m
            assert net.length_m[links[tee.emitter]] == pytest.approx(2 * leg)


def test_home_run_manifold_position_shortens_far_pairs(houses):
    scenario = houses["bungalow"]
    text = scenario.text.replace(
        "closing_length_m = 3.5", "closing_length_m = 3.5\nmanifold_position_m = 20.0"
    )
    moved = parse_scenario(text)
    at_start = layouts.build(scenario, "home_run_manifold")
    in_middle = layouts.build(moved, "home_run_manifold")
    far = scenario.emitter_index("study")  # 25 m along a 48 m ring
    link = at_start.emitter_links()[far]
    assert in_middle.length_m[link] < at_start.length_m[link] - 2 * 15.0


@pytest.mark.parametrize("house", HOUSES)
def test_split_circuits_share_the_load_within_one_emitter(houses, house):
    scenario = houses[house]
    built = layouts.describe(scenario, "split_direct_return")
    design = resolve(scenario).design_mass_flow_kg_s
    for floor in scenario.route.floors:
        # The first supply segment of each circuit leaves the manifold and
        # carries the circuit's whole design flow.
        firsts = [
            s
            for s in built.links
            if s.role == "header"
            and s.name.startswith("header:supply")
            and s.fittings.get("manifold_connection")
            and scenario.emitter_index(s.name.rsplit(":", 1)[1])
            in {t.emitter for t in floor.tees}
        ]
        assert len(firsts) == 2
        loads = [s.design_flow_kg_s for s in firsts]
        assert sum(loads) == pytest.approx(sum(design[t.emitter] for t in floor.tees))
        assert abs(loads[0] - loads[1]) <= max(design[t.emitter] for t in floor.tees)


@pytest.mark.parametrize("house", HOUSES)
def test_one_pipe_loop_flow_is_continuous(houses, house):
    scenario = houses[house]
    built = layouts.describe(scenario, "one_pipe_loop")
    net = built.network
    m = solve_flows(net, water_temp_C=_mean_temp(scenario)).mass_flow_kg_s
    for floor in scenario.route.floors:
        ids = [scenario.emitters[t.emitter].id for t in floor.tees]
        loop = [
            m[net.link_names.index(f"loop:{i}")]
            for i in ids
            if f"loop:{i}" in net.link_names
        ]
        loop.append(m[net.link_names.index(f"loop:floor{floor.floor}:return")])
        # Same water round the whole loop, to round-off (1e-12 relative).
        assert np.ptp(loop) <= 1e-12 * max(loop)
        for i in ids:
            through = (
                m[net.link_names.index(f"emitter:{i}")]
                + m[net.link_names.index(f"bypass:{i}")]
            )
            assert through == pytest.approx(loop[0], rel=1e-12)


def test_one_pipe_emitters_take_the_stated_share_at_design(houses):
    scenario = parse_scenario(
        houses["bungalow"].text + "\n[layout]\none_pipe_emitter_share = 0.4\n"
    )
    built = layouts.describe(scenario, "one_pipe_loop")
    loop = sum(resolve(scenario).design_mass_flow_kg_s)
    for spec in _links(built, "emitter"):
        assert spec.design_flow_kg_s == pytest.approx(0.4 * loop, rel=1e-12)


def test_one_pipe_bypass_gives_the_share_in_the_flow_solve():
    # Run the pump at the speed that drives exactly the loop's design flow: the
    # solved split must then be the share the bypasses were sized for (tolerance:
    # the solver's and the root finder's tolerances, 1e-6 relative).
    from scipy.optimize import brentq

    text = (Path(__file__).parent / "data_one_pipe_tiny.toml").read_text()
    scenario = parse_scenario(text)
    net = layouts.build(scenario, "one_pipe_loop")
    temp = _mean_temp(scenario)
    design_loop = sum(resolve(scenario).design_mass_flow_kg_s)
    ret = net.link_names.index("loop:floor0:return")

    def solve(speed):
        return solve_flows(net, water_temp_C=temp, pump_speed=speed).mass_flow_kg_s

    speed = brentq(lambda n: solve(n)[ret] - design_loop, 0.05, 5.0, xtol=1e-12)
    m = solve(speed)
    share = m[net.emitter_links()] / m[ret]
    assert share == pytest.approx(np.full(len(share), 0.3), rel=1e-6)


def test_one_pipe_inlet_temperatures_fall_along_the_loop(houses):
    # Steady energy balance along the loop: each emitter gives its EN 442 steady
    # output for its inlet temperature and flow, its outlet water mixes back
    # with the bypass water (mass-weighted), and the mix feeds the next tee.
    scenario = houses["bungalow"]
    net = layouts.build(scenario, "one_pipe_loop")
    m = solve_flows(net, water_temp_C=_mean_temp(scenario)).mass_flow_kg_s
    links = net.emitter_links()
    cp = 4190.0  # liquid water near 60 °C, IAPWS-95
    temp = scenario.design.supply_temp_C
    loop = m[net.link_names.index("loop:floor0:return")]
    inlets = []
    for tee in scenario.route.floors[0].tees:
        e = scenario.emitters[tee.emitter]
        inlets.append(temp)
        flow = m[links[tee.emitter]]
        out_W = steady_output_W(
            e.nominal_power_W, e.exponent, temp, flow, scenario.rooms[e.room].setpoint_C
        )
        temp -= out_W / (loop * cp)
    assert np.all(np.diff(inlets) < -0.1)  # each tee at least 0.1 K cooler


def test_one_pipe_simulated_inlets_fall_along_the_loop():
    from simheat.dynamics.simulate import simulate

    text = (Path(__file__).parent / "data_one_pipe_tiny.toml").read_text()
    run = simulate(parse_scenario(text), "one_pipe_loop")
    order = [t.emitter for t in run.scenario.route.floors[0].tees]
    final = run.emitter_inlet_temp_C[-1, order]
    assert np.all(np.diff(final) < 0.0)
    assert run.summary.energy.balance_error_pct == pytest.approx(0.0, abs=0.5)


@pytest.mark.parametrize("base", sorted(layouts.FLOOR_CIRCUITS))
def test_floor_circuits_behind_a_low_loss_header_are_independent(houses, base):
    scenario = houses["two_storey"]
    ground = [t.emitter for t in scenario.route.floors[0].tees]
    upper = [t.emitter for t in scenario.route.floors[1].tees]
    net = layouts.build(scenario, base + layouts.FLOOR_PUMPS_SUFFIX)
    links = net.emitter_links()
    before = solve_flows(net, water_temp_C=57.5).mass_flow_kg_s[links[upper]]
    opening = np.ones(net.n_links)
    opening[links[ground]] = 0.1  # every ground-floor valve nearly shut
    after = solve_flows(net, water_temp_C=57.5, valve_opening=opening)
    change = np.abs(after.mass_flow_kg_s[links[upper]] / before - 1.0)
    # Behind the header the upper floor's flows move by well under 1 %
    # (measured: below 0.01 %); with one shared pump they move by 25-28 %
    # for two-pipe schemes.
    assert np.max(change) < 0.01


def test_shared_pump_floors_interact(houses):
    # The contrast: the same throttling with one shared pump moves the upper
    # floor's flows by far more than 1 %.
    scenario = houses["two_storey"]
    ground = [t.emitter for t in scenario.route.floors[0].tees]
    upper = [t.emitter for t in scenario.route.floors[1].tees]
    net = layouts.build(scenario, "direct_return")
    links = net.emitter_links()
    before = solve_flows(net, water_temp_C=57.5).mass_flow_kg_s[links[upper]]
    opening = np.ones(net.n_links)
    opening[links[ground]] = 0.1
    after = solve_flows(net, water_temp_C=57.5, valve_opening=opening)
    assert np.max(after.mass_flow_kg_s[links[upper]] / before - 1.0) > 0.1


@pytest.mark.parametrize(
    ("scheme", "kind", "per_emitter"),
    [
        ("direct_return", "tee", 2),
        ("reverse_return", "tee", 2),
        ("home_run_manifold", "manifold_connection", 2),
        ("one_pipe_loop", "diverter_tee", 2),
    ],
)
def test_fitting_counts_per_emitter(houses, scheme, kind, per_emitter):
    scenario = houses["bungalow"]
    built = layouts.describe(scenario, scheme)
    assert built.fitting_count[kind] == per_emitter * len(scenario.emitters)


def test_fitting_zeta_override_reaches_the_network(houses):
    scenario = houses["bungalow"]
    text = scenario.text + "\n[layout.fittings]\nelbow_zeta = 0.0\ntee_run_zeta = 2.0\n"
    net = layouts.build(parse_scenario(text), "direct_return")
    k = net.link_names.index("header:supply:hall")
    # One tee run and one elbow per header segment: 2.0 + 0.0.
    assert net.zeta[k] == pytest.approx(2.0)


@pytest.mark.parametrize("scheme", sorted(layouts.SCHEMES))
def test_every_link_with_pipe_holds_water(houses, scheme):
    net = layouts.build(houses["two_storey"], scheme)
    piped = net.length_m > 0.0
    assert np.all(net.water_volume_m3[piped] > 0.0)
    assert np.all(net.water_volume_m3[net.link_kind == LINK_EMITTER] > 0.0)


def test_schemes_list_in_a_scenario_accepts_every_scheme(houses):
    text = houses["bungalow"].text
    listed = ", ".join(f'"{name}"' for name in layouts.SCHEMES)
    text = text.replace(
        'schemes = ["direct_return", "reverse_return"]', f"schemes = [{listed}]"
    )
    assert parse_scenario(text).schemes == tuple(layouts.SCHEMES)
