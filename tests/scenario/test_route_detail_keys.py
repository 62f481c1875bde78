"""Reading the route detail: tapered headers, fittings where they are, heights,
obstacles, drops; every bad value names its key."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from simheat.errors import ScenarioError
from simheat.scenario import parse_scenario
from simheat.scenario.fittings import FittingTable

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"
TWO_STOREY = (SCENARIOS / "two_storey.toml").read_text()
KITCHEN_TEE = (
    '{ emitter = "kitchen",      header_length_m = 1.5, branch_length_m = 0.8 }'
)


def with_kitchen_tee(keys: str) -> str:
    """The two-storey house with keys added to the kitchen's tee (floor 0)."""
    assert KITCHEN_TEE in TWO_STOREY
    return TWO_STOREY.replace(KITCHEN_TEE, KITCHEN_TEE[:-2] + ", " + keys + " }")


def with_floor0(keys: str) -> str:
    """The two-storey house with keys added to floor 0's table."""
    old = "[[route.floors]]\nfloor = 0\n"
    assert old in TWO_STOREY
    return TWO_STOREY.replace(old, old + keys + "\n", 1)


def test_tee_detail_is_read_in_si():
    text = with_kitchen_tee(
        'header_pipe = "cu_28x1", return_header_pipe = "cu_22x1", height_m = 0.25, '
        'extra_elbows = 2, extra_zeta = 1.5, fittings = ["ball_valve", "ball_valve"], '
        'header_extra_elbows = 1, header_fittings = ["elbow_45"]'
    )
    tee = parse_scenario(text).route.floors[0].tees[0]
    assert tee.header_pipe.name == "cu_28x1"
    assert tee.return_header_pipe.name == "cu_22x1"
    assert tee.height_m == 0.25
    assert tee.fittings.counts() == {"elbow": 2, "ball_valve": 2}
    assert tee.fittings.zeta == 1.5
    assert tee.header_fittings.counts() == {"elbow": 1, "elbow_45": 1}


def test_tees_without_detail_keep_the_defaults():
    tee = parse_scenario(TWO_STOREY).route.floors[0].tees[0]
    assert tee.header_pipe is None
    assert tee.height_m is None
    assert not tee.fittings
    assert not tee.header_fittings


def test_named_fittings_take_their_zeta_from_the_table():
    # Crane TP-410 (2009), A-29: 45° standard elbow 16 fT, full-bore ball valve
    # 3 fT, fT = 0.027 for 15 mm (fluids.fittings.ft_Crane); our table takes the
    # elbow mid-range between 15 and 28 mm (within 10 %) and rounds the valve up.
    import fluids.fittings as crane

    ft = crane.ft_Crane(0.013)
    table = FittingTable()
    assert table.elbow_45_zeta == pytest.approx(16 * ft, rel=0.1)
    assert table.ball_valve_zeta == pytest.approx(
        crane.K_ball_valve_Crane(0.013, 0.013, 0.0, fd=ft), rel=0.25
    )


def test_over_obstacle_adds_twice_its_height():
    text = with_floor0(
        'obstacles = [{ name = "kitchen door", position_m = 4.0, passed = "over", '
        "height_m = 2.1 }]"
    )
    (o,) = parse_scenario(text).route.floors[0].obstacles
    assert (o.name, o.passed, o.rise_m) == ("kitchen door", "over", 2.1)
    assert o.extra_length_m == pytest.approx(4.2, rel=1e-15)
    assert o.elbows == 4  # default: up, across, down, along
    assert o.where == "route.floors[0].obstacles[0]"


def test_around_obstacle_adds_the_given_length_and_no_rise():
    text = with_floor0(
        'obstacles = [{ position_m = 4.0, passed = "around", extra_length_m = 1.2, '
        "elbows = 6 }]"
    )
    (o,) = parse_scenario(text).route.floors[0].obstacles
    assert (o.name, o.rise_m, o.extra_length_m, o.elbows) == (
        "obstacle 1",
        0.0,
        1.2,
        6,
    )


def test_obstacles_as_array_of_tables_belong_to_the_floor_above_them():
    text = (
        TWO_STOREY
        + '\n[[route.floors.obstacles]]\nposition_m = 3.0\npassed = "under"\n'
        + "depth_m = 0.3\n"
    )
    floors = parse_scenario(text).route.floors
    assert floors[0].obstacles == ()
    assert floors[1].obstacles[0].extra_length_m == pytest.approx(0.6)


@pytest.mark.parametrize(
    ("text", "key", "problem"),
    [
        (
            with_kitchen_tee('fittings = ["gate_valve"]'),
            "route.floors[0].tees[0].fittings[0]",
            "unknown fitting 'gate_valve'; known: tee_run, ",
        ),
        (
            with_kitchen_tee('fittings = "ball_valve"'),
            "route.floors[0].tees[0].fittings",
            "must be a list of fitting names, got 'ball_valve'",
        ),
        (
            with_kitchen_tee("extra_zeta = -1"),
            "route.floors[0].tees[0].extra_zeta",
            "must be >= 0, got -1",
        ),
        (
            with_kitchen_tee("header_extra_elbows = 1.5"),
            "route.floors[0].tees[0].header_extra_elbows",
            "must be an integer, got 1.5",
        ),
        (
            with_kitchen_tee('header_pipe = "cu_99x1"'),
            "route.floors[0].tees[0].header_pipe",
            "unknown pipe type 'cu_99x1'",
        ),
        (
            with_kitchen_tee("height_m = 250"),
            "route.floors[0].tees[0].height_m",
            "must be <= 100, got 250",
        ),
        (
            with_floor0("height_m = -101"),
            "route.floors[0].height_m",
            "must be >= -100, got -101",
        ),
        (
            with_floor0("drop_length_m = 0"),
            "route.floors[0].drop_length_m",
            "must be 0.01 to 1000 m, got 0",
        ),
        (
            with_floor0('obstacles = [{ position_m = 4.0, passed = "through" }]'),
            "route.floors[0].obstacles[0].passed",
            "must be one of around, over, under, got 'through'",
        ),
        (
            with_floor0('obstacles = [{ position_m = 4.0, passed = "over" }]'),
            "route.floors[0].obstacles[0].height_m",
            "required key is missing",
        ),
        (
            with_floor0(
                'obstacles = [{ position_m = 4.0, passed = "over", depth_m = 0.3 }]'
            ),
            "route.floors[0].obstacles[0].depth_m",
            "does not apply to an obstacle passed 'over'; give height_m",
        ),
        (
            with_floor0(
                'obstacles = [{ position_m = 4.0, passed = "over", height_m = 12 }]'
            ),
            "route.floors[0].obstacles[0].height_m",
            "must be <= 10, got 12",
        ),
        (
            with_floor0(
                'obstacles = [{ position_m = -1, passed = "under", depth_m = 0.3 }]'
            ),
            "route.floors[0].obstacles[0].position_m",
            "must be > 0, got -1",
        ),
        (
            with_floor0(
                'obstacles = [{ position_m = 4, passed = "under", depth_m = 0.3, '
                "elbow = 2 }]"
            ),
            "route.floors[0].obstacles[0].elbow",
            "unknown key",
        ),
    ],
)
def test_bad_route_detail_names_its_key(text, key, problem):
    with pytest.raises(ScenarioError, match="^" + re.escape(f"{key}: {problem}")):
        parse_scenario(text, origin="house.toml")
