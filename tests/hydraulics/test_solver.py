"""Tests of the network flow solver (simheat/hydraulics/solver.py, _kernels/)."""

from __future__ import annotations

import math

import fluids.friction
import numpy as np
import pytest
from scipy.optimize import root

from simheat.errors import ConvergenceError, ScenarioError
from simheat.hydraulics import _kernels
from simheat.hydraulics._kernels.starts import LINEAR_START_PASSES
from simheat.hydraulics.solver import FlowSolver, pump_duty_points, solve_flows
from simheat.physics._kernels import (
    LEAKAGE_FRACTION,
    water_density_kg_m3,
    water_viscosity_Pa_s,
)

RHO_70_KG_M3 = water_density_kg_m3(70.0)


def _area_m2(d_m):
    return math.pi * d_m**2 / 4.0


# ---------------------------------------------------------------- flow splits


def test_identical_parallel_branches_split_equally(nets):
    branch = dict(L=8.0, d=0.014, eps=nets.COPPER_ROUGHNESS_M, zeta=3.0, kv=1.2)
    net = nets.make(
        [nets.pump_link(0, 1), dict(f=1, t=0, **branch), dict(f=1, t=0, **branch)],
        n_nodes=2,
    )
    flows = solve_flows(net)
    nets.assert_mass_balance(net, flows)
    m = flows.mass_flow_kg_s
    # symmetry: identical branches between the same two nodes; round-off only
    assert m[1] == pytest.approx(m[2], rel=1e-12)
    assert m[1] > 0.0


@pytest.mark.parametrize(("zeta_1", "zeta_2"), [(10.0, 40.0), (3.0, 3.5), (50.0, 2.0)])
def test_parallel_quadratic_losses_split_as_root_of_resistance_ratio(
    nets, zeta_1, zeta_2
):
    d = 0.016
    net = nets.make(
        [
            nets.pump_link(0, 1),
            dict(f=1, t=0, d=d, zeta=zeta_1),
            dict(f=1, t=0, d=d, zeta=zeta_2),
        ],
        n_nodes=2,
    )
    flows = solve_flows(net)
    nets.assert_mass_balance(net, flows)
    m1, m2 = flows.mass_flow_kg_s[1:]
    v_min = min(m1, m2) / (RHO_70_KG_M3 * _area_m2(d))
    assert v_min > 0.2  # keeps the zero-flow regularisation below 1e-7 (see below)
    # continuity + Darcy-Weisbach with dp = K m^2 on both branches (closed form):
    # equal dp  =>  m1/m2 = sqrt(K2/K1) = sqrt(zeta2/zeta1) at equal diameter.
    # The kernel evaluates v|v| as v*sqrt(v^2 + v0^2), v0 = 1e-4 m/s, a relative
    # change below v0^2/(2 v^2) < 1.3e-7 here; tolerance 1e-6.
    assert m1 / m2 == pytest.approx(math.sqrt(zeta_2 / zeta_1), rel=1e-6)


def test_reverse_return_ladder_is_mirror_symmetric(nets):
    # Reverse return with identical emitters and header segments is symmetric
    # under swapping supply and return and reversing the emitter order, so
    # emitter i and emitter n+1-i carry the same flow (flow laws are odd).
    n = 7
    net = nets.ladder(n, reverse_return=True)
    flows = solve_flows(net)
    nets.assert_mass_balance(net, flows)
    emitter = np.array([net.link_names.index(f"emitter_{i}") for i in range(1, n + 1)])
    m = flows.mass_flow_kg_s[emitter]
    np.testing.assert_allclose(m, m[::-1], rtol=1e-9)  # round-off of the solve
    assert np.ptp(m) > 1e-3 * m.mean()  # and the flows do differ along the ladder


def test_direct_return_ladder_starves_the_far_emitter(nets):
    # Common trade knowledge: in an unbalanced direct-return ladder the emitter
    # nearest the pump gets the most flow and the flow falls along the header.
    net = nets.ladder(6)
    flows = solve_flows(net)
    nets.assert_mass_balance(net, flows)
    emitter = [net.link_names.index(f"emitter_{i}") for i in range(1, 7)]
    assert np.all(np.diff(flows.mass_flow_kg_s[emitter]) < 0.0)


