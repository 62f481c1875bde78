"""A house whose every free-text field tries to inject markup (report tests)."""

from __future__ import annotations

import json
from pathlib import Path

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
