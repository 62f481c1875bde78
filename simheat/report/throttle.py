"""Throttle: one valve turned down, or each in turn, as JSON-ready data and text."""

from __future__ import annotations

from simheat.analysis.throttle import (
    EmitterChange,
    InteractionMatrix,
    ThrottleResult,
    TransientThrottle,
)
from simheat.report.caution import CAUTION
from simheat.report.numbers import (
    KG_S_TO_KG_H,
    NOT_REACHED,
    S_PER_MIN,
    finite_or_none,
    minutes,
    minutes_cell,
)

__all__ = [
    "matrix_dict",
    "matrix_text",
    "throttle_dict",
    "throttle_text",
    "transient_dict",
    "transient_text",
]

ALL_EMITTERS = "all"  # the ``emitter`` of a report with every emitter throttled
_PCT_DIGITS = 4  # decimals kept in JSON percentages (small interactions stay visible)


def _pct(value: float) -> float | None:
    """A relative change for JSON; None when it has no finite value (from zero)."""
    return finite_or_none(float(value), _PCT_DIGITS)


def _change_dict(change: EmitterChange) -> dict:
    return {
        "id": change.id,
        "flow_change_pct": _pct(change.flow_change_pct),
        "output_change_pct": _pct(change.output_change_pct),
        "flow_before_kg_per_h": round(change.flow_before_kg_s * KG_S_TO_KG_H, 3),
        "flow_after_kg_per_h": round(change.flow_after_kg_s * KG_S_TO_KG_H, 3),
        "output_before_W": round(change.output_before_W, 1),
        "output_after_W": round(change.output_after_W, 1),
    }


def throttle_dict(
    result: ThrottleResult, transient: TransientThrottle | None = None
) -> dict:
    """One throttle as JSON-ready data.

    Parameters
    ----------
    result : ThrottleResult
        Result of :func:`~simheat.analysis.throttle.throttle_steady`. [-]
    transient : TransientThrottle, optional
        The same throttle simulated in time
        (:func:`~simheat.analysis.throttle.throttle_transient`); added as
        ``transient`` (see :func:`transient_dict`). [-]

    Returns
    -------
    dict
        ``scheme``, ``emitter``, ``opening``, ``water_temperature_C``,
        ``throttled`` (the emitter's own change), ``changes``: list of ``{id,
        flow_change_pct, output_change_pct, flow_before_kg_per_h,
        flow_after_kg_per_h, output_before_W, output_after_W}`` for every other
        emitter, ``transient`` when given, and ``caution``; a relative change
        from zero is ``null``.
    """
    data = {
        "scheme": result.scheme,
        "emitter": result.emitter_id,
        "opening": result.opening,
        "water_temperature_C": result.water_temp_C,
        "throttled": _change_dict(result.throttled),
        "changes": [_change_dict(c) for c in result.changes],
    }
    if transient is not None:
        data["transient"] = transient_dict(transient)
    data["caution"] = CAUTION
    return data


def matrix_dict(matrix: InteractionMatrix) -> dict:
    """An interaction matrix as JSON-ready data.

    Parameters
    ----------
    matrix : InteractionMatrix
        Result of :func:`~simheat.analysis.throttle.throttle_matrix`. [-]

    Returns
    -------
    dict
        ``scheme``, ``emitter`` (``"all"``), ``opening``, ``water_temperature_C``;
        ``changes``: list of ``{throttled, id, flow_change_pct, output_change_pct,
        ...}`` for every pair of throttled and other emitter; ``matrix``:
        ``{emitter_ids, flow_change_pct}`` (rows: throttled emitter, diagonal its
        own change); ``interaction_index``: ``{mean_pct, max_pct}``; ``caution``.
    """
    changes = []
    for result in matrix.results:
        for change in result.changes:
            changes.append({"throttled": result.emitter_id, **_change_dict(change)})
    return {
        "scheme": matrix.scheme,
        "emitter": ALL_EMITTERS,
        "opening": matrix.opening,
        "water_temperature_C": matrix.water_temp_C,
        "changes": changes,
        "matrix": {
            "emitter_ids": list(matrix.emitter_ids),
            "flow_change_pct": [
                [_pct(v) for v in row] for row in matrix.flow_change_pct
            ],
        },
        "interaction_index": {
            "mean_pct": _pct(matrix.interaction_mean_pct),
            "max_pct": _pct(matrix.interaction_max_pct),
        },
        "caution": CAUTION,
    }


