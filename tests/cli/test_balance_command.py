"""``simheat balance`` end to end: exit codes, files written, JSON keys."""

from __future__ import annotations

import json
from pathlib import Path

from click.testing import CliRunner

from simheat.cli import main

SCENARIOS_DIR = Path(__file__).resolve().parents[2] / "scenarios"
TWO_STOREY = SCENARIOS_DIR / "two_storey.toml"


def invoke(*args):
    return CliRunner().invoke(main, ["balance", *map(str, args)])


def test_json_has_the_issues_keys_and_the_caution():
    result = invoke(TWO_STOREY, "--scheme", "reverse_return", "--json")
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    scheme = data["schemes"][0]
    assert {"name", "index_emitter", "pump", "valves", "circuit_valves"} <= set(scheme)
    assert {"flow_m3_per_h", "head_kPa", "setting"} <= set(scheme["pump"])
    assert set(scheme["valves"][0]) >= {
        "emitter",
        "room",
        "target_flow_kg_per_h",
        "preset",
        "kv_m3_per_h",
        "dp_valve_kPa",
        "verified_flow_pct_of_target",
    }
    assert abs(scheme["worst_deviation_pct"]) < 5.0
    assert list(data)[-1] == "caution"


def test_written_scenario_keeps_comments_and_flows_show_every_emitter_on_target(
    tmp_path,
):
    out = tmp_path / "balanced.toml"
    result = invoke(TWO_STOREY, "--scheme", "direct_return", "--write-scenario", out)
    assert result.exit_code == 0, result.output
    text = out.read_text(encoding="utf-8")
    assert "# the reference room: lockshield only" in text  # a comment kept
    flows = CliRunner().invoke(main, ["flows", str(out), "--json"])
    assert flows.exit_code == 0, flows.output
    emitters = json.loads(flows.output)["emitters"]
    assert all(abs(e["flow_pct_of_design"] - 100.0) <= 5.0 for e in emitters)
    again = invoke(TWO_STOREY, "--scheme", "direct_return", "--write-scenario", out)
    assert again.exit_code == 2
    assert "exists; pass --overwrite" in again.output


def test_kept_pump_too_weak_exits_1_naming_the_kPa(tmp_path):
    weak = tmp_path / "weak.toml"
    weak.write_text(
        TWO_STOREY.read_text(encoding="utf-8").replace(
            "head_kPa = [40.0, 38.0, 32.0, 22.0, 8.0]",
            "head_kPa = [4.0, 3.8, 3.2, 2.2, 0.8]",
        ),
        encoding="utf-8",
    )
    result = invoke(weak, "--scheme", "reverse_return", "--keep-pump")
    assert result.exit_code == 1
    assert "kPa short" in result.output
    assert "Traceback" not in result.output


def test_write_scenario_needs_one_scheme(tmp_path):
    result = invoke(
        TWO_STOREY, "--all-schemes", "--write-scenario", tmp_path / "x.toml"
    )
    assert result.exit_code == 2
    assert not (tmp_path / "x.toml").exists()


def test_bad_scenario_key_exits_2(tmp_path):
    bad = tmp_path / "bad.toml"
    bad.write_text(
        TWO_STOREY.read_text(encoding="utf-8").replace(
            "thermostatic_head = false",
            "thermostatic_head = false\nlockshield_turns = 2",
        ),
        encoding="utf-8",
    )
    result = invoke(bad)
    assert result.exit_code == 2
    assert "emitters[2].lockshield_turns" in result.output


def test_discrete_text_shows_every_emitters_flow_and_the_caution():
    result = invoke(TWO_STOREY, "--scheme", "direct_return", "--discrete")
    assert result.exit_code == 0, result.output
    assert "settings on table steps" in result.output
    assert result.output.rstrip().endswith("qualified installer.")


def test_simulate_reports_the_morning_before_and_after(tiny_house, tmp_path):
    result = invoke(
        tiny_house,
        "--scheme",
        "direct_return",
        "--simulate",
        "--out",
        tmp_path,
        "--json",
    )
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    morning = data["schemes"][0]["simulation"]
    assert {"before", "after"} == set(morning)
    assert {r["id"] for r in morning["after"]["rooms"]} == {"front", "back"}
    assert Path(data["files"]["direct_return_balanced_run"]).exists()
