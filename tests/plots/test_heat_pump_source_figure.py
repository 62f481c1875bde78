"""The source figure of a heat pump run draws its capacity of the moment."""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "dynamics"))
from heat_pump_house import house_text  # noqa: E402

from simheat.dynamics.simulate import simulate  # noqa: E402
from simheat.plots.source import plot_source  # noqa: E402
from simheat.scenario import parse_scenario  # noqa: E402


def test_heat_pump_capacity_line_is_the_run_s_capacity_series():
    run = simulate(parse_scenario(house_text(outdoor_C=(-12.0, 5.0)), origin="hp"))
    axes = plot_source(run).axes[0]
    (limit,) = [line for line in axes.lines if line.get_gid() == "power_limit"]
    np.testing.assert_allclose(limit.get_ydata(), run.source_capacity_W / 1000.0)
    assert "Heat pump capacity" in limit.get_label()
