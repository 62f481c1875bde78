"""Solver tests of the components: pump modes, affinity laws, stopped pumps, check
valves, a low-loss header, warm starts, and the inputs the solver refuses."""

from __future__ import annotations

import math

import numpy as np
import pytest

from simheat.errors import ConvergenceError, ScenarioError
from simheat.hydraulics import _kernels
from simheat.hydraulics._kernels import newton
from simheat.hydraulics.network import LINK_PUMP
from simheat.hydraulics.packing import link_data
from simheat.hydraulics.solver import FlowSolver, pump_duty_points
from simheat.physics._kernels import (
    PUMP_CONTROL_CORNER_FRACTION,
    PUMP_MODE_CONSTANT_DP,
    PUMP_MODE_PROPORTIONAL_DP,
    water_density_kg_m3,
    water_viscosity_Pa_s,
)

RHO_70_KG_M3 = water_density_kg_m3(70.0)
BRANCH_D_M = 0.016


def _quadratic_coefficient(zeta, d_m=BRANCH_D_M, rho=RHO_70_KG_M3):
    """dp = c m^2 of a zeta-only link (Darcy-Weisbach local loss). [Pa s2/kg2]"""
    area = math.pi * d_m**2 / 4.0
    return 0.5 * zeta / (rho * area * area)


def _pump_loop(nets, zeta, **pump):
    """Pump-only link 0 -> 1 and a zeta-only branch 1 -> 0 (purely quadratic)."""
    link = dict(f=0, t=1, name="pump", kind=LINK_PUMP)
    link["pump"] = (nets.PUMP_A0_PA, 0.0, nets.PUMP_A2_PA_S2_M6)
    link.update(pump)
    return nets.make(
        [link, dict(f=1, t=0, name="branch", d=BRANCH_D_M, zeta=zeta)], n_nodes=2
    )


def _curve_Pa(nets, m_kg_s, speed=1.0):
    q = m_kg_s / RHO_70_KG_M3
    return nets.PUMP_A0_PA * speed**2 + nets.PUMP_A2_PA_S2_M6 * q * q


def _assert_link_equations_hold(net, flows, tol_Pa):
    """Every link law at the returned flows matches the returned pressures.

    Checked with the reference implementation of the link laws (the physics
    kernels part by part), not the solver's own fast path.
    """
    data = link_data(net)
    p = flows.pressure_Pa
    for k in range(net.n_links):
        a0, a1, a2 = net.pump_coeffs[k]
        loss, _ = _kernels.link_loss_general_Pa(
            flows.mass_flow_kg_s[k],
            net.length_m[k],
            net.inner_diameter_m[k],
            net.roughness_m[k],
            net.zeta[k],
            net.kv_m3_h[k],
            flows.valve_opening[k],
            a0,
            a1,
            a2,
            flows.pump_speed[k],
            flows.water_temp_C[k],
            bool(net.check_valve[k]),
            int(net.pump_mode[k]),
            float(net.pump_setpoint_Pa[k]),
            float(data[_kernels.D_CONTROL_FLOW, k]),
        )
        dp = p[net.from_node[k]] - p[net.to_node[k]]
        assert abs(loss - dp) <= tol_Pa, net.link_names[k]


# ----------------------------------------------------------------- affinity


@pytest.mark.parametrize("speed", [0.6, 0.8, 1.2])
def test_duty_point_follows_the_affinity_laws(nets, speed):
    # Affinity laws (Karassik et al., Pump Handbook, 4th ed., sec. 2.1): on a
    # purely quadratic system dp = c Q^2, the duty flow scales with the speed
    # ratio and the head with its square. The zero-flow regularisation
    # (1e-4 m/s against ~1 m/s here) changes dp by < 1e-8; tolerance 1e-6.
    net = _pump_loop(nets, zeta=25.0)
    nominal = FlowSolver(net).solve()
    scaled = FlowSolver(net).solve(pump_speed=np.array([speed, 0.0]))
    nets.assert_mass_balance(net, scaled)
    assert scaled.mass_flow_kg_s[0] == pytest.approx(
        speed * nominal.mass_flow_kg_s[0], rel=1e-6
    )
    [(_, _, head_nominal)] = pump_duty_points(net, nominal)
    [(_, _, head_scaled)] = pump_duty_points(net, scaled)
    assert head_scaled == pytest.approx(speed**2 * head_nominal, rel=1e-6)


