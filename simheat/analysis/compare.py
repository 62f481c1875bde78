"""Compare piping schemes on the same house and morning: who is warm first.

Every scheme is simulated with :func:`simheat.dynamics.simulate.simulate`; per
scheme the comparison keeps each room's time to setpoint, the time until every room
is there, the spread between the first and the last room, and the comfort
shortfall (:func:`comfort_shortfall_Kh`), and ranks the schemes. Text and JSON of
a comparison are in :mod:`simheat.report.compare`.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable, Sequence
from dataclasses import dataclass

import numpy as np

from simheat.analysis.start_time import (
    StartTime,
    latest_start,
    rank_by_start,
    ready_by_time_s,
    room_indices,
)
from simheat.dynamics.controls import check_pump_stops
from simheat.dynamics.simulate import simulate
from simheat.errors import ScenarioError
from simheat.runs.run import Run
from simheat.scenario.model import Scenario
from simheat.schemes import SCHEME_NAMES, unknown_scheme

__all__ = [
    "ALL_ROOMS_TIE_S",
    "Comparison",
    "SchemeOutcome",
    "check_schemes",
    "comfort_shortfall_Kh",
    "compare_schemes",
    "outcome_from_times",
    "rank_outcomes",
]

# All-rooms times closer than this count as equal in the ranking: the minute is
# the resolution every report prints them at. [s]
ALL_ROOMS_TIE_S = 60.0


@dataclass(frozen=True)
class SchemeOutcome:
    """Times to setpoint of every room under one scheme.

    Attributes
    ----------
    name : str
        Piping scheme. [-]
    room_ids : tuple of str
        Room ids in scenario order. [-]
    times_s : tuple of (float or None)
        Time from the start of comfort until each room first comes within the
        tolerance of its setpoint; None when it never does. [s]
    run : Run or None
        The simulated run (None when built from times alone). [-]
    shortfall_Kh : float or None
        Comfort shortfall of the run summed over the rooms
        (:func:`comfort_shortfall_Kh`); None when built from times alone. [K h]
    """

    name: str
    room_ids: tuple[str, ...]
    times_s: tuple[float | None, ...]
    run: Run | None = None
    shortfall_Kh: float | None = None

    @property
    def reached_s(self) -> list[float]:
        """Times of the rooms that reached setpoint. [s]."""
        return [t for t in self.times_s if t is not None]

    @property
    def n_reached(self) -> int:
        """Number of rooms that reached setpoint. [-]."""
        return len(self.reached_s)

    @property
    def all_rooms_s(self) -> float | None:
        """Time until every room has reached setpoint; None if one never does. [s]."""
        if self.n_reached < len(self.times_s) or not self.times_s:
            return None
        return max(self.reached_s)

    @property
    def spread_s(self) -> float | None:
        """First to last room at setpoint; None if one never gets there. [s]."""
        if self.all_rooms_s is None:
            return None
        return max(self.reached_s) - min(self.reached_s)

    @property
    def mean_reached_s(self) -> float | None:
        """Mean time of the rooms that reached setpoint; None if none did. [s]."""
        reached = self.reached_s
        return sum(reached) / len(reached) if reached else None


@dataclass(frozen=True)
class Comparison:
    """Schemes compared on one scenario, in the order asked, and their ranking.

    Attributes
    ----------
    scenario : Scenario
        The house and morning. [-]
    outcomes : tuple of SchemeOutcome
        One per scheme, in the order the schemes were given. [-]
    ranking : tuple of str
        Scheme names, best first: by the latest heating start when
        ``start_times`` are given (:func:`simheat.analysis.start_time.rank_by_start`),
        otherwise by times to setpoint (:func:`rank_outcomes`). [-]
    start_times : tuple of StartTime
        With a ready time: each scheme's latest heating start, in the order of
        :attr:`outcomes`; empty otherwise. [-]
    """

    scenario: Scenario
    outcomes: tuple[SchemeOutcome, ...]
    ranking: tuple[str, ...]
    start_times: tuple[StartTime, ...] = ()

    @property
    def runs(self) -> tuple[Run, ...]:
        """The simulated runs, in the order of :attr:`outcomes`."""
        return tuple(o.run for o in self.outcomes if o.run is not None)


def outcome_from_times(
    name: str,
    room_ids: Sequence[str],
    times_s: Sequence[float | None],
    shortfall_Kh: float | None = None,
) -> SchemeOutcome:
    """Build a scheme outcome from times to setpoint (and a shortfall).

    Parameters
    ----------
    name : str
        Scheme name. [-]
    room_ids : sequence of str
        Room ids. [-]
    times_s : sequence of float or None
        Time to setpoint per room, None when not reached. [s]
    shortfall_Kh : float, optional
        Comfort shortfall summed over the rooms. [K h]

    Returns
    -------
    SchemeOutcome
        The outcome, without a run.
    """
    return SchemeOutcome(name, tuple(room_ids), tuple(times_s), None, shortfall_Kh)


def comfort_shortfall_Kh(run: Run) -> float:
    """Degree-hours the rooms spent below setpoint after the start of comfort.

    Parameters
    ----------
    run : Run
        A simulated run. [-]

    Returns
    -------
    float
        ``sum over rooms of the integral of max(0, setpoint - tolerance - air)``
        over the comfort period, with ``tolerance`` the scenario's
        ``reached_tolerance_K`` (the level at which a room counts as at
        setpoint). [K h]

    Notes
    -----
    Trapezoidal rule on the output grid. The shortfall weighs how cold and for
    how long: a room that never reaches setpoint but ends 0.3 K short costs far
    less than one that ends 3 K short, which the count of rooms reached and their
    mean time cannot tell apart.
    """
    scenario = run.scenario
    start_s = scenario.schedule.comfort_start_s
    tolerance_K = scenario.simulation.reached_tolerance_K
    keep = np.asarray(run.time_s) >= start_s
    time_h = np.asarray(run.time_s)[keep] / 3600.0
    if len(time_h) < 2:
        return 0.0
    level_C = np.array([room.setpoint_C for room in scenario.rooms]) - tolerance_K
    below_K = np.maximum(0.0, level_C - np.asarray(run.air_temp_C)[keep])
    return float(np.sum(np.trapezoid(below_K, time_h, axis=0)))


def _shortfall(outcome: SchemeOutcome) -> float:
    return math.inf if outcome.shortfall_Kh is None else outcome.shortfall_Kh


def _rank_key(outcome: SchemeOutcome) -> tuple:
    if outcome.shortfall_Kh is not None:
        return (1, outcome.shortfall_Kh, 0.0)
    mean = outcome.mean_reached_s
    return (2, -outcome.n_reached, math.inf if mean is None else mean)


def rank_outcomes(outcomes: Iterable[SchemeOutcome]) -> tuple[str, ...]:
    """Rank schemes, best first.

    Parameters
    ----------
    outcomes : iterable of SchemeOutcome
        One per scheme. [-]

    Returns
    -------
    tuple of str
        Scheme names: first the schemes under which every room reaches setpoint,
        by the time until the last room is there, all-rooms times within
        :data:`ALL_ROOMS_TIE_S` of each other counting as equal and ordered by
        their comfort shortfall (smaller first); then the others, by their
        comfort shortfall. Outcomes without a shortfall (built from times alone)
        come last among these, by the number of rooms that reach setpoint (more
        first), then by the mean time of those rooms. Exact ties keep the order
        given.

    Examples
    --------
    >>> a = outcome_from_times("a", ["x", "y"], [600.0, None])
    >>> b = outcome_from_times("b", ["x", "y"], [900.0, 1800.0])
    >>> rank_outcomes([a, b])
    ('b', 'a')
    >>> c = outcome_from_times("c", ["x", "y"], [900.0, 1810.0], shortfall_Kh=0.4)
    >>> d = outcome_from_times("d", ["x", "y"], [600.0, 1800.0], shortfall_Kh=0.9)
    >>> rank_outcomes([d, c])
    ('c', 'd')
    """
    outcomes = list(outcomes)
    complete = sorted(
        (o for o in outcomes if o.all_rooms_s is not None), key=lambda o: o.all_rooms_s
    )
    ranked: list[SchemeOutcome] = []
    group: list[SchemeOutcome] = []
    for outcome in complete:
        if group and outcome.all_rooms_s - group[0].all_rooms_s > ALL_ROOMS_TIE_S:
            ranked += sorted(group, key=_shortfall)
            group = []
        group.append(outcome)
    ranked += sorted(group, key=_shortfall)
    rest = [o for o in outcomes if o.all_rooms_s is None]
    ranked += sorted(rest, key=_rank_key)
    return tuple(o.name for o in ranked)


def check_schemes(names: Sequence[str]) -> tuple[str, ...]:
    """Validate a list of scheme names.

    Parameters
    ----------
    names : sequence of str
        Scheme names. [-]

    Returns
    -------
    tuple of str
        The names, in order.

    Raises
    ------
    ScenarioError
        When the list is empty, names an unknown scheme, or names one twice.

    Examples
    --------
    >>> check_schemes(["reverse_return", "direct_return"])
    ('reverse_return', 'direct_return')
    """
    names = tuple(names)
    if not names:
        raise ScenarioError("schemes: give at least one scheme")
    for name in names:
        if name not in SCHEME_NAMES:
            raise ScenarioError(f"schemes: {unknown_scheme(name)}")
    for name in names:
        if names.count(name) > 1:
            raise ScenarioError(f"schemes: scheme {name!r} is listed twice")
    return names


def compare_schemes(
    scenario: Scenario,
    schemes: Sequence[str] | None = None,
    *,
    on_scheme: Callable[[str], None] | None = None,
    ready_by_clock_s: float | None = None,
    ready_rooms: Sequence[str] | None = None,
) -> Comparison:
    """Simulate the same house and morning under several schemes and rank them.

    Parameters
    ----------
    scenario : Scenario
        The house and morning. [-]
    schemes : sequence of str, optional
        Schemes to compare; the scenario's own list by default. [-]
    on_scheme : callable, optional
        Called with each scheme name before its simulation starts (progress). [-]
    ready_by_clock_s : float, optional
        Also find each scheme's latest heating start that has the rooms at
        setpoint by this clock time, seconds after midnight
        (:func:`simheat.analysis.start_time.latest_start`), and rank by it. [s]
    ready_rooms : sequence of str, optional
        The rooms that must be ready; every room by default. [-]

    Returns
    -------
    Comparison
        Per scheme the times to setpoint, the all-rooms time, the spread and the
        comfort shortfall, with the runs; the start times when asked; and the
        ranking.

    Raises
    ------
    ScenarioError
        For an empty list, an unknown scheme or a scheme listed twice, or a
        pump stop time for a pump one of the schemes does not have.
    ConvergenceError
        When a simulation fails.
    """
    names = check_schemes(scenario.schemes if schemes is None else schemes)
    check_pump_stops(scenario, names)
    if ready_by_clock_s is not None:  # bad ready times and rooms before any run
        ready_by_time_s(scenario, ready_by_clock_s)
        room_indices(scenario, ready_rooms)
    outcomes = []
    start_times = []
    for name in names:
        if on_scheme is not None:
            on_scheme(name)
        run = simulate(scenario, name)
        rooms = run.summary.rooms
        outcomes.append(
            SchemeOutcome(
                name=name,
                room_ids=tuple(r.id for r in rooms),
                times_s=tuple(r.time_to_setpoint_s for r in rooms),
                run=run,
                shortfall_Kh=comfort_shortfall_Kh(run),
            )
        )
        if ready_by_clock_s is not None:
            start_times.append(
                latest_start(scenario, name, ready_by_clock_s, ready_rooms)
            )
    ranking = rank_by_start(start_times) if start_times else rank_outcomes(outcomes)
    return Comparison(scenario, tuple(outcomes), ranking, tuple(start_times))