def test_negligible_header_resistance_gives_every_emitter_the_same_dp(nets):
    # Headers of 300 mm bore, 0.5 m per segment, carrying < 0.4 kg/s: v < 6 mm/s,
    # Re < 4000, f < 0.05 (Moody chart, transitional band), so Darcy-Weisbach
    # gives < 1.5e-3 Pa per segment and < 0.02 Pa over all 12 segments, against
    # emitter drops of ~15 kPa: equal dp to ~1e-6 relative (tolerance 1e-5).
    n = 6
    net = nets.ladder(
        n,
        header_length_m=0.5,
        header_diameter_m=0.300,
        emitter_kv=(0.3, 0.6, 1.0, 1.5),
    )
    flows = solve_flows(net)
    nets.assert_mass_balance(net, flows)
    p = flows.pressure_Pa
    names = net.node_names
    dp = np.array(
        [p[names.index(f"s{i}")] - p[names.index(f"r{i}")] for i in range(1, n + 1)]
    )
    assert dp.min() > 1e3
    np.testing.assert_allclose(dp, dp.mean(), rtol=1e-5)
    emitter = [net.link_names.index(f"emitter_{i}") for i in range(1, n + 1)]
    assert np.ptp(flows.mass_flow_kg_s[emitter]) > 0.1 * flows.mass_flow_kg_s[0] / n


def test_looped_network_reproduces_manufactured_quadratic_solution(nets):
    """Two-loop network with dp = K m|m| on every link, built around a chosen answer.

    Method of manufactured solutions: pick node pressures and link flows that
    satisfy continuity, then set each link's zeta so that its Darcy-Weisbach local
    loss dp = zeta rho v^2 / 2 gives exactly the chosen dp at the chosen flow, and
    the pump's shut-off head so its curve passes through the duty point. The
    solution of that network is the chosen one (it is unique for monotone laws).
    """
    rho = RHO_70_KG_M3
    d = 0.020
    area = _area_m2(d)
    # nodes: 0 pump inlet (reference), 1 pump outlet, 2, 3, 4
    pressure = np.array([0.0, 24e3, 15e3, 12e3, 5e3])
    passive = [(1, 2, 0.30), (1, 3, 0.20), (2, 3, 0.10), (2, 4, 0.20), (3, 4, 0.30)]
    passive.append((4, 0, 0.50))  # flows chosen to balance at nodes 2, 3, 4
    links = []
    for f, t, m in passive:
        dp = pressure[f] - pressure[t]
        v = m / (rho * area)
        links.append(dict(f=f, t=t, d=d, zeta=2.0 * dp / (rho * v * v)))
    total = 0.50
    a2 = -1.5e10  # [Pa s2/m6]
    q = total / rho
    a0 = pressure[1] - pressure[0] - a2 * q * q
    net = nets.make([dict(f=0, t=1, pump=(a0, 0.0, a2)), *links], n_nodes=5)
    flows = solve_flows(net)
    nets.assert_mass_balance(net, flows)
    expected = np.array([total] + [m for _, _, m in passive])
    # Regularisation of v|v| (v0 = 1e-4 m/s, v >= 0.3 m/s here): < 6e-8 relative.
    np.testing.assert_allclose(flows.mass_flow_kg_s, expected, rtol=1e-6)
    np.testing.assert_allclose(flows.pressure_Pa, pressure, rtol=1e-6, atol=1e-6)


