"""Smoke test of the benchmark's scipy baseline: it must solve what simheat solves.

The pure-numpy warm-up baseline is the dynamics tests' reference
(tests/dynamics/test_reference_rhs.py).

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
