"""One HDF5 file per run: save a :class:`~simheat.runs.run.Run` and load it back.

The file is self-contained: it embeds the scenario text and the resolved network, so a
run can be read back (and plotted or compared) without the scenario file or the
layout code that built the network. Every dataset carries its unit in a ``units``
attribute, so the file is readable with plain h5py or any HDF5 tool.

File layout (schema version 3)::

    /                               attributes:
    |                                 format          "simheat-run"
    |                                 schema_version  3
    |                                 simheat_version code version that wrote the file
    |                                 scheme          piping scheme of the run
    |                                 created_utc     ISO 8601 time of writing
    |                                 scenario_origin where the scenario text came from
    |                                 solver          JSON text of the solver settings
    |                                                 and counters
    |                                 initial_state   "night" (the run starts when
    |                                                 the heating went off the
    |                                                 evening before) or "given"
    +-- scenario_toml               the scenario's original TOML text (UTF-8 string)
    +-- network/                    attributes: scheme, reference_node
    |   +-- node_names              strings, one per node
    |   +-- link_names              strings, one per link
    |   +-- emitter_ids             strings, one per emitter
    |   +-- node_line, node_distance_m, link_kind, from_node, to_node, length_m,
    |       inner_diameter_m, roughness_m, zeta, kv_m3_h, pump_coeffs,
    |       emitter_index, water_volume_m3, loss_W_per_m_K, surroundings_room,
    |       check_valve, pump_mode, pump_setpoint_Pa, closed
    |                               one dataset per array of the Network, each with
    |                               a ``units`` attribute ("-" for indices and codes)
    +-- series/                     gzip-compressed; ``units`` on every dataset,
    |   |                           ``columns`` (room, emitter or counter ids) on 2-D
    |   +-- time_s                  (n_times,)             "s"
    |   +-- outdoor_temp_C          (n_times,)             "degC"
    |   +-- air_temp_C              (n_times, n_rooms)     "degC"
    |   +-- structure_temp_C        (n_times, n_rooms)     "degC"
    |   +-- emitter_flow_kg_s       (n_times, n_emitters)  "kg/s"
    |   +-- emitter_output_W        (n_times, n_emitters)  "W"
    |   +-- emitter_inlet_temp_C    (n_times, n_emitters)  "degC"
    |   +-- supply_temp_C           (n_times,)             "degC"
    |   +-- return_temp_C           (n_times,)             "degC"
    |   +-- source_power_W          (n_times,)             "W"
    |   +-- energy_J                (n_times, 5)           "J"   columns: source,
    |   |                                                         emitted_to_rooms,
    |   |                                                         pipe_losses,
    |   |                                                         pipe_to_unheated,
    |   |                                                         electricity
    |   +-- stored_heat_J           (n_times,)             "J"
    |   +-- source_capacity_W       (n_times,)             "W"
    |   +-- electric_power_W        (n_times,)             "W"
    |   +-- source_flow_kg_s        (n_times,)             "kg/s"
    +-- night/                      only with initial_state "night": the night
    |   |                           before the morning, heating and pumps off;
    |   |                           attributes off_clock ("HH:MM"), off_clock_s
    |   |                           (s after midnight), note; gzip-compressed,
    |   |                           ``units`` and ``columns`` as in series/
    |   +-- time_s                  (n_night,) "s", negative: from the night's
    |   |                           start up to 0, the morning's start
    |   +-- outdoor_temp_C          (n_night,)             "degC"
    |   +-- air_temp_C              (n_night, n_rooms)     "degC"
    |   +-- structure_temp_C        (n_night, n_rooms)     "degC"
    |   +-- emitter_output_W        (n_night, n_emitters)  "W"
    |   +-- stored_heat_J           (n_night,)             "J"
    +-- summary/                    attributes peak_source_power_W, hot_water_level_C,
                                    source_at_limit (share of comfort at the power
                                    limit or a heat pump's capacity),
                                    source_below_min_flow (a heat pump's share of
                                    comfort below its minimum flow; NaN when not
                                    applicable); both absent from older files
        +-- rooms/                  one entry per room, in scenario order:
        |                           id, setpoint_C, time_to_setpoint_s,
        |                           final_air_temp_C, time_to_setpoint_operative_s,
        |                           final_operative_temp_C, overshoot_K (times are
        |                           NaN when the setpoint was not reached)
        +-- emitters/               one entry per emitter: id, room, mean_flow_kg_s,
        |                           design_flow_kg_s, mean_output_W,
        |                           hot_water_arrival_s (NaN when it never arrived)
        +-- energy                  empty group; attributes source_J, room_gains_J,
                                    pipe_losses_J, stored_change_J,
                                    pipe_to_unheated_J (absent in older files),
                                    electric_J

Schema history: version 3 added the night (``initial_state`` and the
``night/`` group; the series, summary and energy books still count from the
start of the morning). Version 2 files, whose runs started from a given state,
read as runs without a night. Version 2 added the operative times, overshoot,
final operative temperature, hot water arrival, peak source power and hot water
level, and the network's check_valve, pump_mode and pump_setpoint_Pa arrays. Version 1
files are refused with a message asking to simulate again (their summaries lack
figures that need the dense output of the integration to compute).
Within version 2 the solver record gained ``pump_stop_times_s`` (stop time of
each pump that stopped, by pump link name); a record without it stopped every
pump at its ``pump_stop_s``, or none (see :attr:`Run.pump_stop_times_s`). The
network gained ``closed`` (links shut for good); a file without it has none.
Heat pumps added, without a new version, the electricity column of
``energy_J`` (the fifth), the series ``source_capacity_W``, ``electric_power_W``
and ``source_flow_kg_s``, the energy attribute ``electric_J`` and the summary
attribute ``source_below_min_flow``. Files written before (version 2, or 3
before heat pumps) come from boilers only and read as such: four energy columns
gain an electricity column of zeros (three columns, from before the unheated
split, stay three), ``electric_J`` reads 0, the capacity reads the scenario's
power limit at every time, the electric power zeros and the source flow None.

Files are written to a temporary name in the target directory and renamed into
place only when complete, so an interrupted write never leaves a file that looks
whole at the final path.
"""

