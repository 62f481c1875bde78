"""Steady flow split of a closed heating network: link flows and node pressures.

The Python layer validates the network once per topology (:class:`FlowSolver`),
orders its nodes (reverse Cuthill-McKee), packs the link data into flat arrays,
and per solve only checks the shapes of its inputs and hands plain arrays to
compiled code in :mod:`simheat.hydraulics._kernels`, which checks their values
(Python builds a message only for a bad one) and runs the global gradient
solver. It never returns a result that has not converged: it raises
:class:`~simheat.errors.ConvergenceError` naming the worst node or link instead.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components, reverse_cuthill_mckee

from simheat.errors import ConvergenceError, ScenarioError
from simheat.hydraulics import _kernels
from simheat.hydraulics.network import PUMP_MODE_NAMES, Network
from simheat.hydraulics.still import bridges, moving_part
from simheat.physics._kernels import (
    PUMP_MODE_FIXED_SPEED,
    regulated_pump_rise_Pa,
    water_density_kg_m3,
)
from simheat.physics.pump import control_flow_m3_s

# Flow at which a cold start takes secant link resistances: about 180 L/h, the
# order of a house heating circuit's flow (common trade practice). [kg/s]
COLD_START_FLOW_KG_S = 0.05
# Smallest link slope dF/dm used in a Newton step. Far below any real part (a 1 m
# run of 100 mm tube in laminar flow has about 0.2 Pa s/kg); it only keeps the
# step finite where a quadratic law has zero slope at zero flow. [Pa s/kg]
SLOPE_FLOOR_PA_S_KG = 1e-3
# Mass balance after a converged solve must hold to this fraction of the largest
# link flow (round-off of summing the flows at a node). [-]
MASS_BALANCE_RTOL = 1e-12

__all__ = ["FlowSolver", "Flows", "pump_duty_points", "solve_flows"]


@dataclass(frozen=True, eq=False)
class Flows:
    """Converged flow split of a network at one operating point.

    Attributes
    ----------
    mass_flow_kg_s : ndarray
        Signed mass flow per link, positive from ``from_node`` to ``to_node``.
        [kg/s]
    pressure_Pa : ndarray
        Gauge pressure per node, zero at the reference node. [Pa]
    iterations : int
        Laplacian factorizations used (linear start included). [-]
    max_imbalance_kg_s : float
        Largest net mass flow out of any node. [kg/s]
    max_residual_Pa : float
        Largest link equation residual; when the solve ended on a tiny Newton
        step, the estimate of the residual that step leaves (see
        :meth:`FlowSolver.solve`). [Pa]
    water_temp_C : ndarray
        Water temperature per link used in the solve. [°C]
    valve_opening : ndarray
        Valve opening per link used in the solve. [-]
    pump_speed : ndarray
        Pump speed ratio per link used in the solve (the maximum speed of a
        regulated pump). [-]
    link_names : tuple of str
        Link names of the network.
    link_evaluations : int
        Evaluations of every link law, the main cost of a solve. [-]
    """

    mass_flow_kg_s: np.ndarray
    pressure_Pa: np.ndarray
    iterations: int
    max_imbalance_kg_s: float
    max_residual_Pa: float
    water_temp_C: np.ndarray
    valve_opening: np.ndarray
    pump_speed: np.ndarray
    link_names: tuple[str, ...]
    link_evaluations: int = 0

    def _link_index(self, link: int | str) -> int:
        if isinstance(link, str):
            try:
                return self.link_names.index(link)
            except ValueError:
                raise ScenarioError(f"no link named {link!r}") from None
        index = int(link)
        if not 0 <= index < len(self.link_names):
            raise ScenarioError(
                f"link index must be in 0..{len(self.link_names) - 1}, got {index}"
            )
        return index

    def volume_flow_m3_h(self, link: int | str) -> float:
        """Volume flow of one link at its water temperature.

        Parameters
        ----------
        link : int or str
            Link index or link name. [-]

        Returns
        -------
        float
            Signed volume flow. [m3/h]

        Raises
        ------
        ScenarioError
            When no such link exists.
        """
        k = self._link_index(link)
        rho = water_density_kg_m3(float(self.water_temp_C[k]))
        return float(self.mass_flow_kg_s[k]) / rho * 3600.0


def _per_link(value, n_links: int, name: str, default: float | None) -> np.ndarray:
    if value is None:
        return np.full(n_links, default, dtype=np.float64)
    arr = np.asarray(value, dtype=np.float64)
    if arr.ndim == 0:
        return np.full(n_links, float(arr), dtype=np.float64)
    if arr.shape != (n_links,):
        raise ScenarioError(
            f"{name} must be a number or one value per link ({n_links}), "
            f"got shape {arr.shape}"
        )
    return np.ascontiguousarray(arr)


# Stands for "no per-link values" in the compiled loaders.
_NO_VALUES = np.zeros(0)


def _operating_value(value, name, names, default, lo, hi):
    """One operating-point quantity as ``(per-link values or empty, single value)``.

    A single number is checked here; per-link values are checked by the
    compiled loader (:func:`simheat.hydraulics._kernels.load_operating_point`),
    and only a bad one pays for building its message.
    """
    if value is None:
        if default is None:
            raise ScenarioError(
                f"{name} must be a number or one value per link ({len(names)}), "
                "got None"
            )
        return _NO_VALUES, default
    if isinstance(value, float | int):
        v = float(value)
        if not (lo <= v <= hi and math.isfinite(v)):
            raise ScenarioError(f"{name} must be in [{lo:g}, {hi:g}], got {v!r}")
        return _NO_VALUES, v
    arr = np.asarray(value, dtype=np.float64)
    if arr.ndim == 0:
        return _operating_value(float(arr), name, names, default, lo, hi)
    if arr.shape != (len(names),):
        raise ScenarioError(
            f"{name} must be a number or one value per link ({len(names)}), "
            f"got shape {arr.shape}"
        )
    return np.ascontiguousarray(arr), 0.0


def _check_link_arrays(network: Network) -> None:
    n_links = network.n_links
    for field in (
        "from_node",
        "to_node",
        "length_m",
        "inner_diameter_m",
        "roughness_m",
        "zeta",
        "kv_m3_h",
        "check_valve",
        "pump_mode",
        "pump_setpoint_Pa",
    ):
        if np.shape(getattr(network, field)) != (n_links,):
            raise ScenarioError(
                f"network.{field} must have one entry per link ({n_links}), "
                f"got shape {np.shape(getattr(network, field))}"
            )
    if np.shape(network.pump_coeffs) != (n_links, 3):
        raise ScenarioError(
            f"network.pump_coeffs must have shape ({n_links}, 3), "
            f"got {np.shape(network.pump_coeffs)}"
        )


def _validate_pumps(network: Network) -> None:
    """Pump curves must fall with flow; regulated pumps need a reachable set head."""
    names = network.link_names
    coeffs = np.asarray(network.pump_coeffs, dtype=np.float64)
    if not np.all(np.isfinite(coeffs)):
        k = int(np.flatnonzero(~np.all(np.isfinite(coeffs), axis=1))[0])
        raise ScenarioError(f"pump curve of link {names[k]!r} is not finite")
    modes = np.asarray(network.pump_mode)
    setpoints = np.asarray(network.pump_setpoint_Pa, dtype=np.float64)
    for k in range(network.n_links):
        a0, a1, a2 = coeffs[k]
        mode = int(modes[k])
        if mode not in PUMP_MODE_NAMES:
            raise ScenarioError(
                f"pump_mode of link {names[k]!r} must be one of "
                f"{sorted(PUMP_MODE_NAMES)} ({', '.join(PUMP_MODE_NAMES.values())}), "
                f"got {mode}"
            )
        if not (a0 != 0.0 or a1 != 0.0 or a2 != 0.0):
            if mode != PUMP_MODE_FIXED_SPEED:
                raise ScenarioError(
                    f"link {names[k]!r} has pump_mode {PUMP_MODE_NAMES[mode]!r} "
                    "but no pump curve"
                )
            continue
        if a0 < 0.0:
            raise ScenarioError(
                f"pump curve of link {names[k]!r} has a negative shut-off head "
                f"({a0 / 1e3:g} kPa)"
            )
        if not (a2 < 0.0 or (a2 == 0.0 and a1 < 0.0)):
            raise ScenarioError(
                f"pump curve of link {names[k]!r} does not fall with flow "
                f"(a1 = {a1:g} Pa s/m3, a2 = {a2:g} Pa s2/m6): its head must drop "
                "as the flow rises"
            )
        if mode != PUMP_MODE_FIXED_SPEED:
            setpoint = float(setpoints[k])
            if not (np.isfinite(setpoint) and 0.0 < setpoint < a0):
                raise ScenarioError(
                    f"pump_setpoint_Pa of link {names[k]!r} "
                    f"({PUMP_MODE_NAMES[mode]}) must lie between 0 and the pump's "
                    f"shut-off head {a0 / 1e3:g} kPa, got {setpoint / 1e3:g} kPa"
                )


def _dead_end_links(network: Network) -> list[int]:
    """Links on no closed loop (bridges of the multigraph, :func:`bridges`).

    A bridge carries no flow in any steady state: every unit of water that
    crossed it would have to come back the same way.
    """
    ends = [
        (int(f), int(t))
        for f, t in zip(network.from_node, network.to_node, strict=True)
    ]
    return bridges(network.n_nodes, ends)


def _validate_topology(network: Network) -> None:
    n_nodes, n_links = network.n_nodes, network.n_links
    names, nodes = network.link_names, network.node_names
    if n_nodes < 2 or n_links < 1:
        raise ScenarioError(
            f"network {network.scheme!r} needs at least 2 nodes and 1 link, "
            f"got {n_nodes} nodes and {n_links} links"
        )
    if not 0 <= network.reference_node < n_nodes:
        raise ScenarioError(
            f"reference_node must be in 0..{n_nodes - 1}, got {network.reference_node}"
        )
    _check_link_arrays(network)
    for k in range(n_links):
        f, t = int(network.from_node[k]), int(network.to_node[k])
        if not (0 <= f < n_nodes and 0 <= t < n_nodes):
            raise ScenarioError(
                f"link {names[k]!r} joins nodes {f} and {t}; nodes are 0..{n_nodes - 1}"
            )
        if f == t:
            raise ScenarioError(f"link {names[k]!r} joins node {nodes[f]!r} to itself")
    for field, unit in (
        ("length_m", "m"),
        ("roughness_m", "m"),
        ("zeta", "-"),
        ("kv_m3_h", "m3/h"),
    ):
        values = np.asarray(getattr(network, field), dtype=np.float64)
        bad = ~(np.isfinite(values) & (values >= 0.0))
        if np.any(bad):
            k = int(np.flatnonzero(bad)[0])
            raise ScenarioError(
                f"{field} of link {names[k]!r} must be >= 0 [{unit}], got {values[k]!r}"
            )
    _validate_pumps(network)
    for k in range(n_links):
        length, zeta = network.length_m[k], network.zeta[k]
        d = network.inner_diameter_m[k]
        if (length > 0.0 or zeta > 0.0) and not (np.isfinite(d) and d > 0.0):
            raise ScenarioError(
                f"inner_diameter_m of link {names[k]!r} must be > 0 [m] where the "
                f"link has a pipe or local losses, got {d!r}"
            )
        a2 = network.pump_coeffs[k, 2]
        has_pipe_or_valve = length > 0.0 or zeta > 0.0 or network.kv_m3_h[k] > 0.0
        if not has_pipe_or_valve and not (a2 < 0.0):
            raise ScenarioError(
                f"link {names[k]!r} has no flow resistance (length 0, zeta 0, no valve"
                + (
                    ", pump curve without a falling a2 term"
                    if np.any(network.pump_coeffs[k] != 0.0)
                    else ", no pump"
                )
                + "): give it a pipe length, a zeta or a valve Kv"
            )
    graph = coo_matrix(
        (np.ones(n_links), (network.from_node, network.to_node)),
        shape=(n_nodes, n_nodes),
    )
    n_parts, label = connected_components(graph, directed=False)
    if n_parts > 1:
        cut_off = [
            nodes[n]
            for n in range(n_nodes)
            if label[n] != label[network.reference_node]
        ]
        shown = ", ".join(repr(x) for x in cut_off[:5])
        more = f" and {len(cut_off) - 5} more" if len(cut_off) > 5 else ""
        raise ScenarioError(
            f"network {network.scheme!r} is not connected: node(s) {shown}{more} "
            f"cannot be reached from the reference node "
            f"{nodes[network.reference_node]!r}"
        )
    dead = _dead_end_links(network)
    if dead:
        shown = ", ".join(repr(names[k]) for k in dead[:5])
        more = f" and {len(dead) - 5} more" if len(dead) > 5 else ""
        raise ScenarioError(
            f"network {network.scheme!r} has link(s) {shown}{more} on no closed "
            "loop: water that goes through cannot come back another way, so no "
            "flow can circulate there; close the loop or remove the branch"
        )


def _node_ordering(network: Network) -> tuple[np.ndarray, int]:
    """Reverse Cuthill-McKee position of every node, and the half bandwidth."""
    n_nodes = network.n_nodes
    ref = network.reference_node
    keep = np.array([n for n in range(n_nodes) if n != ref], dtype=np.int64)
    reduced_index = np.full(n_nodes, -1, dtype=np.int64)
    reduced_index[keep] = np.arange(n_nodes - 1)
    f = reduced_index[network.from_node]
    t = reduced_index[network.to_node]
    both = (f >= 0) & (t >= 0)
    graph = coo_matrix(
        (np.ones(int(both.sum())), (f[both], t[both])),
        shape=(n_nodes - 1, n_nodes - 1),
    ).tocsr()
    graph = graph + graph.T
    order = reverse_cuthill_mckee(graph, symmetric_mode=True)
    position_in_reduced = np.empty(n_nodes - 1, dtype=np.int64)
    position_in_reduced[order] = np.arange(n_nodes - 1)
    position = np.full(n_nodes, -1, dtype=np.int64)
    position[keep] = position_in_reduced
    pf, pt = position[network.from_node], position[network.to_node]
    both = (pf >= 0) & (pt >= 0)
    half_bandwidth = int(np.max(np.abs(pf[both] - pt[both]), initial=0))
    return position, half_bandwidth


def link_data(network: Network) -> np.ndarray:
    """Static per-link data of a validated network, rows ``_kernels.D_*``.

    Parameters
    ----------
    network : Network
        A network that passed :class:`FlowSolver`'s checks. [-]

    Returns
    -------
    ndarray, shape (_kernels.N_DATA_ROWS, n_links)
        Pipe, valve, check-valve and pump data, with the proportional-pressure
        control flow [m3/s] and the Colebrook-White friction at Re 4000. [SI]
    """
    k_ = _kernels
    data = np.zeros((k_.N_DATA_ROWS, network.n_links))
    data[k_.D_LENGTH] = network.length_m
    data[k_.D_DIAMETER] = network.inner_diameter_m
    data[k_.D_ROUGHNESS] = network.roughness_m
    data[k_.D_ZETA] = network.zeta
    data[k_.D_KV] = network.kv_m3_h
    coeffs = np.asarray(network.pump_coeffs, dtype=np.float64)
    data[k_.D_A0], data[k_.D_A1], data[k_.D_A2] = coeffs.T
    data[k_.D_CHECK] = np.asarray(network.check_valve, dtype=bool)
    data[k_.D_MODE] = network.pump_mode
    data[k_.D_SETPOINT] = network.pump_setpoint_Pa
    for k in np.flatnonzero(np.asarray(network.pump_mode) != PUMP_MODE_FIXED_SPEED):
        a0, a1, a2 = coeffs[k]
        data[k_.D_CONTROL_FLOW, k] = control_flow_m3_s(
            a0, a1, a2, float(network.pump_setpoint_Pa[k])
        )
    k_.onset_friction(
        data[k_.D_LENGTH].copy(),
        data[k_.D_DIAMETER].copy(),
        data[k_.D_ROUGHNESS].copy(),
        data[k_.D_F_ONSET],
        data[k_.D_DF_ONSET],
    )
    return data


class FlowSolver:
    """Reusable flow solver for one network: checks, ordering and workspaces kept.

    Parameters
    ----------
    network : Network
        The closed network to solve. [-]

    Raises
    ------
    ScenarioError
        When the network is not connected, has a link on no closed loop (a dead
        end), a link joining a node to itself, a link without flow resistance, a
        pipe without a positive diameter, a pump curve that does not fall with
        flow, or a regulated pump whose set head its curve cannot deliver.

    Examples
    --------
    >>> solver = FlowSolver(network)  # doctest: +SKIP
    >>> flows = solver.solve(water_temp_C=70.0)  # doctest: +SKIP
    """

    def __init__(self, network: Network) -> None:
        _check_link_arrays(network)
        self.network = network
        # Shut links and those they leave on no closed loop carry no water:
        # the solve runs on the rest (see simheat.hydraulics.still).
        self.part = moving_part(network)
        network = self._net = self.part.network
        _validate_topology(network)
        n_nodes, n_links = network.n_nodes, network.n_links
        self._from = np.ascontiguousarray(network.from_node, dtype=np.int64)
        self._to = np.ascontiguousarray(network.to_node, dtype=np.int64)
        self._data = link_data(network)
        coeffs = np.asarray(network.pump_coeffs, dtype=np.float64)
        self._pump_links = np.flatnonzero(np.any(coeffs != 0.0, axis=1))
        self._pump_a0 = np.ascontiguousarray(coeffs[self._pump_links, 0])
        self.node_position, self.half_bandwidth = _node_ordering(network)
        self._band = np.zeros((n_nodes - 1, self.half_bandwidth + 1))
        self._operating = np.zeros((_kernels.N_OP_ROWS, n_links))
        self._coef = np.zeros((_kernels.N_COEF_ROWS, n_links))
        self._work_links = _kernels.new_link_workspace(n_links)
        self._work_nodes = np.zeros((_kernels.N_NODE_ROWS, n_nodes))
        self._flow = np.zeros(n_links)
        self._pressure = np.zeros(n_nodes)
        self._last_flow: np.ndarray | None = None
        self._last_pressure: np.ndarray | None = None
        self._last_whole_flow: np.ndarray | None = None
        # The operating point of the last solve (NaN: none), and its read-only
        # copy that every Flows of that point shares (None: to be made).
        self._operating_seen = np.full((_kernels.N_OP_ROWS, n_links), np.nan)
        self._operating_copy: tuple[np.ndarray, ...] | None = None

    def solve(
        self,
        *,
        water_temp_C: float | np.ndarray = 70.0,
        valve_opening: np.ndarray | None = None,
        pump_speed: np.ndarray | None = None,
        initial_mass_flow_kg_s: np.ndarray | None = None,
        initial_pressure_Pa: np.ndarray | None = None,
        tol_kg_s: float = 1e-9,
        tol_Pa: float = 1e-6,
        max_iter: int = 50,
    ) -> Flows:
        """Solve the flow split at one operating point.

        Parameters
        ----------
        water_temp_C : float or ndarray
            Water temperature, one value or one per link, 0-100 °C. [°C]
        valve_opening : ndarray or None
            Valve opening per link, 0 closed to 1 open; default all open. [-]
        pump_speed : ndarray or None
            Speed ratio per link (only pump links matter; for a regulated pump
            its maximum speed); default 1. [-]
        initial_mass_flow_kg_s : ndarray or None
            Warm-start flows per link (for example a previous solution); None
            starts from rest with a linearised solve. [kg/s]
        initial_pressure_Pa : ndarray or None
            Node pressures that go with ``initial_mass_flow_kg_s`` (a previous
            solution's ``pressure_Pa``). When omitted and the warm-start flows
            are this solver's last result, its pressures are used. [Pa]
        tol_kg_s : float
            Tolerance on the largest node mass imbalance. [kg/s]
        tol_Pa : float
            Tolerance on the largest link equation residual. [Pa]
        max_iter : int
            Most Laplacian factorizations. [-]

        Returns
        -------
        Flows
            Converged link flows and node pressures of the whole network:
            exactly zero flow in the links that stand still (shut, or left on
            no closed loop by shut ones, :mod:`simheat.hydraulics.still`).

        Raises
        ------
        ScenarioError
            Bad operating point: temperatures outside 0-100 °C, openings outside
            [0, 1], negative speeds, no running pump, wrong array shapes.
        ConvergenceError
            When Newton's method does not meet both tolerances; names the worst
            node or link and its residual.

        Notes
        -----
        The links that can carry water are solved by :meth:`_solve_moving`
        (the global gradient algorithm); the others are given zero flow and
        the pressure of the moving node they hang from.
        """
        part = self.part
        settings = {"tol_kg_s": tol_kg_s, "tol_Pa": tol_Pa, "max_iter": max_iter}
        if part.is_whole:
            return self._solve_moving(
                water_temp_C=water_temp_C,
                valve_opening=valve_opening,
                pump_speed=pump_speed,
                initial_mass_flow_kg_s=initial_mass_flow_kg_s,
                initial_pressure_Pa=initial_pressure_Pa,
                **settings,
            )
        whole = self.network
        per_link = {}
        for name, value, default in (
            ("water_temp_C", water_temp_C, None),
            ("valve_opening", valve_opening, 1.0),
            ("pump_speed", pump_speed, 1.0),
        ):
            per_link[name] = (
                value
                if value is None or np.ndim(value) == 0
                else _per_link(value, whole.n_links, name, default)
            )
        flow_in, pressure_in = initial_mass_flow_kg_s, initial_pressure_Pa
        if flow_in is not None and flow_in is self._last_whole_flow:
            flow_in = self._last_flow  # the solver's own: its pressures follow
        elif flow_in is not None:
            flow_in = _per_link(flow_in, whole.n_links, "initial_mass_flow_kg_s", 0.0)
            flow_in = flow_in[part.links]
        if pressure_in is not None:
            pressure_in = np.asarray(pressure_in, dtype=np.float64)
            if pressure_in.shape != (whole.n_nodes,):
                raise ScenarioError(
                    f"initial_pressure_Pa must be {whole.n_nodes} finite node "
                    f"pressures, got shape {pressure_in.shape}"
                )
            pressure_in = pressure_in[part.nodes]
        moving = self._solve_moving(
            **{
                name: value
                if value is None or np.ndim(value) == 0
                else value[part.links]
                for name, value in per_link.items()
            },
            initial_mass_flow_kg_s=flow_in,
            initial_pressure_Pa=pressure_in,
            **settings,
        )
        flow = part.flows(moving.mass_flow_kg_s)
        pressure = part.pressures(moving.pressure_Pa)
        operating = []
        for name in ("water_temp_C", "valve_opening", "pump_speed"):
            value = per_link[name]
            row = np.empty(whole.n_links)
            row[:] = 1.0 if value is None else value  # None: open, full speed
            row[part.links] = getattr(moving, name)
            row.setflags(write=False)
            operating.append(row)
        for array in (flow, pressure):
            array.setflags(write=False)
        self._last_whole_flow = flow
        return Flows(
            mass_flow_kg_s=flow,
            pressure_Pa=pressure,
            iterations=moving.iterations,
            max_imbalance_kg_s=moving.max_imbalance_kg_s,
            max_residual_Pa=moving.max_residual_Pa,
            water_temp_C=operating[0],
            valve_opening=operating[1],
            pump_speed=operating[2],
            link_names=whole.link_names,
            link_evaluations=moving.link_evaluations,
        )

    def _solve_moving(
        self,
        *,
        water_temp_C: float | np.ndarray = 70.0,
        valve_opening: np.ndarray | None = None,
        pump_speed: np.ndarray | None = None,
        initial_mass_flow_kg_s: np.ndarray | None = None,
        initial_pressure_Pa: np.ndarray | None = None,
        tol_kg_s: float = 1e-9,
        tol_Pa: float = 1e-6,
        max_iter: int = 50,
    ) -> Flows:
        """Solve the flow split of the moving part at one operating point.

        Parameters
        ----------
        water_temp_C : float or ndarray
            Water temperature, one value or one per moving link. [°C]
        valve_opening : ndarray or None
            Valve opening per moving link; default all open. [-]
        pump_speed : ndarray or None
            Speed ratio per moving link; default 1. [-]
        initial_mass_flow_kg_s : ndarray or None
            Warm-start flows per moving link; None starts from rest. [kg/s]
        initial_pressure_Pa : ndarray or None
            Node pressures that go with ``initial_mass_flow_kg_s``. [Pa]
        tol_kg_s : float
            Tolerance on the largest node mass imbalance. [kg/s]
        tol_Pa : float
            Tolerance on the largest link equation residual. [Pa]
        max_iter : int
            Most Laplacian factorizations. [-]

        Returns
        -------
        Flows
            Converged link flows and node pressures of the moving part.

        Raises
        ------
        ScenarioError
            Bad operating point: temperatures outside 0-100 °C, openings outside
            [0, 1], negative speeds, no running pump, wrong array shapes.
        ConvergenceError
            When Newton's method does not meet both tolerances; names the worst
            node or link and its residual.

        Notes
        -----
        Global gradient algorithm of Todini and Pilati [1]_ with a line search;
        see :func:`simheat.hydraulics._kernels.solve_network`. A warm start with
        pressures first gives the links whose equation no longer holds at those
        pressures (a valve that moved) the flow they pass there; Newton then has
        only a nearly linear correction left. The solve ends when both
        tolerances hold, or on a last step below 1e-5 of every link flow whose
        estimated residual is below ``tol_Pa``: an exact Newton step (estimate:
        its second-order term), or a chord step with the factor of the previous
        iterate (estimate: that plus the first-order error of the older factor,
        Kelley [3]_), which must also leave no more than the round-off of the
        pressures. That step is applied, so the returned flows are closer to
        the solution than the last evaluated iterate (Dennis and Schnabel [2]_,
        sec. 7.2). Every node balances to round-off either way.

        References
        ----------
        .. [1] E. Todini, S. Pilati, "A gradient algorithm for the analysis of
           pipe networks", in Computer Applications in Water Supply, vol. 1,
           Research Studies Press, 1988, pp. 1-20.
        .. [2] J. E. Dennis, R. B. Schnabel, Numerical Methods for Unconstrained
           Optimization and Nonlinear Equations, SIAM, 1996.
        .. [3] C. T. Kelley, Iterative Methods for Linear and Nonlinear
           Equations, SIAM, 1995, ch. 5.
        """
        net = self._net
        names = net.link_names
        lower, upper = _kernels.OP_LOWER, _kernels.OP_UPPER
        temp_values, temp = _operating_value(
            water_temp_C, "water_temp_C", names, None, lower[0], upper[0]
        )
        opening_values, opening = _operating_value(
            valve_opening, "valve_opening", names, 1.0, lower[1], upper[1]
        )
        speed_values, speed = _operating_value(
            pump_speed, "pump_speed", names, 1.0, lower[2], upper[2]
        )
        if not (tol_kg_s > 0.0 and tol_Pa > 0.0):
            raise ScenarioError(
                f"tolerances must be > 0, got tol_kg_s={tol_kg_s!r}, tol_Pa={tol_Pa!r}"
            )
        if int(max_iter) < 1:
            raise ScenarioError(f"max_iter must be >= 1, got {max_iter!r}")
        start, flow_in, pressure_in = self._start_arrays(
            initial_mass_flow_kg_s, initial_pressure_Pa
        )
        op = self._operating
        row, index, changed = _kernels.load_operating_point(
            op,
            self._operating_seen,
            temp_values,
            temp,
            opening_values,
            opening,
            speed_values,
            speed,
            self._pump_links,
            self._pump_a0,
        )
        if changed:
            self._operating_copy = None
        if row >= 0:
            self._raise_bad_operating_point(
                row, index, (temp_values, opening_values, speed_values)
            )
        code = _kernels.load_start(
            start,
            flow_in,
            pressure_in,
            net.reference_node,
            self._flow,
            self._pressure,
        )
        if code == _kernels.START_FLOW_NOT_FINITE:
            raise ScenarioError("initial_mass_flow_kg_s must be finite")
        if code == _kernels.START_PRESSURE_NOT_FINITE:
            raise ScenarioError(
                f"initial_pressure_Pa must be {net.n_nodes} finite node pressures, "
                f"got shape {pressure_in.shape}"
            )

        (
            status,
            iterations,
            max_g,
            max_r,
            worst_node,
            worst_link,
            evaluations,
        ) = _kernels.solve_network(
            self._from,
            self._to,
            self.node_position,
            self._data,
            op,
            self._coef,
            self._band,
            self._flow,
            self._pressure,
            self._work_links,
            self._work_nodes,
            start,
            COLD_START_FLOW_KG_S,
            SLOPE_FLOOR_PA_S_KG,
            float(tol_kg_s),
            float(tol_Pa),
            int(max_iter),
        )
        if status != _kernels.STATUS_CONVERGED:
            self._raise_unless_converged(
                status,
                iterations,
                max_g,
                max_r,
                worst_node,
                worst_link,
                tol_kg_s,
                tol_Pa,
            )
        flow = self._flow.copy()
        pressure = self._pressure.copy()
        # The kernel returns only finite, balanced solutions; this guards the
        # contract (cheap test first).
        if not (
            max_g <= tol_kg_s
            or max_g <= MASS_BALANCE_RTOL * float(np.max(np.abs(flow)))
        ):
            imbalance = np.bincount(self._from, weights=flow, minlength=net.n_nodes)
            imbalance -= np.bincount(self._to, weights=flow, minlength=net.n_nodes)
            worst = int(np.argmax(np.abs(imbalance)))
            raise ConvergenceError(
                f"flow solve lost mass balance: {max_g:.3g} kg/s at node "
                f"{net.node_names[worst]!r}",
                iterations=iterations,
                residual=float(max_g),
                residual_unit="kg/s",
                worst_part=net.node_names[worst],
            )
        flow.setflags(write=False)
        pressure.setflags(write=False)
        if self._operating_copy is None:
            # rows of a read-only copy: read-only, and cannot be made writeable
            shared = self._operating_seen.copy()
            shared.setflags(write=False)
            self._operating_copy = tuple(shared)
        temp_C, opening, speed = self._operating_copy
        self._last_flow, self._last_pressure = flow, pressure
        return Flows(
            mass_flow_kg_s=flow,
            pressure_Pa=pressure,
            iterations=int(iterations),
            max_imbalance_kg_s=float(max_g),
            max_residual_Pa=float(max_r),
            water_temp_C=temp_C,
            valve_opening=opening,
            pump_speed=speed,
            link_names=names,
            link_evaluations=int(evaluations),
        )

    def _raise_bad_operating_point(self, row, index, per_link_values) -> None:
        """Raise the error the compiled loader found: a bad value, no pump."""
        net = self._net
        names = net.link_names
        if row == _kernels.NO_RUNNING_PUMP:
            pumps = [names[k] for k in self._pump_links]
            raise ScenarioError(
                f"network {net.scheme!r} has no running pump: pump links {pumps} "
                "need a curve with a0 > 0 and a speed > 0"
            )
        name = ("water_temp_C", "valve_opening", "pump_speed")[row]
        lo, hi = _kernels.OP_LOWER[row], _kernels.OP_UPPER[row]
        raise ScenarioError(
            f"{name} of link {names[index]!r} must be in [{lo:g}, {hi:g}], "
            f"got {float(per_link_values[row][index])!r}"
        )

    def _start_arrays(self, initial_mass_flow_kg_s, initial_pressure_Pa):
        """The kernel's start code and the warm-start arrays (checked shapes)."""
        if initial_mass_flow_kg_s is None:
            if initial_pressure_Pa is not None:
                raise ScenarioError(
                    "initial_pressure_Pa needs initial_mass_flow_kg_s beside it"
                )
            return _kernels.START_COLD, _NO_VALUES, _NO_VALUES
        net = self._net
        start = np.asarray(initial_mass_flow_kg_s, dtype=np.float64)
        if start.shape != (net.n_links,):
            start = _per_link(start, net.n_links, "initial_mass_flow_kg_s", 0.0)
        start = np.ascontiguousarray(start)
        if initial_pressure_Pa is None:
            last = self._last_flow
            if last is None or not (
                start is last or np.array_equal(start, last, equal_nan=False)
            ):
                return _kernels.START_FLOWS, start, _NO_VALUES
            initial_pressure_Pa = self._last_pressure
        pressure = np.ascontiguousarray(initial_pressure_Pa, dtype=np.float64)
        if pressure.shape != (net.n_nodes,):
            raise ScenarioError(
                f"initial_pressure_Pa must be {net.n_nodes} finite node pressures, "
                f"got shape {pressure.shape}"
            )
        return _kernels.START_FLOWS_PRESSURES, start, pressure

    def _raise_unless_converged(
        self, status, iterations, max_g, max_r, worst_node, worst_link, tol_kg_s, tol_Pa
    ) -> None:
        if status == _kernels.STATUS_CONVERGED:
            return
        net = self._net
        link = net.link_names[worst_link]
        node = net.node_names[worst_node]
        if status == _kernels.STATUS_NOT_FINITE:
            raise ConvergenceError(
                f"flow solve produced a non-finite value at link {link!r} after "
                f"{iterations} iterations",
                iterations=iterations,
                residual=float(max_r),
                residual_unit="Pa",
                worst_part=link,
            )
        if status == _kernels.STATUS_NOT_POSITIVE_DEFINITE:
            reason = "the pressure matrix became singular"
        else:
            reason = f"no convergence in {iterations} iterations"
        if max_g / tol_kg_s >= max_r / tol_Pa:
            raise ConvergenceError(
                f"flow solve failed ({reason}): mass imbalance {max_g:.3g} kg/s at "
                f"node {node!r} (tolerance {tol_kg_s:g} kg/s)",
                iterations=iterations,
                residual=float(max_g),
                residual_unit="kg/s",
                worst_part=node,
            )
        raise ConvergenceError(
            f"flow solve failed ({reason}): link residual {max_r:.3g} Pa at link "
            f"{link!r} (tolerance {tol_Pa:g} Pa)",
            iterations=iterations,
            residual=float(max_r),
            residual_unit="Pa",
            worst_part=link,
        )


def solve_flows(
    network: Network,
    *,
    water_temp_C: float | np.ndarray = 70.0,
    valve_opening: np.ndarray | None = None,
    pump_speed: np.ndarray | None = None,
    initial_mass_flow_kg_s: np.ndarray | None = None,
    tol_kg_s: float = 1e-9,
    tol_Pa: float = 1e-6,
    max_iter: int = 50,
) -> Flows:
    """Link flows and node pressures of a closed network at one operating point.

    Parameters
    ----------
    network : Network
        The closed network. [-]
    water_temp_C : float or ndarray
        Water temperature, one value or one per link, 0-100 °C. [°C]
    valve_opening : ndarray or None
        Valve opening per link, 0 closed to 1 open; default all open. [-]
    pump_speed : ndarray or None
        Speed ratio per link (only pump links matter); default 1. [-]
    initial_mass_flow_kg_s : ndarray or None
        Warm-start flows per link; None starts from rest. [kg/s]
    tol_kg_s : float
        Tolerance on the largest node mass imbalance. [kg/s]
    tol_Pa : float
        Tolerance on the largest link equation residual. [Pa]
    max_iter : int
        Most Laplacian factorizations. [-]

    Returns
    -------
    Flows
        Converged link flows and node pressures.

    Raises
    ------
    ScenarioError
        Invalid network or operating point; the message names the node or link.
    ConvergenceError
        When the solve does not converge; names the worst node or link.

    Notes
    -----
    One-off convenience around :class:`FlowSolver`; build a :class:`FlowSolver`
    once when solving the same network many times.
    """
    return FlowSolver(network).solve(
        water_temp_C=water_temp_C,
        valve_opening=valve_opening,
        pump_speed=pump_speed,
        initial_mass_flow_kg_s=initial_mass_flow_kg_s,
        tol_kg_s=tol_kg_s,
        tol_Pa=tol_Pa,
        max_iter=max_iter,
    )


def pump_duty_points(
    network: Network, flows: Flows, water_temp_C: float | np.ndarray | None = None
) -> list[tuple[int, float, float]]:
    """Duty point of every pump link: flow and pressure rise.

    Parameters
    ----------
    network : Network
        The network that was solved. [-]
    flows : Flows
        Its converged flows (supplies the pump speeds). [-]
    water_temp_C : float or ndarray or None
        Water temperature, one value or one per link; default the temperatures
        of the solve. [°C]

    Returns
    -------
    list of (int, float, float)
        ``(link index, volume flow [m3/h], pressure rise [kPa])`` per link with a
        pump curve, in link order; a regulated pump's rise follows its mode.
    """
    temp = (
        flows.water_temp_C
        if water_temp_C is None
        else _per_link(water_temp_C, network.n_links, "water_temp_C", None)
    )
    data = link_data(network)
    points = []
    for k in np.flatnonzero(np.any(np.asarray(network.pump_coeffs) != 0.0, axis=1)):
        a0, a1, a2 = (float(x) for x in network.pump_coeffs[k])
        m = float(flows.mass_flow_kg_s[k])
        t = float(temp[k])
        rise, _ = regulated_pump_rise_Pa(
            m,
            a0,
            a1,
            a2,
            float(flows.pump_speed[k]),
            int(network.pump_mode[k]),
            float(network.pump_setpoint_Pa[k]),
            float(data[_kernels.D_CONTROL_FLOW, k]),
            t,
        )
        points.append((int(k), m / water_density_kg_m3(t) * 3600.0, rise / 1000.0))
    return points
