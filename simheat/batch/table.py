"""The sweep's summary table: one row per variant, in SI.

A row is a plain JSON-ready dict, the same in a worker, in the sidecar files and
read back from the sweep file::

    id, scheme, values (one per parameter), status ("done", "failed",
    "pending"), error, time_to_setpoint_s {room: s or None},
    all_rooms_at_setpoint_s, rooms_not_reached [ids], lowest_flow_pct_of_design,
    lowest_flow_emitter, peak_source_power_W, source_energy_J,
    energy_closure_error_pct, wall_time_s, simheat_version

Times count from the start of comfort; ``None`` is a room that never reached its
setpoint or a metric of a variant that did not run. The sweep only computes and
stores rows; :mod:`simheat.report.sweep` formats them (text table, JSON, CSV in
practical units).
"""

from __future__ import annotations

import json
import math
from collections.abc import Sequence
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from simheat.runs.run import Run

DONE, FAILED, PENDING = "done", "failed", "pending"
STATUSES = (DONE, FAILED, PENDING)
# The number metrics of a row: (row key, unit). The sweep file stores one float
# column per metric with its unit (simheat.batch.sweepfile).
METRICS = (
    ("all_rooms_at_setpoint_s", "s"),
    ("lowest_flow_pct_of_design", "%"),
    ("peak_source_power_W", "W"),
    ("source_energy_J", "J"),
    ("energy_closure_error_pct", "%"),
    ("wall_time_s", "s"),
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
        (100.0 * e.mean_flow_kg_s / e.design_flow_kg_s, e.id)
        for e in summary.emitters
        if e.design_flow_kg_s > 0.0  # a radiator shut for good has none
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
        The value after a round trip through strict JSON text.
    """
    return json.loads(json.dumps(value, allow_nan=False))
