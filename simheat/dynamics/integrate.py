"""Integrate a cold morning in time: flow split, water cells, radiators and rooms.

The right-hand side re-solves the flow split at every call (warm-started, converged
to round-off so the finite-difference Jacobian is not polluted by solver noise), so
thermostatic heads closing and water warming act on the flows as they happen.
``scipy.integrate.solve_ivp`` with an implicit method and a sparse Jacobian pattern
integrates each schedule segment; dense output gives the setpoint crossings.

:class:`WarmUpModel` holds one scenario and scheme: the thermal model, the flow
solver, and the records (:mod:`simheat.dynamics._records`) the compiled
right-hand side (:mod:`simheat.dynamics._kernels`) works on; its
finite-difference Jacobian and the integrator options on it are the mixin
:class:`~simheat.dynamics.difference.DifferenceJacobian`. Schedule segments and
their controls come from :mod:`simheat.dynamics.segments`, the Jacobian's pattern
and column groups from :mod:`simheat.dynamics.jacobian`, the steady evening before
a night from :mod:`simheat.dynamics.steady`; the result of an integration is a
:class:`~simheat.dynamics.solution.Solution`.
"""

from __future__ import annotations

import copy
import dataclasses
import time as clock

import numpy as np
from scipy.integrate import solve_ivp

from simheat._handle import Handle
from simheat.dynamics import _kernels, _records, controls, floor_control, ranges
from simheat.dynamics.difference import DifferenceJacobian
from simheat.dynamics.model import (
    ThermalModel,
    build_model,
)
from simheat.dynamics.segments import (
    Segment,
    controls_at,
    schedule_segment,
    steady_segment,
)
from simheat.dynamics.solution import Solution
from simheat.dynamics.source import source_params, warn_outside_rating_of_run
from simheat.dynamics.steady import steady_state
from simheat.errors import ConvergenceError, ScenarioError
from simheat.hydraulics.layouts import describe
from simheat.hydraulics.solver import FlowSolver
from simheat.physics.valve import thermostatic_opening
from simheat.scenario.model import Scenario

__all__ = [
    "INTEGRATORS",
    "Segment",
    "Solution",
    "WarmUpModel",
    "integrate",
    "integrate_model",
    "tolerances",
]

INTEGRATORS = ("BDF", "Radau", "LSODA")
FLOW_TOL_KG_S = 1e-12
FLOW_TOL_PA = 1e-7
FLOW_MAX_ITER = 50


