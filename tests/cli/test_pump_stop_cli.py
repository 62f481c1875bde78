"""`simheat run` with a single pump's stop time in the scenario (no CLI option)."""

import json

import pytest
from click.testing import CliRunner

from simheat.cli import main

FLOOR_PUMP = (
    "\n[[layout.floor_pumps]]\nfloor = 0\n"
    "flow_m3_per_h = [0.0, 0.3, 0.6]\nhead_kPa = [20.0, 17.0, 9.0]\n"
)
BOTH_SCHEMES = 'schemes = ["direct_return_floor_pumps", "direct_return"]'


@pytest.fixture
def runner():
    return CliRunner()


def _house(path, stop_at_h, schemes=BOTH_SCHEMES):
    text = path.read_text().replace(
        'schemes = ["direct_return", "reverse_return"]', schemes, 1
    )
    path.write_text(text + FLOOR_PUMP + f"stop_at_h = {stop_at_h}\n")
    return path


def test_run_reports_the_floor_pump_that_stopped(runner, tiny_house, tmp_path):
    house = _house(tiny_house, 0.5)
    result = runner.invoke(
        main,
        ["run", str(house), "--scheme", "direct_return_floor_pumps"]
        + ["--out", str(tmp_path / "o"), "--json"],
    )
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    assert data["pump_stops"] == [
        {"pump": "pump:floor0", "stop_at_h": 0.5, "clock": "05:30"}
    ]
    assert data["solver"]["pump_stop_times_s"] == {"pump:floor0": 1800.0}


@pytest.mark.parametrize(
    ("stop_at_h", "message"),
    [
        (
            0.5,
            "error: layout.floor_pumps[0].stop_at_h: scheme 'direct_return' has no "
            "pump of its own for floor 0",
        ),
        (
            1.5,
            "error: layout.floor_pumps[0].stop_at_h: must not be after the end of "
            "the simulation (1 h), got 1.5",
        ),
    ],
)
def test_bad_pump_stop_is_exit_2_before_anything_is_written(
    runner, tiny_house, tmp_path, stop_at_h, message
):
    # The floor-pump scheme comes first: it would run and be written before the
    # shared-pump scheme failed, were the stops not checked for every scheme first.
    house = _house(tiny_house, stop_at_h)
    out = tmp_path / "o"
    result = runner.invoke(
        main, ["run", str(house), "--all-schemes", "--out", str(out)]
    )
    assert result.exit_code == 2
    assert result.stderr.startswith(message)
    assert len(result.stderr.strip().splitlines()) == 1
    assert "Traceback" not in result.output
    assert not out.exists()
