"""The one TOML writer: edits at key paths keep the user's comments and layout."""

from __future__ import annotations

import tomllib
from pathlib import Path

import pytest

from simheat.errors import ScenarioError
from simheat.scenario import parse_scenario
from simheat.scenario.edits import ScenarioEdit, edited_text
from simheat.scenario.settings import ScenarioSettings, settings_edits, with_settings

BUNGALOW = Path(__file__).resolve().parents[2] / "scenarios" / "bungalow.toml"

FLOOR_PUMP = {
    "floor": 0,
    "flow_m3_per_h": [0.0, 1.0, 2.0],
    "head_kPa": [30.0, 25.0, 10.0],
}
EDITS = [
    ScenarioEdit(("pump", "head_kPa"), [50.0, 47.0, 40.0, 28.0, 12.0]),
    ScenarioEdit(("emitters", 2, "preset"), 4.5),
    ScenarioEdit(("route", "header_pipe"), "cu_28x1"),
    ScenarioEdit(("layout", "floor_pumps"), FLOOR_PUMP, append=True),
]


@pytest.fixture(scope="module")
def bungalow_text():
    return BUNGALOW.read_text(encoding="utf-8")


def _by_hand(text: str) -> dict:
    """The same edits made on plain parsed TOML (an independent path)."""
    data = tomllib.loads(text)
    data["pump"]["head_kPa"] = [50.0, 47.0, 40.0, 28.0, 12.0]
    data["emitters"][2]["preset"] = 4.5
    data["route"]["header_pipe"] = "cu_28x1"
    data.setdefault("layout", {}).setdefault("floor_pumps", []).append(FLOOR_PUMP)
    return data


def test_edited_text_holds_exactly_the_edits(bungalow_text):
    edited = edited_text(bungalow_text, EDITS)
    assert tomllib.loads(edited) == _by_hand(bungalow_text)
    scenario = parse_scenario(edited)  # and the loader takes it
    assert scenario.route.floors[0].header_pipe.name == "cu_28x1"


def test_every_comment_of_the_file_survives_the_edits(bungalow_text):
    edited = edited_text(bungalow_text, EDITS)
    comments = [
        line[line.index("#") :] for line in bungalow_text.splitlines() if "#" in line
    ]
    assert len(comments) >= 5
    for comment in comments:
        assert comment in edited
    # an edited value keeps the comment on its line
    assert "head_kPa = [50.0, 47.0, 40.0, 28.0, 12.0]" in edited
    assert "[pump]                       # a small circulator" in edited


def test_lines_not_edited_stay_as_written(bungalow_text):
    edited = edited_text(bungalow_text, EDITS).splitlines()
    original = bungalow_text.splitlines()
    kept = [line for line in original if line in edited]
    # the edits change two lines in place (head_kPa, header_pipe); the rest
    # is added
    assert len(original) - len(kept) == 2


def test_an_inline_array_of_tables_stays_inline():
    text = (
        "[route]\ntees = [\n"
        '  { emitter = "a", header_length_m = 4.0 },\n'
        '  { emitter = "b", header_length_m = 4.0 },\n]\n'
    )
    new = [
        {"emitter": "b", "header_length_m": 2.0},
        {"emitter": "a", "header_length_m": 6.0, "branch_length_m": 1.5},
    ]
    edited = edited_text(text, [ScenarioEdit(("route", "tees"), new)])
    assert "[[" not in edited  # not rewritten as an array of tables
    assert len(edited.splitlines()) == 5  # one table per line, as written
    assert tomllib.loads(edited)["route"]["tees"] == new


def test_comment_written_beside_a_value():
    edited = edited_text(
        'schemes = ["a", "b"]\n', [ScenarioEdit(("schemes",), ["a"], comment="note")]
    )
    assert edited == 'schemes = ["a"] # note\n'


def test_an_index_beyond_the_array_names_the_key_path():
    text = '[[emitters]]\nid = "a"\n'
    with pytest.raises(ScenarioError, match=r"^emitters\[3\]: no such entry"):
        edited_text(text, [ScenarioEdit(("emitters", 3, "preset"), 2.0)])


def test_a_path_through_a_value_names_the_key_path():
    with pytest.raises(ScenarioError, match=r"^name.x: not inside a table"):
        edited_text('name = "house"\n', [ScenarioEdit(("name", "x", "y"), 1.0)])


def test_text_that_is_not_toml_is_a_scenario_error():
    with pytest.raises(ScenarioError, match="house.toml: malformed TOML"):
        edited_text("[pump\n", [], origin="house.toml")


def test_settings_give_a_floor_pump_without_a_table_a_copy_of_the_pump(
    bungalow_text,
):
    settings = ScenarioSettings(
        scheme="direct_return_floor_pumps",
        pumps={"primary": ("speed", 0.5), 0: ("speed", 0.7)},
    )
    edits = settings_edits(bungalow_text, settings)
    assert [e.key for e in edits] == [
        "schemes",
        "layout.primary_pump",
        "layout.floor_pumps",
    ]
    data = tomllib.loads(with_settings(bungalow_text, settings))
    pump = tomllib.loads(bungalow_text)["pump"]
    assert data["layout"]["primary_pump"] == {**pump, "speed": 0.5}
    assert data["layout"]["floor_pumps"] == [{"floor": 0, **pump, "speed": 0.7}]
    # and the loader reads it back as the pumps it describes
    scenario = parse_scenario(with_settings(bungalow_text, settings))
    assert scenario.layout.primary_pump.speed == 0.5
    assert scenario.layout.floor_pumps[0].speed == 0.7
