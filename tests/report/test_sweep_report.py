"""The sweep's text, JSON and CSV from rows in SI (no simulation: rows by hand)."""

from __future__ import annotations

import csv
import io
from pathlib import Path

import pytest

from simheat.batch.sweepfile import SweepResults
from simheat.batch.table import DONE, FAILED, PENDING, empty_row
from simheat.report import CAUTION
from simheat.report.sweep import (
    MAX_LISTED_FAILURES,
    sweep_csv_text,
    sweep_dict,
    sweep_table_text,
    sweep_text,
)

KEYS = ("source.flow_temp_C", "route.header_pipe")
ROOMS = ("front", "back")


def _done_row(variant_id: int) -> dict:
    row = empty_row(variant_id, "direct_return", [60.0, "cu_22x1"], DONE)
    row.update(
        time_to_setpoint_s={"front": 1234.0, "back": None},
        rooms_not_reached=["back"],
        lowest_flow_pct_of_design=87.26,
        lowest_flow_emitter="back_rad",
        peak_source_power_W=12345.678,
        source_energy_J=5.4321e7,
        energy_closure_error_pct=1.5e-6,
        wall_time_s=1.23456,
        simheat_version="0",
    )
    return row


def _failed_row(variant_id: int) -> dict:
    row = empty_row(variant_id, "reverse_return", [40.0, "cu_15x1"], FAILED)
    row["error"] = f"variant {variant_id}: no flow"
    return row


def _results(rows) -> SweepResults:
    return SweepResults(
        path=Path("s.h5"),
        name="Sample",
        mode="grid",
        keys=KEYS,
        operations=("set", "set"),
        schemes=("direct_return", "reverse_return"),
        room_ids=ROOMS,
        rows=tuple(rows),
        sweep_text="",
        base_text="",
        content_hash="",
        keep_series=False,
    )


def test_json_converts_si_to_practical_units_and_ends_with_the_caution():
    results = _results([_done_row(0), _failed_row(1)])
    data = sweep_dict(results, {"file": "s.h5"})
    assert list(data)[-3:] == ["file", "variants", "caution"]
    assert data["caution"] == CAUTION
    assert (data["done"], data["failed"], data["pending"]) == (1, 1, 0)
    done, failed = data["variants"]
    # By hand: 1234 s = 20.57 min -> 20.6; 12345.678 W -> 12.346 kW;
    # 5.4321e7 J / 3.6e6 J/kWh = 15.08917 kWh -> 15.0892.
    assert done["rooms"] == [
        {"id": "front", "time_to_setpoint_min": 20.6},
        {"id": "back", "time_to_setpoint_min": None},
    ]
    assert done["all_rooms_at_setpoint_min"] is None
    assert done["peak_source_power_kW"] == 12.346
    assert done["source_energy_kWh"] == 15.0892
    assert done["lowest_flow_pct_of_design"] == 87.3
    assert done["parameters"] == {KEYS[0]: 60.0, KEYS[1]: "cu_22x1"}
    assert done["error"] is None
    assert failed["error"] == "variant 1: no flow"
    assert failed["peak_source_power_kW"] is None


def test_json_refuses_a_value_strict_json_cannot_hold():
    row = _done_row(0)
    row["values"] = [float("nan"), "cu_22x1"]
    with pytest.raises(ValueError, match="not JSON compliant"):
        sweep_dict(_results([row]))


def test_text_lists_the_first_failures_and_counts_the_rest():
    n_failed = MAX_LISTED_FAILURES + 3
    rows = [_done_row(0), *(_failed_row(i) for i in range(1, n_failed + 1))]
    rows.append(empty_row(n_failed + 1, "direct_return", [70.0, "cu_28x1"], PENDING))
    text = sweep_table_text(_results(rows))
    lines = text.splitlines()
    assert lines[0].split() == [
        "id",
        "scheme",
        *KEYS,
        "status",
        "all",
        "rooms",
        "not",
        "at",
        "sp",
        "low",
        "flow",
        "peak",
    ]
    assert lines[1].split() == [
        "0",
        "direct_return",
        "60",
        "cu_22x1",
        "done",
        "never",
        "1",
        "87",
        "%",
        "12.35",
        "kW",
    ]
    assert lines[-1] == (
        "... and 3 more failed variants (messages in the sweep file's table/error)"
    )
    listed = [line for line in lines if line.startswith("variant ")]
    assert len(listed) == MAX_LISTED_FAILURES
    assert sweep_text(_results(rows)).splitlines()[0] == (
        f"Sample -- {len(rows)} variants, grid"
    )
    assert CAUTION not in text


def test_csv_has_the_caution_first_and_empty_cells_for_missing_values():
    text = sweep_csv_text(_results([_done_row(0), _failed_row(1)]))
    first, *table = text.splitlines()
    assert first == f"# {CAUTION}"
    records = list(csv.DictReader(io.StringIO("\n".join(table))))
    assert [r["status"] for r in records] == [DONE, FAILED]
    assert records[0]["time_to_setpoint_min:front"] == "20.6"
    assert records[0]["time_to_setpoint_min:back"] == ""
    assert records[0]["rooms_not_reached"] == "1"  # a count in the CSV
    assert records[1]["rooms_not_reached"] == ""
    assert records[1]["error"] == "variant 1: no flow"
