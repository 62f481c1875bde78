"""A house whose every free-text field tries to inject markup, reported once."""

from __future__ import annotations

import pytest
from hostile_house import HOSTILE_NAME, HOSTILE_ROOM, hostile_bungalow_text

from simheat.analysis.handover import build_handover
from simheat.report.html import handover_html
from simheat.scenario import parse_scenario


@pytest.fixture(scope="session")
def hostile_scenario():
    scenario = parse_scenario(hostile_bungalow_text(), "hostile.toml")
    assert scenario.name == HOSTILE_NAME
    assert scenario.rooms[0].name == HOSTILE_ROOM
    return scenario


@pytest.fixture(scope="session")
def hostile_handover(hostile_scenario):
    """The hostile bungalow's hand-over content, both schemes, built once."""
    return build_handover(hostile_scenario)


@pytest.fixture(scope="session")
def hostile_page(hostile_handover):
    """Its HTML page, with a fixed date so the text is repeatable."""
    return handover_html(hostile_handover, generated="2024-01-01 00:00 UTC")
