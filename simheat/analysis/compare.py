"""Compare piping schemes on the same house and morning: who is warm first.

Every scheme is simulated with :func:`simheat.dynamics.simulate.simulate`; per
scheme the comparison keeps each room's time to setpoint, the time until every room
is there, and the spread between the first and the last room, and ranks the schemes.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable, Sequence
from dataclasses import dataclass

from simheat.errors import ScenarioError
from simheat.hydraulics.layouts import SCHEMES
from simheat.runs.run import Run
from simheat.scenario.model import Scenario

__all__ = [
    "Comparison",
    "SchemeOutcome",
    "check_schemes",
    "compare_schemes",
    "comparison_dict",
    "comparison_text",
    "outcome_from_times",
    "rank_outcomes",
]


@dataclass(frozen=True)
class SchemeOutcome:
    """Times to setpoint of every room under one scheme.

    Attributes
    ----------
    name : str
        Piping scheme.
    room_ids : tuple of str
        Room ids in scenario order.
    times_s : tuple of (float or None)
        Time from the start of comfort until each room first comes within the
        tolerance of its setpoint; None when it never does. [s]
    run : Run or None
        The simulated run (None when built from times alone).
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
        The house and morning.
    outcomes : tuple of SchemeOutcome
        One per scheme, in the order the schemes were given.
    ranking : tuple of str
        Scheme names, best first (see :func:`rank_outcomes`).
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
    known = ", ".join(sorted(SCHEMES))
    for name in names:
        if name not in SCHEMES:
            raise ScenarioError(f"schemes: unknown scheme {name!r}; known: {known}")
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
    from simheat.dynamics.controls import check_pump_stops
    from simheat.dynamics.simulate import simulate

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


def _minutes(seconds: float | None) -> float | None:
    return None if seconds is None else round(seconds / 60.0, 1)


def comparison_dict(comparison: Comparison) -> dict:
    """A comparison as JSON-ready data, times in minutes.

    Parameters
    ----------
    comparison : Comparison
        The comparison. [-]

    Returns
    -------
    dict
        ``scenario``; ``schemes``: list of ``{name, all_rooms_at_setpoint_min,
        spread_min, rooms: [{id, time_to_setpoint_min}]}`` (None where not
        reached); ``ranking`` (names, best first); ``caution``.
    """
    from simheat.report import CAUTION

    return {
        "scenario": comparison.scenario.name,
        "schemes": [
            {
                "name": o.name,
                "all_rooms_at_setpoint_min": _minutes(o.all_rooms_s),
                "spread_min": _minutes(o.spread_s),
                "rooms": [
                    {"id": room, "time_to_setpoint_min": _minutes(t)}
                    for room, t in zip(o.room_ids, o.times_s, strict=True)
                ],
            }
            for o in comparison.outcomes
        ],
        "ranking": list(comparison.ranking),
        "caution": CAUTION,
    }


def _cell(seconds: float | None) -> str:
    return "--" if seconds is None else f"{seconds / 60.0:.0f} min"


def comparison_text(comparison: Comparison) -> str:
    """A comparison as one plain-text table, rooms by schemes, and the ranking.

    Parameters
    ----------
    comparison : Comparison
        The comparison. [-]

    Returns
    -------
    str
        Minutes to setpoint per room and scheme ("--" where never reached), the
        all-rooms and spread rows, and the ranking (no caution; callers add it).
    """
    outcomes = comparison.outcomes
    width = max(12, *(len(o.name) + 2 for o in outcomes))
    label = max(14, *(len(r) + 2 for r in outcomes[0].room_ids))
    lines = [
        f"{comparison.scenario.name}: minutes from the start of comfort to setpoint",
        "",
        f"{'room':<{label}}" + "".join(f"{o.name:>{width}}" for o in outcomes),
    ]
    for i, room in enumerate(outcomes[0].room_ids):
        lines.append(
            f"{room:<{label}}"
            + "".join(f"{_cell(o.times_s[i]):>{width}}" for o in outcomes)
        )
    lines.append("-" * (label + width * len(outcomes)))
    lines.append(
        f"{'all rooms':<{label}}"
        + "".join(f"{_cell(o.all_rooms_s):>{width}}" for o in outcomes)
    )
    lines.append(
        f"{'spread':<{label}}"
        + "".join(f"{_cell(o.spread_s):>{width}}" for o in outcomes)
    )
    lines.append("")
    by_name = {o.name: o for o in outcomes}
    lines.append("ranking (every room at setpoint first, by the last room's time;")
    lines.append("         then by rooms reached and their mean time):")
    for place, name in enumerate(comparison.ranking, start=1):
        o = by_name[name]
        if o.all_rooms_s is not None:
            note = f"all rooms in {_cell(o.all_rooms_s)}"
        else:
            mean = o.mean_reached_s
            note = f"{o.n_reached} of {len(o.times_s)} rooms reach setpoint" + (
                "" if mean is None else f", mean {_cell(mean)}"
            )
        lines.append(f"  {place}. {name:<{width}} {note}")
    return "\n".join(lines)
