"""Pump modes and check valves from the scenario through the layouts to the solve.

A pump link of the layouts has no pipe or valve of its own, so its pressure rise
is read independently of the pump law as the difference of its end nodes'
pressures (outlet minus inlet) in the converged solve.
"""

from __future__ import annotations

from pathlib import Path

import iapws
import numpy as np
import pytest

from simheat.hydraulics.layouts import build
from simheat.hydraulics.network import (
    PUMP_MODE_CONSTANT_DP,
    PUMP_MODE_FIXED_SPEED,
    PUMP_MODE_PROPORTIONAL_DP,
)
from simheat.hydraulics.solver import solve_flows
from simheat.resolve import resolve
from simheat.scenario import parse_scenario

SCENARIOS_DIR = Path(__file__).resolve().parents[2] / "scenarios"
WATER_TEMP_C = 60.0
# Density of water at 60 °C and 0.2 MPa from IAPWS-95 (the `iapws` package). [kg/m3]
RHO_60C_KG_M3 = iapws.IAPWS95(T=273.15 + WATER_TEMP_C, P=0.2).rho
CONSTANT_SET_HEAD_KPA = 25.0  # below the demo curve (45 kPa shut-off, 35 at 1 m3/h)
PROPORTIONAL_SET_HEAD_KPA = 30.0
# Curve of the floor pumps of the two-storey tests (invented small circulator).
FLOOR_PUMP_CURVE = "flow_m3_per_h = [0.0, 0.5, 1.0]\nhead_kPa = [30.0, 27.0, 20.0]\n"


def scenario_with(name: str, pump_keys: str = "", tail: str = ""):
    """A demo scenario with extra ``[pump]`` keys and appended tables."""
    text = (SCENARIOS_DIR / f"{name}.toml").read_text(encoding="utf-8")
    marker = "\n[pump]"
    start = text.index(marker)
    end = text.index("\n[", start + 1)  # the next table ends the pump table
    text = text[:end] + "\n" + pump_keys + text[end:] + tail
    return parse_scenario(text, origin=f"{name}.toml")


def pump_head_Pa(network, flows, link):
    """Rise across a pump link from its end-node pressures. [Pa]."""
    assert network.length_m[link] == 0.0
    assert network.zeta[link] == 0.0
    assert network.kv_m3_h[link] == 0.0
    p = flows.pressure_Pa
    return p[network.to_node[link]] - p[network.from_node[link]]


def solve_at_opening(network, opening, nets):
    """Steady solve at 60 °C with every emitter valve at ``opening``."""
    valve = np.ones(network.n_links)
    valve[network.emitter_links()] = opening
    flows = solve_flows(network, water_temp_C=WATER_TEMP_C, valve_opening=valve)
    nets.assert_mass_balance(network, flows)
    return flows


def curve_Pa(coeffs, q_m3_s):
    """The scenario's fitted maximum-speed curve at volume flow ``q_m3_s``. [Pa]."""
    a0, a1, a2 = coeffs
    return a0 + a1 * q_m3_s + a2 * q_m3_s**2


def constant_dp_bungalow():
    keys = f'mode = "constant_dp"\nsetpoint_kPa = {CONSTANT_SET_HEAD_KPA}\n'
    return scenario_with("bungalow", keys)


@pytest.mark.parametrize(
    ("keys", "mode", "setpoint_Pa"),
    [
        ("", PUMP_MODE_FIXED_SPEED, 0.0),
        ('mode = "constant_dp"\nsetpoint_kPa = 25.0\n', PUMP_MODE_CONSTANT_DP, 25e3),
        (
            'mode = "proportional_dp"\nsetpoint_kPa = 30.0\n',
            PUMP_MODE_PROPORTIONAL_DP,
            30e3,
        ),
    ],
    ids=["fixed_speed", "constant_dp", "proportional_dp"],
)
@pytest.mark.parametrize("scheme", ["direct_return", "one_pipe_loop"])
def test_layout_gives_the_pump_link_its_mode_and_set_head(
    keys, mode, setpoint_Pa, scheme
):
    network = build(scenario_with("bungalow", keys), scheme)
    (pump,) = network.pump_links()
    assert network.pump_mode[pump] == mode
    assert network.pump_setpoint_Pa[pump] == setpoint_Pa
    others = np.arange(network.n_links) != pump
    assert np.all(network.pump_mode[others] == PUMP_MODE_FIXED_SPEED)
    assert np.all(network.pump_setpoint_Pa[others] == 0.0)