def test_stopped_pump_in_series_acts_as_its_a2_resistance(nets):
    # A stopped pump (speed 0) has rise a2 Q|Q| < 0, a resistance |a2| Q^2. With a
    # running pump of the same curve and a zeta branch in one loop:
    #   a0 - |a2| q^2 = |a2| q^2 + c m^2,  q = m / rho   (closed form for m).
    a2 = nets.PUMP_A2_PA_S2_M6
    pump = dict(pump=(nets.PUMP_A0_PA, 0.0, a2), kind=LINK_PUMP)
    net = nets.make(
        [
            dict(f=0, t=1, name="duty_pump", **pump),
            dict(f=1, t=2, name="standby_pump", **pump),
            dict(f=2, t=0, name="branch", d=BRANCH_D_M, zeta=25.0),
        ],
        n_nodes=3,
    )
    flows = FlowSolver(net).solve(pump_speed=np.array([1.0, 0.0, 0.0]))
    nets.assert_mass_balance(net, flows)
    c = _quadratic_coefficient(25.0)
    expected = math.sqrt(nets.PUMP_A0_PA / (c + 2.0 * abs(a2) / RHO_70_KG_M3**2))
    # regularisations (m0 = 1e-5 kg/s, v0 = 1e-4 m/s) against m ~ 0.2: < 1e-8
    assert flows.mass_flow_kg_s[0] == pytest.approx(expected, rel=1e-6)
    rise = flows.pressure_Pa[2] - flows.pressure_Pa[1]
    q = expected / RHO_70_KG_M3
    assert rise == pytest.approx(a2 * q * q, rel=1e-6)  # a pressure drop


# --------------------------------------------------------------- pump modes


@pytest.mark.parametrize("zeta", [15.0, 25.0, 60.0])
def test_constant_dp_pump_holds_its_set_head(nets, zeta):
    setpoint = 15e3
    net = _pump_loop(nets, zeta, mode=PUMP_MODE_CONSTANT_DP, setpoint=setpoint)
    flows = FlowSolver(net).solve()
    nets.assert_mass_balance(net, flows)
    c = _quadratic_coefficient(zeta)
    m = math.sqrt(setpoint / c)  # closed form: c m^2 = set head
    # The max-speed curve stays >= 20 % above the set head at this flow, so the
    # rounded corner (delta = 1e-3 set head) lowers the head by at most
    # delta^2 / (4 * 0.2 set head) = 1.25e-6 of it: flow within 1e-6; tol 2e-6.
    assert _curve_Pa(nets, m) >= 1.2 * setpoint
    assert flows.mass_flow_kg_s[0] == pytest.approx(m, rel=2e-6)
    [(_, _, head_kPa)] = pump_duty_points(net, flows)
    assert head_kPa * 1e3 == pytest.approx(setpoint, rel=3e-6)


@pytest.mark.parametrize("zeta", [25.0, 60.0, 150.0])
def test_proportional_dp_pump_meets_its_control_line(nets, zeta):
    setpoint = 15e3
    net = _pump_loop(nets, zeta, mode=PUMP_MODE_PROPORTIONAL_DP, setpoint=setpoint)
    flows = FlowSolver(net).solve()
    nets.assert_mass_balance(net, flows)
    # Control line from half the set head at zero flow to the set head at the
    # flow Qc where the nominal curve a0 + a2 Qc^2 gives it; in mass flow
    # H(m) = H/2 + g m with g = H / (2 Qc rho). System c m^2 = H(m): the
    # positive root of c m^2 - g m - H/2 = 0 (closed form).
    q_control = math.sqrt((nets.PUMP_A0_PA - setpoint) / -nets.PUMP_A2_PA_S2_M6)
    gain = setpoint / (2.0 * q_control * RHO_70_KG_M3)
    c = _quadratic_coefficient(zeta)
    m = (gain + math.sqrt(gain * gain + 2.0 * c * setpoint)) / (2.0 * c)
    line = 0.5 * setpoint + gain * m
    # corner rounding as above: the curve is >= 20 % of the set head above the
    # line here, so < 1.25e-6 of the head; tolerance 2e-6
    assert _curve_Pa(nets, m) - line >= 0.2 * setpoint
    assert flows.mass_flow_kg_s[0] == pytest.approx(m, rel=2e-6)
    [(_, _, head_kPa)] = pump_duty_points(net, flows)
    assert head_kPa * 1e3 == pytest.approx(line, rel=3e-6)