class WarmUpModel(DifferenceJacobian):
    """The right-hand side of the warm-up ODE for one scenario and scheme.

    Parameters
    ----------
    scenario : Scenario
        The house and morning; units on its fields. [-]
    scheme : str
        Piping scheme name (one of :data:`simheat.schemes.SCHEME_NAMES`). [-]
    valve_events : sequence of (time_s, emitter_index, opening)
        Checked manual valve settings (:func:`controls.check_valve_events`).
        [s, -, -]
    pump_stop_s : float or None
        Time every pump stops for good (checked,
        :func:`controls.pump_stop_time_s`). [s] Single pumps stop at the times
        the scenario gives them (:func:`controls.pump_stop_times_s`).
    """

    def __init__(
        self,
        scenario: Scenario,
        scheme: str,
        valve_events: tuple = (),
        pump_stop_s: float | None = None,
    ) -> None:
        self.scenario = scenario
        self.valve_events = tuple(valve_events)
        self.pump_stop_s = pump_stop_s
        built = describe(scenario, scheme)
        self.network = built.network
        self.emitter_design_flow_kg_s = built.emitter_design_flow_kg_s
        self.model: ThermalModel = build_model(scenario, self.network)
        self.flow_solver = FlowSolver(self.network)
        self.pump_stop_times_s = controls.pump_stop_times_s(
            scenario, self.network, pump_stop_s
        )
        self.slices = self.model.slices()
        self.last_flows = None
        self.n_flow_solves = 0
        m = self.model
        self.source_link = int(self.network.source_links()[0])
        self.source_capacity_J_K = float(m.cell_capacity_J_K[m.source_cells].sum())
        self._arrays = _records.WarmUpArrays(
            model=self._thermal_arrays(),
            flow=self.flow_solver.arrays,
            flow_settings=self.flow_solver.solve_settings(
                FLOW_TOL_KG_S, FLOW_TOL_PA, FLOW_MAX_ITER
            ),
            work=_records.rhs_work(
                m.n_cells,
                m.n_rooms,
                self.network.n_nodes,
                len(scenario.emitters),
                self.network.n_links,
            ),
        )
        self._handle = Handle(self._arrays)
        self._warm = False  # the solver's arrays hold a converged flow split
        self._jac = None

    def _thermal_arrays(self) -> _records.ThermalArrays:
        """The thermal model as the compiled right-hand side's records, once."""
        m = self.model
        net = self.network
        ints = np.ascontiguousarray
        return _records.ThermalArrays(
            chains=_records.CellChains(
                ints(m.link_cell_start, dtype=np.int64),
                ints(m.link_cell_count, dtype=np.int64),
                ints(net.from_node, dtype=np.int64),
                ints(net.to_node, dtype=np.int64),
            ),
            cells=_records.CellArrays(
                ints(m.cell_kind, dtype=np.int64),
                ints(m.cell_room, dtype=np.int64),
                m.cell_loss_W_K,
                m.cell_nominal_W,
                m.cell_exponent,
                m.cell_convective,
                m.cell_capacity_J_K,
            ),
            radiators=self._radiator_arrays(),
            rooms=_records.RoomArrays(
                m.room_air_loss_W_K,
                m.room_structure_loss_W_K,
                m.room_air_structure_W_K,
                m.room_air_capacity_J_K,
                m.room_structure_capacity_J_K,
                m.room_gains_W,
                ints(m.wall_a, dtype=np.int64),
                ints(m.wall_b, dtype=np.int64),
                np.asarray(m.wall_W_K, dtype=np.float64),
            ),
            sensors=_records.SensorArrays(
                ints(m.sensor_link, dtype=np.int64),
                ints(m.sensor_room, dtype=np.int64),
                m.sensor_band_K,
                m.sensor_time_constant_s,
            ),
            source=source_params(self.scenario, m, self.source_link),
            unheated_C=float(self.scenario.route.unheated_space_temp_C),
            solver_link=self.flow_solver.part.link_index,
        )

    def _radiator_arrays(self) -> _records.RadiatorArrays:
        """Every radiator's link, cells and rating, in emitter order."""
        m = self.model
        links = self.network.emitter_links()
        emitters = self.scenario.emitters
        # An emitter link's cells: a pipe half-cell, the radiator's cells, a
        # pipe half-cell (dynamics.model.build_model).
        return _records.RadiatorArrays(
            link=np.ascontiguousarray(links, dtype=np.int64),
            first_cell=np.ascontiguousarray(
                m.link_cell_start[links] + 1, dtype=np.int64
            ),
            cells=np.ascontiguousarray(m.link_cell_count[links] - 2, dtype=np.int64),
            nominal_W=np.array([e.nominal_power_W for e in emitters], dtype=np.float64),
            exponent=np.array([e.exponent for e in emitters], dtype=np.float64),
        )

    def _compiled(self, t: float, y: np.ndarray, seg: Segment, dy: np.ndarray):
        """Run the compiled right-hand side into ``dy``; handle flow-solve failure."""
        y = np.ascontiguousarray(y)
        report = self._arrays.work.report
        for attempt in range(2):
            _kernels.warmup_rhs_entry(
                y, dy, self._handle, controls_at(self.scenario, seg, t, self._warm)
            )
            if seg.circulating:
                self.n_flow_solves += 1
            if report[_records.REPORT_FLOW_STATUS] == 0:
                self._warm = seg.circulating
                return
            # The warm start failed: solve cold with the checked Python path, which
            # raises ConvergenceError naming the worst part if that fails too.
            self._warm = False
            if attempt == 0:
                self.last_flows = None
                self.flows(y, seg)
                self._warm = True
        raise ConvergenceError(  # pragma: no cover - the Python solve raised first
            f"flow solve failed at t = {t:.0f} s", iterations=FLOW_MAX_ITER
        )

    @property
    def start_s(self) -> float:
        """Start of the run: the night's start (negative), or 0 without one. [s]."""
        return -self.scenario.schedule.night_s

    def given_state(self) -> np.ndarray:
        """The scenario's given initial state: each room's air and structure, water.

        Sensors start at their room's air; energy counters at 0. Only for a
        scenario that gives its initial state (no night).
        """
        scenario = self.scenario
        m = self.model
        s = self.slices
        y = np.zeros(m.n_states)
        air = np.array([room.initial_air_temp_C for room in scenario.rooms], float)
        y[s["cells"]] = scenario.simulation.initial_water_temp_C
        y[s["air"]] = air
        y[s["structure"]] = [room.initial_structure_temp_C for room in scenario.rooms]
        y[s["sensors"]] = air[m.sensor_room]
        return y

    def initial_state(self, atol: np.ndarray | None = None) -> np.ndarray:
        """State at :attr:`start_s`: the steady evening, or the given state.

        Parameters
        ----------
        atol : ndarray, optional
            Absolute tolerances of the states, for the steady-state solve's
            Jacobian (prepared here when it is not yet); 1e-4 K and 1 J by
            default. [K, J]
        """
        if self.scenario.schedule.off_clock_s is None:
            return self.given_state()
        if self._jac is None:
            if atol is None:
                atol = np.full(self.model.n_states, 1e-4)
                atol[self.slices["energy"]] = 1.0
            self.prepare_jacobian(atol)
        return steady_state(self, self.start_s, self._jac_atol)

    def steady_segment(self, time_s: float) -> Segment:
        """Settings of the evening: heating on at the comfort setpoints.

        Parameters
        ----------
        time_s : float
            Time the settings are for. [s]

        Returns
        -------
        Segment
            The settings (:func:`~simheat.dynamics.segments.steady_segment`).
        """
        return steady_segment(
            self.scenario, self.network, self.model.sensor_emitter, time_s
        )

    def with_schedule(self, schedule) -> WarmUpModel:
        """A copy of the model under another schedule, sharing its compiled records.

        For runs of the same house one after another (the start-time search):
        the network, cells and Jacobian do not depend on the schedule.

        Parameters
        ----------
        schedule : Schedule
            The schedule to run under. [-]
        """
        other = copy.copy(self)
        other.scenario = dataclasses.replace(self.scenario, schedule=schedule)
        return other

    def segment(self, start_s: float, end_s: float) -> Segment:
        """Schedule settings valid from ``start_s`` to ``end_s``.

        Parameters
        ----------
        start_s, end_s : float
            The segment's time span from the start of the run (no control
            switches inside it). [s]

        Returns
        -------
        Segment
            The settings (:func:`~simheat.dynamics.segments.schedule_segment`).
        """
        return schedule_segment(
            self.scenario,
            self.network,
            self.model.sensor_emitter,
            self.valve_events,
            self.pump_stop_times_s,
            start_s,
            end_s,
        )

    def flows(self, y: np.ndarray, seg: Segment) -> np.ndarray:
        """Link mass flows for state ``y`` by the checked Python path [kg/s].

        :meth:`FlowSolver.solve` at the link temperatures and head openings of
        ``y``, warm from the last result of this path; zero when no pump runs.
        The compiled right-hand side falls back on it when a warm-started solve
        fails, so that a failure raises :class:`ConvergenceError` with details.

        Parameters
        ----------
        y : ndarray, shape (n_states,)
            State: cell, air, structure and sensor temperatures [°C], energy
            counters [J].
        seg : Segment
            The schedule segment: pump speeds, manual openings, head
            setpoints. [-]
        """
        net = self.network
        if not seg.circulating:
            return np.zeros(net.n_links)
        m = self.model
        cells = y[self.slices["cells"]]
        link_temp = np.add.reduceat(cells, m.link_cell_start) / m.link_cell_count
        # Trial states of the implicit integrator may stray a little outside the
        # liquid range the property fits cover; properties are held at the bounds.
        np.clip(link_temp, 0.0, 100.0, out=link_temp)
        opening = seg.link_opening.copy()
        opening[m.sensor_link] *= thermostatic_opening(
            y[self.slices["sensors"]], seg.setpoints_C, m.sensor_band_K
        )
        flows = self.flow_solver.solve(
            water_temp_C=link_temp,
            valve_opening=opening,
            pump_speed=seg.pump_speed,
            initial_mass_flow_kg_s=self.last_flows,
            tol_kg_s=FLOW_TOL_KG_S,
            tol_Pa=FLOW_TOL_PA,
            max_iter=FLOW_MAX_ITER,
        )
        self.n_flow_solves += 1
        self.last_flows = flows.mass_flow_kg_s.copy()
        return flows.mass_flow_kg_s

    def evaluate(self, t: float, y: np.ndarray, seg: Segment) -> dict:
        """Derivatives and the heat flows behind them at time ``t`` (compiled).

        Parameters
        ----------
        t : float
            Time from the start of the run. [s]
        y : ndarray, shape (n_states,)
            State: cell, air, structure and sensor temperatures [°C], energy
            counters [J].
        seg : Segment
            The schedule segment ``t`` lies in. [-]

        Returns
        -------
        dict
            ``dy`` (the time derivative [K/s, W]), ``flows`` (link mass flows
            [kg/s]), ``node_temp`` (mixed node temperatures [°C]), ``source_W``
            (source power [W]), ``inlet_C`` and ``outlet_C`` (source return and
            supply temperatures [°C]).
        """
        dy = np.empty(len(y))
        self._compiled(t, y, seg, dy)
        work = self._arrays.work
        report = work.report
        return {
            "dy": dy,
            "flows": work.link_flow_kg_s.copy(),
            "node_temp": work.node_temp_C.copy(),
            "source_W": float(report[_records.REPORT_SOURCE_W]),
            "inlet_C": float(report[_records.REPORT_INLET_C]),
            "outlet_C": float(report[_records.REPORT_OUTLET_C]),
            "capacity_W": float(report[_records.REPORT_CAPACITY_W]),
            "electric_W": float(report[_records.REPORT_ELECTRIC_W]),
            "emitter_W": work.emitter_W.copy(),
        }

    def rhs(self, t: float, y: np.ndarray, seg: Segment) -> np.ndarray:
        """Time derivative of the state (compiled, see :func:`_kernels.warmup_rhs`).

        Parameters
        ----------
        t : float
            Time from the start of the run. [s]
        y : ndarray, shape (n_states,)
            State: cell, air, structure and sensor temperatures [°C], energy
            counters [J].
        seg : Segment
            The schedule segment ``t`` lies in. [-]

        Returns
        -------
        ndarray, shape (n_states,)
            Time derivative of ``y``. [K/s, W]
        """
        dy = np.empty(len(y))
        self._compiled(t, y, seg, dy)
        return dy


