"""Integrate a cold morning in time: flow split, water cells, radiators and rooms.

The right-hand side re-solves the flow split at every call (warm-started, converged
to round-off so the finite-difference Jacobian is not polluted by solver noise), so
thermostatic heads closing and water warming act on the flows as they happen.
``scipy.integrate.solve_ivp`` with an implicit method and a sparse Jacobian pattern
integrates each schedule segment; dense output gives the setpoint crossings.
"""

from __future__ import annotations

import time as clock
from dataclasses import dataclass

import numpy as np
from scipy.integrate import solve_ivp
from scipy.sparse import coo_matrix, csc_matrix

from simheat.dynamics import _kernels, controls, floor_control
from simheat.dynamics.model import (
    CELL_EMITTER,
    CELL_PIPE,
    WATER_CP_J_KG_K,
    ThermalModel,
    build_model,
)
from simheat.dynamics.stiff import FixedPatternBDF, FixedPatternLU
from simheat.errors import ConvergenceError, ScenarioError
from simheat.hydraulics import _kernels as hydraulic_kernels
from simheat.hydraulics.layouts import describe
from simheat.hydraulics.solver import (
    COLD_START_FLOW_KG_S,
    SLOPE_FLOOR_PA_S_KG,
    FlowSolver,
)
from simheat.physics import _kernels as physics_kernels
from simheat.scenario.model import Scenario

INTEGRATORS = ("BDF", "Radau", "LSODA")
FLOW_TOL_KG_S = 1e-12
FLOW_TOL_PA = 1e-7
FLOW_MAX_ITER = 50
# Relative difference step of the finite-difference Jacobian: sqrt of the float64
# machine epsilon, scipy's num_jac default. [-]
JACOBIAN_STEP_FACTOR = float(np.finfo(np.float64).eps) ** 0.5


@dataclass
class _Segment:
    """Settings that hold over one schedule segment."""

    start_s: float
    end_s: float
    heating: bool  # source on
    circulating: bool  # some pump running
    setpoints_C: np.ndarray  # per sensor
    link_opening: np.ndarray  # manual valve opening per link (1 unless an event)
    pump_speed: np.ndarray  # per link: 1 running pump, 0 stopped pump or no pump