def test_regulated_pump_that_cannot_reach_its_set_head_runs_on_its_curve(nets):
    # Set head 25 kPa on an open system: the maximum-speed curve meets the
    # system below it, so the pump runs at full speed: c m^2 = a0 + a2 q^2,
    # m = sqrt(a0 / (c - a2 / rho^2)) (closed form, fixed speed).
    zeta = 8.0
    setpoint = 25e3
    net = _pump_loop(nets, zeta, mode=PUMP_MODE_CONSTANT_DP, setpoint=setpoint)
    flows = FlowSolver(net).solve()
    nets.assert_mass_balance(net, flows)
    c = _quadratic_coefficient(zeta)
    m = math.sqrt(nets.PUMP_A0_PA / (c - nets.PUMP_A2_PA_S2_M6 / RHO_70_KG_M3**2))
    assert setpoint - _curve_Pa(nets, m) >= 0.2 * setpoint  # far from the corner
    assert flows.mass_flow_kg_s[0] == pytest.approx(m, rel=2e-6)


def test_control_corner_is_rounded_over_a_thousandth_of_the_set_head():
    # smooth minimum at equal line and curve: (l + c - delta) / 2 with
    # delta = PUMP_CONTROL_CORNER_FRACTION * set head (definition)
    from simheat.physics._kernels import regulated_pump_rise_Pa

    setpoint, a0 = 20e3, 30e3
    a2 = -1e10
    q = math.sqrt((a0 - setpoint) / -a2)  # the curve gives the set head here
    m = q * RHO_70_KG_M3
    rise, _ = regulated_pump_rise_Pa(
        m, a0, 0.0, a2, 1.0, PUMP_MODE_CONSTANT_DP, setpoint, 0.0, 70.0
    )
    # the curve's Q|Q| regularisation shifts it by ~a2 q0^2/2 ~ 5e-8 Pa here
    expected = setpoint - 0.5 * PUMP_CONTROL_CORNER_FRACTION * setpoint
    assert rise == pytest.approx(expected, abs=1e-6)


# -------------------------------------------------------------- check valves


def _check_valve_network(nets, *, check, reverse):
    """Pump 0 -> 1, branch A 1 -> 0, branch B between the same nodes.

    With ``reverse`` the check-valve branch B points 0 -> 1, against the pump,
    so water would go through it backwards.
    """
    branch = dict(L=5.0, d=BRANCH_D_M, eps=nets.COPPER_ROUGHNESS_M, zeta=5.0)
    ends = dict(f=0, t=1) if reverse else dict(f=1, t=0)
    return nets.make(
        [
            nets.pump_link(0, 1),
            dict(f=1, t=0, name="branch_a", **branch),
            dict(name="branch_b", check=check, **ends, **branch),
        ],
        n_nodes=2,
    )


def test_check_valve_blocks_reverse_flow_to_a_small_leak(nets):
    free = FlowSolver(_check_valve_network(nets, check=False, reverse=True)).solve()
    net = _check_valve_network(nets, check=True, reverse=True)
    flows = FlowSolver(net).solve()
    nets.assert_mass_balance(net, flows)
    m_free = free.mass_flow_kg_s[2]
    m_leak = flows.mass_flow_kg_s[2]
    assert m_free < -0.05  # without the valve the branch runs backwards
    # the leak goes backwards too, and is below 1e-4 of the unblocked flow
    assert m_leak < 0.0
    assert abs(m_leak) < 1e-4 * abs(m_free)


