import tomllib
from pathlib import Path

import pytest

from simheat.batch.keypath import KeyPathError, apply, locate, split_key

SCENARIOS_DIR = Path(__file__).resolve().parents[2] / "scenarios"


@pytest.fixture
def bungalow() -> dict:
    return tomllib.loads((SCENARIOS_DIR / "bungalow.toml").read_text("utf-8"))


@pytest.fixture
def two_storey() -> dict:
    return tomllib.loads((SCENARIOS_DIR / "two_storey.toml").read_text("utf-8"))


def test_array_of_tables_entry_is_selected_by_its_id(bungalow):
    apply(bungalow, split_key("emitters.living_a.nominal_power_kW"), "set", 1.7)
    powers = {e["id"]: e["nominal_power_kW"] for e in bungalow["emitters"]}
    assert powers["living_a"] == 1.7
    assert powers["living_b"] == 1.2  # untouched (bungalow.toml)


def test_floors_are_selected_by_floor_number_and_tees_by_emitter(two_storey):
    apply(two_storey, split_key("route.floors.1.header_pipe"), "set", "cu_22x1")
    path = split_key("route.floors.1.tees.box.branch_length_m")
    apply(two_storey, path, "offset", 0.4)
    upper = two_storey["route"]["floors"][1]
    assert upper["header_pipe"] == "cu_22x1"
    box = next(t for t in upper["tees"] if t["emitter"] == "box")
    assert box["branch_length_m"] == pytest.approx(1.0)  # 0.6 m + 0.4 m
    assert "header_pipe" not in two_storey["route"]["floors"][0]


def test_scale_multiplies_every_number_of_a_list(bungalow):
    apply(bungalow, split_key("pump.head_kPa"), "scale", 0.5)
    assert bungalow["pump"]["head_kPa"] == [22.5, 21.0, 17.5, 12.0, 5.0]


def test_wildcard_changes_every_entry(bungalow):
    loads = [r["design_heat_load_W"] for r in bungalow["rooms"]]
    apply(bungalow, split_key("rooms.*.design_heat_load_W"), "scale", 1.1)
    new = [r["design_heat_load_W"] for r in bungalow["rooms"]]
    assert new == pytest.approx([1.1 * w for w in loads], rel=1e-15)


def test_a_missing_key_names_the_segment_and_what_is_there(bungalow):
    with pytest.raises(
        KeyPathError, match=r"no key 'flow_temp' in source .*flow_temp_C"
    ):
        locate(bungalow, split_key("source.flow_temp"))


def test_an_unknown_id_lists_the_ids(bungalow):
    with pytest.raises(KeyPathError, match=r"no entry with id 'living_x'.*living_a"):
        locate(bungalow, split_key("emitters.living_x.nominal_power_kW"))


def test_a_key_absent_from_the_base_is_an_error_even_with_a_default(bungalow):
    # exponent has a default (1.3) but the bungalow does not write it: a sweep
    # never adds keys.
    with pytest.raises(KeyPathError, match="no key 'exponent'"):
        locate(bungalow, split_key("emitters.hall.exponent"))


def test_scale_refuses_a_text_value(bungalow):
    with pytest.raises(KeyPathError, match="scale needs a number"):
        apply(bungalow, split_key("route.header_pipe"), "scale", 2.0)


@pytest.mark.parametrize("key", ["", "source..flow_temp_C", "a/b"])
def test_malformed_key_paths_are_refused(key):
    with pytest.raises(KeyPathError):
        split_key(key)


def test_a_path_ending_on_array_entries_is_refused(bungalow):
    with pytest.raises(KeyPathError, match="names entries"):
        locate(bungalow, split_key("emitters.hall"))
