"""Everything a hand-over report states, computed and verified before it is written.

:func:`build_handover` simulates the schemes to compare
(:func:`~simheat.analysis.compare.compare_schemes`) and, per scheme, builds the
layout with its design figures, re-solves the network at design conditions
(every thermostatic head open, water at the design supply temperature) and
reads from that one solve the verified flow of every radiator and pipe and each
pump's duty point; it computes the pressure profile of the pressure diagram,
each radiator's output at its verified flow against its share of the room's
load (EN 442, room at setpoint), and when the source sat at its power limit.
Optional analyses that other parts of simheat provide (the findings of
``check``, the commissioning table of ``balance``) are added when their modules
are present (:data:`OPTIONAL_ANALYSES`). The HTML page is assembled by
:mod:`simheat.report.html` from this result only: no template computes.
"""

from __future__ import annotations

import importlib.util
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field

import numpy as np

from simheat.analysis.compare import Comparison, compare_schemes
from simheat.analysis.flows import FlowSplit, steady_flow_split
from simheat.analysis.layouts import LayoutDesign
from simheat.analysis.pressure import PressureProfile, design_pressure_profile
from simheat.analysis.source import PowerLimitTime, run_power_limit_time
from simheat.hydraulics.layouts import describe
from simheat.hydraulics.layouts.pipes import friction_gradient_Pa_m, velocity_m_s
from simheat.hydraulics.network import LINK_PIPE, PUMP_MODE_NAMES
from simheat.hydraulics.sizing import design_figures
from simheat.hydraulics.solver import solve_flows
from simheat.physics.emitter import steady_output_W
from simheat.physics.water import specific_heat_J_kg_K
from simheat.resolve import resolve
from simheat.runs.run import Run
from simheat.scenario.model import Scenario

__all__ = [
    "OPTIONAL_ANALYSES",
    "Handover",
    "PipeLine",
    "PumpLine",
    "RadiatorLine",
    "Refused",
    "SchemeHandover",
    "available_analyses",
    "build_handover",
]

OPTIONAL_ANALYSES: dict[str, str] = {
    "check": "simheat.analysis.check",
    "balance": "simheat.analysis.balance",
}
"""Analyses a report includes when simheat has them: name -> module."""


@dataclass(frozen=True)
class RadiatorLine:
    """One radiator of the radiator schedule.

    Attributes
    ----------
    id, room, room_name : str
        Emitter id, its room's id and display name. [-]
    floor : int
        Storey of the room. [-]
    nominal_power_W : float
        Output at 75/65/20 °C (EN 442). [W]
    setting : str
        The valve setting as the scenario gives it: ``"preset 4 (trv_body)"`` or
        ``"Kv as given"``, and a lockshield's turns when it has one. [-]
    kv_m3_h : float
        Kv of the valve fully open at that setting. [m3/h]
    design_flow_kg_s : float
        Design flow: its share of the room's design load at the design drop. [kg/s]
    verified_flow_kg_s : float
        Flow found by re-solving the network at design conditions. [kg/s]
    output_W : float
        Steady output at the verified flow, design supply temperature, room at
        setpoint. [W]
    load_W : float
        Its share of the room's design heat load (by nominal output). [W]
    starving : bool
        Verified flow below the starving share of design. [-]
    """

    id: str
    room: str
    room_name: str
    floor: int
    nominal_power_W: float
    setting: str
    kv_m3_h: float
    design_flow_kg_s: float
    verified_flow_kg_s: float
    output_W: float
    load_W: float
    starving: bool


