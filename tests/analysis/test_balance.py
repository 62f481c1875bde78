"""Balancing: closed-form presets checked by hand and by re-solving the network."""

from __future__ import annotations

import math
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest

from simheat.analysis.balance import balance_scheme
from simheat.analysis.balance.design import closed_form_design
from simheat.analysis.balance.elements import Element, kv_for_drop_m3_h
from simheat.analysis.balance.valves import BELOW_SMALLEST, valve_setting
from simheat.analysis.flows import steady_flow_split
from simheat.errors import BalanceError
from simheat.hydraulics.layouts import describe
from simheat.hydraulics.layouts.pipes import link_pressure_drop_Pa
from simheat.hydraulics.solver import solve_flows
from simheat.physics.pump import curve_at_speed
from simheat.physics.valve import thermostatic_opening
from simheat.physics.water import density_kg_m3
from simheat.resolve import resolve
from simheat.scenario import load_scenario, parse_scenario
from simheat.scenario.edits import ScenarioEdit, edited_text

SCENARIOS_DIR = Path(__file__).resolve().parents[2] / "scenarios"
PARALLEL = [
    "direct_return",
    "reverse_return",
    "split_direct_return",
    "home_run_manifold",
]
PARALLEL += [f"{s}_floor_pumps" for s in PARALLEL]
TRV = Element(
    "preset", "trv", (1, 2, 3, 4, 5, 6), (0.05, 0.09, 0.15, 0.25, 0.40, 0.60), None, 6
)

# An invented three-radiator ladder: one floor, direct return, plain Kv valves.
LADDER = """
name = "Ladder"
schemes = ["direct_return"]
[design]
outdoor_temp_C = -10.0
supply_temp_C = 70.0
temperature_drop_K = 15.0
[source]
max_power_kW = 8.0
flow_temp_C = 70.0
[pump]
flow_m3_per_h = [0.0, 0.5, 1.0]
head_kPa = [30.0, 26.0, 16.0]
[[rooms]]
id = "a"
floor_area_m2 = 15.0
design_heat_load_W = 1200
setpoint_C = 20.0
[[rooms]]
id = "b"
floor_area_m2 = 15.0
design_heat_load_W = 900
setpoint_C = 20.0
[[rooms]]
id = "c"
floor_area_m2 = 15.0
design_heat_load_W = 1500
setpoint_C = 20.0
[[emitters]]
id = "a"
room = "a"
nominal_power_kW = 1.4
kv_m3_per_h = 0.8
[[emitters]]
id = "b"
room = "b"
nominal_power_kW = 1.0
kv_m3_per_h = 0.8
[[emitters]]
id = "c"
room = "c"
nominal_power_kW = 1.7
kv_m3_per_h = 0.8
[route]
header_pipe = "cu_15x1"
branch_pipe = "cu_10x1"
feed_length_m = 3.0
[[route.floors]]
floor = 0
tees = [
  { emitter = "a", header_length_m = 4.0, branch_length_m = 1.0 },
  { emitter = "b", header_length_m = 5.0, branch_length_m = 1.0 },
  { emitter = "c", header_length_m = 6.0, branch_length_m = 1.5 },
]
"""


@pytest.fixture(scope="module")
def houses():
    return {
        name: load_scenario(SCENARIOS_DIR / f"{name}.toml")
        for name in ("bungalow", "two_storey")
    }


def test_presets_apply_with_the_head_fully_open():
    # the preset convention: the room half a band below setpoint is the head
    # model's full opening (EN 215 proportional band, our head model)
    for band in (1.0, 2.0, 3.0):
        assert thermostatic_opening(20.0 - band / 2.0, 20.0, band) == 1.0


