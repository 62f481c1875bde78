"""Starving radiators judged at design conditions, and where their pressure goes.

Design conditions: every valve open at its preset (thermostatic heads open),
water everywhere at the design supply temperature, the pumps on their curves:
the steady flow split of :func:`simheat.analysis.flows.steady_flow_split`, the
same solve ``simheat flows`` prints. A radiator starves there when it gets less
than :data:`~simheat.analysis.flows.STARVING_FRACTION` of its design flow; the
head-throttled mean flows of a simulated morning are not the judgement (a head
closing at setpoint is not starving). :func:`starving_at_design` gives that
judgement to any caller (the run's flow figure can use it).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from simheat.analysis.flows import STARVING_FRACTION, FlowSplit, steady_flow_split
from simheat.hydraulics.layouts import BuiltLayout, describe
from simheat.hydraulics.network import LINK_PIPE
from simheat.hydraulics.sizing import DesignFigures, design_figures
from simheat.hydraulics.solver import Flows, solve_flows
from simheat.physics._kernels import valve_pressure_drop_Pa
from simheat.resolve.route import tee_positions_m
from simheat.scenario.model import Scenario

# Roles of pipes that carry water between the plant (or a floor's pump) and the
# tees; emitter branches, the low-loss header and the source are not walked.
PATH_ROLES = frozenset(
    {"feed", "riser", "header", "loop", "bypass", "manifold_feed", "home_run"}
)


@dataclass(frozen=True)
class DesignPoint:
    """One scheme solved at design conditions.

    Attributes
    ----------
    scenario : Scenario
        The house. [-]
    scheme : str
        Piping scheme. [-]
    built : BuiltLayout
        The built network with its link records. [-]
    flows : Flows
        The converged solve (every valve open, design supply temperature). [-]
    split : FlowSplit
        Per-emitter flows against design flows (what ``simheat flows`` shows). [-]
    figures : DesignFigures
        Design figures: index circuit, each emitter's need at design flows. [-]
    """

    scenario: Scenario
    scheme: str
    built: BuiltLayout
    flows: Flows
    split: FlowSplit
    figures: DesignFigures

    @property
    def water_temp_C(self) -> float:
        """Water temperature of the solve: the design supply temperature. [°C]."""
        return self.scenario.design.supply_temp_C

    def flow_fraction(self) -> np.ndarray:
        """Each emitter's flow over its design flow, in scenario order. [-]."""
        return np.array(
            [
                e.flow_kg_s / e.design_flow_kg_s if e.design_flow_kg_s > 0.0 else 1.0
                for e in self.split.emitters
            ]
        )


def design_point(scenario: Scenario, scheme: str) -> DesignPoint:
    """Solve one scheme at design conditions.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    scheme : str
        Piping scheme. [-]

    Returns
    -------
    DesignPoint
        Network, flows, per-emitter split and design figures.
    """
    built = describe(scenario, scheme)
    temp = scenario.design.supply_temp_C
    return DesignPoint(
        scenario=scenario,
        scheme=scheme,
        built=built,
        flows=solve_flows(built.network, water_temp_C=temp),
        split=steady_flow_split(scenario, scheme),
        figures=design_figures(built),
    )


def starving_at_design(scenario: Scenario, scheme: str) -> dict[str, float]:
    """Emitters below the starving fraction of design flow at design conditions.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    scheme : str
        Piping scheme. [-]

    Returns
    -------
    dict of str to float
        Emitter id -> flow as a share of its design flow, for each emitter below
        :data:`STARVING_FRACTION`, in scenario order. [-]
    """
    split = steady_flow_split(scenario, scheme)
    return {
        e.id: e.flow_kg_s / e.design_flow_kg_s for e in split.emitters if e.starving
    }


@dataclass(frozen=True)
class Segment:
    """Pressure taken by one pipe segment on a radiator's circuit.

    Attributes
    ----------
    link : str
        Link name. [-]
    role : str
        Role of the pipe (``feed``, ``riser``, ``header`` ...). [-]
    pipe : str
        Pipe type. [-]
    side : str
        ``supply`` or ``return``. [-]
    dp_Pa : float
        Pressure drop along it at the operating point. [Pa]
    """

    link: str
    role: str
    pipe: str
    side: str
    dp_Pa: float