def test_looped_pipe_network_matches_independent_colebrook_solve(nets):
    """Two loops of real pipes against a scipy root solve using the fluids package.

    The reference evaluates Darcy-Weisbach with the Colebrook-White friction
    factor from ``fluids`` (an independent implementation) and our water
    properties, and solves all link and node equations with MINPACK's hybrid
    method. All pipes are turbulent (checked), where both use exact Colebrook.
    """
    temp = 60.0
    rho, mu = water_density_kg_m3(temp), water_viscosity_Pa_s(temp)
    eps = nets.COPPER_ROUGHNESS_M
    a2 = -2.0e10
    pipes = [
        (1, 2, 12.0, 0.026),
        (1, 3, 20.0, 0.020),
        (2, 3, 6.0, 0.016),
        (2, 4, 15.0, 0.020),
        (3, 4, 8.0, 0.026),
        (4, 0, 10.0, 0.032),
    ]
    links = [dict(f=0, t=1, pump=(40e3, 0.0, a2))]
    links += [dict(f=f, t=t, L=length, d=d, eps=eps) for f, t, length, d in pipes]
    net = nets.make(links, n_nodes=5)
    flows = solve_flows(net, water_temp_C=temp)
    nets.assert_mass_balance(net, flows)

    def pipe_dp(m, length, d):
        v = m / (rho * _area_m2(d))
        re = rho * abs(v) * d / mu
        f = fluids.friction.Colebrook(re, eps / d)
        return f * length / d * rho * v * abs(v) / 2.0

    a_full = net.incidence()

    def residual(x):
        m, p = x[:7], np.concatenate([[0.0], x[7:]])
        q = m[0] / rho
        loss = [-(40e3 + a2 * q * abs(q))]
        loss += [
            pipe_dp(m[k + 1], length, d) for k, (_, _, length, d) in enumerate(pipes)
        ]
        link = np.array(loss) - a_full.T @ p
        return np.concatenate([link / 1e3, (a_full @ m)[1:] * 10.0])

    start = np.concatenate([np.full(7, 0.2), np.full(4, 1e4)])
    start[3] = 0.05
    reference = root(residual, start, method="hybr", options={"xtol": 1e-13})
    assert reference.success
    m_ref = reference.x[:7]
    for k, (_, _, _, d) in enumerate(pipes):
        assert abs(m_ref[k + 1]) * d / (_area_m2(d) * mu) > 4000.0  # Reynolds number
    # Both solve the same equations with exact Colebrook to ~1e-13; tolerance 1e-7.
    np.testing.assert_allclose(flows.mass_flow_kg_s, m_ref, rtol=1e-7)
    np.testing.assert_allclose(flows.pressure_Pa[1:], reference.x[7:], rtol=1e-7)


def test_pump_on_the_rising_part_of_its_curve_meets_the_closed_form_duty_point(nets):
    """Near shut-off (one nearly closed valve) a humped pump curve rises with flow.

    Single loop, pump-only link and valve-only link; the duty point solves
    1.296e9 m^2/(rho Kv^2) = a0 + a1 m/rho + a2 (m/rho)^2 (Kv definition,
    EN 60534-2-1, and the pump curve), a quadratic in m (closed form).
    """
    a0, a1, a2 = 30e3, 4e6, -1e10  # hump: rise grows with flow below 2e-4 m3/s
    kv = 0.05
    net = nets.make([dict(f=0, t=1, pump=(a0, a1, a2)), dict(f=1, t=0, kv=kv)], 2)
    flows = solve_flows(net)
    nets.assert_mass_balance(net, flows)
    rho = RHO_70_KG_M3
    m = flows.mass_flow_kg_s[0]
    _, pump_slope = _kernels.link_loss_Pa(m, *_link_args(net, 0))
    assert pump_slope < 0.0  # the pump link alone has a falling loss: the hard case
    quad = 1.296e9 / (rho * kv * kv) - a2 / rho**2
    expected = (a1 / rho + math.sqrt((a1 / rho) ** 2 + 4.0 * quad * a0)) / (2.0 * quad)
    # zero-flow regularisation (m0 = 1e-5 kg/s against m ~ 8e-3): ~1e-6 relative
    assert m == pytest.approx(expected, rel=1e-5)


def test_flows_do_not_depend_on_the_reference_node(nets):
    net_a = nets.ladder(5)
    kwargs = {f: getattr(net_a, f) for f in net_a.__dataclass_fields__}
    kwargs["reference_node"] = net_a.node_names.index("s3")
    net_b = type(net_a)(**kwargs)
    fa, fb = solve_flows(net_a), solve_flows(net_b)
    nets.assert_mass_balance(net_b, fb)
    # gauge pressure shifts by a constant; flows are physics (round-off only)
    np.testing.assert_allclose(fa.mass_flow_kg_s, fb.mass_flow_kg_s, rtol=1e-9)
    shift = fa.pressure_Pa - fb.pressure_Pa
    np.testing.assert_allclose(shift, shift[0], rtol=1e-9)


# ------------------------------------------------------- warm starts and valves


