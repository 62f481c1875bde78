"""``simheat readiness``: exit codes, JSON, figure, caution; physics is elsewhere."""

from __future__ import annotations

import json
import sys
from pathlib import Path

import pytest
from click.testing import CliRunner

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "analysis"))
from readiness_house import one_room  # noqa: E402

from simheat.cli import main  # noqa: E402
from simheat.report import CAUTION  # noqa: E402


@pytest.fixture
def house(tmp_path):
    path = tmp_path / "one_room.toml"
    path.write_text(one_room(), encoding="utf-8")
    return path


def test_json_has_the_limit_targets_and_caution(house):
    result = CliRunner().invoke(
        main, ["readiness", str(house), "--targets", "55,45", "--json"]
    )
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    assert data["lowest_flow_temp_C"] == 54.6  # the hand value 54.53, rounded up
    assert data["limiting"] == ["rad"]
    assert data["basis"] == {"kind": "drop", "drop_K": 10.0, "return_C": None}
    (scheme,) = data["schemes"]
    assert [t["flow_temp_C"] for t in scheme["targets"]] == [55.0, 45.0]
    at_45 = scheme["targets"][1]
    assert at_45["short"] == ["rad"]
    assert at_45["radiators"][0]["nominal_needed_W"] == 1690.0
    assert at_45["morning"] is None
    assert data["caution"] == CAUTION


def test_text_ends_with_the_caution_and_writes_the_figure(house, tmp_path):
    out = tmp_path / "figs"
    args = ["readiness", str(house), "--targets", "50", "--figure", str(out)]
    result = CliRunner().invoke(main, args)
    assert result.exit_code == 0, result.output
    assert "lowest flow temperature: 54.6 °C, set by rad" in result.stdout
    assert (out / "one_room_readiness.png").is_file()
    assert result.stdout.rstrip().endswith(CAUTION)
    again = CliRunner().invoke(main, args)
    assert again.exit_code == 2
    assert "exists; pass --overwrite" in again.stderr


def test_simulate_reports_a_morning_per_target(house):
    result = CliRunner().invoke(
        main,
        ["readiness", str(house), "--targets", "60,45", "--simulate", "--json"],
    )
    assert result.exit_code == 0, result.output
    targets = json.loads(result.stdout)["schemes"][0]["targets"]
    mornings = [t["morning"] for t in targets]
    assert [m["flow_temp_C"] for m in mornings] == [60.0, 45.0]
    assert all(m["rooms"][0]["id"] == "room" for m in mornings)
    assert mornings[0]["electric_kWh"] is None  # a boiler
    # 60 °C is above the radiator's limit (54.6 °C): nothing to replace, no
    # second morning. At 45 °C the 1000 W radiator gives way to a 1690 W one.
    assert targets[0]["morning_replaced"] is None
    replaced = targets[1]["morning_replaced"]
    assert replaced["flow_temp_C"] == 45.0
    # One room, the same valve and flow temperature: the larger radiator gives
    # more heat at every room temperature, so the room ends warmer. By how much:
    # the original's rise over the half hour (from 15 °C) scaled by the output
    # ratio 1.69 would add about 0.69 x 1.2 K = 0.8 K; 0.5 K leaves room for the
    # water the larger radiator holds and for the structure's share.
    before = mornings[1]["rooms"][0]["final_air_temp_C"]
    after = replaced["rooms"][0]["final_air_temp_C"]
    assert after > before + 0.5


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (["--targets", "55,abc"], "must be numbers separated by commas"),
        (["--targets", "15"], "targets_C: every target must lie within 25 to 95"),
        (["--drop-K", "5", "--return-temp-C", "30"], "either --drop-K or --return"),
        (["--return-temp-C", "19"], "return_C: must lie above every room's setpoint"),
    ],
)
def test_bad_input_is_one_line_and_exit_2(house, args, message):
    result = CliRunner().invoke(main, ["readiness", str(house), *args])
    assert result.exit_code == 2
    assert message in result.stderr
    assert "Traceback" not in result.output


def test_simulate_text_shows_both_mornings_with_final_temperatures(house):
    result = CliRunner().invoke(
        main, ["readiness", str(house), "--targets", "45", "--simulate"]
    )
    assert result.exit_code == 0, result.output
    text = result.stdout
    assert "morning with the flow temperature fixed at each target" in text
    assert "the same morning with the replacements of each target in place" in text
    # The half-hour morning from 15 °C reaches 20 °C in neither: the line of
    # the room (its id is "room", as is the header's label) gives the final
    # air temperature in brackets, in both tables.
    lines = [ln for ln in text.splitlines() if ln.lstrip().startswith("room ")]
    assert len(lines) == 4  # header and room, twice
    assert [ln.rstrip().endswith("°C)") for ln in lines] == [False, True] * 2
    assert text.rstrip().endswith(CAUTION)