@pytest.mark.parametrize(
    ("scheme", "keys", "expected"),
    [
        # the plant pump is alone in its loop: no check valve unless asked
        ("reverse_return", "", {"pump": False}),
        ("reverse_return", "check_valve = true\n", {"pump": True}),
        # floor pumps off one low-loss header: a check valve each by default
        (
            "direct_return_floor_pumps",
            "",
            {"pump": False, "pump:floor0": True, "pump:floor1": True},
        ),
        # [pump] stands in for the floor pumps too: its explicit value wins
        (
            "direct_return_floor_pumps",
            "check_valve = false\n",
            {"pump": False, "pump:floor0": False, "pump:floor1": False},
        ),
    ],
    ids=["plant_default", "plant_asked", "floor_default", "floor_refused"],
)
def test_check_valves_sit_on_the_pumps_as_configured(scheme, keys, expected):
    network = build(scenario_with("two_storey", keys), scheme)
    names = network.link_names
    held = {names[k]: bool(network.check_valve[k]) for k in network.pump_links()}
    assert held == expected
    assert np.count_nonzero(network.check_valve) == sum(expected.values())


def test_floor_pump_table_overrides_the_check_valve_of_its_floor():
    tail = (
        "\n[[layout.floor_pumps]]\nfloor = 1\n"
        + FLOOR_PUMP_CURVE
        + "check_valve = false\n"
    )
    network = build(
        scenario_with("two_storey", tail=tail), "reverse_return_floor_pumps"
    )
    names = network.link_names
    held = {names[k]: bool(network.check_valve[k]) for k in network.pump_links()}
    assert held == {"pump": False, "pump:floor0": True, "pump:floor1": False}


@pytest.mark.parametrize("opening", [1.0, 0.3])
@pytest.mark.parametrize("scheme", ["direct_return", "reverse_return"])
def test_constant_dp_pump_holds_its_set_head_as_valves_close(opening, scheme, nets):
    scenario = constant_dp_bungalow()
    network = build(scenario, scheme)
    (pump,) = network.pump_links()
    flows = solve_at_opening(network, opening, nets)
    q = flows.mass_flow_kg_s[pump] / RHO_60C_KG_M3
    # on the control line: the maximum-speed curve lies above the set head here
    assert (
        curve_Pa(resolve(scenario).pump.coeffs, q) > 1.05 * CONSTANT_SET_HEAD_KPA * 1e3
    )
    # definition of the mode (set head at every flow below the curve); 0.5 %
    # covers the rounded corner to the curve, under 1e-5 of the head this far off
    assert pump_head_Pa(network, flows, pump) == pytest.approx(
        CONSTANT_SET_HEAD_KPA * 1e3, rel=5e-3
    )


@pytest.mark.parametrize("scheme", ["direct_return", "reverse_return"])
def test_constant_dp_pump_passes_less_water_as_valves_close(scheme, nets):
    network = build(constant_dp_bungalow(), scheme)
    (pump,) = network.pump_links()
    open_flow, throttled_flow = (
        solve_at_opening(network, x, nets).mass_flow_kg_s[pump] for x in (1.0, 0.3)
    )
    assert throttled_flow < 0.95 * open_flow


