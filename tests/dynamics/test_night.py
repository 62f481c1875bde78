"""The night before the morning: the steady evening and the house cooling down."""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest

from simheat.dynamics.integrate import WarmUpModel, integrate_model
from simheat.dynamics.simulate import simulate
from simheat.scenario import parse_scenario

# One room, one radiator holding almost no water or metal (1 mL, 1 g) on short
# branches; the distribution pipes in unheated space. With the heating off, the
# room is then the two-node RC network alone: the water's heat is too small to
# matter (bounded below). Invented for tests.
ONE_ROOM = """
name = "One room cooling"
schemes = ["direct_return"]
[design]
outdoor_temp_C = -8.0
supply_temp_C = 60.0
temperature_drop_K = 10.0
[source]
max_power_kW = 3.0
flow_temp_C = 60.0
water_volume_L = 0.5
[pump]
flow_m3_per_h = [0.0, 0.3, 0.6]
head_kPa = [20.0, 17.0, 9.0]
[weather]
outdoor_temp_C = -8.0
[schedule]
off_from = "21:30"
start_clock = "05:00"
[simulation]
duration_h = 0.5
output_step_min = 10.0
rtol = 1e-8
[[rooms]]
id = "room"
floor_area_m2 = 14.0
design_heat_load_W = 900
setpoint_C = 20.0
internal_gains_W = 60.0
[[emitters]]
id = "rad"
room = "room"
nominal_power_kW = 1.6
kv_m3_per_h = 0.5
water_volume_L = 0.001
metal_mass_kg = 0.001
[route]
header_pipe = "cu_15x1"
branch_pipe = "cu_10x1"
feed_length_m = 1.0
pipes_in_unheated_space = true
[[route.floors]]
floor = 0
tees = [{ emitter = "rad", header_length_m = 2.0, branch_length_m = 0.01 }]
"""


@pytest.fixture(scope="module")
def one_room_run():
    return simulate(parse_scenario(ONE_ROOM, origin="one_room.toml"))


def _two_node_response(model, air0_C, structure0_C, outdoor_C, time_s):
    """Closed-form air and structure temperatures of one room cooling.

    ``x' = A x + b`` with x = (air, structure): A from the capacities and
    conductances, b from the outdoor temperature and the internal gains. Its
    solution is ``x_ss + sum_i c_i v_i exp(l_i t)`` with the two (real, negative)
    eigenvalues l_i of A, its eigenvectors v_i and c from x(0) - x_ss.
    """
    ca, cs = model.room_air_capacity_J_K[0], model.room_structure_capacity_J_K[0]
    hao, hso = model.room_air_loss_W_K[0], model.room_structure_loss_W_K[0]
    has = model.room_air_structure_W_K[0]
    gains = model.room_gains_W[0]
    a = np.array([[-(hao + has) / ca, has / ca], [has / cs, -(hso + has) / cs]])
    b = np.array([(hao * outdoor_C + gains) / ca, hso * outdoor_C / cs])
    steady = -np.linalg.solve(a, b)
    trace, det = a[0, 0] + a[1, 1], a[0, 0] * a[1, 1] - a[0, 1] * a[1, 0]
    root = math.sqrt(trace * trace / 4.0 - det)
    rates = (trace / 2.0 - root, trace / 2.0 + root)
    vectors = [np.array([a[0, 1], rate - a[0, 0]]) for rate in rates]
    weights = np.linalg.solve(
        np.column_stack(vectors), np.array([air0_C, structure0_C]) - steady
    )
    return steady[:, None] + sum(
        w * v[:, None] * np.exp(rate * time_s)
        for w, v, rate in zip(weights, vectors, rates, strict=True)
    )


def test_a_room_cooling_without_heating_follows_the_two_node_closed_form(
    one_room_run,
):
    run = one_room_run
    night = run.night
    wm = WarmUpModel(run.scenario, run.scheme)
    m = wm.model
    assert night.time_s[0] == pytest.approx(-7.5 * 3600.0)
    since_off = night.time_s - night.time_s[0]
    air, structure = _two_node_response(
        m,
        night.air_temp_C[0, 0],
        night.structure_temp_C[0, 0],
        -8.0,
        since_off,
    )
    # The water and metal left out of the closed form hold at most their
    # capacity times their excess over the room at the start; spread over the
    # room's air and structure that bounds what they can add. Integration at
    # rtol 1e-8 adds far less.
    water = m.cell_capacity_J_K[m.cell_room == 0].sum()
    bound = water * 60.0 / m.room_air_capacity_J_K[0] + 1e-5
    assert bound < 0.02
    np.testing.assert_allclose(night.air_temp_C[:, 0], air, atol=bound)
    np.testing.assert_allclose(night.structure_temp_C[:, 0], structure, atol=bound)
    # the room really cooled: many kelvin, not a rounding error
    assert night.air_temp_C[0, 0] - night.air_temp_C[-1, 0] > 5.0


def test_the_evening_is_a_rest_point_of_the_heated_model(one_room_run):
    # Integrating the heated model from the steady state found for the evening
    # must leave it where it is (first law at rest: heat in = heat lost).
    scenario = one_room_run.scenario
    wm = WarmUpModel(scenario, "direct_return")
    start = wm.start_s
    evening = wm.initial_state()
    solution = integrate_model(
        wm.with_schedule(
            dataclasses.replace(scenario.schedule, comfort_start_s=start - 1.0)
        ),
        start_s=start,
        end_s=start + 7200.0,
        initial_state=evening,
    )
    later = solution.state_at([start + 7200.0])[0]
    s = wm.slices
    np.testing.assert_allclose(later[s["air"]], evening[s["air"]], atol=1e-4)
    np.testing.assert_allclose(
        later[s["structure"]], evening[s["structure"]], atol=1e-4
    )
    np.testing.assert_allclose(later[s["cells"]], evening[s["cells"]], atol=1e-3)
