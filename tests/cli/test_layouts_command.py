"""``simheat layouts`` end to end: exit codes, JSON keys and files written."""

from __future__ import annotations

import json

import click
import pytest
from click.testing import CliRunner

from simheat.cli import main
from simheat.hydraulics.layouts import SCHEMES
from simheat.report import CAUTION


def _run(*args):
    return CliRunner().invoke(main, list(map(str, args)))


def test_text_lists_every_scheme_and_ends_with_the_caution(tiny_house):
    result = _run("layouts", tiny_house)
    assert result.exit_code == 0, result.output
    for name in SCHEMES:
        assert f"\n{name}\n" in result.output
    assert result.output.rstrip().endswith(CAUTION)


def test_json_has_one_entry_per_scheme_with_the_documented_keys(tiny_house):
    result = _run("layouts", tiny_house, "--json")
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    assert [s["name"] for s in data["schemes"]] == list(SCHEMES)
    for entry in data["schemes"]:
        assert {
            "name",
            "pipe_length_m",
            "index_emitter",
            "index_pressure_drop_kPa",
            "water_volume_L",
        } <= set(entry)
        assert entry["index_emitter"] in {"front_rad", "back_rad"}
        assert entry["pipe_length_m"] > 0
        assert entry["water_volume_L"] > 0
    assert data["caution"] == CAUTION


def test_one_scheme(tiny_house):
    result = _run("layouts", tiny_house, "--json", "--scheme", "home_run_manifold")
    assert result.exit_code == 0, result.output
    assert [s["name"] for s in json.loads(result.output)["schemes"]] == [
        "home_run_manifold"
    ]


def test_figure_writes_one_schematic_per_scheme(tiny_house, tmp_path):
    out = tmp_path / "figs"
    result = _run("layouts", tiny_house, "--figure", out)
    assert result.exit_code == 0, result.output
    written = sorted(p.name for p in out.iterdir())
    assert written == sorted(f"tiny_{name}_schematic.png" for name in SCHEMES)
    assert all((out / name).stat().st_size > 1000 for name in written)


def test_figure_is_not_overwritten_without_the_flag(tiny_house, tmp_path):
    out = tmp_path / "figs"
    args = ("layouts", tiny_house, "--scheme", "one_pipe_loop", "--figure", out)
    assert _run(*args).exit_code == 0
    before = (out / "tiny_one_pipe_loop_schematic.png").stat().st_mtime_ns
    result = _run(*args)
    assert result.exit_code == 2
    assert "--overwrite" in result.output
    assert (out / "tiny_one_pipe_loop_schematic.png").stat().st_mtime_ns == before
    assert _run(*args, "--overwrite").exit_code == 0


def test_manifold_off_the_route_exits_2_and_writes_nothing(tiny_house, tmp_path):
    text = tiny_house.read_text().replace(
        "floor = 0\ntees", "floor = 0\nmanifold_position_m = 40.0\ntees"
    )
    tiny_house.write_text(text)
    out = tmp_path / "figs"
    result = _run("layouts", tiny_house, "--figure", out)
    assert result.exit_code == 2
    assert "route.floors[0].manifold_position_m: must lie on the run" in result.output
    assert "Traceback" not in result.output
    assert not out.exists()


@pytest.mark.parametrize("command", ["run", "flows", "layouts"])
def test_scheme_choices_are_every_scheme(command):
    cmd = main.get_command(click.Context(main), command)
    option = next(p for p in cmd.params if p.name == "scheme")
    assert set(option.type.choices) == set(SCHEMES)


@pytest.mark.parametrize("scheme", ["one_pipe_loop_floor_pumps", "split_direct_return"])
def test_flows_accepts_a_new_scheme(tiny_house, scheme):
    result = _run("flows", tiny_house, "--scheme", scheme, "--json")
    assert result.exit_code == 0, result.output
    assert json.loads(result.output)["scheme"] == scheme


def test_run_accepts_a_new_scheme(tiny_house, tmp_path):
    out = tmp_path / "out"
    result = _run(
        "run", tiny_house, "--scheme", "home_run_manifold_floor_pumps", "--out", out
    )
    assert result.exit_code == 0, result.output
    assert (out / "tiny_home_run_manifold_floor_pumps.h5").exists()
