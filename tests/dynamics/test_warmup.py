"""Physical guarantees of the coupled warm-up simulation."""

from pathlib import Path

import numpy as np
import pytest
from scipy.integrate import solve_ivp
from scipy.linalg import expm

from simheat.dynamics import _kernels, _records
from simheat.dynamics.simulate import simulate
from simheat.report import run_summary_dict
from simheat.scenario import load_scenario, parse_scenario

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"


@pytest.fixture(scope="module")
def two_storey_runs():
    scenario = load_scenario(SCENARIOS / "two_storey.toml")
    return {scheme: simulate(scenario, scheme) for scheme in scenario.schemes}


@pytest.mark.parametrize("scheme", ["direct_return", "reverse_return"])
def test_energy_books_close_on_the_bungalow(bungalow_runs, scheme):
    # source = room gains + pipe losses + change of stored heat, within 0.5 % (DESIGN)
    books = bungalow_runs[scheme].summary.energy
    assert books.source_J > 0.0
    assert books.balance_error_pct < 0.5


@pytest.mark.parametrize("scheme", ["direct_return", "reverse_return"])
def test_energy_books_close_on_the_two_storey_house(two_storey_runs, scheme):
    books = two_storey_runs[scheme].summary.energy
    assert books.balance_error_pct < 0.5


def test_source_never_exceeds_its_power_limit(bungalow_runs):
    run = bungalow_runs["direct_return"]
    limit = run.scenario.source.max_power_W
    # smooth limiter: within its 0.5 % corner width of the limit
    assert run.source_power_W.max() <= limit * 1.005
    assert run.source_power_W.max() > 0.9 * limit  # a cold start runs at the limit


def test_supply_temperature_settles_at_the_setpoint(bungalow_runs):
    run = bungalow_runs["direct_return"]
    setpoint = run.scenario.source.flow_temp_C
    assert run.supply_temp_C[-1] == pytest.approx(setpoint, abs=0.5)


def test_rooms_with_heads_level_off_near_their_setpoints(bungalow_runs):
    # A room that warms to its setpoint stays there: a proportional head (band
    # 2 K centred on the setpoint) is fully open below setpoint - band/2, so a
    # room its radiator has brought to the setpoint does not fall back below the
    # reached tolerance while the flow temperature holds; and it is shut at
    # setpoint + band/2, above which only gains and warmer neighbours (0.5 K
    # allowed) could lift it. After the night (rooms at 6-11 °C at 05:00) the
    # demo's kitchen and hall get there within the 6 h morning.
    run = bungalow_runs["direct_return"]
    scenario = run.scenario
    tolerance_K = scenario.simulation.reached_tolerance_K
    reached = [r for r in run.summary.rooms if r.time_to_setpoint_s is not None]
    assert len(reached) >= 2
    for r, room in enumerate(scenario.rooms):
        reached_s = run.summary.rooms[r].time_to_setpoint_s
        if reached_s is None:
            continue
        since = run.time_s >= scenario.schedule.comfort_start_s + reached_s
        band_K = max(e.band_K for e in scenario.emitters if e.room == r)
        after = run.air_temp_C[since, r]
        assert after.min() >= room.setpoint_C - tolerance_K - 0.01, room.id
        assert after.max() <= room.setpoint_C + 0.5 * band_K + 0.5, room.id


def test_direct_return_feeds_the_first_radiator_more_than_the_last(bungalow_runs):
    # Direct return: the first emitter sees the largest differential pressure.
    # At the start every head is wide open (rooms 15 °C), so valves do not mask it.
    flows = bungalow_runs["direct_return"].emitter_flow_kg_s[0]
    assert flows[0] > 2.0 * flows[-1]


def test_reverse_return_evens_out_first_and_last_radiators(bungalow_runs):
    def imbalance(run):
        flows = run.emitter_flow_kg_s[0]  # all heads open at the cold start
        return abs(np.log(flows[0] / flows[-1]))

    assert imbalance(bungalow_runs["reverse_return"]) < imbalance(
        bungalow_runs["direct_return"]
    )


