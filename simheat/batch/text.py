"""Text and JSON reports of a sweep (formatting only; the CLI prints them)."""

from __future__ import annotations

import json
from typing import Any

from simheat.batch.sweepfile import SweepResults
from simheat.batch.table import DONE, FAILED, PENDING, row_json

# Failure messages listed under the table before the rest are only counted. [-]
MAX_LISTED_FAILURES = 20


def sweep_dict(results: SweepResults, extra: dict[str, Any], caution: str) -> dict:
    """A sweep as JSON-ready data.

    Parameters
    ----------
    results : SweepResults
        The sweep file read back. [-]
    extra : dict
        Further top-level entries (``file``, ``interrupted``, ``ran`` ...). [-]
    caution : str
        The safety caution. [-]

    Returns
    -------
    dict
        ``sweep``, ``mode``, ``parameters`` (``key``, ``operation``),
        ``schemes``, ``n_variants``, ``done``, ``failed``, ``pending``, the
        ``extra`` entries, ``variants`` (see
        :func:`simheat.batch.table.row_json`) and ``caution``.
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
        **extra,
        "variants": [
            row_json(row, results.keys, results.room_ids) for row in results.rows
        ],
        "caution": caution,
    }
    json.dumps(data, allow_nan=False)  # strict JSON or fail here, loudly
    return data


def _value_text(value: Any) -> str:
    if isinstance(value, float):
        return f"{value:.4g}"
    if isinstance(value, str | int | bool):
        return str(value).lower() if isinstance(value, bool) else str(value)
    return json.dumps(value)


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
        peak source power), then the failures' messages.
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
