"""Integrate a cold morning in time: flow split, water cells, radiators and rooms.

The right-hand side re-solves the flow split at every call (warm-started, converged
to round-off so the finite-difference Jacobian is not polluted by solver noise), so
thermostatic heads closing and water warming act on the flows as they happen.
``scipy.integrate.solve_ivp`` with an implicit method and a sparse Jacobian pattern
integrates each schedule segment; dense output gives the setpoint crossings.

:class:`WarmUpModel` holds one scenario and scheme: the thermal model, the flow
solver, and the records (:mod:`simheat.dynamics._records`) the compiled
right-hand side (:mod:`simheat.dynamics._kernels`) works on. Schedule segments
and their controls come from :mod:`simheat.dynamics.segments`, the Jacobian's
pattern and column groups from :mod:`simheat.dynamics.jacobian`.
"""

from __future__ import annotations

import time as clock
from dataclasses import dataclass

import numpy as np
from scipy.integrate import solve_ivp
from scipy.sparse import csc_matrix

from simheat._handle import Handle
from simheat.dynamics import _kernels, _records, controls
from simheat.dynamics.jacobian import (
    difference_steps,
    jacobian_arrays,
    jacobian_sparsity,
)
from simheat.dynamics.model import (
    CELL_EMITTER,
    ThermalModel,
    build_model,
)
from simheat.dynamics.segments import Segment, controls_at, schedule_segment
from simheat.dynamics.source import source_params, warn_outside_rating_of_run
from simheat.dynamics.stiff import FixedPatternBDF, FixedPatternLU
from simheat.errors import ConvergenceError, ScenarioError
from simheat.hydraulics.layouts import describe
from simheat.hydraulics.solver import FlowSolver
from simheat.physics.emitter import emitter_output_W
from simheat.physics.valve import thermostatic_opening
from simheat.scenario.model import Scenario

__all__ = ["INTEGRATORS", "Segment", "Solution", "WarmUpModel", "integrate"]

INTEGRATORS = ("BDF", "Radau", "LSODA")
FLOW_TOL_KG_S = 1e-12
FLOW_TOL_PA = 1e-7
FLOW_MAX_ITER = 50