def throttle_text(result: ThrottleResult) -> str:
    """One throttle as a plain-text table.

    Parameters
    ----------
    result : ThrottleResult
        Result of :func:`~simheat.analysis.throttle.throttle_steady`. [-]

    Returns
    -------
    str
        The throttled emitter's own change, then one row per other emitter: flow
        and steady output before and after, and their changes (no caution).
    """
    width = max(12, *(len(c.id) + 2 for c in result.changes), len(result.emitter_id))
    own = result.throttled
    lines = [
        f"steady throttle -- scheme: {result.scheme}, water at "
        f"{result.water_temp_C:g} °C, rooms at setpoint",
        f"{result.emitter_id} valve to {result.opening:g} open: flow "
        f"{own.flow_before_kg_s * KG_S_TO_KG_H:.1f} -> "
        f"{own.flow_after_kg_s * KG_S_TO_KG_H:.1f} kg/h "
        f"({own.flow_change_pct:+.1f} %), output {own.output_before_W:.0f} -> "
        f"{own.output_after_W:.0f} W ({own.output_change_pct:+.1f} %)",
        "",
        f"{'emitter':<{width}}{'flow before':>12}{'after':>10}{'change':>10}"
        f"{'output':>10}{'after':>9}{'change':>10}",
    ]
    for c in result.changes:
        lines.append(
            f"{c.id:<{width}}{c.flow_before_kg_s * KG_S_TO_KG_H:>7.1f} kg/h"
            f"{c.flow_after_kg_s * KG_S_TO_KG_H:>10.1f}{c.flow_change_pct:>+8.2f} %"
            f"{c.output_before_W:>8.0f} W{c.output_after_W:>7.0f} W"
            f"{c.output_change_pct:>+8.2f} %"
        )
    return "\n".join(lines)


def matrix_text(matrix: InteractionMatrix) -> str:
    """An interaction matrix as a plain-text table with its index.

    Parameters
    ----------
    matrix : InteractionMatrix
        Result of :func:`~simheat.analysis.throttle.throttle_matrix`. [-]

    Returns
    -------
    str
        Rows: emitter throttled; numbered columns: relative flow change of each
        emitter in %, the diagonal (own change) in brackets; then the
        interaction index (no caution).
    """
    ids = matrix.emitter_ids
    label = max(14, *(len(i) + 5 for i in ids))
    lines = [
        f"throttle interaction -- scheme: {matrix.scheme}, each valve in turn to "
        f"{matrix.opening:g} open, water at {matrix.water_temp_C:g} °C",
        "flow change of each emitter (columns) in % when the emitter of the row is "
        "throttled; [own change]",
        "",
        f"{'throttled':<{label}}" + "".join(f"{j + 1:>9}" for j in range(len(ids))),
    ]
    for i, name in enumerate(ids):
        cells = []
        for j, value in enumerate(matrix.flow_change_pct[i]):
            cells.append(f"{f'[{value:.0f}]':>9}" if i == j else f"{value:>+9.2f}")
        lines.append(f"{f'{i + 1:>2} {name}':<{label}}" + "".join(cells))
    lines += [
        "",
        f"interaction index: mean {matrix.interaction_mean_pct:.2f} %, "
        f"max {matrix.interaction_max_pct:.2f} % (absolute off-diagonal flow changes)",
    ]
    return "\n".join(lines)


def transient_dict(result: TransientThrottle) -> dict:
    """A transient throttle as JSON-ready data (no caution; goes with the steady).

    Parameters
    ----------
    result : TransientThrottle
        Result of :func:`~simheat.analysis.throttle.throttle_transient`. [-]

    Returns
    -------
    dict
        ``at_min`` and ``rooms``: list of ``{id, final_air_temperature_C,
        final_air_temperature_change_K, time_to_setpoint_min_before,
        time_to_setpoint_min_after, time_to_setpoint_change_min}`` (None where a
        room is not reached).
    """
    return {
        "at_min": round(result.at_s / S_PER_MIN, 3),
        "rooms": [
            {
                "id": r.id,
                "final_air_temperature_C": round(r.final_air_after_C, 3),
                "final_air_temperature_change_K": round(r.final_air_change_K, 3),
                "time_to_setpoint_min_before": minutes(r.time_to_setpoint_before_s),
                "time_to_setpoint_min_after": minutes(r.time_to_setpoint_after_s),
                "time_to_setpoint_change_min": minutes(r.time_to_setpoint_change_s),
            }
            for r in result.rooms
        ],
    }


def transient_text(result: TransientThrottle) -> str:
    """A transient throttle as a plain-text table, one row per room.

    Parameters
    ----------
    result : TransientThrottle
        Result of :func:`~simheat.analysis.throttle.throttle_transient`. [-]

    Returns
    -------
    str
        Final air temperature with and without the throttle and its change, and
        the time to setpoint with and without ("--" when not reached) and its
        change (no caution).
    """
    width = max(12, *(len(r.id) + 2 for r in result.rooms))
    lines = [
        f"transient throttle -- {result.emitter_id} valve to {result.opening:g} "
        f"open at {result.at_s / S_PER_MIN:g} min after the start of the run",
        "",
        f"{'room':<{width}}{'final air':>11}{'with':>9}{'change':>10}"
        f"{'to setpoint':>13}{'with':>9}{'change':>10}",
    ]
    for r in result.rooms:
        change = r.time_to_setpoint_change_s
        change_cell = (
            NOT_REACHED if change is None else f"{change / S_PER_MIN:+.0f} min"
        )
        lines.append(
            f"{r.id:<{width}}{r.final_air_before_C:>8.2f} °C"
            f"{r.final_air_after_C:>6.2f} °C"
            f"{r.final_air_change_K:>+8.2f} K"
            f"{minutes_cell(r.time_to_setpoint_before_s):>13}"
            f"{minutes_cell(r.time_to_setpoint_after_s):>9}"
            f"{change_cell:>10}"
        )
    return "\n".join(lines)
