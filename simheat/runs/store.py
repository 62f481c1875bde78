"""One HDF5 file per run: save a :class:`~simheat.runs.run.Run` and load it back.

The file is self-contained: it embeds the scenario text and the resolved network, so a
run can be read back (and plotted or compared) without the scenario file or the
layout code that built the network. Every dataset carries its unit in a ``units``
attribute, so the file is readable with plain h5py or any HDF5 tool.


Files are written to a temporary name in the target directory and renamed into
place only when complete, so an interrupted write never leaves a file that looks
whole at the final path. Each file is sealed: HDF5's user block (the first 512
bytes, which HDF5 tools skip) holds the SHA-256 digest of the rest, checked on
load; every part read is checked for type, shape and finiteness
(:mod:`simheat.runs.checks`).
"""

from __future__ import annotations

import json
from datetime import UTC, datetime
from pathlib import Path

import h5py
import numpy as np

import simheat
from simheat.errors import RunFileError, ScenarioError
from simheat.files import atomic_path
from simheat.hydraulics.network import Network
from simheat.runs import checks
from simheat.runs.checks import USER_BLOCK_BYTES, check_seal, seal
from simheat.runs.layout import (  # noqa: F401 (re-exported)
    EMITTER_FIELDS,
    EMITTER_SERIES,
    ENERGY_COLUMNS,
    ENERGY_FIELDS,
    FILE_FORMAT,
    GZIP_LEVEL,
    NETWORK_ARRAY_UNITS,
    NETWORK_ARRAYS_ADDED,
    NETWORK_STRING_ARRAYS,
    NIGHT_SERIES_UNITS,
    OLDEST_READABLE_SCHEMA,
    OPTIONAL_ENERGY_FIELDS,
    OPTIONAL_FIELDS,
    OPTIONAL_SERIES_UNITS,
    OPTIONAL_SUMMARY_ATTRS,
    ROOM_FIELDS,
    ROOM_SERIES,
    SCHEMA_VERSION,
    SERIES_UNITS,
    STRING,
    SUMMARY_ATTRS,
)
from simheat.runs.run import (
    EmitterResult,
    EnergyBooks,
    Night,
    RoomResult,
    Run,
    Summary,
)
from simheat.scenario.load import parse_scenario


def save_run(run: Run, path: str | Path, *, overwrite: bool = False) -> Path:
    """Write a run to one HDF5 file, atomically.

    Parameters
    ----------
    run : Run
        The simulated run. [-]
    path : str or Path
        Target file path (conventionally ending in ``.h5``). [-]
    overwrite : bool
        Replace an existing file at ``path``; refuse when false. [-]

    Returns
    -------
    Path
        The path written.

    Raises
    ------
    FileExistsError
        When ``path`` exists and ``overwrite`` is false; the existing file is left
        untouched.
    OutputError
        When the directory cannot be written; no file is left behind.

    Notes
    -----
    The file is written under a hidden temporary name in the same directory
    (:func:`simheat.files.atomic_path`), sealed with the SHA-256 digest of its
    content in HDF5's user block (:func:`simheat.runs.checks.seal`), flushed to
    disk and then renamed onto ``path``; on any failure the temporary file is
    removed. The layout is described in the module docstring.
    """
    path = Path(path)
    with atomic_path(path, overwrite=overwrite) as temporary:
        with h5py.File(temporary, "x", userblock_size=USER_BLOCK_BYTES) as f:
            _write_root(f, run)
            _write_network(f.create_group("network"), run.network)
            series_units = {**SERIES_UNITS, **OPTIONAL_SERIES_UNITS}
            _write_series(f.create_group("series"), run, series_units, run)
            if run.night is not None:
                _write_night(f.create_group("night"), run)
            _write_summary(f.create_group("summary"), run.summary)
        seal(temporary)
    return path