@dataclass(frozen=True)
class PipeLine:
    """One pipe of the pipe schedule.

    Attributes
    ----------
    name, role, size : str
        Link name, role in the plan, pipe type. [-]
    length_m : float
        Length. [m]
    design_flow_kg_s, verified_flow_kg_s : float
        Design flow and the flow at design conditions (re-solve). [kg/s]
    design_velocity_m_s, verified_velocity_m_s : float
        Mean velocity at those flows (design flow at the mean design water
        temperature, as the sizing check; verified flow at the design supply
        temperature). [m/s]
    design_gradient_Pa_m : float
        Friction gradient at design flow and mean design water temperature. [Pa/m]
    over_limit : bool
        Whether design velocity or gradient exceeds the sizing limits. [-]
    """

    name: str
    role: str
    size: str
    length_m: float
    design_flow_kg_s: float
    verified_flow_kg_s: float
    design_velocity_m_s: float
    verified_velocity_m_s: float
    design_gradient_Pa_m: float
    over_limit: bool


@dataclass(frozen=True)
class PumpLine:
    """A pump: its setting, what the design needs, where it runs.

    Attributes
    ----------
    name, mode : str
        Pump link name and control mode (``fixed_speed``, ``constant_dp``,
        ``proportional_dp``). [-]
    setpoint_kPa : float or None
        Set head of a regulated pump. [kPa]
    needed_flow_m3_h, needed_head_kPa : float
        Design flow and the head its index circuit needs at it. [m3/h], [kPa]
    index_emitter : str or None
        Emitter of its index circuit. [-]
    duty_flow_m3_h, duty_head_kPa : float
        Duty point at design conditions (re-solve). [m3/h], [kPa]
    """

    name: str
    mode: str
    setpoint_kPa: float | None
    needed_flow_m3_h: float
    needed_head_kPa: float
    index_emitter: str | None
    duty_flow_m3_h: float
    duty_head_kPa: float


@dataclass(frozen=True)
class SchemeHandover:
    """What the report states for one scheme.

    Attributes
    ----------
    scheme : str
        Piping scheme. [-]
    run : Run
        Its simulated morning. [-]
    design : LayoutDesign
        The built layout and its design figures. [-]
    split : FlowSplit
        The steady flow split at design conditions (heads open, design supply
        temperature). [-]
    profile : PressureProfile
        Pressure along supply and return at design conditions. [-]
    radiators : tuple of RadiatorLine
        The radiator schedule, in scenario order. [-]
    pipes : tuple of PipeLine
        The pipe schedule. [-]
    pumps : tuple of PumpLine
        Every pump. [-]
    power_limit : PowerLimitTime
        When the source sat at its power limit. [-]
    extras : dict of str to object
        Results of the optional analyses included, by name. [-]
    """

    scheme: str
    run: Run
    design: LayoutDesign
    split: FlowSplit
    profile: PressureProfile
    radiators: tuple[RadiatorLine, ...]
    pipes: tuple[PipeLine, ...]
    pumps: tuple[PumpLine, ...]
    power_limit: PowerLimitTime
    extras: dict[str, object] = field(default_factory=dict)


@dataclass(frozen=True)
class Handover:
    """A house, its schemes compared, and per scheme what the report states.

    Attributes
    ----------
    scenario : Scenario
        The house. [-]
    comparison : Comparison
        The schemes simulated on the same morning, ranked. [-]
    schemes : tuple of SchemeHandover
        Per scheme, in the order compared. [-]
    room_loads_W : tuple of float
        Design heat load of each room. [W]
    analyses : tuple of str
        Optional analyses included (names of :data:`OPTIONAL_ANALYSES`). [-]
    """

    scenario: Scenario
    comparison: Comparison
    schemes: tuple[SchemeHandover, ...]
    room_loads_W: tuple[float, ...]
    analyses: tuple[str, ...]


def available_analyses() -> tuple[str, ...]:
    """The optional analyses this simheat has, by name.

    Returns
    -------
    tuple of str
        Names of :data:`OPTIONAL_ANALYSES` whose module can be imported.
    """
    return tuple(
        name
        for name, module in OPTIONAL_ANALYSES.items()
        if importlib.util.find_spec(module) is not None
    )


@dataclass(frozen=True)
class Refused:
    """An optional analysis that declined a scheme, and why.

    Attributes
    ----------
    message : str
        Its one-line reason (e.g. a pump that cannot give the index circuit's
        need at design flow, for ``balance``). [-]
    """

    message: str


