"""Emitters shut for good: no flow at all, and the solve stays well posed."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from simheat.analysis.flows import steady_flow_split
from simheat.errors import ScenarioError
from simheat.hydraulics import layouts
from simheat.hydraulics.solver import FlowSolver, solve_flows
from simheat.hydraulics.still import bridges, moving_part
from simheat.scenario import parse_scenario

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"
TWO_STOREY = (SCENARIOS / "two_storey.toml").read_text()
SCHEMES = sorted(layouts.SCHEMES)


def _emitter_key(text: str, emitter: str, key: str) -> str:
    """Add a key to the ``[[emitters]]`` table of ``emitter``."""
    old = f'[[emitters]]\nid = "{emitter}"\n'
    assert old in text
    return text.replace(old, old + key + "\n", 1)


def _without_emitter(text: str, emitter: str) -> str:
    """The house with the emitter taken out: its table and its tee."""
    start = text.index(f'[[emitters]]\nid = "{emitter}"\n')
    end = text.index("\n[", start + 1) + 1
    text = text[:start] + text[end:]
    tee = text.index(f'  {{ emitter = "{emitter}"')
    return text[:tee] + text[text.index("\n", tee) + 1 :]


CLOSED = parse_scenario(_emitter_key(TWO_STOREY, "bed1_side", "closed = true"))


def test_bridges_of_a_loop_with_a_stub_and_a_double_link():
    # loop 0-1-2, stub 2-3, and 3-4 joined twice (a loop of its own)
    ends = [(0, 1), (1, 2), (2, 0), (2, 3), (3, 4), (4, 3)]
    assert bridges(5, ends) == [3]


@pytest.mark.parametrize("scheme", SCHEMES)
def test_a_closed_emitter_carries_exactly_no_water(scheme):
    net = layouts.build(CLOSED, scheme)
    flows = solve_flows(net, water_temp_C=60.0)
    m = flows.mass_flow_kg_s
    link = net.emitter_links()[CLOSED.emitter_index("bed1_side")]
    assert net.closed[link]
    assert m[link] == 0.0  # exactly: out of the solve, not a leak
    # every node of the whole network balances to round-off
    assert np.max(np.abs(net.incidence() @ m)) <= 1e-12 * np.max(np.abs(m))
    others = np.delete(net.emitter_links(), CLOSED.emitter_index("bed1_side"))
    assert np.all(m[others] > 0.0)


@pytest.mark.parametrize("scheme", ["direct_return", "home_run_manifold"])
def test_closing_the_last_emitter_is_taking_it_out(scheme):
    # bed1_side is the last tee of floor 1: shut, the headers beyond the tee
    # before it carry nothing, so the others get the flows they would get with
    # it taken out of the house (same Kv, same pipes). Not so under reverse
    # return, whose return still runs to the last tee and back. Tolerance: the
    # two solves' convergence, 1e-9 relative.
    closed = solve_flows(layouts.build(CLOSED, scheme), water_temp_C=60.0)
    gone = parse_scenario(_without_emitter(TWO_STOREY, "bed1_side"))
    removed = solve_flows(layouts.build(gone, scheme), water_temp_C=60.0)
    net_closed = layouts.build(CLOSED, scheme)
    net_gone = layouts.build(gone, scheme)
    for e in gone.emitters:
        a = closed.mass_flow_kg_s[
            net_closed.emitter_links()[CLOSED.emitter_index(e.id)]
        ]
        b = removed.mass_flow_kg_s[net_gone.emitter_links()[gone.emitter_index(e.id)]]
        assert a == pytest.approx(b, rel=1e-9)


def test_a_thermostatic_head_at_its_closed_end_still_leaks():
    # The contrast: a head closed by its room passes the leakage of its valve
    # (0.5 % of its Kv), the emitter shut for good passes nothing.
    net = layouts.build(parse_scenario(TWO_STOREY), "direct_return")
    link = net.emitter_links()[CLOSED.emitter_index("bed1_side")]
    opening = np.ones(net.n_links)
    opening[link] = 0.0
    m = solve_flows(net, water_temp_C=60.0, valve_opening=opening).mass_flow_kg_s
    assert m[link] > 0.0


def test_kv_zero_is_closed():
    text = TWO_STOREY.replace(
        'id = "wc"\nroom = "wc"\nnominal_power_kW = 0.45\npreset = 2\n'
        'valve_type = "trv_body"',
        'id = "wc"\nroom = "wc"\nnominal_power_kW = 0.45\nkv_m3_per_h = 0.0',
    )
    scenario = parse_scenario(text)
    assert scenario.emitters[scenario.emitter_index("wc")].closed
    net = layouts.build(scenario, "direct_return")
    m = solve_flows(net, water_temp_C=60.0).mass_flow_kg_s
    assert m[net.emitter_links()[scenario.emitter_index("wc")]] == 0.0


def test_still_links_are_the_closed_one_and_the_headers_beyond_it():
    net = layouts.build(CLOSED, "direct_return")
    part = moving_part(net)
    still = {net.link_names[k] for k in part.still_links}
    assert still == {
        "emitter:bed1_side",
        "header:supply:bed1_side",
        "header:return:bed1_side",
    }


def test_still_nodes_take_the_pressure_of_their_side():
    # The supply tee of the closed emitter hangs from the supply header: it
    # takes the supply pressure there, its return tee the return's. The
    # closed valve holds the difference, as a shut valve does.
    net = layouts.build(CLOSED, "direct_return")
    flows = solve_flows(net, water_temp_C=60.0)
    p = flows.pressure_Pa
    names = net.node_names
    link = net.emitter_links()[CLOSED.emitter_index("bed1_side")]
    before = net.emitter_links()[CLOSED.emitter_index("bed1_window")]
    assert p[net.from_node[link]] == p[net.from_node[before]]
    assert p[net.to_node[link]] == p[net.to_node[before]]
    assert p[net.from_node[link]] > p[net.to_node[link]]
    assert names[net.from_node[link]] == "header:supply:bed1_side:end"


def test_warm_start_from_the_last_result_keeps_the_same_answer():
    net = layouts.build(CLOSED, "reverse_return")
    solver = FlowSolver(net)
    first = solver.solve(water_temp_C=60.0)
    again = solver.solve(water_temp_C=60.0, initial_mass_flow_kg_s=first.mass_flow_kg_s)
    np.testing.assert_allclose(again.mass_flow_kg_s, first.mass_flow_kg_s, rtol=1e-12)
    assert again.iterations <= 1


def test_every_emitter_of_a_floor_pump_closed_is_an_error():
    text = TWO_STOREY
    for e in ("bath", "bed2", "box", "bed1_window", "bed1_side"):
        text = _emitter_key(text, e, "closed = true")
    scenario = parse_scenario(text)
    with pytest.raises(
        ScenarioError,
        match="pump 'pump:floor1' has no open circuit to drive: every emitter it "
        "serves is closed",
    ):
        solve_flows(
            layouts.build(scenario, "direct_return_floor_pumps"), water_temp_C=60.0
        )
    # with one shared pump the ground floor still circulates
    shared = layouts.build(scenario, "direct_return")
    m = solve_flows(shared, water_temp_C=60.0).mass_flow_kg_s
    assert m[shared.emitter_links()[0]] > 0.0


def test_closed_emitter_has_no_design_flow_and_its_room_mate_takes_the_load():
    # bed1 (1100 W) is heated by bed1_window (1.0 kW) and bed1_side (0.7 kW);
    # with bed1_side shut bed1_window carries the whole room at the design drop.
    split = steady_flow_split(CLOSED, "direct_return")
    by_id = {e.id: e for e in split.emitters}
    assert by_id["bed1_side"].closed
    assert by_id["bed1_side"].design_flow_kg_s == 0.0
    assert not by_id["bed1_side"].starving
    open_split = steady_flow_split(parse_scenario(TWO_STOREY), "direct_return")
    both = {e.id: e.design_flow_kg_s for e in open_split.emitters}
    assert by_id["bed1_window"].design_flow_kg_s == pytest.approx(
        both["bed1_window"] + both["bed1_side"], rel=1e-12
    )