def load_run(path: str | Path) -> Run:
    """Read a run written by :func:`save_run`.

    The file is opened read-only and never modified. The scenario is re-parsed from
    the embedded text and the network rebuilt from the stored arrays.

    Parameters
    ----------
    path : str or Path
        Path of a run file. [-]

    Returns
    -------
    Run
        The run, with its summary and solver record.

    Raises
    ------
    RunFileError
        When the file cannot be read, is not HDF5, is an HDF5 file that is not a
        simheat run, has a newer schema version than this code reads, lacks a
        dataset or attribute, or embeds a scenario that no longer validates. The
        one-line message names the path.
    """
    path = Path(path)
    if path.is_dir():
        raise RunFileError(f"{path}: is a directory; give a run file (.h5)")
    if not path.is_file():
        raise RunFileError(f"{path}: cannot read run file (no such file)")
    try:
        is_hdf5 = h5py.is_hdf5(path)
        if is_hdf5:
            check_seal(path)
    except OSError as exc:
        raise RunFileError(f"{path}: cannot read run file ({exc})") from None
    if not is_hdf5:
        raise RunFileError(f"{path}: not an HDF5 file, so not a simheat run file")
    try:
        with h5py.File(path, "r") as f:
            return _read_run(f, path)
    except (OSError, KeyError, ValueError, TypeError, IndexError) as exc:
        if isinstance(exc, RunFileError):
            raise
        message = " ".join(str(exc).split())[:200]
        raise RunFileError(f"{path}: damaged run file ({message})") from None


def _json_default(value: object) -> object:
    """JSON conversion of numpy scalars and arrays in the solver record."""
    if isinstance(value, np.generic):
        return value.item()
    if isinstance(value, np.ndarray):
        return value.tolist()
    raise TypeError(f"solver record value {value!r} is not JSON serialisable")


# how the solver record becomes JSON text: numpy values converted, keys sorted
_SOLVER_JSON = {"default": _json_default, "sort_keys": True}


def _strings(values: tuple[str, ...] | list[str]) -> np.ndarray:
    """Array of variable-length UTF-8 strings for h5py (also when empty)."""
    return np.array(list(values), dtype=STRING)


def _write_root(f: h5py.File, run: Run) -> None:
    f.attrs["format"] = FILE_FORMAT
    f.attrs["schema_version"] = SCHEMA_VERSION
    f.attrs["simheat_version"] = simheat.__version__
    f.attrs["scheme"] = run.scheme
    f.attrs["created_utc"] = datetime.now(UTC).isoformat(timespec="seconds")
    f.attrs["scenario_origin"] = run.scenario.source_path
    f.attrs["solver"] = json.dumps(run.solver, allow_nan=False, **_SOLVER_JSON)
    f.attrs["initial_state"] = "given" if run.night is None else "night"
    f.create_dataset("scenario_toml", data=run.scenario.text, dtype=STRING)


def _write_network(group: h5py.Group, network: Network) -> None:
    group.attrs["scheme"] = network.scheme
    group.attrs["reference_node"] = int(network.reference_node)
    for name in NETWORK_STRING_ARRAYS:
        group.create_dataset(name, data=_strings(getattr(network, name)))
    for name, unit in NETWORK_ARRAY_UNITS.items():
        dataset = group.create_dataset(name, data=np.asarray(getattr(network, name)))
        dataset.attrs["units"] = unit


def _write_series(group: h5py.Group, run: Run, units: dict, source) -> None:
    """One compressed dataset per series of ``source`` (a Run or its Night)."""
    room_ids = [room.id for room in run.scenario.rooms]
    emitter_ids = [emitter.id for emitter in run.scenario.emitters]
    for name, unit in units.items():
        if getattr(source, name, None) is None:  # a series a run may lack
            continue
        data = np.asarray(getattr(source, name))
        options = {"compression": "gzip", "compression_opts": GZIP_LEVEL}
        if data.size == 0:
            options = {}  # HDF5 cannot chunk (hence compress) an empty dataset
        dataset = group.create_dataset(name, data=data, **options)
        dataset.attrs["units"] = unit
        if name in ROOM_SERIES:
            dataset.attrs["columns"] = _strings(room_ids)
        elif name in EMITTER_SERIES:
            dataset.attrs["columns"] = _strings(emitter_ids)
        elif name == "energy_J":
            dataset.attrs["columns"] = _strings(ENERGY_COLUMNS[: data.shape[1]])


def _write_night(group: h5py.Group, run: Run) -> None:
    night = run.night
    minutes = int(round(night.off_clock_s / 60.0))
    group.attrs["off_clock"] = f"{minutes // 60:02d}:{minutes % 60:02d}"
    group.attrs["off_clock_s"] = float(night.off_clock_s)
    group.attrs["note"] = (
        "the night before the morning: from the steady state with the heating "
        "holding the comfort setpoints, heating and pumps off; times negative, "
        "counted from the start of the morning"
    )
    _write_series(group, run, NIGHT_SERIES_UNITS, night)