def _ladder_loops(built, temp_C: float) -> dict[str, float]:
    """Each ladder emitter's loop at design flows, its valve left out. [Pa].

    Every link's drop summed independently: the layout's own link pressure
    drop with the valve's Kv set to 0 (no valve), source, feed both ways, the
    headers up to the emitter's tee both ways, and the emitter's link.
    """
    net = built.network
    flows = built.design_flow_kg_s
    drop = {
        spec.name: link_pressure_drop_Pa(
            replace(spec, kv=0.0), flows[k], float(net.zeta[k]), temp_C
        )
        for k, spec in enumerate(built.links)
    }
    common = drop["source"] + drop["feed:supply"] + drop["feed:return"]
    ids = ["a", "b", "c"]
    loop = {}
    for i, e in enumerate(ids):
        headers = sum(
            drop[f"header:{side}:{x}"]
            for x in ids[: i + 1]
            for side in ("supply", "return")
        )
        loop[e] = common + headers + drop[f"emitter:{e}"]
    return loop


def _open_valve_Pa(mass_flow_kg_s: float, kv_m3_h: float, temp_C: float) -> float:
    """Drop of a valve at its Kv by the Kv definition (m3/h, bar, 1000 kg/m3)."""
    rho = float(density_kg_m3(temp_C))
    q_m3_h = mass_flow_kg_s / rho * 3600.0
    return (q_m3_h / kv_m3_h) ** 2 * rho / 1000.0 * 1e5


def test_ladder_kv_follow_the_kv_definition_and_reproduce_the_targets():
    """Closed form on a ladder whose link flows follow from the targets.

    Every link's drop at design flow is summed independently here (the layout's
    own link pressure drop, valves fully open): the index circuit is the
    emitter with the largest loop sum; every valve must take the pump's rise
    less the rest of its loop, and its Kv is Q / sqrt(dp[bar] 1000 / rho) with
    Q in m3/h at the supply temperature's density (Kv definition). Re-solving
    with those Kv and the pump at its set speed reproduces every target.
    """
    scenario = parse_scenario(LADDER)
    built = describe(scenario, "direct_return")
    net = built.network
    temp = scenario.design.supply_temp_C
    design = closed_form_design(scenario, resolve(scenario), built, temp)
    loop = _ladder_loops(built, temp)
    ids = ["a", "b", "c"]
    pump = design.pumps[0]
    rise = pump.setting.rise_Pa
    rho = float(density_kg_m3(temp))
    links = net.emitter_links()
    kv = np.empty(3)
    for i, a in enumerate(design.adjustables):
        q_m3_h = a.mass_flow_kg_s / rho * 3600.0
        dp_bar = (rise - loop[ids[i]]) / 1e5
        kv[i] = kv_for_drop_m3_h(a.mass_flow_kg_s, a.valve_Pa, temp)
        # Kv definition; the law's regularisation of m|m| is below 1e-7 here
        assert kv[i] == pytest.approx(
            q_m3_h / math.sqrt(dp_bar * 1000.0 / rho), rel=1e-6
        )
    coeffs = np.array(net.pump_coeffs)
    k = int(net.pump_links()[0])
    coeffs[k] = curve_at_speed(*coeffs[k], pump.setting.value)
    kv_links = np.array(net.kv_m3_h)
    kv_links[links] = kv
    solved = solve_flows(
        replace(net, pump_coeffs=coeffs, kv_m3_h=kv_links), water_temp_C=temp
    )
    np.testing.assert_allclose(
        solved.mass_flow_kg_s[links], built.emitter_design_flow_kg_s, rtol=1e-7
    )


def test_kv_to_preset_by_hand():
    """Hand calculation of the valve step.

    100 kg/h at 70 °C (rho 977.76 kg/m3, IAPWS-95: 977.76) is 0.102275 m3/h;
    a valve that must take 10 kPa = 0.1 bar needs
    Kv = 0.102275 / sqrt(0.1 * 1000 / 977.76) = 0.102275 / 0.319803 = 0.31981.
    On the table (preset 4: Kv 0.25, preset 5: Kv 0.40) that is preset
    4 + (0.31981 - 0.25) / 0.15 = 4.465.
    """
    setting = valve_setting(TRV, 100.0 / 3600.0, 10e3, 70.0, rounded=False)
    assert setting.kv_m3_h == pytest.approx(0.31981, rel=2e-4)
    assert setting.setting == pytest.approx(4.465, abs=2e-3)


