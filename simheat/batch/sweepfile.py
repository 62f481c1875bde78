"""The HDF5 sweep file: its layout, the table's columns, and reading it back.

Layout (schema version 1)::

    /                               attributes:
    |                                 format           "simheat-sweep"
    |                                 schema_version   1
    |                                 simheat_version  code version that wrote it
    |                                 created_utc, updated_utc   ISO 8601
    |                                 name, mode, sampling, samples, seed
    |                                 content_hash     SHA-256 of sweep + base text
    |                                 keep_series      whether variants/ is kept
    |                                 sweep_origin, base_origin   file paths
    |                                 n_variants, n_done, n_failed, n_pending
    |                                 complete         no variant pending
    |                                 caution          the safety caution
    +-- sweep_toml                  the sweep file's text (UTF-8 string)
    +-- base_scenario_toml          the base scenario's text
    +-- table/                      one dataset per column, one entry per variant,
    |   |                           in id order; ``units`` on every number column;
    |   |                           attributes parameter_keys, parameter_operations,
    |   |                           room_ids, schemes
    |   +-- id, scheme, status ("done", "failed", "pending"), error
    |   +-- parameters/<key>        the parameter's value (factor for scale, offset
    |   |                           for offset): float64, bool, string, or JSON text
    |   |                           (attribute encoding "json") for lists and tables
    |   +-- time_to_setpoint_s      (n_variants, n_rooms), ``columns`` = room ids
    |   +-- all_rooms_at_setpoint_s, lowest_flow_pct_of_design,
    |   |   peak_source_power_W, source_energy_J, energy_closure_error_pct,
    |   |   wall_time_s             float64, NaN when missing
    |   +-- rooms_not_reached       JSON text: list of room ids
    |   +-- lowest_flow_emitter, simheat_version   strings
    +-- variants/NNNNNN/            with keep_series: each finished variant's run,
                                    in the run-file layout of simheat.runs.store

Times count from the start of comfort. A pending or failed variant has NaN
figures; NaN in ``time_to_setpoint_s`` of a done variant is a room that never
reached its setpoint.
"""

from __future__ import annotations

import json
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import h5py
import numpy as np

from simheat.batch.table import DONE, FAILED, METRICS, PENDING
from simheat.errors import RunFileError

FILE_FORMAT = "simheat-sweep"
SCHEMA_VERSION = 1
STRING = h5py.string_dtype(encoding="utf-8")
SERIES_GROUP = "variants"


def series_name(variant_id: int) -> str:
    """Name of a variant's group under ``variants/`` (and of its sidecar files).

    Parameters
    ----------
    variant_id : int
        Variant id. [-]

    Returns
    -------
    str
        Six digits, zero-padded.

    Examples
    --------
    >>> series_name(42)
    '000042'
    """
    return f"{variant_id:06d}"


@dataclass(frozen=True)
class SweepResults:
    """A sweep file read back.

    Attributes
    ----------
    path : Path
        The file. [-]
    name, mode : str
        Sweep title and mode (``grid``, ``zip``, ``random``). [-]
    keys, operations : tuple of str
        Parameter key paths and their operations (``set``, ``scale``,
        ``offset``), in order. [-]
    schemes, room_ids : tuple of str
        Schemes of the sweep; rooms of the base scenario. [-]
    rows : tuple of dict
        One summary-table row per variant, in id order (see
        :mod:`simheat.batch.table`). [-]
    sweep_text, base_text : str
        The sweep file's and the base scenario's text. [-]
    content_hash : str
        SHA-256 of the two texts. [-]
    keep_series : bool
        Whether finished variants' runs are stored under ``variants/``. [-]
    """

    path: Path
    name: str
    mode: str
    keys: tuple[str, ...]
    operations: tuple[str, ...]
    schemes: tuple[str, ...]
    room_ids: tuple[str, ...]
    rows: tuple[dict, ...]
    sweep_text: str
    base_text: str
    content_hash: str
    keep_series: bool

    def count(self, status: str) -> int:
        """Number of variants with a status.

        Parameters
        ----------
        status : str
            ``"done"``, ``"failed"`` or ``"pending"``. [-]

        Returns
        -------
        int
            How many rows have it. [-]
        """
        return sum(row["status"] == status for row in self.rows)

    @property
    def complete(self) -> bool:
        """Whether no variant is pending."""
        return self.count(PENDING) == 0


