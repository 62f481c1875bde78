"""The latest heating start: against the closed form, and on the bundled houses."""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
from scipy.optimize import brentq

from simheat.analysis.start_time import RESOLUTION_S, latest_start, ready_by_time_s
from simheat.dynamics.integrate import WarmUpModel
from simheat.errors import ScenarioError
from simheat.scenario import load_scenario, parse_scenario

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"

# One room heated at a constant rate: the source is held at its 1.2 kW limit (its
# flow setpoint, 90 °C, is far above the water), the radiator has no head and
# gives all its heat to the air (convective fraction 1), and there is almost no
# water to warm (1 mL radiator, 0.05 L source, short 10 mm pipes in the room, so
# their losses reach the air too; 1 cm of feed outside it). The heat loss is
# given as a coefficient so that it does not move with the setpoint. The air and
# structure then follow the two-node network with a constant input from the
# start on. Heavy construction keeps the room above 0 °C through the longest
# trial's cold night (in a light one the radiator's water would reach freezing,
# where a run stops: simheat.dynamics.ranges). Invented for tests.
CONSTANT_HEAT = """
name = "One room, constant heat"
schemes = ["direct_return"]
[design]
outdoor_temp_C = -10.0
supply_temp_C = 90.0
temperature_drop_K = 20.0
[source]
max_power_kW = 1.2
flow_temp_C = 90.0
water_volume_L = 0.05
[pump]
flow_m3_per_h = [0.0, 0.1, 0.2]
head_kPa = [20.0, 17.0, 9.0]
[weather]
outdoor_temp_C = -10.0
[schedule]
off_from = "22:00"
start_clock = "05:00"
[simulation]
duration_h = 2.0
output_step_min = 5.0
rtol = 1e-7
[[rooms]]
id = "room"
floor_area_m2 = 14.0
heat_loss_W_per_K = 43.5
setpoint_C = 16.0
mass_class = "heavy"
[[emitters]]
id = "rad"
room = "room"
nominal_power_kW = 1.5
kv_m3_per_h = 0.5
thermostatic_head = false
convective_fraction = 1.0
water_volume_L = 0.001
metal_mass_kg = 0.001
[route]
header_pipe = "cu_10x1"
branch_pipe = "cu_10x1"
feed_length_m = 0.01
[[route.floors]]
floor = 0
tees = [{ emitter = "rad", header_length_m = 0.5, branch_length_m = 0.1 }]
"""


def _two_node(model):
    """Matrix A and the outdoor-and-gains vector b of ``x' = A x + b + q e_air``."""
    ca, cs = model.room_air_capacity_J_K[0], model.room_structure_capacity_J_K[0]
    hao, hso = model.room_air_loss_W_K[0], model.room_structure_loss_W_K[0]
    has = model.room_air_structure_W_K[0]
    a = np.array([[-(hao + has) / ca, has / ca], [has / cs, -(hso + has) / cs]])
    b = np.array([(hao * -10.0 + model.room_gains_W[0]) / ca, hso * -10.0 / cs])
    return a, b, ca


def _propagate(a, forcing, x0, t):
    """Closed form of ``x' = A x + f`` over ``t``: eigen-decomposition of A."""
    steady = -np.linalg.solve(a, forcing)
    rates, vectors = np.linalg.eig(a)  # two real negative rates (an RC network)
    weights = np.linalg.solve(vectors, x0 - steady)
    return steady + vectors @ (weights * np.exp(rates.real * t))


