"""HDF5 run store: exact round trips, plain-HDF5 readability, refusals, atomicity."""

from __future__ import annotations

import dataclasses
import json
import os
import shutil

import h5py
import numpy as np
import pytest

import simheat
import simheat.runs
from simheat.errors import RunFileError
from simheat.hydraulics.network import Network
from simheat.runs import store
from simheat.runs.checks import seal
from simheat.runs.run import Night, Run
from simheat.runs.store import SCHEMA_VERSION, load_run, save_run

SCHEMES = ["direct_return", "reverse_return"]
SERIES = [*store.SERIES_UNITS, *store.OPTIONAL_SERIES_UNITS]
NETWORK_ARRAYS = list(store.NETWORK_ARRAY_UNITS)


@pytest.fixture
def saved(bungalow_runs, tmp_path):
    """The direct-return run written to a file; returns (run, path)."""
    run = bungalow_runs["direct_return"]
    return run, save_run(run, tmp_path / "run.h5")


@pytest.mark.parametrize("scheme", SCHEMES)
@pytest.mark.parametrize("name", SERIES)
def test_round_trip_keeps_every_series_exactly(bungalow_runs, tmp_path, scheme, name):
    run = bungalow_runs[scheme]
    loaded = load_run(save_run(run, tmp_path / f"{scheme}.h5"))
    original = getattr(run, name)
    np.testing.assert_array_equal(getattr(loaded, name), original)
    assert getattr(loaded, name).dtype == original.dtype


@pytest.mark.parametrize("name", NETWORK_ARRAYS)
def test_round_trip_keeps_every_network_array_exactly(saved, name):
    run, path = saved
    loaded = load_run(path)
    original = getattr(run.network, name)
    np.testing.assert_array_equal(getattr(loaded.network, name), original)
    assert getattr(loaded.network, name).dtype == original.dtype


def test_round_trip_keeps_network_names_and_scalars(saved):
    run, path = saved
    net = load_run(path).network
    assert net.node_names == run.network.node_names
    assert net.link_names == run.network.link_names
    assert net.emitter_ids == run.network.emitter_ids
    assert net.scheme == run.network.scheme
    assert net.reference_node == run.network.reference_node
    assert all(isinstance(name, str) for name in net.node_names)


def test_store_covers_every_network_field():
    stored = {"scheme", "reference_node", *store.NETWORK_STRING_ARRAYS, *NETWORK_ARRAYS}
    assert stored == {field.name for field in dataclasses.fields(Network)}


def test_store_covers_every_series_of_a_run():
    array_fields = {
        field.name
        for field in dataclasses.fields(Run)
        if field.name
        not in {"scenario", "scheme", "network", "summary", "solver", "night"}
    }
    assert array_fields == set(SERIES)


def test_store_covers_every_series_of_the_night():
    fields = {field.name for field in dataclasses.fields(Night)} - {"off_clock_s"}
    assert fields == set(store.NIGHT_SERIES_UNITS)


@pytest.mark.parametrize("name", list(store.NIGHT_SERIES_UNITS))
def test_round_trip_keeps_the_night_exactly(saved, name):
    run, path = saved
    loaded = load_run(path)
    np.testing.assert_array_equal(getattr(loaded.night, name), getattr(run.night, name))
    assert loaded.night.off_clock_s == run.night.off_clock_s


def test_the_night_is_marked_in_the_file(saved):
    run, path = saved
    with h5py.File(path, "r") as f:
        assert f.attrs["initial_state"] == "night"
        night = f["night"]
        assert night.attrs["off_clock"] == "22:00"
        assert night["time_s"][0] == pytest.approx(-7 * 3600.0)
        assert night["time_s"][-1] == 0.0
        assert night["air_temp_C"].attrs["units"] == "degC"
        assert list(night["air_temp_C"].attrs["columns"]) == [
            r.id for r in run.scenario.rooms
        ]


def test_a_run_from_a_given_state_has_no_night_group(saved, tmp_path):
    run, _ = saved
    path = save_run(dataclasses.replace(run, night=None), tmp_path / "given.h5")
    with h5py.File(path, "r") as f:
        assert f.attrs["initial_state"] == "given"
        assert "night" not in f
    assert load_run(path).night is None