def _check(scenario: Scenario, scheme: str) -> object:
    from simheat.analysis.check import check_scheme

    return check_scheme(scenario, scheme)


def _balance(scenario: Scenario, scheme: str) -> object:
    from simheat.analysis.balance import balance_scheme
    from simheat.errors import BalanceError

    shut = [e.id for e in scenario.emitters if e.closed]
    if shut:  # balance sets open radiators only (it refuses the scenario)
        return Refused(
            f"radiator {shut[0]} is shut for good: balance the house without it, "
            "then shut it"
        )
    try:
        return balance_scheme(scenario, scheme)
    except BalanceError as exc:
        return Refused(str(exc))


# Optional analyses' adapters: name -> f(scenario, scheme) -> result for the
# report (its own result object, or Refused). An analysis is included only when
# its module exists and it has an adapter here; the modules are imported inside
# the adapters, so a simheat without them still reports.
_ADAPTERS: dict[str, Callable[[Scenario, str], object]] = {
    "check": _check,
    "balance": _balance,
}


def _setting(scenario: Scenario, index: int) -> str:
    emitter = scenario.emitters[index]
    if emitter.preset is not None:
        text = f"preset {emitter.preset:g} ({emitter.valve_type})"
    else:
        text = "Kv as given"
    if getattr(emitter, "lockshield_type", None) is not None:
        text += (
            f"; lockshield {emitter.lockshield_turns:g} turns "
            f"({emitter.lockshield_type})"
        )
    return text


def _radiators(
    scenario: Scenario, split: FlowSplit, loads_W: Sequence[float]
) -> tuple[RadiatorLine, ...]:
    resolved = resolve(scenario)
    design = scenario.design
    cp = float(specific_heat_J_kg_K(resolved.design_water_temp_C))
    room_nominal = np.zeros(len(scenario.rooms))
    for e in scenario.emitters:
        if not e.closed:  # one shut for good takes no share (see resolve)
            room_nominal[e.room] += e.nominal_power_W
    lines = []
    for i, (e, flow) in enumerate(zip(scenario.emitters, split.emitters, strict=True)):
        room = scenario.rooms[e.room]
        lines.append(
            RadiatorLine(
                id=e.id,
                room=room.id,
                room_name=room.name,
                floor=room.floor,
                nominal_power_W=e.nominal_power_W,
                setting=_setting(scenario, i),
                kv_m3_h=resolved.emitters[i].kv_m3_h,
                design_flow_kg_s=flow.design_flow_kg_s,
                verified_flow_kg_s=flow.flow_kg_s,
                output_W=steady_output_W(
                    e.nominal_power_W,
                    e.exponent,
                    design.supply_temp_C,
                    max(flow.flow_kg_s, 0.0),
                    room.setpoint_C,
                    cp,
                ),
                load_W=0.0
                if e.closed
                else float(loads_W[e.room] * e.nominal_power_W / room_nominal[e.room]),
                starving=flow.starving,
            )
        )
    return tuple(lines)


def _pipes(
    design: LayoutDesign, flow_kg_s: np.ndarray, temp_C: float
) -> tuple[PipeLine, ...]:
    built = design.built
    over = {name for name, _, _ in design.figures.over_limit}
    lines = []
    for k, spec in enumerate(built.links):
        if (
            built.network.link_kind[k] != LINK_PIPE
            or spec.pipe is None
            or spec.length_m <= 0.0
        ):
            continue
        d = spec.pipe.inner_diameter_m
        lines.append(
            PipeLine(
                name=spec.name,
                role=spec.role,
                size=spec.pipe.name,
                length_m=spec.length_m,
                design_flow_kg_s=abs(spec.design_flow_kg_s),
                verified_flow_kg_s=abs(float(flow_kg_s[k])),
                design_velocity_m_s=velocity_m_s(
                    spec.design_flow_kg_s, d, built.design_temp_C
                ),
                verified_velocity_m_s=velocity_m_s(float(flow_kg_s[k]), d, temp_C),
                design_gradient_Pa_m=friction_gradient_Pa_m(
                    spec.design_flow_kg_s, d, spec.pipe.roughness_m, built.design_temp_C
                ),
                over_limit=spec.name in over,
            )
        )
    return tuple(lines)