@pytest.mark.parametrize("scheme", ["direct_return", "reverse_return"])
def test_fixed_speed_pump_head_rises_as_valves_close(scheme, nets):
    scenario = scenario_with("bungalow")
    network = build(scenario, scheme)
    (pump,) = network.pump_links()
    heads = []
    for opening in (1.0, 0.3):
        flows = solve_at_opening(network, opening, nets)
        head = pump_head_Pa(network, flows, pump)
        q = flows.mass_flow_kg_s[pump] / RHO_60C_KG_M3
        # a fixed-speed pump runs on its curve (0.5 %: IAPWS vs our density fit,
        # the Q|Q| regularisation)
        assert head == pytest.approx(
            curve_Pa(resolve(scenario).pump.coeffs, q), rel=5e-3
        )
        heads.append(head)
    # a falling curve at a lower flow gives a higher head, well beyond the 0.5 %
    # band the constant-dp pump keeps
    assert heads[1] > 1.02 * heads[0]


@pytest.mark.parametrize("opening", [1.0, 0.3, 0.05])
@pytest.mark.parametrize("scheme", ["direct_return", "reverse_return"])
def test_proportional_dp_pump_head_follows_its_line(opening, scheme, nets):
    keys = f'mode = "proportional_dp"\nsetpoint_kPa = {PROPORTIONAL_SET_HEAD_KPA}\n'
    scenario = scenario_with("bungalow", keys)
    network = build(scenario, scheme)
    (pump,) = network.pump_links()
    flows = solve_at_opening(network, opening, nets)
    set_head = PROPORTIONAL_SET_HEAD_KPA * 1e3
    # control flow: where the maximum-speed curve falls to the set head
    a0, a1, a2 = resolve(scenario).pump.coeffs
    roots = np.roots([a2, a1, a0 - set_head])
    q_control = float(max(r.real for r in roots if abs(r.imag) == 0.0))
    q = flows.mass_flow_kg_s[pump] / RHO_60C_KG_M3
    assert q < 0.95 * q_control  # on the line, clear of the corner to the curve
    # closed form of the mode: half the set head at zero flow, the set head at
    # the control flow, linear between (common trade description, from memory);
    # 1e-3 covers IAPWS vs our density fit and the rounded corner
    line = set_head * (0.5 + 0.5 * q / q_control)
    assert pump_head_Pa(network, flows, pump) == pytest.approx(line, rel=1e-3)


@pytest.mark.parametrize("opening", [1.0, 0.3])
def test_each_constant_dp_floor_pump_holds_its_own_set_head(opening, nets):
    tail = "".join(
        f"\n[[layout.floor_pumps]]\nfloor = {floor}\n{FLOOR_PUMP_CURVE}"
        f'mode = "constant_dp"\nsetpoint_kPa = {set_head}\n'
        for floor, set_head in ((0, 15.0), (1, 20.0))
    )
    network = build(scenario_with("two_storey", tail=tail), "direct_return_floor_pumps")
    flows = solve_at_opening(network, opening, nets)
    names = network.link_names
    heads = {
        names[k]: pump_head_Pa(network, flows, k)
        for k in network.pump_links()
        if names[k] != "pump"
    }
    # each floor pump regulates its own circuit (definition of the mode, 0.5 %)
    assert heads == {
        "pump:floor0": pytest.approx(15e3, rel=5e-3),
        "pump:floor1": pytest.approx(20e3, rel=5e-3),
    }


# A proportional-pressure pump on a loose circuit (a primary loop closed by a
# low-loss header, or a steep line from a set head near the shut-off head): its
# control line must level off for reverse flow, or a second, backwards root appears
# and the solve lands on it or fails to converge.
@pytest.mark.parametrize(
    ("name", "scheme", "set_head_kPa"),
    [
        ("two_storey", "direct_return_floor_pumps", 30.0),
        ("bungalow", "direct_return", 44.0),
    ],
    ids=["primary_behind_header", "near_shut_off"],
)
def test_proportional_dp_pump_never_runs_backwards(name, scheme, set_head_kPa, nets):
    keys = f'mode = "proportional_dp"\nsetpoint_kPa = {set_head_kPa}\n'
    network = build(scenario_with(name, keys), scheme)
    flows = solve_at_opening(network, 1.0, nets)
    assert np.all(flows.mass_flow_kg_s[network.pump_links()] > 0.0)