def test_a_version_two_file_reads_as_a_run_without_a_night(saved, tmp_path):
    # Schema 2 files were written before nights: their scenarios started from
    # 15 °C rooms and water unless they said otherwise, and had no night group.
    run, path = saved
    older = tmp_path / "older.h5"
    shutil.copy(path, older)
    with h5py.File(older, "r+") as f:
        f.attrs["schema_version"] = 2
        del f.attrs["initial_state"]
        del f["night"]
        text = f["scenario_toml"].asstr()[()]
        del f["scenario_toml"]
        older_text = "\n".join(
            line for line in text.splitlines() if not line.startswith("off_from")
        )
        f.create_dataset("scenario_toml", data=older_text, dtype=store.STRING)
    seal(older)  # as a writer would: the file stays sound
    loaded = load_run(older)
    assert loaded.night is None
    assert loaded.scenario.schedule.off_clock_s is None
    assert [r.initial_air_temp_C for r in loaded.scenario.rooms] == [15.0] * len(
        run.scenario.rooms
    )
    np.testing.assert_array_equal(loaded.air_temp_C, run.air_temp_C)


@pytest.mark.parametrize("scheme", SCHEMES)
def test_round_trip_keeps_summary(bungalow_runs, tmp_path, scheme):
    run = bungalow_runs[scheme]
    loaded = load_run(save_run(run, tmp_path / "run.h5"))
    assert loaded.summary.rooms == run.summary.rooms
    assert loaded.summary.emitters == run.summary.emitters
    assert loaded.summary.energy == run.summary.energy


def test_unreached_setpoint_is_stored_as_nan_and_read_back_as_none(saved, tmp_path):
    run, _ = saved
    rooms = list(run.summary.rooms)
    rooms[0] = dataclasses.replace(rooms[0], time_to_setpoint_s=None)
    summary = dataclasses.replace(run.summary, rooms=tuple(rooms))
    path = save_run(dataclasses.replace(run, summary=summary), tmp_path / "cold.h5")
    with h5py.File(path, "r") as f:
        assert np.isnan(f["summary/rooms/time_to_setpoint_s"][0])
    assert load_run(path).summary.rooms[0].time_to_setpoint_s is None


def test_round_trip_keeps_scenario_text_scheme_and_solver(saved):
    run, path = saved
    loaded = load_run(path)
    assert loaded.scenario.text == run.scenario.text
    assert loaded.scenario.name == run.scenario.name
    assert loaded.scenario.source_path == run.scenario.source_path
    assert loaded.scenario.rooms == run.scenario.rooms
    assert loaded.scheme == run.scheme
    assert loaded.solver == run.solver


def test_file_is_plain_hdf5_with_root_attributes(saved):
    run, path = saved
    with h5py.File(path, "r") as f:
        assert f.attrs["format"] == "simheat-run"
        assert f.attrs["schema_version"] == SCHEMA_VERSION
        assert f.attrs["simheat_version"] == simheat.__version__
        assert f.attrs["scheme"] == run.scheme
        assert f.attrs["created_utc"].endswith("+00:00")
        assert f["scenario_toml"].asstr()[()] == run.scenario.text


@pytest.mark.parametrize("name", SERIES)
def test_every_series_has_units_and_is_compressed(saved, name):
    _, path = saved
    with h5py.File(path, "r") as f:
        dataset = f["series"][name]
        assert dataset.attrs["units"] in {"s", "degC", "kg/s", "W", "J"}
        assert dataset.compression == "gzip"


@pytest.mark.parametrize(
    ("name", "ids"),
    [
        ("air_temp_C", "rooms"),
        ("structure_temp_C", "rooms"),
        ("emitter_flow_kg_s", "emitters"),
        ("emitter_output_W", "emitters"),
        ("emitter_inlet_temp_C", "emitters"),
    ],
)
def test_two_dimensional_series_name_their_columns(saved, name, ids):
    run, path = saved
    expected = [item.id for item in getattr(run.scenario, ids)]
    with h5py.File(path, "r") as f:
        columns = [str(c) for c in f["series"][name].attrs["columns"]]
        assert columns == expected
        assert f["series"][name].shape[1] == len(expected)


@pytest.mark.parametrize("name", NETWORK_ARRAYS)
def test_every_network_array_has_units(saved, name):
    _, path = saved
    with h5py.File(path, "r") as f:
        assert isinstance(f["network"][name].attrs["units"], str)


def test_load_alias_is_load_run():
    assert simheat.runs.load is load_run


def test_loading_a_missing_file_raises(tmp_path):
    with pytest.raises(RunFileError, match=r"nowhere\.h5: cannot read run file"):
        load_run(tmp_path / "nowhere.h5")


def test_loading_a_non_hdf5_file_raises(tmp_path):
    path = tmp_path / "notes.h5"
    path.write_text("this is not HDF5\n")
    with pytest.raises(RunFileError, match=r"notes\.h5: not an HDF5 file"):
        load_run(path)


