"""Validation of the warm-up model against closed forms and physical balances."""

from pathlib import Path

import numpy as np
import pytest
from scipy.integrate import solve_ivp
from scipy.stats import gamma

from simheat.dynamics import _kernels, _records, controls
from simheat.dynamics.integrate import integrate
from simheat.dynamics.model import CELL_EMITTER, CELL_PIPE, WATER_CP_J_KG_K
from simheat.dynamics.simulate import simulate
from simheat.errors import ScenarioError
from simheat.hydraulics.layouts import SCHEMES
from simheat.hydraulics.network import LINK_EMITTER
from simheat.scenario import parse_scenario

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"
BUNGALOW = (SCENARIOS / "bungalow.toml").read_text(encoding="utf-8")


def _step_through_pipe(n_cells, length_m, flow_kg_s, cell_kg, t_end_s):
    """Outlet temperature of a pipe of ``n_cells`` cells after a 0 -> 1 inlet step."""
    chains = _records.CellChains(
        link_start=np.array([0], dtype=np.int64),
        link_count=np.array([n_cells], dtype=np.int64),
        from_node=np.array([0], dtype=np.int64),
        to_node=np.array([1], dtype=np.int64),
    )
    flows = np.array([flow_kg_s])
    capacity = cell_kg * WATER_CP_J_KG_K

    def rhs(t, y):
        dH = np.zeros(n_cells)
        nodes = np.array([1.0, y[-1]])  # inlet held at 1, outlet node = last cell
        _kernels.advect_cells(chains, y, nodes, flows, WATER_CP_J_KG_K, dH)
        return dH / capacity

    return solve_ivp(
        rhs,
        (0.0, t_end_s),
        np.zeros(n_cells),
        method="BDF",
        rtol=1e-9,
        atol=1e-11,
        dense_output=True,
    )


@pytest.mark.parametrize("n_cells", [10, 40])
def test_pipe_delays_a_step_by_its_plug_flow_time(n_cells):
    # Plug flow carries a step through a pipe in L/v. Upwind cells are the
    # tanks-in-series model (Levenspiel, Chemical Reaction Engineering, 3rd ed.,
    # ch. 14): the outlet follows an Erlang (gamma, shape N, scale tau/N) CDF,
    # whose median is tau (1 - 1/(3N) + O(1/N^2)). So the 50 % arrival matches
    # that median closely, and L/v within the dispersion bound 1/(2N).
    length_m, diameter_m, velocity_m_s = 12.0, 0.02, 0.4
    rho = 985.0
    area = np.pi / 4.0 * diameter_m**2
    flow = rho * area * velocity_m_s
    cell_kg = rho * area * length_m / n_cells
    tau = length_m / velocity_m_s
    sol = _step_through_pipe(n_cells, length_m, flow, cell_kg, 3.0 * tau)
    from scipy.optimize import brentq

    t50 = brentq(lambda t: sol.sol(t)[-1] - 0.5, 0.1 * tau, 2.0 * tau, xtol=1e-9)
    assert t50 == pytest.approx(gamma.median(n_cells, scale=tau / n_cells), rel=1e-5)
    assert t50 == pytest.approx(tau, rel=1.0 / (2.0 * n_cells))


@pytest.fixture(scope="module")
def steady_bungalow():
    """The bungalow without heads after ten days: the final full state."""
    text = (
        BUNGALOW.replace("duration_h = 6.0", "duration_h = 240.0")
        .replace("output_step_min = 2.0", "output_step_min = 60.0")
        .replace(
            'valve_type = "trv_body"',
            'valve_type = "trv_body"\nthermostatic_head = false',
        )
    )
    scenario = parse_scenario(text, origin="steady.toml")
    solution = integrate(scenario, "direct_return")
    end = scenario.simulation.duration_s
    return solution, solution.state_at([end])[0], end


def test_steady_state_rooms_lose_what_they_gain(steady_bungalow):
    # First law at steady state (the heat balance behind EN 12831 heat loads):
    # emitter output + pipe heat into rooms + internal gains = heat lost to
    # outdoors from the air and structure nodes. Ten days is over seven times the
    # slowest structure time constant (about 30 h), so storage terms are < 0.1 %.
    solution, y, end = steady_bungalow
    wm = solution.model
    m = wm.model
    s = wm.slices
    cells, air, structure = y[s["cells"]], y[s["air"]], y[s["structure"]]
    outdoor = controls.outdoor_temp_C(wm.scenario, end)
    emitted = wm.evaluate(end, y, solution.segment_at(end))["emitter_W"].sum()
    in_rooms = (m.cell_room >= 0) & (m.cell_kind != CELL_EMITTER)
    pipe_to_rooms = np.sum(
        m.cell_loss_W_K[in_rooms] * (cells[in_rooms] - air[m.cell_room[in_rooms]])
    )
    gains = m.room_gains_W.sum()
    losses = np.sum(m.room_air_loss_W_K * (air - outdoor)) + np.sum(
        m.room_structure_loss_W_K * (structure - outdoor)
    )
    assert emitted + pipe_to_rooms + gains == pytest.approx(losses, rel=0.01)


def test_steady_state_source_supplies_emitters_and_pipes(steady_bungalow):
    # Steady water side: source power = emitter output + pipe losses (first law).
    solution, y, end = steady_bungalow
    ev = solution.model.evaluate(end, y, solution.segment_at(end))
    emitted = ev["emitter_W"].sum()
    rates = ev["dy"][solution.model.slices["energy"]]
    assert rates[0] == pytest.approx(emitted + rates[2], rel=0.01)
    assert rates[1] == pytest.approx(emitted, rel=1e-9)


