import json

import pytest
from click.testing import CliRunner

from simheat.cli import main


@pytest.fixture
def runner():
    return CliRunner()


def test_run_json_writes_run_file_and_figure(runner, tiny_house, tmp_path):
    out = tmp_path / "out"
    result = runner.invoke(main, ["run", str(tiny_house), "--out", str(out), "--json"])
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    assert data["scheme"] == "direct_return"  # the scenario's first scheme
    assert [r["id"] for r in data["rooms"]] == ["front", "back"]
    assert set(data["rooms"][0]) >= {
        "id",
        "setpoint_C",
        "time_to_setpoint_min",
        "final_air_temperature_C",
    }
    assert set(data["emitters"][0]) >= {
        "id",
        "room",
        "mean_flow_kg_per_h",
        "mean_output_W",
    }
    assert set(data["energy"]) >= {"source_kWh", "balance_error_pct"}
    assert data["energy"]["balance_error_pct"] < 0.5
    assert "qualified installer" in data["caution"]
    assert (out / "tiny_direct_return.h5").stat().st_size > 1000
    assert (out / "tiny_direct_return_warmup.png").stat().st_size > 10_000


def test_run_table_names_rooms_and_ends_with_caution(runner, tiny_house, tmp_path):
    result = runner.invoke(
        main,
        ["run", str(tiny_house), "--scheme", "reverse_return", "--out", str(tmp_path)],
    )
    assert result.exit_code == 0, result.output
    assert "front" in result.stdout
    assert "back_rad" in result.stdout
    assert result.stdout.strip().splitlines()[-1].startswith("Caution")
    assert (tmp_path / "tiny_reverse_return.h5").exists()


def test_run_refuses_to_overwrite_and_keeps_the_file(runner, tiny_house, tmp_path):
    existing = tmp_path / "tiny_direct_return.h5"
    existing.write_bytes(b"keep me")
    result = runner.invoke(main, ["run", str(tiny_house), "--out", str(tmp_path)])
    assert result.exit_code == 2
    assert "--overwrite" in result.stderr
    assert existing.read_bytes() == b"keep me"


@pytest.mark.parametrize(
    ("replace", "by", "message"),
    [
        (
            "floor_area_m2 = 12.0",
            "floor_area_m2 = -12.0",
            "rooms[0].floor_area_m2: must be >= 1",
        ),
        ('room = "back"', 'room = "attic"', "emitters[1].room: unknown room 'attic'"),
        ('emitter = "back_rad"', 'emitter = "loft_rad"', "unknown emitter 'loft_rad'"),
        ('"cu_10x1"', '"cu_11x1"', "unknown pipe type 'cu_11x1'"),
        ("[design]", "[design", "malformed TOML"),
    ],
)
def test_bad_input_gives_one_line_and_exit_2(
    runner, tiny_house, tmp_path, replace, by, message
):
    text = tiny_house.read_text().replace(replace, by, 1)
    tiny_house.write_text(text)
    result = runner.invoke(main, ["run", str(tiny_house), "--out", str(tmp_path / "o")])
    assert result.exit_code == 2
    assert message in result.stderr
    assert "Traceback" not in result.output
    assert len(result.stderr.strip().splitlines()) == 1
    assert not (tmp_path / "o").exists()


def test_missing_scenario_file_is_exit_2(runner, tmp_path):
    result = runner.invoke(main, ["run", str(tmp_path / "nope.toml")])
    assert result.exit_code == 2
    assert "cannot read scenario file" in result.stderr


def test_unknown_scheme_is_a_usage_error(runner, tiny_house):
    result = runner.invoke(main, ["run", str(tiny_house), "--scheme", "spiral"])
    assert result.exit_code == 2
    assert "spiral" in result.stderr


def test_flows_json_has_emitters_and_pump(runner, tiny_house):
    result = runner.invoke(main, ["flows", str(tiny_house), "--json"])
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    assert [e["id"] for e in data["emitters"]] == ["front_rad", "back_rad"]
    assert set(data["emitters"][0]) >= {
        "id",
        "flow_kg_per_h",
        "design_flow_kg_per_h",
        "dp_available_kPa",
        "branch_velocity_m_per_s",
    }
    assert set(data["pump"]) == {"flow_m3_per_h", "head_kPa"}
    assert data["pump"]["head_kPa"] > 0.0


def test_flows_table_ends_with_caution(runner, tiny_house):
    result = runner.invoke(
        main, ["flows", str(tiny_house), "--water-temperature-C", "40"]
    )
    assert result.exit_code == 0, result.output
    assert "pump duty point" in result.stdout
    assert result.stdout.strip().splitlines()[-1].startswith("Caution")
