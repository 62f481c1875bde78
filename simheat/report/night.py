"""The night before a run's morning: JSON-ready data and a few lines of text."""

from __future__ import annotations

from simheat.report.numbers import S_PER_H, clock
from simheat.runs.run import Run

__all__ = ["night_dict", "night_text"]


def night_dict(run: Run) -> dict | None:
    """The night of a run as JSON-ready data; None when the run had none.

    Parameters
    ----------
    run : Run
        A simulated run. [-]

    Returns
    -------
    dict or None
        ``heating_off`` (``HH:MM``), ``hours`` (the night's length) and
        ``rooms``: per room ``id``, ``evening_air_C`` (the steady state with
        the heating on, when it went off) and ``start_air_C`` and
        ``start_structure_C`` (when the morning starts). None for a run that
        started from a given state.
    """
    night = run.night
    if night is None:
        return None
    return {
        "heating_off": clock(night.off_clock_s, 0.0),
        "hours": round(-night.time_s[0] / S_PER_H, 3),
        "rooms": [
            {
                "id": room.id,
                "evening_air_C": round(float(night.air_temp_C[0, r]), 2),
                "start_air_C": round(float(night.air_temp_C[-1, r]), 2),
                "start_structure_C": round(float(night.structure_temp_C[-1, r]), 2),
            }
            for r, room in enumerate(run.scenario.rooms)
        ],
    }


def night_text(run: Run) -> str:
    """The night of a run in a few lines; empty for a run without one.

    Parameters
    ----------
    run : Run
        A simulated run. [-]

    Returns
    -------
    str
        When the heating went off, and each room's air in the evening and at the
        start of the morning.
    """
    data = night_dict(run)
    if data is None:
        return ""
    start = clock(run.scenario.schedule.start_clock_s, 0.0)
    rooms = ", ".join(
        f"{room['id']} {room['evening_air_C']:.1f} -> {room['start_air_C']:.1f}"
        for room in data["rooms"]
    )
    return (
        f"night: heating off from {data['heating_off']} to {start} "
        f"({data['hours']:g} h); air °C, evening -> start: {rooms}"
    )