def _nan_for_none(values: list) -> np.ndarray:
    return np.array([np.nan if v is None else v for v in values], dtype=np.float64)


def _none_for_nan(value: float) -> float | None:
    return None if np.isnan(value) else float(value)


def _write_summary(group: h5py.Group, summary: Summary) -> None:
    for name, unit in SUMMARY_ATTRS.items():
        group.attrs[name] = float(getattr(summary, name))
        group.attrs[f"{name}_units"] = unit
    for name, unit in OPTIONAL_SUMMARY_ATTRS.items():
        value = getattr(summary, name)
        group.attrs[name] = np.nan if value is None else float(value)
        group.attrs[f"{name}_units"] = unit
    rooms = group.create_group("rooms")
    rooms.create_dataset("id", data=_strings([r.id for r in summary.rooms]))
    for name, unit in ROOM_FIELDS.items():
        data = _nan_for_none([getattr(r, name) for r in summary.rooms])
        rooms.create_dataset(name, data=data).attrs["units"] = unit
    for name in ("time_to_setpoint_s", "time_to_setpoint_operative_s"):
        rooms[name].attrs["note"] = (
            "counted from the start of comfort; NaN when the setpoint was not reached"
        )
    emitters = group.create_group("emitters")
    emitters.create_dataset("id", data=_strings([e.id for e in summary.emitters]))
    emitters.create_dataset("room", data=_strings([e.room for e in summary.emitters]))
    for name, unit in EMITTER_FIELDS.items():
        data = _nan_for_none([getattr(e, name) for e in summary.emitters])
        emitters.create_dataset(name, data=data).attrs["units"] = unit
    emitters["hot_water_arrival_s"].attrs["note"] = (
        "counted from the start of comfort; NaN when hot water never arrived"
    )
    energy = group.create_group("energy")
    energy.attrs["units"] = "J"
    for name in ENERGY_FIELDS + OPTIONAL_ENERGY_FIELDS:
        energy.attrs[name] = float(getattr(summary.energy, name))
    if summary.energy.pipe_to_unheated_J is not None:
        energy.attrs["pipe_to_unheated_J"] = float(summary.energy.pipe_to_unheated_J)


# Network arrays that hold integers (indices and codes) or booleans; the others
# hold numbers. The per-node arrays are listed; the rest run one entry per link.
_NETWORK_INTEGER_ARRAYS = {
    "node_line",
    "link_kind",
    "from_node",
    "to_node",
    "emitter_index",
    "surroundings_room",
    "pump_mode",
}
_NETWORK_BOOL_ARRAYS = {"check_valve", "closed"}
_NETWORK_NODE_ARRAYS = {"node_line", "node_distance_m"}
_LINK_KINDS = 4  # LINK_PIPE .. LINK_SOURCE
_PUMP_MODES = 3  # fixed speed, constant and proportional dp
_LINE_KINDS = 3  # supply, return, other
# Fewest energy counters a run file holds (source, to rooms, pipe losses). [-]
MIN_ENERGY_COLUMNS = 3


