"""What the sweep figures show, from hand-made tables with known answers."""

from pathlib import Path

import numpy as np
import pytest

from simheat.batch.analysis import ALL_ROOMS, metric_points, setpoint_probability
from simheat.batch.sweepfile import SweepResults
from simheat.batch.table import empty_row
from simheat.plots.sweep import plot_setpoint_probability, plot_sweep_metrics


def _row(variant_id, values, times_min, status="done", scheme="direct_return"):
    row = empty_row(variant_id, scheme, values, status)
    if status == "done":
        times = {k: None if t is None else 60.0 * t for k, t in times_min.items()}
        row["time_to_setpoint_s"] = times
        row["rooms_not_reached"] = [k for k, t in times.items() if t is None]
        reached = [t for t in times.values() if t is not None]
        row["all_rooms_at_setpoint_s"] = (
            max(reached) if len(reached) == len(times) else None
        )
        row["lowest_flow_pct_of_design"] = 90.0
        row["peak_source_power_W"] = 8000.0
        row["source_energy_J"] = 3.6e7
    return row


def _results(rows, keys=("source.flow_temp_C", "route.header_pipe"), mode="random"):
    return SweepResults(
        path=Path("x.h5"),
        name="test sweep",
        mode=mode,
        keys=keys,
        operations=("set",) * len(keys),
        schemes=("direct_return",),
        room_ids=("a", "b"),
        rows=tuple(rows),
        sweep_text="",
        base_text="",
        content_hash="",
        keep_series=False,
    )


ROWS = [
    _row(0, [60.0, "cu_22x1"], {"a": 10.0, "b": 30.0}),
    _row(1, [65.0, "cu_28x1"], {"a": 20.0, "b": None}),
    _row(2, [70.0, "cu_22x1"], {"a": 40.0, "b": 25.0}),
    _row(3, [75.0, "cu_15x1"], {}, status="failed"),
]


def test_probability_is_the_share_of_finished_variants_there_by_then():
    curves = setpoint_probability(_results(ROWS), np.array([0.0, 15.0, 30.0, 60.0]))
    curves = curves["direct_return"]
    # Three finished variants (the failed one is left out). Room a: 10, 20, 40 min;
    # room b: 30, never, 25 min; all rooms: 30, never, 40 min.
    assert curves["a"] == pytest.approx([0, 1 / 3, 2 / 3, 1])
    assert curves["b"] == pytest.approx([0, 0, 2 / 3, 2 / 3])
    assert curves[ALL_ROOMS] == pytest.approx([0, 0, 1 / 3, 2 / 3])


def test_metric_points_put_text_values_on_categories_in_sweep_order():
    points = metric_points(_results(ROWS))
    pipes = points.parameters[1]
    assert pipes.categories == ("cu_22x1", "cu_28x1", "cu_15x1")
    assert list(pipes.x) == [0, 1, 0]  # the failed variant is not drawn
    assert list(points.parameters[0].x) == [60.0, 65.0, 70.0]
    assert points.n_failed == 1
    metrics = {name: y for name, _, y in points.metrics}
    assert list(metrics["all_rooms_at_setpoint_s"]) == pytest.approx(
        [30, np.nan, 40], nan_ok=True
    )
    assert list(metrics["rooms_not_reached"]) == [0, 1, 0]
    assert list(metrics["source_energy_J"]) == pytest.approx([10.0] * 3)  # kWh


def test_the_metrics_figure_has_a_panel_per_metric_and_parameter():
    figure = plot_sweep_metrics(metric_points(_results(ROWS, mode="grid")))
    gids = {ax.get_gid() for ax in figure.axes}
    assert "panel:all_rooms_at_setpoint_s:route.header_pipe" in gids
    assert len([g for g in gids if g and g.startswith("panel:")]) == 5 * 2


def test_the_probability_figure_draws_a_curve_per_room_and_all_rooms():
    time_min = np.linspace(0.0, 60.0, 7)
    figure = plot_setpoint_probability(
        time_min,
        setpoint_probability(_results(ROWS), time_min),
        title="test sweep",
        comfort_clock="06:30",
        n_variants={"direct_return": 3},
    )
    lines = {line.get_gid(): line for line in figure.axes[0].lines}
    assert set(lines) == {
        "probability:direct_return:a",
        "probability:direct_return:b",
        f"probability:direct_return:{ALL_ROOMS}",
    }
    assert list(lines["probability:direct_return:a"].get_ydata())[-1] == 1.0
    assert "06:30" in figure.axes[0].get_xlabel()


def test_the_metrics_figure_lays_out_when_every_room_got_there():
    # An empty unclipped marker line once collapsed the constrained layout.
    import io
    import warnings

    rows = [ROWS[0], ROWS[2]]
    figure = plot_sweep_metrics(metric_points(_results(rows, mode="grid")))
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        figure.savefig(io.BytesIO(), format="png")