@pytest.mark.parametrize("scheme", sorted(SCHEMES))
def test_energy_books_close_under_every_scheme(small_house, scheme):
    # DESIGN: source = room gains + pipe losses + change of stored heat, < 0.5 %.
    run = simulate(small_house(), scheme)
    assert run.summary.energy.balance_error_pct < 0.5


@pytest.mark.parametrize(
    ("old", "new", "message"),
    [
        (
            "[simulation]\n",
            "[simulation]\ninitial_water_temp_C = 105.0\n",
            r"simulation\.initial_water_temp_C: must be <= 95, got 105",
        ),
        (
            "[simulation]\n",
            "[simulation]\ninitial_water_temp_C = -2.0\n",
            r"simulation\.initial_water_temp_C: must be >= 0, got -2",
        ),
        (
            "[simulation]\n",
            "[simulation]\ninitial_room_temp_C = 45.0\n",
            r"simulation\.initial_room_temp_C: must be <= 40, got 45",
        ),
        (
            'comfort_from = "05:00"',
            'comfort_from = "04:30"',
            r"schedule\.comfort_from: must not be before start_clock",
        ),
    ],
)
def test_bad_initial_state_and_schedule_are_refused(old, new, message):
    # Issue 5, bad input: initial temperatures outside liquid water (0-100 °C) or
    # outside plausible room temperatures, schedules out of order.
    assert old in BUNGALOW
    with pytest.raises(ScenarioError, match=message):
        parse_scenario(BUNGALOW.replace(old, new), origin="bad.toml")


def test_pipes_in_unheated_space_lose_their_heat_outside_the_rooms(small_house):
    # The same house with its headers in a crawl space: pipe heat no longer counts
    # for the rooms, so the rooms get less and the pipe losses leave the house.
    inside = simulate(small_house())
    outside = simulate(small_house(route="pipes_in_unheated_space = true"))
    wm = integrate(outside.scenario, "direct_return").model
    pipes = wm.model.cell_kind == 0
    emitter_links = wm.network.link_kind[wm.model.cell_link] == LINK_EMITTER
    assert np.all(wm.model.cell_room[pipes & ~emitter_links] == -1)
    assert np.all(wm.model.cell_room[pipes & emitter_links] >= 0)  # branches stay
    assert outside.air_temp_C[-1].mean() < inside.air_temp_C[-1].mean()


def test_rooms_lose_their_whole_heat_loss_coefficient_at_steady_state(bungalow_runs):
    # The air-node share (ventilation, windows) plus the series fabric path through
    # the structure node (ISO 13790:2008 H_tr,ms in series with H_tr,em) must add
    # up to the room's heat loss coefficient, so the design heat load is carried
    # at the design temperatures.
    from simheat.dynamics.model import build_model
    from simheat.resolve import resolve

    run = bungalow_runs["direct_return"]
    m = build_model(run.scenario, run.network)
    series = 1.0 / (1.0 / m.room_air_structure_W_K + 1.0 / m.room_structure_loss_W_K)
    total = m.room_air_loss_W_K + series
    expected = [r.heat_loss_W_K for r in resolve(run.scenario).rooms]
    np.testing.assert_allclose(total, expected, rtol=1e-12)
    shares = m.room_air_loss_W_K / total
    np.testing.assert_allclose(
        shares, [r.air_loss_fraction for r in run.scenario.rooms], rtol=1e-12
    )


def test_pipe_loss_counters_split_into_rooms_and_unheated_space(steady_bungalow):
    # The fourth counter integrates the pipe heat lost to unheated space; the
    # rest of the pipe losses (third counter) warms the rooms the pipes run
    # through. Recomputed here from the state with numpy, independently of the
    # compiled kernel: each pipe cell loses loss_W_K * (T_cell - T_around), with
    # T_around its room's air or the unheated space's temperature.
    solution, y, end = steady_bungalow
    wm = solution.model
    m = wm.model
    s = wm.slices
    cells, air = y[s["cells"]], y[s["air"]]
    pipe = (m.cell_kind == CELL_PIPE) & (m.cell_loss_W_K > 0.0)
    outside = pipe & (m.cell_room < 0)
    inside = pipe & (m.cell_room >= 0)
    unheated_C = wm.scenario.route.unheated_space_temp_C
    to_unheated = np.sum(m.cell_loss_W_K[outside] * (cells[outside] - unheated_C))
    to_rooms = np.sum(
        m.cell_loss_W_K[inside] * (cells[inside] - air[m.cell_room[inside]])
    )
    assert to_unheated > 0.0  # the feed
    assert to_rooms > 0.0  # pipes in rooms
    rates = wm.evaluate(end, y, solution.segment_at(end))["dy"][s["energy"]]
    assert rates[3] == pytest.approx(to_unheated, rel=1e-12)
    assert rates[2] - rates[3] == pytest.approx(to_rooms, rel=1e-12)


@pytest.mark.parametrize("in_unheated_space", [False, True])
def test_books_close_with_the_pipe_losses_split(small_house, in_unheated_space):
    route = "pipes_in_unheated_space = true" if in_unheated_space else ""
    run = simulate(small_house(route=route), "direct_return")
    books = run.summary.energy
    assert books.pipe_to_rooms_J + books.pipe_to_unheated_J == pytest.approx(
        books.pipe_losses_J, rel=1e-12
    )
    residual = (
        books.source_J
        - books.room_gains_J
        - books.pipe_to_rooms_J
        - books.pipe_to_unheated_J
        - books.stored_change_J
    )
    assert abs(residual) < 0.005 * books.source_J  # DESIGN: books close to 0.5 %
    if in_unheated_space:
        # Every distribution pipe is outside the rooms: most pipe heat is lost.
        assert books.pipe_to_unheated_J > books.pipe_to_rooms_J
    else:
        # Only the feed runs through unheated space.
        assert books.pipe_to_unheated_J < books.pipe_to_rooms_J
