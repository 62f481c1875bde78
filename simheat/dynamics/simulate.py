"""Turn an integration into a :class:`~simheat.runs.run.Run` with its summary."""

from __future__ import annotations

import numpy as np

from simheat.dynamics import controls, floor_control
from simheat.dynamics.integrate import integrate
from simheat.dynamics.model import N_ENERGY_HEAT_PUMP, WATER_DENSITY_KG_M3
from simheat.dynamics.size import check_problem_size
from simheat.hydraulics.layouts import PLANT_PUMP_LINK
from simheat.runs import metrics
from simheat.runs.run import Night, Run, Summary, operative_temp_C
from simheat.scenario.model import Scenario


def simulate(
    scenario: Scenario,
    scheme: str | None = None,
    *,
    method: str = "BDF",
    rtol: float | None = None,
    valve_events=None,
    pump_stop_s: float | None = None,
) -> Run:
    """Simulate the scenario's morning under one piping scheme.

    Parameters
    ----------
    scenario : Scenario
        The house and morning; units on its fields. [-]
    scheme : str, optional
        Piping scheme; the scenario's first scheme when omitted. [-]
    method : str
        Integrator, see :data:`simheat.dynamics.integrate.INTEGRATORS`. [-]
    rtol : float, optional
        Relative tolerance of the integration. [-]
    valve_events : iterable of (time_s, emitter_index, opening), optional
        Manual valve settings: from ``time_s`` [s] on, emitter ``emitter_index``'s
        valve is held at ``opening`` [-] (0 closed .. 1 open), multiplying its
        thermostatic head's opening. Each time starts a new integration segment.
    pump_stop_s : float, optional
        Time every pump stops for good (failure case); overrides the scenario's
        ``pump.stop_at_h``. [s] Single pumps of a ``_floor_pumps`` scheme stop
        at the ``stop_at_h`` of their own scenario tables
        (``[layout.primary_pump]``, ``[[layout.floor_pumps]]``).

    Returns
    -------
    Run
        Time series on the output grid and the summary; ``run.solver`` records
        ``pump_stop_s`` (every pump) and ``pump_stop_times_s`` (stop time of each
        pump that stopped, by pump link name, see :attr:`Run.pump_stop_times_s`),
        and ``floor_pumps``: each floor pump's time running, starts and stops
        (:attr:`Run.floor_pumps`).

    Raises
    ------
    ScenarioError
        On bad valve events, a pump stop outside the run, a stop time for a
        pump the scheme does not have, or a problem too large to simulate
        (:func:`simheat.dynamics.size.check_problem_size`).
    ConvergenceError
        When the integration fails.
    """
    scheme = scenario.schemes[0] if scheme is None else scheme
    check_problem_size(scenario, scheme)  # before anything large is allocated
    solution = integrate(
        scenario,
        scheme,
        method=method,
        rtol=rtol,
        valve_events=valve_events,
        pump_stop_s=pump_stop_s,
    )
    wm = solution.model
    sim = scenario.simulation
    n_steps = int(round(sim.duration_s / sim.output_step_s))
    time_s = np.linspace(0.0, sim.duration_s, n_steps + 1)
    time_s = np.union1d(time_s, [scenario.schedule.comfort_start_s])
    states = solution.state_at(time_s)
    s = wm.slices
    emitter_links = wm.network.emitter_links()
    n_e = len(scenario.emitters)
    flow = np.zeros((len(time_s), n_e))
    output = np.zeros((len(time_s), n_e))
    inlet = np.zeros((len(time_s), n_e))
    supply = np.zeros(len(time_s))
    ret = np.zeros(len(time_s))
    power = np.zeros(len(time_s))
    capacity = np.zeros(len(time_s))
    electric = np.zeros(len(time_s))
    source_flow = np.zeros(len(time_s))
    outdoor = np.zeros(len(time_s))

    def inlets_C(ev: dict) -> np.ndarray:
        flows = ev["flows"][emitter_links]
        upstream = np.where(
            flows >= 0.0,
            wm.network.from_node[emitter_links],
            wm.network.to_node[emitter_links],
        )
        return ev["node_temp"][upstream]

    def evaluate_at(t: float) -> dict:
        return wm.evaluate(t, solution.state_at([t])[0], solution.segment_at(t))

    for i, (t, y) in enumerate(zip(time_s, states, strict=True)):
        seg = solution.segment_at(t)
        ev = wm.evaluate(t, y, seg)
        flow[i] = ev["flows"][emitter_links]
        output[i] = ev["emitter_W"]
        inlet[i] = inlets_C(ev)
        supply[i] = ev["outlet_C"]
        ret[i] = ev["inlet_C"]
        power[i] = ev["source_W"]
        capacity[i] = ev["capacity_W"]
        electric[i] = ev["electric_W"]
        source_flow[i] = ev["flows"][wm.source_link]
        outdoor[i] = controls.outdoor_temp_C(scenario, t)
    air = states[:, s["air"]]
    structure = states[:, s["structure"]]
    cells = states[:, s["cells"]]
    # the books count from the start of the morning, as the times do
    energy = _energy_columns(states[:, s["energy"]] - states[0, s["energy"]])
    stored = cells @ wm.model.cell_capacity_J_K

    def air_at(t: float, room: int) -> float:
        return float(solution.state_at([t])[0, s["air"].start + room])

    def operative_at(t: float, room: int) -> float:
        y = solution.state_at([t])[0]
        return float(
            operative_temp_C(y[s["air"].start + room], y[s["structure"].start + room])
        )

    comfort = time_s >= scenario.schedule.comfort_start_s
    # hot water counts from the water's mean temperature at the start of the
    # morning (the given temperature, or where the night left it)
    level = metrics.hot_water_level_C(
        float(stored[0] / wm.model.cell_capacity_J_K.sum()),
        controls.flow_temp_setpoint_C(scenario, scenario.schedule.comfort_start_s),
        reached_supply_C=metrics.dense_maximum(
            lambda t: float(evaluate_at(t)["outlet_C"]),
            time_s[comfort],
            supply[comfort],
        ),
    )
    arrival = metrics.arrival_times_s(
        scenario,
        time_s,
        inlet,
        lambda t, e: float(inlets_C(evaluate_at(t))[e]),
        level,
    )
    summary = Summary(
        rooms=metrics.room_results(
            scenario,
            time_s,
            air,
            operative_temp_C(air, structure),
            air_at,
            operative_at,
        ),
        emitters=metrics.emitter_results(
            scenario, time_s, flow, output, arrival, wm.emitter_design_flow_kg_s
        ),
        energy=metrics.energy_books(energy, stored),
        peak_source_power_W=metrics.dense_maximum(
            lambda t: float(evaluate_at(t)["source_W"]), time_s, power
        ),
        hot_water_level_C=level,
        source_at_limit=metrics.source_at_limit(
            time_s, power, capacity, scenario.schedule.comfort_start_s
        ),
        source_below_min_flow=_below_min_flow(scenario, time_s, source_flow),
    )
    return Run(
        night=_night(scenario, solution),
        scenario=scenario,
        scheme=scheme,
        network=wm.network,
        time_s=time_s,
        outdoor_temp_C=outdoor,
        air_temp_C=air,
        structure_temp_C=structure,
        emitter_flow_kg_s=flow,
        emitter_output_W=output,
        emitter_inlet_temp_C=inlet,
        supply_temp_C=supply,
        return_temp_C=ret,
        source_power_W=power,
        energy_J=energy,
        stored_heat_J=stored,
        summary=summary,
        source_capacity_W=capacity,
        electric_power_W=electric,
        source_flow_kg_s=source_flow,
        solver={
            "start_s": wm.start_s,
            "method": method,
            "rtol": rtol if rtol is not None else sim.rtol,
            "rhs_calls": solution.n_rhs,
            "jacobian_evaluations": solution.n_jac,
            "flow_solves": wm.n_flow_solves,
            "wall_time_s": solution.wall_time_s,
            "valve_events": [list(e) for e in wm.valve_events],
            "pump_stop_s": wm.pump_stop_s,
            "pump_stop_times_s": {
                wm.network.link_names[link]: time
                for link, time in wm.pump_stop_times_s.items()
            },
            "floor_pumps": {
                wm.network.link_names[link]: floor_control.pump_summary(
                    int(link), solution.segments, sim.duration_s
                )
                for link in wm.network.pump_links()
                if wm.network.link_names[link] != PLANT_PUMP_LINK
            },
        },
    )


