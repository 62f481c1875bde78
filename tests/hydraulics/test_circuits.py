"""Circuits of the layouts and the balancing valves the scenario puts on them."""

from __future__ import annotations

from pathlib import Path

import pytest

from simheat.hydraulics.layouts import describe
from simheat.hydraulics.solver import solve_flows
from simheat.scenario import parse_scenario
from simheat.schemes import SCHEME_NAMES

SCENARIOS_DIR = Path(__file__).resolve().parents[2] / "scenarios"
TWO_STOREY = (SCENARIOS_DIR / "two_storey.toml").read_text(encoding="utf-8")
VALVES = """
[valve_types.circuit_dn15]
presets = [1, 2, 3, 4]
kv_m3_per_h = [0.4, 0.9, 1.6, 2.5]

[layout.circuit_valves]
valve_type = "circuit_dn15"
presets = { floor1 = 2.5, primary = 3 }
"""


@pytest.fixture(scope="module")
def plain():
    return parse_scenario(TWO_STOREY, origin="two_storey.toml")


@pytest.fixture(scope="module")
def valved():
    return parse_scenario(TWO_STOREY + VALVES, origin="two_storey.toml")


@pytest.mark.parametrize("scheme", sorted(SCHEME_NAMES))
def test_circuits_without_declared_valves_leave_the_network_alone(plain, scheme):
    built = describe(plain, scheme)
    assert not any(c.has_valve for c in built.circuits)
    assert not any(n.startswith("circuit_valve") for n in built.network.link_names)
    names = {c.name for c in built.circuits}
    # one loop through every floor has no floor circuits off a shared riser
    assert ({"floor0", "floor1"} <= names) == (scheme != "reverse_return_single_loop")
    assert ("primary" in names) == scheme.endswith("_floor_pumps")


@pytest.mark.parametrize("scheme", sorted(SCHEME_NAMES))
def test_every_circuit_valve_carries_its_circuits_flow(valved, scheme):
    # mass balance: the valve link on a circuit's return carries exactly the sum
    # of its emitters' flows in two-pipe circuits, the loop's flow (what leaves
    # the last tee) in a one-pipe loop, and the source's flow on the primary
    built = describe(valved, scheme)
    net = built.network
    flows = solve_flows(net, water_temp_C=65.0).mass_flow_kg_s
    emitter_links = net.emitter_links()
    index = {name: k for k, name in enumerate(net.link_names)}
    for c in built.circuits:
        assert c.has_valve
        assert net.link_names[c.link] == f"circuit_valve:{c.name}"
        if c.name == "primary":
            expected = flows[net.source_links()[0]]
        elif scheme.startswith("one_pipe"):
            expected = flows[index[f"loop:{c.name}:return"]]
        else:
            expected = flows[emitter_links[list(c.emitters)]].sum()
        assert flows[c.link] == pytest.approx(expected, rel=1e-9)


def test_circuit_valve_kv_comes_from_its_preset(valved):
    # preset 2.5 of the table: Kv 0.9 + 0.5 (1.6 - 0.9) = 1.25 m3/h; a circuit
    # without a preset has its valve fully open (preset 4, Kv 2.5)
    net = describe(valved, "direct_return_floor_pumps").network
    kv = dict(zip(net.link_names, net.kv_m3_h, strict=True))
    assert kv["circuit_valve:floor1"] == pytest.approx(1.25, rel=1e-12)
    assert kv["circuit_valve:floor0"] == pytest.approx(2.5, rel=1e-12)
    assert kv["circuit_valve:primary"] == pytest.approx(1.6, rel=1e-12)


def test_only_the_listed_circuits_get_valves():
    text = TWO_STOREY + VALVES.replace(
        'valve_type = "circuit_dn15"',
        'valve_type = "circuit_dn15"\ncircuits = ["floor0:ahead"]',
    )
    built = describe(parse_scenario(text), "split_direct_return")
    valved = [c.name for c in built.circuits if c.has_valve]
    assert valved == ["floor0:ahead"]
    sides = {c.name: set(c.emitters) for c in built.circuits}
    floor0 = sides["floor0"]
    assert sides["floor0:ahead"] | sides["floor0:back"] == floor0
    assert not sides["floor0:ahead"] & sides["floor0:back"]
