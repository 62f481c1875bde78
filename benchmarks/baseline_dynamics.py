"""Plain numpy/scipy baseline of the warm-up right-hand side.

The same equations as the compiled right-hand side of
:mod:`simheat.dynamics.integrate` (``simheat.dynamics._kernels.warmup_rhs``),
written the way a careful engineer would with numpy and scipy alone and no
compiled code: it gives the benchmark an honest reference point for the demo
house's 6 h run, and the test suite an independent reference for the compiled
right-hand side (``tests/dynamics/test_reference_rhs.py``).

It works on the arrays of a :class:`~simheat.dynamics.integrate.WarmUpModel`
(so the model, the cells, the schedule segments and the Jacobian pattern are
the same) and replaces only the right-hand side:

- water properties at each link's mean cell temperature: the Kell density and
  the Vogel-type viscosity of :mod:`simheat.physics._kernels`, vectorised;
- thermostatic head openings from the sensor temperatures, the EN 215
  proportional law with rounded corners, vectorised;
- the flow split by the global gradient algorithm (Todini and Pilati): Newton
  on link laws and node balances, each step a sparse Schur-complement solve of
  the node pressures with :func:`scipy.sparse.linalg.spsolve`; link laws from
  :class:`baseline_hydraulics.LinkLosses` (vectorised Darcy-Weisbach with
  Colebrook-White, local losses, the Kv law, check valves, the pump curve at
  each pump's speed, a stopped pump as its curve's resistance). A cold start
  takes four linear-theory passes (secant resistances, averaged flows) before
  Newton; later solves start from the previous flows. The solve stops after a
  Newton step below 1e-10 of the largest flow, so the flows are exact to
  round-off, as the compiled solve's are;
- node mixing by mass flow (``numpy.bincount``), upwind transport along each
  link's cells, the radiators' cell law (EN 442 log-mean chain), pipe losses,
  the source's smooth power limit (a heat pump's capacity and COP from its
  rating table by scipy's ``RegularGridInterpolator`` at clamped coordinates,
  its minimum-flow ramp, a buffer tank ahead of it), room balances with
  internal walls, sensor lags and energy counters, all as whole-array numpy
  expressions.

:func:`integrate_baseline` integrates it with exactly the ``solve_ivp``
settings of :func:`simheat.dynamics.integrate.integrate` (method, tolerances,
Jacobian pattern, segments) and returns the same kind of
:class:`~simheat.dynamics.integrate.Solution`.
"""

from __future__ import annotations

import importlib.util
import math
import sys
import time
from pathlib import Path

import numpy as np
import scipy.sparse
import scipy.sparse.linalg
from scipy.integrate import solve_ivp
from scipy.interpolate import RegularGridInterpolator

from simheat.dynamics import controls
from simheat.dynamics._kernels import MIXING_EPS_KG_S
from simheat.dynamics.integrate import Solution, WarmUpModel
from simheat.dynamics.model import (
    CELL_EMITTER,
    CELL_PIPE,
    WATER_CP_J_KG_K,
    WATER_DENSITY_KG_M3,
)
from simheat.errors import ConvergenceError
from simheat.physics import _kernels as physics_kernels
from simheat.physics import _water_kernels as water_kernels
from simheat.physics._emitter_kernels import CHAIN_RATIO_CAP
from simheat.runs import metrics
from simheat.runs.run import operative_temp_C
from simheat.scenario.model import Scenario


def _sibling(name: str):
    """Import a module that sits beside this file (benchmarks/ is no package)."""
    if name in sys.modules:
        return sys.modules[name]
    spec = importlib.util.spec_from_file_location(
        name, Path(__file__).with_name(f"{name}.py")
    )
    module = importlib.util.module_from_spec(spec)
    sys.modules[name] = module  # dataclasses look their module up there
    spec.loader.exec_module(module)
    return module


bh = _sibling("baseline_hydraulics")

