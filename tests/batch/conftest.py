"""Fixtures of the sweep tests: the demo bungalow, shortened, and sweep files."""

from __future__ import annotations

from pathlib import Path

import pytest

SCENARIOS_DIR = Path(__file__).resolve().parents[2] / "scenarios"
# One hour of the demo morning: about 50 ms per run; the hall and the kitchen reach
# their setpoints within it (34 and 47 min in the full run), the other rooms do not.
SHORT_DURATION_H = 1.0


@pytest.fixture
def short_bungalow(tmp_path) -> Path:
    """The bungalow demo with a one-hour run from 15 °C, in a fresh directory."""
    text = (SCENARIOS_DIR / "bungalow.toml").read_text(encoding="utf-8")
    assert "duration_h = 6.0" in text
    text = text.replace("duration_h = 6.0", f"duration_h = {SHORT_DURATION_H}")
    # from 15 °C rooms and water, not the night: the sweeps test orchestration,
    # and a night would leave every room far below its setpoint after an hour
    text = "\n".join(
        line for line in text.splitlines() if not line.startswith("off_from")
    )
    text = text.replace(
        "[simulation]\n",
        "[simulation]\ninitial_room_temp_C = 15.0\ninitial_water_temp_C = 15.0\n",
    )
    path = tmp_path / "bungalow.toml"
    path.write_text(text, encoding="utf-8")
    return path


@pytest.fixture
def write_sweep(short_bungalow):
    """Write a sweep file over the short bungalow: ``write_sweep(body) -> Path``."""

    def write(body: str, name: str = "sweep.toml") -> Path:
        path = short_bungalow.parent / name
        path.write_text(f'base = "{short_bungalow.name}"\n{body}', encoding="utf-8")
        return path

    return write
