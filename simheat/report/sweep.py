"""Text, JSON and CSV of a sweep (``simheat sweep``).

The sweep (:mod:`simheat.batch`) computes its summary table in SI, one row per
variant (:mod:`simheat.batch.table`); this module turns a sweep file read back
(:class:`~simheat.batch.sweepfile.SweepResults`) into the printed table, the
JSON report and the CSV export, in the practical units and rounding of
``simheat run --json`` so that a variant's figures equal a plain run's.
"""

from __future__ import annotations

import csv
import io
import json
import math
from collections.abc import Mapping, Sequence
from typing import Any

from simheat.batch.sweepfile import SweepResults
from simheat.batch.table import DONE, FAILED, PENDING
from simheat.report.caution import CAUTION
from simheat.report.numbers import J_PER_KWH, S_PER_MIN, W_PER_KW

__all__ = [
    "JSON_METRICS",
    "row_json",
    "sweep_csv_text",
    "sweep_dict",
    "sweep_table_text",
    "sweep_text",
]

# Failure messages listed under the table before the rest are only counted. [-]
MAX_LISTED_FAILURES = 20

# The row's SI metrics as reported: (row key, JSON key, SI -> practical factor,
# decimals kept or None for all). Decimals follow simheat run --json.
JSON_METRICS = (
    ("all_rooms_at_setpoint_s", "all_rooms_at_setpoint_min", 1 / S_PER_MIN, 1),
    ("lowest_flow_pct_of_design", "lowest_flow_pct_of_design", 1.0, 1),
    ("peak_source_power_W", "peak_source_power_kW", 1 / W_PER_KW, 3),
    ("source_energy_J", "source_energy_kWh", 1 / J_PER_KWH, 4),
    ("energy_closure_error_pct", "balance_error_pct", 1.0, None),
    ("wall_time_s", "wall_time_s", 1.0, 3),
)


def _rounded(value: float | None, factor: float, digits: int | None) -> float | None:
    if value is None or not math.isfinite(value):
        return None
    scaled = value * factor
    return scaled if digits is None else round(scaled, digits)