class WarmUpModel:
    """The right-hand side of the warm-up ODE for one scenario and scheme.

    Parameters
    ----------
    scenario : Scenario
        The house and morning.
    scheme : str
        Piping scheme name.
    valve_events : sequence of (time_s, emitter_index, opening)
        Checked manual valve settings (:func:`controls.check_valve_events`).
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
        # Switched floor pumps and their states after the run (see integrate).
        self.floor_switches: tuple = ()
        self.floor_states: list = []
        self.pump_stop_times_s = controls.pump_stop_times_s(
            scenario, self.network, pump_stop_s
        )
        self.slices = self.model.slices()
        self.last_flows = None
        self.n_flow_solves = 0
        m = self.model
        self.source_link = int(self.network.source_links()[0])
        self.source_capacity_J_K = float(m.cell_capacity_J_K[m.source_cells].sum())
        self._setup_compiled()

    def _setup_compiled(self) -> None:
        """Gather the flat arrays the compiled right-hand side works on, once."""
        m = self.model
        net = self.network
        fs = self.flow_solver
        # The flow solver's own arrays: the compiled RHS solves the flow split in
        # place in them, exactly as FlowSolver.solve does.
        self._hydraulics = (
            fs._from,
            fs._to,
            fs.node_position,
            fs._data,
            fs._operating,
            fs._coef,
            fs._band,
            fs._flow,
            fs._pressure,
            fs._work_links,
            fs._work_nodes,
        )
        self._hydraulic_settings = (
            COLD_START_FLOW_KG_S,
            SLOPE_FLOOR_PA_S_KG,
            FLOW_TOL_KG_S,
            FLOW_TOL_PA,
            FLOW_MAX_ITER,
        )
        ints = np.ascontiguousarray
        # Index of each link in the flow solver's arrays, -1 for a link that
        # stands still (shut, or left on no closed loop: see hydraulics.still).
        self._solver_link = np.full(net.n_links, -1, dtype=np.int64)
        self._solver_link[fs.part.links] = np.arange(len(fs.part.links))
        self._link_flow = np.zeros(net.n_links)  # every link's flow, still ones 0
        self._sizes = (m.n_cells, m.n_rooms, m.n_sensors, net.n_nodes)
        self._cells_static = (
            ints(m.link_cell_start, dtype=np.int64),
            ints(m.link_cell_count, dtype=np.int64),
            ints(net.from_node, dtype=np.int64),
            ints(net.to_node, dtype=np.int64),
            self._solver_link,
        )
        self._cell_arrays = (
            ints(m.cell_kind, dtype=np.int64),
            ints(m.cell_room, dtype=np.int64),
            m.cell_loss_W_K,
            m.cell_nominal_W,
            m.cell_exponent,
            m.cell_convective,
            m.cell_capacity_J_K,
        )
        self._room_arrays = (
            m.room_air_loss_W_K,
            m.room_structure_loss_W_K,
            m.room_air_structure_W_K,
            m.room_air_capacity_J_K,
            m.room_structure_capacity_J_K,
            m.room_gains_W,
        )
        self._walls = (
            ints(m.wall_a, dtype=np.int64),
            ints(m.wall_b, dtype=np.int64),
            np.asarray(m.wall_W_K, dtype=np.float64),
        )
        self._sensors = (
            ints(m.sensor_link, dtype=np.int64),
            ints(m.sensor_room, dtype=np.int64),
            m.sensor_band_K,
            m.sensor_time_constant_s,
        )
        src = self.scenario.source
        self._source = (
            self.source_link,
            ints(m.source_cells, dtype=np.int64),
            self.source_capacity_J_K,
            float(src.max_power_W),
            controls.SOURCE_CONTROL_TIME_S,
            controls.SOURCE_LIMIT_SMOOTHING,
            float(self.scenario.route.unheated_space_temp_C),
            WATER_CP_J_KG_K,
        )
        self._work = (
            np.zeros(m.n_cells),
            np.zeros(m.n_rooms),
            np.zeros(m.n_rooms),
            np.zeros(net.n_nodes),
            np.zeros(net.n_nodes),
            np.zeros(m.n_rooms),
            np.zeros(m.n_rooms),
            self._link_flow,
        )
        self._node_temp = np.zeros(net.n_nodes)
        self._report = np.zeros(_kernels.N_REPORT)
        self._warm = False  # the solver's arrays hold a converged flow split

    def _kernel_arguments(self, t: float, seg: _Segment, start: int) -> tuple:
        """Arguments of the compiled right-hand side after its state arguments.

        Shared by :func:`_kernels.warmup_rhs` and :func:`_kernels.warmup_jacobian`
        (controls at ``t``, the segment's settings, the model arrays, workspaces);
        ``start`` is the flow solve's start code.
        """
        return (
            controls.flow_temp_setpoint_C(self.scenario, t),
            controls.outdoor_temp_C(self.scenario, t),
            seg.heating,
            seg.circulating,
            start,
            self._sizes,
            self._cells_static,
            self._cell_arrays,
            self._room_arrays,
            self._walls,
            self._sensors,
            seg.setpoints_C,
            seg.link_opening,
            seg.pump_speed,
            self._source,
            self._hydraulics,
            self._hydraulic_settings,
            self._work,
            self._node_temp,
            self._report,
        )

    def _compiled(self, t: float, y: np.ndarray, seg: _Segment, dy: np.ndarray):
        """Run the compiled right-hand side into ``dy``; handle flow-solve failure."""
        y = np.ascontiguousarray(y)
        for attempt in range(2):
            start = (
                hydraulic_kernels.START_FLOWS_PRESSURES
                if self._warm
                else hydraulic_kernels.START_COLD
            )
            _kernels.warmup_rhs(y, dy, *self._kernel_arguments(t, seg, start))
            if seg.circulating:
                self.n_flow_solves += 1
            if self._report[_kernels.REPORT_FLOW_STATUS] == 0:
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

    def segment(self, start_s: float, end_s: float) -> _Segment:
        """Schedule settings valid from ``start_s`` to ``end_s``."""
        mid = 0.5 * (start_s + end_s)
        link_opening = np.ones(self.network.n_links)
        manual = controls.valve_openings(
            len(self.scenario.emitters), self.valve_events, mid
        )
        link_opening[self.network.emitter_links()] = manual
        pumps = self.network.pump_links()
        speed = controls.pump_speeds(
            self.network.n_links, pumps, self.pump_stop_times_s, mid
        )
        heating = controls.heating_on(self.scenario, mid)
        # With every pump stopped nothing drives the water: the flow split is
        # zero without a solve (the solver refuses a network with no running pump).
        return _Segment(
            start_s,
            end_s,
            heating,
            heating and bool(np.any(speed[pumps] > 0.0)),
            controls.emitter_setpoints_C(self.scenario, mid, self.model.sensor_emitter),
            link_opening,
            speed,
        )

    def flows(self, y: np.ndarray, seg: _Segment) -> np.ndarray:
        """Link mass flows for state ``y`` [kg/s]; zero when no pump runs."""
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
        sensors = y[self.slices["sensors"]]
        for i, link in enumerate(m.sensor_link):
            opening[link] *= physics_kernels.thermostatic_opening(
                sensors[i], seg.setpoints_C[i], m.sensor_band_K[i]
            )
        flows = self.flow_solver.solve(
            water_temp_C=link_temp,
            valve_opening=opening,
            pump_speed=seg.pump_speed,
            initial_mass_flow_kg_s=self.last_flows,
            tol_kg_s=FLOW_TOL_KG_S,
            tol_Pa=FLOW_TOL_PA,
        )
        self.n_flow_solves += 1
        self.last_flows = flows.mass_flow_kg_s.copy()
        return flows.mass_flow_kg_s

    def evaluate(self, t: float, y: np.ndarray, seg: _Segment) -> dict:
        """Derivatives and the heat flows behind them at time ``t`` (compiled)."""
        dy = np.empty(len(y))
        self._compiled(t, y, seg, dy)
        report = self._report
        return {
            "dy": dy,
            "flows": self._link_flow.copy(),
            "node_temp": self._node_temp.copy(),
            "source_W": float(report[_kernels.REPORT_SOURCE_W]),
            "inlet_C": float(report[_kernels.REPORT_INLET_C]),
            "outlet_C": float(report[_kernels.REPORT_OUTLET_C]),
        }

    def evaluate_reference(self, t: float, y: np.ndarray, seg: _Segment) -> dict:
        """As :meth:`evaluate`, in plain Python and numpy around FlowSolver.solve.

        The reference the compiled right-hand side is tested against, and the
        baseline of the speed benchmarks.
        """
        m = self.model
        net = self.network
        s = self.slices
        cells = y[s["cells"]]
        air = y[s["air"]]
        structure = y[s["structure"]]
        sensors = y[s["sensors"]]
        flows = self.flows(y, seg)
        node_temp = _kernels.node_temperatures(
            cells,
            flows,
            net.from_node,
            net.to_node,
            m.link_cell_start,
            m.link_cell_count,
            net.n_nodes,
        )
        dH = np.zeros(m.n_cells)
        _kernels.advect_cells(
            cells,
            node_temp,
            flows,
            net.from_node,
            net.to_node,
            m.link_cell_start,
            m.link_cell_count,
            WATER_CP_J_KG_K,
            dH,
        )
        source_W = 0.0
        inlet_C = node_temp[net.from_node[self.source_link]]
        outlet_C = cells[m.source_cells[-1]]
        if seg.heating:
            src = self.scenario.source
            flow_temp = controls.flow_temp_setpoint_C(self.scenario, t)
            demand = max(flows[self.source_link], 0.0) * WATER_CP_J_KG_K * (
                flow_temp - inlet_C
            ) + self.source_capacity_J_K / controls.SOURCE_CONTROL_TIME_S * (
                flow_temp - outlet_C
            )
            source_W = _kernels.smooth_clip(
                demand,
                src.max_power_W,
                controls.SOURCE_LIMIT_SMOOTHING * src.max_power_W,
            )
            dH[m.source_cells] += source_W / len(m.source_cells)
        q_air = np.zeros(m.n_rooms)
        q_structure = np.zeros(m.n_rooms)
        unheated = self.scenario.route.unheated_space_temp_C
        emitted, pipe_loss = _kernels.exchange_heat(
            cells,
            air,
            m.cell_kind,
            m.cell_room,
            m.cell_loss_W_K,
            m.cell_nominal_W,
            m.cell_exponent,
            m.cell_convective,
            unheated,
            dH,
            q_air,
            q_structure,
        )
        dy = np.empty_like(y)
        dy[s["cells"]] = dH / m.cell_capacity_J_K
        d_air = np.empty(m.n_rooms)
        d_structure = np.empty(m.n_rooms)
        _kernels.room_balance(
            air,
            structure,
            controls.outdoor_temp_C(self.scenario, t),
            m.room_air_loss_W_K,
            m.room_structure_loss_W_K,
            m.room_air_structure_W_K,
            m.room_air_capacity_J_K,
            m.room_structure_capacity_J_K,
            m.room_gains_W,
            m.wall_a,
            m.wall_b,
            m.wall_W_K,
            q_air,
            q_structure,
            d_air,
            d_structure,
        )
        dy[s["air"]] = d_air
        dy[s["structure"]] = d_structure
        dy[s["sensors"]] = (air[m.sensor_room] - sensors) / m.sensor_time_constant_s
        dy[s["energy"]] = (source_W, emitted, pipe_loss)
        return {
            "dy": dy,
            "flows": flows,
            "node_temp": node_temp,
            "source_W": source_W,
            "inlet_C": inlet_C,
            "outlet_C": outlet_C,
        }

    def rhs(self, t: float, y: np.ndarray, seg: _Segment) -> np.ndarray:
        """Time derivative of the state (compiled, see :func:`_kernels.warmup_rhs`)."""
        dy = np.empty(len(y))
        self._compiled(t, y, seg, dy)
        return dy

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
        self._jac_indptr = pattern.indptr.astype(np.int64)
        self._jac_indices = pattern.indices.astype(np.int64)
        self._jac_groups = column_groups(pattern)
        self._jac_atol = np.asarray(atol, dtype=np.float64)
        n = self.model.n_states
        self._jac_f0 = np.empty(n)
        self._jac_y = np.empty(n)
        self._jac_dy = np.empty(n)

    def solver_options(self, method: str) -> dict:
        """``solve_ivp`` options for an integrator name of :data:`INTEGRATORS`.

        BDF runs as :class:`simheat.dynamics.stiff.FixedPatternBDF` (scipy's BDF,
        compiled LU on the Jacobian's pattern, sensors ordered last); Radau gets
        the compiled Jacobian; LSODA uses its own finite differences.
        Call :meth:`prepare_jacobian` first for BDF and Radau.
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

    def jacobian(self, t: float, y: np.ndarray, seg: _Segment):
        """Finite-difference Jacobian of :meth:`rhs` on the sparse pattern (CSC).

        The differences are taken in compiled code, one right-hand side per column
        group (:func:`_kernels.warmup_jacobian`), with scipy's step rule
        ``sqrt(eps) * sign(f) * max(atol, |y|)``. Call :meth:`prepare_jacobian`
        first. Rows of the energy counters are left out, as in the pattern.
        """
        y = np.ascontiguousarray(y, dtype=np.float64)
        f0 = self._jac_f0
        self._compiled(t, y, seg, f0)
        scale = np.where(f0 >= 0.0, 1.0, -1.0) * np.maximum(self._jac_atol, np.abs(y))
        step = (y + JACOBIAN_STEP_FACTOR * scale) - y
        data = np.empty(len(self._jac_indices))
        start, columns = self._jac_groups
        status = _kernels.warmup_jacobian(
            y,
            f0,
            step,
            start,
            columns,
            self._jac_indptr,
            self._jac_indices,
            data,
            self._jac_y,
            self._jac_dy,
            *self._kernel_arguments(
                t,
                seg,
                hydraulic_kernels.START_FLOWS_PRESSURES
                if seg.circulating
                else hydraulic_kernels.START_COLD,
            ),
        )
        if seg.circulating:
            self.n_flow_solves += len(start) - 1
        if status != 0:
            # A warm-started flow solve failed: redo the columns through the
            # checked path, which restarts cold and raises if that fails too.
            self._warm = False
            perturbed = y.copy()
            dy = np.empty_like(y)
            for g in range(len(start) - 1):
                cols = columns[start[g] : start[g + 1]]
                perturbed[cols] += step[cols]
                self._compiled(t, perturbed, seg, dy)
                perturbed[cols] = y[cols]
                for j in cols:
                    rows = slice(self._jac_indptr[j], self._jac_indptr[j + 1])
                    data[rows] = (
                        dy[self._jac_indices[rows]] - f0[self._jac_indices[rows]]
                    ) / step[j]
        n = self.model.n_states
        return csc_matrix(
            (data, self._jac_indices.copy(), self._jac_indptr.copy()), shape=(n, n)
        )

    def rhs_reference(self, t: float, y: np.ndarray, seg: _Segment) -> np.ndarray:
        """Time derivative of the state from :meth:`evaluate_reference`."""
        return self.evaluate_reference(t, y, seg)["dy"]

    def emitter_outputs_W(self, y: np.ndarray) -> np.ndarray:
        """Heat output of each emitter at state ``y`` (or at each row of it). [W]."""
        m = self.model
        y = np.asarray(y, dtype=np.float64)
        cells = np.flatnonzero(m.cell_kind == CELL_EMITTER)
        rooms = m.cell_room[cells]
        excess = (
            y[..., cells] - y[..., self.slices["air"].start + rooms]
        ) / _kernels.NOMINAL_EXCESS_K
        per_cell = (
            m.cell_nominal_W[cells]
            * np.sign(excess)
            * np.abs(excess) ** m.cell_exponent[cells]
        )
        out = np.zeros((*y.shape[:-1], len(self.scenario.emitters)))
        for k, emitter in enumerate(m.cell_emitter[cells]):
            out[..., emitter] += per_cell[..., k]
        return out

    def jacobian_sparsity(self):
        """Which derivative depends on which state (sparse 0/1 matrix)."""
        m = self.model
        net = self.network
        s = self.slices
        n = m.n_states
        rows: list[int] = []
        columns: list[int] = []

        def mark(row: int, column: int) -> None:
            rows.append(row)
            columns.append(column)

        air0, struct0, sens0 = s["air"].start, s["structure"].start, s["sensors"].start
        sensor_cols = list(range(sens0, sens0 + m.n_sensors))
        ends_at_node: list[list[int]] = [[] for _ in range(net.n_nodes)]
        for link in range(net.n_links):
            first = m.link_cell_start[link]
            last = first + m.link_cell_count[link] - 1
            ends_at_node[net.from_node[link]].append(first)
            ends_at_node[net.to_node[link]].append(last)
        source_group = set(m.source_cells) | set(
            ends_at_node[net.from_node[self.source_link]]
        )
        for k in range(m.n_cells):
            link = m.cell_link[k]
            first = m.link_cell_start[link]
            last = first + m.link_cell_count[link] - 1
            cols = {k, max(k - 1, first), min(k + 1, last)}
            if k == first:
                cols.update(ends_at_node[net.from_node[link]])
            if k == last:
                cols.update(ends_at_node[net.to_node[link]])
            room = m.cell_room[k]
            if room >= 0 and m.cell_kind[k] in (CELL_EMITTER, CELL_PIPE):
                cols.update((air0 + room,))
            if k in source_group:
                cols.update(source_group)
            for c in cols:
                mark(k, c)
            for c in sensor_cols:  # valve openings move every flow
                mark(k, c)
        for r in range(m.n_rooms):
            for c in (air0 + r, struct0 + r):
                mark(air0 + r, c)
                mark(struct0 + r, c)
        for k in range(m.n_cells):
            room = m.cell_room[k]
            if room >= 0 and m.cell_kind[k] in (CELL_EMITTER, CELL_PIPE):
                mark(air0 + room, k)
                mark(struct0 + room, k)
        for a, b in zip(m.wall_a, m.wall_b, strict=True):
            mark(air0 + a, air0 + b)
            mark(air0 + b, air0 + a)
        for i, room in enumerate(m.sensor_room):
            mark(sens0 + i, sens0 + i)
            mark(sens0 + i, air0 + room)
        # The energy counters are quadratures that nothing depends on: leaving their
        # rows out of the pattern keeps them from filling every column (which would
        # force one finite-difference group per state). The Newton iteration still
        # converges on them, one iteration behind the states they integrate.
        pattern = coo_matrix(
            (np.ones(len(rows), dtype=np.int8), (rows, columns)), shape=(n, n)
        ).tocsr()
        pattern.sum_duplicates()
        pattern.data[:] = 1
        return pattern


def column_groups(pattern) -> tuple[np.ndarray, np.ndarray]:
    """Greedy grouping of the columns of a sparse pattern that share no row.

    Curtis, Powell and Reid's idea: the columns of one group can be perturbed
    together in a finite-difference Jacobian. Columns without entries are left
    out.

    Parameters
    ----------
    pattern : scipy.sparse matrix
        0/1 pattern, shape (n_rows, n_columns).

    Returns
    -------
    (ndarray, ndarray) of int64
        ``start`` (n_groups + 1) and ``columns``: group ``g`` holds
        ``columns[start[g]:start[g + 1]]``.

    References
    ----------
    .. [1] A. R. Curtis, M. J. D. Powell, J. K. Reid, "On the estimation of sparse
       Jacobian matrices", IMA J. Appl. Math. 13(1), 1974.
    """
    csc = pattern.tocsc()
    n_rows, n_columns = csc.shape
    used = np.zeros((0, n_rows), dtype=bool)
    members: list[list[int]] = []
    for j in range(n_columns):
        rows = csc.indices[csc.indptr[j] : csc.indptr[j + 1]]
        if rows.size == 0:
            continue
        free = np.flatnonzero(~used[:, rows].any(axis=1))
        if free.size:
            g = int(free[0])
        else:
            g = len(members)
            used = np.vstack([used, np.zeros((1, n_rows), dtype=bool)])
            members.append([])
        used[g, rows] = True
        members[g].append(j)
    start = np.zeros(len(members) + 1, dtype=np.int64)
    start[1:] = np.cumsum([len(m) for m in members])
    columns = np.array([j for m in members for j in m], dtype=np.int64)
    return start, columns


@dataclass
class Solution:
    """Raw result of an integration: dense output per segment and statistics."""

    model: WarmUpModel
    segments: list
    wall_time_s: float
    n_rhs: int
    n_jac: int

    def state_at(self, t: np.ndarray) -> np.ndarray:
        """States at times ``t``, shape ``(len(t), n_states)``, from dense output."""
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

    def segment_at(self, t: float) -> _Segment:
        """Schedule segment that holds at time ``t``."""
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
        The house and morning.
    scheme : str
        Piping scheme name.
    method : str
        One of :data:`INTEGRATORS` (implicit or stiff-switching methods).
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
    """
    if method not in INTEGRATORS:
        raise ScenarioError(
            f"method: must be one of {', '.join(INTEGRATORS)}, got {method!r}"
        )
    events = controls.check_valve_events(scenario, valve_events)
    stop = controls.pump_stop_time_s(scenario, pump_stop_s)
    wm = WarmUpModel(scenario, scheme, events, stop)
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
    switches = floor_control.floor_switches(
        scenario, wm.network, wm.slices["air"].start
    )
    edges = sorted(set(edges).union(*(sw.edges_s() for sw in switches)))
    states = [floor_control.initial_state(sw, scenario, y) for sw in switches]
    end_s = scenario.simulation.duration_s
    segments = []
    n_rhs = n_jac = 0
    started = clock.perf_counter()
    t = 0.0
    while t < end_s - floor_control.TIME_TOL_S:
        # The next fixed edge, or the time a held-back pump switch is allowed.
        stop_at = min(e for e in edges if e > t + floor_control.TIME_TOL_S)
        for sw, state in zip(switches, states, strict=True):
            held = floor_control.held_until_s(sw, state, scenario, y, t)
            if held is not None and held > t + floor_control.TIME_TOL_S:
                stop_at = min(stop_at, held)
        seg = wm.segment(t, stop_at)
        comfort = controls.in_comfort(scenario, 0.5 * (t + stop_at))
        crossings = []
        for sw, state in zip(switches, states, strict=True):
            if not state.running:
                seg.pump_speed[sw.link] = 0.0  # stopped; its check valve holds
            crossings.append(floor_control.crossing_event(sw, state, scenario, comfort))
        pumps = wm.network.pump_links()
        seg.circulating = seg.heating and bool(np.any(seg.pump_speed[pumps] > 0.0))
        watching = [i for i, e in enumerate(crossings) if e is not None]
        watched = [crossings[i] for i in watching]
        result = solve_ivp(
            wm.rhs,
            (t, stop_at),
            y,
            rtol=rtol,
            atol=atol,
            dense_output=True,
            events=watched or None,
            args=(seg,),
            **solver_options,
        )
        if not result.success:
            raise ConvergenceError(
                f"time integration failed at t = {result.t[-1]:.0f} s: "
                f"{result.message}",
                iterations=int(result.nfev),
            )
        t = float(result.t[-1])
        seg.end_s = t  # ends early where a thermostat crossed
        segments.append((seg, result.sol))
        n_rhs += result.nfev
        n_jac += result.njev
        y = result.y[:, -1]
        if result.status == 1:  # a thermostat crossed: its call changes there
            for i, times in zip(watching, result.t_events, strict=True):
                if times.size:
                    states[i].calling = not states[i].calling
        for sw, state in zip(switches, states, strict=True):
            floor_control.decide(sw, state, scenario, y, t)
    wm.floor_switches = switches
    wm.floor_states = states
    return Solution(wm, segments, clock.perf_counter() - started, n_rhs, n_jac)
