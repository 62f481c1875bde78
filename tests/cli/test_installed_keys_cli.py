"""The keys of a layout as installed: bad values exit 2 naming the key; all documented.

Covers the keys the library-level tests (tests/scenario/test_route_detail_keys.py,
test_floor_control_keys.py) do not already send through the command line, and
checks that the README's tables give each new key with its unit and default.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from click.testing import CliRunner

from simheat.cli import main

README = (Path(__file__).resolve().parents[2] / "README.md").read_text()
BACK_TEE = '{ emitter = "back_rad", header_length_m = 6.0, branch_length_m = 0.5 }'
FLOOR_PUMP = (
    "\n[[layout.floor_pumps]]\nfloor = 0\n"
    "flow_m3_per_h = [0.0, 0.3, 0.6]\nhead_kPa = [20.0, 17.0, 9.0]\n"
)


def _tee(keys: str):
    return lambda text: text.replace(BACK_TEE, BACK_TEE[:-2] + ", " + keys + " }")


def _obstacle(keys: str):
    return lambda text: text + "\n[[route.floors.obstacles]]\n" + keys + "\n"


def _floor_pump(keys: str):
    return lambda text: text + FLOOR_PUMP + keys + "\n"


def _emitter(keys: str):
    first = '[[emitters]]\nid = "front_rad"\n'
    return lambda text: text.replace(first, first + keys + "\n")


@pytest.mark.parametrize(
    ("edit", "key"),
    [
        (_tee('return_header_pipe = "cu_99x1"'), "tees[1].return_header_pipe"),
        (_tee("extra_elbows = -2"), "tees[1].extra_elbows"),
        (_tee("header_extra_zeta = -0.5"), "tees[1].header_extra_zeta"),
        (_tee('header_fittings = ["gate"]'), "tees[1].header_fittings[0]"),
        (_tee("height_m = 101"), "tees[1].height_m"),
        (
            _obstacle('position_m = 5.0\npassed = "around"'),
            "obstacles[0].extra_length_m",
        ),
        (
            _obstacle('position_m = 5.0\npassed = "under"\ndepth_m = 0.3\nelbows = -1'),
            "obstacles[0].elbows",
        ),
        (
            _obstacle('position_m = 40.0\npassed = "under"\ndepth_m = 0.3'),
            "obstacles[0].position_m",
        ),
        (_floor_pump("min_off_min = 300"), "layout.floor_pumps[0].min_off_min"),
        (
            _floor_pump('thermostat_room = "front"\nthermostat_hysteresis_K = 6'),
            "layout.floor_pumps[0].thermostat_hysteresis_K",
        ),
        (_floor_pump('shut_off = [["7:00"]]'), "layout.floor_pumps[0].shut_off[0]"),
        (_emitter('closed = "yes"'), "emitters[0].closed"),
    ],
)
def test_bad_value_exits_2_naming_the_key(tiny_house, edit, key):
    tiny_house.write_text(edit(tiny_house.read_text()))
    result = CliRunner().invoke(
        main, ["flows", str(tiny_house), "--scheme", "direct_return_floor_pumps"]
    )
    assert result.exit_code == 2, result.output
    (line,) = result.output.strip().splitlines()  # one line, no traceback
    assert re.search(r"(^|\.| )" + re.escape(key) + ": ", line), line


# key -> (unit, default) as the README's tables give them; "–" for no unit.
DOCUMENTED = {
    "header_pipe": ("–", "the floor's"),
    "return_header_pipe": ("–", "`header_pipe`"),
    "extra_elbows": ("–", "`0`"),
    "extra_zeta": ("–", "`0`"),
    "fittings": ("–", "`[]`"),
    "drop_length_m": ("m", "back along the run and down beside the riser"),
    "obstacles": ("–", "none"),
    "position_m": ("m", "*required*"),
    "passed": ("–", "*required*"),
    "depth_m": ("m", "*required* for `under`"),
    "extra_length_m": ("m", "*required* for `around`"),
    "elbows": ("–", "`4`"),
    "thermostat_room": ("–", "none"),
    "thermostat_hysteresis_K": ("K", "`0.5`"),
    "min_run_min": ("min", "`5`"),
    "min_off_min": ("min", "`5`"),
    "shut_off": ("–", "`[]`"),
    "closed": ("–", "`false`"),
}


def _rows(key: str) -> list[tuple[str, str]]:
    """(unit, default) of every README table row of ``key``."""
    rows = []
    for line in README.splitlines():
        cells = [c.strip() for c in line.strip().strip("|").split("|")]
        if len(cells) >= 3 and f"`{key}`" in cells[0].split(", "):
            rows.append((cells[1], cells[2]))
    return rows


@pytest.mark.parametrize("key", DOCUMENTED)
def test_every_new_key_has_its_unit_and_default_in_the_readme(key):
    assert DOCUMENTED[key] in _rows(key)


def test_keys_documented_in_two_tables_give_unit_and_default_in_each():
    # height_m: a tee's, a floor's and an obstacle's (and a room's clear height)
    rows = _rows("height_m")
    assert {unit for unit, _ in rows} == {"m"}
    assert ("m", "the floor's `height_m`") in rows  # a tee's
    assert ("m", "*required* for `over`") in rows  # an obstacle's
    assert ("°C", "the room's setpoint (the setback setpoint before comfort)") in (
        _rows("thermostat_setpoint_C")
    )
    # the tee's header fittings share a row
    assert ("–", "`0`, `0`, `[]`") in _rows("header_extra_elbows")
