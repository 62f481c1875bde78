"""Fixtures shared across the test suite."""

from __future__ import annotations

from pathlib import Path

import pytest

from simheat.dynamics.simulate import simulate
from simheat.scenario import load_scenario

SCENARIOS_DIR = Path(__file__).resolve().parents[1] / "scenarios"


@pytest.fixture(scope="session")
def bungalow_runs():
    """The demo bungalow simulated once per session under each of its schemes.

    Returns ``{scheme: Run}``. Shared by many tests: treat the runs (and their
    arrays) as read-only.
    """
    scenario = load_scenario(SCENARIOS_DIR / "bungalow.toml")
    return {scheme: simulate(scenario, scheme) for scheme in scenario.schemes}