def is_sweep_file(path: str | Path) -> bool:
    """Whether a path is an HDF5 file carrying the sweep format attribute.

    Parameters
    ----------
    path : str or Path
        Any path. [-]

    Returns
    -------
    bool
        False also for a missing, unreadable or non-HDF5 file.
    """
    path = Path(path)
    try:
        if not path.is_file() or not h5py.is_hdf5(path):
            return False
        with h5py.File(path, "r") as f:
            return f.attrs.get("format") == FILE_FORMAT
    except OSError:
        return False


def encode_column(values: list[Any]) -> tuple[np.ndarray, str | None]:
    """A parameter's values as an HDF5-ready array and its text encoding.

    Parameters
    ----------
    values : list
        One value per variant. [-]

    Returns
    -------
    tuple
        The array (float64 for numbers, bool, strings) and ``"json"`` when lists
        or tables were written as JSON text, else None.
    """
    if all(isinstance(v, bool) for v in values):
        return np.array(values, dtype=bool), None
    if all(isinstance(v, int | float) and not isinstance(v, bool) for v in values):
        return np.array(values, dtype=np.float64), None
    if all(isinstance(v, str) for v in values):
        return np.array(values, dtype=STRING), None
    return np.array(
        [json.dumps(v, allow_nan=False) for v in values], dtype=STRING
    ), "json"


def decode_column(dataset: h5py.Dataset) -> list[Any]:
    """Read a parameter column back into plain Python values.

    Parameters
    ----------
    dataset : h5py.Dataset
        A ``table/parameters/<key>`` dataset. [-]

    Returns
    -------
    list
        One value per variant.
    """
    if dataset.dtype.kind == "O":
        texts = list(dataset.asstr()[()])
        if dataset.attrs.get("encoding") == "json":
            return [json.loads(t) for t in texts]
        return texts
    return [v.item() for v in dataset[()]]


def read_sweep(path: str | Path) -> SweepResults:
    """Read a sweep file written by ``simheat sweep``.

    Parameters
    ----------
    path : str or Path
        The sweep file. [-]

    Returns
    -------
    SweepResults
        Its table and texts.

    Raises
    ------
    RunFileError
        When the file is missing, not HDF5, not a sweep file, from a newer
        schema, or lacks a part of the layout; the message names the path.
    """
    path = Path(path)
    if not path.is_file():
        raise RunFileError(f"{path}: cannot read sweep file (no such file)")
    try:
        if not h5py.is_hdf5(path):
            raise RunFileError(f"{path}: not an HDF5 file, so not a simheat sweep file")
        with h5py.File(path, "r") as f:
            return _read(f, path)
    except OSError as exc:
        raise RunFileError(f"{path}: damaged sweep file ({exc})") from None
    except KeyError as exc:
        raise RunFileError(f"{path}: damaged sweep file (missing {exc})") from None


def _strings(obj: Any) -> tuple[str, ...]:
    return tuple(str(v.decode() if isinstance(v, bytes) else v) for v in obj)


