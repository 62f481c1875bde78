"""Reverse-return fixes: move the emitter's tee along the run.

Under reverse return the middle of a run sees the least pressure (the supply
and return pressures meet there). Moving a radiator's tee along the run, with
its branch pipes as they are (``tee_position``) or lengthened by the distance
moved so the radiator stays put (``branch_length``), changes what it gets; the
smallest move that lifts it to the starving fraction is found by re-solving.
"""

from __future__ import annotations

from simheat.analysis.check.edits import ScenarioEdit
from simheat.analysis.check.fixes.core import (
    SCAN_POINTS,
    Fix,
    FixFinder,
    round_up,
    smallest_size,
)
from simheat.resolve.route import tee_positions_m

# A move along the run is rounded up to this. [m]
LENGTH_STEP_M = 0.1


def tee_fixes(finder: FixFinder) -> list[Fix]:
    """Move the tee along the run, with or without lengthening its branch.

    Parameters
    ----------
    finder : FixFinder
        The starving emitter and its scheme. [-]

    Returns
    -------
    list of Fix
        The smallest move of each kind, towards whichever end needs less;
        none outside reverse return or when no move lifts the radiator.
    """
    if not finder.point.scheme.startswith("reverse_return"):
        return []
    tees = finder.floor.tees
    j = next(i for i, t in enumerate(tees) if t.emitter == finder.emitter)
    fixes = []
    for kind, lengthen in (("tee_position", False), ("branch_length", True)):
        best = None
        for toward_start in (True, False):
            result = _tee_move(finder, j, toward_start, lengthen)
            if result is not None and (best is None or result[0] < best[0]):
                best = result
        if best is not None:
            distance, edits, words = best
            fixes.append(finder.fix(kind, words, edits))
    return fixes


def tee_move_edits(
    finder: FixFinder, j: int, toward_start: bool, lengthen: bool, d: float
) -> list[ScenarioEdit]:
    """The floor's tees with tee ``j`` moved ``d`` metres along the run.

    The tee may pass other tees (the floor's ``tees`` list is written in the
    new order, the moved tee after any tee it meets); with ``lengthen`` its
    branch pipes get ``d`` metres longer each, so the radiator stays.

    Parameters
    ----------
    finder : FixFinder
        The starving emitter and its scheme. [-]
    j : int
        Index of the tee in its floor's ``tees``. [-]
    toward_start : bool
        Move towards the run's start, else towards its end. [-]
    lengthen : bool
        Lengthen the branch pipes by the distance moved. [-]
    d : float
        Distance moved along the run. [m]

    Returns
    -------
    list of ScenarioEdit
        One edit: the floor's ``tees`` rewritten.
    """
    tees = finder.floor.tees
    positions = [float(x) for x in tee_positions_m(finder.floor)]
    entries = finder.document["route"]["floors"][finder.floor_path[2]]["tees"]
    moved = list(positions)
    moved[j] = positions[j] + (-d if toward_start else d)
    order = sorted(range(len(tees)), key=lambda i: (moved[i], i == j))
    new, last = [], 0.0
    for i in order:
        entry = dict(entries[i])
        entry["header_length_m"] = round(moved[i] - last, 6)
        if lengthen and i == j:
            entry["branch_length_m"] = round(tees[j].branch_length_m + d, 6)
        last = moved[i]
        new.append(entry)
    return [ScenarioEdit((*finder.floor_path, "tees"), new)]


def _tee_move(finder: FixFinder, j: int, toward_start: bool, lengthen: bool):
    """Smallest move of tee ``j`` that lifts its emitter: (d, edits, words).

    The tee stays between the run's start and its last tee; None when no
    move in that range lifts it.
    """
    positions = [float(x) for x in tee_positions_m(finder.floor)]
    room = positions[j] if toward_start else positions[-1] - positions[j]
    if room <= 0.0:
        return None

    def edits(d: float) -> list[ScenarioEdit]:
        return tee_move_edits(finder, j, toward_start, lengthen, d)

    found = smallest_size(lambda d: finder.shortfall(edits(d)), 0.0, room, SCAN_POINTS)
    if found is None:
        return None
    d = min(round_up(found, LENGTH_STEP_M), room)
    direction = "towards the start" if toward_start else "towards the end"
    to_m = positions[j] + (-d if toward_start else d)
    e_id = finder.scenario.emitters[finder.emitter].id
    words = (
        f"move the tee of {e_id} {d:.1f} m {direction} of the run "
        f"(to {to_m:.1f} m from the floor's start)"
    )
    if lengthen:
        words += f", its branch pipes {d:.1f} m longer each (the radiator stays)"
    else:
        words += ", branch pipes as they are"
    return d, edits(d), words
