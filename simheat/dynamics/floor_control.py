"""Floor pumps switched by a floor thermostat or a shut-off schedule.

In the ``_floor_pumps`` schemes a floor's pump may follow a thermostat in a
reference room of the floor (``[[layout.floor_pumps]] thermostat_room``): an
on/off switch with a hysteresis, and minimum run and off times; and a floor may
be shut off for clock periods (``shut_off``): its pump stops and its check valve
holds the floor still. The scenario keys are read by
:mod:`simheat.scenario.floor_control`.

Switching is an event in time, not a kink inside the right-hand side. Within
one integration segment every pump keeps its state, so the right-hand side stays
smooth; a segment ends where a thermostat crosses its switching temperature
(found by ``solve_ivp``'s event location, root finding on the dense output),
where a shut-off period starts or ends, or where a minimum run or off time that
held a switch back runs out. At each segment end this module decides, in plain
Python, what every floor pump does next:

- the thermostat *calls for heat* from when the reference room's air falls to
  the setpoint less half the hysteresis until it rises to the setpoint plus half
  of it (``FloorControl.hysteresis_K``); the setpoint is the room's (the
  setback setpoint before comfort) unless the scenario gives one;
- the pump should run when its thermostat calls for heat (always, without a
  thermostat) and its floor is not shut off;
- it switches at once into a shut-off period; otherwise only once it has run
  ``min_run_s`` (to stop) or stood ``min_off_s`` (to start) since it last
  switched. A switch held back is taken when the time runs out, if it is still
  wanted then.

A pump that a failure stops (``stop_at_h``) stays stopped whatever its control
says. Heating off before comfort stops every pump, as before.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

from simheat.dynamics.controls import in_comfort
from simheat.hydraulics.layouts import floor_pump_link
from simheat.hydraulics.network import Network
from simheat.scenario.model import FloorControl, Scenario

__all__ = [
    "FloorSwitch",
    "FloorSwitching",
    "SwitchState",
    "floor_switches",
    "shut_periods_s",
]

DAY_S = 86400.0
# Times closer than this are the same instant of the run. [s]
TIME_TOL_S = 1e-6


def shut_periods_s(
    control: FloorControl,
    start_clock_s: float,
    duration_s: float,
    from_s: float = 0.0,
) -> tuple[tuple[float, float], ...]:
    """The control's shut-off clock periods as intervals of the run.

    Parameters
    ----------
    control : FloorControl
        The floor's control (clock periods, seconds after midnight). [s]
    start_clock_s : float
        Clock time at the start of the run (its time 0), seconds after
        midnight. [s]
    duration_s : float
        Length of the run. [s]
    from_s : float, optional
        Where the integration starts: 0, or before it (a night, an earlier
        heating start). [s]

    Returns
    -------
    tuple of (float, float)
        Sorted, merged intervals ``[start, end)`` within ``[from_s,
        duration_s]``, from the start of the run. [s]

    Examples
    --------
    From 22:00 to 06:00 in a run starting at 05:00 for 6 h: the first hour;
    from 02:00 on, the three hours before it too.

    >>> from simheat.scenario.model import FloorControl
    >>> night = FloorControl(floor=1, shut_off=((79200.0, 21600.0),))
    >>> shut_periods_s(night, 18000.0, 21600.0)
    ((0.0, 3600.0),)
    >>> shut_periods_s(night, 18000.0, 21600.0, from_s=-10800.0)
    ((-10800.0, 3600.0),)
    """
    found = []
    days = int(math.ceil((start_clock_s + duration_s) / DAY_S)) + 1
    before = int(math.ceil(max(-from_s, 0.0) / DAY_S)) + 1
    for clock_from, clock_until in control.shut_off:
        length = (clock_until - clock_from) % DAY_S
        for day in range(-before, days + 1):
            start = clock_from + day * DAY_S - start_clock_s
            end = start + length
            start, end = max(start, from_s), min(end, duration_s)
            if end > start:
                found.append((start, end))
    merged: list[list[float]] = []
    for start, end in sorted(found):
        if merged and start <= merged[-1][1]:
            merged[-1][1] = max(merged[-1][1], end)
        else:
            merged.append([start, end])
    return tuple((a, b) for a, b in merged)


@dataclass(frozen=True)
class FloorSwitch:
    """A floor pump's control, resolved for one run and one network.

    Attributes
    ----------
    link : int
        The floor pump's link in the network. [-]
    name : str
        Its link name (``pump:floorN``). [-]
    control : FloorControl
        The scenario's control of the floor. [-]
    air_state : int or None
        Index in the state vector of the reference room's air temperature;
        None without a thermostat. [-]
    shut_s : tuple of (float, float)
        Shut-off intervals of the run (:func:`shut_periods_s`). [s]
    """

    link: int
    name: str
    control: FloorControl
    air_state: int | None
    shut_s: tuple[tuple[float, float], ...]

    def setpoint_C(self, scenario: Scenario, comfort: bool) -> float:
        """The thermostat's setpoint: given, else the room's (or setback). [°C].

        Parameters
        ----------
        scenario : Scenario
            The house and morning. [-]
        comfort : bool
            Whether comfort has started. [-]

        Returns
        -------
        float
            Setpoint. [°C]
        """
        if self.control.setpoint_C is not None:
            return self.control.setpoint_C
        if comfort:
            return scenario.rooms[self.control.reference_room].setpoint_C
        return scenario.schedule.setback_setpoint_C

    def thresholds_C(self, scenario: Scenario, comfort: bool) -> tuple[float, float]:
        """Air temperatures at which the thermostat stops and starts calling. [°C].

        Parameters
        ----------
        scenario : Scenario
            The house and morning. [-]
        comfort : bool
            Whether comfort has started. [-]

        Returns
        -------
        (float, float)
            Stop calling at the first (setpoint + half the hysteresis), call
            again at the second (setpoint - half of it). [°C]
        """
        setpoint = self.setpoint_C(scenario, comfort)
        half = 0.5 * self.control.hysteresis_K
        return setpoint + half, setpoint - half

    def shut(self, time_s: float) -> bool:
        """Whether the floor is shut off at ``time_s`` (periods half-open). [-].

        Parameters
        ----------
        time_s : float
            Time from the start of the run. [s]

        Returns
        -------
        bool
            True inside a shut-off period.
        """
        return any(a <= time_s < b for a, b in self.shut_s)

    def edges_s(self) -> set[float]:
        """Times a shut-off period starts or ends. [s]."""
        return {t for period in self.shut_s for t in period}


@dataclass
class SwitchState:
    """What a floor pump and its thermostat are doing.

    Attributes
    ----------
    calling : bool
        The thermostat calls for heat (always True without one). [-]
    running : bool
        The pump runs (as far as its control goes). [-]
    since_s : float
        When ``running`` last changed (-inf: never). [s]
    log : list of (float, bool)
        ``(time, running)`` at the start and at every switch. [s, -]
    """

    calling: bool
    running: bool
    since_s: float = -math.inf
    log: list[tuple[float, bool]] = field(default_factory=list)


def floor_switches(
    scenario: Scenario, network: Network, air_start: int, from_s: float = 0.0
) -> tuple[FloorSwitch, ...]:
    """The switched floor pumps of a network, with their controls.

    Parameters
    ----------
    scenario : Scenario
        The house and morning (``layout.floor_controls``). [-]
    network : Network
        The scheme's network; only a ``_floor_pumps`` scheme has floor pumps. [-]
    air_start : int
        Index of the first room's air temperature in the state vector. [-]
    from_s : float, optional
        Where the integration starts (before 0 for a night or an earlier
        heating start): shut-off periods from there on. [s]

    Returns
    -------
    tuple of FloorSwitch
        One per floor pump with a thermostat or shut-off periods, in floor
        order; empty for a scheme without floor pumps (its pumps have nothing
        to switch).
    """
    names = {name: k for k, name in enumerate(network.link_names)}
    sim = scenario.simulation
    switches = []
    for floor, control in sorted(scenario.layout.floor_controls.items()):
        link = names.get(floor_pump_link(floor))
        if link is None or not control.switched:
            continue
        room = control.reference_room
        switches.append(
            FloorSwitch(
                link=link,
                name=network.link_names[link],
                control=control,
                air_state=None if room is None else air_start + room,
                shut_s=shut_periods_s(
                    control, scenario.schedule.start_clock_s, sim.duration_s, from_s
                ),
            )
        )
    return tuple(switches)


def _calling(
    switch: FloorSwitch, scenario: Scenario, y: np.ndarray, time_s: float, now: bool
) -> bool:
    """The thermostat's call after reading the air at ``time_s`` (hysteresis)."""
    if switch.air_state is None:
        return True
    comfort = time_s >= scenario.schedule.comfort_start_s
    stop_at, start_at = switch.thresholds_C(scenario, comfort)
    air = float(y[switch.air_state])
    if air >= stop_at:
        return False
    if air <= start_at:
        return True
    return now


