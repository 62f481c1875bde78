"""``simheat run`` with switched floor pumps: JSON, text and the run file."""

from __future__ import annotations

import json
from pathlib import Path

from click.testing import CliRunner

from simheat.cli import main
from simheat.runs import load

TWO_STOREY = (
    Path(__file__).resolve().parents[2] / "scenarios/two_storey.toml"
).read_text()
SHUT = """
[[layout.floor_pumps]]
floor = 1
flow_m3_per_h = [0.0, 0.4, 0.8, 1.2, 1.6]
head_kPa = [40.0, 38.0, 32.0, 22.0, 8.0]
shut_off = [["06:00", "07:00"]]
"""


def test_run_reports_each_floor_pump(tmp_path):
    scenario = tmp_path / "house.toml"
    scenario.write_text(
        TWO_STOREY.replace("duration_h = 6.0", "duration_h = 2.5") + SHUT
    )
    out = tmp_path / "out"
    args = ["run", str(scenario), "--scheme", "direct_return_floor_pumps"]
    result = CliRunner().invoke(main, [*args, "--out", str(out), "--json"])
    assert result.exit_code == 0, result.output
    pumps = {p["pump"]: p for p in json.loads(result.stdout)["floor_pumps"]}
    # shut from 1 h to 2 h of a 2.5 h run: it runs 1.5 h, stops once, starts once
    assert pumps["pump:floor1"]["on_time_h"] == 1.5
    assert pumps["pump:floor1"]["switches"] == 2
    assert pumps["pump:floor0"] == {
        "pump": "pump:floor0",
        "on_time_h": 2.5,
        "switches": 0,
    }
    run = load(out / "house_direct_return_floor_pumps.h5")
    assert run.floor_pumps["pump:floor1"]["switched_s"][1] == [3600.0, False]
    text = CliRunner().invoke(main, [*args, "--out", str(out), "--overwrite"])
    assert (
        "floor pumps: pump:floor0 ran 2.50 h, 0 switches; "
        "pump:floor1 ran 1.50 h, 2 switches" in text.output
    )