def row_json(row: dict, keys: Sequence[str], room_ids: Sequence[str]) -> dict:
    """A summary-table row in the practical units of ``simheat run --json``.

    Parameters
    ----------
    row : dict
        A summary-table row (SI, see :mod:`simheat.batch.table`). [-]
    keys : sequence of str
        The sweep's parameter key paths, in order. [-]
    room_ids : sequence of str
        Rooms of the base scenario, in order. [-]

    Returns
    -------
    dict
        ``id``, ``status``, ``error`` (null when none), ``parameters`` (key ->
        value), ``scheme``, ``rooms`` (``id``, ``time_to_setpoint_min``),
        ``rooms_not_reached``, ``lowest_flow_emitter``, then
        ``all_rooms_at_setpoint_min``, ``lowest_flow_pct_of_design``,
        ``peak_source_power_kW``, ``source_energy_kWh``, ``balance_error_pct``
        and ``wall_time_s`` (:data:`JSON_METRICS`); a missing figure is None.
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
    for name, json_key, factor, digits in JSON_METRICS:
        data[json_key] = _rounded(row[name], factor, digits)
    return data


def sweep_dict(results: SweepResults, extra: Mapping[str, Any] | None = None) -> dict:
    """A sweep as JSON-ready data, ending with the caution.

    Parameters
    ----------
    results : SweepResults
        The sweep file read back. [-]
    extra : mapping, optional
        Further top-level entries, placed before ``variants`` (the CLI's
        ``file``, ``csv``, ``executor``, ``interrupted``, ``kept_from_before``,
        ``ran``). [-]

    Returns
    -------
    dict
        ``sweep``, ``mode``, ``parameters`` (``key``, ``operation``),
        ``schemes``, ``n_variants``, ``done``, ``failed``, ``pending``, the
        ``extra`` entries, ``variants`` (:func:`row_json` of each row) and
        ``caution``.

    Raises
    ------
    ValueError
        When a value is NaN or infinite (strict JSON is checked here).
    """
    data = {
        "sweep": results.name,
        "mode": results.mode,
        "parameters": [
            {"key": k, "operation": o}
            for k, o in zip(results.keys, results.operations, strict=True)
        ],
        "schemes": list(results.schemes),
        "n_variants": len(results.rows),
        "done": results.count(DONE),
        "failed": results.count(FAILED),
        "pending": results.count(PENDING),
        **(extra or {}),
        "variants": [
            row_json(row, results.keys, results.room_ids) for row in results.rows
        ],
        "caution": CAUTION,
    }
    json.dumps(data, allow_nan=False)  # strict JSON or fail here, loudly
    return data


def _value_text(value: Any) -> str:
    if isinstance(value, float):
        return f"{value:.4g}"
    if isinstance(value, str | int | bool):
        return str(value).lower() if isinstance(value, bool) else str(value)
    return json.dumps(value, allow_nan=False)


def sweep_table_text(results: SweepResults) -> str:
    """The summary table as aligned text, one line per variant.

    Parameters
    ----------
    results : SweepResults
        The sweep file read back. [-]

    Returns
    -------
    str
        Header, one line per variant (id, scheme, parameter values, status, time
        until all rooms are at setpoint, rooms never there, lowest emitter flow,
        peak source power), a line explaining the columns, then the failures'
        messages (the first :data:`MAX_LISTED_FAILURES`, the rest counted).
    """
    keys = results.keys
    headers = ["id", "scheme", *keys, "status", "all rooms", "not at sp", "low flow"]
    headers.append("peak")
    lines_data = []
    for row in results.rows:
        data = row_json(row, keys, results.room_ids)
        all_rooms = data["all_rooms_at_setpoint_min"]
        done = row["status"] == DONE
        cells = [
            str(row["id"]),
            row["scheme"],
            *(_value_text(v) for v in row["values"]),
            row["status"],
            "--"
            if not done
            else ("never" if all_rooms is None else f"{all_rooms:.0f} min"),
            str(len(row["rooms_not_reached"])) if done else "--",
            f"{data['lowest_flow_pct_of_design']:.0f} %" if done else "--",
            f"{data['peak_source_power_kW']:.2f} kW" if done else "--",
        ]
        lines_data.append(cells)
    widths = [
        max(len(h), *(len(cells[k]) for cells in lines_data))
        for k, h in enumerate(headers)
    ]
    text_columns = {1, *range(2, 2 + len(keys)), 2 + len(keys)}

    def line(cells: list[str]) -> str:
        return "  ".join(
            c.ljust(w) if k in text_columns else c.rjust(w)
            for k, (c, w) in enumerate(zip(cells, widths, strict=True))
        ).rstrip()

    out = [line(headers), *(line(cells) for cells in lines_data)]
    out.append(
        "all rooms: time from the start of comfort until the last room is at "
        "setpoint ('never': a room never got there); not at sp: rooms never at "
        "setpoint; low flow: lowest emitter mean flow as % of design; peak: peak "
        "source power"
    )
    failures = [row for row in results.rows if row["status"] == FAILED]
    for row in failures[:MAX_LISTED_FAILURES]:
        out.append(f"variant {row['id']} failed: {row['error']}")
    if len(failures) > MAX_LISTED_FAILURES:
        out.append(
            f"... and {len(failures) - MAX_LISTED_FAILURES} more failed variants "
            "(messages in the sweep file's table/error)"
        )
    return "\n".join(out)


def sweep_text(results: SweepResults) -> str:
    """A sweep as text: a title line, then :func:`sweep_table_text`; no caution.

    Parameters
    ----------
    results : SweepResults
        The sweep file read back. [-]

    Returns
    -------
    str
        ``"<name> -- <n> variants, <mode>"`` and the table.
    """
    title = f"{results.name} -- {len(results.rows)} variants, {results.mode}"
    return f"{title}\n{sweep_table_text(results)}"


def sweep_csv_text(results: SweepResults) -> str:
    """The summary table as CSV for a spreadsheet, practical units.

    Parameters
    ----------
    results : SweepResults
        The sweep file read back: one CSV row per variant, in id order; one
        column per parameter key and one ``time_to_setpoint_min:<room>``
        column per room. [-]

    Returns
    -------
    str
        CSV text after a first comment line with the caution (``# ...``); an
        empty cell is a missing value. Lists and tables among the parameter
        values are written as JSON text.
    """
    keys, room_ids = results.keys, results.room_ids
    buffer = io.StringIO()
    buffer.write(f"# {CAUTION}\n")
    writer = csv.writer(buffer, lineterminator="\n")
    metric_keys = [m[1] for m in JSON_METRICS]
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
    for row in results.rows:
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
        return json.dumps(value, allow_nan=False)
    return value
