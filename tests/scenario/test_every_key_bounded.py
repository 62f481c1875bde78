"""Every numeric key of every bundled scenario has a bound that names the key.

Issue 18 asks for physically argued bounds on every numeric key. This test
walks each bundled house (every ``scenarios/*.toml`` with ``[[rooms]]``; sweep
files have their own reader), takes the first occurrence of each numeric key
(``rooms[0].floor_area_m2`` stands for every room's), sets it to +1e300 and to
-1e300 and requires the loader (or the resolve step) to refuse the file with a
one-line message that starts with that key's path. No physical quantity in a
heating scenario is anywhere near 1e300 in the key's unit, and no negative one
is below -1e300, so an acceptance is a key without an upper or lower bound.

A key added to a bundled scenario (by any branch) is checked from then on.
The bound must be the key's own: a cross-check that happens to catch the value
under another key's name (a per-area load naming the area, say) does not
count, since that other check stops protecting the key once the other key
changes.
"""

from __future__ import annotations

import copy
import re
import tomllib
from pathlib import Path

import pytest
import tomlkit

from simheat.errors import ScenarioError
from simheat.resolve import resolve
from simheat.scenario import parse_scenario

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"
# Far beyond any heating quantity in any unit the scenario keys use. [key unit]
ABSURD = (1e300, -1e300)


def _houses() -> dict[str, dict]:
    houses = {}
    for path in sorted(SCENARIOS.glob("*.toml")):
        data = tomllib.loads(path.read_text(encoding="utf-8"))
        if "rooms" in data:
            houses[path.stem] = data
    return houses


HOUSES = _houses()


def _numeric_leaves(node, prefix=()):
    items = node.items() if isinstance(node, dict) else enumerate(node)
    for key, value in items:
        path = (*prefix, key)
        if isinstance(value, bool):
            continue
        if isinstance(value, int | float):
            yield path
        elif isinstance(value, dict | list):
            yield from _numeric_leaves(value, path)


def _key_path(path: tuple) -> str:
    """``('rooms', 0, 'floor_area_m2')`` -> ``rooms[0].floor_area_m2``."""
    text = ""
    for part in path:
        if isinstance(part, int):
            text += f"[{part}]"
        else:
            text += f".{part}" if text else part
    return text


def _first_of_each_key(data: dict) -> list[tuple]:
    """One path per key, list positions aside (the first room stands for all)."""
    seen, paths = set(), []
    for path in _numeric_leaves(data):
        shape = tuple("#" if isinstance(p, int) else p for p in path)
        if shape not in seen:
            seen.add(shape)
            paths.append(path)
    return paths


CASES = [
    pytest.param(house, path, id=f"{house}:{_key_path(path)}")
    for house, data in HOUSES.items()
    for path in _first_of_each_key(data)
]


def test_the_bundled_houses_are_found():
    # The walk starts from the bundled houses; finding none would test nothing.
    assert {"bungalow", "two_storey", "terrace"} <= set(HOUSES)
    assert len(CASES) > 50


@pytest.mark.parametrize(("house", "path"), CASES)
def test_absurd_value_is_refused_under_its_own_key(house, path):
    key = _key_path(path)
    # An entry of a list of numbers is reported under the list's key.
    named = re.sub(r"(\[\d+\])$", "", key) if isinstance(path[-1], int) else key
    for value in ABSURD:
        document = copy.deepcopy(HOUSES[house])
        node = document
        for part in path[:-1]:
            node = node[part]
        node[path[-1]] = value
        text = tomlkit.dumps(document)
        with pytest.raises(ScenarioError) as caught:
            resolve(parse_scenario(text, origin="bounded.toml"))
        message = str(caught.value)
        assert "\n" not in message
        assert message.startswith(f"{named}"), (value, message)
        assert message[len(named)] in ":[", (value, message)
