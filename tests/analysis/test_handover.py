"""What the hand-over report states is what the model gives when re-solved."""

from __future__ import annotations

import numpy as np
import pytest

from simheat.analysis.handover import scheme_handover
from simheat.hydraulics.layouts import describe
from simheat.hydraulics.network import LINK_PIPE
from simheat.hydraulics.solver import solve_flows
from simheat.physics.emitter import steady_output_W
from simheat.physics.water import specific_heat_J_kg_K
from simheat.resolve import resolve


@pytest.fixture(scope="module")
def item(bungalow_runs):
    run = bungalow_runs["reverse_return"]
    return scheme_handover(run.scenario, run)


@pytest.fixture(scope="module")
def resolved_flows(item):
    scenario = item.run.scenario
    network = describe(scenario, item.scheme).network
    return network, solve_flows(network, water_temp_C=scenario.design.supply_temp_C)


def test_verified_radiator_flows_are_a_fresh_solve_at_design(item, resolved_flows):
    network, flows = resolved_flows
    for i, link in enumerate(network.emitter_links()):
        # Same network, same solver, same point: equal to solver tolerance.
        assert item.radiators[i].verified_flow_kg_s == pytest.approx(
            float(flows.mass_flow_kg_s[link]), rel=1e-9
        )


def test_loads_of_a_rooms_radiators_add_up_to_the_room_load(item):
    scenario = item.run.scenario
    loads = [room.design_heat_load_W for room in resolve(scenario).rooms]
    per_room = np.zeros(len(scenario.rooms))
    for line, emitter in zip(item.radiators, scenario.emitters, strict=True):
        per_room[emitter.room] += line.load_W
    np.testing.assert_allclose(per_room, loads, rtol=1e-12)


def test_output_is_the_en442_steady_output_at_the_verified_flow(item):
    scenario = item.run.scenario
    cp = float(specific_heat_J_kg_K(resolve(scenario).design_water_temp_C))
    for line, emitter in zip(item.radiators, scenario.emitters, strict=True):
        room = scenario.rooms[emitter.room]
        expected = steady_output_W(
            emitter.nominal_power_W, emitter.exponent, scenario.design.supply_temp_C,
            line.verified_flow_kg_s, room.setpoint_C, cp,
        )  # fmt: skip
        assert line.output_W == pytest.approx(expected, rel=1e-12)
        # Energy balance: the output never exceeds what the water can carry
        # down to room temperature.
        carried = (
            line.verified_flow_kg_s
            * cp
            * (scenario.design.supply_temp_C - room.setpoint_C)
        )
        assert 0.0 < line.output_W < carried


def test_pump_duty_is_the_pressure_rise_across_the_pump(item, resolved_flows):
    network, flows = resolved_flows
    (pump,) = item.pumps
    k = network.link_names.index(pump.name)
    rise_kPa = (
        flows.pressure_Pa[network.to_node[k]] - flows.pressure_Pa[network.from_node[k]]
    ) / 1e3
    assert pump.duty_head_kPa == pytest.approx(rise_kPa, rel=1e-9)
    assert pump.needed_head_kPa > 0.0


def test_pipe_schedule_lists_every_pipe_with_its_fresh_flow(item, resolved_flows):
    network, flows = resolved_flows
    pipes = [
        k for k in range(network.n_links)
        if network.link_kind[k] == LINK_PIPE and network.length_m[k] > 0.0
    ]  # fmt: skip
    assert [p.name for p in item.pipes] == [network.link_names[k] for k in pipes]
    for line, k in zip(item.pipes, pipes, strict=True):
        assert line.verified_flow_kg_s == pytest.approx(
            abs(float(flows.mass_flow_kg_s[k])), rel=1e-9
        )
