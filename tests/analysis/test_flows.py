from pathlib import Path

import numpy as np
import pytest

from simheat.analysis.flows import steady_flow_split
from simheat.physics.water import density_kg_m3
from simheat.scenario import load_scenario

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"


@pytest.fixture(scope="module")
def bungalow():
    return load_scenario(SCENARIOS / "bungalow.toml")


@pytest.mark.parametrize("scheme", ["direct_return", "reverse_return"])
def test_emitter_flows_add_up_to_the_pump_flow(bungalow, scheme):
    # Continuity: on one circuit every kilogram through the pump passes one emitter.
    split = steady_flow_split(bungalow, scheme)
    total = sum(e.flow_kg_s for e in split.emitters)
    pump_kg_s = split.pump_flow_m3_h / 3600.0 * density_kg_m3(split.water_temp_C)
    assert total == pytest.approx(pump_kg_s, rel=1e-9)


def test_available_dp_falls_along_a_direct_return_run(bungalow):
    split = steady_flow_split(bungalow, "direct_return")
    dp = np.array([e.dp_available_Pa for e in split.emitters])
    assert np.all(np.diff(dp) < 0.0)


def test_pump_head_exceeds_every_available_dp(bungalow):
    split = steady_flow_split(bungalow, "reverse_return")
    assert split.pump_head_Pa > max(e.dp_available_Pa for e in split.emitters)


def test_colder_water_flows_less_through_the_same_network(bungalow):
    # Viscosity and density rise in cold water (IAPWS): more friction, less flow.
    hot = steady_flow_split(bungalow, "direct_return", water_temp_C=70.0)
    cold = steady_flow_split(bungalow, "direct_return", water_temp_C=15.0)
    assert sum(e.flow_kg_s for e in cold.emitters) < sum(
        e.flow_kg_s for e in hot.emitters
    )


def test_design_flow_carries_the_room_load_at_the_design_drop(bungalow):
    split = steady_flow_split(bungalow, "direct_return")
    by_room = {}
    for e, emitter in zip(split.emitters, bungalow.emitters, strict=True):
        by_room.setdefault(emitter.room, 0.0)
        by_room[emitter.room] += e.design_flow_kg_s
    for r, flow in by_room.items():
        load = bungalow.rooms[r].design_heat_load_W
        # cp of water at 62.5 °C is 4.18-4.19 kJ/(kg K) (IAPWS-95)
        assert flow * 4185.0 * bungalow.design.temperature_drop_K == pytest.approx(
            load, rel=0.002
        )


def test_floor_pumps_report_the_source_pump_and_every_floor_pump(bungalow):
    # Behind a low-loss header the primary pump drives the source; floor pumps listed.
    two_storey = load_scenario(SCENARIOS / "two_storey.toml")
    split = steady_flow_split(two_storey, "direct_return_floor_pumps")
    names = [p[0] for p in split.pumps]
    assert len(names) == 3
    assert (split.pump_flow_m3_h, split.pump_head_Pa) == split.pumps[0][1:]
    # Continuity through the source: the primary flow is what passes the source, not the
    # sum of all pumps.
    assert split.pump_flow_m3_h != pytest.approx(sum(p[1] for p in split.pumps))


def test_one_pipe_design_flows_are_shares_of_the_loop_flow(bungalow):
    # In a one-pipe loop each radiator sees only its share of the loop's design flow,
    # which carries the whole load of the loop (continuity); two-pipe design flows sum
    # to the same total.
    one_pipe = steady_flow_split(bungalow, "one_pipe_loop")
    two_pipe = steady_flow_split(bungalow, "direct_return")
    loop_flow = sum(e.design_flow_kg_s for e in two_pipe.emitters)
    share = 0.35  # default one_pipe_emitter_share (README)
    for e in one_pipe.emitters:
        assert e.design_flow_kg_s == pytest.approx(share * loop_flow, rel=1e-6)