def test_loading_a_foreign_hdf5_file_raises(tmp_path):
    path = tmp_path / "foreign.h5"
    with h5py.File(path, "w") as f:
        f.create_dataset("temperature", data=np.arange(3.0))
    with pytest.raises(RunFileError, match=r"foreign\.h5: HDF5 file but not a simheat"):
        load_run(path)


def test_loading_a_newer_schema_raises(saved, tmp_path):
    _, path = saved
    newer = tmp_path / "newer.h5"
    shutil.copyfile(path, newer)
    with h5py.File(newer, "r+") as f:
        f.attrs["schema_version"] = SCHEMA_VERSION + 1
    seal(newer)  # as a writer would: the file stays sound
    with pytest.raises(
        RunFileError, match=rf"newer\.h5: run file schema version {SCHEMA_VERSION + 1} "
    ):
        load_run(newer)


def test_loading_a_file_with_a_missing_dataset_raises(saved, tmp_path):
    _, path = saved
    damaged = tmp_path / "damaged.h5"
    shutil.copyfile(path, damaged)
    with h5py.File(damaged, "r+") as f:
        del f["series/air_temp_C"]
    seal(damaged)  # a sealed file with a part missing: the structure check finds it
    with pytest.raises(
        RunFileError, match=r"damaged\.h5: damaged run file: dataset 'series/air_temp"
    ):
        load_run(damaged)


def test_reading_does_not_change_the_file(saved):
    _, path = saved
    before_bytes = path.read_bytes()
    before_mtime = os.stat(path).st_mtime_ns
    load_run(path)
    assert os.stat(path).st_mtime_ns == before_mtime
    assert path.read_bytes() == before_bytes


def test_save_refuses_to_overwrite_and_leaves_the_file_intact(saved):
    run, path = saved
    before = path.read_bytes()
    with pytest.raises(FileExistsError, match=r"file exists: '.*run\.h5'") as caught:
        save_run(run, path)
    assert caught.value.filename == str(path)
    assert path.read_bytes() == before
    assert sorted(p.name for p in path.parent.iterdir()) == ["run.h5"]


def test_save_with_overwrite_replaces_the_file(saved, bungalow_runs):
    _, path = saved
    other = bungalow_runs["reverse_return"]
    save_run(other, path, overwrite=True)
    loaded = load_run(path)
    assert loaded.scheme == "reverse_return"
    np.testing.assert_array_equal(loaded.air_temp_C, other.air_temp_C)


def test_crash_while_writing_leaves_no_file(bungalow_runs, tmp_path, monkeypatch):
    def crash(group, summary):
        raise RuntimeError("simulated crash while writing the summary")

    monkeypatch.setattr(store, "_write_summary", crash)
    path = tmp_path / "run.h5"
    with pytest.raises(RuntimeError, match="simulated crash"):
        save_run(bungalow_runs["direct_return"], path)
    assert not path.exists()
    assert list(tmp_path.iterdir()) == []


def test_crash_while_overwriting_keeps_the_old_file(saved, monkeypatch):
    run, path = saved
    before = path.read_bytes()

    def crash(group, summary):
        raise RuntimeError("simulated crash while writing the summary")

    monkeypatch.setattr(store, "_write_summary", crash)
    with pytest.raises(RuntimeError, match="simulated crash"):
        save_run(run, path, overwrite=True)
    assert path.read_bytes() == before
    assert sorted(p.name for p in path.parent.iterdir()) == ["run.h5"]


def test_loading_a_version_one_file_is_refused_clearly(saved, tmp_path):
    _, path = saved
    older = tmp_path / "older.h5"
    shutil.copyfile(path, older)
    with h5py.File(older, "r+") as f:
        f.attrs["schema_version"] = 1
    seal(older)  # as a writer would: the file stays sound
    with pytest.raises(
        RunFileError, match=r"older\.h5: run file schema version 1 is older .* again"
    ):
        load_run(older)


@pytest.mark.parametrize(
    ("name", "unit"), [("peak_source_power_W", "W"), ("hot_water_level_C", "degC")]
)
def test_summary_scalars_are_stored_with_units(saved, name, unit):
    run, path = saved
    with h5py.File(path, "r") as f:
        assert f["summary"].attrs[name] == getattr(run.summary, name)
        assert f["summary"].attrs[f"{name}_units"] == unit


