"""The sweep's summary table: one row per variant, in SI, and its exports.

A row is a plain JSON-ready dict, the same in a worker, in the sidecar files and
read back from the sweep file::

    id, scheme, values (one per parameter), status ("done", "failed",
    "pending"), error, time_to_setpoint_s {room: s or None},
    all_rooms_at_setpoint_s, rooms_not_reached [ids], lowest_flow_pct_of_design,
    lowest_flow_emitter, peak_source_power_W, source_energy_J,
    energy_closure_error_pct, wall_time_s, simheat_version

Times count from the start of comfort; ``None`` is a room that never reached its
setpoint or a metric of a variant that did not run. The JSON and CSV exports use
the practical units and rounding of ``simheat run --json``.
"""

from __future__ import annotations

import csv
import io
import json
import math
from collections.abc import Sequence
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from simheat.runs.run import Run

DONE, FAILED, PENDING = "done", "failed", "pending"
STATUSES = (DONE, FAILED, PENDING)
J_PER_KWH = 3.6e6  # [J/kWh]
S_PER_MIN = 60.0  # [s/min]
W_PER_KW = 1e3  # [W/kW]

# Metrics of a row in SI: (row key, unit, JSON key, SI -> practical factor, digits).
# Digits follow simheat run --json, so a variant's figures equal a plain run's.
METRICS = (
    ("all_rooms_at_setpoint_s", "s", "all_rooms_at_setpoint_min", 1 / S_PER_MIN, 1),
    ("lowest_flow_pct_of_design", "%", "lowest_flow_pct_of_design", 1.0, 1),
    ("peak_source_power_W", "W", "peak_source_power_kW", 1 / W_PER_KW, 3),
    ("source_energy_J", "J", "source_energy_kWh", 1 / J_PER_KWH, 4),
    ("energy_closure_error_pct", "%", "balance_error_pct", 1.0, None),
    ("wall_time_s", "s", "wall_time_s", 1.0, 3),
)


def run_metrics(run: Run) -> dict[str, Any]:
    """The summary-table figures of one simulated run, in SI.

    Parameters
    ----------
    run : Run
        A simulated run. [-]

    Returns
    -------
    dict
        ``time_to_setpoint_s`` (room id -> s from the start of comfort, None when
        never reached), ``all_rooms_at_setpoint_s`` (the last room's time, None
        when any room never got there), ``rooms_not_reached`` (ids),
        ``lowest_flow_pct_of_design`` (the emitter with the lowest mean flow
        during comfort against its design flow, %) and ``lowest_flow_emitter``,
        ``peak_source_power_W``, ``source_energy_J`` and
        ``energy_closure_error_pct``.
    """
    summary = run.summary
    times = {room.id: room.time_to_setpoint_s for room in summary.rooms}
    reached = [t for t in times.values() if t is not None]
    all_rooms = max(reached) if len(reached) == len(times) and reached else None
    shares = [
        (100.0 * e.mean_flow_kg_s / e.design_flow_kg_s, e.id) for e in summary.emitters
    ]
    lowest_pct, lowest_id = min(shares) if shares else (None, None)
    return {
        "time_to_setpoint_s": {room: _finite(t) for room, t in times.items()},
        "all_rooms_at_setpoint_s": _finite(all_rooms),
        "rooms_not_reached": list(summary.rooms_not_reached),
        "lowest_flow_pct_of_design": _finite(lowest_pct),
        "lowest_flow_emitter": lowest_id,
        "peak_source_power_W": _finite(summary.peak_source_power_W),
        "source_energy_J": _finite(summary.energy.source_J),
        "energy_closure_error_pct": _finite(summary.energy.balance_error_pct),
    }


def _finite(value: float | None) -> float | None:
    """A plain float, or None for a missing or non-finite value (strict JSON)."""
    if value is None:
        return None
    value = float(value)
    return value if math.isfinite(value) else None


def empty_row(variant_id: int, scheme: str, values: Sequence, status: str) -> dict:
    """A row without figures: a pending or failed variant.

    Parameters
    ----------
    variant_id : int
        Variant id. [-]
    scheme : str
        Its scheme. [-]
    values : sequence
        Its parameter values. [-]
    status : str
        ``"pending"`` or ``"failed"``. [-]

    Returns
    -------
    dict
        The row, every figure None.
    """
    return {
        "id": int(variant_id),
        "scheme": scheme,
        "values": json_ready(list(values)),
        "status": status,
        "error": "",
        "time_to_setpoint_s": {},
        "all_rooms_at_setpoint_s": None,
        "rooms_not_reached": [],
        "lowest_flow_pct_of_design": None,
        "lowest_flow_emitter": None,
        "peak_source_power_W": None,
        "source_energy_J": None,
        "energy_closure_error_pct": None,
        "wall_time_s": None,
        "simheat_version": None,
    }