def test_valve_below_its_smallest_preset_names_the_pressure_left():
    # 30 kPa at 20 kg/h needs Kv 0.0117, below the table's 0.05 at preset 1
    setting = valve_setting(TRV, 20.0 / 3600.0, 30e3, 70.0)
    assert setting.limit == BELOW_SMALLEST
    assert setting.setting == 1
    # preset 1 (Kv 0.05) takes (0.020455 / 0.05)^2 * 977.76 / 1000 bar
    # = 16.364 kPa of the 30 (Kv definition at rho 977.76 kg/m3)
    assert setting.shortfall_Pa == pytest.approx(30e3 - 16.364e3, rel=1e-3)


@pytest.mark.parametrize("house", ["bungalow", "two_storey"])
@pytest.mark.parametrize("scheme", PARALLEL)
def test_every_parallel_scheme_balances_and_verifies(houses, house, scheme):
    result = balance_scheme(houses[house], scheme)
    # continuous presets, rounded to two decimals: within the 5 %
    assert abs(result.worst_deviation_pct) < 5.0
    # the written scenario, read back: simheat flows shows the same thing
    split = steady_flow_split(result.balanced, scheme)
    for v, e in zip(result.valves, split.emitters, strict=True):
        assert e.flow_kg_s == pytest.approx(v.verified_kg_s, rel=1e-9)
        assert abs(e.flow_kg_s / e.design_flow_kg_s - 1.0) < 0.05


def test_reverse_return_weak_middle_becomes_the_index(houses):
    # the bungalow's reverse return with every valve open: the emitters in the
    # middle of the run get the least (supply and return pressures meet there)
    scenario = houses["bungalow"]
    split = steady_flow_split(scenario, "reverse_return")
    share = [e.flow_kg_s / e.design_flow_kg_s for e in split.emitters]
    weakest = split.emitters[int(np.argmin(share))].id
    result = balance_scheme(scenario, "reverse_return")
    tees = [scenario.emitters[t.emitter].id for t in scenario.route.floors[0].tees]
    assert result.index_emitter not in (tees[0], tees[-1])
    assert result.index_emitter == weakest
    index_valve = next(v for v in result.valves if v.emitter == result.index_emitter)
    # fully open, to the pump speed's rounding up to 0.0001 (a few pascals
    # more for the valve, a hundredth of a preset at the top of this table)
    assert index_valve.setting == pytest.approx(6.0, abs=0.02)
    assert index_valve.kv_m3_h == max(v.kv_m3_h for v in result.valves)


def test_kept_pump_that_falls_short_names_the_shortfall(houses):
    text = houses["bungalow"].text.replace(
        "head_kPa = [45.0, 42.0, 35.0, 24.0, 10.0]",
        "head_kPa = [9.0, 8.0, 7.0, 5.0, 2.0]",
    )
    with pytest.raises(BalanceError, match=r"pump 'pump' .* kPa short$"):
        balance_scheme(parse_scenario(text), "reverse_return", keep_pump=True)


def test_speed_steps_take_the_next_one_up(houses):
    text = houses["bungalow"].text.replace(
        "head_kPa = [45.0, 42.0, 35.0, 24.0, 10.0]",
        "head_kPa = [45.0, 42.0, 35.0, 24.0, 10.0]\nspeed_steps = [0.5, 0.7, 1.0]",
    )
    free = balance_scheme(houses["bungalow"], "direct_return")
    stepped = balance_scheme(parse_scenario(text), "direct_return")
    lowest = free.pumps[0].setting
    assert stepped.pumps[0].setting == min(s for s in (0.5, 0.7, 1.0) if s >= lowest)
    assert abs(stepped.worst_deviation_pct) < 5.0


