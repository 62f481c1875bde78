"""Low-temperature readiness: EN 442 limits by hand, replacements, as piped."""

from __future__ import annotations

import math
import warnings
from pathlib import Path

import numpy as np
import pytest
from readiness_house import one_room

from simheat.analysis.readiness import at_flow_temperature, readiness
from simheat.analysis.readiness.emitters import (
    lowest_flow_for,
    output_per_nominal,
)
from simheat.analysis.readiness.piped import PipedScheme
from simheat.analysis.readiness.result import Basis
from simheat.analysis.readiness.steady import steady_heat
from simheat.errors import RatingTableWarning, ScenarioError
from simheat.physics.emitter import NOMINAL_EXCESS_K
from simheat.physics.water import specific_heat_J_kg_K
from simheat.resolve import resolve
from simheat.scenario import load_scenario, parse_scenario

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"


def hand_lowest_flow_C(nominal_W, exponent, share_W, room_C, drop_K):
    """EN 442 by hand with the drop kept (closed form).

    The share needs the log-mean excess L = dT_n (S / N)^(1 / n) (EN 442-2
    eq. 4 inverted); with return = flow - d the log-mean excess is
    d / ln((T - t_i) / (T - d - t_i)) = L, so (T - t_i) = q (T - d - t_i) with
    q = exp(d / L), i.e. T = t_i + d q / (q - 1).
    """
    excess = NOMINAL_EXCESS_K * (share_W / nominal_W) ** (1.0 / exponent)
    q = math.exp(drop_K / excess)
    return room_C + drop_K * q / (q - 1.0)


@pytest.fixture(scope="module")
def one_room_result():
    scenario = parse_scenario(one_room(), origin="one_room")
    return readiness(scenario, targets_C=[55.0, 45.0])


def test_one_room_lowest_flow_temperature_by_hand(one_room_result):
    # 1000 W nominal, n = 1.3, 500 W load, room 20 °C, drop 10 K:
    # L = 49.83 * 0.5^(1/1.3) = 29.25 K, q = exp(10 / 29.25) = 1.4076,
    # T = 20 + 10 * 1.4076 / 0.4076 = 54.53 °C; shown rounded up to 54.6 °C.
    expected = hand_lowest_flow_C(1000.0, 1.3, 500.0, 20.0, 10.0)
    assert expected == pytest.approx(54.53, abs=0.01)
    root = lowest_flow_for(1000.0, 1.3, 500.0, 20.0, Basis(10.0, None))
    assert root == pytest.approx(expected, abs=1e-5)  # Brent's xtol 1e-6 K
    (radiator,) = one_room_result.radiators
    assert radiator.lowest_flow_temp_C == pytest.approx(math.ceil(expected * 10) / 10)
    assert one_room_result.lowest_flow_temp_C == radiator.lowest_flow_temp_C
    assert one_room_result.limiting == ("rad",)


def test_the_limit_is_verified_by_the_steady_balance(one_room_result):
    # At the rounded-up limit the output, recomputed by root finding on the
    # energy balance at the flow that carries 500 W across 10 K, meets the load
    # but by less than the 0.1 K rounding can add: d ln(output)/dT
    # = n L / ((T - t_i)(T - d - t_i)) = 1.3 * 29.25 / (34.53 * 24.53) = 4.5 %/K.
    (radiator,) = one_room_result.radiators
    assert 500.0 <= radiator.verified_output_W <= 500.0 * (1.0 + 0.1 * 0.045)


def test_replacement_at_a_target_by_hand(one_room_result):
    # At 45 °C with the drop kept (return 35 °C): dT_lm = 10 / ln(25 / 15)
    # = 19.58 K, g = (19.58 / 49.83)^1.3 = 0.2968, so the radiator gives 297 W
    # and a replacement needs 500 / 0.2968 = 1684.6 W -> 1690 W.
    g = ((10.0 / math.log(25.0 / 15.0)) / NOMINAL_EXCESS_K) ** 1.3
    at_45 = next(t for t in one_room_result.schemes[0].targets if t.flow_temp_C == 45)
    (radiator,) = at_45.radiators
    assert radiator.output_W == pytest.approx(1000.0 * g, rel=1e-12)
    assert radiator.nominal_needed_W == math.ceil(500.0 / g / 10.0) * 10.0 == 1690.0
    # the 1690 W radiator recomputed at 45 °C meets 500 W, with the margin of
    # the rounding up (1690 / 1684.6 = 1.0032)
    assert 500.0 <= radiator.verified_output_W <= 500.0 * 1.004
    assert not radiator.enough


def test_enough_at_a_target_above_the_limit(one_room_result):
    at_55 = next(t for t in one_room_result.schemes[0].targets if t.flow_temp_C == 55)
    (radiator,) = at_55.radiators
    assert radiator.enough
    assert radiator.nominal_needed_W is None
    assert radiator.replaced_as_piped_W is None