def _pumps(design: LayoutDesign, split: FlowSplit) -> tuple[PumpLine, ...]:
    net = design.built.network
    duty = {name: (flow, head_Pa) for name, flow, head_Pa in split.pumps}
    lines = []
    for need in design.figures.pumps:
        k = net.link_names.index(need.pump)
        mode = PUMP_MODE_NAMES[int(net.pump_mode[k])]
        flow, head_Pa = duty[need.pump]
        lines.append(
            PumpLine(
                name=need.pump,
                mode=mode,
                setpoint_kPa=(
                    None
                    if mode == "fixed_speed"
                    else float(net.pump_setpoint_Pa[k]) / 1e3
                ),
                needed_flow_m3_h=need.flow_m3_h,
                needed_head_kPa=need.head_kPa,
                index_emitter=need.index_emitter,
                duty_flow_m3_h=flow,
                duty_head_kPa=head_Pa / 1e3,
            )
        )
    return tuple(lines)


def scheme_handover(
    scenario: Scenario, run: Run, analyses: Sequence[str] = ()
) -> SchemeHandover:
    """What the report states for one simulated scheme.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    run : Run
        Its simulated morning under the scheme. [-]
    analyses : sequence of str, optional
        Optional analyses to add (names of :data:`OPTIONAL_ANALYSES` that have
        an adapter). [-]

    Returns
    -------
    SchemeHandover
        Layout and design figures, the design-condition re-solve, the pressure
        profile, the radiator, pipe and pump schedules, the time at the power
        limit, and the optional analyses' results.

    Raises
    ------
    ConvergenceError
        When a steady flow solve fails.
    """
    scheme = run.scheme
    built = describe(scenario, scheme)
    design = LayoutDesign(scheme, built, design_figures(built))
    temp_C = scenario.design.supply_temp_C
    split = steady_flow_split(scenario, scheme, temp_C)
    flows = solve_flows(built.network, water_temp_C=temp_C)
    loads = [room.design_heat_load_W for room in resolve(scenario).rooms]
    return SchemeHandover(
        scheme=scheme,
        run=run,
        design=design,
        split=split,
        profile=design_pressure_profile(run),
        radiators=_radiators(scenario, split, loads),
        pipes=_pipes(design, np.asarray(flows.mass_flow_kg_s), temp_C),
        pumps=_pumps(design, split),
        power_limit=run_power_limit_time(run),
        extras={name: _ADAPTERS[name](scenario, scheme) for name in analyses},
    )


def build_handover(
    scenario: Scenario,
    schemes: Sequence[str] | None = None,
    *,
    on_step: Callable[[str], None] | None = None,
) -> Handover:
    """Simulate, compare and verify everything a hand-over report states.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    schemes : sequence of str, optional
        Schemes to compare; the scenario's own list by default. [-]
    on_step : callable, optional
        Called with a short description before each long step (progress). [-]

    Returns
    -------
    Handover
        The comparison and, per scheme, what the report states.

    Raises
    ------
    ScenarioError
        For a bad scheme list.
    ConvergenceError
        When a simulation or a flow solve fails.
    """

    def step(text: str) -> None:
        if on_step is not None:
            on_step(text)

    comparison = compare_schemes(
        scenario, schemes, on_scheme=lambda name: step(f"simulating {name}")
    )
    analyses = tuple(a for a in available_analyses() if a in _ADAPTERS)
    per_scheme = []
    for outcome in comparison.outcomes:
        step(f"verifying {outcome.name} at design conditions")
        per_scheme.append(scheme_handover(scenario, outcome.run, analyses))
    loads = tuple(room.design_heat_load_W for room in resolve(scenario).rooms)
    return Handover(scenario, comparison, tuple(per_scheme), loads, analyses)