def test_check_valve_leaves_forward_flow_unchanged(nets):
    plain = FlowSolver(_check_valve_network(nets, check=False, reverse=False)).solve()
    net = _check_valve_network(nets, check=True, reverse=False)
    flows = FlowSolver(net).solve()
    nets.assert_mass_balance(net, flows)
    # the check valve adds nothing for forward flow (exactly 0 by construction)
    np.testing.assert_allclose(flows.mass_flow_kg_s, plain.mass_flow_kg_s, rtol=1e-9)


# -------------------------------------------------------- low-loss header


def _header_network(nets, valve_a_opening=1.0):
    """A boiler circuit and two pumped circuits joined by a low-loss header.

    Nodes: 0 boiler return (reference), 1 boiler pump outlet, 2 header top,
    3 header bottom; circuit A 2 -> 4 -> 5 -> 3, circuit B 2 -> 6 -> 7 -> 3.
    The header is a short wide pipe (0.3 m of 80 mm bore) between 2 and 3.
    """
    eps = nets.COPPER_ROUGHNESS_M
    pipe = dict(L=6.0, d=0.026, eps=eps, zeta=3.0)
    circuit = dict(L=15.0, d=0.020, eps=eps, zeta=8.0, kv=2.5)
    links = [
        nets.pump_link(0, 1, name="boiler_pump"),
        dict(f=1, t=2, name="boiler_flow", **pipe),
        dict(f=2, t=3, name="header", L=0.3, d=0.080, eps=eps),
        dict(f=3, t=0, name="boiler_return", **pipe),
        nets.pump_link(2, 4, name="pump_a"),
        dict(f=4, t=5, name="circuit_a", **circuit),
        dict(f=5, t=3, name="return_a", **pipe),
        nets.pump_link(2, 6, name="pump_b"),
        dict(f=6, t=7, name="circuit_b", **circuit),
        dict(f=7, t=3, name="return_b", **pipe),
    ]
    net = nets.make(links, n_nodes=8)
    opening = np.ones(net.n_links)
    opening[net.link_names.index("circuit_a")] = valve_a_opening
    return net, opening


def test_pumped_circuits_on_a_low_loss_header_solve_with_mass_balance(nets):
    net, opening = _header_network(nets)
    flows = FlowSolver(net).solve(valve_opening=opening)
    nets.assert_mass_balance(net, flows)
    m = dict(zip(net.link_names, flows.mass_flow_kg_s, strict=True))
    assert min(m["boiler_pump"], m["pump_a"], m["pump_b"]) > 0.05
    # continuity at the header top: boiler flow = circuits + header flow
    assert m["boiler_flow"] == pytest.approx(
        m["pump_a"] + m["pump_b"] + m["header"], rel=1e-12, abs=1e-15
    )
    # the header carries the mismatch between the circuits' and the boiler flow
    assert abs(m["header"]) > 0.01


def test_low_loss_header_decouples_the_circuits(nets):
    # Hydraulic separation: the header's pressure drop (v < 0.1 m/s in 80 mm,
    # a few pascals) is tiny against the circuit pump heads (~20 kPa), so
    # throttling circuit A hardly moves circuit B's flow (common trade
    # description of a low-loss header). Bound: 1e-3 relative.
    net, open_all = _header_network(nets)
    _, throttled = _header_network(nets, valve_a_opening=0.1)
    solver = FlowSolver(net)
    before = solver.solve(valve_opening=open_all)
    after = solver.solve(valve_opening=throttled)
    nets.assert_mass_balance(net, after)
    a, b = net.link_names.index("pump_a"), net.link_names.index("pump_b")
    assert after.mass_flow_kg_s[a] < 0.5 * before.mass_flow_kg_s[a]
    assert after.mass_flow_kg_s[b] == pytest.approx(before.mass_flow_kg_s[b], rel=1e-3)


# ------------------------------------------------------------ warm starts