def initial_state(
    switch: FloorSwitch, scenario: Scenario, y0: np.ndarray, time_s: float = 0.0
) -> SwitchState:
    """State at the start of the integration.

    A thermostat whose room starts within its switching band calls for heat
    when the room is below the setpoint.

    Parameters
    ----------
    switch : FloorSwitch
        The floor pump. [-]
    scenario : Scenario
        The house and morning. [-]
    y0 : ndarray
        Initial state vector. [°C, J]
    time_s : float, optional
        Its time from the start of the morning (negative for a night). [s]

    Returns
    -------
    SwitchState
        Calling, running (when wanted: no minimum time binds at the start)
        and the first log entry.
    """
    below = True
    if switch.air_state is not None:
        comfort = scenario.schedule.comfort_start_s <= time_s
        below = float(y0[switch.air_state]) < switch.setpoint_C(scenario, comfort)
    calling = _calling(switch, scenario, y0, time_s, below)
    running = calling and not switch.shut(time_s)
    return SwitchState(calling, running, -math.inf, [(time_s, running)])


def _hold_s(switch: FloorSwitch, state: SwitchState) -> float:
    """How long the pump must keep its state from ``since_s``. [s]."""
    control = switch.control
    return control.min_run_s if state.running else control.min_off_s


def decide(
    switch: FloorSwitch,
    state: SwitchState,
    scenario: Scenario,
    y: np.ndarray,
    time_s: float,
) -> None:
    """Read the thermostat at ``time_s`` and switch the pump if it may (in place).

    Parameters
    ----------
    switch : FloorSwitch
        The floor pump. [-]
    state : SwitchState
        Its state; updated. [-]
    scenario : Scenario
        The house and morning. [-]
    y : ndarray
        State vector at ``time_s``. [°C, J]
    time_s : float
        Time from the start of the run. [s]
    """
    state.calling = _calling(switch, scenario, y, time_s, state.calling)
    shut = switch.shut(time_s)
    wanted = state.calling and not shut
    if wanted == state.running:
        return
    forced = shut and state.running
    if forced or time_s >= state.since_s + _hold_s(switch, state) - TIME_TOL_S:
        state.running = wanted
        state.since_s = time_s
        state.log.append((time_s, wanted))


