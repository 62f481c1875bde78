"""Sweeps run end to end through the library: local workers, dask, kept runs."""

import os
import signal

import h5py
import pytest

from simheat.batch import expand, load_sweep, read_sweep, run_sweep
from simheat.batch.expand import assignments
from simheat.batch.pool import ProcessPool
from simheat.batch.table import run_metrics
from simheat.batch.variant import SweepContext, VariantTask
from simheat.runs.store import load_run

GRID = """
schemes = ["direct_return", "reverse_return"]
[[parameters]]
key = "source.flow_temp_C"
values = [70.0, 10.0]
[[parameters]]
key = "emitters.hall.nominal_power_kW"
values = [0.8, 1.4]
"""
# Fields of a row that depend on where and when it ran, not on the physics.
RUN_FIELDS = ("wall_time_s", "simheat_version")


def _physics(rows):
    return [{k: v for k, v in row.items() if k not in RUN_FIELDS} for row in rows]


def test_failures_are_recorded_and_the_sweep_goes_on(write_sweep, tmp_path):
    spec = load_sweep(write_sweep(GRID))
    outcome = run_sweep(spec, tmp_path / "out.h5", workers=1)
    rows = outcome.results.rows
    assert [r["status"] for r in rows] == ["done"] * 4 + ["failed"] * 4
    for row in rows[4:]:
        assert row["error"].startswith("source.flow_temp_C: must be >= 25, got 10")
        assert row["all_rooms_at_setpoint_s"] is None
    assert outcome.ran == 8
    assert not outcome.interrupted
    # The hall heats faster with the larger radiator, under each scheme.
    hall = [r["time_to_setpoint_s"]["hall"] for r in rows[:4]]
    assert hall[2] < hall[0]
    assert hall[3] < hall[1]


def test_a_worker_killed_mid_variant_fails_that_variant_only(write_sweep):
    spec = load_sweep(write_sweep(GRID.replace("10.0]", "65.0]")))
    variants = expand(spec) * 3  # 24 tasks: time enough to kill a worker mid-way
    tasks = [
        VariantTask(i, v.scheme, v.values, assignments(spec, v))
        for i, v in enumerate(variants)
    ]
    context = SweepContext(spec.base_text, spec.origin, keep_series=False)
    results = []
    with ProcessPool(context, workers=2) as pool:
        for result in pool.run(tasks):
            results.append(result.row)
            if len(results) == 3:
                # Each worker holds a variant as soon as it has reported one.
                os.kill(pool.pids[0], signal.SIGKILL)
    assert sorted(r["id"] for r in results) == list(range(24))
    failed = [r for r in results if r["status"] == "failed"]
    assert len(failed) == 1
    assert failed[0]["error"] == (
        "worker process ended unexpectedly (exit code -9) while running this variant"
    )


def test_a_local_dask_cluster_gives_the_local_results(write_sweep, tmp_path):
    pytest.importorskip("distributed")
    spec = load_sweep(write_sweep(GRID))
    local = run_sweep(spec, tmp_path / "local.h5", workers=1)
    cluster = run_sweep(spec, tmp_path / "dask.h5", scheduler="local:2")
    assert "dask" in cluster.executor
    # The same variants through the same code: equal to the last bit.
    assert _physics(cluster.results.rows) == _physics(local.results.rows)


def test_kept_series_are_run_files_of_the_variants(write_sweep, tmp_path):
    spec = load_sweep(write_sweep(GRID))
    out = tmp_path / "out.h5"
    results = run_sweep(spec, out, workers=1, keep_series=True).results
    with h5py.File(out, "r") as f:
        assert sorted(f["variants"]) == ["000000", "000001", "000002", "000003"]
        # A variant's group, copied out on its own, is a run file simheat reads.
        with h5py.File(tmp_path / "variant2.h5", "w") as single:
            group = f["variants/000002"]
            for key, value in group.attrs.items():
                single.attrs[key] = value
            for key in group:
                f.copy(group[key], single, name=key)
    run = load_run(tmp_path / "variant2.h5")
    assert run.scheme == "direct_return"
    assert "nominal_power_kW = 1.4" in run.scenario.text
    metrics = run_metrics(run)
    row = results.rows[2]
    for key, value in metrics.items():
        assert row[key] == value, key


def test_resume_of_a_finished_sweep_runs_nothing(write_sweep, tmp_path):
    spec = load_sweep(write_sweep(GRID))
    first = run_sweep(spec, tmp_path / "out.h5", workers=1)
    again = run_sweep(spec, tmp_path / "out.h5", workers=1, resume=True)
    assert (again.kept, again.ran) == (8, 0)
    assert again.results.rows == first.results.rows
    assert read_sweep(tmp_path / "out.h5").complete