def test_warm_start_needs_fewer_iterations_than_cold(nets):
    net = nets.ladder(9)
    solver = FlowSolver(net)
    first = solver.solve()
    opening = np.ones(net.n_links)
    opening[net.link_names.index("emitter_4")] = 0.7
    cold = solver.solve(valve_opening=opening)
    warm = solver.solve(
        valve_opening=opening, initial_mass_flow_kg_s=first.mass_flow_kg_s
    )
    nets.assert_mass_balance(net, cold)
    nets.assert_mass_balance(net, warm)
    assert warm.iterations < cold.iterations
    np.testing.assert_allclose(warm.mass_flow_kg_s, cold.mass_flow_kg_s, rtol=1e-8)


def test_closed_valve_passes_only_its_leakage(nets):
    # Valve-only branch (no pipe) so its whole dp is across the valve.
    net = nets.make(
        [
            nets.pump_link(0, 1),
            dict(f=1, t=2, L=5.0, d=0.016, eps=nets.COPPER_ROUGHNESS_M),
            dict(f=2, t=0, kv=1.0, name="closed_valve"),
            dict(f=2, t=0, kv=1.0, name="open_valve"),
        ],
        n_nodes=3,
    )
    opening = np.array([1.0, 1.0, 0.0, 1.0])
    flows = solve_flows(net, valve_opening=opening)
    nets.assert_mass_balance(net, flows)
    m_closed, m_open = flows.mass_flow_kg_s[2:]
    dp_bar = (flows.pressure_Pa[2] - flows.pressure_Pa[0]) / 1e5
    # Kv definition, Q [m3/h] = Kv sqrt(dp [bar] * 1000 / rho) (EN 60534-2-1),
    # with the closed valve's Kv = leakage fraction of the open one.
    q_m3_h = LEAKAGE_FRACTION * 1.0 * math.sqrt(dp_bar * 1000.0 / RHO_70_KG_M3)
    # zero-flow regularisation m0 = 1e-5 kg/s changes this small flow by
    # m0^2/(2 m^2) ~ 3e-4 relative; tolerance 1e-3
    assert m_closed == pytest.approx(q_m3_h * RHO_70_KG_M3 / 3600.0, rel=1e-3)
    assert 0.0 < m_closed < 0.01 * m_open


# -------------------------------------------------- Newton pieces and kernels


def _link_args(net, k, opening=1.0, speed=1.0, temp=70.0):
    a0, a1, a2 = net.pump_coeffs[k]
    return (
        net.length_m[k],
        net.inner_diameter_m[k],
        net.roughness_m[k],
        net.zeta[k],
        net.kv_m3_h[k],
        opening,
        a0,
        a1,
        a2,
        speed,
        temp,
    )


@pytest.mark.parametrize("mass_flow_kg_s", [-0.3, -0.02, 0.0, 0.002, 0.05, 0.4])
def test_link_slope_matches_finite_difference(nets, mass_flow_kg_s):
    # one link with a pipe, local losses, a valve and a pump in series
    link = nets.pump_link(
        0, 1, L=4.0, d=0.014, zeta=2.5, kv=1.5, pump=(2e4, -1e6, -5e9)
    )
    net = nets.make([link, dict(f=1, t=0, L=1.0, d=0.02)], n_nodes=2)
    args = _link_args(net, 0, opening=0.6, temp=55.0)
    _, slope = _kernels.link_loss_Pa(mass_flow_kg_s, *args)
    h = 1e-6 * max(abs(mass_flow_kg_s), 1e-3)
    up, _ = _kernels.link_loss_Pa(mass_flow_kg_s + h, *args)
    down, _ = _kernels.link_loss_Pa(mass_flow_kg_s - h, *args)
    # central difference, truncation O(h^2) and round-off ~1e-16*|F|/h: 1e-6 rel
    assert slope == pytest.approx((up - down) / (2.0 * h), rel=1e-6)


