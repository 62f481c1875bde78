"""Schedules and controls: setpoints, flow temperature, pump, valves, outdoor air.

Everything here is a piecewise function of time. The integration is split into
segments at every time where a control switches (comfort start, pump stop, valve
events) or the flow-temperature schedule has a corner, so the integrator never
steps across a jump. The outdoor temperature is piecewise linear too; its corners
are mild and may be many (hourly weather), so they are left to step-size control.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence

import numpy as np

from simheat.errors import ScenarioError
from simheat.hydraulics.layouts import PLANT_PUMP_LINK, build, floor_pump_link
from simheat.hydraulics.network import Network
from simheat.scenario.model import Scenario

# Time constant of the source's flow-temperature control loop: a modulating source
# settles its flow temperature within a few minutes (our modelling choice). [s]
SOURCE_CONTROL_TIME_S = 60.0
# Corner width of the source power limit as a fraction of the maximum power. [-]
SOURCE_LIMIT_SMOOTHING = 0.005

ValveEvent = tuple[float, int, float]  # (time [s], emitter index, opening [-])


def check_valve_events(
    scenario: Scenario, valve_events: Iterable[Sequence[float]] | None
) -> tuple[ValveEvent, ...]:
    """Validate valve events and return them sorted by time.

    Parameters
    ----------
    scenario : Scenario
        The scenario (emitter count, duration). [-]
    valve_events : iterable of (time_s, emitter_index, opening) or None
        Manual valve settings: from ``time_s`` [s] on, the valve of emitter
        ``emitter_index`` [-] is held at ``opening`` [-] (0 closed, 1 open), on top
        of its thermostatic head. Events of equal time keep their given order.

    Returns
    -------
    tuple of (float, int, float)
        The events, sorted by time (stable).

    Raises
    ------
    ScenarioError
        On a time outside the run, an unknown emitter or an opening outside [0, 1].
    """
    if valve_events is None:
        return ()
    duration = scenario.simulation.duration_s
    n = len(scenario.emitters)
    checked = []
    for k, event in enumerate(valve_events):
        try:
            time_s, emitter, opening = event
        except (TypeError, ValueError):
            raise ScenarioError(
                f"valve_events[{k}]: must be (time_s, emitter_index, opening), "
                f"got {event!r}"
            ) from None
        if isinstance(emitter, bool) or int(emitter) != emitter:
            raise ScenarioError(
                f"valve_events[{k}]: emitter index must be an integer, got {emitter!r}"
            )
        if not 0 <= int(emitter) < n:
            raise ScenarioError(
                f"valve_events[{k}]: emitter index must be in 0..{n - 1}, "
                f"got {emitter!r}"
            )
        if not (np.isfinite(time_s) and 0.0 <= time_s <= duration):
            raise ScenarioError(
                f"valve_events[{k}]: time must lie within 0 to {duration:g} s, "
                f"got {time_s!r}"
            )
        if not (np.isfinite(opening) and 0.0 <= opening <= 1.0):
            raise ScenarioError(
                f"valve_events[{k}]: opening must lie within 0 to 1, got {opening!r}"
            )
        checked.append((float(time_s), int(emitter), float(opening)))
    return tuple(sorted(checked, key=lambda e: e[0]))


def pump_stop_time_s(scenario: Scenario, pump_stop_s: float | None) -> float | None:
    """The pump's stop time: the argument when given, else the scenario's. [s].

    Parameters
    ----------
    scenario : Scenario
        The scenario (``pump.stop_s``, run duration). [-]
    pump_stop_s : float or None
        Time every pump stops, overriding the scenario's; None for the scenario's. [s]

    Raises
    ------
    ScenarioError
        When the stop time lies outside the run.
    """
    stop = scenario.pump.stop_s if pump_stop_s is None else float(pump_stop_s)
    if stop is not None and not (0.0 <= stop <= scenario.simulation.duration_s):
        raise ScenarioError(
            f"pump_stop_s: must lie within 0 to {scenario.simulation.duration_s:g} s, "
            f"got {stop!r}"
        )
    return stop


def pump_stop_times_s(
    scenario: Scenario, network: Network, pump_stop_s: float | None = None
) -> dict[int, float]:
    """Time each pump of the network stops for good, by pump link index. [s].

    Parameters
    ----------
    scenario : Scenario
        The scenario: ``layout.primary_pump.stop_s`` and each
        ``layout.floor_pumps[floor].stop_s`` stop that one pump. [-]
    network : Network
        The scheme's network (its pump links). [-]
    pump_stop_s : float or None
        Time every pump stops (checked, :func:`pump_stop_time_s`). [s]

    Returns
    -------
    dict of int to float
        Stop time of every pump link that stops during the run; a pump with two
        stop times stops at the earlier. Pumps that keep running are absent. [s]

    Raises
    ------
    ScenarioError
        When a stop time is given to a pump the scheme does not have: a primary
        pump or a floor pump in a scheme where one pump at the heat source
        serves every floor.

    Notes
    -----
    In a ``_floor_pumps`` scheme the primary pump drives only the loop through
    the heat source to the low-loss header; stopped, it leaves the floor pumps
    circulating through the header without fresh heat. A stopped floor pump
    leaves its floor's circuit still: a stopped pump is a resistance (its
    curve's quadratic term) and the floor pumps carry check valves.
    """
    names = {name: k for k, name in enumerate(network.link_names)}
    floor_links = {
        f.floor: names.get(floor_pump_link(f.floor)) for f in scenario.route.floors
    }
    has_floor_pumps = any(link is not None for link in floor_links.values())
    origin = scenario.source_path
    stops: dict[int, float] = {}

    def stop(link: int, time_s: float) -> None:
        stops[link] = min(time_s, stops.get(link, time_s))

    primary = scenario.layout.primary_pump
    if primary is not None and primary.stop_s is not None:
        if not has_floor_pumps:
            raise ScenarioError(
                f"layout.primary_pump.stop_at_h: scheme {network.scheme!r} has no "
                "primary pump (its one pump at the heat source serves every floor; "
                "pump.stop_at_h stops it), only the '_floor_pumps' schemes have one "
                f"({origin})"
            )
        stop(names[PLANT_PUMP_LINK], primary.stop_s)
    for i, (floor, pump) in enumerate(scenario.layout.floor_pumps.items()):
        if pump.stop_s is None:
            continue
        link = floor_links.get(floor)
        if link is None:
            raise ScenarioError(
                f"layout.floor_pumps[{i}].stop_at_h: scheme {network.scheme!r} has "
                f"no pump of its own for floor {floor} (one pump at the heat source "
                "serves every floor), only the '_floor_pumps' schemes have floor "
                f"pumps ({origin})"
            )
        stop(link, pump.stop_s)
    if pump_stop_s is not None:
        for link in network.pump_links():
            stop(int(link), float(pump_stop_s))
    return dict(sorted(stops.items()))


def check_pump_stops(scenario: Scenario, schemes: Iterable[str]) -> None:
    """Check the scenario's pump stop times against every scheme before any runs.

    Parameters
    ----------
    scenario : Scenario
        The scenario. [-]
    schemes : iterable of str
        Scheme names to be simulated. [-]

    Raises
    ------
    ScenarioError
        As :func:`pump_stop_times_s`, for the first scheme that lacks a pump
        the scenario gives a stop time.
    """
    for scheme in schemes:
        pump_stop_times_s(scenario, build(scenario, scheme))


def segment_edges_s(
    scenario: Scenario,
    valve_events: Sequence[ValveEvent] = (),
    pump_stop_s: float | None = None,
    pump_stop_times_s: Iterable[float] = (),
    start_s: float = 0.0,
    end_s: float | None = None,
) -> list[float]:
    """Times where a control switches or kinks, from start to end of the run. [s].

    Parameters
    ----------
    scenario : Scenario
        The scenario (schedule, flow-temperature schedule). [-]
    valve_events : sequence of (time_s, emitter_index, opening)
        Checked valve events (:func:`check_valve_events`). [-]
    pump_stop_s : float or None
        Time every pump stops. [s]
    pump_stop_times_s : iterable of float
        Times single pumps stop (values of :func:`pump_stop_times_s`). [s]
    start_s : float
        Start of the integration: 0, or before it when the night is simulated
        (the night ends at 0, where the heating may come on). [s]
    end_s : float, optional
        End of the integration; the run's duration by default. [s]

    Returns
    -------
    list of float
        Sorted distinct times, first ``start_s`` and last ``end_s``.
    """
    end = scenario.simulation.duration_s if end_s is None else end_s
    edges = {start_s, 0.0, end, scenario.schedule.comfort_start_s}
    edges.update(t for t, _, _ in valve_events)
    if pump_stop_s is not None:
        edges.add(pump_stop_s)
    edges.update(pump_stop_times_s)
    if scenario.source.flow_schedule_time_s is not None:
        edges.update(scenario.source.flow_schedule_time_s)
    return sorted(t for t in edges if start_s <= t <= end)


def in_comfort(scenario: Scenario, time_s: float) -> bool:
    """Whether comfort is on at ``time_s`` (seconds from the start).

    Parameters
    ----------
    scenario : Scenario
        The scenario (comfort start). [-]
    time_s : float
        Time from the start of the run. [s]
    """
    return time_s >= scenario.schedule.comfort_start_s


def heating_on(scenario: Scenario, time_s: float) -> bool:
    """Whether the source (and, unless stopped, the pump) runs at ``time_s``.

    In comfort; before it with ``before_comfort = "setback"`` from the start
    (time 0, ``start_clock``) on. The night before the start is off.

    Parameters
    ----------
    scenario : Scenario
        The scenario (schedule). [-]
    time_s : float
        Time from the start of the run (negative in the night). [s]
    """
    if in_comfort(scenario, time_s):
        return True
    return scenario.schedule.before_comfort == "setback" and time_s >= 0.0


def pump_speeds(
    n_links: int,
    pump_links: Sequence[int],
    stop_times_s: dict[int, float],
    time_s: float,
) -> np.ndarray:
    """Speed ratio of every link's pump at ``time_s``: 1 running, 0 stopped. [-].

    Parameters
    ----------
    n_links : int
        Number of links of the network. [-]
    pump_links : sequence of int
        Indices of the pump links. [-]
    stop_times_s : dict of int to float
        Stop time per pump link that stops (:func:`pump_stop_times_s`). [s]
    time_s : float
        Time from the start of the run. [s]

    Returns
    -------
    ndarray
        One speed ratio per link (0 on links without a pump); a stopped pump is
        the flow solver's stopped-pump resistance. [-]

    Examples
    --------
    >>> pump_speeds(4, [0, 2], {2: 600.0}, 900.0).tolist()
    [1.0, 0.0, 0.0, 0.0]
    """
    speed = np.zeros(n_links)
    for link in pump_links:
        stop = stop_times_s.get(int(link))
        speed[link] = 0.0 if stop is not None and time_s >= stop else 1.0
    return speed


def valve_openings(
    n_emitters: int, valve_events: Sequence[ValveEvent], time_s: float
) -> np.ndarray:
    """Manual opening of every emitter's valve at ``time_s`` (1 when untouched). [-].

    Parameters
    ----------
    n_emitters : int
        Number of emitters. [-]
    valve_events : sequence of (time_s, emitter_index, opening)
        Checked valve events, sorted by time (:func:`check_valve_events`). [-]
    time_s : float
        Time from the start of the run. [s]
    """
    opening = np.ones(n_emitters)
    for t, emitter, value in valve_events:
        if t <= time_s:
            opening[emitter] = value
    return opening


def emitter_setpoints_C(
    scenario: Scenario, time_s: float, emitters: np.ndarray
) -> np.ndarray:
    """Setpoint each listed emitter's thermostatic head aims at. [°C].

    Parameters
    ----------
    scenario : Scenario
        The scenario (room setpoints, setback setpoint, schedule). [-]
    time_s : float
        Time from the start of the run. [s]
    emitters : ndarray of int
        Indices of the emitters. [-]
    """
    if in_comfort(scenario, time_s):
        return np.array(
            [scenario.rooms[scenario.emitters[i].room].setpoint_C for i in emitters]
        )
    return np.full(len(emitters), scenario.schedule.setback_setpoint_C)


def outdoor_temp_C(scenario: Scenario, time_s: float) -> float:
    """Outdoor temperature, linear between the weather points, held beyond. [°C].

    Parameters
    ----------
    scenario : Scenario
        The scenario (weather). [-]
    time_s : float
        Time from the start of the run. [s]
    """
    w = scenario.weather
    return float(np.interp(time_s, w.time_s, w.outdoor_temp_C))


def flow_temp_setpoint_C(scenario: Scenario, time_s: float) -> float:
    """Flow-temperature setpoint of the source at ``time_s``. [°C].

    Fixed; or scheduled (linear between the schedule points, held beyond); or a
    heating curve on the outdoor temperature (linear between the curve points,
    held beyond them, as a weather-compensating controller clamps its curve).

    Parameters
    ----------
    scenario : Scenario
        The scenario (source settings, weather). [-]
    time_s : float
        Time from the start of the run. [s]

    Examples
    --------
    A curve through 70 °C at -10 °C outdoors and 35 °C at +15 °C asks for
    70 + (35 - 70) * 14 / 25 = 50.4 °C at +4 °C outdoors.
    """
    src = scenario.source
    if src.curve_outdoor_temp_C is not None:
        outdoor = outdoor_temp_C(scenario, time_s)
        return float(
            np.interp(outdoor, src.curve_outdoor_temp_C, src.curve_flow_temp_C)
        )
    if src.flow_schedule_time_s is not None:
        return float(
            np.interp(time_s, src.flow_schedule_time_s, src.flow_schedule_temp_C)
        )
    return src.flow_temp_C