# EN 442-2 nominal log mean excess temperature of 75/65/20 °C (section 3). [K]
NOMINAL_EXCESS_K = 10.0 / math.log(55.0 / 45.0)
FLOW_STEP_RTOL = 1e-10  # stop after a Newton step below this share of max |m| [-]
FLOW_MAX_ITER = 50
LINEAR_START_PASSES = 4


# --- water properties (same fits as simheat.physics._water_kernels) -------------------
def water_density_kg_m3(temp_C: np.ndarray) -> np.ndarray:
    """Kell (1975) density, the compiled kernel's fit, vectorised. [kg/m3]"""
    t = np.clip(
        temp_C, physics_kernels.WATER_TEMP_MIN_C, physics_kernels.WATER_TEMP_MAX_C
    )
    c = water_kernels._KELL_NUM
    num = c[0] + t * (c[1] + t * (c[2] + t * (c[3] + t * (c[4] + t * c[5]))))
    return num / (1.0 + water_kernels._KELL_DEN * t)


def water_viscosity_Pa_s(temp_C: np.ndarray) -> np.ndarray:
    """Vogel-type viscosity, the compiled kernel's fit, vectorised. [Pa s]"""
    t = np.clip(
        temp_C, physics_kernels.WATER_TEMP_MIN_C, physics_kernels.WATER_TEMP_MAX_C
    )
    k = water_kernels
    return 1e-3 * np.exp(k._VISC_A + k._VISC_B / (t + k._VISC_C) + k._VISC_D * t)


def thermostatic_opening(sensor_C, setpoint_C, band_K):
    """Proportional head opening, vectorised (EN 215 language). [-]

    1 at or below setpoint - band/2, 0 at or above setpoint + band/2, linear in
    between, both corners rounded by parabolas over TRV_CORNER_FRACTION of the
    band (so the opening is continuously differentiable).
    """
    band = np.maximum(band_K, physics_kernels.TRV_BAND_FLOOR_K)
    u = np.clip((setpoint_C + 0.5 * band - sensor_C) / band, 0.0, 1.0)
    w = physics_kernels.TRV_CORNER_FRACTION
    span = 1.0 - w
    low = 0.5 * u * u / (w * span)
    high = 1.0 - 0.5 * (1.0 - u) ** 2 / (w * span)
    middle = (u - 0.5 * w) / span
    return np.where(u < w, low, np.where(u > span, high, middle))