def test_newton_increment_solves_the_linearised_equations(nets):
    """Banded Schur-complement step equals a dense solve of the full Jacobian."""
    net = nets.ladder(5, reverse_return=True, cross_links=[(1, 4)])
    solver = FlowSolver(net)
    arrays = solver.arrays
    n_nodes, n_links = net.n_nodes, net.n_links
    rng = np.random.default_rng(7)
    m = rng.uniform(-0.1, 0.3, n_links)
    p = rng.uniform(-1e4, 3e4, n_nodes)
    p[net.reference_node] = 0.0
    coef = _prepared(solver, net)
    loss, slope = np.zeros(n_links), np.zeros(n_links)
    memory = _kernels.colebrook_memory(np.zeros((_kernels.N_LINK_ROWS, n_links)))
    _kernels.evaluate_links(m, coef, memory, loss, slope)
    assert np.all(slope > 0.0)  # no pump on a rising curve here: exact Newton
    resid = np.zeros(n_links)
    _kernels.link_residuals_Pa(loss, p, net.from_node, net.to_node, resid)
    imb = np.zeros(n_nodes)
    _kernels.node_imbalance_kg_s(m, net.from_node, net.to_node, imb)
    step = _kernels.StepArrays(
        np.zeros(n_links),
        np.zeros(n_links),
        np.zeros(n_nodes),
        np.zeros(n_nodes),
        np.zeros(n_nodes),
    )
    _kernels.newton_weights(slope, 1e-3, True, step.weight)
    arrays_net = _kernels.NetworkArrays(
        arrays.from_node, arrays.to_node, arrays.node_position, arrays.band, arrays.coef
    )
    _kernels.assemble_laplacian(arrays_net, step)
    assert _kernels.band_ldlt(arrays.band, step.row_scale, 1e-14, True)
    _kernels.solve_increment(arrays_net, step, resid, imb)
    dm, dp = step.dm_kg_s, step.dp_Pa
    # Full Newton system on (dm, dp without the reference):
    #   D dm - A^T dp = -r,   A dm = -g   (rows of non-reference nodes)
    keep = np.arange(n_nodes) != net.reference_node
    a = net.incidence()[keep]
    jac = np.block([[np.diag(slope), -a.T], [a, np.zeros((a.shape[0], a.shape[0]))]])
    x = np.linalg.solve(jac, -np.concatenate([resid, imb[keep]]))
    np.testing.assert_allclose(dm, x[:n_links], rtol=1e-8, atol=1e-12)
    np.testing.assert_allclose(dp[keep], x[n_links:], rtol=1e-8, atol=1e-6)
    assert dp[net.reference_node] == 0.0


def _banded(dense, b):
    n = dense.shape[0]
    band = np.zeros((n, b + 1))
    for i in range(n):
        for k in range(min(i, b) + 1):
            band[i, k] = dense[i, i - k]
    return band


def _random_band_matrix(rng, n, b):
    dense = np.zeros((n, n))
    for i in range(n):
        for j in range(max(0, i - b), i):
            dense[i, j] = dense[j, i] = rng.uniform(-1.0, 1.0)
    return dense


@pytest.mark.parametrize("definite", [True, False])
def test_band_ldlt_matches_dense_solve(definite):
    rng = np.random.default_rng(3)
    n, b = 12, 3
    dense = _random_band_matrix(rng, n, b)
    dominance = np.abs(dense).sum(axis=1) + 1.0  # diagonally dominant: nonsingular
    signs = np.ones(n) if definite else np.where(np.arange(n) % 4 == 1, -1.0, 1.0)
    dense += np.diag(signs * dominance)
    band = _banded(dense, b)
    rhs = rng.uniform(-1.0, 1.0, n)
    x = rhs.copy()
    assert _kernels.band_ldlt(band, np.abs(dense).sum(axis=1), 1e-14, definite)
    _kernels.band_solve(band, x)
    # backward-stable factorization of a well-conditioned matrix: ~1e-15
    np.testing.assert_allclose(x, np.linalg.solve(dense, rhs), rtol=1e-12, atol=1e-14)


def test_band_ldlt_reports_a_singular_matrix():
    dense = np.array([[1.0, -1.0], [-1.0, 1.0]])  # Laplacian of a free pair
    assert not _kernels.band_ldlt(_banded(dense, 1), np.full(2, 2.0), 1e-14, False)


def test_band_ldlt_refuses_an_indefinite_matrix_when_positive_is_required():
    dense = np.array([[1.0, 2.0], [2.0, 1.0]])  # eigenvalues 3 and -1
    band = _banded(dense, 1)
    assert not _kernels.band_ldlt(band.copy(), np.full(2, 3.0), 1e-14, True)
    assert _kernels.band_ldlt(band, np.full(2, 3.0), 1e-14, False)