def test_a_fixed_return_temperature_basis():
    # Return held at 30 °C: solve (T - 30) / ln((T - 20) / 10) = L = 29.25 K by
    # bisection here (independent of the library's Brent).
    excess = NOMINAL_EXCESS_K * 0.5 ** (1.0 / 1.3)
    low, high = 30.0 + 1e-9, 95.0
    for _ in range(200):
        mid = 0.5 * (low + high)
        if (mid - 30.0) / math.log((mid - 20.0) / 10.0) < excess:
            low = mid
        else:
            high = mid
    root = lowest_flow_for(1000.0, 1.3, 500.0, 20.0, Basis(None, 30.0))
    assert root == pytest.approx(low, abs=1e-5)


def test_output_per_nominal_is_one_at_the_nominal_point():
    # EN 442-2: 75/65 °C into 20 °C is the rating point
    assert output_per_nominal(1.3, 75.0, 65.0, 20.0) == pytest.approx(1.0, rel=1e-12)
    assert output_per_nominal(1.3, 40.0, 20.0, 20.0) is None  # return at the room


def test_steady_network_conserves_energy():
    # Heat the source puts into the water = radiator outputs + pipe losses, at
    # the steady state (rel 1e-9: sweeps stop at 1e-9 K).
    scenario = load_scenario(SCENARIOS / "bungalow.toml")
    piped = PipedScheme(scenario, "direct_return")
    point = piped.at(55.0)
    net = piped.network
    flows = piped.solver.solve(water_temp_C=55.0).mass_flow_kg_s
    heat = steady_heat(scenario, net, flows, 55.0)
    source = int(net.source_links()[0])
    cp = float(specific_heat_J_kg_K(55.0))
    into_source = heat.node_temp_C[net.from_node[source]]
    supplied = flows[source] * cp * (55.0 - into_source)
    outputs = heat.emitter_output_W.sum()
    # the pipes lose some (the exact closure is the next test's)
    assert 0.0 < supplied - outputs < 0.15 * supplied
    # Every radiator receives water a little below the flow temperature.
    assert np.all(point.heat.emitter_inlet_C < 55.0)
    assert np.all(point.heat.emitter_inlet_C > 53.0)  # the far end, 1.5 K down


def test_steady_network_energy_balance_closes_exactly():
    scenario = load_scenario(SCENARIOS / "two_storey.toml")
    piped = PipedScheme(scenario, "one_pipe_loop")
    net = piped.network
    flows = piped.solver.solve(water_temp_C=60.0).mass_flow_kg_s
    heat = steady_heat(scenario, net, flows, 60.0)
    cp = float(specific_heat_J_kg_K(60.0))
    # pipe losses link by link from the node temperatures
    losses = 0.0
    for link in range(net.n_links):
        m = flows[link]
        a, b = (net.from_node[link], net.to_node[link])
        upstream, downstream = (a, b) if m > 0 else (b, a)
        drop_W = (
            abs(m) * cp * (heat.node_temp_C[upstream] - heat.node_temp_C[downstream])
        )
        if net.link_kind[link] == 0:  # pipes
            losses += drop_W
    source = int(net.source_links()[0])
    supplied = flows[source] * cp * (60.0 - heat.node_temp_C[net.from_node[source]])
    # outlet nodes of links that mix make a link-by-link sum inexact; the total
    # around the closed loop is exact: source = radiators + pipes
    assert supplied == pytest.approx(
        heat.emitter_output_W.sum() + _pipe_losses(scenario, net, flows, heat, cp),
        rel=1e-7,
    )
    assert losses > 0.0


def _pipe_losses(scenario, net, flows, heat, cp):
    """Heat every pipe and branch pipe loses, from its own steady solution."""
    from simheat.analysis.readiness.steady import NO_FLOW_KG_S

    total = 0.0
    setpoints = np.array([r.setpoint_C for r in scenario.rooms])
    for link in range(net.n_links):
        m = flows[link]
        if abs(m) <= NO_FLOW_KG_S or net.link_kind[link] not in (0, 1):
            continue
        room = int(net.surroundings_room[link])
        around = setpoints[room] if room >= 0 else scenario.route.unheated_space_temp_C
        upstream = net.from_node[link] if m > 0 else net.to_node[link]
        t_in = heat.node_temp_C[upstream]
        ua = net.loss_W_per_m_K[link] * net.length_m[link]
        m_cp = abs(m) * cp
        if net.link_kind[link] == 0:
            t_out = around + (t_in - around) * math.exp(-ua / m_cp)
            total += m_cp * (t_in - t_out)
        else:  # a branch: half its pipe before the radiator, half after
            e = int(net.emitter_index[link])
            t_rad = around + (t_in - around) * math.exp(-0.5 * ua / m_cp)
            total += m_cp * (t_in - t_rad)
            t_after = t_rad - heat.emitter_output_W[e] / m_cp
            t_out = around + (t_after - around) * math.exp(-0.5 * ua / m_cp)
            total += m_cp * (t_after - t_out)
    return total