def integrate(
    scenario: Scenario,
    scheme: str,
    *,
    method: str = "BDF",
    rtol: float | None = None,
    valve_events=None,
    pump_stop_s: float | None = None,
) -> Solution:
    """Integrate the warm-up ODE over the whole run, segment by segment.

    Parameters
    ----------
    scenario : Scenario
        The house and morning; units on its fields. [-]
    scheme : str
        Piping scheme name (one of :data:`simheat.schemes.SCHEME_NAMES`). [-]
    method : str
        One of :data:`INTEGRATORS` (implicit or stiff-switching methods). [-]
    rtol : float, optional
        Relative tolerance; defaults to ``scenario.simulation.rtol``. [-]
    valve_events : iterable of (time_s, emitter_index, opening), optional
        Manual valve settings applied from their times on, see
        :func:`simheat.dynamics.controls.check_valve_events`. [s, -, -]
    pump_stop_s : float, optional
        Time every pump stops for good; overrides the scenario's
        ``pump.stop_at_h``. [s] Single pumps (the primary pump, a floor pump)
        stop at the scenario's ``stop_at_h`` of their own tables.

    Returns
    -------
    Solution
        Dense output and statistics.

    Raises
    ------
    ConvergenceError
        When the integrator fails.
    ModelRangeError
        When water or a room leaves the range the model holds
        (:mod:`simheat.dynamics.ranges`); the run stops there.
    ScenarioError
        On an unknown method, bad valve events, a pump stop outside the run, or
        a stop time for a pump the scheme does not have.

    Warns
    -----
    RatingTableWarning
        When a heat pump's run asks for outdoor or flow temperatures outside
        its rating table (:func:`simheat.dynamics.source.warn_outside_rating_of_run`).
    """
    if method not in INTEGRATORS:
        raise ScenarioError(
            f"method: must be one of {', '.join(INTEGRATORS)}, got {method!r}"
        )
    events = controls.check_valve_events(scenario, valve_events)
    stop = controls.pump_stop_time_s(scenario, pump_stop_s)
    wm = WarmUpModel(scenario, scheme, events, stop)
    warn_outside_rating_of_run(scenario)
    return integrate_model(wm, method=method, rtol=rtol)