def test_lockshield_turns_are_set_and_the_valve_kept():
    text = (
        LADDER.replace(
            'kv_m3_per_h = 0.8\n[[emitters]]\nid = "b"',
            'kv_m3_per_h = 0.8\nlockshield_type = "ls"\n[[emitters]]\nid = "b"',
        )
        + "[valve_types.ls]\npresets = [0.5, 1, 2, 4]\n"
        + "kv_m3_per_h = [0.05, 0.2, 0.5, 1.2]\n"
    )
    result = balance_scheme(parse_scenario(text), "direct_return")
    a = result.valves[0]
    assert a.element.kind == "lockshield"
    assert result.settings.emitters[0][0] == "lockshield_turns"
    # the valve's own Kv stays 0.8 in series with the lockshield
    assert a.link_kv_m3_h == pytest.approx((a.kv_m3_h**-2 + 0.8**-2) ** -0.5, rel=1e-9)
    assert abs(result.worst_deviation_pct) < 5.0


def test_circuit_valves_are_set_at_the_manifold(houses):
    text = houses["two_storey"].text + (
        "\n[valve_types.circuit]\npresets = [1, 2, 3, 4]\n"
        "kv_m3_per_h = [0.3, 0.8, 1.5, 2.5]\n\n"
        '[layout.circuit_valves]\nvalve_type = "circuit"\n'
    )
    result = balance_scheme(parse_scenario(text), "split_direct_return")
    names = {c.name for c in result.circuits if c.element is not None}
    assert names == {
        "floor0",
        "floor1",
        "floor0:ahead",
        "floor0:back",
        "floor1:ahead",
        "floor1:back",
    }
    assert set(result.settings.circuit_presets) == names
    assert abs(result.worst_deviation_pct) < 5.0


@pytest.mark.parametrize("mode", ["constant_dp", "proportional_dp"])
def test_regulated_pump_gets_the_least_set_head_that_serves_the_index(mode):
    """The ladder on a regulated pump set at 20 kPa.

    Index need by hand: each loop at design flows (valves left out, summed
    link by link) plus its valve fully open at Kv 0.8 by the Kv definition;
    the largest is the index circuit's need. The pump's rise at the design
    flow Q must equal it. Constant dp: the rise is the set head H. Proportional
    dp: H (1/2 + Q / (2 Qc)), Qc where the curve falls to H; the curve through
    (0, 30), (0.5, 26), (1, 16) kPa at m3/h is 30 - 2 Q - 12 Q^2, so
    Qc = (-2 + sqrt(4 + 48 (30 - H))) / 24 with H in kPa. Balance rounds the set
    head up to the next pascal; the control corner's smoothing moves the rise
    by delta^2 / (4 gap) < 0.01 Pa here; hence 1 Pa.
    """
    text = LADDER.replace(
        "head_kPa = [30.0, 26.0, 16.0]",
        f'head_kPa = [30.0, 26.0, 16.0]\nmode = "{mode}"\nsetpoint_kPa = 20.0',
    )
    scenario = parse_scenario(text)
    built = describe(scenario, "direct_return")
    temp = scenario.design.supply_temp_C
    targets = built.emitter_design_flow_kg_s
    loop = _ladder_loops(built, temp)
    needs = {
        e: loop[e] + _open_valve_Pa(targets[i], 0.8, temp)
        for i, e in enumerate(["a", "b", "c"])
    }
    index = max(needs, key=needs.get)
    result = balance_scheme(scenario, "direct_return")
    pump = result.pumps[0]
    assert result.index_emitter == index
    assert pump.key == "setpoint_kPa"
    head_Pa = pump.setting
    if mode == "constant_dp":
        rise_Pa = head_Pa
    else:
        q_m3_h = float(np.sum(targets)) / float(density_kg_m3(temp)) * 3600.0
        h_kPa = head_Pa / 1e3
        qc_m3_h = (-2.0 + math.sqrt(4.0 + 48.0 * (30.0 - h_kPa))) / 24.0
        rise_Pa = head_Pa * (0.5 + q_m3_h / (2.0 * qc_m3_h))
    assert 0.0 <= rise_Pa - needs[index] <= 1.0 + 1e-6 * needs[index]
    # verified: the balanced file re-solved gives every target, the index
    # valve fully open
    split = steady_flow_split(result.balanced, "direct_return")
    for e in split.emitters:
        assert e.flow_kg_s / e.design_flow_kg_s == pytest.approx(1.0, abs=5e-3)
    index_valve = next(v for v in result.valves if v.emitter == index)
    assert index_valve.kv_m3_h == pytest.approx(0.8, rel=1e-3)
    # the least: 1 % less set head with the same presets starves the index
    # circuit, by about half a percent of flow (flow ~ sqrt(dp) on its loop)
    lower = edited_text(
        result.text,
        [ScenarioEdit(("pump", "setpoint_kPa"), round(0.99 * head_Pa / 1e3, 6))],
    )
    short = steady_flow_split(parse_scenario(lower), "direct_return")
    i = ["a", "b", "c"].index(index)
    fraction = short.emitters[i].flow_kg_s / short.emitters[i].design_flow_kg_s
    assert 0.99 < fraction < split.emitters[i].flow_kg_s / targets[i] - 2e-3