def test_warm_start_with_pressures_after_a_valve_change_matches_a_cold_solve(nets):
    net = nets.ladder(12, reverse_return=True)
    solver = FlowSolver(net)
    before = solver.solve()
    opening = np.ones(net.n_links)
    opening[net.link_names.index("emitter_6")] = 0.4
    cold = FlowSolver(net).solve(valve_opening=opening)
    warm = solver.solve(
        valve_opening=opening,
        initial_mass_flow_kg_s=before.mass_flow_kg_s,
        initial_pressure_Pa=before.pressure_Pa,
    )
    nets.assert_mass_balance(net, warm)
    np.testing.assert_allclose(warm.mass_flow_kg_s, cold.mass_flow_kg_s, rtol=1e-9)
    # the re-solved valve link leaves Newton a small correction (iteration count,
    # not time): fewer factorizations than the cold solve's six or more
    assert warm.iterations < cold.iterations


def test_warm_start_from_the_last_result_reuses_its_pressures(nets):
    net = nets.ladder(8)
    solver = FlowSolver(net)
    first = solver.solve(water_temp_C=60.0)
    # same operating point from the solver's own last result: already converged
    again = solver.solve(
        water_temp_C=60.0, initial_mass_flow_kg_s=first.mass_flow_kg_s.copy()
    )
    assert again.iterations == 0
    np.testing.assert_array_equal(again.mass_flow_kg_s, first.mass_flow_kg_s)


@pytest.mark.parametrize("opening", [0.0, 0.5, 0.9])
@pytest.mark.parametrize("reverse_return", [False, True])
@pytest.mark.parametrize("n_emitters", [3, 12])
def test_warm_re_solve_after_a_valve_change_matches_a_fresh_cold_solve(
    nets, n_emitters, reverse_return, opening
):
    # The re-solve may end on a chord step with an older factor; it must still
    # meet the link laws to tol_Pa and give the cold solve's flows.
    net = nets.ladder(n_emitters, reverse_return=reverse_return)
    solver = FlowSolver(net)
    before = solver.solve()
    changed = np.ones(net.n_links)
    changed[net.link_names.index(f"emitter_{(n_emitters + 1) // 2}")] = opening
    cold = FlowSolver(net).solve(valve_opening=changed)
    warm = solver.solve(
        valve_opening=changed,
        initial_mass_flow_kg_s=before.mass_flow_kg_s,
        initial_pressure_Pa=before.pressure_Pa,
    )
    nets.assert_mass_balance(net, warm)
    _assert_link_equations_hold(net, warm, tol_Pa=1e-6)
    # both solves meet 1e-6 Pa on link laws of 1e2-1e4 Pa; every flow here is
    # above 1e-4 kg/s, so they agree far below 1e-8 relative
    np.testing.assert_allclose(warm.mass_flow_kg_s, cold.mass_flow_kg_s, rtol=1e-8)
    assert warm.iterations < cold.iterations


def _poor_guess(reference, kind):
    """A warm start far from ``reference`` (a converged Flows): flows, pressures."""
    rng = np.random.default_rng(7)
    m, p = reference.mass_flow_kg_s, reference.pressure_Pa
    if kind == "reversed":
        return -m, p
    if kind == "five_times_no_pressures":
        return 5.0 * m, None
    if kind == "zero_flows_negated_pressures":
        return np.zeros_like(m), -p
    return rng.normal(0.0, 0.1, m.shape), rng.normal(0.0, 1e4, p.shape)


@pytest.mark.parametrize(
    "kind",
    ["reversed", "five_times_no_pressures", "zero_flows_negated_pressures", "random"],
)
def test_warm_start_from_a_poor_guess_converges_to_the_cold_flows(nets, kind):
    net = nets.ladder(12, reverse_return=True)
    cold = FlowSolver(net).solve()
    flows, pressures = _poor_guess(cold, kind)
    warm = FlowSolver(net).solve(
        initial_mass_flow_kg_s=flows, initial_pressure_Pa=pressures
    )
    nets.assert_mass_balance(net, warm)
    _assert_link_equations_hold(net, warm, tol_Pa=1e-6)
    np.testing.assert_allclose(warm.mass_flow_kg_s, cold.mass_flow_kg_s, rtol=1e-8)


