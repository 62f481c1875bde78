"""End-to-end ``simheat compare`` and ``simheat throttle``: exit codes, JSON, files."""

import json

import pytest
from click.testing import CliRunner

from simheat.cli import main
from simheat.report import CAUTION

# A three-room, three-radiator house on one short run, one hour. Invented for tests.
THREE_ROOMS = """
name = "Three-room test flat"
schemes = ["direct_return", "reverse_return"]

[design]
outdoor_temp_C = -5.0
supply_temp_C = 65.0
temperature_drop_K = 10.0

[source]
max_power_kW = 6.0
flow_temp_C = 65.0

[pump]
flow_m3_per_h = [0.0, 0.3, 0.6]
head_kPa = [25.0, 21.0, 12.0]

[simulation]
duration_h = 1.0
output_step_min = 5.0
initial_room_temp_C = 17.0
initial_water_temp_C = 17.0

[[rooms]]
id = "lounge"
floor_area_m2 = 18.0
design_heat_load_W = 1000
setpoint_C = 20.0

[[rooms]]
id = "bedroom"
floor_area_m2 = 11.0
design_heat_load_W = 650
setpoint_C = 18.0

[[rooms]]
id = "shower"
floor_area_m2 = 4.0
design_heat_load_W = 400
setpoint_C = 22.0

[[emitters]]
id = "lounge_rad"
room = "lounge"
nominal_power_kW = 1.8
kv_m3_per_h = 0.5

[[emitters]]
id = "bedroom_rad"
room = "bedroom"
nominal_power_kW = 1.1
kv_m3_per_h = 0.4

[[emitters]]
id = "towel_rail"
room = "shower"
nominal_power_kW = 0.6
kv_m3_per_h = 0.3

[route]
header_pipe = "cu_15x1"
branch_pipe = "cu_10x1"
feed_length_m = 2.0

[[route.floors]]
floor = 0
tees = [
  { emitter = "lounge_rad", header_length_m = 2.0, branch_length_m = 0.5 },
  { emitter = "bedroom_rad", header_length_m = 5.0, branch_length_m = 0.5 },
  { emitter = "towel_rail", header_length_m = 3.0, branch_length_m = 0.8 },
]
"""
ROOM_IDS = ["lounge", "bedroom", "shower"]
EMITTER_IDS = ["lounge_rad", "bedroom_rad", "towel_rail"]
SCHEMES = ["direct_return", "reverse_return"]


@pytest.fixture(scope="module")
def flat(tmp_path_factory):
    path = tmp_path_factory.mktemp("house") / "flat.toml"
    path.write_text(THREE_ROOMS, encoding="utf-8")
    return path


def invoke(*args):
    return CliRunner().invoke(main, [str(a) for a in args])


@pytest.fixture(scope="module")
def compared(flat, tmp_path_factory):
    """``simheat compare --json`` of the flat under both schemes, run once."""
    out = tmp_path_factory.mktemp("compare")
    result = invoke("compare", flat, "--out", out, "--json")
    return result, out


def test_compare_exits_zero(compared):
    result, _ = compared
    assert result.exit_code == 0, result.output


def test_compare_json_has_one_entry_per_scheme_and_room(compared):
    data = json.loads(compared[0].stdout)
    assert [s["name"] for s in data["schemes"]] == SCHEMES
    for scheme in data["schemes"]:
        assert set(scheme) >= {
            "name", "all_rooms_at_setpoint_min", "spread_min", "rooms"
        }  # fmt: skip
        assert [r["id"] for r in scheme["rooms"]] == ROOM_IDS
        assert all(set(r) == {"id", "time_to_setpoint_min"} for r in scheme["rooms"])


def test_compare_json_all_rooms_time_is_the_latest_room(compared):
    for scheme in json.loads(compared[0].stdout)["schemes"]:
        times = [r["time_to_setpoint_min"] for r in scheme["rooms"]]
        if None in times:
            assert scheme["all_rooms_at_setpoint_min"] is None
            assert scheme["spread_min"] is None
        else:
            assert scheme["all_rooms_at_setpoint_min"] == max(times)
            assert scheme["spread_min"] == pytest.approx(
                max(times) - min(times), abs=0.11
            )  # each time rounded to 0.1 min


def test_compare_json_ranks_every_scheme_and_ends_with_the_caution(compared):
    data = json.loads(compared[0].stdout)
    assert sorted(data["ranking"]) == sorted(SCHEMES)
    assert data["caution"] == CAUTION


def test_compare_writes_run_files_and_one_figure(compared):
    _, out = compared
    for scheme in SCHEMES:
        assert (out / f"flat_{scheme}.h5").stat().st_size > 1000
    assert (out / "flat_compare.png").stat().st_size > 10_000


def test_compare_refuses_to_overwrite(compared, flat):
    _, out = compared
    before = (out / "flat_compare.png").stat().st_mtime_ns
    result = invoke("compare", flat, "--out", out)
    assert result.exit_code == 2
    assert "--overwrite" in result.stderr
    assert (out / "flat_compare.png").stat().st_mtime_ns == before


def test_compare_table_lists_rooms_totals_and_ranking(flat, tmp_path):
    result = invoke("compare", flat, "--schemes", "reverse_return", "--out", tmp_path)
    assert result.exit_code == 0, result.output
    lines = result.stdout.splitlines()
    for label in [*ROOM_IDS, "all rooms", "spread"]:
        assert any(line.startswith(label) for line in lines)
    assert "1. reverse_return" in result.stdout
    assert result.stdout.rstrip().endswith(CAUTION)