def _below_min_flow(
    scenario: Scenario, time_s: np.ndarray, source_flow_kg_s: np.ndarray
) -> float | None:
    """Share of comfort below a heat pump's minimum flow; None when it has none."""
    hp = scenario.source.heat_pump
    if hp is None or hp.min_flow_m3_s <= 0.0:
        return None
    return metrics.below_min_flow(
        time_s,
        source_flow_kg_s,
        hp.min_flow_m3_s * WATER_DENSITY_KG_M3,
        scenario.schedule.comfort_start_s,
    )


def _energy_columns(counters: np.ndarray) -> np.ndarray:
    """The run's energy columns: a boiler's three counters and zero electricity."""
    if counters.shape[1] == N_ENERGY_HEAT_PUMP:
        return counters
    return np.hstack([counters, np.zeros((counters.shape[0], 1))])


def _night(scenario: Scenario, solution) -> Night | None:
    """The night's series on the output grid, or None without a night."""
    schedule = scenario.schedule
    if schedule.off_clock_s is None:
        return None
    wm = solution.model
    step = scenario.simulation.output_step_s
    start = wm.start_s
    n_steps = max(1, int(np.ceil(-start / step - 1e-9)))
    time_s = np.linspace(start, 0.0, n_steps + 1)
    states = solution.state_at(time_s)
    s = wm.slices
    output = np.array(
        [
            wm.evaluate(t, y, solution.segment_at(t))["emitter_W"]
            for t, y in zip(time_s, states, strict=True)
        ]
    )
    return Night(
        off_clock_s=float(schedule.off_clock_s),
        time_s=time_s,
        outdoor_temp_C=np.array([controls.outdoor_temp_C(scenario, t) for t in time_s]),
        air_temp_C=states[:, s["air"]],
        structure_temp_C=states[:, s["structure"]],
        emitter_output_W=output,
        stored_heat_J=states[:, s["cells"]] @ wm.model.cell_capacity_J_K,
    )