CIRCUIT_VALVES = (
    "\n[valve_types.circuit]\npresets = [1, 2, 3, 4]\n"
    "kv_m3_per_h = [0.3, 0.8, 1.5, 2.5]\n\n"
    '[layout.circuit_valves]\nvalve_type = "circuit"\n'
)


def test_kept_pump_puts_its_surplus_into_the_circuit_valves(houses):
    """Two-storey direct return, a circuit valve on each floor's return.

    With the design flows fixed, every pipe's drop is fixed; each floor's
    radiators are set against their own floor's index (fully open), and each
    floor circuit hangs off the riser in series with the pump. Keeping the
    pump at full speed instead of the lowest speed that serves the index
    raises its rise at the design flow by D; all of D must then fall across
    the circuit valves: each one's drop at design grows by exactly D and no
    radiator preset changes.
    """
    scenario = parse_scenario(houses["two_storey"].text + CIRCUIT_VALVES)
    kept = balance_scheme(scenario, "direct_return", keep_pump=True)
    lowered = balance_scheme(scenario, "direct_return")
    assert kept.pumps[0].setting == kept.pumps[0].scenario_setting == 1.0
    surplus = kept.pumps[0].rise_Pa - lowered.pumps[0].rise_Pa
    assert surplus > 10e3  # a pump well above the need: a real test
    assert [c.name for c in kept.circuits] == ["floor0", "floor1"]
    for k, low in zip(kept.circuits, lowered.circuits, strict=True):
        assert k.limit is None
        # closed-form drops at design: round-off only
        assert k.must_lose_Pa - low.must_lose_Pa == pytest.approx(surplus, rel=1e-9)
        assert k.setting < low.setting
    for k, low in zip(kept.valves, lowered.valves, strict=True):
        assert k.setting == pytest.approx(low.setting, abs=0.01)  # one rounding step
    # verified by re-solving the kept-pump file
    assert abs(kept.worst_deviation_pct) < 5.0
    split = steady_flow_split(kept.balanced, "direct_return")
    for v, e in zip(kept.valves, split.emitters, strict=True):
        assert e.flow_kg_s == pytest.approx(v.verified_kg_s, rel=1e-9)


def test_kept_pump_without_circuit_valves_throttles_the_radiator_valves(houses):
    # the same house with no circuit valve declared: the surplus has nowhere
    # to go but the radiator valves, every one of them set tighter
    kept = balance_scheme(houses["two_storey"], "direct_return", keep_pump=True)
    lowered = balance_scheme(houses["two_storey"], "direct_return")
    for k, low in zip(kept.valves, lowered.valves, strict=True):
        assert k.kv_m3_h < low.kv_m3_h