@pytest.mark.parametrize(
    ("schemes", "message"),
    [
        ("direct_return,spiral", "unknown scheme 'spiral'"),
        ("reverse_return,reverse_return", "listed twice"),
    ],
)
def test_compare_bad_scheme_list_exits_2_and_writes_nothing(
    flat, tmp_path, schemes, message
):
    out = tmp_path / "out"
    result = invoke("compare", flat, "--schemes", schemes, "--out", out)
    assert result.exit_code == 2
    assert message in result.stderr
    assert not out.exists()


def test_throttle_json_lists_the_other_emitters(flat, tmp_path):
    result = invoke(
        "throttle", flat, "--emitter", "bedroom_rad", "--opening", "0.2",
        "--json", "--out", tmp_path,
    )  # fmt: skip
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    assert [c["id"] for c in data["changes"]] == ["lounge_rad", "towel_rail"]
    for change in data["changes"]:
        assert isinstance(change["flow_change_pct"], float)
        assert isinstance(change["output_change_pct"], float)
    assert data["caution"] == CAUTION
    assert list(tmp_path.iterdir()) == []  # one emitter: no figure


def test_throttle_all_json_has_the_interaction_index_and_heatmap(flat, tmp_path):
    result = invoke(
        "throttle", flat, "--scheme", "reverse_return", "--emitter", "all",
        "--opening", "0", "--json", "--out", tmp_path,
    )  # fmt: skip
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    assert set(data["interaction_index"]) == {"mean_pct", "max_pct"}
    assert len(data["changes"]) == len(EMITTER_IDS) * (len(EMITTER_IDS) - 1)
    assert data["matrix"]["emitter_ids"] == EMITTER_IDS
    assert (tmp_path / "flat_reverse_return_throttle.png").stat().st_size > 10_000


def test_throttle_all_table_prints_the_index(flat, tmp_path):
    result = invoke(
        "throttle", flat, "--emitter", "all", "--opening", "0.5", "--out", tmp_path
    )
    assert result.exit_code == 0, result.output
    assert "interaction index: mean" in result.stdout
    assert result.stdout.rstrip().endswith(CAUTION)


def test_throttle_all_refuses_to_overwrite_the_heatmap(flat, tmp_path):
    figure = tmp_path / "flat_direct_return_throttle.png"
    figure.write_bytes(b"keep")
    result = invoke(
        "throttle", flat, "--emitter", "all", "--opening", "0", "--out", tmp_path
    )
    assert result.exit_code == 2
    assert figure.read_bytes() == b"keep"


def test_throttle_unknown_emitter_exits_2_naming_it_and_the_known_ids(flat):
    result = invoke("throttle", flat, "--emitter", "garage_rad", "--opening", "0.5")
    assert result.exit_code == 2
    assert "unknown emitter 'garage_rad'" in result.stderr
    assert "known: lounge_rad, bedroom_rad, towel_rail" in result.stderr
    assert "Traceback" not in result.output


@pytest.mark.parametrize("opening", ["-0.2", "1.5"])
def test_throttle_opening_outside_0_1_exits_2(flat, tmp_path, opening):
    result = invoke(
        "throttle", flat, "--emitter", "all", "--opening", opening, "--out", tmp_path
    )
    assert result.exit_code == 2
    assert "Invalid value for '--opening'" in result.stderr
    assert "0.0<=x<=1.0" in result.stderr
    assert list(tmp_path.iterdir()) == []


def test_throttle_at_min_reports_every_room_and_writes_the_response(flat, tmp_path):
    result = invoke(
        "throttle", flat, "--emitter", "towel_rail", "--opening", "0",
        "--at-min", "20", "--json", "--out", tmp_path,
    )  # fmt: skip
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    assert data["transient"]["at_min"] == 20.0
    assert [r["id"] for r in data["transient"]["rooms"]] == ROOM_IDS
    assert set(data["transient"]["rooms"][0]) == {
        "id", "final_air_temperature_C", "final_air_temperature_change_K",
        "time_to_setpoint_min_before", "time_to_setpoint_min_after",
        "time_to_setpoint_change_min",
    }  # fmt: skip
    assert data["caution"] == CAUTION
    figure = tmp_path / "flat_direct_return_throttle_towel_rail.png"
    assert figure.stat().st_size > 10_000


def test_throttle_at_min_with_all_emitters_exits_2(flat, tmp_path):
    result = invoke(
        "throttle", flat, "--emitter", "all", "--opening", "0", "--at-min", "10",
        "--out", tmp_path,
    )  # fmt: skip
    assert result.exit_code == 2
    assert "--at-min needs one emitter" in result.output
    assert list(tmp_path.iterdir()) == []


def test_throttle_at_min_outside_the_run_exits_2(flat, tmp_path):
    result = invoke(
        "throttle", flat, "--emitter", "towel_rail", "--opening", "0",
        "--at-min", "90", "--out", tmp_path,
    )  # fmt: skip
    assert result.exit_code == 2
    assert "'--at-min': must lie within the run, 0 to 60 min, got 90" in result.stderr
    assert list(tmp_path.iterdir()) == []