@pytest.mark.parametrize(
    "kind",
    ["reversed", "five_times_no_pressures", "zero_flows_negated_pressures", "random"],
)
def test_warm_start_from_a_poor_guess_without_enough_iterations_names_the_part(
    nets, kind
):
    net = nets.ladder(12, reverse_return=True)
    flows, pressures = _poor_guess(FlowSolver(net).solve(), kind)
    with pytest.raises(
        ConvergenceError, match="no convergence in 2 iterations"
    ) as info:
        FlowSolver(net).solve(
            initial_mass_flow_kg_s=flows, initial_pressure_Pa=pressures, max_iter=2
        )
    assert info.value.worst_part in net.link_names + net.node_names
    assert info.value.residual > 1e-6


def test_chord_step_counts_the_error_its_older_factor_leaves():
    # One link at 1 kg/s with slope D = 100 Pa s/kg, and a last step of 1e-7
    # kg/s. As an exact Newton step (weight 1/D) it leaves only its second-order
    # residual |D| dm^2 / (|m| + floor); as a chord step with the weight of an
    # older factor (1/50) it also leaves |D - 50| dm = 5e-6 Pa, above 1e-6 Pa.
    m, dm, slope = np.array([1.0]), np.array([1e-7]), np.array([100.0])
    coef = np.zeros((_kernels.N_COEF_ROWS, 1))
    coef[_kernels.C_MODE] = -1.0  # no pump
    scale = 1.0 + _kernels.STEP_FLOW_FLOOR_KG_S
    second_order = 100.0 * 1e-14 / scale
    final, estimate = newton._step_is_final(
        m, dm, slope, 1.0 / slope, False, coef, 1e-6
    )
    assert final
    assert estimate == pytest.approx(second_order, rel=1e-12)
    final, estimate = newton._step_is_final(
        m, dm, slope, np.array([1.0 / 50.0]), True, coef, 1e-6
    )
    assert not final
    assert estimate == pytest.approx(50.0 * 1e-7 + second_order, rel=1e-12)


@pytest.mark.parametrize("warm", [False, True])
def test_returned_flows_meet_the_link_equations_to_the_tolerance(nets, warm):
    # Whether the solve ended on a tolerance check or on a tiny Newton step, the
    # reference link laws at the returned flows and pressures agree to tol_Pa.
    net = nets.ladder(10, cross_links=[(2, 7)])
    solver = FlowSolver(net)
    flows = solver.solve(water_temp_C=55.0)
    if warm:
        opening = np.ones(net.n_links)
        opening[net.link_names.index("emitter_3")] = 0.3
        flows = solver.solve(
            water_temp_C=55.0,
            valve_opening=opening,
            initial_mass_flow_kg_s=flows.mass_flow_kg_s,
            initial_pressure_Pa=flows.pressure_Pa,
        )
    nets.assert_mass_balance(net, flows)
    _assert_link_equations_hold(net, flows, tol_Pa=1e-6)


# ---------------------------------------------------------------- bad input


def test_link_on_no_closed_loop_is_named(nets):
    # water can go into the stub but never come back: no flow can circulate
    net = nets.make(
        [
            nets.pump_link(0, 1),
            dict(f=1, t=0, L=3.0, d=0.02),
            dict(f=1, t=2, L=2.0, d=0.02, name="stub_to_nowhere"),
        ],
        n_nodes=3,
    )
    with pytest.raises(ScenarioError, match="'stub_to_nowhere' on no closed loop"):
        FlowSolver(net)


def test_pump_whose_curve_does_not_fall_is_named(nets):
    net = nets.make(
        [
            nets.pump_link(0, 1, name="odd_pump", pump=(30e3, 0.0, 2e9)),
            dict(f=1, t=0, L=3.0, d=0.02),
        ],
        n_nodes=2,
    )
    with pytest.raises(
        ScenarioError, match="pump curve of link 'odd_pump' does not fall with flow"
    ):
        FlowSolver(net)


@pytest.mark.parametrize(
    ("extra", "message"),
    [
        (
            dict(mode=PUMP_MODE_CONSTANT_DP, setpoint=45e3),
            "pump_setpoint_Pa of link 'pump' .* shut-off head 30 kPa, got 45 kPa",
        ),
        (dict(mode=PUMP_MODE_PROPORTIONAL_DP, setpoint=0.0), "must lie between 0"),
        (dict(mode=3), "pump_mode of link 'pump' must be one of"),
    ],
)
def test_bad_pump_control_is_named(nets, extra, message):
    net = nets.make(
        [nets.pump_link(0, 1, **extra), dict(f=1, t=0, L=3.0, d=0.02)], n_nodes=2
    )
    with pytest.raises(ScenarioError, match=message):
        FlowSolver(net)