def _read(f: h5py.File, path: Path) -> SweepResults:
    if f.attrs.get("format") != FILE_FORMAT:
        raise RunFileError(
            f"{path}: HDF5 file but not a simheat sweep file (format attribute "
            f"{f.attrs.get('format')!r}, expected {FILE_FORMAT!r})"
        )
    version = int(f.attrs["schema_version"])
    if version > SCHEMA_VERSION:
        raise RunFileError(
            f"{path}: sweep file schema version {version} is newer than this simheat "
            f"reads ({SCHEMA_VERSION}); update simheat to read it"
        )
    table = f["table"]
    keys = _strings(table.attrs["parameter_keys"])
    room_ids = _strings(table.attrs["room_ids"])
    columns = {key: decode_column(table["parameters"][key]) for key in keys}
    times = table["time_to_setpoint_s"][()]
    numbers = {name: table[name][()] for name, *_ in METRICS}
    texts = {
        name: list(table[name].asstr()[()])
        for name in (
            "scheme",
            "status",
            "error",
            "lowest_flow_emitter",
            "simheat_version",
            "rooms_not_reached",
        )
    }
    rows = []
    for i, variant_id in enumerate(table["id"][()]):
        status = texts["status"][i]
        ran = status in (DONE, FAILED)
        row = {
            "id": int(variant_id),
            "scheme": texts["scheme"][i],
            "values": [columns[key][i] for key in keys],
            "status": status,
            "error": texts["error"][i],
            "time_to_setpoint_s": (
                {room: _none_for_nan(times[i, j]) for j, room in enumerate(room_ids)}
                if status == DONE
                else {}
            ),
            "rooms_not_reached": json.loads(texts["rooms_not_reached"][i]),
            "lowest_flow_emitter": texts["lowest_flow_emitter"][i] or None,
            "simheat_version": (texts["simheat_version"][i] or None) if ran else None,
        }
        for name, *_ in METRICS:
            row[name] = _none_for_nan(numbers[name][i])
        rows.append(row)
    return SweepResults(
        path=path,
        name=str(f.attrs["name"]),
        mode=str(f.attrs["mode"]),
        keys=keys,
        operations=_strings(table.attrs["parameter_operations"]),
        schemes=_strings(table.attrs["schemes"]),
        room_ids=room_ids,
        rows=tuple(rows),
        sweep_text=f["sweep_toml"].asstr()[()],
        base_text=f["base_scenario_toml"].asstr()[()],
        content_hash=str(f.attrs["content_hash"]),
        keep_series=bool(f.attrs["keep_series"]),
    )


def _none_for_nan(value: float) -> float | None:
    value = float(value)
    return None if np.isnan(value) else value


def write_table(group: h5py.Group, rows: list[dict], meta: dict) -> None:
    """Write the summary table into ``group`` (see the module docstring).

    Parameters
    ----------
    group : h5py.Group
        The (empty) ``table`` group. [-]
    rows : list of dict
        One row per variant, in id order, every variant present. [-]
    meta : dict
        ``keys``, ``operations``, ``room_ids``, ``schemes`` (sequences of str). [-]
    """
    group.attrs["parameter_keys"] = np.array(meta["keys"], dtype=STRING)
    group.attrs["parameter_operations"] = np.array(meta["operations"], dtype=STRING)
    group.attrs["room_ids"] = np.array(meta["room_ids"], dtype=STRING)
    group.attrs["schemes"] = np.array(meta["schemes"], dtype=STRING)
    group.create_dataset("id", data=np.array([r["id"] for r in rows], dtype=np.int64))
    for name in ("scheme", "status", "error"):
        group.create_dataset(name, data=np.array([r[name] for r in rows], dtype=STRING))
    group["status"].attrs["values"] = f"{DONE}, {FAILED}, {PENDING}"
    parameters = group.create_group("parameters")
    for j, (key, operation) in enumerate(
        zip(meta["keys"], meta["operations"], strict=True)
    ):
        data, encoding = encode_column([r["values"][j] for r in rows])
        dataset = parameters.create_dataset(key, data=data)
        dataset.attrs["operation"] = operation
        if encoding is not None:
            dataset.attrs["encoding"] = encoding
    room_ids = list(meta["room_ids"])
    times = np.full((len(rows), len(room_ids)), np.nan)
    for i, row in enumerate(rows):
        for j, room in enumerate(room_ids):
            value = row["time_to_setpoint_s"].get(room)
            times[i, j] = np.nan if value is None else value
    dataset = group.create_dataset("time_to_setpoint_s", data=times)
    dataset.attrs["units"] = "s"
    dataset.attrs["columns"] = np.array(room_ids, dtype=STRING)
    dataset.attrs["note"] = "from the start of comfort; NaN: not reached or not run"
    for name, unit, *_ in METRICS:
        values = [np.nan if r[name] is None else r[name] for r in rows]
        dataset = group.create_dataset(name, data=np.array(values, dtype=np.float64))
        dataset.attrs["units"] = unit
    group["all_rooms_at_setpoint_s"].attrs["note"] = (
        "the last room's time from the start of comfort; NaN when a room never "
        "reached its setpoint or the variant did not run"
    )
    group.create_dataset(
        "rooms_not_reached",
        data=np.array(
            [json.dumps(r["rooms_not_reached"], allow_nan=False) for r in rows],
            dtype=STRING,
        ),
    ).attrs["encoding"] = "json"
    for name in ("lowest_flow_emitter", "simheat_version"):
        group.create_dataset(
            name, data=np.array([r[name] or "" for r in rows], dtype=STRING)
        )
