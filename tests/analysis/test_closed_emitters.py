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


@pytest.fixture(scope="module")
def handed_over():
    """The hand-over of a short run with bed1_side shut, check and balance added."""
    from simheat.analysis.handover import scheme_handover
    from simheat.dynamics.simulate import simulate

    scenario = parse_scenario(
        CLOSED_TEXT.replace("duration_h = 6.0", "duration_h = 2.0")
    )
    run = simulate(scenario, "direct_return")
    return scheme_handover(scenario, run, ("check", "balance"))


def test_handover_gives_the_closed_radiator_no_load_and_no_flow(handed_over):
    lines = {r.id: r for r in handed_over.radiators}
    assert lines["bed1_side"].load_W == 0.0
    assert lines["bed1_side"].verified_flow_kg_s == 0.0
    # as check: bed1's whole design load (1100 W) on its open radiator
    assert lines["bed1_window"].load_W == pytest.approx(1100.0, rel=1e-12)


def test_handover_says_why_it_has_no_commissioning_table(handed_over):
    from simheat.analysis.handover import Refused

    refused = handed_over.extras["balance"]
    assert isinstance(refused, Refused)
    assert "bed1_side is shut for good" in refused.message


def test_handover_page_row_of_the_closed_radiator(handed_over):
    from simheat.report.html.context import radiator_rows

    (row,) = [r for r in radiator_rows(handed_over) if r["cells"][0] == "bed1_side"]
    assert row["cells"][6] == "closed"  # flow as share of design
    assert row["cells"][9] == "--"  # output as share of load: it has none
    assert not row["starving"]
    assert not row["short"]