def _operating(net, opening=None, speed=None, temp=None):
    n = net.n_links
    op = np.empty((_kernels.N_OP_ROWS, n))
    op[_kernels.OP_TEMP] = 70.0 if temp is None else temp
    op[_kernels.OP_OPENING] = 1.0 if opening is None else opening
    op[_kernels.OP_SPEED] = 1.0 if speed is None else speed
    return op


def _prepared(solver, net, **operating):
    coef = np.zeros((_kernels.N_COEF_ROWS, net.n_links))
    prepared_for = np.full((_kernels.N_OP_ROWS, net.n_links), np.nan)
    _kernels.prepare_links(
        solver.arrays.data, _operating(net, **operating), coef, prepared_for
    )
    return coef


def _fresh_arrays(net, solver, temp, opening=None):
    """A FlowArrays of the solver's network with fresh workspaces."""
    a = solver.arrays
    arrays = _kernels.new_flow_arrays(
        a.from_node,
        a.to_node,
        a.node_position,
        solver.half_bandwidth,
        a.reference_node,
        a.data,
        a.pump_links,
        a.pump_a0,
    )
    arrays.operating[:] = _operating(net, temp=temp, opening=opening)
    return arrays


def _run_kernel(kernel, net, solver, temp, opening=None, start=None):
    """solve_network on fresh workspaces; ``start`` a previous Flows (warm)."""
    arrays = _fresh_arrays(net, solver, temp, opening)
    if start is None:
        start_code = _kernels.START_COLD
    else:
        arrays.flow_kg_s[:] = start.mass_flow_kg_s
        arrays.pressure_Pa[:] = start.pressure_Pa
        start_code = _kernels.START_FLOWS_PRESSURES
    settings = _kernels.SolveSettings(0.05, 1e-3, 1e-9, 1e-6, 50)
    result = kernel(arrays, settings, start_code)
    return result, arrays.flow_kg_s, arrays.pressure_Pa


def test_kernel_matches_its_python_version(nets):
    net = nets.ladder(4, cross_links=[(1, 3)])
    solver = FlowSolver(net)
    temp = np.linspace(40.0, 80.0, net.n_links)
    compiled, m_c, p_c = _run_kernel(_kernels.solve_network, net, solver, temp)
    python, m_p, p_p = _run_kernel(_kernels.solve_network.py_func, net, solver, temp)
    assert compiled.status == _kernels.STATUS_CONVERGED
    assert compiled[:2] == python[:2]
    np.testing.assert_allclose(m_c, m_p, rtol=1e-12)
    np.testing.assert_allclose(p_c, p_p, rtol=1e-12)


def test_warm_kernel_matches_its_python_version(nets):
    # A re-solve after a valve change: the held-pressure start, Newton steps with
    # swapped workspace rows, and (for this ladder) a chord step as the last one.
    net = nets.ladder(12, reverse_return=True)
    solver = FlowSolver(net)
    before = solver.solve()
    opening = np.ones(net.n_links)
    opening[net.link_names.index("emitter_6")] = 0.9
    compiled, m_c, p_c = _run_kernel(
        _kernels.solve_network, net, solver, 70.0, opening, before
    )
    python, m_p, p_p = _run_kernel(
        _kernels.solve_network.py_func, net, solver, 70.0, opening, before
    )
    assert compiled.status == _kernels.STATUS_CONVERGED
    assert compiled[:2] == python[:2]
    assert compiled.evaluations == python.evaluations
    np.testing.assert_allclose(m_c, m_p, rtol=1e-12)
    np.testing.assert_allclose(p_c, p_p, rtol=1e-12, atol=1e-9)


# ------------------------------------------------------------- results helpers