def json_ready(value: Any) -> Any:
    """A parameter value as plain JSON data (tuples become lists).

    Parameters
    ----------
    value : object
        Number, string, boolean, list or table from a sweep file. [-]

    Returns
    -------
    object
        The same value as ``json.loads(json.dumps(value))`` gives.
    """
    return json.loads(json.dumps(value, allow_nan=False))


def _rounded(value: float | None, factor: float, digits: int | None) -> float | None:
    if value is None or not math.isfinite(value):
        return None
    scaled = value * factor
    return scaled if digits is None else round(scaled, digits)


def row_json(row: dict, keys: Sequence[str], room_ids: Sequence[str]) -> dict:
    """A row in the practical units of ``simheat run --json``.

    Parameters
    ----------
    row : dict
        A summary-table row (SI). [-]
    keys : sequence of str
        The sweep's parameter key paths, in order. [-]
    room_ids : sequence of str
        Rooms of the base scenario, in order. [-]

    Returns
    -------
    dict
        ``id``, ``status``, ``error`` (null when none), ``parameters`` (key ->
        value), ``scheme``, ``rooms`` (``id``, ``time_to_setpoint_min``),
        ``all_rooms_at_setpoint_min``, ``rooms_not_reached``,
        ``lowest_flow_pct_of_design``, ``lowest_flow_emitter``,
        ``peak_source_power_kW``, ``source_energy_kWh``, ``balance_error_pct``
        and ``wall_time_s``.
    """
    times = row["time_to_setpoint_s"]
    data = {
        "id": row["id"],
        "status": row["status"],
        "error": row["error"] or None,
        "parameters": dict(zip(keys, row["values"], strict=True)),
        "scheme": row["scheme"],
        "rooms": [
            {
                "id": room,
                "time_to_setpoint_min": _rounded(times.get(room), 1 / S_PER_MIN, 1),
            }
            for room in room_ids
        ],
        "rooms_not_reached": list(row["rooms_not_reached"]),
        "lowest_flow_emitter": row["lowest_flow_emitter"],
    }
    for name, _unit, json_key, factor, digits in METRICS:
        data[json_key] = _rounded(row[name], factor, digits)
    return data


def csv_text(
    rows: Sequence[dict], keys: Sequence[str], room_ids: Sequence[str], caution: str
) -> str:
    """The summary table as CSV for a spreadsheet, practical units.

    Parameters
    ----------
    rows : sequence of dict
        Summary-table rows in id order. [-]
    keys : sequence of str
        Parameter key paths (one column each). [-]
    room_ids : sequence of str
        Rooms (one ``time_to_setpoint_min:<room>`` column each). [-]
    caution : str
        The safety caution, written as a first comment line (``# ...``). [-]

    Returns
    -------
    str
        CSV text; an empty cell is a missing value. Lists and tables among the
        parameter values are written as JSON text.
    """
    buffer = io.StringIO()
    buffer.write(f"# {caution}\n")
    writer = csv.writer(buffer, lineterminator="\n")
    metric_keys = [m[2] for m in METRICS]
    writer.writerow(
        [
            "id",
            "scheme",
            "status",
            "error",
            *keys,
            *metric_keys[:1],
            "rooms_not_reached",
            "lowest_flow_emitter",
            *metric_keys[1:],
            *(f"time_to_setpoint_min:{room}" for room in room_ids),
        ]
    )
    for row in rows:
        data = row_json(row, keys, room_ids)
        cells = [data["id"], data["scheme"], data["status"], data["error"]]
        cells += [_csv_value(data["parameters"][key]) for key in keys]
        cells.append(data[metric_keys[0]])
        cells.append(len(data["rooms_not_reached"]) if row["status"] == DONE else None)
        cells.append(data["lowest_flow_emitter"])
        cells += [data[k] for k in metric_keys[1:]]
        cells += [room["time_to_setpoint_min"] for room in data["rooms"]]
        writer.writerow(["" if cell is None else cell for cell in cells])
    return buffer.getvalue()


def _csv_value(value: Any) -> Any:
    if isinstance(value, list | dict):
        return json.dumps(value)
    return value
