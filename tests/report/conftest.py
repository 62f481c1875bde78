"""A house whose every free-text field tries to inject markup, reported once."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from simheat.analysis.handover import build_handover
from simheat.report.html import handover_html
from simheat.scenario import parse_scenario

SCENARIOS_DIR = Path(__file__).resolve().parents[2] / "scenarios"
HOSTILE_NAME = "Villa \"<script>alert(1)</script>\" & 'Co'"
HOSTILE_DESCRIPTION = "</style><script>alert(2)</script> it's <b>bold</b>"
HOSTILE_ROOM = 'Living <img src=x onerror="alert(3)">'


def hostile_bungalow_text() -> str:
    """The demo bungalow, one hour long, with markup in its names."""
    text = (SCENARIOS_DIR / "bungalow.toml").read_text(encoding="utf-8")
    text = text.replace(
        'name = "Single-storey bungalow, cold start"',
        "name = " + json.dumps(HOSTILE_NAME),
    )
    text = text.replace('name = "Living room"', "name = " + json.dumps(HOSTILE_ROOM))
    start = text.index('description = """')
    end = text.index('"""', start + len('description = """')) + 3
    text = (
        text[:start] + "description = " + json.dumps(HOSTILE_DESCRIPTION) + text[end:]
    )
    return text.replace("duration_h = 6.0", "duration_h = 1.0")


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