def test_pump_duty_point_is_the_pressure_rise_across_the_pump(nets):
    # pump-only link (no pipe): its rise equals p_outlet - p_inlet
    pump = dict(
        f=0, t=1, name="pump", pump=(nets.PUMP_A0_PA, 0.0, nets.PUMP_A2_PA_S2_M6)
    )
    net = nets.make(
        [pump, dict(f=1, t=0, L=10.0, d=0.016, zeta=6.0, kv=1.0)], n_nodes=2
    )
    flows = solve_flows(net, water_temp_C=50.0)
    nets.assert_mass_balance(net, flows)
    [(link, flow_m3_h, head_kPa)] = pump_duty_points(net, flows)
    assert link == 0
    rise_Pa = flows.pressure_Pa[1] - flows.pressure_Pa[0]
    assert head_kPa * 1e3 == pytest.approx(
        rise_Pa, rel=1e-9
    )  # solve residual < 1e-6 Pa
    rho = water_density_kg_m3(50.0)
    assert flow_m3_h == pytest.approx(flows.mass_flow_kg_s[0] / rho * 3600.0, rel=1e-12)
    assert flows.volume_flow_m3_h("pump") == pytest.approx(flow_m3_h, rel=1e-12)
    # and the duty point lies on the curve: a0 + a2 Q^2 (Q in m3/s)
    q = flow_m3_h / 3600.0
    curve = nets.PUMP_A0_PA + nets.PUMP_A2_PA_S2_M6 * q * q
    assert head_kPa * 1e3 == pytest.approx(curve, rel=1e-6)  # regularisation < 1e-9


def test_slower_pump_gives_less_flow_by_affinity(nets):
    # Affinity laws on a purely quadratic system (zeta-only branch, pump-only
    # link): every flow scales with the speed ratio (closed form).
    pump = dict(f=0, t=1, pump=(nets.PUMP_A0_PA, 0.0, nets.PUMP_A2_PA_S2_M6))
    net = nets.make([pump, dict(f=1, t=0, d=0.016, zeta=30.0)], n_nodes=2)
    full = solve_flows(net)
    half = solve_flows(net, pump_speed=np.array([0.5, 0.0]))
    nets.assert_mass_balance(net, half)
    assert half.mass_flow_kg_s[0] == pytest.approx(
        0.5 * full.mass_flow_kg_s[0], rel=1e-6
    )


def test_flows_are_read_only(nets):
    flows = solve_flows(nets.ladder(2))
    with pytest.raises(ValueError, match="read-only"):
        flows.mass_flow_kg_s[0] = 1.0


def test_operating_point_of_flows_cannot_be_made_writeable(nets):
    # solves at one operating point share its copy: it must stay read-only
    solver = FlowSolver(nets.ladder(2))
    first, second = solver.solve(), solver.solve()
    for arr in (second.water_temp_C, second.valve_opening, second.pump_speed):
        with pytest.raises(ValueError, match="WRITEABLE"):
            arr.setflags(write=True)
    np.testing.assert_array_equal(first.valve_opening, second.valve_opening)


def test_flows_keep_the_operating_point_of_their_own_solve(nets):
    net = nets.ladder(3)
    solver = FlowSolver(net)
    half = np.ones(net.n_links)
    half[net.link_names.index("emitter_2")] = 0.5
    a = solver.solve(valve_opening=half, water_temp_C=60.0)
    b = solver.solve(water_temp_C=55.0)
    # the dynamics writes the solver's operating rows itself between solves;
    # a solve at the point it wrote must still report that point
    solver.arrays.operating[_kernels.OP_OPENING] = 0.25
    c = solver.solve(water_temp_C=55.0, valve_opening=0.25)
    np.testing.assert_array_equal(a.valve_opening, half)
    np.testing.assert_array_equal(a.water_temp_C, 60.0)
    np.testing.assert_array_equal(b.valve_opening, 1.0)
    np.testing.assert_array_equal(b.water_temp_C, 55.0)
    np.testing.assert_array_equal(c.valve_opening, 0.25)
    fresh = FlowSolver(net).solve(water_temp_C=55.0, valve_opening=0.25)
    np.testing.assert_allclose(c.mass_flow_kg_s, fresh.mass_flow_kg_s, rtol=1e-12)


def test_refused_operating_point_leaves_the_next_solve_unchanged(nets):
    net = nets.ladder(3)
    solver = FlowSolver(net)
    bad = np.ones(net.n_links)
    bad[-1] = 1.5
    with pytest.raises(ScenarioError, match="valve_opening of link"):
        solver.solve(valve_opening=bad, water_temp_C=50.0)
    again = solver.solve(water_temp_C=70.0)
    fresh = FlowSolver(net).solve(water_temp_C=70.0)
    np.testing.assert_array_equal(again.valve_opening, 1.0)
    np.testing.assert_array_equal(again.water_temp_C, 70.0)
    np.testing.assert_allclose(again.mass_flow_kg_s, fresh.mass_flow_kg_s, rtol=1e-12)


# ------------------------------------------------------------------ bad input