def test_missing_arrival_is_stored_as_nan_and_read_back_as_none(saved, tmp_path):
    run, _ = saved
    emitters = list(run.summary.emitters)
    emitters[0] = dataclasses.replace(emitters[0], hot_water_arrival_s=None)
    summary = dataclasses.replace(run.summary, emitters=tuple(emitters))
    path = save_run(dataclasses.replace(run, summary=summary), tmp_path / "cold.h5")
    with h5py.File(path, "r") as f:
        assert np.isnan(f["summary/emitters/hot_water_arrival_s"][0])
    assert load_run(path).summary.emitters[0].hot_water_arrival_s is None


def test_pump_stop_times_round_trip_in_the_solver_record(saved, tmp_path):
    run, _ = saved
    solver = {**run.solver, "pump_stop_times_s": {"pump": 1800.0}}
    path = save_run(dataclasses.replace(run, solver=solver), tmp_path / "stop.h5")
    assert load_run(path).pump_stop_times_s == {"pump": 1800.0}


@pytest.mark.parametrize(
    ("pump_stop_s", "expected"), [(1200.0, {"pump": 1200.0}), (None, {})]
)
def test_a_record_without_single_pump_stops_reads_as_every_pump_or_none(
    saved, tmp_path, pump_stop_s, expected
):
    # Files written before single pumps could stop have only "pump_stop_s", which
    # stopped every pump (the bungalow's one pump is the link "pump").
    _, path = saved
    older = tmp_path / "older.h5"
    shutil.copyfile(path, older)
    with h5py.File(older, "r+") as f:
        record = json.loads(f.attrs["solver"])
        record.pop("pump_stop_times_s", None)
        record["pump_stop_s"] = pump_stop_s
        f.attrs["solver"] = json.dumps(record)
    seal(older)  # as a writer would: the file stays sound
    assert load_run(older).pump_stop_times_s == expected


def test_energy_split_round_trips(saved, tmp_path):
    run, path = saved
    books = load_run(path).summary.energy
    assert books.pipe_to_unheated_J == run.summary.energy.pipe_to_unheated_J
    assert books.pipe_to_unheated_J is not None
    with h5py.File(path, "r") as f:
        columns = [c.decode() if isinstance(c, bytes) else c
                   for c in f["series/energy_J"].attrs["columns"]]  # fmt: skip
    assert columns == list(store.ENERGY_COLUMNS)


def test_a_file_without_the_energy_split_reads_as_unknown(saved, tmp_path):
    run, path = saved
    older = tmp_path / "older.h5"
    shutil.copy(path, older)
    with h5py.File(older, "r+") as f:
        del f["summary/energy"].attrs["pipe_to_unheated_J"]
        energy = f["series/energy_J"][()]
        del f["series/energy_J"]
        f["series"].create_dataset("energy_J", data=energy[:, :3])
        f["series/energy_J"].attrs["units"] = "J"
    seal(older)  # as a writer would: the file stays sound
    books = load_run(older).summary.energy
    assert books.pipe_to_unheated_J is None
    assert books.pipe_to_rooms_J is None
    assert books.pipe_losses_J == run.summary.energy.pipe_losses_J


def test_a_file_from_before_heat_pumps_reads_as_a_boiler(saved, tmp_path):
    # Files written before heat pumps: four energy columns, no capacity,
    # electric power or source flow series, no electric_J attribute.
    run, path = saved
    older = tmp_path / "older.h5"
    shutil.copyfile(path, older)
    with h5py.File(older, "r+") as f:
        energy = f["series/energy_J"][()][:, :4]
        del f["series/energy_J"]
        f["series"].create_dataset("energy_J", data=energy)
        for name in store.OPTIONAL_SERIES_UNITS:
            del f[f"series/{name}"]
        del f["summary/energy"].attrs["electric_J"]
        del f["summary"].attrs["source_below_min_flow"]
    seal(older)  # as a writer would: the file stays sound
    loaded = load_run(older)
    np.testing.assert_array_equal(loaded.energy_J[:, :4], run.energy_J[:, :4])
    np.testing.assert_array_equal(loaded.energy_J[:, 4], 0.0)
    np.testing.assert_array_equal(
        loaded.source_capacity_W, run.scenario.source.max_power_W
    )
    np.testing.assert_array_equal(loaded.electric_power_W, 0.0)
    assert loaded.source_flow_kg_s is None
    assert loaded.summary.energy.electric_J == 0.0
    assert loaded.summary.energy.mean_cop is None
    assert loaded.summary.source_below_min_flow is None


def test_a_boiler_run_uses_no_electricity_and_reads_its_limit(saved):
    run, _ = saved
    np.testing.assert_array_equal(run.energy_J[:, 4], 0.0)
    np.testing.assert_array_equal(
        run.source_capacity_W, run.scenario.source.max_power_W
    )
    assert run.summary.energy.mean_cop is None
