"""Damaged run files into ``simheat plot``: one line, exit 2, nothing written.

The nine damages a fuzzing pass found giving a traceback (five) or accepted
silently (four), and two to the night's parts (schema 3). Each is made here from
a sound run file. Damages made with an
HDF5 writer are sealed again afterwards, as a writer would (a buggy writer, or
another tool that seals): the load's structure checks must find them. Damages to
the bytes (a flipped bit, appended garbage) break the seal.
"""

from __future__ import annotations

import json

import h5py
import numpy as np
import pytest
from click.testing import CliRunner

from simheat.cli import main
from simheat.runs.checks import USER_BLOCK_BYTES, seal
from simheat.runs.store import load_run, save_run


@pytest.fixture
def run_file(bungalow_runs, tmp_path):
    return save_run(bungalow_runs["direct_return"], tmp_path / "house.h5")


def _edit(path, change) -> None:
    with h5py.File(path, "r+") as f:
        change(f)
    seal(path)


def _replace(f: h5py.File, name: str, data) -> None:
    attrs = dict(f[name].attrs)
    del f[name]
    f.create_dataset(name, data=data)
    f[name].attrs.update(attrs)


def _solver_not_json(f):
    f.attrs["solver"] = "{not json"


def _schema_version_text(f):
    f.attrs["schema_version"] = "two"


def _short_room_ids(f):
    ids = f["summary/rooms/id"].asstr()[()][:-1]
    _replace(f, "summary/rooms/id", np.array(ids, dtype=h5py.string_dtype()))


def _series_wrong_shape(f):
    _replace(f, "series/air_temp_C", f["series/air_temp_C"][()].T)


def _series_all_nan(f):
    _replace(f, "series/air_temp_C", np.full(f["series/air_temp_C"].shape, np.nan))


def _link_kind_float(f):
    _replace(f, "network/link_kind", f["network/link_kind"][()].astype(float) + 0.5)


def _night_all_nan(f):
    _replace(f, "night/air_temp_C", np.full(f["night/air_temp_C"].shape, np.nan))


def _initial_state_unknown(f):
    f.attrs["initial_state"] = "dawn"


STRUCTURE_DAMAGES = [
    (_solver_not_json, "attribute 'solver' is not JSON text"),
    (_schema_version_text, "attribute 'schema_version' must be an integer, got"),
    (_short_room_ids, "dataset 'summary/rooms/id' has 7 entries, expected 8"),
    (_series_wrong_shape, "dataset 'series/air_temp_C' has shape (8, 181)"),
    (_series_all_nan, "dataset 'series/air_temp_C' must be finite, got nan"),
    (_link_kind_float, "dataset 'network/link_kind' must hold integers, got float64"),
    # the night (schema 3) is read with the same checks as the morning
    (_night_all_nan, "dataset 'night/air_temp_C' must be finite, got nan"),
    (_initial_state_unknown, "attribute 'initial_state' must be 'given' or 'night'"),
]


def _flip_header(path):
    data = bytearray(path.read_bytes())
    data[USER_BLOCK_BYTES + 9] ^= 0xFF  # inside the HDF5 superblock
    path.write_bytes(bytes(data))


def _trailing_garbage(path):
    with open(path, "ab") as handle:
        handle.write(b"\x00garbage" * 16)


def _flip_near_end(path):
    data = bytearray(path.read_bytes())
    data[-20] ^= 0x01
    path.write_bytes(bytes(data))


BYTE_DAMAGES = [_flip_header, _trailing_garbage, _flip_near_end]


def _plot(path):
    return CliRunner().invoke(main, ["plot", str(path), "--kind", "warmup"])


def _one_line_exit_2(result, path, message: str) -> None:
    assert result.exit_code == 2, result.output
    assert result.stderr.count("\n") == 1
    assert f"{path}: damaged run file: {message}" in result.stderr
    assert "Traceback" not in result.output


@pytest.mark.parametrize(("damage", "message"), STRUCTURE_DAMAGES)
def test_structure_damage_is_one_line_exit_2(run_file, damage, message):
    _edit(run_file, damage)
    before = run_file.read_bytes()
    _one_line_exit_2(_plot(run_file), run_file, message)
    assert run_file.read_bytes() == before
    assert sorted(p.name for p in run_file.parent.iterdir()) == ["house.h5"]


@pytest.mark.parametrize("damage", BYTE_DAMAGES)
def test_byte_damage_breaks_the_seal(run_file, damage):
    damage(run_file)
    _one_line_exit_2(
        _plot(run_file), run_file, "its content changed since it was written"
    )
    assert sorted(p.name for p in run_file.parent.iterdir()) == ["house.h5"]


@pytest.mark.parametrize(("damage", "_message"), STRUCTURE_DAMAGES)
def test_an_edit_without_sealing_again_breaks_the_seal(run_file, damage, _message):
    with h5py.File(run_file, "r+") as f:
        damage(f)
    _one_line_exit_2(
        _plot(run_file), run_file, "its content changed since it was written"
    )


def test_a_sound_file_is_sealed_and_loads(run_file):
    head = run_file.read_bytes()[:USER_BLOCK_BYTES]
    assert head.startswith(b"simheat-run-file sha256 ")
    assert load_run(run_file).scheme == "direct_return"


def test_a_file_without_a_seal_is_still_read(run_file, tmp_path):
    # Files written before the seal: plain HDF5 without a user block.
    older = tmp_path / "older.h5"
    with h5py.File(run_file, "r") as src, h5py.File(older, "w") as dst:
        for key, value in src.attrs.items():
            dst.attrs[key] = value
        for name in src:
            src.copy(src[name], dst, name=name)
    assert older.read_bytes()[:8] == b"\x89HDF\r\n\x1a\n"
    loaded = load_run(older)
    assert json.loads(json.dumps(loaded.solver)) == loaded.solver