class PurePythonFlows:
    """Global gradient flow solve of a network in numpy and scipy.sparse.

    Supports pipes, valves, check valves and fixed-speed pumps (running, or
    stopped: speed 0), no regulated pumps.
    """

    def __init__(self, network) -> None:
        net = network
        if np.any(net.pump_mode != 0):
            raise NotImplementedError("the baseline handles fixed-speed pumps only")
        self.network = net
        self.links = bh.LinkLosses(net, np.arange(net.n_links), 20.0)
        cols = np.arange(net.n_links)
        incidence = scipy.sparse.coo_matrix(
            (
                np.concatenate([np.ones(net.n_links), -np.ones(net.n_links)]),
                (np.concatenate([net.from_node, net.to_node]), np.tile(cols, 2)),
            ),
            shape=(net.n_nodes, net.n_links),
        ).tocsr()
        # The pressure level of a closed network is free: node 0 is the reference.
        self.incidence = incidence[1:]
        self.incidence_t = self.incidence.T.tocsr()
        self.is_pump = np.zeros(net.n_links, dtype=bool)
        self.is_pump[self.links.pump] = True
        self.iterations = 0

    def _set_temperature(self, link_temp_C: np.ndarray) -> None:
        self.links.rho = water_density_kg_m3(link_temp_C)
        self.links.mu = water_viscosity_Pa_s(link_temp_C)

    def _node_solve(self, resistance, rhs_links):
        """Pressures p with A R^-1 A^T p = A R^-1 rhs; returns A^T p per link."""
        a = self.incidence
        inv = scipy.sparse.diags(1.0 / resistance)
        laplacian = (a @ inv @ self.incidence_t).tocsc()
        p = scipy.sparse.linalg.spsolve(laplacian, a @ (rhs_links / resistance))
        return self.incidence_t @ p

    def solve(self, link_temp_C, opening, speed, start_kg_s=None) -> np.ndarray:
        """Link mass flows [kg/s] at link temperatures [°C], valve openings [-]
        and pump speeds [-] (per link)."""
        self._set_temperature(link_temp_C)

        def links(m, opening):
            return self.links(m, opening, speed)

        if start_kg_s is None:
            m = np.zeros(self.network.n_links)
            for k in range(LINEAR_START_PASSES):
                loss, slope = links(m, opening)
                # secant resistances, tangent pump lines: R m + e = A^T p
                small = np.abs(m) < 1e-12
                resistance = np.where(small, slope, loss / np.where(small, 1.0, m))
                offset = np.zeros_like(m)
                pump = self.is_pump
                resistance[pump] = slope[pump]
                offset[pump] = loss[pump] - slope[pump] * m[pump]
                dp = self._node_solve(resistance, offset)
                new = (dp - offset) / resistance
                m = new if k == 0 else 0.5 * (m + new)
            # the averaged flows must balance at the nodes before Newton starts
            loss, slope = links(m, opening)
            dp = self._node_solve(slope, loss - slope * m)
            m = m + (dp - loss) / slope
        else:
            m = np.array(start_kg_s, dtype=float)
        for iteration in range(1, FLOW_MAX_ITER + 1):
            loss, slope = links(m, opening)
            # Newton: loss + slope dm = A^T p with A (m + dm) = 0
            dp = self._node_solve(slope, loss - slope * m)
            step = (dp - loss) / slope
            m = m + step
            if np.max(np.abs(step)) <= FLOW_STEP_RTOL * np.max(np.abs(m)):
                self.iterations += iteration
                return m
        raise ConvergenceError(
            "baseline flow solve did not converge", iterations=FLOW_MAX_ITER
        )


def _characteristic_W(nominal_W, exponent, excess_K):
    """EN 442 characteristic, odd in the excess. [W]"""
    ratio = excess_K / NOMINAL_EXCESS_K
    return nominal_W * np.sign(ratio) * np.abs(ratio) ** exponent


def _log_mean_u(ratio, exponent):
    """``u`` with ``u^n (1 - e^-u)^(1-n) = ratio``, vectorised Newton in u. [-]

    Started at ``max(ratio, ratio^(1/n))``, right of the root, where Newton on
    this increasing convex function converges from above.
    """
    u = np.maximum(ratio, ratio ** (1.0 / exponent))
    for _ in range(200):
        g = u**exponent * (-np.expm1(-u)) ** (1.0 - exponent) - ratio
        dg = (
            u**exponent
            * (-np.expm1(-u)) ** (1.0 - exponent)
            * (exponent / u + (1.0 - exponent) * np.exp(-u) / (-np.expm1(-u)))
        )
        step = g / dg
        u = u - step
        if np.all(np.abs(step) <= 1e-15 * u):
            break
    return u


