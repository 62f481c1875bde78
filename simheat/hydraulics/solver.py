"""Steady flow split of a closed heating network: link flows and node pressures.

The Python layer validates the network once per topology
(:func:`~simheat.hydraulics.checks.validate_network`), packs it into the
compiled solve's arrays (:mod:`simheat.hydraulics.packing`: node ordering, link
data), and per solve only checks single numbers and array shapes before handing
plain arrays to compiled code in :mod:`simheat.hydraulics._kernels`, which
checks their values (Python builds a message only for a bad one) and runs the
global gradient solver. It never returns a result that has not converged: it
raises :class:`~simheat.errors.ConvergenceError` naming the worst node or link
instead.
"""

from __future__ import annotations

import math

import numpy as np

from simheat._handle import Handle
from simheat.errors import ConvergenceError, ScenarioError
from simheat.hydraulics import _kernels
from simheat.hydraulics.checks import check_link_arrays, validate_network
from simheat.hydraulics.flows import Flows
from simheat.hydraulics.network import Network
from simheat.hydraulics.packing import flow_arrays
from simheat.hydraulics.still import moving_part
from simheat.hydraulics.whole import OPERATING, moving_point, per_link, whole_flows
from simheat.physics._kernels import regulated_pump_rise_Pa, water_density_kg_m3

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
        check_link_arrays(network)
        self.network = network
        # Shut links and those they leave on no closed loop carry no water:
        # the solve runs on the rest (see simheat.hydraulics.still).
        self.part = moving_part(network)
        network = self._net = self.part.network
        validate_network(network)
        self._arrays, self.half_bandwidth = flow_arrays(network)
        self._last_flow: np.ndarray | None = None
        self._last_pressure: np.ndarray | None = None
        self._last_whole_flow: np.ndarray | None = None
        # The read-only copy of the last loaded operating point that every
        # Flows of that point shares (None: to be made).
        self._operating_copy: tuple[np.ndarray, ...] | None = None
        # The single operating values last written into arrays.single_values.
        self._single: tuple[float, float, float] | None = None
        self._settings = _kernels.SolveSettings(
            COLD_START_FLOW_KG_S, SLOPE_FLOOR_PA_S_KG, 1e-9, 1e-6, 50
        )
        # arrays and settings in one handle: one unboxing per solve
        self._handle = Handle(_kernels.SolveInputs(self._arrays, self._settings))

    @property
    def arrays(self) -> _kernels.FlowArrays:
        """The record of arrays the compiled solve works in (one per solver).

        For callers with compiled code of their own, such as the warm-up
        right-hand side: write the operating point into ``arrays.operating``
        (rows ``OP_TEMP``, ``OP_OPENING``, ``OP_SPEED`` of
        :mod:`simheat.hydraulics._kernels.records`, values checked by the
        caller), call :func:`simheat.hydraulics._kernels.solve_network` with
        it and :meth:`solve_settings`, and read ``arrays.flow_kg_s`` and
        ``arrays.pressure_Pa``. A warm start (``START_FLOWS_PRESSURES``) starts
        from what those hold. The arrays are shared, not copied: :meth:`solve`
        overwrites them too.

        With links shut for good (``network.closed``) the arrays are those of
        the moving part (:attr:`part`, :mod:`simheat.hydraulics.still`): link
        ``part.links[i]`` of the network is link ``i`` here.

        Returns
        -------
        FlowArrays
            The network's arrays, operating point, solution and workspaces.
        """
        return self._arrays

    @property
    def node_position(self) -> np.ndarray:
        """Row of each node in the ordered reduced Laplacian, -1 at the reference."""
        return self._arrays.node_position

    def solve_settings(
        self, tol_kg_s: float = 1e-9, tol_Pa: float = 1e-6, max_iter: int = 50
    ) -> _kernels.SolveSettings:
        """The settings record of a compiled solve with these tolerances.

        Parameters
        ----------
        tol_kg_s : float
            Tolerance on the largest node mass imbalance, > 0. [kg/s]
        tol_Pa : float
            Tolerance on the largest link equation residual, > 0. [Pa]
        max_iter : int
            Most Laplacian factorizations, >= 1. [-]

        Returns
        -------
        SolveSettings
            With the solver's cold-start flow and slope floor.

        Raises
        ------
        ScenarioError
            On a tolerance that is not > 0 or ``max_iter`` < 1.
        """
        last = self._settings
        if (
            tol_kg_s == last.tol_kg_s
            and tol_Pa == last.tol_Pa
            and max_iter == last.max_iter
        ):
            return last
        if not (tol_kg_s > 0.0 and tol_Pa > 0.0):
            raise ScenarioError(
                f"tolerances must be > 0, got tol_kg_s={tol_kg_s!r}, tol_Pa={tol_Pa!r}"
            )
        if int(max_iter) < 1:
            raise ScenarioError(f"max_iter must be >= 1, got {max_iter!r}")
        self._settings = _kernels.SolveSettings(
            COLD_START_FLOW_KG_S,
            SLOPE_FLOOR_PA_S_KG,
            float(tol_kg_s),
            float(tol_Pa),
            int(max_iter),
        )
        self._handle = Handle(_kernels.SolveInputs(self._arrays, self._settings))
        return self._settings

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
        The links that can carry water are solved as below
        (:mod:`simheat.hydraulics.whole`); the others get zero flow and the
        pressure of the moving node they hang from.

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
        part = self.part
        if not part.is_whole:  # the moving part is solved, then mapped back
            own = initial_mass_flow_kg_s is not None and (
                initial_mass_flow_kg_s is self._last_whole_flow
            )
            point, rows = moving_point(
                part,
                water_temp_C=water_temp_C,
                valve_opening=valve_opening,
                pump_speed=pump_speed,
                initial_mass_flow_kg_s=None if own else initial_mass_flow_kg_s,
                initial_pressure_Pa=initial_pressure_Pa,
            )
            water_temp_C, valve_opening, pump_speed = (point[n] for n in OPERATING)
            initial_pressure_Pa = point["initial_pressure_Pa"]
            initial_mass_flow_kg_s = (
                self._last_flow if own else point["initial_mass_flow_kg_s"]
            )  # the solver's own last flows: its pressures follow
        net = self._net
        names = net.link_names
        lower, upper = _kernels.OP_LOWER, _kernels.OP_UPPER
        temp_values, temp = _operating_value(
            water_temp_C, "water_temp_C", names, None, lower[0], upper[0]
        )
        opening_values, opening = speed_values, speed = _NO_VALUES, 1.0  # defaults
        if valve_opening is not None:
            opening_values, opening = _operating_value(
                valve_opening, "valve_opening", names, 1.0, lower[1], upper[1]
            )
        if pump_speed is not None:
            speed_values, speed = _operating_value(
                pump_speed, "pump_speed", names, 1.0, lower[2], upper[2]
            )
        settings = self.solve_settings(tol_kg_s, tol_Pa, max_iter)
        if initial_mass_flow_kg_s is None and initial_pressure_Pa is None:
            start, flow_in, pressure_in = _kernels.START_COLD, _NO_VALUES, _NO_VALUES
        else:
            start, flow_in, pressure_in = self._start_arrays(
                initial_mass_flow_kg_s, initial_pressure_Pa
            )
        arrays = self._arrays
        single = (temp, opening, speed)
        if single != self._single:
            values = arrays.single_values
            values[0], values[1], values[2] = single
            self._single = single
        outcome = _kernels.load_and_solve(
            self._handle,
            start,
            flow_in,
            pressure_in,
            temp_values,
            opening_values,
            speed_values,
        )
        row, index, changed, code, status, iterations, max_g, max_r = outcome[:8]
        evaluations = outcome[10]
        if changed:
            self._operating_copy = None
        if row >= 0:
            self._raise_bad_operating_point(
                row, index, (temp_values, opening_values, speed_values)
            )
        if code == _kernels.START_FLOW_NOT_FINITE:
            raise ScenarioError("initial_mass_flow_kg_s must be finite")
        if code == _kernels.START_PRESSURE_NOT_FINITE:
            raise ScenarioError(
                f"initial_pressure_Pa must be {net.n_nodes} finite node pressures, "
                f"got shape {pressure_in.shape}"
            )
        if status != _kernels.STATUS_CONVERGED:
            self._raise_unless_converged(_kernels.SolveResult(*outcome[4:]), settings)
        flow = arrays.flow_kg_s.copy()
        pressure = arrays.pressure_Pa.copy()
        # The kernel returns only finite, balanced solutions; this guards the
        # contract (cheap test first).
        if not (
            max_g <= tol_kg_s
            or max_g <= MASS_BALANCE_RTOL * float(np.max(np.abs(flow)))
        ):
            imbalance = np.bincount(
                arrays.from_node, weights=flow, minlength=net.n_nodes
            )
            imbalance -= np.bincount(
                arrays.to_node, weights=flow, minlength=net.n_nodes
            )
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
            shared = arrays.loaded.copy()
            shared.setflags(write=False)
            self._operating_copy = tuple(shared)
        temp_C, opening, speed = self._operating_copy
        self._last_flow, self._last_pressure = flow, pressure
        flows = Flows.of_solve(
            flow,
            pressure,
            iterations,
            max_g,
            max_r,
            temp_C,
            opening,
            speed,
            names,
            evaluations,
        )
        if part.is_whole:
            return flows
        flows = whole_flows(part, flows, rows)
        self._last_whole_flow = flows.mass_flow_kg_s
        return flows

    def _raise_bad_operating_point(self, row, index, per_link) -> None:
        """Raise the error the compiled loader found: a bad value, no pump."""
        net = self._net
        names = net.link_names
        if row == _kernels.NO_RUNNING_PUMP:
            pumps = [names[k] for k in self._arrays.pump_links]
            raise ScenarioError(
                f"network {net.scheme!r} has no running pump: pump links {pumps} "
                "need a curve with a0 > 0 and a speed > 0"
            )
        name = ("water_temp_C", "valve_opening", "pump_speed")[row]
        lo, hi = _kernels.OP_LOWER[row], _kernels.OP_UPPER[row]
        raise ScenarioError(
            f"{name} of link {names[index]!r} must be in [{lo:g}, {hi:g}], "
            f"got {float(per_link[row][index])!r}"
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
            start = per_link(start, net.n_links, "initial_mass_flow_kg_s", 0.0)
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

    def _raise_unless_converged(self, result, settings) -> None:
        """Raise the ConvergenceError of a failed compiled solve."""
        status, iterations = result.status, result.iterations
        max_g, max_r = result.max_imbalance_kg_s, result.max_residual_Pa
        worst_node, worst_link = result.worst_node, result.worst_link
        tol_kg_s, tol_Pa = settings.tol_kg_s, settings.tol_Pa
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
        else per_link(water_temp_C, network.n_links, "water_temp_C", None)
    )
    control_flow = FlowSolver(network).arrays.data[_kernels.D_CONTROL_FLOW]
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
            float(control_flow[k]),
            t,
        )
        points.append((int(k), m / water_density_kg_m3(t) * 3600.0, rise / 1000.0))
    return points