def _assert_same_times(loose, tight):
    # Converged result: tightening rtol tenfold moves every time < 1 % (DESIGN).
    assert (loose is None) == (tight is None)
    if tight is not None:
        assert loose == pytest.approx(tight, rel=0.01)


@pytest.fixture(scope="module")
def loose_bungalow():
    scenario = load_scenario(SCENARIOS / "bungalow.toml")
    assert scenario.simulation.rtol == 1e-5  # the fixture runs are ten times tighter
    return simulate(scenario, "direct_return", rtol=1e-4)


@pytest.mark.parametrize(
    "field", ["time_to_setpoint_s", "time_to_setpoint_operative_s"]
)
def test_room_times_do_not_depend_on_tolerance_setting(
    bungalow_runs, loose_bungalow, field
):
    tight = bungalow_runs["direct_return"]
    for a, b in zip(loose_bungalow.summary.rooms, tight.summary.rooms, strict=True):
        _assert_same_times(getattr(a, field), getattr(b, field))


def test_hot_water_arrivals_do_not_depend_on_tolerance_setting(
    bungalow_runs, loose_bungalow
):
    tight = bungalow_runs["direct_return"].summary.emitters
    for a, b in zip(loose_bungalow.summary.emitters, tight, strict=True):
        _assert_same_times(a.hot_water_arrival_s, b.hot_water_arrival_s)


def test_operative_times_of_the_two_storey_house_are_converged():
    # The demos' operative temperatures stay below setpoint after their nights;
    # the two-storey house from a warmer given start (rooms 16 °C, water 25 °C)
    # has rooms that get there, so check those.
    text = (SCENARIOS / "two_storey.toml").read_text(encoding="utf-8")
    text = "\n".join(
        line for line in text.splitlines() if not line.startswith("off_from")
    ).replace(
        "[simulation]\n",
        "[simulation]\ninitial_room_temp_C = 16.0\ninitial_water_temp_C = 25.0\n",
    )
    tight = simulate(parse_scenario(text, origin="two_storey.toml"), "direct_return")
    assert any(r.time_to_setpoint_operative_s for r in tight.summary.rooms)
    loose = simulate(tight.scenario, "direct_return", rtol=1e-4)
    for a, b in zip(loose.summary.rooms, tight.summary.rooms, strict=True):
        _assert_same_times(
            a.time_to_setpoint_operative_s, b.time_to_setpoint_operative_s
        )


def _room_rhs(air_loss, structure_loss, coupling, c_air, c_structure, outdoor):
    def rhs(t, y):
        d_air = np.empty(1)
        d_structure = np.empty(1)
        rooms = _records.RoomArrays(
            air_loss_W_K=np.array([air_loss]),
            structure_loss_W_K=np.array([structure_loss]),
            air_structure_W_K=np.array([coupling]),
            air_capacity_J_K=np.array([c_air]),
            structure_capacity_J_K=np.array([c_structure]),
            gains_W=np.zeros(1),
            wall_a=np.zeros(0, np.int64),
            wall_b=np.zeros(0, np.int64),
            wall_W_K=np.zeros(0),
        )
        _kernels.room_balance(
            rooms, y[:1], y[1:], outdoor, np.zeros(1), np.zeros(1), d_air, d_structure
        )
        return np.concatenate([d_air, d_structure])

    return rhs


def test_one_node_room_cools_exponentially():
    # Closed form of a one-node RC room: T(t) = T_out + (T0 - T_out) exp(-t H / C).
    h, c, outdoor, start = 80.0, 2.0e6, -10.0, 20.0
    rhs = _room_rhs(h, 0.0, 0.0, c, 1.0, outdoor)
    t_end = c / h  # one time constant
    sol = solve_ivp(rhs, (0, t_end), [start, 0.0], rtol=1e-10, atol=1e-10)
    exact = outdoor + (start - outdoor) * np.exp(-1.0)
    assert sol.y[0, -1] == pytest.approx(exact, rel=1e-6)


