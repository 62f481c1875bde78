"""Run and Summary: what a simulation produces and what is stored."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from simheat.hydraulics.network import Network
from simheat.scenario.model import Scenario


@dataclass(frozen=True)
class RoomResult:
    """Warm-up result of one room.

    Attributes
    ----------
    id : str
        Room id. [-]
    setpoint_C : float
        Comfort setpoint. [°C]
    time_to_setpoint_s : float or None
        Time from the start of comfort until the air first comes within the
        tolerance of the setpoint; ``None`` when it never does. [s]
    final_air_temp_C : float
        Air temperature at the end of the run. [°C]
    time_to_setpoint_operative_s : float or None
        As ``time_to_setpoint_s`` for the operative temperature (see
        :attr:`Run.operative_temp_C`). [s]
    final_operative_temp_C : float
        Operative temperature at the end of the run. [°C]
    overshoot_K : float
        Largest excess of the air temperature over the setpoint after the room
        reached its setpoint; 0 when it never rose above it or never got there. [K]
    """

    id: str
    setpoint_C: float
    time_to_setpoint_s: float | None
    final_air_temp_C: float
    time_to_setpoint_operative_s: float | None
    final_operative_temp_C: float
    overshoot_K: float

    @property
    def reached(self) -> bool:
        """Whether the air reached the setpoint (within the tolerance)."""
        return self.time_to_setpoint_s is not None


@dataclass(frozen=True)
class EmitterResult:
    """Flow and output of one emitter over the comfort period.

    Attributes
    ----------
    id, room : str
        Emitter id and the id of its room. [-]
    mean_flow_kg_s, design_flow_kg_s : float
        Time-mean mass flow during comfort and the design mass flow. [kg/s]
    mean_output_W : float
        Time-mean heat output during comfort. [W]
    hot_water_arrival_s : float or None
        Time from the start of comfort until the emitter's inlet first reaches
        :attr:`Summary.hot_water_level_C`; ``None`` when it never does. [s]
    """

    id: str
    room: str
    mean_flow_kg_s: float
    design_flow_kg_s: float
    mean_output_W: float
    hot_water_arrival_s: float | None


@dataclass(frozen=True)
class EnergyBooks:
    """Water-side energy books over the morning (from its start). [J].

    ``source = room_gains + pipe_losses + stored_change`` up to ``balance_error_pct``
    of the source energy.

    Attributes
    ----------
    source_J : float
        Heat the source gave to the water. [J]
    room_gains_J : float
        Heat the emitters gave to the rooms. [J]
    pipe_losses_J : float
        Heat the pipes lost to their surroundings (rooms or unheated space). [J]
    stored_change_J : float
        Change of the heat stored in water and radiator metal, last time minus
        first. [J]
    pipe_to_unheated_J : float or None
        Of the pipe losses, the heat lost to unheated space (the feed in the
        plant room, pipes under a suspended floor); None for run files written
        before it was counted. [J]
    electric_J : float
        Electricity a heat pump used: its heat over its COP at every moment,
        integrated (0 for a boiler, and for run files written before it was
        counted). [J]
    """

    source_J: float
    room_gains_J: float
    pipe_losses_J: float
    stored_change_J: float
    pipe_to_unheated_J: float | None = None
    electric_J: float = 0.0

    @property
    def pipe_to_rooms_J(self) -> float | None:
        """Of the pipe losses, the heat given to the rooms the pipes run through. [J].

        None when the split is not known (older run files).
        """
        if self.pipe_to_unheated_J is None:
            return None
        return self.pipe_losses_J - self.pipe_to_unheated_J

    @property
    def mean_cop(self) -> float | None:
        """Heat from the source over the electricity it used; None without any. [-]."""
        if self.electric_J <= 0.0:
            return None
        return self.source_J / self.electric_J

    @property
    def balance_error_pct(self) -> float:
        """Closure error of the books as a percentage of the source energy. [%]."""
        residual = (
            self.source_J
            - self.room_gains_J
            - self.pipe_losses_J
            - self.stored_change_J
        )
        scale = max(abs(self.source_J), 1.0)
        return 100.0 * abs(residual) / scale


@dataclass(frozen=True)
class Summary:
    """Per-room, per-emitter and energy results of one run.

    Attributes
    ----------
    rooms : tuple of RoomResult
        One per room, in scenario order. [-]
    emitters : tuple of EmitterResult
        One per emitter, in scenario order. [-]
    energy : EnergyBooks
        Water-side energy books over the run. [-]
    peak_source_power_W : float
        Largest heat output of the source during the run. [W]
    hot_water_level_C : float
        Inlet temperature that counts as hot water: 90 % of the way from the
        initial water temperature to the flow-temperature setpoint at the start of
        comfort, or to the highest supply temperature reached during comfort when
        the source never reached its setpoint (held at its power limit). [°C]
    source_at_limit : float or None
        Share of the comfort period the source spent at its power limit (output
        at least 99 % of its maximum power; for a heat pump of its capacity at
        that moment's outdoor and flow temperatures, see
        :func:`simheat.runs.metrics.source_at_limit`); None for run files
        written before it was recorded. [-]
    source_below_min_flow : float or None
        Share of the comfort period a heat pump's flow lay below its minimum
        flow (so it heated less, or not at all); None for a boiler, a heat pump
        without a minimum flow, or an older run file. [-]
    """

    rooms: tuple[RoomResult, ...]
    emitters: tuple[EmitterResult, ...]
    energy: EnergyBooks
    peak_source_power_W: float
    hot_water_level_C: float
    source_at_limit: float | None = None
    source_below_min_flow: float | None = None

    @property
    def rooms_not_reached(self) -> tuple[str, ...]:
        """Ids of the rooms whose air never reached the setpoint."""
        return tuple(r.id for r in self.rooms if not r.reached)


@dataclass(frozen=True, eq=False)
class Night:
    """The night before the morning: the house cooling with the heating off.

    The run starts at ``off_clock_s`` from the house's steady state with the
    heating holding the comfort setpoints (the evening); heating and pumps stay
    off until the morning starts (time 0 of :class:`Run`). Times are negative,
    counted like the run's from the start of the morning.

    Attributes
    ----------
    off_clock_s : float
        Clock time the heating went off, seconds after midnight. [s]
    time_s : ndarray, shape (n_night,)
        Output times, from the night's start up to and including 0. [s]
    outdoor_temp_C : ndarray, shape (n_night,)
        Outdoor temperature. [°C]
    air_temp_C, structure_temp_C : ndarray, shape (n_night, n_rooms)
        Air and structure node temperature of each room. [°C]
    emitter_output_W : ndarray, shape (n_night, n_emitters)
        Heat output of each emitter (the water in it cooling down). [W]
    stored_heat_J : ndarray, shape (n_night,)
        Heat stored in water and radiator metal above 0 °C. [J]
    """

    off_clock_s: float
    time_s: np.ndarray
    outdoor_temp_C: np.ndarray
    air_temp_C: np.ndarray
    structure_temp_C: np.ndarray
    emitter_output_W: np.ndarray
    stored_heat_J: np.ndarray


@dataclass(frozen=True, eq=False)
class Run:
    """Time series of one simulated morning under one scheme.

    All series share ``time_s`` (seconds from the start of the morning, the
    scenario's ``start_clock``); 2-D series have one column per room or per
    emitter in scenario order. The night before it, when simulated, is in
    :attr:`night`.

    Attributes
    ----------
    scenario : Scenario
        The simulated house. [-]
    scheme : str
        Piping scheme. [-]
    network : Network
        The scheme's network. [-]
    time_s : ndarray, shape (n_times,)
        Output times from the start of the run. [s]
    outdoor_temp_C : ndarray, shape (n_times,)
        Outdoor temperature. [°C]
    air_temp_C, structure_temp_C : ndarray, shape (n_times, n_rooms)
        Air and structure node temperature of each room. [°C]
    emitter_flow_kg_s : ndarray, shape (n_times, n_emitters)
        Mass flow through each emitter. [kg/s]
    emitter_output_W : ndarray, shape (n_times, n_emitters)
        Heat output of each emitter. [W]
    emitter_inlet_temp_C : ndarray, shape (n_times, n_emitters)
        Water temperature at each emitter's inlet (its upstream node). [°C]
    supply_temp_C, return_temp_C : ndarray, shape (n_times,)
        Water temperature leaving and entering the heat source. [°C]
    source_power_W : ndarray, shape (n_times,)
        Heat the source gives to the water. [W]
    energy_J : ndarray, shape (n_times, 5)
        Cumulative source heat, heat emitted to the rooms, pipe losses, the part
        of them lost to unheated space, and a heat pump's electricity (zero for
        a boiler), since the start of the morning; run files from before the
        unheated split have the first three only. [J]
    stored_heat_J : ndarray, shape (n_times,)
        Heat stored in water and radiator metal above 0 °C. [J]
    summary : Summary
        Per-room, per-emitter and energy results. [-]
    solver : dict
        Record of the integration: method, tolerance, work counters, wall time,
        valve events and pump stop times. [-]
    source_capacity_W : ndarray, shape (n_times,), or None
        The most heat the source could give: a boiler's power limit, a heat
        pump's capacity at the outdoor and flow temperatures of the moment.
        A run file written before it was recorded reads its boiler's limit. [W]
    electric_power_W : ndarray, shape (n_times,), or None
        A heat pump's electric power (zero for a boiler and in older run
        files). [W]
    source_flow_kg_s : ndarray, shape (n_times,), or None
        Water flow through the source; None for older run files. [kg/s]
    night : Night or None
        The night before the morning when it was simulated; None when the
        scenario gave the initial state (or for run files written before
        nights were simulated). [-]
    """

    scenario: Scenario
    scheme: str
    network: Network
    time_s: np.ndarray
    outdoor_temp_C: np.ndarray
    air_temp_C: np.ndarray
    structure_temp_C: np.ndarray
    emitter_flow_kg_s: np.ndarray
    emitter_output_W: np.ndarray
    emitter_inlet_temp_C: np.ndarray
    supply_temp_C: np.ndarray
    return_temp_C: np.ndarray
    source_power_W: np.ndarray
    energy_J: np.ndarray
    stored_heat_J: np.ndarray
    summary: Summary
    solver: dict = field(default_factory=dict)
    source_capacity_W: np.ndarray | None = None
    electric_power_W: np.ndarray | None = None
    source_flow_kg_s: np.ndarray | None = None
    night: Night | None = None

    @property
    def pump_stop_times_s(self) -> dict[str, float]:
        """Time each pump that stopped during the run stopped, by pump link name. [s].

        From the solver record's ``pump_stop_times_s``. A record without it (runs
        written before single pumps could stop) had every pump stop at its
        ``pump_stop_s``, or none.
        """
        times = self.solver.get("pump_stop_times_s")
        if times is not None:
            return {str(name): float(t) for name, t in times.items()}
        every = self.solver.get("pump_stop_s")
        if every is None:
            return {}
        return {
            self.network.link_names[k]: float(every) for k in self.network.pump_links()
        }

    @property
    def floor_pumps(self) -> dict[str, dict]:
        """Each floor pump's time running and switching, by pump link name.

        From the solver record's ``floor_pumps`` (empty for a scheme without
        floor pumps, and for runs written before it was recorded): per pump
        ``on_time_s`` (time it ran while the system circulated) [s],
        ``switches`` (starts and stops, the start of heating included) [-] and
        ``switched_s``: ``[time, running]`` at the start and at each switch.
        [s, -]
        """
        return {
            str(name): dict(record)
            for name, record in self.solver.get("floor_pumps", {}).items()
        }

    @property
    def operative_temp_C(self) -> np.ndarray:
        """Operative temperature: mean of air and structure temperature. [°C].

        The structure node stands in for the mean radiant temperature of the room's
        surfaces (the two-node model has no separate surface node), and the operative
        temperature is taken as the plain mean of air and mean radiant temperature,
        the simplification ISO 7726:1998 and EN ISO 7730:2005 allow at low air speed
        (below 0.2 m/s) where the convective and radiative coefficients are about
        equal.
        """
        return operative_temp_C(self.air_temp_C, self.structure_temp_C)


def operative_temp_C(air_temp_C, structure_temp_C):
    """Operative temperature as the mean of air and structure temperature. [°C].

    Parameters
    ----------
    air_temp_C : float or ndarray
        Air node temperature. [°C]
    structure_temp_C : float or ndarray
        Structure node temperature, standing for the mean radiant temperature. [°C]

    Returns
    -------
    float or ndarray
        ``(air + structure) / 2``; see :attr:`Run.operative_temp_C`. [°C]

    Examples
    --------
    >>> operative_temp_C(21.0, 17.0)
    19.0
    """
    return 0.5 * (air_temp_C + structure_temp_C)