def test_pump_mode_without_a_pump_is_named(nets):
    net = nets.make(
        [nets.pump_link(0, 1), dict(f=1, t=0, L=3.0, d=0.02, name="riser", mode=1)],
        n_nodes=2,
    )
    with pytest.raises(ScenarioError, match="'riser' has pump_mode 'constant_dp'"):
        FlowSolver(net)


@pytest.mark.parametrize(
    ("kwargs", "message"),
    [
        ({"initial_pressure_Pa": np.zeros(2)}, "needs initial_mass_flow_kg_s"),
        (
            {"initial_mass_flow_kg_s": np.ones(2), "initial_pressure_Pa": np.ones(3)},
            "initial_pressure_Pa must be 2 finite node pressures",
        ),
        (
            {"initial_mass_flow_kg_s": np.array([0.1, np.inf])},
            "initial_mass_flow_kg_s must be finite",
        ),
        (
            {
                "initial_mass_flow_kg_s": np.ones(2),
                "initial_pressure_Pa": np.array([0.0, np.nan]),
            },
            "initial_pressure_Pa must be 2 finite node pressures",
        ),
    ],
)
def test_bad_warm_start_is_refused(nets, kwargs, message):
    net = nets.make([nets.pump_link(0, 1), dict(f=1, t=0, L=3.0, d=0.02)], 2)
    with pytest.raises(ScenarioError, match=message):
        FlowSolver(net).solve(**kwargs)


# ------------------------------------------------ the solver's fast link laws


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_prepared_link_laws_match_the_reference_parts(nets, seed):
    """The solver's one-loop evaluation equals the physics kernels part by part.

    Random links (pipes from laminar through the blend to turbulent, local
    losses, valves at random openings, check valves, fixed-speed and regulated
    pumps) at random temperatures and flows of both signs; evaluated twice, so
    the second pass runs from the first pass's Colebrook-White solutions.
    """
    rng = np.random.default_rng(seed)
    n = 60
    links = []
    for i in range(n):
        link = dict(
            f=i % 2,
            t=1 - i % 2,
            L=float(rng.choice([0.0, rng.uniform(0.5, 30.0)])),
            d=float(rng.uniform(0.008, 0.06)),
            eps=float(rng.choice([0.0, 1.5e-6, 4.5e-5])),
            zeta=float(rng.choice([0.0, rng.uniform(0.5, 20.0)])),
            kv=float(rng.choice([0.0, rng.uniform(0.2, 5.0)])),
            check=bool(rng.random() < 0.3),
        )
        if rng.random() < 0.3:
            a0 = rng.uniform(10e3, 60e3)
            link["pump"] = (a0, rng.uniform(-2e6, 0.0), -rng.uniform(1e9, 1e11))
            link["mode"] = int(rng.integers(0, 3))
            link["setpoint"] = rng.uniform(0.3, 0.9) * a0 if link["mode"] else 0.0
        if link["L"] == 0.0 and link["zeta"] == 0.0 and link["kv"] == 0.0:
            link["kv"] = 1.0
        links.append(link)
    net = nets.make(links, n_nodes=2)
    data = link_data(net)
    operating = np.empty((_kernels.N_OP_ROWS, n))
    operating[_kernels.OP_TEMP] = rng.uniform(5.0, 95.0, n)
    operating[_kernels.OP_OPENING] = rng.uniform(0.0, 1.0, n)
    operating[_kernels.OP_SPEED] = rng.choice([0.0, 0.7, 1.0], n)
    coef = np.zeros((_kernels.N_COEF_ROWS, n))
    prepared_for = np.full((_kernels.N_OP_ROWS, n), np.nan)
    memory = _kernels.colebrook_memory(np.zeros((_kernels.N_LINK_ROWS, n)))
    _kernels.prepare_links(data, operating, coef, prepared_for)
    loss, slope = np.zeros(n), np.zeros(n)
    for flows in (rng.uniform(-0.4, 0.4, n), rng.uniform(-0.4, 0.4, n)):
        flows *= rng.choice([1.0, 1e-2, 1e-4], n)  # laminar to turbulent
        assert _kernels.evaluate_links(flows, coef, memory, loss, slope) == -1
        for k in range(n):
            a0, a1, a2 = net.pump_coeffs[k]
            ref_loss, ref_slope = _kernels.link_loss_general_Pa(
                flows[k],
                net.length_m[k],
                net.inner_diameter_m[k],
                net.roughness_m[k],
                net.zeta[k],
                net.kv_m3_h[k],
                operating[_kernels.OP_OPENING, k],
                a0,
                a1,
                a2,
                operating[_kernels.OP_SPEED, k],
                operating[_kernels.OP_TEMP, k],
                bool(net.check_valve[k]),
                int(net.pump_mode[k]),
                float(net.pump_setpoint_Pa[k]),
                float(data[_kernels.D_CONTROL_FLOW, k]),
            )
            # same equations, constants folded differently: round-off only
            # (1e-12 relative; 1e-9 Pa absolute where a loss crosses zero)
            assert loss[k] == pytest.approx(ref_loss, rel=1e-12, abs=1e-9)
            assert slope[k] == pytest.approx(ref_slope, rel=1e-11, abs=1e-9)


