"""The sweep store: what survives, what is refused, what is cleaned up."""

import json

import h5py
import pytest

from simheat.batch import expand, load_sweep, read_sweep
from simheat.batch.expand import assignments
from simheat.batch.store import SweepStore, parts_dir
from simheat.batch.variant import SweepContext, VariantTask, run_variant
from simheat.errors import ScenarioError

# Flow temperatures: 70 runs; the others fail validation (below 25 °C, or below a
# setpoint) within a millisecond, which is all most store tests need.
SWEEP = """
schemes = ["direct_return"]
[[parameters]]
key = "source.flow_temp_C"
values = [70.0, 10.0, 11.0, 12.0]
"""


@pytest.fixture
def sweep(write_sweep):
    spec = load_sweep(write_sweep(SWEEP))
    return spec, expand(spec)


def _result(spec, variant, keep_series=False):
    context = SweepContext(spec.base_text, spec.origin, keep_series)
    task = VariantTask(
        variant.id, variant.scheme, variant.values, assignments(spec, variant)
    )
    return run_variant(context, task)


def _interrupted_store(spec, variants, out, ids, keep_series=False):
    """A store that kept ``ids`` and then stopped without finishing (as if killed)."""
    store = SweepStore.open(out, spec, variants, keep_series=keep_series)
    store.consolidate()
    for i in ids:
        store.add(_result(spec, variants[i], keep_series))
    store.close()  # a killed process releases its lock, and finishes nothing
    return store


def test_finished_variants_survive_a_sweep_that_never_finished(sweep, tmp_path):
    spec, variants = sweep
    out = tmp_path / "out.h5"
    _interrupted_store(spec, variants, out, [1, 2])
    # The consolidated file is whole (written before the variants) and opens with
    # plain h5py; the two variants are in the sidecar.
    with h5py.File(out, "r") as f:
        assert list(f["table/status"].asstr()[()]) == ["pending"] * 4
    assert sorted(p.name for p in parts_dir(out).glob("0*.json")) == [
        "000001.json",
        "000002.json",
    ]
    store = SweepStore.open(out, spec, variants, resume=True)
    assert sorted(store.rows) == [1, 2]
    assert store.kept == 2
    assert store.rows[1]["error"].startswith("source.flow_temp_C: must be >= 25")
    store.finish()
    assert not parts_dir(out).exists()
    statuses = [r["status"] for r in read_sweep(out).rows]
    assert statuses == ["pending", "failed", "failed", "pending"]


def test_the_sweep_file_reads_back_every_row_exactly(sweep, tmp_path):
    spec, variants = sweep
    out = tmp_path / "out.h5"
    store = SweepStore.open(out, spec, variants)
    for variant in variants:
        store.add(_result(spec, variant))
    expected = store.all_rows()
    store.finish()
    results = read_sweep(out)
    assert list(results.rows) == expected  # every float round-trips bit for bit
    assert results.rows[0]["status"] == "done"
    assert results.rows[0]["time_to_setpoint_s"]["hall"] is not None
    with h5py.File(out, "r") as f:
        assert f.attrs["complete"]
        assert f["table/time_to_setpoint_s"].attrs["units"] == "s"
        assert list(f["table/parameters/source.flow_temp_C"][()]) == [70, 10, 11, 12]
        assert f["base_scenario_toml"].asstr()[()] == spec.base_text


def test_an_existing_output_needs_resume_or_overwrite(sweep, tmp_path):
    spec, variants = sweep
    out = tmp_path / "out.h5"
    _interrupted_store(spec, variants, out, [1])
    with pytest.raises(FileExistsError, match="pass --resume .* or --overwrite"):
        SweepStore.open(out, spec, variants)


def test_overwrite_starts_afresh(sweep, tmp_path):
    spec, variants = sweep
    out = tmp_path / "out.h5"
    _interrupted_store(spec, variants, out, [1, 2])
    store = SweepStore.open(out, spec, variants, overwrite=True)
    assert store.rows == {}
    assert list(parts_dir(out).glob("0*.json")) == []
    store.close()