class PurePythonWarmUp:
    """The warm-up right-hand side in plain numpy, on a WarmUpModel's arrays."""

    def __init__(self, wm: WarmUpModel) -> None:
        self.wm = wm
        m = wm.model
        net = wm.network
        self.flow_solver = PurePythonFlows(net)
        self.last_flows = None
        self.n_flow_solves = 0
        self.link_of_cell = np.asarray(m.cell_link, dtype=np.int64)
        first = np.asarray(m.link_cell_start, dtype=np.int64)
        count = np.asarray(m.link_cell_count, dtype=np.int64)
        last = first + count - 1
        self.link_first, self.link_last = first, last
        k = np.arange(m.n_cells)
        self.is_first = k == first[self.link_of_cell]
        self.is_last = k == last[self.link_of_cell]
        self.prev_cell = np.where(self.is_first, k, k - 1)
        self.next_cell = np.where(self.is_last, k, k + 1)
        self.emitter = np.flatnonzero(m.cell_kind == CELL_EMITTER)
        self.pipe = np.flatnonzero((m.cell_kind == CELL_PIPE) & (m.cell_loss_W_K > 0))
        self.pipe_room = m.cell_room[self.pipe]
        self.pipe_in_room = self.pipe_room >= 0
        self.pump_links = wm.network.pump_links()
        # Each radiator's cells in flow order from_node -> to_node (between the
        # link's two pipe half-cells), its rating and exponent.
        links = net.emitter_links()
        self.radiator_link = links
        self.radiator_cells = [np.arange(first[link] + 1, last[link]) for link in links]
        self.radiator_nominal_W = np.array(
            [em.nominal_power_W for em in wm.scenario.emitters]
        )
        self.radiator_exponent = np.array([em.exponent for em in wm.scenario.emitters])

    def emitter_cells_W(self, cells, air, flow) -> np.ndarray:
        """Output of every radiator cell (in ``self.emitter`` order) by the cell law.

        Each cell emits ``m cp (a - S) + Phi(b) - Phi(S)``: ``a`` the excess of
        the water flowing in, ``b`` its own, ``S`` the steady outlet of the cell
        from ``S^(1-n) = a^(1-n) + (n-1) c k`` with ``k = Phi_n / (N m cp
        dT_n^n)`` and ``c`` such that N cells give the EN 442 log-mean outlet of
        the radiator: ``c = expm1((n-1) u) / ((n-1) R)``, ``u^n (1 - e^-u)^(1-n)
        = R``, ``R = Phi(a_in) / (m cp a_in)`` (held at CHAIN_RATIO_CAP).
        Without flow, ``Phi(b)``. Vectorised over radiators.
        """
        m = self.wm.model
        n = self.radiator_exponent
        flows = flow[self.radiator_link]
        mass = np.abs(flows)
        q_by_cell = {}
        share = self.radiator_nominal_W / [len(c) for c in self.radiator_cells]
        rooms = np.array([m.cell_room[c[0]] for c in self.radiator_cells])
        inlet_cells = np.array(
            [
                c[0] - 1 if f >= 0.0 else c[-1] + 1
                for c, f in zip(self.radiator_cells, flows, strict=True)
            ]
        )
        a_in = cells[inlet_cells] - air[rooms]
        with np.errstate(divide="ignore", invalid="ignore"):
            k = self.radiator_nominal_W / (
                np.array([len(c) for c in self.radiator_cells])
                * mass
                * WATER_CP_J_KG_K
                * NOMINAL_EXCESS_K**n
            )
            ratio = np.minimum(
                np.array([len(c) for c in self.radiator_cells])
                * k
                * np.abs(a_in) ** (n - 1.0),
                CHAIN_RATIO_CAP,
            )
        usable = (mass > 0.0) & (ratio > 0.0)
        u = np.where(usable, _log_mean_u(np.where(usable, ratio, 1.0), n), 0.0)
        with np.errstate(divide="ignore", invalid="ignore"):
            c = np.where(usable, np.expm1((n - 1.0) * u) / ((n - 1.0) * ratio), 1.0)
        for i, chain in enumerate(self.radiator_cells):
            order = chain if flows[i] >= 0.0 else chain[::-1]
            upstream = a_in[i]
            for cell in order:
                b = cells[cell] - air[rooms[i]]
                own = _characteristic_W(share[i], n[i], b)
                if mass[i] == 0.0:
                    q_by_cell[cell] = own
                else:
                    if upstream == 0.0:
                        s_out = 0.0
                    else:
                        s_out = np.sign(upstream) * (
                            abs(upstream) ** (1.0 - n[i]) + (n[i] - 1.0) * c[i] * k[i]
                        ) ** (-1.0 / (n[i] - 1.0))
                    q_by_cell[cell] = (
                        mass[i] * WATER_CP_J_KG_K * (upstream - s_out)
                        + own
                        - _characteristic_W(share[i], n[i], s_out)
                    )
                upstream = b
        return np.array([q_by_cell[cell] for cell in self.emitter])

    def flows(self, y: np.ndarray, seg) -> np.ndarray:
        """Link mass flows [kg/s] for state ``y``; zero when the pump is off."""
        wm = self.wm
        m = wm.model
        net = wm.network
        if not seg.circulating:
            self.last_flows = None
            return np.zeros(net.n_links)
        cells = y[wm.slices["cells"]]
        link_temp = np.add.reduceat(cells, m.link_cell_start) / m.link_cell_count
        link_temp = np.clip(link_temp, 0.0, 100.0)
        opening = seg.link_opening.copy()
        opening[m.sensor_link] *= thermostatic_opening(
            y[wm.slices["sensors"]], seg.setpoints_C, m.sensor_band_K
        )
        flows = self.flow_solver.solve(
            link_temp, opening, seg.pump_speed, self.last_flows
        )
        self.n_flow_solves += 1
        self.last_flows = flows
        return flows

    def rhs(self, t: float, y: np.ndarray, seg) -> np.ndarray:
        """Time derivative of the state, as the compiled ``warmup_rhs``."""
        wm = self.wm
        m = wm.model
        net = wm.network
        s = wm.slices
        cells = y[s["cells"]]
        air = y[s["air"]]
        structure = y[s["structure"]]
        sensors = y[s["sensors"]]
        flow = self.flows(y, seg)
        n_nodes = net.n_nodes

        # node mixing by mass flow, with a tiny flow from every link end
        t_first, t_last = cells[self.link_first], cells[self.link_last]
        into_to = np.maximum(flow, 0.0)
        into_from = np.maximum(-flow, 0.0)
        num = np.bincount(
            net.to_node, MIXING_EPS_KG_S * t_last + into_to * t_last, n_nodes
        ) + np.bincount(
            net.from_node, MIXING_EPS_KG_S * t_first + into_from * t_first, n_nodes
        )
        den = np.bincount(net.to_node, MIXING_EPS_KG_S + into_to, n_nodes) + (
            np.bincount(net.from_node, MIXING_EPS_KG_S + into_from, n_nodes)
        )
        node_temp = num / den

        # upwind transport along every link's cells
        cell_flow = flow[self.link_of_cell]
        forward = cell_flow >= 0.0
        upstream = np.where(
            forward,
            np.where(
                self.is_first,
                node_temp[net.from_node[self.link_of_cell]],
                cells[self.prev_cell],
            ),
            np.where(
                self.is_last,
                node_temp[net.to_node[self.link_of_cell]],
                cells[self.next_cell],
            ),
        )
        dH = np.abs(cell_flow) * WATER_CP_J_KG_K * (upstream - cells)

        # the source: flow-temperature control under a smooth power limit
        source_W = electric_W = 0.0
        inlet_C = node_temp[net.from_node[wm.source_link]]
        if m.source_buffer_cell >= 0:  # a buffer tank ahead of the heated cells
            inlet_C = cells[m.source_buffer_cell]
        outlet_C = cells[m.source_cells[-1]]
        if seg.heating:
            src = wm.scenario.source
            outdoor_C = controls.outdoor_temp_C(wm.scenario, t)
            limit_W = src.max_power_W
            if src.heat_pump is not None:
                limit_W = self.heat_pump_rating(
                    src.heat_pump.capacity_W, outdoor_C, outlet_C
                )
            flow_temp = controls.flow_temp_setpoint_C(wm.scenario, t)
            demand = max(flow[wm.source_link], 0.0) * WATER_CP_J_KG_K * (
                flow_temp - inlet_C
            ) + wm.source_capacity_J_K / controls.SOURCE_CONTROL_TIME_S * (
                flow_temp - outlet_C
            )
            width = controls.SOURCE_LIMIT_SMOOTHING * src.max_power_W
            low = 0.5 * (demand + math.sqrt(demand * demand + width * width))
            d = limit_W - low
            source_W = limit_W - 0.5 * (d + math.sqrt(d * d + width * width))
            if src.heat_pump is not None:
                source_W *= self.min_flow_share(flow[wm.source_link])
                cop = self.heat_pump_rating(src.heat_pump.cop, outdoor_C, outlet_C)
                electric_W = source_W / cop
            dH[m.source_cells] += source_W / len(m.source_cells)

        # emitters: the chain's cell law at each radiator's flow, and pipe losses
        e = self.emitter
        room = m.cell_room[e]
        q_emit = self.emitter_cells_W(cells, air, flow)
        dH[e] -= q_emit
        p = self.pipe
        around = np.where(
            self.pipe_in_room,
            air[np.maximum(self.pipe_room, 0)],
            wm.scenario.route.unheated_space_temp_C,
        )
        q_pipe = m.cell_loss_W_K[p] * (cells[p] - around)
        dH[p] -= q_pipe
        n_rooms = m.n_rooms
        conv = m.cell_convective[e]
        q_air = np.bincount(room, conv * q_emit, n_rooms) + np.bincount(
            self.pipe_room[self.pipe_in_room], q_pipe[self.pipe_in_room], n_rooms
        )
        q_structure = np.bincount(room, (1.0 - conv) * q_emit, n_rooms)

        # rooms: air and structure nodes, internal walls
        outdoor = controls.outdoor_temp_C(wm.scenario, t)
        coupling = m.room_air_structure_W_K * (structure - air)
        heat_air = (
            m.room_air_loss_W_K * (outdoor - air) + coupling + m.room_gains_W + q_air
        )
        heat_structure = (
            m.room_structure_loss_W_K * (outdoor - structure) - coupling + q_structure
        )
        wall = np.asarray(m.wall_W_K) * (air[m.wall_b] - air[m.wall_a])
        heat_air += np.bincount(m.wall_a, wall, n_rooms) - np.bincount(
            m.wall_b, wall, n_rooms
        )

        dy = np.empty_like(y)
        dy[s["cells"]] = dH / m.cell_capacity_J_K
        dy[s["air"]] = heat_air / m.room_air_capacity_J_K
        dy[s["structure"]] = heat_structure / m.room_structure_capacity_J_K
        dy[s["sensors"]] = (air[m.sensor_room] - sensors) / m.sensor_time_constant_s
        unheated = q_pipe[~self.pipe_in_room].sum()
        counters = (source_W, q_emit.sum(), q_pipe.sum(), unheated, electric_W)
        dy[s["energy"]] = counters[: m.n_energy]
        return dy

    def heat_pump_rating(self, table, outdoor_C: float, flow_C: float) -> float:
        """A heat pump's rating-table value, bilinear, held at the table's edges.

        scipy's ``RegularGridInterpolator`` (linear on a rectangular grid is
        bilinear) at the point clamped into the table.
        """
        hp = self.wm.scenario.source.heat_pump
        axes = (hp.outdoor_temp_C, hp.flow_temp_C)
        point = [np.clip(outdoor_C, axes[0][0], axes[0][-1]),
                 np.clip(flow_C, axes[1][0], axes[1][-1])]  # fmt: skip
        return float(RegularGridInterpolator(axes, table)(point)[0])

    def min_flow_share(self, flow_kg_s: float) -> float:
        """Share of its output a heat pump gives at a flow (smoothstep cut-off).

        Zero at or below 80 % of the minimum flow, one at or above it, the
        cubic 3 s^2 - 2 s^3 between (s the fraction of the way up).
        """
        minimum = self.wm.scenario.source.heat_pump.min_flow_m3_s * WATER_DENSITY_KG_M3
        if minimum <= 0.0:
            return 1.0
        s = np.clip((flow_kg_s - 0.8 * minimum) / (0.2 * minimum), 0.0, 1.0)
        return float(s * s * (3.0 - 2.0 * s))