def held_until_s(
    switch: FloorSwitch,
    state: SwitchState,
    scenario: Scenario,
    y: np.ndarray,
    time_s: float,
) -> float | None:
    """When a switch the pump wants but may not make yet becomes allowed. [s].

    Parameters
    ----------
    switch : FloorSwitch
        The floor pump. [-]
    state : SwitchState
        Its state after :func:`decide` at ``time_s``. [-]
    scenario : Scenario
        The house and morning. [-]
    y : ndarray
        State vector at ``time_s``. [°C, J]
    time_s : float
        Time from the start of the run. [s]

    Returns
    -------
    float or None
        The time its minimum run or off time runs out, when it is held back;
        None when it does what it wants.
    """
    wanted = state.calling and not switch.shut(time_s)
    if wanted == state.running:
        return None
    return state.since_s + _hold_s(switch, state)


def crossing_event(
    switch: FloorSwitch, state: SwitchState, scenario: Scenario, comfort: bool
) -> Callable | None:
    """The event that ends a segment where the thermostat changes its call.

    Parameters
    ----------
    switch : FloorSwitch
        The floor pump. [-]
    state : SwitchState
        Its state at the segment's start. [-]
    scenario : Scenario
        The house and morning. [-]
    comfort : bool
        Whether comfort holds over the segment (its setpoint). [-]

    Returns
    -------
    callable or None
        ``event(t, y, *args)`` for ``solve_ivp``: zero where the reference
        room's air reaches the temperature at which the call changes (rising
        to the stop temperature while calling, falling to the start
        temperature while not), terminal, in that direction; None without a
        thermostat.
    """
    if switch.air_state is None:
        return None
    stop_at, start_at = switch.thresholds_C(scenario, comfort)
    index = switch.air_state
    level, direction = (stop_at, 1.0) if state.calling else (start_at, -1.0)

    def event(t, y, *args):
        return y[index] - level

    event.terminal = True
    event.direction = direction
    return event


