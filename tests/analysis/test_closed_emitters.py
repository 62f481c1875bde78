"""The answers above the flow split with an emitter shut for good."""

from __future__ import annotations

from pathlib import Path

import pytest
from click.testing import CliRunner

from simheat.analysis.check import check_scheme
from simheat.cli import main
from simheat.scenario import parse_scenario

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"
TWO_STOREY = (SCENARIOS / "two_storey.toml").read_text()
CLOSED_TEXT = TWO_STOREY.replace(
    'id = "bed1_side"\n', 'id = "bed1_side"\nclosed = true\n'
)


@pytest.fixture(scope="module")
def checked():
    return check_scheme(parse_scenario(CLOSED_TEXT), "direct_return")


def test_check_leaves_the_closed_radiator_out(checked):
    radiators = {r.id: r for r in checked.radiators}
    assert radiators["bed1_side"].share_W == 0.0
    assert not radiators["bed1_side"].undersized
    assert "bed1_side" not in {s.id for s in checked.starving}


def test_check_gives_the_rooms_load_to_its_open_radiator(checked):
    # bed1's whole design load (1100 W) falls on bed1_window
    radiators = {r.id: r for r in checked.radiators}
    assert radiators["bed1_window"].share_W == pytest.approx(1100.0, rel=1e-12)
    (short,) = [s for s in checked.starving if s.id == "bed1_window"]
    best = short.fixes[0]
    assert best.verified.fraction > 0.9


def test_balance_refuses_a_closed_emitter_naming_the_key(tmp_path):
    path = tmp_path / "closed.toml"
    path.write_text(CLOSED_TEXT)
    result = CliRunner().invoke(main, ["balance", str(path)])
    assert result.exit_code == 2
    assert "emitters[9].closed: emitter 'bed1_side' is shut for good" in result.output
    assert "Traceback" not in result.output


def test_flows_flags_the_closed_emitter(tmp_path):
    path = tmp_path / "closed.toml"
    path.write_text(CLOSED_TEXT)
    result = CliRunner().invoke(main, ["flows", str(path)])
    assert result.exit_code == 0, result.output
    (line,) = [row for row in result.output.splitlines() if row.startswith("bed1_side")]
    assert line.split()[1:6] == ["0", "kg/h", "0", "kg/h", "--"]
    assert line.rstrip().endswith("CLOSED")