class WarmUpModel:
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
            work=_records.rhs_work(m.n_cells, m.n_rooms, self.network.n_nodes),
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

    def initial_state(self) -> np.ndarray:
        """State at the start of the run: everything at the initial temperatures."""
        sim = self.scenario.simulation
        y = np.zeros(self.model.n_states)
        s = self.slices
        y[s["cells"]] = sim.initial_water_temp_C
        y[s["air"]] = sim.initial_room_temp_C
        y[s["structure"]] = sim.initial_room_temp_C
        y[s["sensors"]] = sim.initial_room_temp_C
        return y

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
            "flows": self.flow_solver.arrays.flow_kg_s.copy(),
            "node_temp": work.node_temp_C.copy(),
            "source_W": float(report[_records.REPORT_SOURCE_W]),
            "inlet_C": float(report[_records.REPORT_INLET_C]),
            "outlet_C": float(report[_records.REPORT_OUTLET_C]),
            "capacity_W": float(report[_records.REPORT_CAPACITY_W]),
            "electric_W": float(report[_records.REPORT_ELECTRIC_W]),
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

    def jacobian_sparsity(self):
        """Which derivative depends on which state (:func:`jacobian_sparsity`)."""
        return jacobian_sparsity(self.model, self.network, self.source_link)

    def prepare_jacobian(self, atol: np.ndarray) -> None:
        """Set up :meth:`jacobian`: pattern, column groups and difference steps.

        Parameters
        ----------
        atol : ndarray
            Absolute tolerances of the states: the floor of the difference step's
            scale, as in scipy's own finite differences. [K or J]
        """
        pattern = self.jacobian_sparsity().tocsc()
        pattern.sort_indices()
        self._jac_pattern = pattern
        self._jac = jacobian_arrays(pattern)
        self._jac_handle = Handle(self._jac)
        self._jac_atol = np.asarray(atol, dtype=np.float64)
        self._jac_f0 = np.empty(self.model.n_states)

    def solver_options(self, method: str) -> dict:
        """``solve_ivp`` options for an integrator name of :data:`INTEGRATORS`.

        BDF runs as :class:`simheat.dynamics.stiff.FixedPatternBDF` (scipy's BDF,
        compiled LU on the Jacobian's pattern, sensors ordered last); Radau gets
        the compiled Jacobian; LSODA uses its own finite differences.
        Call :meth:`prepare_jacobian` first for BDF and Radau.

        Parameters
        ----------
        method : str
            ``"BDF"``, ``"Radau"`` or ``"LSODA"``. [-]
        """
        if method == "LSODA":
            return {"method": method}
        if method != "BDF":
            return {"method": method, "jac": self.jacobian}
        structure = FixedPatternLU(
            self._jac_pattern,
            last_columns=np.arange(
                self.slices["sensors"].start, self.slices["sensors"].stop
            ),
        )
        return {
            "method": FixedPatternBDF,
            "jac": self.jacobian,
            "lu_structure": structure,
        }

    def jacobian(self, t: float, y: np.ndarray, seg: Segment):
        """Finite-difference Jacobian of :meth:`rhs` on the sparse pattern (CSC).

        The differences are taken in compiled code, one right-hand side per column
        group (:func:`_kernels.warmup_jacobian`), with scipy's step rule
        (:func:`~simheat.dynamics.jacobian.difference_steps`). Call
        :meth:`prepare_jacobian` first. Rows of the energy counters are left
        out, as in the pattern.

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
        scipy.sparse.csc_matrix, shape (n_states, n_states)
            ``d(dy/dt)/dy`` on the pattern of :meth:`jacobian_sparsity`. [1/s]
        """
        y = np.ascontiguousarray(y, dtype=np.float64)
        f0 = self._jac_f0
        self._compiled(t, y, seg, f0)
        step = difference_steps(y, f0, self._jac_atol)
        jac = self._jac
        status = _kernels.warmup_jacobian_entry(
            y,
            f0,
            step,
            self._jac_handle,
            self._handle,
            controls_at(self.scenario, seg, t, seg.circulating),
        )
        n_groups = len(jac.group_start) - 1
        if seg.circulating:
            self.n_flow_solves += n_groups
        if status != 0:
            self._difference_columns_checked(t, y, seg, f0, step)
        n = self.model.n_states
        return csc_matrix(
            (jac.data.copy(), jac.indices.copy(), jac.indptr.copy()), shape=(n, n)
        )

    def _difference_columns_checked(self, t, y, seg, f0, step) -> None:
        """Redo the Jacobian's columns through the checked path after a failure.

        A warm-started flow solve failed inside the compiled Jacobian: each
        group's right-hand side goes through :meth:`_compiled`, which restarts
        cold and raises if that fails too.
        """
        self._warm = False
        jac = self._jac
        start, columns = jac.group_start, jac.group_columns
        perturbed = y.copy()
        dy = np.empty_like(y)
        for g in range(len(start) - 1):
            cols = columns[start[g] : start[g + 1]]
            perturbed[cols] += step[cols]
            self._compiled(t, perturbed, seg, dy)
            perturbed[cols] = y[cols]
            for j in cols:
                rows = slice(jac.indptr[j], jac.indptr[j + 1])
                entries = jac.indices[rows]
                jac.data[rows] = (dy[entries] - f0[entries]) / step[j]

    def emitter_outputs_W(self, y: np.ndarray) -> np.ndarray:
        """Heat output of each emitter at state ``y`` (or at each row of it). [W].

        Parameters
        ----------
        y : ndarray, shape (..., n_states)
            One state or a stack of states (last axis: the state vector). Cell,
            air, structure and sensor temperatures [°C], energy counters [J].

        Returns
        -------
        ndarray, shape (..., n_emitters)
            EN 442 output of each emitter, summed over its cells. [W]
        """
        m = self.model
        y = np.asarray(y, dtype=np.float64)
        cells = np.flatnonzero(m.cell_kind == CELL_EMITTER)
        rooms = m.cell_room[cells]
        per_cell = emitter_output_W(
            m.cell_nominal_W[cells],
            m.cell_exponent[cells],
            y[..., cells] - y[..., self.slices["air"].start + rooms],
        )
        out = np.zeros((*y.shape[:-1], len(self.scenario.emitters)))
        for k, emitter in enumerate(m.cell_emitter[cells]):
            out[..., emitter] += per_cell[..., k]
        return out