def integrate_baseline(
    scenario: Scenario, scheme: str, *, method: str = "BDF", rtol: float | None = None
) -> Solution:
    """Integrate the warm-up with the pure-Python right-hand side.

    The ``solve_ivp`` settings are those of
    :func:`simheat.dynamics.integrate.integrate` (its loop, repeated here with
    the right-hand side swapped); no valve events, the scenario's pump stop.
    The run starts where the compiled one does: from the given state, or at
    the start of the night from the steady evening, which the compiled model
    solves for (an input here, like the model's arrays; its time is not
    counted in ``wall_time_s``).
    """
    stop = controls.pump_stop_time_s(scenario, None)
    wm = WarmUpModel(scenario, scheme, (), stop)
    baseline = PurePythonWarmUp(wm)
    rtol = scenario.simulation.rtol if rtol is None else rtol
    atol = np.full(wm.model.n_states, 10.0 * rtol)
    atol[wm.slices["energy"]] = 1.0
    y = wm.initial_state(atol)
    sparsity = wm.jacobian_sparsity()
    edges = controls.segment_edges_s(scenario, (), stop, start_s=wm.start_s)
    segments = []
    n_rhs = n_jac = 0
    started = time.perf_counter()
    for start, end in zip(edges[:-1], edges[1:], strict=True):
        seg = wm.segment(start, end)
        result = solve_ivp(
            baseline.rhs,
            (start, end),
            y,
            method=method,
            rtol=rtol,
            atol=atol,
            dense_output=True,
            args=(seg,),
            jac_sparsity=sparsity,
        )
        if not result.success:
            raise ConvergenceError(
                f"baseline integration failed at t = {result.t[-1]:.0f} s: "
                f"{result.message}",
                iterations=int(result.nfev),
            )
        segments.append((seg, result.sol))
        n_rhs += result.nfev
        n_jac += result.njev
        y = result.y[:, -1]
    solution = Solution(wm, segments, time.perf_counter() - started, n_rhs, n_jac)
    solution.baseline_flow_solves = baseline.n_flow_solves
    return solution


