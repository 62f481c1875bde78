"""Compare piping schemes on the same house and morning: who is warm first.

Every scheme is simulated with :func:`simheat.dynamics.simulate.simulate`; per
scheme the comparison keeps each room's time to setpoint, the time until every room
is there, and the spread between the first and the last room, and ranks the schemes.
Text and JSON of a comparison are in :mod:`simheat.report.compare`.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable, Sequence
from dataclasses import dataclass

from simheat.dynamics.controls import check_pump_stops
from simheat.dynamics.simulate import simulate
from simheat.errors import ScenarioError
from simheat.runs.run import Run
from simheat.scenario.model import Scenario
from simheat.schemes import SCHEME_NAMES, unknown_scheme

__all__ = [
    "Comparison",
    "SchemeOutcome",
    "check_schemes",
    "compare_schemes",
    "outcome_from_times",
    "rank_outcomes",
]


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
    """

    name: str
    room_ids: tuple[str, ...]
    times_s: tuple[float | None, ...]
    run: Run | None = None

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
        Scheme names, best first (see :func:`rank_outcomes`). [-]
    """

    scenario: Scenario
    outcomes: tuple[SchemeOutcome, ...]
    ranking: tuple[str, ...]

    @property
    def runs(self) -> tuple[Run, ...]:
        """The simulated runs, in the order of :attr:`outcomes`."""
        return tuple(o.run for o in self.outcomes if o.run is not None)


def outcome_from_times(
    name: str, room_ids: Sequence[str], times_s: Sequence[float | None]
) -> SchemeOutcome:
    """Build a scheme outcome from times to setpoint.

    Parameters
    ----------
    name : str
        Scheme name. [-]
    room_ids : sequence of str
        Room ids. [-]
    times_s : sequence of float or None
        Time to setpoint per room, None when not reached. [s]

    Returns
    -------
    SchemeOutcome
        The outcome, without a run.
    """
    return SchemeOutcome(name, tuple(room_ids), tuple(times_s))


def _rank_key(outcome: SchemeOutcome) -> tuple:
    if outcome.all_rooms_s is not None:
        return (0, outcome.all_rooms_s, 0.0)
    mean = outcome.mean_reached_s
    return (1, -outcome.n_reached, math.inf if mean is None else mean)


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
        by the time until the last room is there; then the others, by the number
        of rooms that reach setpoint (more first), then by the mean time of those
        rooms (shorter first). Exact ties keep the order given.

    Examples
    --------
    >>> a = outcome_from_times("a", ["x", "y"], [600.0, None])
    >>> b = outcome_from_times("b", ["x", "y"], [900.0, 1800.0])
    >>> rank_outcomes([a, b])
    ('b', 'a')
    """
    return tuple(o.name for o in sorted(outcomes, key=_rank_key))


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

    Returns
    -------
    Comparison
        Per scheme the times to setpoint, the all-rooms time and the spread, with
        the runs; and the ranking of :func:`rank_outcomes`.

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
    outcomes = []
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
            )
        )
    return Comparison(scenario, tuple(outcomes), rank_outcomes(outcomes))