from __future__ import annotations

import json
import os
import secrets
from datetime import UTC, datetime
from pathlib import Path

import h5py
import numpy as np

import simheat
from simheat.errors import RunFileError, ScenarioError
from simheat.hydraulics.network import Network
from simheat.runs.run import (
    EmitterResult,
    EnergyBooks,
    Night,
    RoomResult,
    Run,
    Summary,
)
from simheat.scenario.load import parse_scenario

SCHEMA_VERSION = 3
OLDEST_READABLE_SCHEMA = 2
FILE_FORMAT = "simheat-run"

# Network arrays and their units ("-" for indices, codes and dimensionless values).
NETWORK_ARRAY_UNITS = {
    "node_line": "-",
    "node_distance_m": "m",
    "link_kind": "-",
    "from_node": "-",
    "to_node": "-",
    "length_m": "m",
    "inner_diameter_m": "m",
    "roughness_m": "m",
    "zeta": "-",
    "kv_m3_h": "m3/h",
    "pump_coeffs": "Pa, Pa s/m3, Pa s2/m6",
    "emitter_index": "-",
    "water_volume_m3": "m3",
    "loss_W_per_m_K": "W/(m K)",
    "surroundings_room": "-",
    "check_valve": "-",
    "pump_mode": "-",
    "pump_setpoint_Pa": "Pa",
    "closed": "-",
}
NETWORK_STRING_ARRAYS = ("node_names", "link_names", "emitter_ids")
# Network arrays added within schema 2: a file without one reads as the default.
NETWORK_ARRAYS_ADDED = ("closed",)

# Time series of a Run: unit and what the columns of a 2-D series are.
SERIES_UNITS = {
    "time_s": "s",
    "outdoor_temp_C": "degC",
    "air_temp_C": "degC",
    "structure_temp_C": "degC",
    "emitter_flow_kg_s": "kg/s",
    "emitter_output_W": "W",
    "emitter_inlet_temp_C": "degC",
    "supply_temp_C": "degC",
    "return_temp_C": "degC",
    "source_power_W": "W",
    "energy_J": "J",
    "stored_heat_J": "J",
}
# Series added later (heat pumps); older files lack them (see _read_run).
OPTIONAL_SERIES_UNITS = {
    "source_capacity_W": "W",
    "electric_power_W": "W",
    "source_flow_kg_s": "kg/s",
}
# The night's series (a Night's fields) and their units.
NIGHT_SERIES_UNITS = {
    name: SERIES_UNITS[name]
    for name in (
        "time_s",
        "outdoor_temp_C",
        "air_temp_C",
        "structure_temp_C",
        "emitter_output_W",
        "stored_heat_J",
    )
}
_ROOM_SERIES = ("air_temp_C", "structure_temp_C")
_EMITTER_SERIES = ("emitter_flow_kg_s", "emitter_output_W", "emitter_inlet_temp_C")
# Columns of the cumulative energy counters (see simheat.dynamics.model).
ENERGY_COLUMNS = (
    "source",
    "emitted_to_rooms",
    "pipe_losses",
    "pipe_to_unheated",
    "electricity",
)

