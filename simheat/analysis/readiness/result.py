"""What ``simheat readiness`` finds, as result objects in SI units."""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

if TYPE_CHECKING:
    from simheat.analysis.start_time import StartTime


@dataclass(frozen=True)
class Basis:
    """How the return temperature follows the flow temperature.

    Attributes
    ----------
    drop_K : float or None
        Supply-return difference kept at every flow temperature (the design
        drop unless given); None with a fixed return temperature. [K]
    return_C : float or None
        Fixed return temperature; None when the drop is kept. [°C]
    """

    drop_K: float | None
    return_C: float | None

    def return_at(self, flow_C: float) -> float:
        """Return temperature at a flow temperature. [°C].

        Parameters
        ----------
        flow_C : float
            Flow (supply) temperature. [°C]
        """
        return self.return_C if self.drop_K is None else flow_C - self.drop_K

    @property
    def kind(self) -> str:
        """``"drop"`` or ``"return"``."""
        return "drop" if self.drop_K is not None else "return"


@dataclass(frozen=True)
class RadiatorLimit:
    """One radiator's load and the lowest flow temperature that meets it.

    Attributes
    ----------
    id, room : str
        Emitter and room ids. [-]
    nominal_W : float
        Output at 75/65/20 °C (EN 442). [W]
    exponent : float
        EN 442 exponent. [-]
    room_C : float
        Its room's setpoint. [°C]
    share_W : float
        Its share of the room's design load (by nominal output, as the design
        flows share it). [W]
    lowest_flow_temp_C : float or None
        Lowest flow temperature, rounded up to 0.1 K, at which its output on
        the basis meets its share; None when not even at the highest flow
        temperature considered. [°C]
    verified_output_W : float or None
        Its output there recomputed by the steady energy balance
        (:func:`simheat.physics.emitter.steady_output_W`) at the flow that
        carries the share across the basis' temperatures. [W]
    emitter : int
        Its index in the scenario's emitters. [-]
    """

    id: str
    room: str
    nominal_W: float
    exponent: float
    room_C: float
    share_W: float
    lowest_flow_temp_C: float | None
    verified_output_W: float | None
    emitter: int = -1


@dataclass(frozen=True)
class RadiatorAtTarget:
    """One radiator at one target flow temperature.

    Attributes
    ----------
    id : str
        Emitter id. [-]
    share_W : float
        Its share of the room's design load. [W]
    output_W : float or None
        Output on the basis (flow at the target, return by the basis, room at
        setpoint); None when the basis' return would not lie above the room. [W]
    nominal_needed_W : float or None
        Nominal output (75/65/20 °C), rounded up to 10 W, of a replacement
        that meets the share on the basis; None when the radiator is enough or
        none can (return not above the room). [W]
    verified_output_W : float or None
        The replacement's output recomputed by the steady energy balance at
        the target, at the flow that carries the share across the basis'
        temperatures. [W]
    flow_as_piped_kg_s : float
        Its flow in the scheme's flow split at the target (valves at their
        presets, heads open). [kg/s]
    inlet_as_piped_C : float
        Its inlet temperature there (steady temperatures of the network). [°C]
    output_as_piped_W : float
        Its steady output there. [W]
    replaced_as_piped_W : float or None
        Its output as piped with every replacement of this target in place
        (scenario changed, flow split and temperatures solved again); None
        when nothing is replaced at this target. [W]
    """

    id: str
    share_W: float
    output_W: float | None
    nominal_needed_W: float | None
    verified_output_W: float | None
    flow_as_piped_kg_s: float
    inlet_as_piped_C: float
    output_as_piped_W: float
    replaced_as_piped_W: float | None

    @property
    def enough(self) -> bool:
        """Whether its output on the basis meets its share."""
        return self.output_W is not None and self.output_W >= self.share_W

    @property
    def enough_as_piped(self) -> bool:
        """Whether its output as piped meets its share."""
        return self.output_as_piped_W >= self.share_W

    @property
    def enough_replaced_as_piped(self) -> bool | None:
        """Whether it meets its share as piped with the replacements in place.

        None when nothing is replaced at this target.
        """
        if self.replaced_as_piped_W is None:
            return None
        return self.replaced_as_piped_W >= self.share_W


