"""``simheat layouts`` end to end: exit codes, JSON keys and files written."""

from __future__ import annotations

import json

import click
import numpy as np
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


DOOR = (
    '[[route.floors.obstacles]]\nname = "door"\nposition_m = 5.0\npassed = "over"\n'
    "height_m = 2.1\n"
)


def test_obstacle_heights_and_segments_in_json(tiny_house):
    text = tiny_house.read_text().replace(
        '{ emitter = "back_rad", header_length_m = 6.0, branch_length_m = 0.5 },',
        '{ emitter = "back_rad", header_length_m = 6.0, branch_length_m = 0.5, '
        'header_pipe = "cu_12x1" },',
    )
    tiny_house.write_text(text + DOOR)
    result = _run("layouts", tiny_house, "--json", "--scheme", "direct_return")
    assert result.exit_code == 0, result.output
    (entry,) = json.loads(result.output)["schemes"]
    (door,) = entry["obstacles"]
    assert (door["name"], door["pipes"], door["air_vents"]) == ("door", 2, 2)
    assert door["extra_length_m"] == pytest.approx(2 * 2 * 2.1)
    assert entry["heights"]["highest_m"] == pytest.approx(2.1)
    assert len(entry["heights"]["air_vents"]) == 2
    pipes = {s["link"]: s["pipe"] for s in entry["header_segments"]}
    assert pipes["header:supply:back_rad"] == "cu_12x1"


def test_text_lists_segments_vents_and_obstacles(tiny_house):
    text = tiny_house.read_text() + DOOR + '\n[layout.sizing]\nmode = "auto"\n'
    tiny_house.write_text(text)
    result = _run("layouts", tiny_house, "--scheme", "reverse_return")
    assert result.exit_code == 0, result.output
    out = result.output
    assert "header segments (pipe, length, design flow, velocity, gradient):" in out
    # reverse return: the supply, the return from the first tee and the return
    # back along the run all pass the door
    assert "air vents:     3: header:supply:back_rad (2.1 m)" in out
    assert "obstacle:      door (over): 3 pipe(s) pass it" in out
    assert out.rstrip().endswith(CAUTION)


@pytest.mark.parametrize(
    ("extra", "message"),
    [
        (
            '[[route.floors.obstacles]]\nposition_m = 3.0\npassed = "over"\n'
            "height_m = 2.1\n",
            "route.floors[0].obstacles[0].position_m: lies at a tee (3 m)",
        ),
        (
            '[[route.floors.obstacles]]\nposition_m = 5.0\npassed = "over"\n',
            "route.floors[0].obstacles[0].height_m: required key is missing",
        ),
    ],
)
def test_bad_obstacle_exits_2_naming_the_key(tiny_house, extra, message):
    tiny_house.write_text(tiny_house.read_text() + extra)
    result = _run("layouts", tiny_house)
    assert result.exit_code == 2
    assert message in result.output
    assert "Traceback" not in result.output


def test_floor_pumps_of_a_house_scheme_is_a_usage_error(tiny_house):
    result = _run(
        "layouts", tiny_house, "--scheme", "reverse_return_risers_floor_pumps"
    )
    assert result.exit_code == 2


THREE_DOORS = "".join(
    f'[[route.floors.obstacles]]\nname = "door {i}"\nposition_m = {x}\n'
    f'passed = "over"\nheight_m = {h}\n'
    for i, (x, h) in enumerate(((4.0, 1.0), (5.5, 1.5), (7.0, 2.0)))
)


def test_one_scheme_names_every_vent_and_drain(tiny_house):
    # Three doors passed over by both headers of direct return: six high
    # points, more than the text names when it covers every scheme.
    tiny_house.write_text(tiny_house.read_text() + THREE_DOORS)
    one = _run("layouts", tiny_house, "--scheme", "direct_return", "--json")
    heights = json.loads(one.output)["schemes"][0]["heights"]
    vents = [p["where"] for p in heights["air_vents"]]
    drains = [p["where"] for p in heights["drains"]]
    assert len(vents) == 6
    text = _run("layouts", tiny_house, "--scheme", "direct_return").output
    for where in vents + drains:
        assert f"{where} (" in text
    assert "more (one scheme at a time names all)" not in text
    every = _run("layouts", tiny_house).output
    block = every.split("\ndirect_return\n")[1].split("\n\n")[0]
    assert "air vents:     6: " in block
    assert " and 2 more (one scheme at a time names all)" in block


def test_run_simulates_the_network_with_the_detour(tiny_house, tmp_path):
    # The run file keeps the network simulated: each header line that passes
    # the door is longer by its rise and fall, 2 x 2.1 m (and both ends' link
    # names are those of the layout built with the door).
    from simheat.hydraulics.layouts import build
    from simheat.runs import load
    from simheat.scenario import load_scenario

    plain = build(load_scenario(tiny_house), "direct_return")
    tiny_house.write_text(tiny_house.read_text() + DOOR)
    result = _run("run", tiny_house, "--scheme", "direct_return", "--out", tmp_path)
    assert result.exit_code == 0, result.output
    run = load(tmp_path / "tiny_direct_return.h5")
    added = run.network.length_m - plain.length_m
    assert run.network.link_names == plain.link_names
    changed = {run.network.link_names[k]: added[k] for k in np.flatnonzero(added)}
    assert changed == pytest.approx(
        {"header:supply:back_rad": 4.2, "header:return:back_rad": 4.2}, rel=1e-12
    )