def test_two_node_room_follows_the_matrix_exponential():
    # Exact solution of the linear two-node network:
    # x(t) = x_inf + expm(A t) (x0 - x_inf).
    ha, hs, hc, ca, cs, outdoor = 30.0, 60.0, 150.0, 3.0e5, 4.0e6, -5.0
    a = np.array([[-(ha + hc) / ca, hc / ca], [hc / cs, -(hs + hc) / cs]])
    x0 = np.array([18.0, 16.0])
    x_inf = np.array([outdoor, outdoor])
    t_end = 7200.0
    exact = x_inf + expm(a * t_end) @ (x0 - x_inf)
    sol = solve_ivp(
        _room_rhs(ha, hs, hc, ca, cs, outdoor), (0, t_end), x0, rtol=1e-10, atol=1e-10
    )
    np.testing.assert_allclose(sol.y[:, -1], exact, rtol=1e-7)


def test_too_small_a_source_is_reported_not_refused(small_house):
    # Issue 5, bad input: a source too small to reach a setpoint is not an error;
    # the summary names the rooms that never get there. 300 W against a design load
    # of 1300 W at -5 °C cannot lift two rooms from 16 to 19.5 °C in an hour.
    run = simulate(small_house(power_kW=0.3))
    assert run.summary.rooms_not_reached == ("front", "back")
    data = run_summary_dict(run)
    assert data["rooms_not_reached"] == ["front", "back"]
    assert all(r["time_to_setpoint_min"] is None for r in data["rooms"])
    assert all(r["final_air_temperature_C"] < 19.5 for r in data["rooms"])


def test_compiled_jacobian_matches_scipy_finite_differences():
    # The compiled column-group Jacobian must equal scipy's own sparse finite-difference
    # Jacobian (scipy.integrate._ivp.common.num_jac) of the same RHS on the same
    # pattern, at a state with heads part shut and water part warm. Both are forward
    # differences with the same step rule, but the column groups differ, and the flow
    # split moves slightly with every water temperature (viscosity, outside the
    # pattern), so each difference carries a little of the other columns: compare the
    # entries that matter (above 1e-3 of the largest) to 2 % (measured: worst 1.02 %).
    from scipy.integrate._ivp.common import num_jac
    from scipy.optimize._numdiff import group_columns

    from simheat.dynamics.integrate import WarmUpModel

    scenario = load_scenario(SCENARIOS / "bungalow.toml")
    wm = WarmUpModel(scenario, "direct_return")
    y = wm.initial_state()
    s = wm.slices
    rng = np.random.default_rng(7)
    y[s["cells"]] = 20.0 + 50.0 * rng.random(s["cells"].stop)
    y[s["air"]] = [21.0, 19.5, 18.2, 23.0, 20.1, 19.0, 20.4, 20.9]
    y[s["structure"]] = y[s["air"]] - 1.0
    y[s["sensors"]] = y[s["air"]][wm.model.sensor_room]
    seg = wm.segment(0.0, scenario.simulation.duration_s)
    atol = np.full(len(y), 1e-4)
    wm.prepare_jacobian(atol)
    compiled = wm.jacobian(0.0, y, seg).toarray()

    pattern = wm.jacobian_sparsity()
    groups = group_columns(pattern)
    f = wm.rhs(0.0, y, seg)
    reference, _ = num_jac(
        lambda t, yy: (
            wm.rhs(t, yy, seg)
            if yy.ndim == 1
            else np.column_stack([wm.rhs(t, c, seg) for c in yy.T])
        ),
        0.0,
        y,
        f,
        atol,
        None,
        (pattern, groups),
    )
    reference = reference.toarray()
    rows = np.arange(s["energy"].start)  # energy counters are outside the pattern
    scale = np.abs(reference[rows]).max()
    big = np.abs(reference[rows]) > 1e-3 * scale
    assert big.sum() > 500  # the comparison covers the model's real couplings
    np.testing.assert_allclose(compiled[rows][big], reference[rows][big], rtol=2e-2)
