"""The compiled warm-up right-hand side against an independent numpy reference.

The reference (``numpy_reference``: benchmarks/baseline_dynamics.py) writes the
same equations in numpy and scipy and shares no code with the compiled path: its
own link laws and global-gradient flow solve (scipy.sparse), head law, EN 442
law, node mixing, upwind transport, source control, heat exchange and room
balances. It shares only the inputs: a WarmUpModel's arrays and its schedule
segments. Both flow solves end at round-off (the reference after a Newton step
below 1e-10 of the largest flow), so the two agree to 1e-9 of each block's
largest derivative; a derivative that nearly cancels has no meaningful relative
error, hence the block scale.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from simheat.dynamics import _kernels, _records, model
from simheat.dynamics.integrate import WarmUpModel
from simheat.dynamics.segments import controls_at
from simheat.scenario import load_scenario, parse_scenario

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"
BLOCKS = ("cells", "air", "structure", "sensors", "energy")
# Relative agreement of two round-off-exact evaluations (see the module note). [-]
RTOL = 1e-9


@pytest.fixture(scope="module")
def bungalow():
    return load_scenario(SCENARIOS / "bungalow.toml")


@pytest.fixture(scope="module")
def two_storey():
    return load_scenario(SCENARIOS / "two_storey.toml")


def _state(wm, cells_C, air_C, sensor_offset_K, seed):
    """A physical state: random water and rooms, every head within its band."""
    rng = np.random.default_rng(seed)
    s = wm.slices
    y = wm.initial_state()
    y[s["cells"]] = rng.uniform(*cells_C, wm.model.n_cells)
    y[s["air"]] = rng.uniform(*air_C, wm.model.n_rooms)
    y[s["structure"]] = y[s["air"]] - rng.uniform(0.0, 2.0, wm.model.n_rooms)
    setpoints = np.array([room.setpoint_C for room in wm.scenario.rooms])
    y[s["sensors"]] = (
        setpoints[wm.model.sensor_room]
        + sensor_offset_K
        + rng.uniform(-0.3, 0.3, wm.model.n_sensors)
    )
    y[s["energy"]] = rng.uniform(0.0, 1e7, wm.model.n_energy)
    return y


def _assert_agree(wm, reference, t, y, seg):
    """Derivatives and flow split of the compiled RHS equal the reference's."""
    wm._warm = False  # a cold flow solve, as the reference's first call
    compiled = wm.evaluate(t, y, seg)
    baseline = reference.PurePythonWarmUp(wm)
    expected_flows = baseline.flows(y, seg)
    expected = baseline.rhs(t, y, seg)
    scale = max(np.max(np.abs(expected_flows)), 1e-12)
    np.testing.assert_allclose(
        compiled["flows"], expected_flows, rtol=RTOL, atol=RTOL * scale
    )
    for block in BLOCKS:
        ref = expected[wm.slices[block]]
        np.testing.assert_allclose(
            compiled["dy"][wm.slices[block]],
            ref,
            rtol=RTOL,
            atol=RTOL * max(np.max(np.abs(ref), initial=0.0), 1e-300),
            err_msg=block,
        )
    return compiled


# Mid-morning states: t [s], water cells [°C], air [°C], sensor offset from the
# setpoint [K] (-1 K: heads half open with the 2 K band; +0.6 K: nearly shut).
STATES = [
    (0.0, (15.0, 15.0), (15.0, 15.0), -5.0),
    (600.0, (15.0, 70.0), (15.5, 17.0), -3.0),
    (5400.0, (45.0, 70.0), (18.0, 21.0), -0.7),
    (14400.0, (55.0, 70.0), (19.5, 22.5), 0.6),
]


@pytest.mark.parametrize(
    ("t", "cells_C", "air_C", "sensor_offset_K"),
    STATES,
    ids=[f"t{int(s[0])}" for s in STATES],
)
def test_rhs_and_flow_split_agree_with_heads_partly_closed(
    numpy_reference, bungalow, t, cells_C, air_C, sensor_offset_K
):
    wm = WarmUpModel(bungalow, "direct_return")
    y = _state(wm, cells_C, air_C, sensor_offset_K, seed=int(t) + 1)
    seg = wm.segment(0.0, bungalow.simulation.duration_s)
    _assert_agree(wm, numpy_reference, t, y, seg)


