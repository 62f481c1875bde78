"""The latest heating start that has every room at setpoint by a clock time.

The house cools from the evening (the night of the run: heating off at
``[schedule] off_from`` from its steady state at the comfort setpoints), or from
the state the scenario gives at its start. Heating that comes on at a time ``S``
runs in comfort from then on (source and pumps on, heads at the comfort
setpoints). The latest ``S`` at which every room (or every room asked about) has
come within ``simulation.reached_tolerance_K`` of its setpoint by the ready time
is found by bisection on whole minutes: each trial integrates the heated house
from the cooled state at ``S`` to the ready time, so the start printed is one that
was simulated and met the time, and one minute later was simulated and did not.
When heating from the very start of the night does not get there either, the
answer is "cannot", with how far each room stays below its setpoint.

Times on the run's axis: seconds from ``start_clock`` (the night is negative);
clock times are seconds after midnight. Text and JSON are in
:mod:`simheat.report.start_time`.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from simheat.dynamics.integrate import WarmUpModel, integrate_model, tolerances
from simheat.errors import ScenarioError
from simheat.runs.metrics import first_crossing_s
from simheat.scenario.model import SECONDS_PER_DAY, Scenario

__all__ = [
    "RESOLUTION_S",
    "RoomReadiness",
    "StartTime",
    "latest_start",
    "rank_by_start",
    "ready_by_time_s",
    "room_indices",
]

# The start time is found to this step: whole minutes. [s]
RESOLUTION_S = 60.0


@dataclass(frozen=True)
class RoomReadiness:
    """One room at the latest start, or how far it stays short.

    Attributes
    ----------
    id : str
        Room id. [-]
    setpoint_C : float
        Comfort setpoint. [°C]
    ready_s : float or None
        Time on the run's axis the air came within the tolerance of the
        setpoint, heating from the latest start; None when the answer is
        "cannot" and this room did not get there. [s]
    highest_air_C : float
        Highest air temperature up to the ready time in that trial (heating
        from the latest start, or from the start of the night when it
        cannot). [°C]
    """

    id: str
    setpoint_C: float
    ready_s: float | None
    highest_air_C: float

    @property
    def shortfall_K(self) -> float:
        """How far the air stayed below the setpoint, 0 when it got there. [K]."""
        return max(0.0, self.setpoint_C - self.highest_air_C)


@dataclass(frozen=True)
class StartTime:
    """The latest heating start that has the rooms at setpoint by a clock time.

    Attributes
    ----------
    scheme : str
        Piping scheme. [-]
    start_clock_s : float
        The run's ``start_clock``: clock time of time 0 of its axis. [s]
    ready_by_s : float
        The ready time on the run's axis. [s]
    earliest_s : float
        Earliest possible start: the start of the night (the heating went off
        then), or 0 when the scenario gives its initial state. [s]
    latest_start_s : float or None
        Latest start found (a whole minute), None when even heating from
        ``earliest_s`` does not get every room there. [s]
    rooms : tuple of RoomReadiness
        The rooms asked about, in scenario order: heating from the latest start
        (or from ``earliest_s`` when it cannot). [-]
    late_rooms : tuple of str
        Rooms that miss the ready time when the heating starts one step after
        the latest start: those that set it. Empty when no start is late
        (every room is there even without heating) or when it cannot. [-]
    trials : int
        Heating runs simulated. [-]
    resolution_s : float
        Step of the search. [s]
    """

    scheme: str
    start_clock_s: float
    ready_by_s: float
    earliest_s: float
    latest_start_s: float | None
    rooms: tuple[RoomReadiness, ...]
    late_rooms: tuple[str, ...]
    trials: int
    resolution_s: float = RESOLUTION_S

    @property
    def can(self) -> bool:
        """Whether some start gets every room there in time."""
        return self.latest_start_s is not None

    @property
    def lead_s(self) -> float | None:
        """Time from the latest start to the ready time; None when it cannot. [s]."""
        return (
            None
            if self.latest_start_s is None
            else self.ready_by_s - (self.latest_start_s)
        )

    def clock_s(self, time_s: float) -> float:
        """Clock time of a time on the run's axis, seconds after midnight. [s].

        Parameters
        ----------
        time_s : float
            Time on the run's axis. [s]
        """
        return (self.start_clock_s + time_s) % SECONDS_PER_DAY


def ready_by_time_s(scenario: Scenario, ready_by_clock_s: float) -> float:
    """The first time on the run's axis after its earliest start with that clock. [s].

    Parameters
    ----------
    scenario : Scenario
        The house and its schedule. [-]
    ready_by_clock_s : float
        The ready time, seconds after midnight. [s]

    Returns
    -------
    float
        Within a day after the start of the night (or of the run). [s]

    Raises
    ------
    ScenarioError
        When the ready time is the clock time the night (or the run) starts.
    """
    schedule = scenario.schedule
    earliest = -schedule.night_s
    earliest_clock = (schedule.start_clock_s + earliest) % SECONDS_PER_DAY
    ahead = (ready_by_clock_s - earliest_clock) % SECONDS_PER_DAY
    if ahead == 0.0:
        what = "off_from" if schedule.off_clock_s is not None else "start_clock"
        raise ScenarioError(
            f"ready_by: must differ from schedule.{what}, when the "
            f"{'night' if what == 'off_from' else 'run'} starts"
        )
    return earliest + ahead


def latest_start(
    scenario: Scenario,
    scheme: str,
    ready_by_clock_s: float,
    rooms: Sequence[str] | None = None,
    *,
    resolution_s: float = RESOLUTION_S,
) -> StartTime:
    """Latest heating start at which the rooms are at setpoint by a clock time.

    Parameters
    ----------
    scenario : Scenario
        The house, its night (or given start) and weather. [-]
    scheme : str
        Piping scheme. [-]
    ready_by_clock_s : float
        The time the rooms must be ready, seconds after midnight (the first
        such time after the night starts). [s]
    rooms : sequence of str, optional
        Ids of the rooms that must be ready; every room by default. [-]
    resolution_s : float
        Step of the search (whole minutes by default). [s]

    Returns
    -------
    StartTime
        The latest start (verified by its own simulation; one step later was
        simulated and misses), or "cannot" with each room's shortfall.

    Raises
    ------
    ScenarioError
        On an unknown room, or a ready time equal to the night's start.
    ConvergenceError
        When a simulation fails.

    Notes
    -----
    One integration from the earliest start to the ready time with the
    heating off gives the cooled house at any start; each trial starts from it
    and integrates with the heating on in comfort (the scenario's flow
    temperature, weather, pump stops and emitters as in a run; no manual valve
    events). A room is ready when its air first comes within
    ``reached_tolerance_K`` of its setpoint at or before the ready time, as
    ``run`` counts it (root finding on the dense output). Bisection assumes a
    later start is never readier, which holds for a house that only cools
    while the heating is off.
    """
    wanted = room_indices(scenario, rooms)
    schedule = scenario.schedule
    ready_by = ready_by_time_s(scenario, ready_by_clock_s)
    wm = WarmUpModel(scenario, scheme)
    atol = tolerances(wm, scenario.simulation.rtol)
    earliest = wm.start_s
    evening = wm.initial_state(atol)
    # heating off from the earliest start to the ready time: comfort after it
    cold = wm.with_schedule(
        dataclasses.replace(
            schedule, comfort_start_s=ready_by + 1.0, before_comfort="off"
        )
    )
    cooling = integrate_model(
        cold, start_s=earliest, end_s=ready_by, initial_state=evening
    )
    trials = 0

    def trial(start_s: float) -> list[RoomReadiness]:
        nonlocal trials
        if start_s >= ready_by:  # no heating: as cooled
            state = cooling.state_at([ready_by])[0]
            return [_unheated(scenario, wm, r, ready_by, state) for r in wanted]
        trials += 1
        state = evening if start_s == earliest else cooling.state_at([start_s])[0]
        heated = wm.with_schedule(
            dataclasses.replace(schedule, comfort_start_s=start_s, before_comfort="off")
        )
        solution = integrate_model(
            heated, start_s=start_s, end_s=ready_by, initial_state=state
        )
        return [
            _room_in_trial(scenario, wm, solution, r, start_s, ready_by) for r in wanted
        ]

    def ready(outcome: list[RoomReadiness]) -> bool:
        return all(room.ready_s is not None for room in outcome)

    steps = int(round((ready_by - earliest) / resolution_s))
    at_ready = trial(ready_by)
    if ready(at_ready):
        return StartTime(
            scheme,
            schedule.start_clock_s,
            ready_by,
            earliest,
            ready_by,
            tuple(at_ready),
            (),
            trials,
            resolution_s,
        )
    first = trial(earliest)
    if not ready(first):
        return StartTime(
            scheme,
            schedule.start_clock_s,
            ready_by,
            earliest,
            None,
            tuple(first),
            (),
            trials,
            resolution_s,
        )
    low, high = 0, steps  # step counts: low ready, high not
    low_outcome, high_outcome = first, at_ready
    while high - low > 1:
        middle = (low + high) // 2
        outcome = trial(earliest + middle * resolution_s)
        if ready(outcome):
            low, low_outcome = middle, outcome
        else:
            high, high_outcome = middle, outcome
    return StartTime(
        scheme,
        schedule.start_clock_s,
        ready_by,
        earliest,
        earliest + low * resolution_s,
        tuple(low_outcome),
        tuple(room.id for room in high_outcome if room.ready_s is None),
        trials,
        resolution_s,
    )


def rank_by_start(results: Sequence[StartTime]) -> tuple[str, ...]:
    """Schemes by their latest start, best (latest) first.

    Parameters
    ----------
    results : sequence of StartTime
        One per scheme, for the same ready time and rooms. [-]

    Returns
    -------
    tuple of str
        Scheme names: those that can, the latest start first; then those that
        cannot, the smallest largest shortfall first. Ties keep the order given.

    Examples
    --------
    >>> late = StartTime("a", 0.0, 7200.0, -25200.0, -3600.0, (), ("x",), 9)
    >>> early = StartTime("b", 0.0, 7200.0, -25200.0, -9000.0, (), ("x",), 9)
    >>> rank_by_start([early, late])
    ('a', 'b')
    """

    def key(result: StartTime) -> tuple:
        if result.can:
            return (0, -result.latest_start_s)
        return (1, max((room.shortfall_K for room in result.rooms), default=0.0))

    return tuple(r.scheme for r in sorted(results, key=key))


def room_indices(scenario: Scenario, rooms: Sequence[str] | None) -> list[int]:
    """Indices of the named rooms in scenario order; every room for None.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    rooms : sequence of str or None
        Room ids. [-]

    Returns
    -------
    list of int
        Sorted, without repeats.

    Raises
    ------
    ScenarioError
        On an unknown id or an empty list.
    """
    ids = [room.id for room in scenario.rooms]
    if rooms is None:
        return list(range(len(ids)))
    wanted = []
    for name in rooms:
        if name not in ids:
            raise ScenarioError(
                f"rooms: unknown room {name!r}; rooms: {', '.join(ids)}"
            )
        wanted.append(ids.index(name))
    if not wanted:
        raise ScenarioError("rooms: give at least one room")
    return sorted(set(wanted))


def _unheated(
    scenario: Scenario, wm: WarmUpModel, r: int, ready_by: float, state: np.ndarray
) -> RoomReadiness:
    """Room ``r`` at the ready time with no heating yet: there if still warm."""
    room = scenario.rooms[r]
    air = float(state[wm.slices["air"].start + r])
    level = room.setpoint_C - scenario.simulation.reached_tolerance_K
    return RoomReadiness(
        room.id, room.setpoint_C, ready_by if air >= level else None, air
    )


def _room_in_trial(
    scenario: Scenario,
    wm: WarmUpModel,
    solution,
    r: int,
    start_s: float,
    ready_by: float,
) -> RoomReadiness:
    """When room ``r`` got there in a trial (None if not by the ready time)."""
    room = scenario.rooms[r]
    column = wm.slices["air"].start + r
    step = scenario.simulation.output_step_s
    n = max(1, int(np.ceil((ready_by - start_s) / step - 1e-9)))
    time_s = np.linspace(start_s, ready_by, n + 1)
    air = solution.state_at(time_s)[:, column]

    def air_at(t: float) -> float:
        return float(solution.state_at([t])[0, column])

    level = room.setpoint_C - scenario.simulation.reached_tolerance_K
    crossing = first_crossing_s(air_at, time_s, air, level)
    return RoomReadiness(room.id, room.setpoint_C, crossing, float(np.max(air)))