@dataclass
class Solution:
    """Raw result of an integration: dense output per segment and statistics.

    Attributes
    ----------
    model : WarmUpModel
        The model that was integrated. [-]
    segments : list of (Segment, scipy.integrate.OdeSolution)
        Each schedule segment in time order with ``solve_ivp``'s dense output
        over it (a function of time [s] giving states). [-]
    wall_time_s : float
        Wall-clock time the integration took. [s]
    n_rhs : int
        Right-hand side evaluations reported by ``solve_ivp`` (``nfev``). [-]
    n_jac : int
        Jacobian evaluations reported by ``solve_ivp`` (``njev``). [-]
    """

    model: WarmUpModel
    segments: list
    wall_time_s: float
    n_rhs: int
    n_jac: int

    def state_at(self, t: np.ndarray) -> np.ndarray:
        """States at times ``t``, shape ``(len(t), n_states)``, from dense output.

        Parameters
        ----------
        t : float or ndarray
            Times from the start of the run; each is clipped into its
            segment's span. [s]

        Returns
        -------
        ndarray, shape (len(t), n_states)
            Cell, air, structure and sensor temperatures [°C], energy
            counters [J].
        """
        t = np.atleast_1d(np.asarray(t, dtype=float))
        if len(t) == 1:  # one time (root finding): straight to its segment
            seg, sol = self.segments[-1]
            for candidate in self.segments:
                if t[0] <= candidate[0].end_s:
                    seg, sol = candidate
                    break
            return sol(min(max(float(t[0]), seg.start_s), seg.end_s))[np.newaxis]
        out = np.empty((len(t), self.model.model.n_states))
        done = np.zeros(len(t), dtype=bool)
        last = self.segments[-1][0]
        for seg, sol in self.segments:
            take = ~done if seg is last else ~done & (t <= seg.end_s)
            if take.any():
                out[take] = sol(np.clip(t[take], seg.start_s, seg.end_s)).T
                done |= take
        return out

    def segment_at(self, t: float) -> Segment:
        """Schedule segment that holds at time ``t``.

        Parameters
        ----------
        t : float
            Time from the start of the run; after the last segment's end, the
            last segment. [s]
        """
        for seg, _ in self.segments:
            if t < seg.end_s:
                return seg
        return self.segments[-1][0]


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
    rtol = scenario.simulation.rtol if rtol is None else rtol
    y = wm.initial_state()
    n_states = wm.model.n_states
    atol = np.full(n_states, 10.0 * rtol)  # K: 1e-4 K at the default rtol 1e-5
    atol[wm.slices["energy"]] = 1.0  # J, against energies of tens of MJ
    if method != "LSODA":
        wm.prepare_jacobian(atol)
    solver_options = wm.solver_options(method)
    edges = controls.segment_edges_s(
        scenario, events, stop, wm.pump_stop_times_s.values()
    )
    segments = []
    n_rhs = n_jac = 0
    started = clock.perf_counter()
    for start, end in zip(edges[:-1], edges[1:], strict=True):
        seg = wm.segment(start, end)
        result = solve_ivp(
            wm.rhs,
            (start, end),
            y,
            rtol=rtol,
            atol=atol,
            dense_output=True,
            args=(seg,),
            **solver_options,
        )
        if not result.success:
            raise ConvergenceError(
                f"time integration failed at t = {result.t[-1]:.0f} s: "
                f"{result.message}",
                iterations=int(result.nfev),
            )
        segments.append((seg, result.sol))
        n_rhs += result.nfev
        n_jac += result.njev
        y = result.y[:, -1]
    return Solution(wm, segments, clock.perf_counter() - started, n_rhs, n_jac)