@pytest.mark.parametrize(
    "scheme", ["reverse_return", "split_direct_return", "one_pipe_loop"]
)
def test_rhs_agrees_under_other_schemes(numpy_reference, bungalow, scheme):
    wm = WarmUpModel(bungalow, scheme)
    y = _state(wm, (40.0, 70.0), (17.0, 21.0), -0.8, seed=11)
    seg = wm.segment(0.0, bungalow.simulation.duration_s)
    _assert_agree(wm, numpy_reference, 3000.0, y, seg)


def test_rhs_agrees_with_a_valve_turned_down(numpy_reference, bungalow):
    wm = WarmUpModel(bungalow, "direct_return", valve_events=((0.0, 2, 0.3),))
    seg = wm.segment(0.0, bungalow.simulation.duration_s)
    assert seg.link_opening[wm.network.emitter_links()[2]] == 0.3
    y = _state(wm, (40.0, 70.0), (17.0, 21.0), -0.8, seed=5)
    _assert_agree(wm, numpy_reference, 3000.0, y, seg)


def test_rhs_agrees_with_pipes_in_unheated_space(numpy_reference, small_house):
    # Headers in a crawl space: their cells lose heat to the unheated space's
    # temperature, not to a room.
    scenario = small_house(route="pipes_in_unheated_space = true")
    wm = WarmUpModel(scenario, "direct_return")
    outside = (wm.model.cell_room < 0) & (wm.model.cell_loss_W_K > 0.0)
    assert outside.sum() > 3
    y = _state(wm, (30.0, 60.0), (16.0, 19.0), -1.0, seed=3)
    seg = wm.segment(0.0, scenario.simulation.duration_s)
    compiled = _assert_agree(wm, numpy_reference, 600.0, y, seg)
    assert compiled["dy"][wm.slices["energy"]][2] > 0.0  # pipes lose heat


@pytest.mark.parametrize("stopped", ["pump:floor1", "pump"])
def test_rhs_agrees_with_a_stopped_pump(numpy_reference, two_storey, stopped):
    # One pump of a floor-pump scheme stopped: the flow solves see its curve's
    # resistance behind its check valve; the other pumps keep circulating.
    wm = WarmUpModel(two_storey, "direct_return_floor_pumps")
    seg = wm.segment(0.0, two_storey.simulation.duration_s)
    seg.pump_speed[wm.network.link_names.index(stopped)] = 0.0
    assert seg.circulating
    y = _state(wm, (35.0, 65.0), (17.0, 21.0), -1.2, seed=17)
    _assert_agree(wm, numpy_reference, 5400.0, y, seg)


def test_rhs_agrees_when_nothing_circulates(numpy_reference, bungalow):
    # Every pump stopped and the source off: zero flows, the water only cools.
    wm = WarmUpModel(bungalow, "direct_return")
    seg = wm.segment(0.0, bungalow.simulation.duration_s)
    seg.heating = seg.circulating = False
    seg.pump_speed[:] = 0.0
    y = _state(wm, (40.0, 70.0), (17.0, 21.0), -0.8, seed=23)
    compiled = _assert_agree(wm, numpy_reference, 3000.0, y, seg)
    assert not np.any(compiled["flows"])
    assert compiled["dy"][wm.slices["energy"]][0] == 0.0


def test_compiled_rhs_matches_its_python_function(bungalow):
    # The kernel against its own .py_func (which calls the compiled helpers):
    # the compilation, not the equations (those are checked above).
    wm = WarmUpModel(bungalow, "direct_return")
    y = _state(wm, (40.0, 70.0), (17.0, 21.0), -0.8, seed=29)
    seg = wm.segment(0.0, bungalow.simulation.duration_s)
    controls = controls_at(bungalow, seg, 3000.0, False)
    compiled, python = np.empty_like(y), np.empty_like(y)
    _kernels.warmup_rhs(y, compiled, wm._arrays, controls)
    _kernels.warmup_rhs.py_func(y, python, wm._arrays, controls)
    for block in BLOCKS:
        part = wm.slices[block]
        # same operations, compiled or interpreted: round-off of each block
        np.testing.assert_allclose(
            python[part],
            compiled[part],
            rtol=1e-12,
            atol=1e-12 * np.max(np.abs(compiled[part])),
            err_msg=block,
        )


def test_kernel_cell_kinds_are_the_model_s():
    assert _records.CELL_PIPE == model.CELL_PIPE
    assert _records.CELL_EMITTER == model.CELL_EMITTER


def test_energy_counters_are_the_model_s():
    assert _records.ENERGY_UNHEATED + 1 == model.N_ENERGY
    assert _records.ENERGY_ELECTRIC + 1 == model.N_ENERGY_HEAT_PUMP
    assert (_records.ENERGY_SOURCE, _records.ENERGY_EMITTED) == (0, 1)


