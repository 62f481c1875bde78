"""``--ready-by`` of ``simheat run`` and ``simheat compare``: exit codes and JSON."""

import json

import pytest
from click.testing import CliRunner

from simheat.cli import main
from simheat.report import CAUTION

# The tiny house starts at 05:00 from a given 16 °C: the latest start lies
# between 05:00 and the ready time.
READY_BY = "05:50"


def invoke(*args):
    return CliRunner().invoke(main, [str(a) for a in args])


def test_run_json_carries_the_start_time_and_the_caution(tiny_house, tmp_path):
    result = invoke(
        "run", tiny_house, "--ready-by", READY_BY, "--json", "--out", tmp_path
    )
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    start = data["start_time"]
    assert start["scheme"] == "direct_return"
    assert start["ready_by"] == READY_BY
    assert start["earliest_start"] == "05:00"
    assert [room["id"] for room in start["rooms"]] == ["front", "back"]
    assert start["can"] is (start["latest_start"] is not None)
    assert data["caution"] == CAUTION
    assert (tmp_path / "tiny_direct_return.h5").exists()


def test_run_table_lists_the_start_per_scheme(tiny_house, tmp_path):
    result = invoke(
        "run",
        tiny_house,
        "--all-schemes",
        "--ready-by",
        READY_BY,
        "--ready-rooms",
        "front",
        "--out",
        tmp_path,
    )
    assert result.exit_code == 0, result.output
    assert "latest heating start for every room (front)" in result.output
    table = result.output.split("latest heating start", 1)[1]
    assert "direct_return" in table
    assert "reverse_return" in table
    assert result.output.rstrip().endswith(CAUTION)


def test_compare_ranks_by_the_latest_start(tiny_house, tmp_path):
    result = invoke(
        "compare", tiny_house, "--ready-by", READY_BY, "--json", "--out", tmp_path
    )
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    assert data["ranking_by"] == "latest_start"
    starts = {s["name"]: s["start_time"] for s in data["schemes"]}
    assert set(starts) == {"direct_return", "reverse_return"}
    assert sorted(data["ranking"]) == sorted(starts)


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (("--ready-by", "25:00"), "must be a clock time HH:MM, got '25:00'"),
        (
            ("--ready-by", "05:00"),
            "Invalid value for '--ready-by': must differ from schedule.start_clock",
        ),
        (
            ("--ready-by", READY_BY, "--ready-rooms", "attic"),
            "Invalid value for '--ready-rooms': unknown room 'attic'",
        ),
        (("--ready-rooms", "front"), "--ready-rooms needs --ready-by"),
    ],
)
@pytest.mark.parametrize("command", ["run", "compare"])
def test_bad_ready_options_give_one_line_and_exit_2(
    tiny_house, tmp_path, command, args, message
):
    result = invoke(command, tiny_house, *args, "--out", tmp_path)
    assert result.exit_code == 2
    assert message in result.output
    assert "Traceback" not in result.output
    assert result.stderr.count("\n") == 1, result.stderr  # one line, options named
    assert not list(tmp_path.glob("*.h5"))  # refused before anything is written