def test_disconnected_node_is_named(nets):
    net = nets.make(
        [
            nets.pump_link(0, 1),
            dict(f=1, t=0, L=3.0, d=0.02),
            dict(f=2, t=3, L=1.0, d=0.02),
        ],
        n_nodes=4,
        node_names=["boiler_out", "boiler_in", "attic_tee", "attic_end"],
    )
    with pytest.raises(ScenarioError, match="not connected.*'attic_tee', 'attic_end'"):
        solve_flows(net)


def test_network_without_pump_is_rejected(nets):
    net = nets.make([dict(f=0, t=1, L=3.0, d=0.02), dict(f=1, t=0, L=3.0, d=0.02)], 2)
    with pytest.raises(ScenarioError, match="no running pump"):
        solve_flows(net)


def test_stopped_pump_is_rejected(nets):
    net = nets.make([nets.pump_link(0, 1), dict(f=1, t=0, L=3.0, d=0.02)], 2)
    with pytest.raises(ScenarioError, match=r"no running pump: pump links \['pump'\]"):
        solve_flows(net, pump_speed=np.zeros(2))


def test_pipe_without_diameter_is_named(nets):
    net = nets.make(
        [nets.pump_link(0, 1), dict(f=1, t=0, L=3.0, d=0.0, name="riser_2")], 2
    )
    with pytest.raises(
        ScenarioError, match="inner_diameter_m of link 'riser_2' must be > 0"
    ):
        solve_flows(net)


def test_link_without_resistance_is_named(nets):
    net = nets.make(
        [
            nets.pump_link(0, 1),
            dict(f=1, t=0, L=3.0, d=0.02),
            dict(f=1, t=0, name="bypass_stub"),
        ],
        2,
    )
    with pytest.raises(
        ScenarioError, match="link 'bypass_stub' has no flow resistance"
    ):
        solve_flows(net)


def test_link_joining_a_node_to_itself_is_named(nets):
    net = nets.make(
        [
            nets.pump_link(0, 1),
            dict(f=1, t=0, L=3.0, d=0.02),
            dict(f=1, t=1, L=1.0, d=0.02, name="loop"),
        ],
        2,
    )
    with pytest.raises(
        ScenarioError, match="link 'loop' joins node 'node_1' to itself"
    ):
        solve_flows(net)


@pytest.mark.parametrize(
    ("kwargs", "message"),
    [
        ({"water_temp_C": 120.0}, r"water_temp_C must be in \[0, 100\], got 120.0"),
        (
            {"water_temp_C": np.array([50.0, np.nan])},
            r"water_temp_C of link 'link_1' must be in \[0, 100\], got nan",
        ),
        ({"valve_opening": np.array([1.0, -0.1])}, "valve_opening of link 'link_1'"),
        (
            {"pump_speed": np.array([1.0, -2.0])},
            r"pump_speed of link 'link_1' must be in \[0, inf\], got -2.0",
        ),
        (
            {"pump_speed": np.array([1.0, np.inf])},
            r"pump_speed of link 'link_1' must be in \[0, inf\], got inf",
        ),
        ({"water_temp_C": np.ones(3)}, "one value per link"),
        ({"water_temp_C": None}, r"water_temp_C must be a number .* got None"),
        ({"valve_opening": 1.2}, r"valve_opening must be in \[0, 1\], got 1.2"),
    ],
)
def test_bad_operating_point_is_named(nets, kwargs, message):
    net = nets.make([nets.pump_link(0, 1), dict(f=1, t=0, L=3.0, d=0.02, kv=1.0)], 2)
    with pytest.raises(ScenarioError, match=message):
        solve_flows(net, **kwargs)


def test_unconverged_solve_raises_with_worst_part(nets):
    net = nets.ladder(5)
    # the cold start's linear-theory passes, then one Newton step: not enough
    max_iter = LINEAR_START_PASSES + 1
    with pytest.raises(
        ConvergenceError, match=f"no convergence in {max_iter} iterations"
    ) as info:
        solve_flows(net, max_iter=max_iter)
    err = info.value
    assert err.iterations == max_iter
    assert err.worst_part in net.link_names + net.node_names
    assert err.residual_unit in {"Pa", "kg/s"}
    assert err.residual > (1e-6 if err.residual_unit == "Pa" else 1e-9)