def test_one_pipe_loop_cools_from_radiator_to_radiator():
    # In a one-pipe loop each radiator's return cools the water of the next:
    # the inlets fall along the loop (route order).
    scenario = load_scenario(SCENARIOS / "bungalow.toml")
    heat = PipedScheme(scenario, "one_pipe_loop").at(55.0).heat
    order = [t.emitter for f in scenario.route.floors for t in f.tees]
    inlets = heat.emitter_inlet_C[order]
    assert np.all(np.diff(inlets) < 0.0)
    assert inlets[0] - inlets[-1] > 5.0


def test_lowest_as_piped_is_the_lowest_at_its_step():
    scenario = load_scenario(SCENARIOS / "bungalow.toml")
    result = readiness(scenario, ["direct_return"], targets_C=[55.0])
    found = result.schemes[0].lowest_flow_temp_as_piped_C
    piped = PipedScheme(scenario, "direct_return")
    shares = np.array([r.share_W for r in result.radiators])
    at = piped.at(found).heat.emitter_output_W / shares
    below = piped.at(found - 0.1).heat.emitter_output_W / shares
    assert at.min() >= 1.0
    assert below.min() < 1.0
    worst = result.schemes[0].limiting_as_piped
    assert scenario.emitters[int(np.argmin(at))].id in worst


def test_replacements_lift_the_radiators_as_piped():
    scenario = load_scenario(SCENARIOS / "bungalow.toml")
    result = readiness(scenario, ["reverse_return"], targets_C=[50.0])
    (target,) = result.schemes[0].targets
    for r in target.radiators:
        assert r.nominal_needed_W is not None  # 50 °C is well below 67 °C
        assert r.replaced_as_piped_W > r.output_as_piped_W
        assert r.enough_replaced_as_piped == (r.replaced_as_piped_W >= r.share_W)


def test_the_report_names_radiators_still_short_as_piped_after_replacement():
    # A one-pipe loop at 55 °C: each radiator gets the water the ones before it
    # cooled, so radiators sized on the balanced basis (their own flow at the
    # flow temperature) can still fall short as piped. The report must say so
    # rather than let "replace by" read as the whole answer.
    from simheat.report.readiness import readiness_dict, readiness_text

    scenario = load_scenario(SCENARIOS / "two_storey.toml")
    result = readiness(scenario, ["one_pipe_loop"], targets_C=[55.0])
    (target,) = result.schemes[0].targets
    still = [r.id for r in target.radiators if r.replaced_as_piped_W < r.share_W]
    assert still  # the loop's late radiators stay short
    data = readiness_dict(result)["schemes"][0]["targets"][0]
    assert data["short_replaced_as_piped"] == still
    text = readiness_text(result)
    assert "still short as piped with the replacements in place" in text
    assert ", ".join(still) in text
    # Where nothing is replaced the list is null, not empty.
    boiler = readiness(parse_scenario(one_room(), origin="r"), targets_C=[60.0])
    data = readiness_dict(boiler)["schemes"][0]["targets"][0]
    assert data["short_replaced_as_piped"] is None


def test_a_target_fixes_the_flow_temperature():
    scenario = parse_scenario(one_room(heating_curve=True), origin="curve")
    fixed = at_flow_temperature(scenario, 45.0)
    assert fixed.source.flow_control == "fixed"
    assert fixed.source.flow_temp_C == 45.0
    assert fixed.source.max_power_W == scenario.source.max_power_W


@pytest.mark.parametrize(
    ("kwargs", "match"),
    [
        ({"targets_C": [19.0]}, "targets_C: every target must lie within 25 to 95"),
        ({"targets_C": []}, "targets_C: give at least one"),
        ({"return_C": 18.0}, "return_C: must lie above every room's setpoint"),
        ({"return_C": 30.0, "targets_C": [30.0]}, "above the return temperature 30"),
        ({"return_C": 30.0, "drop_K": 5.0}, "give either drop_K or return_C"),
        ({"drop_K": -5.0}, "drop_K: must be > 0"),
    ],
)
def test_bad_requests_name_the_input(kwargs, match):
    scenario = parse_scenario(one_room(), origin="one_room")
    with pytest.raises(ScenarioError, match=match):
        readiness(scenario, **kwargs)