# An invented heat pump's table for the bungalow (test data only): rows outdoor
# -15, -7, 2, 7 °C; columns flow 35, 45, 55, 65 °C.
HEAT_PUMP_TABLE = """
[source.heat_pump]
outdoor_temp_C = [-15.0, -7.0, 2.0, 7.0]
flow_temp_C = [35.0, 45.0, 55.0, 65.0]
capacity_kW = [[7.0, 6.6, 6.1, 5.4], [8.6, 8.1, 7.5, 6.8],
               [10.4, 9.8, 9.1, 8.3], [11.6, 10.9, 10.1, 9.2]]
cop = [[2.3, 2.0, 1.7, 1.4], [2.8, 2.4, 2.0, 1.7],
       [3.6, 3.0, 2.5, 2.1], [4.3, 3.5, 2.9, 2.4]]
"""


def heat_pump_bungalow(min_flow_m3_h=0.0, buffer_L=0.0, outdoor_C=-10.0):
    """The bungalow with a heat pump at 55 °C (its boiler's [source] replaced)."""
    text = (SCENARIOS / "bungalow.toml").read_text()
    text = text.replace(
        "max_power_kW = 16.0\nflow_temp_C = 70.0",
        'kind = "heat_pump"\nflow_temp_C = 55.0',
    ).replace(
        "[weather]\noutdoor_temp_C = -10.0", f"[weather]\noutdoor_temp_C = {outdoor_C}"
    )
    limits = f"min_flow_m3_per_h = {min_flow_m3_h}\nbuffer_volume_L = {buffer_L}\n"
    text = text.replace("[pump]", HEAT_PUMP_TABLE + limits + "\n[pump]", 1)
    return parse_scenario(text, origin="heat_pump_bungalow")


@pytest.mark.parametrize(
    ("cells_C", "outdoor_C", "buffer_L"),
    [
        ((15.0, 25.0), -10.0, 0.0),  # cold water: flow below the table, held
        ((38.0, 62.0), -10.0, 0.0),  # inside the table, between its points
        ((45.0, 60.0), -20.0, 40.0),  # colder than the table; a buffer tank
        ((50.0, 70.0), 3.0, 0.0),  # above the table's top flow temperature
    ],
)
def test_rhs_agrees_with_a_heat_pump(numpy_reference, cells_C, outdoor_C, buffer_L):
    scenario = heat_pump_bungalow(buffer_L=buffer_L, outdoor_C=outdoor_C)
    wm = WarmUpModel(scenario, "direct_return")
    assert (wm.model.source_buffer_cell >= 0) == (buffer_L > 0.0)
    y = _state(wm, cells_C, (16.0, 20.0), -2.0, seed=31)
    seg = wm.segment(0.0, scenario.simulation.duration_s)
    compiled = _assert_agree(wm, numpy_reference, 1200.0, y, seg)
    # electricity has the heat's sign (water above the setpoint: the smooth
    # limit's corner leaves a trace of negative power, as for a boiler)
    assert np.sign(compiled["electric_W"]) == np.sign(compiled["source_W"])
    energy = compiled["dy"][wm.slices["energy"]]
    assert energy[_records.ENERGY_ELECTRIC] == compiled["electric_W"]


def test_rhs_agrees_with_a_heat_pump_in_its_minimum_flow_ramp(numpy_reference):
    # The minimum flow set so that the state's flow lies at 90 % of it, the
    # middle of the ramp (share 0.5).
    scenario = heat_pump_bungalow()
    wm = WarmUpModel(scenario, "direct_return")
    y = _state(wm, (40.0, 60.0), (19.0, 21.0), 0.4, seed=37)
    seg = wm.segment(0.0, scenario.simulation.duration_s)
    flow_kg_s = wm.evaluate(1200.0, y, seg)["flows"][wm.source_link]
    full = wm.evaluate(1200.0, y, seg)["source_W"]
    min_flow_m3_h = flow_kg_s / 0.9 / model.WATER_DENSITY_KG_M3 * 3600.0
    ramped = heat_pump_bungalow(min_flow_m3_h=min_flow_m3_h)
    wm = WarmUpModel(ramped, "direct_return")
    compiled = _assert_agree(wm, numpy_reference, 1200.0, y, seg)
    assert compiled["source_W"] == pytest.approx(0.5 * full, rel=1e-6)