_ROOM_FIELDS = {
    "setpoint_C": "degC",
    "time_to_setpoint_s": "s",
    "final_air_temp_C": "degC",
    "time_to_setpoint_operative_s": "s",
    "final_operative_temp_C": "degC",
    "overshoot_K": "K",
}
_EMITTER_FIELDS = {
    "mean_flow_kg_s": "kg/s",
    "design_flow_kg_s": "kg/s",
    "mean_output_W": "W",
    "hot_water_arrival_s": "s",
}
# Summary fields that may be None (stored as NaN).
_OPTIONAL_FIELDS = {
    "time_to_setpoint_s",
    "time_to_setpoint_operative_s",
    "hot_water_arrival_s",
}
_SUMMARY_ATTRS = {"peak_source_power_W": "W", "hot_water_level_C": "degC"}
# Summary attributes added later: files written before lack them (read as None).
_OPTIONAL_SUMMARY_ATTRS = {"source_at_limit": "-", "source_below_min_flow": "-"}
_ENERGY_FIELDS = ("source_J", "room_gains_J", "pipe_losses_J", "stored_change_J")
# Energy attributes added later: files written before lack them (read as 0).
_OPTIONAL_ENERGY_FIELDS = ("electric_J",)

_STRING = h5py.string_dtype(encoding="utf-8")
_GZIP_LEVEL = 4  # moderate gzip level: most of the size gain at a fraction of the cost


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
    OSError
        When the directory cannot be written; no file is left behind.

    Notes
    -----
    The file is written under a hidden temporary name in the same directory, flushed
    to disk and then renamed onto ``path``; on any failure the temporary file is
    removed. The layout is described in the module docstring.
    """
    path = Path(path)
    if path.exists() and not overwrite:
        raise FileExistsError(f"{path}: file exists; pass overwrite=True to replace it")
    temporary = path.with_name(f".{path.name}.{secrets.token_hex(6)}.tmp")
    try:
        with h5py.File(temporary, "x") as f:
            _write_root(f, run)
            _write_network(f.create_group("network"), run.network)
            series_units = {**SERIES_UNITS, **OPTIONAL_SERIES_UNITS}
            _write_series(f.create_group("series"), run, series_units, run)
            if run.night is not None:
                _write_night(f.create_group("night"), run)
            _write_summary(f.create_group("summary"), run.summary)
        with open(temporary, "rb+") as handle:
            os.fsync(handle.fileno())
        _move_into_place(temporary, path, overwrite)
    finally:
        temporary.unlink(missing_ok=True)
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
    if not path.is_file():
        raise RunFileError(f"{path}: cannot read run file (no such file)")
    try:
        is_hdf5 = h5py.is_hdf5(path)
    except OSError as exc:
        raise RunFileError(f"{path}: cannot read run file ({exc})") from None
    if not is_hdf5:
        raise RunFileError(f"{path}: not an HDF5 file, so not a simheat run file")
    try:
        with h5py.File(path, "r") as f:
            return _read_run(f, path)
    except OSError as exc:
        raise RunFileError(f"{path}: damaged run file ({exc})") from None


def _move_into_place(temporary: Path, path: Path, overwrite: bool) -> None:
    """Rename the finished file onto ``path`` without clobbering unless asked."""
    if overwrite:
        os.replace(temporary, path)
        return
    try:
        # A hard link fails if ``path`` appeared since the check: no silent clobbering.
        os.link(temporary, path)
    except FileExistsError:
        raise FileExistsError(
            f"{path}: file exists; pass overwrite=True to replace it"
        ) from None
    except OSError:
        # Filesystems without hard links: fall back to a plain rename.
        if path.exists():
            raise FileExistsError(
                f"{path}: file exists; pass overwrite=True to replace it"
            ) from None
        os.replace(temporary, path)


def _json_default(value: object) -> object:
    """JSON conversion of numpy scalars and arrays in the solver record."""
    if isinstance(value, np.generic):
        return value.item()
    if isinstance(value, np.ndarray):
        return value.tolist()
    raise TypeError(f"solver record value {value!r} is not JSON serialisable")


def _strings(values: tuple[str, ...] | list[str]) -> np.ndarray:
    """Array of variable-length UTF-8 strings for h5py (also when empty)."""
    return np.array(list(values), dtype=_STRING)


def _write_root(f: h5py.File, run: Run) -> None:
    f.attrs["format"] = FILE_FORMAT
    f.attrs["schema_version"] = SCHEMA_VERSION
    f.attrs["simheat_version"] = simheat.__version__
    f.attrs["scheme"] = run.scheme
    f.attrs["created_utc"] = datetime.now(UTC).isoformat(timespec="seconds")
    f.attrs["scenario_origin"] = run.scenario.source_path
    f.attrs["solver"] = json.dumps(run.solver, default=_json_default, sort_keys=True)
    f.attrs["initial_state"] = "given" if run.night is None else "night"
    f.create_dataset("scenario_toml", data=run.scenario.text, dtype=_STRING)


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
        options = {"compression": "gzip", "compression_opts": _GZIP_LEVEL}
        if data.size == 0:
            options = {}  # HDF5 cannot chunk (hence compress) an empty dataset
        dataset = group.create_dataset(name, data=data, **options)
        dataset.attrs["units"] = unit
        if name in _ROOM_SERIES:
            dataset.attrs["columns"] = _strings(room_ids)
        elif name in _EMITTER_SERIES:
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
    for name, unit in _SUMMARY_ATTRS.items():
        group.attrs[name] = float(getattr(summary, name))
        group.attrs[f"{name}_units"] = unit
    for name, unit in _OPTIONAL_SUMMARY_ATTRS.items():
        value = getattr(summary, name)
        group.attrs[name] = np.nan if value is None else float(value)
        group.attrs[f"{name}_units"] = unit
    rooms = group.create_group("rooms")
    rooms.create_dataset("id", data=_strings([r.id for r in summary.rooms]))
    for name, unit in _ROOM_FIELDS.items():
        data = _nan_for_none([getattr(r, name) for r in summary.rooms])
        rooms.create_dataset(name, data=data).attrs["units"] = unit
    for name in ("time_to_setpoint_s", "time_to_setpoint_operative_s"):
        rooms[name].attrs["note"] = (
            "counted from the start of comfort; NaN when the setpoint was not reached"
        )
    emitters = group.create_group("emitters")
    emitters.create_dataset("id", data=_strings([e.id for e in summary.emitters]))
    emitters.create_dataset("room", data=_strings([e.room for e in summary.emitters]))
    for name, unit in _EMITTER_FIELDS.items():
        data = _nan_for_none([getattr(e, name) for e in summary.emitters])
        emitters.create_dataset(name, data=data).attrs["units"] = unit
    emitters["hot_water_arrival_s"].attrs["note"] = (
        "counted from the start of comfort; NaN when hot water never arrived"
    )
    energy = group.create_group("energy")
    energy.attrs["units"] = "J"
    for name in _ENERGY_FIELDS + _OPTIONAL_ENERGY_FIELDS:
        energy.attrs[name] = float(getattr(summary.energy, name))
    if summary.energy.pipe_to_unheated_J is not None:
        energy.attrs["pipe_to_unheated_J"] = float(summary.energy.pipe_to_unheated_J)


def _read_run(f: h5py.File, path: Path) -> Run:
    file_format = f.attrs.get("format")
    if file_format != FILE_FORMAT:
        raise RunFileError(
            f"{path}: HDF5 file but not a simheat run file "
            f"(format attribute {file_format!r}, expected {FILE_FORMAT!r})"
        )
    version = int(_attr(f, "schema_version", path))
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
    text = _dataset(f, "scenario_toml", path).asstr()[()]
    origin = str(_attr(f, "scenario_origin", path))
    try:
        scenario = parse_scenario(text, origin=origin, without_night=version < 3)
    except ScenarioError as exc:
        raise RunFileError(
            f"{path}: embedded scenario does not validate: {exc}"
        ) from None
    network = _read_network(f, path)
    series = {name: _dataset(f, f"series/{name}", path)[()] for name in SERIES_UNITS}
    _read_source_series(f, series, scenario.source.max_power_W)
    night = None
    if version >= 3 and _attr(f, "initial_state", path) == "night":
        group = _group(f, "night", path)
        night = Night(
            off_clock_s=float(_attr(group, "off_clock_s", path)),
            **{
                name: _dataset(f, f"night/{name}", path)[()]
                for name in NIGHT_SERIES_UNITS
            },
        )
    return Run(
        scenario=scenario,
        scheme=str(_attr(f, "scheme", path)),
        network=network,
        summary=_read_summary(f, path),
        solver=json.loads(_attr(f, "solver", path)),
        night=night,
        **series,
    )


def _read_source_series(f: h5py.File, series: dict, max_power_W: float) -> None:
    """Add the heat-pump-era series to ``series``; fill them for older files.

    Files written before heat pumps came from boilers: their energy (four
    columns) gains an electricity column of zeros (files older still, of three
    columns, keep them: their unheated share is unknown), their capacity is the
    power limit at every time, their electric power zero and their source flow
    unknown (None).
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
        item = f.get(f"series/{name}")
        series[name] = item[()] if isinstance(item, h5py.Dataset) else fill[name]


