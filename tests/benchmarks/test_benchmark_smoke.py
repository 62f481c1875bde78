"""Smoke test of the benchmark's scipy baseline: it must solve what simheat solves.

No timing here: speed figures come from ``python benchmarks/run.py``.
"""

from __future__ import annotations

import importlib.util
import sys
from pathlib import Path

import numpy as np
import pytest

from simheat.hydraulics import _kernels as hydraulic_kernels
from simheat.hydraulics.solver import FlowSolver

BASELINE_PATH = (
    Path(__file__).resolve().parents[2] / "benchmarks" / "baseline_hydraulics.py"
)
N_EMITTERS = 9
WATER_TEMP_C = 70.0


@pytest.fixture(scope="module")
def bh():
    spec = importlib.util.spec_from_file_location("baseline_hydraulics", BASELINE_PATH)
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module  # dataclasses look their module up there
    spec.loader.exec_module(module)
    return module


@pytest.fixture(scope="module", params=["direct_return", "reverse_return"])
def ladder(request, bh):
    return bh.build_ladder(N_EMITTERS, request.param, water_temp_C=WATER_TEMP_C)


def test_baseline_link_losses_match_the_compiled_kernels(bh, ladder):
    net = ladder.network
    rng = np.random.default_rng(7)
    flow = rng.uniform(-0.3, 0.3, net.n_links)
    loss, slope = bh.LinkLosses(net, np.arange(net.n_links), WATER_TEMP_C)(flow)
    for k in range(net.n_links):
        a0, a1, a2 = net.pump_coeffs[k]
        ref_loss, ref_slope = hydraulic_kernels.link_loss_Pa(
            flow[k],
            net.length_m[k],
            net.inner_diameter_m[k],
            net.roughness_m[k],
            net.zeta[k],
            net.kv_m3_h[k],
            1.0,
            a0,
            a1,
            a2,
            1.0,
            WATER_TEMP_C,
        )
        # same equations in numpy and compiled code: round-off only
        assert loss[k] == pytest.approx(ref_loss, rel=1e-12, abs=1e-9)
        assert slope[k] == pytest.approx(ref_slope, rel=1e-12)


@pytest.mark.parametrize("method", ["hybr", "krylov"])
def test_baseline_flows_agree_with_simheat_solver(bh, ladder, method):
    net = ladder.network
    flows = FlowSolver(net).solve(water_temp_C=WATER_TEMP_C)
    model = bh.LadderBaseline(net, water_temp_C=WATER_TEMP_C)
    start = np.full(model.n_emitters, ladder.design_flow_kg_s)
    result = model.solve(start, method=method)
    assert result.success, result.message
    # both converge far below 1e-6 relative; 1e-6 is the benchmark's agreement target
    np.testing.assert_allclose(result.mass_flow_kg_s, flows.mass_flow_kg_s, rtol=1e-6)


def test_baseline_warm_solve_agrees_after_a_valve_turns_down(bh, ladder):
    net = ladder.network
    solver = FlowSolver(net)
    before = solver.solve(water_temp_C=WATER_TEMP_C)
    opening = np.ones(net.n_links)
    opening[net.emitter_links()[N_EMITTERS // 2]] = 0.5
    after = solver.solve(
        water_temp_C=WATER_TEMP_C,
        valve_opening=opening,
        initial_mass_flow_kg_s=before.mass_flow_kg_s,
    )
    model = bh.LadderBaseline(net, water_temp_C=WATER_TEMP_C)
    start = before.mass_flow_kg_s[net.emitter_links()]
    result = model.solve(start, method="hybr", opening=opening)
    assert result.success, result.message
    np.testing.assert_allclose(result.mass_flow_kg_s, after.mass_flow_kg_s, rtol=1e-6)


# --- the pure-Python warm-up baseline -------------------------------------------
DYNAMICS_BASELINE_PATH = BASELINE_PATH.with_name("baseline_dynamics.py")
DEMO_SCENARIO = Path(__file__).resolve().parents[2] / "scenarios" / "bungalow.toml"
# Mid-morning states: t [s], water cells [°C], air [°C], sensor offset from the
# setpoint [K] (-1 K: heads half open with the default 2 K band; +2 K: shut).
DYNAMICS_STATES = [
    (0.0, (15.0, 15.0), (15.0, 15.0), -5.0),
    (600.0, (15.0, 70.0), (15.5, 17.0), -3.0),
    (5400.0, (45.0, 70.0), (18.0, 21.0), -0.7),
    (14400.0, (55.0, 70.0), (19.5, 22.5), 0.6),
]


@pytest.fixture(scope="module")
def bd(bh):
    spec = importlib.util.spec_from_file_location(
        "baseline_dynamics", DYNAMICS_BASELINE_PATH
    )
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module
    spec.loader.exec_module(module)
    return module


@pytest.fixture(scope="module")
def warmup_model():
    from simheat.dynamics.integrate import WarmUpModel
    from simheat.scenario import load_scenario

    return WarmUpModel(load_scenario(DEMO_SCENARIO), "direct_return")


def _demo_state(wm, cells_C, air_C, sensor_offset_K, seed):
    """A state of the demo: random but physical temperatures, heads in their band."""
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
    y[s["energy"]] = rng.uniform(0.0, 1e7, s["energy"].stop - s["energy"].start)
    return y


@pytest.mark.parametrize(
    ("t", "cells_C", "air_C", "sensor_offset_K"),
    DYNAMICS_STATES,
    ids=[f"t{int(s[0])}" for s in DYNAMICS_STATES],
)
def test_pure_python_rhs_equals_the_compiled_rhs(
    bd, warmup_model, t, cells_C, air_C, sensor_offset_K
):
    wm = warmup_model
    y = _demo_state(wm, cells_C, air_C, sensor_offset_K, seed=int(t) + 1)
    seg = wm.segment(0.0, wm.scenario.simulation.duration_s)
    wm._warm = False  # a cold flow solve, as the baseline's first call
    compiled = wm.rhs(t, y, seg)
    baseline = bd.PurePythonWarmUp(wm).rhs(t, y, seg)
    for block in ("cells", "air", "structure", "sensors", "energy"):
        ref = compiled[wm.slices[block]]
        # Same equations in numpy and compiled code, both flow solves converged to
        # round-off: agreement to 1e-9 of each block's largest derivative (a
        # derivative that nearly cancels has no meaningful relative error).
        np.testing.assert_allclose(
            baseline[wm.slices[block]],
            ref,
            rtol=1e-9,
            atol=1e-9 * np.max(np.abs(ref)),
            err_msg=block,
        )


@pytest.mark.parametrize(
    ("t", "cells_C", "air_C", "sensor_offset_K"),
    DYNAMICS_STATES[1:],
    ids=[f"t{int(s[0])}" for s in DYNAMICS_STATES[1:]],
)
def test_pure_python_flow_split_equals_the_compiled_flow_split(
    bd, warmup_model, t, cells_C, air_C, sensor_offset_K
):
    wm = warmup_model
    y = _demo_state(wm, cells_C, air_C, sensor_offset_K, seed=int(t) + 1)
    seg = wm.segment(0.0, wm.scenario.simulation.duration_s)
    wm._warm = False
    compiled = wm.evaluate(t, y, seg)["flows"]
    baseline = bd.PurePythonWarmUp(wm).flows(y, seg)
    # both Newton solves end at round-off (steps below 1e-10 of the largest flow)
    np.testing.assert_allclose(baseline, compiled, rtol=1e-9, atol=1e-12)