def test_resume_refuses_a_changed_sweep(sweep, tmp_path, short_bungalow):
    spec, variants = sweep
    out = tmp_path / "out.h5"
    _interrupted_store(spec, variants, out, [1])
    short_bungalow.write_text(short_bungalow.read_text().replace("16.0", "15.0"))
    changed = load_sweep(spec.origin)
    with pytest.raises(ScenarioError, match="holds a different sweep.*--overwrite"):
        SweepStore.open(out, changed, expand(changed), resume=True)


def test_resume_refuses_another_keep_series(sweep, tmp_path):
    spec, variants = sweep
    out = tmp_path / "out.h5"
    _interrupted_store(spec, variants, out, [1])
    with pytest.raises(ScenarioError, match="started without --keep-series"):
        SweepStore.open(out, spec, variants, resume=True, keep_series=True)


def test_a_second_writer_is_locked_out(sweep, tmp_path):
    spec, variants = sweep
    out = tmp_path / "out.h5"
    first = SweepStore.open(out, spec, variants)
    try:
        with pytest.raises(FileExistsError, match="another simheat sweep"):
            SweepStore.open(out, spec, variants, resume=True)
    finally:
        first.close()


def test_leftover_temporary_files_are_removed_and_ignored(sweep, tmp_path):
    spec, variants = sweep
    out = tmp_path / "out.h5"
    _interrupted_store(spec, variants, out, [1])
    # What a kill in the middle of writing leaves: a half sweep file and a half
    # part, both under temporary names.
    half_file = tmp_path / ".out.h5.0123456789ab.tmp"
    half_file.write_bytes(b"\x89HDF\r\n\x1a\n" + b"\0" * 100)
    half_part = parts_dir(out) / ".000002.json.0123456789ab.tmp"
    half_part.write_text('{"id": 2, "status": "do')
    store = SweepStore.open(out, spec, variants, resume=True)
    assert sorted(store.rows) == [1]
    assert not half_file.exists()
    assert not half_part.exists()
    store.close()


def test_a_row_whose_run_file_is_missing_is_run_again(sweep, tmp_path):
    spec, variants = sweep
    out = tmp_path / "out.h5"
    _interrupted_store(spec, variants, out, [0], keep_series=True)
    (parts_dir(out) / "000000.h5").unlink()
    store = SweepStore.open(out, spec, variants, resume=True, keep_series=True)
    assert store.rows == {}
    store.close()


def test_parts_are_plain_strict_json(sweep, tmp_path):
    spec, variants = sweep
    out = tmp_path / "out.h5"
    _interrupted_store(spec, variants, out, [0])
    text = (parts_dir(out) / "000000.json").read_text()
    row = json.loads(text, parse_constant=lambda name: pytest.fail(name))
    assert row["status"] == "done"
    assert row["values"] == [70.0]


def test_a_sweep_abandoned_before_its_first_write_leaves_no_trace(sweep, tmp_path):
    spec, variants = sweep
    out = tmp_path / "results" / "out.h5"
    SweepStore.open(out, spec, variants).abandon()  # say, no cluster to reach
    assert list(out.parent.iterdir()) == []


def test_a_sweep_abandoned_with_kept_variants_keeps_its_sidecar(sweep, tmp_path):
    spec, variants = sweep
    out = tmp_path / "out.h5"
    _interrupted_store(spec, variants, out, [1])
    out.unlink()  # only the sidecar holds variant 1
    store = SweepStore.open(out, spec, variants, resume=True)
    store.abandon()
    assert (parts_dir(out) / "000001.json").exists()


def test_overwrite_replaces_a_file_that_is_not_a_sweep(sweep, tmp_path):
    spec, variants = sweep
    out = tmp_path / "out.h5"
    out.write_text("not a sweep file")
    store = SweepStore.open(out, spec, variants, overwrite=True, keep_series=True)
    store.add(_result(spec, variants[0], keep_series=True))
    store.finish()
    with h5py.File(out, "r") as f:
        assert list(f["variants"]) == ["000000"]
        assert f["variants/000000"].attrs["format"] == "simheat-run"