def _read_network(f: h5py.File, path: Path) -> Network:
    group = _group(f, "network", path)
    strings = {
        name: tuple(_dataset(f, f"network/{name}", path).asstr()[()])
        for name in NETWORK_STRING_ARRAYS
    }
    arrays = {
        name: _dataset(f, f"network/{name}", path)[()]
        for name in NETWORK_ARRAY_UNITS
        if name not in NETWORK_ARRAYS_ADDED or name in group
    }
    return Network(
        scheme=str(_attr(group, "scheme", path)),
        reference_node=int(_attr(group, "reference_node", path)),
        **strings,
        **arrays,
    )


def _read_summary(f: h5py.File, path: Path) -> Summary:
    room_ids = _dataset(f, "summary/rooms/id", path).asstr()[()]
    room_fields = {
        name: _dataset(f, f"summary/rooms/{name}", path)[()] for name in _ROOM_FIELDS
    }
    rooms = tuple(
        RoomResult(
            id=str(room_id),
            **{
                name: _none_for_nan(values[i])
                if name in _OPTIONAL_FIELDS
                else float(values[i])
                for name, values in room_fields.items()
            },
        )
        for i, room_id in enumerate(room_ids)
    )
    emitter_ids = _dataset(f, "summary/emitters/id", path).asstr()[()]
    emitter_rooms = _dataset(f, "summary/emitters/room", path).asstr()[()]
    emitter_fields = {
        name: _dataset(f, f"summary/emitters/{name}", path)[()]
        for name in _EMITTER_FIELDS
    }
    emitters = tuple(
        EmitterResult(
            id=str(emitter_id),
            room=str(emitter_rooms[i]),
            **{
                name: _none_for_nan(values[i])
                if name in _OPTIONAL_FIELDS
                else float(values[i])
                for name, values in emitter_fields.items()
            },
        )
        for i, emitter_id in enumerate(emitter_ids)
    )
    energy_group = _group(f, "summary/energy", path)
    energy = EnergyBooks(
        **{name: float(_attr(energy_group, name, path)) for name in _ENERGY_FIELDS},
        pipe_to_unheated_J=(
            float(energy_group.attrs["pipe_to_unheated_J"])
            if "pipe_to_unheated_J" in energy_group.attrs
            else None
        ),
        **{
            name: float(energy_group.attrs.get(name, 0.0))
            for name in _OPTIONAL_ENERGY_FIELDS
        },
    )
    summary_group = _group(f, "summary", path)
    return Summary(
        rooms=rooms,
        emitters=emitters,
        energy=energy,
        **{name: float(_attr(summary_group, name, path)) for name in _SUMMARY_ATTRS},
        **{
            name: _none_for_nan(float(summary_group.attrs.get(name, np.nan)))
            for name in _OPTIONAL_SUMMARY_ATTRS
        },
    )


def _attr(obj: h5py.Group, name: str, path: Path) -> object:
    """Return an attribute; raise RunFileError naming the file if it is missing."""
    if name not in obj.attrs:
        where = obj.name if obj.name != "/" else "the root"
        raise RunFileError(
            f"{path}: damaged run file: attribute {name!r} missing on {where}"
        )
    return obj.attrs[name]


def _group(f: h5py.File, name: str, path: Path) -> h5py.Group:
    """Return a group; raise RunFileError naming the file if it is missing."""
    item = f.get(name)
    if not isinstance(item, h5py.Group):
        raise RunFileError(f"{path}: damaged run file: group {name!r} missing")
    return item


def _dataset(f: h5py.File, name: str, path: Path) -> h5py.Dataset:
    """Return a dataset; raise RunFileError naming the file if it is missing."""
    item = f.get(name)
    if not isinstance(item, h5py.Dataset):
        raise RunFileError(f"{path}: damaged run file: dataset {name!r} missing")
    return item
