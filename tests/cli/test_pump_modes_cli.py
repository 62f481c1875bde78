"""Regulated pumps through ``simheat flows`` and ``simheat run``; bad pump keys exit 2.

The tiny test house's pump curve has a 20 kPa shut-off head (tests/cli/conftest.py).
"""

from __future__ import annotations

import json

import pytest
from click.testing import CliRunner

from simheat.cli import main
from simheat.hydraulics.network import PUMP_MODE_NAMES
from simheat.runs import load_run

PUMP_HEAD_LINE = "head_kPa = [20.0, 17.0, 9.0]\n"
SET_HEAD_KPA = 12.0


@pytest.fixture
def runner():
    return CliRunner()


def with_pump_keys(path, keys):
    """Add ``keys`` to the ``[pump]`` table of the scenario at ``path``."""
    text = path.read_text(encoding="utf-8")
    assert PUMP_HEAD_LINE in text  # the fixture still holds the line we extend
    path.write_text(text.replace(PUMP_HEAD_LINE, PUMP_HEAD_LINE + keys, 1), "utf-8")
    return path


def test_flows_reports_a_constant_dp_pump_at_its_set_head(runner, tiny_house):
    keys = f'mode = "constant_dp"\nsetpoint_kPa = {SET_HEAD_KPA}\n'
    scenario = with_pump_keys(tiny_house, keys)
    result = runner.invoke(main, ["flows", str(scenario), "--json"])
    assert result.exit_code == 0, result.output
    # definition of the mode: the set head while below the curve (0.5 %)
    head_kPa = json.loads(result.stdout)["pump"]["head_kPa"]
    assert head_kPa == pytest.approx(SET_HEAD_KPA, rel=5e-3)


def test_flows_reports_a_proportional_dp_pump_on_its_line(runner, tiny_house):
    keys = f'mode = "proportional_dp"\nsetpoint_kPa = {SET_HEAD_KPA}\n'
    scenario = with_pump_keys(tiny_house, keys)
    result = runner.invoke(main, ["flows", str(scenario), "--json"])
    assert result.exit_code == 0, result.output
    # the line runs from half the set head at zero flow to the set head
    head_kPa = json.loads(result.stdout)["pump"]["head_kPa"]
    assert 0.5 * SET_HEAD_KPA < head_kPa < SET_HEAD_KPA


@pytest.mark.parametrize("mode", ["constant_dp", "proportional_dp"])
def test_run_with_a_regulated_pump_writes_its_mode_and_closes_the_books(
    runner, tiny_house, tmp_path, mode
):
    keys = f'mode = "{mode}"\nsetpoint_kPa = {SET_HEAD_KPA}\ncheck_valve = true\n'
    scenario = with_pump_keys(tiny_house, keys)
    out = tmp_path / "out"
    result = runner.invoke(main, ["run", str(scenario), "--out", str(out), "--json"])
    assert result.exit_code == 0, result.output
    # energy books close within 0.5 % (DESIGN.md requirement on every run)
    assert abs(json.loads(result.stdout)["energy"]["balance_error_pct"]) < 0.5
    network = load_run(out / "tiny_direct_return.h5").network
    (pump,) = network.pump_links()
    assert PUMP_MODE_NAMES[int(network.pump_mode[pump])] == mode
    assert network.pump_setpoint_Pa[pump] == pytest.approx(SET_HEAD_KPA * 1e3)
    assert bool(network.check_valve[pump])


BAD_KEYS = [
    (
        'mode = "constant_dp"\nsetpoint_kPa = 20.0\n',
        "pump.setpoint_kPa: must be below the pump curve's shut-off head 20 kPa",
    ),
    (
        'mode = "proportional_dp"\n',
        "pump.setpoint_kPa: required key is missing for mode proportional_dp",
    ),
    ('mode = "constant_speed"\n', "pump.mode: must be one of"),
    ("setpoint_kPa = 10.0\n", "pump.setpoint_kPa: applies only to mode"),
    ("check_valve = 1\n", "pump.check_valve: must be true or false"),
]
BAD_IDS = ["at_shut_off", "no_setpoint", "unknown_mode", "fixed_setpoint", "cv_int"]


@pytest.mark.parametrize(("keys", "message"), BAD_KEYS, ids=BAD_IDS)
def test_flows_bad_pump_keys_give_one_line_and_exit_2(
    runner, tiny_house, keys, message
):
    result = runner.invoke(main, ["flows", str(with_pump_keys(tiny_house, keys))])
    assert result.exit_code == 2
    assert message in result.stderr
    assert len(result.stderr.strip().splitlines()) == 1
    assert "Traceback" not in result.output


@pytest.mark.parametrize(("keys", "message"), BAD_KEYS, ids=BAD_IDS)
def test_run_bad_pump_keys_exit_2_and_write_nothing(
    runner, tiny_house, tmp_path, keys, message
):
    out = tmp_path / "out"
    scenario = with_pump_keys(tiny_house, keys)
    result = runner.invoke(main, ["run", str(scenario), "--out", str(out)])
    assert result.exit_code == 2
    assert message in result.stderr
    assert len(result.stderr.strip().splitlines()) == 1
    assert not out.exists() or not any(out.iterdir())
