"""``simheat run`` with a heat pump: its JSON, its text, its warning in one line."""

from __future__ import annotations

import json
import sys
from pathlib import Path

import pytest
from click.testing import CliRunner

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "dynamics"))
from heat_pump_house import house_text  # noqa: E402

from simheat.cli import main  # noqa: E402
from simheat.report import CAUTION  # noqa: E402


@pytest.fixture
def heat_pump_house(tmp_path):
    def write(**changes) -> Path:
        path = tmp_path / "hp.toml"
        path.write_text(house_text(**changes), encoding="utf-8")
        return path

    return write


def test_run_json_reports_electricity_and_mean_cop(heat_pump_house, tmp_path):
    path = heat_pump_house()
    result = CliRunner().invoke(
        main, ["run", str(path), "--json", "--out", str(tmp_path / "out")]
    )
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    assert data["source_kind"] == "heat_pump"
    hp = data["heat_pump"]
    assert hp["electric_kWh"] > 0.0
    # the run's COP lies within the table's COPs at its conditions (1.6-4.3)
    assert 1.6 <= hp["mean_cop"] <= 4.3
    assert hp["mean_cop"] == pytest.approx(
        data["energy"]["source_kWh"] / hp["electric_kWh"], rel=1e-3
    )
    assert hp["below_min_flow"] is None  # no minimum flow given
    assert data["source_at_limit"] > 0.0
    assert data["caution"] == CAUTION
    assert result.stderr == ""  # the run stays inside the table


def test_a_boiler_run_has_no_heat_pump_figures(tiny_house, tmp_path):
    result = CliRunner().invoke(
        main, ["run", str(tiny_house), "--json", "--out", str(tmp_path / "out")]
    )
    data = json.loads(result.stdout)
    assert data["source_kind"] == "boiler"
    assert data["heat_pump"] is None


def test_run_outside_the_table_warns_in_one_line(heat_pump_house, tmp_path):
    path = heat_pump_house(flow_temp_C=60.0)
    result = CliRunner().invoke(main, ["run", str(path), "--out", str(tmp_path)])
    assert result.exit_code == 0, result.output
    warned = [line for line in result.stderr.splitlines() if line.startswith("warn")]
    assert warned == [
        "warning: heat pump asked for flow temperature up to 60 °C, above the "
        "table (35 to 55 °C): capacity and COP are held at the table's edge there"
    ]
    (line,) = [ln for ln in result.stdout.splitlines() if "heat pump: elec" in ln]
    # the share at capacity is stated even when no warning follows
    assert line.endswith(" % of comfort")
    assert "at it for " in line
    assert result.stdout.rstrip().endswith(CAUTION)


@pytest.mark.parametrize(
    ("old", "new", "message"),
    [
        (
            "[2.8, 2.3, 1.9]",
            "[2.8, 0.0, 1.9]",
            "source.heat_pump.cop[1][1]: must be > 0, got 0",
        ),
        (
            "flow_temp_C = [35.0, 45.0, 55.0]",
            "flow_temp_C = [35.0, 55.0, 45.0]",
            "source.heat_pump.flow_temp_C: must be strictly increasing",
        ),
        (
            "[1.2, 1.12, 1.02]",
            "[1.2, 1.12]",
            "source.heat_pump.capacity_kW[1]: must have one value per flow "
            "temperature (3), got 2",
        ),
    ],
)
def test_bad_rating_tables_exit_2_naming_the_field(tmp_path, old, new, message):
    text = house_text()
    assert old in text
    path = tmp_path / "bad.toml"
    path.write_text(text.replace(old, new, 1), encoding="utf-8")
    result = CliRunner().invoke(main, ["run", str(path), "--out", str(tmp_path)])
    assert result.exit_code == 2
    assert result.stderr.startswith(f"error: {message}")
    assert len(result.stderr.strip().splitlines()) == 1
