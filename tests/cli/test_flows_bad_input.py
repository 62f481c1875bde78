"""``simheat flows`` on bad input: one line naming the part, exit 2, nothing written."""

from __future__ import annotations

import pytest
from click.testing import CliRunner

from simheat.cli import main


@pytest.fixture
def runner():
    return CliRunner()


@pytest.mark.parametrize(
    ("replace", "by", "message"),
    [
        # a pump whose curve is not falling
        (
            "head_kPa = [20.0, 17.0, 9.0]",
            "head_kPa = [9.0, 17.0, 20.0]",
            "pump.head_kPa: head_kPa must fall with flow",
        ),
        # a network with no pump
        (
            "[pump]\nflow_m3_per_h = [0.0, 0.3, 0.6]\nhead_kPa = [20.0, 17.0, 9.0]\n",
            "",
            "pump: required key is missing",
        ),
        # a disconnected emitter: no tee of the route reaches it
        (
            '  { emitter = "back_rad", header_length_m = 6.0, '
            "branch_length_m = 0.5 },\n",
            "",
            "the route does not visit emitter(s) back_rad",
        ),
        # a negative Kv (0 is a valve shut for good, see tests of closed valves)
        (
            "kv_m3_per_h = 0.5",
            "kv_m3_per_h = -0.5",
            "emitters[0].kv_m3_per_h: must be >= 0",
        ),
        # a pipe size that does not exist
        ('header_pipe = "cu_15x1"', 'header_pipe = "cu_0x0"', "cu_0x0"),
    ],
    ids=[
        "rising_pump",
        "no_pump",
        "disconnected_emitter",
        "negative_kv",
        "no_such_pipe",
    ],
)
def test_flows_bad_scenario_gives_one_line_and_exit_2(
    runner, tiny_house, replace, by, message
):
    text = tiny_house.read_text(encoding="utf-8")
    assert replace in text  # the fixture still holds what we break
    tiny_house.write_text(text.replace(replace, by, 1), encoding="utf-8")
    result = runner.invoke(main, ["flows", str(tiny_house), "--json"])
    assert result.exit_code == 2
    assert message in result.stderr
    assert len(result.stderr.strip().splitlines()) == 1
    assert "Traceback" not in result.output
    assert result.stdout == ""
    assert sorted(p.name for p in tiny_house.parent.iterdir()) == [tiny_house.name]


@pytest.mark.parametrize(
    ("temp", "message"),
    [
        ("-1", "--water-temperature-C"),
        ("120", "--water-temperature-C"),
        ("nan", "Invalid value for '--water-temperature-C': 'nan' is not a finite"),
    ],
)
def test_flows_water_temperature_outside_0_100_is_exit_2(
    runner, tiny_house, temp, message
):
    result = runner.invoke(
        main, ["flows", str(tiny_house), "--water-temperature-C", temp]
    )
    assert result.exit_code == 2
    assert message in result.stderr
    assert result.stdout == ""


def test_flows_unknown_scheme_is_a_usage_error(runner, tiny_house):
    result = runner.invoke(main, ["flows", str(tiny_house), "--scheme", "spiral"])
    assert result.exit_code == 2
    assert "spiral" in result.stderr


def test_flows_missing_scenario_file_is_exit_2(runner, tmp_path):
    result = runner.invoke(main, ["flows", str(tmp_path / "nope.toml")])
    assert result.exit_code == 2
    assert "cannot read scenario file" in result.stderr
    assert list(tmp_path.iterdir()) == []