def _read_run(f: h5py.File, path: Path) -> Run:
    file_format = f.attrs.get("format")
    if isinstance(file_format, bytes):
        file_format = file_format.decode("utf-8", "replace")
    if file_format != FILE_FORMAT:
        raise RunFileError(
            f"{path}: HDF5 file but not a simheat run file "
            f"(format attribute {str(file_format)[:40]!r}, expected {FILE_FORMAT!r})"
        )
    version = checks.integer_attribute(f, "schema_version", path)
    if version > SCHEMA_VERSION:
        raise RunFileError(
            f"{path}: run file schema version {version} is newer than this simheat "
            f"reads ({SCHEMA_VERSION}); update simheat to read it"
        )
    if version < OLDEST_READABLE_SCHEMA:
        raise RunFileError(
            f"{path}: run file schema version {version} is older than this simheat "
            f"reads ({OLDEST_READABLE_SCHEMA}-{SCHEMA_VERSION}); its summary lacks "
            "the operative times, overshoot and hot water arrival: simulate the "
            "scenario again to write a new file"
        )
    text = checks.text(f, "scenario_toml", path)
    origin = checks.text_attribute(f, "scenario_origin", path)
    try:
        scenario = parse_scenario(text, origin=origin, without_night=version < 3)
    except ScenarioError as exc:
        raise RunFileError(
            f"{path}: embedded scenario does not validate: {exc}"
        ) from None
    n_rooms, n_emitters = len(scenario.rooms), len(scenario.emitters)
    series = _read_series(f, path, n_rooms, n_emitters)
    _read_source_series(f, path, series, scenario.source.max_power_W)
    night = None
    if version >= 3:
        initial_state = checks.text_attribute(f, "initial_state", path)
        if initial_state not in ("given", "night"):
            raise checks.fail(
                path,
                "attribute 'initial_state' must be 'given' or 'night', got "
                f"{initial_state[:40]!r}",
            )
        if initial_state == "night":
            group = checks.group(f, "night", path)
            night = Night(
                off_clock_s=checks.number_attribute(group, "off_clock_s", path),
                **_read_series(
                    f, path, n_rooms, n_emitters, "night", NIGHT_SERIES_UNITS
                ),
            )
    return Run(
        scenario=scenario,
        scheme=checks.text_attribute(f, "scheme", path),
        network=_read_network(f, path, n_rooms, n_emitters),
        summary=_read_summary(f, path, n_rooms, n_emitters),
        solver=checks.json_attribute(f, "solver", path),
        night=night,
        **series,
    )


def _read_source_series(
    f: h5py.File, path: Path, series: dict, max_power_W: float
) -> None:
    """Add the heat-pump-era series to ``series``; fill them for older files.

    Files written before heat pumps came from boilers: their energy (four
    columns) gains an electricity column of zeros (files older still, of three
    columns, keep them: their unheated share is unknown), their capacity is the
    power limit at every time, their electric power zero and their source flow
    unknown (None). A series the file has is checked like the others.
    """
    energy = np.asarray(series["energy_J"])
    if energy.ndim == 2 and energy.shape[1] == len(ENERGY_COLUMNS) - 1:
        series["energy_J"] = np.hstack([energy, np.zeros((energy.shape[0], 1))])
    n_times = len(series["time_s"])
    fill = {
        "source_capacity_W": np.full(n_times, float(max_power_W)),
        "electric_power_W": np.zeros(n_times),
        "source_flow_kg_s": None,
    }
    for name in OPTIONAL_SERIES_UNITS:
        where = f"series/{name}"
        present = isinstance(f.get(where), h5py.Dataset)
        series[name] = (
            checks.array(f, where, path, (n_times,)) if present else fill[name]
        )


def _read_network(f: h5py.File, path: Path, n_rooms: int, n_emitters: int) -> Network:
    group = checks.group(f, "network", path)
    strings = {
        name: checks.strings(f, f"network/{name}", path)
        for name in NETWORK_STRING_ARRAYS
    }
    n_nodes = len(strings["node_names"])
    n_links = len(strings["link_names"])
    if len(strings["emitter_ids"]) != n_emitters:
        raise checks.fail(
            path,
            f"dataset 'network/emitter_ids' has {len(strings['emitter_ids'])} "
            f"entries, the scenario {n_emitters} emitters",
        )
    integer_bounds = {
        "node_line": (0, _LINE_KINDS - 1),
        "link_kind": (0, _LINK_KINDS - 1),
        "from_node": (0, n_nodes - 1),
        "to_node": (0, n_nodes - 1),
        "emitter_index": (-1, n_emitters - 1),
        "surroundings_room": (-1, n_rooms - 1),
        "pump_mode": (0, _PUMP_MODES - 1),
    }
    arrays = {}
    for name in NETWORK_ARRAY_UNITS:
        if name in NETWORK_ARRAYS_ADDED and name not in group:
            continue  # written before the array was added: the default
        n = n_nodes if name in _NETWORK_NODE_ARRAYS else n_links
        shape = (n, 3) if name == "pump_coeffs" else (n,)
        where = f"network/{name}"
        if name in _NETWORK_INTEGER_ARRAYS:
            low, high = integer_bounds[name]
            arrays[name] = checks.array(
                f, where, path, shape, kind="int", low=low, high=high
            )
        elif name in _NETWORK_BOOL_ARRAYS:
            arrays[name] = checks.array(f, where, path, shape, kind="bool")
        else:
            arrays[name] = checks.array(f, where, path, shape)
    reference = checks.integer_attribute(group, "reference_node", path)
    if not 0 <= reference < n_nodes:
        raise checks.fail(path, f"reference node {reference} is not a node")
    return Network(
        scheme=checks.text_attribute(group, "scheme", path),
        reference_node=reference,
        **strings,
        **arrays,
    )


