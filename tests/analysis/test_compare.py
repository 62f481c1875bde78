"""Ranking and bookkeeping of scheme comparisons (no simulation needed)."""

import pytest

from simheat.analysis.compare import (
    check_schemes,
    outcome_from_times,
    rank_outcomes,
)
from simheat.errors import ScenarioError

ROOMS = ("a", "b", "c")


def outcome(name, *times_min):
    return outcome_from_times(
        name, ROOMS, [None if t is None else 60.0 * t for t in times_min]
    )


def test_all_rooms_time_is_the_last_room_to_arrive():
    assert outcome("x", 30, 75, 50).all_rooms_s == pytest.approx(75 * 60.0)


def test_all_rooms_time_is_none_when_one_room_never_arrives():
    assert outcome("x", 30, None, 50).all_rooms_s is None


def test_spread_runs_from_the_first_to_the_last_room():
    assert outcome("x", 30, 75, 50).spread_s == pytest.approx(45 * 60.0)


def test_spread_is_none_when_one_room_never_arrives():
    assert outcome("x", 30, None, 50).spread_s is None


def test_mean_time_counts_only_the_rooms_that_arrive():
    assert outcome("x", 30, None, 50).mean_reached_s == pytest.approx(40 * 60.0)


@pytest.mark.parametrize(
    ("outcomes", "expected"),
    [
        # every room warm beats a faster scheme that leaves one room cold
        ([outcome("fast", 10, 10, None), outcome("slow", 90, 90, 90)],
         ("slow", "fast")),
        # among complete schemes, the earlier last room wins
        ([outcome("late", 20, 20, 80), outcome("early", 60, 60, 60)],
         ("early", "late")),
        # among incomplete schemes, more rooms reached wins over a lower mean
        ([outcome("one", 5, None, None), outcome("two", 50, 60, None)],
         ("two", "one")),
        # same number reached: the lower mean time wins
        ([outcome("p", 40, 50, None), outcome("q", 20, None, 30)],
         ("q", "p")),
        # nobody warm at all comes last
        ([outcome("none", None, None, None), outcome("some", None, 70, None)],
         ("some", "none")),
    ],
)  # fmt: skip
def test_ranking_orders_schemes(outcomes, expected):
    assert rank_outcomes(outcomes) == expected


def test_ranking_keeps_the_given_order_on_exact_ties():
    tied = [outcome("first", 30, 40, 50), outcome("second", 50, 40, 30)]
    assert rank_outcomes(tied) == ("first", "second")
    assert rank_outcomes(tied[::-1]) == ("second", "first")


@pytest.mark.parametrize(
    ("names", "message"),
    [
        (["direct_return", "spiral"], "unknown scheme 'spiral'"),
        ([], "at least one scheme"),
        (["direct_return", "direct_return"], "'direct_return' is listed twice"),
    ],
)
def test_bad_scheme_lists_are_refused(names, message):
    with pytest.raises(ScenarioError, match=message):
        check_schemes(names)


def shortfall_outcome(name, shortfall_Kh, *times_min):
    return outcome_from_times(
        name,
        ROOMS,
        [None if t is None else 60.0 * t for t in times_min],
        shortfall_Kh=shortfall_Kh,
    )


def test_equal_all_rooms_times_are_ordered_by_the_comfort_shortfall():
    # Same last room at 60 min (the second 20 s later: equal at the minute the
    # reports print); the one whose rooms sat colder on the way ranks second.
    colder = shortfall_outcome("colder", 2.5, 60, 30, 40)
    warmer = shortfall_outcome("warmer", 0.8, 20, 50, 60 + 20 / 60)
    assert rank_outcomes([colder, warmer]) == ("warmer", "colder")


def test_all_rooms_times_a_minute_apart_are_not_a_tie():
    early = shortfall_outcome("early", 5.0, 60, 60, 60)
    late = shortfall_outcome("late", 0.1, 62, 62, 62)
    assert rank_outcomes([late, early]) == ("early", "late")


def test_incomplete_schemes_are_ordered_by_shortfall_not_rooms_reached():
    # One-pipe reaches two rooms but leaves the third far colder; direct return
    # reaches one room and leaves the others just short.
    one_pipe = shortfall_outcome("one_pipe", 9.0, 40, 50, None)
    direct = shortfall_outcome("direct", 1.5, 45, None, None)
    assert rank_outcomes([one_pipe, direct]) == ("direct", "one_pipe")


def test_every_room_at_setpoint_still_ranks_above_any_shortfall():
    complete = shortfall_outcome("complete", 4.0, 90, 90, 90)
    incomplete = shortfall_outcome("incomplete", 0.5, 10, 10, None)
    assert rank_outcomes([incomplete, complete]) == ("complete", "incomplete")
