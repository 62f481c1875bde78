"""The bundled example of a layout as installed reads and shows what it was made for."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from click.testing import CliRunner

from simheat.cli import main

EXAMPLE = Path(__file__).resolve().parents[2] / "scenarios/two_storey_installed.toml"
G = 9.80665  # standard gravity, 3rd CGPM (1901)


@pytest.fixture(scope="module")
def direct_return():
    result = CliRunner().invoke(
        main, ["layouts", str(EXAMPLE), "--scheme", "direct_return", "--json"]
    )
    assert result.exit_code == 0, result.output
    (entry,) = json.loads(result.stdout)["schemes"]
    return entry


def test_the_ground_floor_header_tapers_as_given(direct_return):
    sizes = {s["link"]: s["pipe"] for s in direct_return["header_segments"]}
    run = ["kitchen", "wc", "hall", "lounge_front", "lounge_back"]
    for line in ("supply", "return"):
        assert [sizes[f"header:{line}:{e}"] for e in run] == [
            "cu_22x1", "cu_22x1", "cu_18x1", "cu_18x1", "cu_15x1",
        ]  # fmt: skip


def test_the_door_and_the_beam_and_the_basement_plant(direct_return):
    costs = {o["name"]: o for o in direct_return["obstacles"]}
    assert (costs["kitchen door"]["air_vents"], costs["kitchen door"]["drains"]) == (
        2,
        0,
    )
    assert (costs["lounge beam"]["air_vents"], costs["lounge beam"]["drains"]) == (0, 2)
    heights = direct_return["heights"]
    # the upper floor: 2.4 m basement riser + 3.0 m riser above the plant
    assert heights["highest_m"] == pytest.approx(5.4)
    # cold water (about 1000 kg/m3): rho g h within 0.1 % of 1000 kg/m3
    assert heights["static_head_kPa"] == pytest.approx(1000 * G * 5.4 / 1e3, rel=1e-3)
    assert direct_return["fittings"]["ball_valve"] == 1
