"""Scheme comparison: times to setpoint side by side and the ranking."""

from __future__ import annotations

from simheat.analysis.compare import Comparison
from simheat.report.caution import CAUTION
from simheat.report.numbers import NOT_REACHED, clock, minutes, minutes_cell
from simheat.report.start_time import start_time_entry, start_times_text

__all__ = ["comparison_dict", "comparison_text", "shortfall_cell"]


def shortfall_cell(shortfall_Kh: float | None) -> str:
    """A comfort shortfall as a table cell, ``--`` when not known.

    Parameters
    ----------
    shortfall_Kh : float or None
        Degree-hours below setpoint. [K h]

    Returns
    -------
    str
        E.g. ``"2.4 K h"``.

    Examples
    --------
    >>> shortfall_cell(2.44), shortfall_cell(None)
    ('2.4 K h', '--')
    """
    return NOT_REACHED if shortfall_Kh is None else f"{shortfall_Kh:.1f} K h"


def comparison_dict(comparison: Comparison) -> dict:
    """A comparison as JSON-ready data, times in minutes.

    Parameters
    ----------
    comparison : Comparison
        The comparison. [-]

    Returns
    -------
    dict
        ``scenario``; ``schemes``: list of ``{name, all_rooms_at_setpoint_min,
        spread_min, comfort_shortfall_K_h, rooms: [{id, time_to_setpoint_min}]}``
        (None where not reached or not known), with a ready time also
        ``start_time`` (:func:`simheat.report.start_time.start_time_entry`);
        ``ranking`` (names, best first) and ``ranking_by`` (``"latest_start"``
        with a ready time, else ``"times_to_setpoint"``); ``caution``.
    """
    starts = {r.scheme: start_time_entry(r) for r in comparison.start_times}
    schemes = []
    for o in comparison.outcomes:
        entry = {
            "name": o.name,
            "all_rooms_at_setpoint_min": minutes(o.all_rooms_s),
            "spread_min": minutes(o.spread_s),
            "comfort_shortfall_K_h": (
                None if o.shortfall_Kh is None else round(o.shortfall_Kh, 3)
            ),
            "rooms": [
                {"id": room, "time_to_setpoint_min": minutes(t)}
                for room, t in zip(o.room_ids, o.times_s, strict=True)
            ],
        }
        if o.name in starts:
            entry["start_time"] = starts[o.name]
        schemes.append(entry)
    return {
        "scenario": comparison.scenario.name,
        "schemes": schemes,
        "ranking": list(comparison.ranking),
        "ranking_by": "latest_start" if starts else "times_to_setpoint",
        "caution": CAUTION,
    }


def comparison_text(comparison: Comparison) -> str:
    """A comparison as one plain-text table, rooms by schemes, and the ranking.

    Parameters
    ----------
    comparison : Comparison
        The comparison. [-]

    Returns
    -------
    str
        Minutes to setpoint per room and scheme ("--" where never reached), the
        all-rooms and spread rows, and the ranking (no caution; callers add it).
    """
    outcomes = comparison.outcomes
    width = max(12, *(len(o.name) + 2 for o in outcomes))
    label = max(14, *(len(r) + 2 for r in outcomes[0].room_ids))
    lines = [
        f"{comparison.scenario.name}: minutes from the start of comfort to setpoint",
        "",
        f"{'room':<{label}}" + "".join(f"{o.name:>{width}}" for o in outcomes),
    ]
    for i, room in enumerate(outcomes[0].room_ids):
        lines.append(
            f"{room:<{label}}"
            + "".join(f"{minutes_cell(o.times_s[i]):>{width}}" for o in outcomes)
        )
    lines.append("-" * (label + width * len(outcomes)))
    lines.append(
        f"{'all rooms':<{label}}"
        + "".join(f"{minutes_cell(o.all_rooms_s):>{width}}" for o in outcomes)
    )
    lines.append(
        f"{'spread':<{label}}"
        + "".join(f"{minutes_cell(o.spread_s):>{width}}" for o in outcomes)
    )
    lines.append(
        f"{'shortfall':<{label}}"
        + "".join(f"{shortfall_cell(o.shortfall_Kh):>{width}}" for o in outcomes)
    )
    lines.append("")
    if comparison.start_times:
        lines += _start_time_ranking(comparison, width)
    else:
        by_name = {o.name: o for o in outcomes}
        lines.append("ranking (every room at setpoint first, by the last room's time,")
        lines.append("         equal times by the shortfall; then by the shortfall):")
        for place, name in enumerate(comparison.ranking, start=1):
            o = by_name[name]
            if o.all_rooms_s is not None:
                note = f"all rooms in {minutes_cell(o.all_rooms_s)}"
            else:
                note = f"{o.n_reached} of {len(o.times_s)} rooms reach setpoint"
            if o.shortfall_Kh is not None:
                note += f", shortfall {shortfall_cell(o.shortfall_Kh)}"
            lines.append(f"  {place}. {name:<{width}} {note}")
    lines.append("")
    lines.append(
        "shortfall: degree-hours the rooms spent below setpoint (less the"
        " tolerance) after the start of comfort, summed over the rooms"
    )
    return "\n".join(lines)


def _start_time_ranking(comparison: Comparison, width: int) -> list[str]:
    """The start-time table and the ranking by it, as lines."""
    tolerance = comparison.scenario.simulation.reached_tolerance_K
    lines = [start_times_text(comparison.start_times, tolerance), ""]
    lines.append("ranking (the latest heating start first; then the schemes that")
    lines.append("         cannot, the smallest shortfall below setpoint first):")
    starts = {r.scheme: r for r in comparison.start_times}
    for place, name in enumerate(comparison.ranking, start=1):
        r = starts[name]
        note = (
            f"start by {clock(r.start_clock_s, r.latest_start_s)}"
            if r.can
            else "cannot"
        )
        lines.append(f"  {place}. {name:<{width}} {note}")
    return lines
