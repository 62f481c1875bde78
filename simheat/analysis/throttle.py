"""Throttle one radiator valve and see what happens to the others (steady state).

When a client turns one radiator down, the pump pushes less water through the
shared pipes; the pressure difference at every other tee rises and the other
emitters take more water. How much they react measures how strongly the circuit
couples its emitters: the smaller the shared resistance (headers, feed, the slope
of the pump curve) against the emitter circuits, the weaker the interaction.

Text and JSON of these results are in :mod:`simheat.report.throttle`.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from simheat.dynamics.simulate import simulate
from simheat.errors import ScenarioError
from simheat.hydraulics.layouts import build
from simheat.hydraulics.network import Network
from simheat.hydraulics.solver import Flows, FlowSolver
from simheat.physics.emitter import steady_output_W
from simheat.physics.water import specific_heat_J_kg_K
from simheat.runs.run import Run
from simheat.scenario.model import Scenario

__all__ = [
    "EmitterChange",
    "InteractionMatrix",
    "RoomResponse",
    "ThrottleResult",
    "TransientThrottle",
    "check_opening",
    "emitter_position",
    "throttle_matrix",
    "throttle_steady",
    "throttle_transient",
]


@dataclass(frozen=True)
class EmitterChange:
    """Steady flow and output of one emitter before and after a throttle.

    Attributes
    ----------
    id : str
        Emitter id. [-]
    flow_before_kg_s, flow_after_kg_s : float
        Mass flow with every valve open, and after the throttle. [kg/s]
    output_before_W, output_after_W : float
        Steady EN 442 output at those flows. [W]
    """

    id: str
    flow_before_kg_s: float
    flow_after_kg_s: float
    output_before_W: float
    output_after_W: float

    @property
    def flow_change_pct(self) -> float:
        """Relative change of the mass flow. [%]."""
        return _relative_change_pct(self.flow_after_kg_s, self.flow_before_kg_s)

    @property
    def output_change_pct(self) -> float:
        """Relative change of the steady heat output. [%]."""
        return _relative_change_pct(self.output_after_W, self.output_before_W)


@dataclass(frozen=True)
class ThrottleResult:
    """What throttling one emitter's valve does to every emitter (steady state).

    Attributes
    ----------
    scheme : str
        Piping scheme. [-]
    emitter_id : str
        The throttled emitter. [-]
    opening : float
        Its valve opening after the throttle, 0 closed to 1 open. [-]
    water_temp_C : float
        Uniform water temperature of the flow solves and inlet temperature of the
        outputs. [°C]
    throttled : EmitterChange
        The throttled emitter itself. [-]
    changes : tuple of EmitterChange
        Every other emitter, in scenario order. [-]
    """

    scheme: str
    emitter_id: str
    opening: float
    water_temp_C: float
    throttled: EmitterChange
    changes: tuple[EmitterChange, ...]


@dataclass(frozen=True)
class InteractionMatrix:
    """Relative flow changes with every emitter throttled in turn.

    Attributes
    ----------
    scheme : str
        Piping scheme. [-]
    opening : float
        Valve opening each emitter is throttled to. [-]
    water_temp_C : float
        Uniform water temperature of the flow solves. [°C]
    emitter_ids : tuple of str
        Emitter ids in scenario order (rows and columns). [-]
    flow_change_pct : ndarray
        ``[i, j]``: relative flow change of emitter ``j`` when emitter ``i`` is
        throttled; the diagonal is the throttled emitter's own change. [%]
    results : tuple of ThrottleResult
        The throttle of each emitter, row by row. [-]
    """

    scheme: str
    opening: float
    water_temp_C: float
    emitter_ids: tuple[str, ...]
    flow_change_pct: np.ndarray
    results: tuple[ThrottleResult, ...]

    @property
    def off_diagonal_pct(self) -> np.ndarray:
        """Absolute off-diagonal relative flow changes, flattened. [%]."""
        n = len(self.emitter_ids)
        mask = ~np.eye(n, dtype=bool)
        return np.abs(self.flow_change_pct[mask])

    @property
    def interaction_mean_pct(self) -> float:
        """Interaction index: mean absolute off-diagonal flow change. [%]."""
        off = self.off_diagonal_pct
        return float(np.mean(off)) if off.size else 0.0

    @property
    def interaction_max_pct(self) -> float:
        """Interaction index: largest absolute off-diagonal flow change. [%]."""
        off = self.off_diagonal_pct
        return float(np.max(off)) if off.size else 0.0


def _relative_change_pct(after: float, before: float) -> float:
    if before == 0.0:
        return 0.0 if after == 0.0 else float("inf")
    return 100.0 * (after - before) / abs(before)


def check_opening(opening: float) -> float:
    """Return ``opening`` as a float, or raise when it is outside 0-1.

    Parameters
    ----------
    opening : float
        Valve opening, 0 closed to 1 fully open. [-]

    Returns
    -------
    float
        The opening. [-]

    Raises
    ------
    ScenarioError
        When the opening is not a finite number within 0-1.

    Examples
    --------
    >>> check_opening(0.25)
    0.25
    """
    value = float(opening)
    if not (np.isfinite(value) and 0.0 <= value <= 1.0):
        raise ScenarioError(
            "opening: must be a fraction within 0-1 (0 closed, 1 open), "
            f"got {opening!r}"
        )
    return value


def emitter_position(scenario: Scenario, emitter_id: str) -> int:
    """Index of an emitter in the scenario, or a clear error naming the known ids.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    emitter_id : str
        Emitter id. [-]

    Returns
    -------
    int
        Position of the emitter in ``scenario.emitters``. [-]

    Raises
    ------
    ScenarioError
        When no emitter has that id; the message lists the known ids.
    """
    ids = [e.id for e in scenario.emitters]
    if emitter_id not in ids:
        raise ScenarioError(
            f"emitter: unknown emitter {emitter_id!r}; known: {', '.join(ids)}"
        )
    return ids.index(emitter_id)


class _SteadyThrottle:
    """One network, one solver and the all-open reference, reused per throttle."""

    def __init__(
        self, scenario: Scenario, scheme: str | None, water_temp_C: float | None
    ) -> None:
        self.scenario = scenario
        self.scheme = scenario.schemes[0] if scheme is None else scheme
        self.water_temp_C = float(
            scenario.design.supply_temp_C if water_temp_C is None else water_temp_C
        )
        self.network: Network = build(scenario, self.scheme)
        self.solver = FlowSolver(self.network)
        self.emitter_links = self.network.emitter_links()
        self.cp_J_kg_K = float(specific_heat_J_kg_K(self.water_temp_C))
        self.base = self.solver.solve(water_temp_C=self.water_temp_C)
        self.base_flows = self._emitter_flows(self.base)
        self.base_outputs = self._outputs(self.base_flows)

    def _emitter_flows(self, flows: Flows) -> np.ndarray:
        return np.asarray(flows.mass_flow_kg_s)[self.emitter_links].copy()

    def _outputs(self, flows_kg_s: np.ndarray) -> np.ndarray:
        out = np.empty(len(flows_kg_s))
        for i, (emitter, m) in enumerate(
            zip(self.scenario.emitters, flows_kg_s, strict=True)
        ):
            room_C = self.scenario.rooms[emitter.room].setpoint_C
            out[i] = steady_output_W(
                emitter.nominal_power_W,
                emitter.exponent,
                self.water_temp_C,
                max(float(m), 0.0),
                room_C,
                self.cp_J_kg_K,
            )
        return out

    def throttle(self, index: int, opening: float) -> ThrottleResult:
        valve_opening = np.ones(self.network.n_links)
        valve_opening[self.emitter_links[index]] = opening
        after = self.solver.solve(
            water_temp_C=self.water_temp_C,
            valve_opening=valve_opening,
            initial_mass_flow_kg_s=self.base.mass_flow_kg_s,
        )
        flows = self._emitter_flows(after)
        outputs = self._outputs(flows)
        emitters = tuple(
            EmitterChange(
                id=e.id,
                flow_before_kg_s=float(self.base_flows[i]),
                flow_after_kg_s=float(flows[i]),
                output_before_W=float(self.base_outputs[i]),
                output_after_W=float(outputs[i]),
            )
            for i, e in enumerate(self.scenario.emitters)
        )
        return ThrottleResult(
            scheme=self.scheme,
            emitter_id=self.scenario.emitters[index].id,
            opening=opening,
            water_temp_C=self.water_temp_C,
            throttled=emitters[index],
            changes=emitters[:index] + emitters[index + 1 :],
        )


def throttle_steady(
    scenario: Scenario,
    scheme: str | None,
    emitter_id: str,
    opening: float,
    water_temp_C: float | None = None,
) -> ThrottleResult:
    """Steady change of every emitter's flow and output when one valve is throttled.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    scheme : str or None
        Piping scheme; the scenario's first when None. [-]
    emitter_id : str
        Id of the emitter whose valve is throttled. [-]
    opening : float
        Its valve opening after the throttle, 0 closed to 1 open. [-]
    water_temp_C : float, optional
        Uniform water temperature of both flow solves and inlet temperature of the
        outputs; the design supply temperature by default. [°C]

    Returns
    -------
    ThrottleResult
        Flows and outputs of every emitter before (all valves open) and after.

    Raises
    ------
    ScenarioError
        For an unknown emitter id or scheme, or an opening outside 0-1.
    ConvergenceError
        When a flow solve fails.

    Notes
    -----
    Both states are solved with :class:`~simheat.hydraulics.solver.FlowSolver` at
    one uniform water temperature; the throttle scales the Kv of the emitter's
    valve by ``opening`` (a closed valve keeps its small leakage). The output of
    each emitter is the EN 442 steady output (:func:`steady_output_W`) at its
    flow, the water temperature as inlet and its room at setpoint, so a change of
    output follows from the change of flow alone.

    Examples
    --------
    >>> r = throttle_steady(scenario, "direct_return", "bed3", 0.0)  # doctest: +SKIP
    >>> [round(c.flow_change_pct, 1) for c in r.changes]  # doctest: +SKIP
    """
    index = emitter_position(scenario, emitter_id)
    value = check_opening(opening)
    return _SteadyThrottle(scenario, scheme, water_temp_C).throttle(index, value)


def throttle_matrix(
    scenario: Scenario,
    scheme: str | None,
    opening: float,
    water_temp_C: float | None = None,
) -> InteractionMatrix:
    """Throttle every emitter in turn: the matrix of relative flow changes.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    scheme : str or None
        Piping scheme; the scenario's first when None. [-]
    opening : float
        Valve opening each emitter is throttled to, 0 closed to 1 open. [-]
    water_temp_C : float, optional
        Uniform water temperature; the design supply temperature by default. [°C]

    Returns
    -------
    InteractionMatrix
        ``flow_change_pct[i, j]`` is emitter ``j``'s relative flow change when
        emitter ``i`` is throttled; the interaction index is the mean and the
        maximum of the absolute off-diagonal entries.

    Raises
    ------
    ScenarioError
        For an unknown scheme or an opening outside 0-1.
    ConvergenceError
        When a flow solve fails.

    Notes
    -----
    One all-open reference solve, then one warm-started solve per emitter.
    """
    value = check_opening(opening)
    steady = _SteadyThrottle(scenario, scheme, water_temp_C)
    n = len(scenario.emitters)
    results = tuple(steady.throttle(i, value) for i in range(n))
    matrix = np.empty((n, n))
    for i, result in enumerate(results):
        row = list(result.changes)
        row.insert(i, result.throttled)
        matrix[i] = [c.flow_change_pct for c in row]
    matrix.setflags(write=False)
    return InteractionMatrix(
        scheme=steady.scheme,
        opening=value,
        water_temp_C=steady.water_temp_C,
        emitter_ids=tuple(e.id for e in scenario.emitters),
        flow_change_pct=matrix,
        results=results,
    )


@dataclass(frozen=True)
class RoomResponse:
    """How one room's warm-up changes when a valve is throttled during the run.

    Attributes
    ----------
    id : str
        Room id. [-]
    final_air_before_C, final_air_after_C : float
        Air temperature at the end of the run without and with the throttle. [°C]
    time_to_setpoint_before_s, time_to_setpoint_after_s : float or None
        Time from the start of comfort to setpoint without and with the throttle;
        None when not reached. [s]
    """

    id: str
    final_air_before_C: float
    final_air_after_C: float
    time_to_setpoint_before_s: float | None
    time_to_setpoint_after_s: float | None

    @property
    def final_air_change_K(self) -> float:
        """Change of the final air temperature. [K]."""
        return self.final_air_after_C - self.final_air_before_C

    @property
    def time_to_setpoint_change_s(self) -> float | None:
        """Change of the time to setpoint; None unless reached in both runs. [s]."""
        before, after = self.time_to_setpoint_before_s, self.time_to_setpoint_after_s
        if before is None or after is None:
            return None
        return after - before


@dataclass(frozen=True)
class TransientThrottle:
    """The morning simulated with and without one valve throttled at a time.

    Attributes
    ----------
    scheme : str
        Piping scheme. [-]
    emitter_id : str
        The throttled emitter. [-]
    opening : float
        Its valve opening from ``at_s`` on (on top of its thermostatic head). [-]
    at_s : float
        Time of the throttle since the start of the run. [s]
    rooms : tuple of RoomResponse
        Every room, in scenario order. [-]
    baseline, throttled : Run
        The two runs. [-]
    """

    scheme: str
    emitter_id: str
    opening: float
    at_s: float
    rooms: tuple[RoomResponse, ...]
    baseline: Run
    throttled: Run


def throttle_transient(
    scenario: Scenario,
    scheme: str | None,
    emitter_id: str,
    opening: float,
    at_s: float,
    *,
    baseline: Run | None = None,
) -> TransientThrottle:
    """Simulate the morning with one valve throttled at a given time.

    Parameters
    ----------
    scenario : Scenario
        The house and morning. [-]
    scheme : str or None
        Piping scheme; the scenario's first when None. [-]
    emitter_id : str
        Id of the emitter whose valve is throttled. [-]
    opening : float
        Its valve opening from ``at_s`` on, 0 closed to 1 open; it multiplies the
        thermostatic head's own opening. [-]
    at_s : float
        Time of the throttle since the start of the run. [s]
    baseline : Run, optional
        The run without the throttle, when already simulated (same scenario and
        scheme); simulated here otherwise. [-]

    Returns
    -------
    TransientThrottle
        Per room the change of the final air temperature and of the time to
        setpoint, and both runs.

    Raises
    ------
    ScenarioError
        For an unknown emitter id or scheme, an opening outside 0-1, a time
        outside the run, or a baseline of another scheme.
    ConvergenceError
        When a simulation fails.

    Notes
    -----
    Uses the ``valve_events`` of :func:`simheat.dynamics.simulate.simulate`; the
    two runs differ only from ``at_s`` on.
    """
    index = emitter_position(scenario, emitter_id)
    value = check_opening(opening)
    scheme = scenario.schemes[0] if scheme is None else scheme
    duration_s = scenario.simulation.duration_s
    if not (np.isfinite(at_s) and 0.0 <= at_s <= duration_s):
        raise ScenarioError(
            f"at_min: must lie within 0-{duration_s / 60.0:g} min (the run), "
            f"got {at_s / 60.0:g}"
        )
    if baseline is None:
        baseline = simulate(scenario, scheme)
    elif baseline.scheme != scheme:
        raise ScenarioError(
            f"baseline: run of scheme {baseline.scheme!r}, expected {scheme!r}"
        )
    throttled = simulate(scenario, scheme, valve_events=[(at_s, index, value)])
    rooms = tuple(
        RoomResponse(
            id=b.id,
            final_air_before_C=b.final_air_temp_C,
            final_air_after_C=a.final_air_temp_C,
            time_to_setpoint_before_s=b.time_to_setpoint_s,
            time_to_setpoint_after_s=a.time_to_setpoint_s,
        )
        for b, a in zip(baseline.summary.rooms, throttled.summary.rooms, strict=True)
    )
    return TransientThrottle(
        scheme=scheme,
        emitter_id=emitter_id,
        opening=value,
        at_s=float(at_s),
        rooms=rooms,
        baseline=baseline,
        throttled=throttled,
    )
