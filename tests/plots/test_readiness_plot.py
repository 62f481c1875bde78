"""The readiness figure draws the analysis' curves, the load line and the targets."""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "analysis"))
from readiness_house import one_room  # noqa: E402

from simheat.analysis.readiness import readiness  # noqa: E402
from simheat.plots.readiness import plot_readiness  # noqa: E402
from simheat.scenario import parse_scenario  # noqa: E402


def test_figure_draws_each_radiator_s_curve_and_the_load():
    result = readiness(parse_scenario(one_room(), origin="r"), targets_C=[55.0, 45.0])
    ax = plot_readiness(result).axes[0]
    lines = {line.get_gid(): line for line in ax.lines}
    np.testing.assert_array_equal(
        lines["radiator:rad"].get_ydata(), result.curves.percent_of_share[0]
    )
    np.testing.assert_array_equal(lines["load"].get_ydata(), [100.0, 100.0])
    assert {"target:55", "target:45", "lowest"} <= set(lines)
    np.testing.assert_array_equal(lines["lowest"].get_xdata(), [54.6, 54.6])


def test_coinciding_curves_are_one_line_and_the_limiting_radiator_is_thick():
    from simheat.plots.readiness import LIMITING_WIDTH, LINE_WIDTH
    from simheat.scenario import load_scenario

    root = Path(__file__).resolve().parents[2]
    scenario = load_scenario(root / "scenarios" / "retrofit_heat_pump.toml")
    result = readiness(scenario, targets_C=[55.0])
    ids = list(result.curves.ids)
    ax = plot_readiness(result).axes[0]
    lines = {line.get_gid(): line for line in ax.lines}
    # The living room's two radiators share its load by nominal output and have
    # the same exponent: output over share is the same function of the flow
    # temperature, so one line carries both names (the two rows differ by
    # round-off; the figure groups within 1e-9).
    both = lines["radiator:living_front,living_back"]
    for ident in ("living_front", "living_back"):
        np.testing.assert_allclose(
            both.get_ydata(),
            result.curves.percent_of_share[ids.index(ident)],
            rtol=1e-9,
        )
    assert "radiator:living_front" not in lines
    assert result.limiting == ("bath",)
    assert lines["radiator:bath"].get_linewidth() == LIMITING_WIDTH
    assert lines["radiator:kitchen"].get_linewidth() == LINE_WIDTH
