"""The latest heating start per scheme: JSON-ready data and a text table."""

from __future__ import annotations

from collections.abc import Sequence

from simheat.analysis.start_time import StartTime
from simheat.report.caution import CAUTION
from simheat.report.numbers import S_PER_MIN, clock

__all__ = ["start_time_entry", "start_times_dict", "start_times_text"]


def _clock(result: StartTime, time_s: float | None) -> str | None:
    return None if time_s is None else clock(result.start_clock_s, time_s)


def start_time_entry(result: StartTime) -> dict:
    """One scheme's start time as JSON-ready data (no caution: part of a whole).

    Parameters
    ----------
    result : StartTime
        The search's result. [-]

    Returns
    -------
    dict
        ``scheme``, ``ready_by`` and ``earliest_start`` (``HH:MM``: when the
        heating went off, or the run's start), ``can``, ``latest_start``
        (``HH:MM``, null when it cannot), ``lead_min`` (minutes from the latest
        start to the ready time), ``set_by`` (rooms that miss with a start one
        step later), ``resolution_min``, ``trials`` and ``rooms``: per room asked
        about ``id``, ``setpoint_C``, ``at_setpoint`` (``HH:MM`` when heating
        from the latest start, or from the earliest when it cannot; null if
        never), ``highest_air_C`` and ``shortfall_K`` (0 when it got there).
    """
    lead = result.lead_s
    return {
        "scheme": result.scheme,
        "ready_by": _clock(result, result.ready_by_s),
        "earliest_start": _clock(result, result.earliest_s),
        "can": result.can,
        "latest_start": _clock(result, result.latest_start_s),
        "lead_min": None if lead is None else round(lead / S_PER_MIN),
        "set_by": list(result.late_rooms),
        "resolution_min": round(result.resolution_s / S_PER_MIN, 3),
        "trials": result.trials,
        "rooms": [
            {
                "id": room.id,
                "setpoint_C": room.setpoint_C,
                "at_setpoint": _clock(result, room.ready_s),
                "highest_air_C": round(room.highest_air_C, 2),
                "shortfall_K": round(room.shortfall_K, 2),
            }
            for room in result.rooms
        ],
    }


def start_times_dict(results: Sequence[StartTime]) -> dict:
    """Start times of several schemes as JSON-ready data, ending with the caution.

    Parameters
    ----------
    results : sequence of StartTime
        One per scheme. [-]

    Returns
    -------
    dict
        ``start_times`` (:func:`start_time_entry` each), ``caution``.
    """
    return {
        "start_times": [start_time_entry(r) for r in results],
        "caution": CAUTION,
    }


def _lead(seconds: float | None) -> str:
    if seconds is None:
        return "--"
    minutes = int(round(seconds / S_PER_MIN))
    return f"{minutes // 60} h {minutes % 60:02d} min"


def start_times_text(results: Sequence[StartTime], tolerance_K: float) -> str:
    """Start times of several schemes as a table (no caution; callers add it).

    Parameters
    ----------
    results : sequence of StartTime
        One per scheme, all for the same ready time and rooms. [-]
    tolerance_K : float
        How close to its setpoint a room counts as there. [K]

    Returns
    -------
    str
        Per scheme the latest start, the time from it to the ready time and the
        rooms that set it; or ``cannot`` and each room's shortfall.
    """
    first = results[0]
    rooms = ", ".join(room.id for room in first.rooms)
    lines = [
        f"latest heating start for every room ({rooms}) within "
        f"{tolerance_K:g} K of its setpoint by {_clock(first, first.ready_by_s)}",
        f"(the house cooling from {_clock(first, first.earliest_s)}; found to "
        f"{first.resolution_s / S_PER_MIN:g} min, each start simulated):",
        "",
    ]
    width = max(14, *(len(r.scheme) + 2 for r in results))
    lines.append(f"{'scheme':<{width}}{'start by':>10}{'lead':>14}   set by")
    for r in results:
        if r.can:
            late = ", ".join(r.late_rooms) or "none (every room is there unheated)"
            lines.append(
                f"{r.scheme:<{width}}{_clock(r, r.latest_start_s):>10}"
                f"{_lead(r.lead_s):>14}   {late}"
            )
        else:
            short = ", ".join(
                f"{room.id} {room.shortfall_K:.1f} K short "
                f"(at most {room.highest_air_C:.1f} °C)"
                for room in r.rooms
                if room.ready_s is None
            )
            lines.append(f"{r.scheme:<{width}}{'cannot':>10}{'--':>14}   {short}")
    if not all(r.can for r in results):
        lines.append(
            f"cannot: not even with the heating on from "
            f"{_clock(first, first.earliest_s)} (shortfall: setpoint minus the "
            "highest air temperature by then)"
        )
    return "\n".join(lines)
