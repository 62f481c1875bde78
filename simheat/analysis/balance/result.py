"""Results of a balance: per valve, per circuit, per pump, per scheme (SI units)."""

from __future__ import annotations

from dataclasses import dataclass

from simheat.analysis.balance.elements import Element
from simheat.scenario.model import Scenario
from simheat.scenario.settings import ScenarioSettings

# Every emitter's verified flow must lie within this of its target when the
# presets are continuous (the acceptance band). [-]
VERIFY_TOLERANCE = 0.05


@dataclass(frozen=True)
class ValveResult:
    """The commissioning line of one emitter.

    Attributes
    ----------
    emitter, room : str
        Emitter and room ids. [-]
    element : Element
        What is set: a preset, lockshield turns, or a Kv without a table. [-]
    setting : float
        Preset or turns [-]; Kv for an element without a table. [m3/h]
    kv_m3_h : float
        The element's Kv at the setting. [m3/h]
    link_kv_m3_h : float
        Kv of the emitter's valves together (valve and lockshield). [m3/h]
    target_kg_s, verified_kg_s : float
        Target flow and the flow the re-solve gives. [kg/s]
    dp_valve_Pa : float
        Drop across the emitter's valves at the verified flow. [Pa]
    limit : str or None
        Why the Kv is not reached (above fully open, below the smallest
        preset), None when it is. [-]
    shortfall_Pa : float
        The pressure the limit leaves unbalanced. [Pa]
    """

    emitter: str
    room: str
    element: Element
    setting: float
    kv_m3_h: float
    link_kv_m3_h: float
    target_kg_s: float
    verified_kg_s: float
    dp_valve_Pa: float
    limit: str | None = None
    shortfall_Pa: float = 0.0

    @property
    def deviation(self) -> float:
        """Verified flow over target, less one. [-]."""
        return self.verified_kg_s / self.target_kg_s - 1.0


@dataclass(frozen=True)
class CircuitResult:
    """A circuit that shares a manifold, header or riser.

    Attributes
    ----------
    name : str
        Circuit name. [-]
    design_flow_kg_s : float
        Its design flow. [kg/s]
    element : Element or None
        Its declared valve; None without one. [-]
    setting, kv_m3_h : float or None
        The valve's preset [-] and Kv [m3/h]; None without a valve.
    dp_valve_Pa : float or None
        Drop across the valve at the verified flow; None without a valve. [Pa]
    must_lose_Pa : float or None
        Without a valve: the drop a valve on its return could take with the
        circuit's index emitter fully open (None when no single pipe carries
        its flow); with one, the drop it takes at design. [Pa]
    limit : str or None
        Why the valve's Kv is not reached, None when it is. [-]
    shortfall_Pa : float
        The pressure the limit leaves unbalanced. [Pa]
    missing_valve : bool
        Whether the design flows need a valve here that is not declared (the
        circuit then runs off target by what ``must_lose_Pa`` says). [-]
    """

    name: str
    design_flow_kg_s: float
    element: Element | None
    setting: float | None
    kv_m3_h: float | None
    dp_valve_Pa: float | None
    must_lose_Pa: float | None
    limit: str | None = None
    shortfall_Pa: float = 0.0
    missing_valve: bool = False


@dataclass(frozen=True)
class PumpResult:
    """A pump's setting, its scenario setting and the verified duty point.

    Attributes
    ----------
    link : str
        Pump link name. [-]
    table : str
        Its scenario table (``pump``, ``layout.primary_pump`` ...). [-]
    mode : str
        Control mode. [-]
    key : str
        Setting key: ``speed`` [-] or ``setpoint_kPa``.
    setting, scenario_setting : float
        Chosen and scenario setting: speed ratio [-] or set head [Pa].
    need_Pa : float
        Rise its index circuit needs at the design flow. [Pa]
    rise_Pa, scenario_rise_Pa : float
        Rise at the design flow with the chosen and the scenario setting. [Pa]
    design_flow_m3_h : float
        Design flow through it. [m3/h]
    flow_m3_h, head_Pa : float
        Verified duty point. [m3/h], [Pa]
    index_emitter : str or None
        Emitter of its index circuit. [-]
    unabsorbed_Pa : float
        Part of its rise that no valve in series takes. [Pa]
    """

    link: str
    table: str
    mode: str
    key: str
    setting: float
    scenario_setting: float
    need_Pa: float
    rise_Pa: float
    scenario_rise_Pa: float
    design_flow_m3_h: float
    flow_m3_h: float
    head_Pa: float
    index_emitter: str | None
    unabsorbed_Pa: float = 0.0


@dataclass(frozen=True)
class SchemeBalance:
    """The balance of one scheme, verified by re-solving.

    Attributes
    ----------
    scheme : str
        Scheme name. [-]
    water_temp_C : float
        Water temperature of the balance and the verification. [°C]
    discrete, keep_pump : bool
        Whether settings were rounded to table steps, and pumps kept. [-]
    valves : tuple of ValveResult
        One per emitter, scenario order. [-]
    circuits : tuple of CircuitResult
        Every circuit of the scheme. [-]
    pumps : tuple of PumpResult
        Every pump; the plant's (or primary) pump first. [-]
    index_emitter : str
        Emitter of the scheme's index circuit (largest need). [-]
    refinements : int
        Re-solves spent refining presets beyond the closed form. [-]
    settings : ScenarioSettings
        What ``--write-scenario`` writes. [-]
    text : str
        The balanced scenario's TOML text. [-]
    balanced : Scenario
        The balanced scenario (parsed from ``text``). [-]
    """

    scheme: str
    water_temp_C: float
    discrete: bool
    keep_pump: bool
    valves: tuple[ValveResult, ...]
    circuits: tuple[CircuitResult, ...]
    pumps: tuple[PumpResult, ...]
    index_emitter: str
    refinements: int
    settings: ScenarioSettings
    text: str
    balanced: Scenario

    @property
    def worst(self) -> ValveResult:
        """The emitter whose verified flow is farthest from its target."""
        return max(self.valves, key=lambda v: abs(v.deviation))

    @property
    def worst_deviation_pct(self) -> float:
        """Signed deviation of the worst emitter from its target. [%]."""
        return 100.0 * self.worst.deviation

    @property
    def within_tolerance(self) -> bool:
        """Whether every emitter is within :data:`VERIFY_TOLERANCE`."""
        return abs(self.worst.deviation) <= VERIFY_TOLERANCE

    @property
    def explained(self) -> bool:
        """Whether a limit explains deviations from the targets.

        A valve at the end of its table, a circuit that needs a valve it does
        not have, or a pump surplus no valve takes.
        """
        return (
            any(v.limit for v in self.valves)
            or any(c.limit or c.missing_valve for c in self.circuits)
            or any(p.unabsorbed_Pa > 0.0 for p in self.pumps)
        )