def test_bundled_retrofit_house_limits_follow_the_closed_form():
    # Every radiator of the bundled heat pump retrofit, by the closed form with
    # its own exponent, share and room (the towel rail has n = 1.2, 22 °C).
    scenario = load_scenario(SCENARIOS / "retrofit_heat_pump.toml")
    assert scenario.source.kind == "heat_pump"
    result = readiness(scenario, targets_C=[55.0])
    for r in result.radiators:
        expected = hand_lowest_flow_C(
            r.nominal_W, r.exponent, r.share_W, r.room_C, 10.0
        )
        assert r.lowest_flow_temp_C == pytest.approx(math.ceil(expected * 10) / 10)
    worst = max(result.radiators, key=lambda r: r.lowest_flow_temp_C)
    assert result.lowest_flow_temp_C == worst.lowest_flow_temp_C
    assert result.limiting == (worst.id,)


def test_heat_pump_capacity_and_cop_at_each_target():
    # The bundled table at the design -7 °C: at 55 °C its point (6.9 kW,
    # COP 1.9); at 50 °C halfway between 45 and 55 °C: (7.3 + 6.9) / 2 = 7.1 kW,
    # COP (2.3 + 1.9) / 2 = 2.1.
    scenario = load_scenario(SCENARIOS / "retrofit_heat_pump.toml")
    result = readiness(scenario, targets_C=[55.0, 50.0])
    at_55, at_50 = result.schemes[0].targets
    assert (at_55.capacity_W, at_55.cop) == pytest.approx((6900.0, 1.9), rel=1e-12)
    assert (at_50.capacity_W, at_50.cop) == pytest.approx((7100.0, 2.1), rel=1e-12)
    assert result.design_load_W == pytest.approx(7000.0)
    assert at_55.outside_table is None
    assert at_50.outside_table is None


def test_targets_outside_the_table_are_held_at_its_edge_with_one_warning():
    # The bundled table spans 35-65 °C flow. At 70 °C the 65 °C column holds
    # (6.4 kW, COP 1.6 at -7 °C), at 30 °C the 35 °C column (7.6 kW, 2.7).
    scenario = load_scenario(SCENARIOS / "retrofit_heat_pump.toml")
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        result = readiness(scenario, targets_C=[70.0, 55.0, 30.0])
    rating = [w for w in caught if issubclass(w.category, RatingTableWarning)]
    assert len(rating) == 1
    assert "down to 30 °C" in str(rating[0].message)
    assert "up to 70 °C" in str(rating[0].message)
    at_70, at_55, at_30 = result.schemes[0].targets
    assert (at_70.capacity_W, at_70.cop) == pytest.approx((6400.0, 1.6), rel=1e-12)
    assert (at_30.capacity_W, at_30.cop) == pytest.approx((7600.0, 2.7), rel=1e-12)
    assert at_70.outside_table == (
        "flow temperature up to 70 °C, above the table (35 to 65 °C)"
    )
    assert "down to 30 °C" in at_30.outside_table
    assert at_55.outside_table is None


def test_a_boiler_has_no_heat_pump_figures(one_room_result):
    target = one_room_result.schemes[0].targets[0]
    assert target.capacity_W is None
    assert target.cop is None


def test_a_radiator_shut_for_good_is_left_out_and_its_sibling_takes_the_room():
    # The bungalow's kitchen has two radiators (1.1 and 1.0 kW). With kitchen_b
    # shut for good (closed = true) kitchen_a carries the whole kitchen load,
    # so its lowest flow temperature follows the closed form with that share;
    # kitchen_b is not judged (no water, no share) and nothing divides by it.
    text = (SCENARIOS / "bungalow.toml").read_text(encoding="utf-8")
    text = text.replace('id = "kitchen_b"\n', 'id = "kitchen_b"\nclosed = true\n', 1)
    scenario = parse_scenario(text, origin="closed")
    assert scenario.emitters[1].closed
    result = readiness(scenario, ["direct_return"], targets_C=[55.0])
    ids = [r.id for r in result.radiators]
    assert "kitchen_b" not in ids
    kitchen_a = result.radiators[ids.index("kitchen_a")]
    kitchen = scenario.emitters[0].room
    load = resolve(scenario).rooms[kitchen].design_heat_load_W
    assert kitchen_a.share_W == pytest.approx(load, rel=1e-12)
    expected = hand_lowest_flow_C(
        kitchen_a.nominal_W,
        kitchen_a.exponent,
        load,
        scenario.rooms[kitchen].setpoint_C,
        scenario.design.temperature_drop_K,
    )
    assert kitchen_a.lowest_flow_temp_C == pytest.approx(math.ceil(expected * 10) / 10)
    (scheme,) = result.schemes
    assert "kitchen_b" not in scheme.limiting_as_piped
    assert scheme.lowest_flow_temp_as_piped_C is not None
    (target,) = scheme.targets
    assert [r.id for r in target.radiators] == ids
