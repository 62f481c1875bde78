"""A run with an emitter shut for good: no flow through it at any time."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from simheat.dynamics.simulate import simulate
from simheat.runs import load, save_run
from simheat.scenario import parse_scenario

TWO_STOREY = (
    Path(__file__).resolve().parents[2] / "scenarios/two_storey.toml"
).read_text()
CLOSED = TWO_STOREY.replace('id = "bed1_side"\n', 'id = "bed1_side"\nclosed = true\n')
SHORT = CLOSED.replace("duration_h = 6.0", "duration_h = 2.0")


@pytest.fixture(scope="module")
def closed_run():
    return simulate(parse_scenario(SHORT), "reverse_return")


def test_the_closed_emitter_never_carries_water(closed_run):
    e = closed_run.scenario.emitter_index("bed1_side")
    assert np.all(closed_run.emitter_flow_kg_s[:, e] == 0.0)  # exactly
    others = np.delete(closed_run.emitter_flow_kg_s, e, axis=1)
    comfort = closed_run.time_s >= closed_run.scenario.schedule.comfort_start_s
    assert np.all(others[comfort] > 0.0)


def test_the_closed_emitter_stays_cold_and_the_books_close(closed_run):
    # no hot water reaches it: its water stays within a few kelvin of the room
    e = closed_run.scenario.emitter_index("bed1_side")
    assert closed_run.summary.emitters[e].hot_water_arrival_s is None
    assert np.max(closed_run.emitter_inlet_temp_C[:, e]) < 30.0
    assert abs(closed_run.summary.energy.balance_error_pct) < 0.5


def test_the_run_file_keeps_the_closed_link(closed_run, tmp_path):
    path = tmp_path / "closed.h5"
    save_run(closed_run, path)
    back = load(path)
    np.testing.assert_array_equal(back.network.closed, closed_run.network.closed)
    assert back.network.closed.sum() == 1