@dataclass(frozen=True)
class ReadinessMorning:
    """The morning simulated with the flow temperature fixed at a target.

    Attributes
    ----------
    flow_temp_C : float
        The fixed flow-temperature setpoint. [°C]
    time_to_setpoint_s : dict of str to float or None
        Each room's time to setpoint from the start of comfort; None when not
        reached. [s]
    final_air_C : dict of str to float
        Each room's air temperature at the end of the run. [°C]
    source_at_limit : float or None
        Share of comfort at the source's limit (a heat pump's capacity). [-]
    electric_J : float or None
        A heat pump's electricity over the run; None for a boiler. [J]
    mean_cop : float or None
        Its heat over its electricity; None for a boiler. [-]
    start : StartTime or None
        The latest heating start that has the rooms at setpoint by the ready
        time asked for, at this fixed flow temperature
        (:func:`simheat.analysis.start_time.latest_start`); None when no ready
        time was asked. [-]
    """

    flow_temp_C: float
    time_to_setpoint_s: dict[str, float | None]
    final_air_C: dict[str, float]
    source_at_limit: float | None
    electric_J: float | None
    mean_cop: float | None
    start: StartTime | None = None

    @property
    def all_rooms_s(self) -> float | None:
        """Time until every room is at setpoint; None when one never is. [s]."""
        times = list(self.time_to_setpoint_s.values())
        return None if None in times else max(times, default=0.0)


@dataclass(frozen=True)
class TargetResult:
    """Every radiator of one scheme at one target flow temperature.

    Attributes
    ----------
    flow_temp_C : float
        The target. [°C]
    radiators : tuple of RadiatorAtTarget
        In scenario order. [-]
    morning : ReadinessMorning or None
        The simulated morning (``simulate=True``). [-]
    capacity_W : float or None
        A heat pump's capacity at the design outdoor temperature and this flow
        temperature (its rating table); None for a boiler. [W]
    cop : float or None
        Its COP there; None for a boiler. [-]
    morning_replaced : ReadinessMorning or None
        The same morning with every replacement of this target in place
        (``simulate=True`` and a radiator short on the basis); None otherwise. [-]
    outside_table : str or None
        Where the heat pump's point leaves its table (capacity and COP held at
        its edge), or None. [-]
    """

    flow_temp_C: float
    radiators: tuple[RadiatorAtTarget, ...]
    morning: ReadinessMorning | None = None
    capacity_W: float | None = None
    cop: float | None = None
    morning_replaced: ReadinessMorning | None = None
    outside_table: str | None = None


@dataclass(frozen=True)
class SchemeReadiness:
    """One piping scheme: the limit as piped and every target.

    Attributes
    ----------
    scheme : str
        Piping scheme. [-]
    lowest_flow_temp_as_piped_C : float or None
        Lowest flow temperature, rounded up to 0.1 K, at which every radiator
        meets its share with the scheme's own flow split and steady network
        temperatures; None when not even at the highest considered. [°C]
    limiting_as_piped : tuple of str
        The radiators that set it. [-]
    targets : tuple of TargetResult
        One per target flow temperature. [-]
    """

    scheme: str
    lowest_flow_temp_as_piped_C: float | None
    limiting_as_piped: tuple[str, ...]
    targets: tuple[TargetResult, ...]


@dataclass(frozen=True)
class OutputCurves:
    """Each radiator's output on the basis as a share of its load, against flow.

    Attributes
    ----------
    flow_temp_C : ndarray, shape (n,)
        Flow temperatures. [°C]
    percent_of_share : ndarray, shape (n_radiators, n)
        Output over share, in per cent; NaN where the basis' return would not
        lie above the room. [%]
    ids : tuple of str
        Radiator ids, one per row. [-]
    """

    flow_temp_C: np.ndarray
    percent_of_share: np.ndarray
    ids: tuple[str, ...]


@dataclass(frozen=True)
class Readiness:
    """Low-temperature readiness of a scenario under one or more schemes.

    Attributes
    ----------
    scenario_name : str
        The house. [-]
    source_kind : str
        ``"boiler"`` or ``"heat_pump"``. [-]
    basis : Basis
        Return temperature rule. [-]
    radiators : tuple of RadiatorLimit
        Every radiator's load and own lowest flow temperature. [-]
    lowest_flow_temp_C : float or None
        The house's lowest flow temperature on the basis (the highest of the
        radiators'); None when a radiator cannot meet its share at all. [°C]
    limiting : tuple of str
        The radiators that set it (ties at the rounded limit). [-]
    near_limit : tuple of str
        Radiators whose own limit lies within 0.5 K below it. [-]
    targets_C : tuple of float
        Target flow temperatures, highest first. [°C]
    schemes : tuple of SchemeReadiness
        Per scheme. [-]
    curves : OutputCurves
        Output over load against flow temperature, for the figure. [-]
    highest_flow_C : float
        Highest flow temperature considered. [°C]
    design_load_W : float
        Sum of the rooms' design loads. [W]
    """

    scenario_name: str
    source_kind: str
    basis: Basis
    radiators: tuple[RadiatorLimit, ...]
    lowest_flow_temp_C: float | None
    limiting: tuple[str, ...]
    near_limit: tuple[str, ...]
    targets_C: tuple[float, ...]
    schemes: tuple[SchemeReadiness, ...]
    curves: OutputCurves
    highest_flow_C: float
    design_load_W: float = 0.0
