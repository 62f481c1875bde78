"""Route geometry and the resolve step's checks of manifold positions and splits."""

from __future__ import annotations

import re
from pathlib import Path

import numpy as np
import pytest

from simheat.errors import ScenarioError
from simheat.resolve import resolve
from simheat.resolve.route import (
    ring_length_m,
    route_distance_m,
    run_extent_m,
    split_run,
    tee_positions_m,
)
from simheat.scenario import parse_scenario

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"
BUNGALOW = (SCENARIOS / "bungalow.toml").read_text()
TWO_STOREY = (SCENARIOS / "two_storey.toml").read_text()


def _floor_keys(text: str, keys: str) -> str:
    """Add keys to the first [[route.floors]] table."""
    return text.replace(
        "[[route.floors]]\nfloor = 0\n", f"[[route.floors]]\nfloor = 0\n{keys}\n", 1
    )


@pytest.fixture(scope="module")
def bungalow_floor():
    """The bungalow's one floor: a ring (closing_length_m given)."""
    return parse_scenario(BUNGALOW).route.floors[0]


def test_tee_positions_are_the_running_sum_of_header_lengths(bungalow_floor):
    lengths = [t.header_length_m for t in bungalow_floor.tees]
    np.testing.assert_array_equal(tee_positions_m(bungalow_floor), np.cumsum(lengths))


def test_ring_length_closes_the_run(bungalow_floor):
    last = float(tee_positions_m(bungalow_floor)[-1])
    ring = ring_length_m(bungalow_floor)
    assert ring == pytest.approx(last + bungalow_floor.closing_length_m, rel=1e-12)
    assert run_extent_m(bungalow_floor) == ring


def test_distance_on_a_ring_goes_the_shorter_way(bungalow_floor):
    ring = ring_length_m(bungalow_floor)
    assert route_distance_m(bungalow_floor, 1.0, ring - 1.0) == pytest.approx(2.0)


def test_open_run_ends_at_its_last_tee():
    floor = parse_scenario(TWO_STOREY).route.floors[0]
    assert ring_length_m(floor) is None
    assert run_extent_m(floor) == float(tee_positions_m(floor)[-1])
    assert route_distance_m(floor, 1.0, 4.0) == 3.0


@pytest.mark.parametrize(
    ("text", "position", "extent"),
    [(BUNGALOW, 60.0, "48.5 m (round the ring)"), (TWO_STOREY, 18.6, "18.5 m (to")],
)
def test_manifold_off_the_route(text, position, extent):
    scenario = parse_scenario(_floor_keys(text, f"manifold_position_m = {position}"))
    with pytest.raises(
        ScenarioError,
        match="^"
        + re.escape(
            f"route.floors[0].manifold_position_m: must lie on the run, 0 to {extent}"
        ),
    ):
        resolve(scenario)


def test_manifold_at_the_end_of_the_run_is_on_it():
    scenario = parse_scenario(_floor_keys(TWO_STOREY, "manifold_position_m = 18.5"))
    assert resolve(scenario).rooms  # resolves


def test_split_after_the_last_emitter_on_a_ring_leaves_a_circuit_empty():
    scenario = parse_scenario(_floor_keys(BUNGALOW, 'split_after_emitter = "bed3"'))
    with pytest.raises(
        ScenarioError,
        match=r"route\.floors\[0\]\.split_after_emitter: .*leaves a circuit empty",
    ):
        resolve(scenario)


def test_split_away_from_the_manifold_on_an_open_run():
    text = _floor_keys(
        TWO_STOREY, 'manifold_position_m = 0.0\nsplit_after_emitter = "hall"'
    )
    with pytest.raises(ScenarioError, match=r"split_after_emitter: .*open run"):
        resolve(parse_scenario(text))


def test_messages_name_the_floor_as_written_in_the_file():
    # floors are kept in storey order, but a message names the table's place in
    # the file: here floor 1 is written first
    text = TWO_STOREY.replace(
        "[[route.floors]]\nfloor = 1\n",
        "[[route.floors]]\nfloor = 1\nmanifold_position_m = 500.0\n",
        1,
    )
    first = text.index("[[route.floors]]")
    second = text.index("[[route.floors]]", first + 1)
    swapped = text[:first] + text[second:] + "\n" + text[first:second]
    scenario = parse_scenario(swapped)
    assert [f.floor for f in scenario.route.floors] == [0, 1]
    with pytest.raises(ScenarioError, match=r"^route\.floors\[0\]\.manifold_position"):
        resolve(scenario)


def test_split_on_an_open_run_shares_the_design_load_evenly():
    floor = parse_scenario(TWO_STOREY).route.floors[0]
    load = np.zeros(20)
    for t in floor.tees:
        load[t.emitter] = 1.0
    run = split_run(floor, load, floor.where)
    ahead = sum(load[t.emitter] for t, _ in run.ahead)
    back = sum(load[t.emitter] for t, _ in run.back)
    assert abs(ahead - back) <= 1.0
    assert len(run.ahead) + len(run.back) == len(floor.tees)