def _read_series(
    f: h5py.File,
    path: Path,
    n_rooms: int,
    n_emitters: int,
    where: str = "series",
    units: dict = SERIES_UNITS,
) -> dict:
    """The series of group ``where`` (the run's, or the night's), checked."""
    time_s = checks.array(f, f"{where}/time_s", path, (None,))
    checks.increasing(time_s, f"{where}/time_s", path)
    n = len(time_s)
    series = {"time_s": time_s}
    for name in units:
        if name == "time_s":
            continue
        if name in ROOM_SERIES:
            shape = (n, n_rooms)
        elif name in EMITTER_SERIES:
            shape = (n, n_emitters)
        elif name == "energy_J":
            shape = (n, None)
        else:
            shape = (n,)
        series[name] = checks.array(f, f"{where}/{name}", path, shape)
    if "energy_J" not in series:
        return series
    columns = series["energy_J"].shape[1]
    if not MIN_ENERGY_COLUMNS <= columns <= len(ENERGY_COLUMNS):
        raise checks.fail(
            path,
            f"dataset 'series/energy_J' has {columns} columns, expected "
            f"{MIN_ENERGY_COLUMNS} to {len(ENERGY_COLUMNS)}",
        )
    return series


def _fields(f: h5py.File, path: Path, kind: str, names: dict, n: int) -> dict:
    """Summary fields of rooms or emitters: ``n`` values, NaN only where optional."""
    return {
        name: checks.array(
            f, f"summary/{kind}/{name}", path, (n,), finite=name not in OPTIONAL_FIELDS
        )
        for name in names
    }


def _value(values: np.ndarray, name: str, i: int) -> float | None:
    return _none_for_nan(values[i]) if name in OPTIONAL_FIELDS else float(values[i])


def _read_summary(f: h5py.File, path: Path, n_rooms: int, n_emitters: int) -> Summary:
    room_ids = checks.strings(f, "summary/rooms/id", path, n_rooms)
    room_fields = _fields(f, path, "rooms", ROOM_FIELDS, n_rooms)
    rooms = tuple(
        RoomResult(
            id=room_id,
            **{name: _value(values, name, i) for name, values in room_fields.items()},
        )
        for i, room_id in enumerate(room_ids)
    )
    emitter_ids = checks.strings(f, "summary/emitters/id", path, n_emitters)
    emitter_rooms = checks.strings(f, "summary/emitters/room", path, n_emitters)
    emitter_fields = _fields(f, path, "emitters", EMITTER_FIELDS, n_emitters)
    emitters = tuple(
        EmitterResult(
            id=emitter_id,
            room=emitter_rooms[i],
            **{
                name: _value(values, name, i) for name, values in emitter_fields.items()
            },
        )
        for i, emitter_id in enumerate(emitter_ids)
    )
    energy_group = checks.group(f, "summary/energy", path)
    energy = EnergyBooks(
        **{
            name: checks.number_attribute(energy_group, name, path)
            for name in ENERGY_FIELDS
        },
        pipe_to_unheated_J=(
            checks.number_attribute(energy_group, "pipe_to_unheated_J", path)
            if "pipe_to_unheated_J" in energy_group.attrs
            else None
        ),
        **{
            name: checks.number_attribute(energy_group, name, path)
            if name in energy_group.attrs
            else 0.0  # written before heat pumps: no electricity
            for name in OPTIONAL_ENERGY_FIELDS
        },
    )
    summary_group = checks.group(f, "summary", path)
    optional = {
        name: _none_for_nan(
            checks.number_attribute(summary_group, name, path, allow_nan=True)
        )
        if name in summary_group.attrs
        else None
        for name in OPTIONAL_SUMMARY_ATTRS
    }
    return Summary(
        rooms=rooms,
        emitters=emitters,
        energy=energy,
        **{
            name: checks.number_attribute(summary_group, name, path)
            for name in SUMMARY_ATTRS
        },
        **optional,
    )
