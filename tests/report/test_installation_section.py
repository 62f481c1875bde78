"""The hand-over page's filling, venting and draining section says what layouts says."""

from __future__ import annotations

from pathlib import Path

import pytest

from simheat.analysis.handover import scheme_handover
from simheat.dynamics.simulate import simulate
from simheat.hydraulics.heights import FILL_MARGIN_KPA
from simheat.report.html.installation import installation_section
from simheat.scenario import parse_scenario

EXAMPLE = Path(__file__).resolve().parents[2] / "scenarios/two_storey_installed.toml"


@pytest.fixture(scope="module")
def item():
    # two hours: the 05:00-06:00 shut-off and half an hour of comfort
    text = EXAMPLE.read_text().replace("duration_h = 6.0", "duration_h = 2.0")
    scenario = parse_scenario(text)
    return scheme_handover(scenario, simulate(scenario, "direct_return_floor_pumps"))


def test_fill_pressure_vents_and_drains_are_the_layouts_figures(item):
    section = installation_section(item)
    heights = item.design.figures.heights
    fill = heights.fill_pressure_kPa
    assert f"Fill cold to at least {fill:.0f} kPa at the plant" in section["notes"][0]
    assert (
        f"plus {FILL_MARGIN_KPA:g} kPa (common trade practice)" in (section["notes"][0])
    )
    points, obstacles = section["tables"]
    vents = [row[1] for row in points["rows"] if row[0] == "air vent"]
    drains = [row[1] for row in points["rows"] if row[0] == "drain"]
    assert vents == [p.where for p in heights.high_points]
    assert drains == [p.where for p in heights.low_points]
    door = next(row for row in obstacles["rows"] if row[0] == "kitchen door")
    assert door[1:3] == ["over", "2"]
    assert door[6:] == ["2", "0"]  # a vent on each header over the door


def test_the_switched_floor_pump_is_reported_as_it_ran(item):
    section = installation_section(item)
    record = item.run.floor_pumps["pump:floor1"]
    # shut off for the first hour, then on its thermostat
    assert record["switched_s"][:2] == [[0.0, False], [3600.0, True]]
    (note,) = [n for n in section["notes"] if n.startswith("pump:floor1")]
    assert f"ran {record['on_time_s'] / 3600:.2f} h of the 2.00 h" in note
    assert f"{record['switches']} times" in note
    # the ground floor's pump has no floor control: nothing to report
    assert not [n for n in section["notes"] if n.startswith("pump:floor0")]


def test_every_scheme_on_the_page_has_the_section(hostile_handover, hostile_page):
    heading = "<h3>Filling, venting and draining</h3>"
    assert hostile_page.count(heading) == len(hostile_handover.schemes)