def times_to_setpoint_s(solution: Solution) -> dict[str, tuple]:
    """Air and operative time to setpoint of each room from a solution's dense output.

    The same root finding on the same output grid as :func:`simulate`; times in
    seconds from the start of comfort, ``None`` when a room never gets there.
    """
    wm = solution.model
    scenario = wm.scenario
    sim = scenario.simulation
    n_steps = int(round(sim.duration_s / sim.output_step_s))
    time_s = np.union1d(
        np.linspace(0.0, sim.duration_s, n_steps + 1),
        [scenario.schedule.comfort_start_s],
    )
    states = solution.state_at(time_s)
    s = wm.slices
    air = states[:, s["air"]]
    structure = states[:, s["structure"]]

    def air_at(t, room):
        return float(solution.state_at([t])[0, s["air"].start + room])

    def operative_at(t, room):
        y = solution.state_at([t])[0]
        return float(
            operative_temp_C(y[s["air"].start + room], y[s["structure"].start + room])
        )

    rooms = metrics.room_results(
        scenario, time_s, air, operative_temp_C(air, structure), air_at, operative_at
    )
    return {r.id: (r.time_to_setpoint_s, r.time_to_setpoint_operative_s) for r in rooms}


__all__ = [
    "PurePythonFlows",
    "PurePythonWarmUp",
    "integrate_baseline",
    "times_to_setpoint_s",
]
