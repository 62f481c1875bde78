"""Room envelopes: the keys of the heat-load calculation and their messages."""

from __future__ import annotations

import pytest
from test_load import ORIGIN, changed

from simheat.errors import ScenarioError
from simheat.scenario import parse_scenario
from simheat.scenario.rooms import DEFAULT_THERMAL_BRIDGE_W_M2K

WALL = {"area_m2": 10.0, "u_W_per_m2K": 0.3, "beyond": "outdoors"}
BED = ("rooms", 1)


def envelope(**keys) -> tuple:
    """Edits that replace the bedroom's loss coefficient by an envelope."""
    room = {
        "id": "bed",
        "floor_area_m2": 12.0,
        "setpoint_C": 18.0,
        "air_changes_per_h": 0.5,
        "elements": [WALL],
    }
    room.update(keys)
    return ((BED, {k: v for k, v in room.items() if v is not None}),)


def load(*edits):
    return parse_scenario(changed(*edits), origin=ORIGIN)


def test_envelope_is_read_in_si_with_defaults():
    room = load(*envelope(ventilation_m3_per_h=36.0, air_changes_per_h=None)).rooms[1]
    env = room.envelope
    assert room.heat_loss_W_K is None
    assert room.design_heat_load_W is None
    assert env.ventilation_m3_s == pytest.approx(0.01, rel=1e-12)  # 36 m3/h
    assert env.air_changes_per_h is None
    assert env.heat_recovery == 0.0
    assert env.thermal_bridge_W_m2K == DEFAULT_THERMAL_BRIDGE_W_M2K
    assert env.elements[0].name == "element 1"
    assert env.elements[0].temperature_factor == 1.0


def test_element_toward_another_room_keeps_its_index():
    wall = {"area_m2": 8.0, "u_W_per_m2K": 1.0, "beyond": "living"}
    element = load(*envelope(elements=[WALL, wall])).rooms[1].envelope.elements[1]
    assert (element.beyond, element.room) == ("room", 0)


@pytest.mark.parametrize(
    ("keys", "message"),
    [
        (
            {"elements": [{**WALL, "beyond": "attic"}]},
            r"rooms\[1\]\.elements\[0\]\.beyond: must be one of outdoors, ground, "
            r"unheated or a room id, got 'attic'",
        ),
        (
            {"elements": [{**WALL, "beyond": "bed"}]},
            r"rooms\[1\]\.elements\[0\]\.beyond: an element cannot face its own room",
        ),
        (
            {"elements": [{**WALL, "beyond": "unheated"}]},
            r"rooms\[1\]\.elements\[0\]\.temperature_factor: required key is missing",
        ),
        (
            {"elements": [{**WALL, "temperature_factor": 0.5}]},
            r"temperature_factor: applies to ground and unheated spaces only",
        ),
        (
            {"elements": [{**WALL, "u_W_per_m2K": 30.0}]},
            r"rooms\[1\]\.elements\[0\]\.u_W_per_m2K: must be <= 10, got 30",
        ),
        (
            {"ventilation_m3_per_h": 30.0},
            r"rooms\[1\]\.air_changes_per_h: give only one of air_changes_per_h or "
            r"ventilation_m3_per_h",
        ),
        (
            {"air_changes_per_h": None},
            r"rooms\[1\]\.air_changes_per_h: give one of",
        ),
        (
            {"heat_recovery": 0.99},
            r"rooms\[1\]\.heat_recovery: must be <= 0.95, got 0.99",
        ),
        (
            {"heat_loss_W_per_K": 30.0, "design_heat_load_W": 800.0},
            r"rooms\[1\]\.heat_loss_W_per_K: give only one of",
        ),
        (
            {"elements": None},
            r"rooms\[1\]\.air_changes_per_h: describes the envelope: give the room's "
            r"elements too",
        ),
    ],
)
def test_bad_envelope_names_the_key(keys, message):
    with pytest.raises(ScenarioError, match=message):
        load(*envelope(**keys))


def test_a_room_needs_a_load_a_coefficient_or_an_envelope():
    edits = envelope(elements=None, air_changes_per_h=None)
    with pytest.raises(ScenarioError, match=r"rooms\[1\]\.heat_loss_W_per_K: give one"):
        load(*edits)
