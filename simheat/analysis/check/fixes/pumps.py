"""Pump fixes: the least set head, or speed, that lifts the radiator.

A regulated pump gets a higher set head, a fixed-speed pump a higher speed (its
curve's points scaled by the affinity laws). The pump is the one driving the
emitter's circuit: ``[pump]``, or its floor's pump in a ``_floor_pumps``
scheme; a floor pump running on ``[pump]`` gets its own
``[[layout.floor_pumps]]`` entry, so the other floors keep theirs.
"""

from __future__ import annotations

from simheat.analysis.check.edits import ScenarioEdit, key_text
from simheat.analysis.check.fixes.core import (
    SCAN_POINTS,
    Fix,
    FixFinder,
    round_up,
    smallest_size,
)
from simheat.analysis.check.starving import driving_pump

# Largest pump speed tried, as a ratio of the curve's speed (heads up to four
# times the curve's, by the affinity laws). [-]
MAX_SPEED_RATIO = 2.0
# A regulated pump's set head is raised up to this share of its curve's
# shut-off head (the loader requires it below the shut-off head). [-]
MAX_SETPOINT_SHARE = 0.98
# Steps a fix's size is rounded up to: pump speed 1 % [-], set head 0.5 kPa.
SPEED_STEP = 0.01
SETPOINT_STEP_KPA = 0.5


def pump_table(finder: FixFinder) -> tuple[tuple, dict | None]:
    """Key path of the driving pump's table, and its document table.

    Parameters
    ----------
    finder : FixFinder
        The starving emitter and its scheme. [-]

    Returns
    -------
    path : tuple
        ``("pump",)``, ``("layout", "floor_pumps", i)``, or
        ``("layout", "floor_pumps")`` for a floor pump without a table of its
        own.
    table : dict or None
        The table as the file has it; None for a floor pump without one.
    """
    point = finder.point
    name = point.built.network.link_names[driving_pump(point, finder.emitter)]
    if name == "pump":
        return ("pump",), finder.document["pump"]
    entries = finder.document.get("layout", {}).get("floor_pumps", [])
    for i, entry in enumerate(entries):
        if entry.get("floor") == finder.floor.floor:
            return ("layout", "floor_pumps", i), entry
    return ("layout", "floor_pumps"), None


def pump_fixes(finder: FixFinder) -> list[Fix]:
    """Raise the pump's set head, or its speed, by the least that lifts it.

    Parameters
    ----------
    finder : FixFinder
        The starving emitter and its scheme. [-]

    Returns
    -------
    list of Fix
        One ``pump_setpoint`` or ``pump_speed`` fix (none for a regulated pump
        already set near its curve's shut-off head).
    """
    path, table = pump_table(finder)
    base = table if table is not None else finder.document["pump"]
    mode = base.get("mode", "fixed_speed")
    if mode != "fixed_speed":
        return _setpoint_fix(finder, path, table, base)
    return _speed_fix(finder, path, table, base)


def _pump_edits(finder, path, table, base, changes: dict) -> list[ScenarioEdit]:
    if table is not None:
        return [ScenarioEdit((*path, k), v) for k, v in changes.items()]
    entry = {"floor": finder.floor.floor, **base, **changes}
    entry.pop("stop_at_h", None)
    return [ScenarioEdit(path, entry, append=True)]


def _pump_words(finder, path: tuple, table: dict | None) -> str:
    """How the text names the pump a fix changes."""
    if table is None:
        return (
            f"a pump of its own for floor {finder.floor.floor} "
            "(a new [[layout.floor_pumps]] entry, [pump] scaled)"
        )
    return f"the pump [{key_text(path)}]"


def _speed_fix(finder, path, table, base) -> list[Fix]:
    flows = [float(q) for q in base["flow_m3_per_h"]]
    heads = [float(h) for h in base["head_kPa"]]

    def edits(speed: float) -> list[ScenarioEdit]:
        return _pump_edits(
            finder,
            path,
            table,
            base,
            {
                "flow_m3_per_h": [round(q * speed, 6) for q in flows],
                "head_kPa": [round(h * speed**2, 6) for h in heads],
            },
        )

    found = smallest_size(
        lambda s: finder.shortfall(edits(s)), 1.0, MAX_SPEED_RATIO, SCAN_POINTS
    )
    speed = MAX_SPEED_RATIO if found is None else round_up(found, SPEED_STEP)
    words = (
        f"{_pump_words(finder, path, table)} at {100 * speed:.0f} % of its "
        "curve's speed: shut-off "
        f"head {heads[0] * speed**2:.1f} kPa (affinity laws; a higher speed "
        "step or a larger pump)"
    )
    if found is None:
        words = f"not enough even at {100 * speed:.0f} % speed: " + words
    return [finder.fix("pump_speed", words, edits(speed))]


def _setpoint_fix(finder, path, table, base) -> list[Fix]:
    current = float(base["setpoint_kPa"])
    link = driving_pump(finder.point, finder.emitter)
    shut_off_kPa = float(finder.point.built.network.pump_coeffs[link][0]) / 1e3
    high = MAX_SETPOINT_SHARE * shut_off_kPa
    if high <= current:
        return []

    def edits(kPa: float) -> list[ScenarioEdit]:
        return _pump_edits(finder, path, table, base, {"setpoint_kPa": round(kPa, 6)})

    found = smallest_size(
        lambda h: finder.shortfall(edits(h)), current, high, SCAN_POINTS
    )
    if found is None:
        value = high
    else:
        value = min(round_up(found, SETPOINT_STEP_KPA), high)
    words = (
        f"{_pump_words(finder, path, table)} set head {value:.1f} kPa "
        f"(was {current:g} kPa)"
    )
    if found is None:
        words = "not enough even near the curve's shut-off head: " + words
    return [finder.fix("pump_setpoint", words, edits(value))]