@dataclass(frozen=True)
class MidRun:
    """Where supply and return pressures come closest along a floor's run.

    Attributes
    ----------
    floor : int
        Storey number. [-]
    emitter : str
        The emitter at that tee. [-]
    position_m : float
        Position of the tee from the floor's start along the run. [m]
    dp_Pa : float
        Supply minus return pressure there. [Pa]
    """

    floor: int
    emitter: str
    position_m: float
    dp_Pa: float


@dataclass(frozen=True)
class Cause:
    """Where the pressure that does not reach a starving radiator goes.

    Attributes
    ----------
    pump : str
        The pump driving its circuit. [-]
    pump_head_Pa : float
        That pump's rise at the operating point. [Pa]
    need_at_design_Pa : float
        Pressure its circuit needs at design flows (pump outlet to inlet). [Pa]
    dp_available_Pa : float
        Pressure difference between its two tee points. [Pa]
    valve_Pa, circuit_Pa : float
        Of that difference, the part its own valve takes and the part its
        branch pipes, fittings and radiator take, at the flow it gets. [Pa]
    source_Pa : float
        Pressure the heat source takes (0 behind a low-loss header). [Pa]
    segments : tuple of Segment
        Pipe segments between the plant (or the floor's pump) and its tees,
        the largest drop first. [Pa]
    mid_run : MidRun or None
        In reverse return, the spot on its floor where supply and return
        pressures come closest. [-]
    """

    pump: str
    pump_head_Pa: float
    need_at_design_Pa: float
    dp_available_Pa: float
    valve_Pa: float
    circuit_Pa: float
    source_Pa: float
    segments: tuple[Segment, ...]
    mid_run: MidRun | None

    @property
    def pipes_Pa(self) -> float:
        """Sum of the segments' drops. [Pa]."""
        return sum(s.dp_Pa for s in self.segments)

    @property
    def largest(self) -> str:
        """What takes the most of the pump's head: ``pipes``, ``valve`` or ``pump``.

        ``pump`` when the pump's head falls short of the circuit's need at
        design flows by more than the pipes or the valve take; otherwise the
        larger of the segments' sum and the own valve's drop.
        """
        shortfall = self.need_at_design_Pa - self.pump_head_Pa
        if shortfall > max(self.pipes_Pa, self.valve_Pa):
            return "pump"
        return "pipes" if self.pipes_Pa >= self.valve_Pa else "valve"


def _walk(point: DesignPoint, start: int, upstream: bool) -> list[int]:
    """Pipe links from ``start`` towards the plant along the largest flow.

    Upstream (supply side) follows the link bringing the most water into each
    node; downstream (return side) the link taking the most out of it. Only
    distribution pipes (:data:`PATH_ROLES`) are walked, so the walk stops at
    the plant, a floor's pump or the low-loss header.
    """
    net = point.built.network
    m = point.flows.mass_flow_kg_s
    links = [
        k
        for k in range(net.n_links)
        if net.link_kind[k] == LINK_PIPE and point.built.links[k].role in PATH_ROLES
    ]
    met: list[int] = []
    node = int(start)
    for _ in range(net.n_links):
        best, best_flow = -1, 0.0
        for k in links:
            if k in met:
                continue
            a, b = int(net.from_node[k]), int(net.to_node[k])
            # water into node (upstream) or out of it (downstream)
            if upstream:
                flow = m[k] if b == node else (-m[k] if a == node else 0.0)
            else:
                flow = m[k] if a == node else (-m[k] if b == node else 0.0)
            if flow > best_flow:
                best, best_flow = k, flow
        if best < 0:
            break
        met.append(best)
        a, b = int(net.from_node[best]), int(net.to_node[best])
        node = (a if b == node else b) if upstream else (b if a == node else a)
    return met


def emitter_floor(scenario: Scenario, emitter: int) -> int:
    """Index in ``scenario.route.floors`` of the floor an emitter is on.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    emitter : int
        Emitter index. [-]

    Returns
    -------
    int
        Route index of its floor.
    """
    for i, floor in enumerate(scenario.route.floors):
        if any(t.emitter == emitter for t in floor.tees):
            return i
    raise ValueError(f"emitter {emitter} is not on the route")