class FloorSwitching:
    """The floor pumps' switching over one run, step by step with the integration.

    The integration loop asks :meth:`next_span` for the next segment, lets
    :meth:`apply` stop the pumps that stand and hand back the thermostat
    events to watch, integrates, and reports the segment's end to
    :meth:`after`. Without switched floor pumps the spans are the fixed
    edges and there is nothing to watch.

    Parameters
    ----------
    wm : WarmUpModel
        The run's model: its scenario (``layout.floor_controls``), network and
        state layout (``slices["air"]``). [-]
    edges_s : iterable of float
        The fixed segment edges of the span integrated, its start (0, or
        before it when a night is simulated) and end among them. [s]
    y0 : ndarray
        State vector at the start of the span. [°C, J]

    Attributes
    ----------
    switches : tuple of FloorSwitch
        The switched floor pumps (:func:`floor_switches`). [-]
    states : list of SwitchState
        What each does; its ``log`` holds the switches made. [-]
    """

    def __init__(self, wm, edges_s, y0: np.ndarray) -> None:
        scenario = self.scenario = wm.scenario
        self.network = wm.network
        edges_s = sorted(edges_s)
        # 0 or before it (a night, an earlier heating start); the run's end or
        # before it (a start-time trial ends at the ready-by time)
        start, self.end_s = edges_s[0], edges_s[-1]
        air = wm.slices["air"].start
        self.switches = floor_switches(scenario, wm.network, air, start)
        switch_edges = {t for sw in self.switches for t in sw.edges_s()}
        self.edges_s = sorted(
            set(edges_s) | {t for t in switch_edges if start < t < self.end_s}
        )
        self.states = [initial_state(sw, scenario, y0, start) for sw in self.switches]
        self._t = start
        self._watching: list[int] = []

    def next_span(self, y: np.ndarray) -> tuple[float, float] | None:
        """The next segment: to the next edge or held-back switch; None at the end.

        Parameters
        ----------
        y : ndarray
            State vector at the end of the last segment (at the start first). [°C, J]

        Returns
        -------
        (float, float) or None
            Its start and end from the start of the run. [s]
        """
        t = self._t
        if t >= self.end_s - TIME_TOL_S:
            return None
        stop = min(e for e in self.edges_s if e > t + TIME_TOL_S)
        for sw, state in zip(self.switches, self.states, strict=True):
            held = held_until_s(sw, state, self.scenario, y, t)
            if held is not None and held > t + TIME_TOL_S:
                stop = min(stop, held)
        return t, stop

    def apply(self, seg) -> list[Callable] | None:
        """Stop the pumps that stand in ``seg`` (in place); the events to watch.

        Parameters
        ----------
        seg : Segment
            The segment's schedule settings; its ``pump_speed`` and
            ``circulating`` are updated. [-]

        Returns
        -------
        list of callable or None
            The terminal thermostat events for ``solve_ivp`` (None: none).
        """
        if not self.switches:
            return None
        watch = seg.heating  # heating off (a night): the call is read at the end
        comfort = in_comfort(self.scenario, 0.5 * (seg.start_s + seg.end_s))
        events = []
        self._watching = []
        for i, (sw, state) in enumerate(zip(self.switches, self.states, strict=True)):
            if not state.running:
                seg.pump_speed[sw.link] = 0.0  # stopped; its check valve holds
            event = crossing_event(sw, state, self.scenario, comfort)
            if watch and event is not None:
                self._watching.append(i)
                events.append(event)
        pumps = self.network.pump_links()
        seg.circulating = seg.heating and bool(np.any(seg.pump_speed[pumps] > 0.0))
        return events or None

    def after(self, seg, result) -> None:
        """Take the end of an integrated segment; decide what every pump does next.

        Parameters
        ----------
        seg : Segment
            The segment; its ``end_s`` becomes where the integration stopped
            (early where a thermostat crossed). [s]
        result : OdeResult
            ``solve_ivp``'s result over the segment. [-]
        """
        t = float(result.t[-1])
        seg.end_s = t
        self._t = t
        if not self.switches:
            return
        y = result.y[:, -1]
        if result.status == 1:  # a thermostat crossed: its call changes there
            for i, times in zip(self._watching, result.t_events, strict=True):
                if times.size:
                    self.states[i].calling = not self.states[i].calling
        for sw, state in zip(self.switches, self.states, strict=True):
            decide(sw, state, self.scenario, y, t)


def pump_summary(
    switch_link: int, segments, duration_s: float
) -> dict[str, float | int]:
    """On-time and switching count of one pump over a run's segments.

    Parameters
    ----------
    switch_link : int
        The pump's link. [-]
    segments : iterable
        ``(segment, dense output)`` pairs of the run, in order; each segment
        has ``start_s``, ``end_s``, ``circulating`` and ``pump_speed``. [-]
    duration_s : float
        Length of the run (the morning, from 0). [s]

    Returns
    -------
    dict
        Over the morning (a simulated night before 0, when the heating is off,
        left out): ``on_time_s`` (time it ran while the system circulated)
        [s], ``switches`` (times it started or stopped) [-], and
        ``switched_s``: ``[time, running]`` at 0 and at each switch. [s, -]
    """
    on_time = 0.0
    switches = 0
    previous = None
    log: list[list] = []
    for seg, _ in segments:
        if seg.end_s <= 0.0:
            continue  # the night before the morning
        start = max(float(seg.start_s), 0.0)
        running = bool(seg.circulating and seg.pump_speed[switch_link] > 0.0)
        if running:
            on_time += min(seg.end_s, duration_s) - start
        if previous is None or running != previous:
            log.append([start, running])
            switches += previous is not None
        previous = running
    return {"on_time_s": on_time, "switches": switches, "switched_s": log}