def test_swamee_jain_start_from_rest_is_each_pipes_own(nets):
    """From rest, pipes sharing bore, roughness and temperature share a start.

    The approximate evaluation of a linear-theory pass reuses the previous
    pipe's Swamee-Jain value when its Reynolds number and relative roughness
    are the same. Evaluated in one sweep (runs of equal pipes, then a
    different one, then the first kind again) or one link at a time, every
    start must be the same, and equal to the Swamee-Jain formula [P. K.
    Swamee, A. K. Jain, J. Hydraul. Div. ASCE 102(5), 1976, eq. 11] computed
    here from the water viscosity (1e-13 relative: round-off of the folded
    Reynolds number).
    """
    kinds = [(0.0259, 1.5e-6), (0.0259, 1.5e-6), (0.0130, 1.5e-6), (0.0130, 1.5e-6)]
    kinds += [(0.0130, 4.5e-5), (0.0259, 1.5e-6)]
    links = [
        dict(f=i % 2, t=1 - i % 2, L=3.0, d=d, eps=eps)
        for i, (d, eps) in enumerate(kinds)
    ]
    net = nets.make(links, n_nodes=2)
    n = net.n_links
    operating = np.empty((_kernels.N_OP_ROWS, n))
    operating[_kernels.OP_TEMP] = 70.0
    operating[_kernels.OP_OPENING] = 1.0
    operating[_kernels.OP_SPEED] = 1.0
    coef = np.zeros((_kernels.N_COEF_ROWS, n))
    _kernels.prepare_links(
        link_data(net), operating, coef, np.full((_kernels.N_OP_ROWS, n), np.nan)
    )
    flows = np.full(n, 0.05)  # Re about 6e3 and 1.2e4: turbulent
    sweep = _kernels.colebrook_memory(np.zeros((_kernels.N_LINK_ROWS, n)))
    loss, slope = np.zeros(n), np.zeros(n)
    _kernels.evaluate_link_range(flows, coef, sweep, loss, slope, 0, n, False)
    for k in range(n):
        alone = _kernels.colebrook_memory(np.zeros((_kernels.N_LINK_ROWS, n)))
        loss_k, slope_k = np.zeros(n), np.zeros(n)
        _kernels.evaluate_link_range(
            flows, coef, alone, loss_k, slope_k, k, k + 1, False
        )
        assert (loss_k[k], slope_k[k], alone.x[k]) == (loss[k], slope[k], sweep.x[k])
        d, eps = kinds[k]
        reynolds = 4.0 * flows[k] / (math.pi * d * water_viscosity_Pa_s(70.0))
        x_sj = -2.0 * math.log10(eps / (3.7 * d) + 5.74 / reynolds**0.9)
        assert sweep.x[k] == pytest.approx(x_sj, rel=1e-13)