def driving_pump(point: DesignPoint, emitter: int) -> int:
    """Link index of the pump that drives an emitter's circuit.

    Parameters
    ----------
    point : DesignPoint
        The solved scheme. [-]
    emitter : int
        Emitter index. [-]

    Returns
    -------
    int
        The floor's pump in a ``_floor_pumps`` scheme, else the plant's pump.
    """
    net = point.built.network
    floor = point.scenario.route.floors[emitter_floor(point.scenario, emitter)]
    names = net.link_names
    own = f"pump:floor{floor.floor}"
    if own in names:
        return names.index(own)
    return names.index("pump")


def locate_cause(point: DesignPoint, emitter: int) -> Cause:
    """Where the pressure goes on a radiator's circuit at design conditions.

    Parameters
    ----------
    point : DesignPoint
        The solved scheme. [-]
    emitter : int
        Emitter index. [-]

    Returns
    -------
    Cause
        Segment drops, own valve, pump head against the circuit's need, and in
        reverse return the mid-run spot of its floor.

    Notes
    -----
    Segment drops are the solved pressure differences across each pipe
    between the pump and the emitter's tees (Darcy-Weisbach with local losses,
    at the flows every valve open gives). The own valve's part is the Kv law at
    the emitter's flow (``dp = (Q / Kv)^2`` bar, water density scaled), the
    rest of the difference between its tees is its branch pipes, fittings and
    radiator.
    """
    net = point.built.network
    p = point.flows.pressure_Pa
    m = point.flows.mass_flow_kg_s
    link = int(net.emitter_links()[emitter])
    s, r = int(net.from_node[link]), int(net.to_node[link])
    dp_available = float(p[s] - p[r])
    valve = float(
        valve_pressure_drop_Pa(
            float(m[link]), float(net.kv_m3_h[link]), 1.0, point.water_temp_C
        )[0]
    )
    segments = []
    for side, start, upstream in (("supply", s, True), ("return", r, False)):
        for k in _walk(point, start, upstream):
            spec = point.built.links[k]
            segments.append(
                Segment(
                    link=spec.name,
                    role=spec.role,
                    pipe=spec.pipe.name,
                    side=side,
                    dp_Pa=float(abs(p[net.from_node[k]] - p[net.to_node[k]])),
                )
            )
    segments.sort(key=lambda seg: -seg.dp_Pa)
    pump = driving_pump(point, emitter)
    head = float(p[net.to_node[pump]] - p[net.from_node[pump]])
    source_Pa = 0.0
    if net.link_names[pump] == "pump":
        src = int(net.source_links()[0])
        source_Pa = float(p[net.from_node[src]] - p[net.to_node[src]])
    eid = net.emitter_ids[emitter]
    return Cause(
        pump=net.link_names[pump],
        pump_head_Pa=head,
        need_at_design_Pa=point.figures.emitter_need_kPa[eid] * 1e3,
        dp_available_Pa=dp_available,
        valve_Pa=valve,
        circuit_Pa=dp_available - valve,
        source_Pa=source_Pa,
        segments=tuple(segments),
        mid_run=_mid_run(point, emitter),
    )


def _mid_run(point: DesignPoint, emitter: int) -> MidRun | None:
    """In reverse return, the tee of the emitter's floor with the least dp."""
    if not point.scheme.startswith("reverse_return"):
        return None
    floor = point.scenario.route.floors[emitter_floor(point.scenario, emitter)]
    net = point.built.network
    p = point.flows.pressure_Pa
    positions = tee_positions_m(floor)
    best = None
    for tee, position in zip(floor.tees, positions, strict=True):
        link = int(net.emitter_links()[tee.emitter])
        dp = float(p[net.from_node[link]] - p[net.to_node[link]])
        if best is None or dp < best.dp_Pa:
            best = MidRun(
                floor.floor, net.emitter_ids[tee.emitter], float(position), dp
            )
    return best


def starving_emitters(point: DesignPoint) -> list[int]:
    """Indices of the emitters below the starving fraction at design conditions.

    Parameters
    ----------
    point : DesignPoint
        The solved scheme. [-]

    Returns
    -------
    list of int
        Emitter indices, in scenario order.
    """
    return [i for i, f in enumerate(point.flow_fraction()) if f < STARVING_FRACTION]
