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
    """The bungalow demo with a half-hour run, in a fresh directory."""
    text = (SCENARIOS_DIR / "bungalow.toml").read_text(encoding="utf-8")
    assert "duration_h = 6.0" in text
    text = text.replace("duration_h = 6.0", f"duration_h = {SHORT_DURATION_H}")
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