def test_start_time_follows_the_closed_form_of_a_constant_heat_input():
    scenario = parse_scenario(CONSTANT_HEAT, origin="constant_heat.toml")
    model = WarmUpModel(scenario, "direct_return").model
    a, b, ca = _two_node(model)
    heat = np.array([1200.0 / ca, 0.0])
    evening = -np.linalg.solve(a, b + heat)  # held at the source's limit
    night_s = 7 * 3600.0
    ready_after_s = night_s + 2 * 3600.0  # 07:00
    level = 16.0 - scenario.simulation.reached_tolerance_K

    def air_at_ready(start_after_off_s: float) -> float:
        cooled = _propagate(a, b, evening, start_after_off_s)
        heated = _propagate(a, b + heat, cooled, ready_after_s - start_after_off_s)
        return heated[0] - level

    assert evening[0] > level  # heating all night gets there...
    assert air_at_ready(ready_after_s) < 0.0  # ...no heating does not
    exact = brentq(air_at_ready, 0.0, ready_after_s, xtol=1e-6) - night_s

    found = latest_start(scenario, "direct_return", 7 * 3600.0)
    # The search returns the latest whole minute it simulated as ready, so it
    # lies within one step below the exact start; the little water there is
    # (its heat at 90 °C, about a second of the source's output) and the
    # integration tolerance move the simulated start by far less.
    assert found.can
    assert exact - RESOLUTION_S - 5.0 <= found.latest_start_s <= exact + 5.0
    assert found.late_rooms == ("room",)
    assert found.rooms[0].ready_s <= found.ready_by_s


def test_cannot_when_heating_all_night_falls_short():
    # Setpoint above what 1.2 kW can hold: "cannot", short by the difference
    # between the setpoint and the steady air temperature (closed form).
    scenario = parse_scenario(
        CONSTANT_HEAT.replace("setpoint_C = 16.0", "setpoint_C = 25.0"),
        origin="constant_heat.toml",
    )
    model = WarmUpModel(scenario, "direct_return").model
    a, b, ca = _two_node(model)
    steady_air = -np.linalg.solve(a, b + np.array([1200.0 / ca, 0.0]))[0]
    found = latest_start(scenario, "direct_return", 7 * 3600.0)
    assert not found.can
    assert found.lead_s is None
    assert found.rooms[0].ready_s is None
    # the feed pipes' loss outside the room (a few mm of pipe, less than their
    # conductance times 100 K) is all the closed form leaves out
    outside_W = 100.0 * model.cell_loss_W_K[model.cell_room < 0].sum()
    total_W_K = 43.5
    assert outside_W < 1.0
    assert found.rooms[0].shortfall_K == pytest.approx(
        25.0 - steady_air, abs=outside_W / total_W_K + 1e-4
    )


def test_ready_by_time_lies_within_a_day_after_the_night_starts():
    scenario = parse_scenario(CONSTANT_HEAT, origin="constant_heat.toml")
    # the night starts at 22:00 = -7 h on the run's axis (05:00 is 0)
    assert ready_by_time_s(scenario, 7 * 3600.0) == 2 * 3600.0
    assert ready_by_time_s(scenario, 23 * 3600.0) == -6 * 3600.0
    with pytest.raises(ScenarioError, match="ready_by: must differ from schedule"):
        ready_by_time_s(scenario, 22 * 3600.0)


def test_unknown_rooms_are_refused():
    scenario = parse_scenario(CONSTANT_HEAT, origin="constant_heat.toml")
    with pytest.raises(ScenarioError, match="rooms: unknown room 'attic'"):
        latest_start(scenario, "direct_return", 7 * 3600.0, rooms=["attic"])


@pytest.mark.slow
@pytest.mark.parametrize("house", ["bungalow.toml", "two_storey.toml"])
def test_both_bundled_houses_give_a_start_time_per_scheme(house):
    scenario = load_scenario(SCENARIOS / house)
    for scheme in scenario.schemes:
        found = latest_start(scenario, scheme, 7 * 3600.0)
        assert found.can, scheme
        # a start inside the night, that was simulated and met 07:00, while
        # one step later missed it for at least one room
        assert found.earliest_s <= found.latest_start_s < found.ready_by_s
        assert found.late_rooms
        assert all(
            room.ready_s is not None and room.ready_s <= found.ready_by_s
            for room in found.rooms
        )
        assert math.isfinite(found.lead_s)
