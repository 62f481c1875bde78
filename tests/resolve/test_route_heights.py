"""Heights along the runs, stretches of run a pipe covers, and their checks."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from simheat.errors import ScenarioError
from simheat.resolve import resolve
from simheat.resolve.route import (
    feed_end_height_m,
    floor_heights_m,
    obstacles_passed,
    ring_length_m,
    run_height_m,
    run_intervals,
    stretch_index,
    tee_positions_m,
)
from simheat.scenario import parse_scenario

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"
BUNGALOW = (SCENARIOS / "bungalow.toml").read_text()
TWO_STOREY = (SCENARIOS / "two_storey.toml").read_text()
KITCHEN_TEE = (
    '{ emitter = "kitchen",      header_length_m = 1.5, branch_length_m = 0.8 }'
)
WC_TEE = '{ emitter = "wc",           header_length_m = 3.0, branch_length_m = 0.6 }'


def _tee(text: str, tee: str, keys: str) -> str:
    assert tee in text
    return text.replace(tee, tee[:-2] + ", " + keys + " }")


def _floor(text: str, floor: int, keys: str) -> str:
    old = f"[[route.floors]]\nfloor = {floor}\n"
    assert old in text
    return text.replace(old, old + keys + "\n", 1)


def test_floor_heights_default_to_vertical_risers():
    route = parse_scenario(TWO_STOREY).route
    heights = floor_heights_m(route)
    assert heights == [0.0, 3.0]  # floor 1's riser is 3.0 m
    assert feed_end_height_m(route, heights) == 0.0


def test_given_floor_height_replaces_the_riser_default():
    route = parse_scenario(_floor(TWO_STOREY, 1, "height_m = 2.7")).route
    assert floor_heights_m(route) == [0.0, 2.7]


def test_run_height_is_linear_between_tees():
    text = _tee(
        _tee(TWO_STOREY, KITCHEN_TEE, "height_m = 0.3"), WC_TEE, "height_m = 0.9"
    )
    floor = parse_scenario(text).route.floors[0]
    # start 0 at 0 m, kitchen 0.3 m at 1.5 m, wc 0.9 m at 4.5 m; hall (7.0 m)
    # takes the floor's height 0.
    assert run_height_m(floor, 0.0, 0.75) == pytest.approx(0.15, rel=1e-12)
    assert run_height_m(floor, 0.0, 3.0) == pytest.approx(0.6, rel=1e-12)
    assert run_height_m(floor, 0.0, 5.75) == pytest.approx(0.45, rel=1e-12)
    assert run_height_m(floor, 0.0, 100.0) == 0.0  # held past the last tee


def test_run_intervals_wrap_past_a_ring_start():
    floor = parse_scenario(BUNGALOW).route.floors[0]
    ring = ring_length_m(floor)
    assert run_intervals(floor, 2.0, 7.0) == ((2.0, 7.0),)
    assert run_intervals(floor, ring - 1.0, 2.0) == ((ring - 1.0, ring), (0.0, 2.0))


def test_open_run_intervals_ignore_the_order():
    floor = parse_scenario(TWO_STOREY).route.floors[0]
    assert run_intervals(floor, 7.0, 2.0) == ((2.0, 7.0),)


def test_stretch_index_finds_the_tee_ahead():
    floor = parse_scenario(TWO_STOREY).route.floors[0]
    x = tee_positions_m(floor)  # 1.5, 4.5, 7.0, 12.0, 18.5
    assert stretch_index(floor, ((x[1], x[2]),)) == 2
    assert stretch_index(floor, ((0.0, x[0]),)) == 0
    assert stretch_index(floor, ((5.0, 6.0),)) == 2  # part of a stretch
    assert stretch_index(floor, ((x[0], x[2]),)) is None  # two stretches


def test_closing_stretch_of_a_ring_belongs_to_no_tee():
    floor = parse_scenario(BUNGALOW).route.floors[0]
    last = float(tee_positions_m(floor)[-1])
    assert stretch_index(floor, ((last, ring_length_m(floor)),)) is None


def test_obstacles_passed_are_those_inside_the_stretch():
    text = _floor(
        TWO_STOREY,
        0,
        'obstacles = [{ name = "b", position_m = 10.0, passed = "over", '
        'height_m = 2.0 }, { name = "a", position_m = 3.0, passed = "under", '
        "depth_m = 0.2 }]",
    )
    floor = parse_scenario(text).route.floors[0]
    assert [o.name for o in obstacles_passed(floor, ((0.0, 18.5),))] == ["a", "b"]
    assert [o.name for o in obstacles_passed(floor, ((4.5, 7.0),))] == []


@pytest.mark.parametrize(
    ("text", "message"),
    [
        (
            _floor(
                TWO_STOREY,
                0,
                'obstacles = [{ position_m = 19.0, passed = "around", '
                "extra_length_m = 1.0 }]",
            ),
            "route.floors[0].obstacles[0].position_m: must lie on the run, between "
            "its start and 18.5 m (to the last tee), got 19",
        ),
        (
            _floor(
                TWO_STOREY,
                0,
                'obstacles = [{ position_m = 4.5, passed = "over", height_m = 2.0 }]',
            ),
            "route.floors[0].obstacles[0].position_m: lies at a tee (4.5 m); place "
            "the obstacle between two tees",
        ),
        (
            _tee(TWO_STOREY, KITCHEN_TEE, "height_m = 2.0"),
            "route.floors[0].tees[0].height_m (the header from the floor's start): a "
            "pipe of 1.5 m cannot climb or fall 2 m",
        ),
        (
            _floor(TWO_STOREY, 1, "height_m = 3.5"),
            "route.floors[1].height_m (its riser from the floor below): a pipe of 3 m "
            "cannot climb or fall 3.5 m",
        ),
        (
            # floor 0 has no riser: the 2 m feed itself must climb to it
            _floor(TWO_STOREY, 0, "height_m = 2.5"),
            "route.floors[0].height_m (the feed from the plant): a pipe of 2 m "
            "cannot climb or fall 2.5 m",
        ),
        (
            _floor(TWO_STOREY, 0, "drop_length_m = 3.0"),
            "route.floors[0].drop_length_m: there is no floor below this one",
        ),
        (
            _floor(TWO_STOREY, 1, "drop_length_m = 2.0"),
            "route.floors[1].drop_length_m (to the floor below's start): a pipe of "
            "2 m cannot climb or fall 3 m",
        ),
    ],
)
def test_route_checks_name_the_key(text, message):
    with pytest.raises(ScenarioError, match="^" + re.escape(message)):
        resolve(parse_scenario(text, origin="house.toml"))