def tolerances(wm: WarmUpModel, rtol: float) -> np.ndarray:
    """Absolute tolerances of the states for a relative tolerance. [K, J].

    Parameters
    ----------
    wm : WarmUpModel
        The model. [-]
    rtol : float
        Relative tolerance. [-]
    """
    atol = np.full(wm.model.n_states, 10.0 * rtol)  # K: 1e-4 K at rtol 1e-5
    atol[wm.slices["energy"]] = 1.0  # J, against energies of tens of MJ
    return atol


def integrate_model(
    wm: WarmUpModel,
    *,
    method: str = "BDF",
    rtol: float | None = None,
    start_s: float | None = None,
    end_s: float | None = None,
    initial_state: np.ndarray | None = None,
) -> Solution:
    """Integrate a model from a start state, segment by segment.

    Parameters
    ----------
    wm : WarmUpModel
        The model and its schedule. [-]
    method : str
        One of :data:`INTEGRATORS`. [-]
    rtol : float, optional
        Relative tolerance; the scenario's by default. [-]
    start_s, end_s : float, optional
        The span: by default from :attr:`WarmUpModel.start_s` (the night's
        start, or 0) to the run's duration. [s]
    initial_state : ndarray, optional
        State at ``start_s``; by default :meth:`WarmUpModel.initial_state`
        (the steady evening before a night, or the given state). [°C, J]

    Returns
    -------
    Solution
        Dense output and statistics.

    Raises
    ------
    ConvergenceError
        When the integrator, a flow solve or the steady-state solve fails.
    ModelRangeError
        When water or a room leaves the range the model holds
        (:mod:`simheat.dynamics.ranges`); the run stops there.
    """
    scenario = wm.scenario
    rtol = scenario.simulation.rtol if rtol is None else rtol
    start = wm.start_s if start_s is None else start_s
    end = scenario.simulation.duration_s if end_s is None else end_s
    atol = tolerances(wm, rtol)
    if method != "LSODA":
        wm.prepare_jacobian(atol)
    started = clock.perf_counter()
    y = wm.initial_state(atol) if initial_state is None else initial_state
    solver_options = wm.solver_options(method)
    edges = controls.segment_edges_s(
        scenario,
        wm.valve_events,
        wm.pump_stop_s,
        wm.pump_stop_times_s.values(),
        start_s=start,
        end_s=end,
    )
    switching = floor_control.FloorSwitching(wm, edges, y)  # floor thermostats
    segments = []
    n_rhs = n_jac = 0
    watched = ranges.range_events(wm.slices)  # the model's range, first
    while (span := switching.next_span(y)) is not None:
        seg = wm.segment(*span)
        result = solve_ivp(
            wm.rhs,
            span,
            y,
            rtol=rtol,
            atol=atol,
            dense_output=True,
            # the range events, then the floor thermostats' (which also stop
            # the pumps that stand in seg)
            events=[*watched, *(switching.apply(seg) or ())],
            args=(seg,),
            **solver_options,
        )
        if result.status == 1 and any(len(t) for t in result.t_events[: len(watched)]):
            # a range event stopped the run
            names = ranges.state_names(
                [r.id for r in scenario.rooms],
                wm.network.link_names,
                wm.model.cell_link,
            )
            raise ranges.stop_error(
                result, wm.slices, names, scenario.schedule.start_clock_s
            )
        if not result.success:
            raise ConvergenceError(
                f"time integration failed at t = {result.t[-1]:.0f} s: "
                f"{result.message}",
                iterations=int(result.nfev),
            )
        if result.t_events is not None:  # the thermostats' events, for after()
            result.t_events = result.t_events[len(watched) :]
            result.y_events = result.y_events[len(watched) :]
        switching.after(seg, result)  # ends early where a thermostat crossed
        segments.append((seg, result.sol))
        n_rhs += result.nfev
        n_jac += result.njev
        y = result.y[:, -1]
    return Solution(wm, segments, clock.perf_counter() - started, n_rhs, n_jac)
