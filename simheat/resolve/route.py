"""Route geometry: positions along a floor's run, ring distances, the split in two.

A floor's run starts at the foot of its riser (position 0) and visits its tees in
order; tee ``i`` sits at the sum of the header lengths up to it. With
``closing_length_m`` the run closes back on its start and is a ring: distances may
then go either way round. Every error names the scenario field it comes from.

The layout builders place pipes with these functions; :func:`check_route` checks
the scenario's manifold positions and split points against the runs when the
scenario is resolved, so a bad position is reported whichever scheme is built.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from simheat.errors import ScenarioError
from simheat.scenario.model import FloorRoute, Route, Tee


def tee_positions_m(floor: FloorRoute) -> np.ndarray:
    """Position of each tee along the run from the floor's start.

    Parameters
    ----------
    floor : FloorRoute
        The floor's run. [-]

    Returns
    -------
    ndarray
        Cumulative header length up to each tee. [m]
    """
    return np.cumsum([t.header_length_m for t in floor.tees])


def ring_length_m(floor: FloorRoute) -> float | None:
    """Circumference of a ring run, None for an open run.

    Parameters
    ----------
    floor : FloorRoute
        The floor's run. [-]

    Returns
    -------
    float or None
        Last tee position plus the closing length. [m]
    """
    if floor.closing_length_m is None:
        return None
    return float(tee_positions_m(floor)[-1] + floor.closing_length_m)


def run_extent_m(floor: FloorRoute) -> float:
    """Largest position on the run: the last tee, or round to the start on a ring.

    Parameters
    ----------
    floor : FloorRoute
        The floor's run. [-]

    Returns
    -------
    float
        Position of the last tee, or the ring's circumference. [m]
    """
    ring = ring_length_m(floor)
    return float(tee_positions_m(floor)[-1]) if ring is None else ring


def route_distance_m(floor: FloorRoute, a_m: float, b_m: float) -> float:
    """Pipe distance between two positions along the run (shorter way on a ring).

    Parameters
    ----------
    floor : FloorRoute
        The floor's run. [-]
    a_m, b_m : float
        Positions along the run from its start. [m]

    Returns
    -------
    float
        Distance along the run. [m]
    """
    d = abs(a_m - b_m)
    ring = ring_length_m(floor)
    return d if ring is None else min(d, ring - d)


@dataclass(frozen=True)
class SplitRun:
    """The two circuits of split direct return on one floor.

    Attributes
    ----------
    manifold_m : float
        Manifold position along the run. [m]
    feed_m : float
        Pipe distance from the floor's start to the manifold. [m]
    ahead, back : tuple of (Tee, float)
        Each circuit's tees in flow order with the header length from the
        previous stop (the manifold for the first). [m]
    """

    manifold_m: float
    feed_m: float
    ahead: tuple[tuple[Tee, float], ...]
    back: tuple[tuple[Tee, float], ...]


def _circuits(floor: FloorRoute, manifold_m: float, k: int):
    """Ahead (forward from the manifold up to tee ``k``) and back circuits.

    Returns None when an open run cannot split after tee ``k`` with the manifold
    where it is.
    """
    x = tee_positions_m(floor)
    n = len(x)
    ring = ring_length_m(floor)
    j = int(np.searchsorted(x, manifold_m - 1e-9))  # first tee at or after it
    if ring is None:
        if k != j - 1:
            return None
        ahead_idx = list(range(j, n))
        back_idx = list(range(j - 1, -1, -1))
    else:
        order = [(j + i) % n for i in range(n)]  # forward round the ring
        cut = order.index(k) + 1
        ahead_idx = order[:cut]
        back_idx = order[cut:][::-1]

    def gap(from_m: float, to_m: float) -> float:
        d = to_m - from_m
        return float(d % ring if ring is not None else abs(d))

    ahead, pos = [], manifold_m
    for i in ahead_idx:
        ahead.append((floor.tees[i], gap(pos, x[i])))
        pos = x[i]
    back, pos = [], manifold_m
    for i in back_idx:
        back.append((floor.tees[i], gap(x[i], pos)))
        pos = x[i]
    return tuple(ahead), tuple(back)


def split_run(floor: FloorRoute, design_flow_kg_s: np.ndarray, where: str) -> SplitRun:
    """Divide a floor's run into the two circuits of split direct return.

    Parameters
    ----------
    floor : FloorRoute
        The floor's run, with its optional manifold position, split point and
        closing length. [-]
    design_flow_kg_s : ndarray
        Design mass flow per emitter of the scenario (the load measure). [kg/s]
    where : str
        Scenario path of the floor, for messages. [-]

    Returns
    -------
    SplitRun
        Manifold position and the two circuits.

    Raises
    ------
    ScenarioError
        When the manifold position lies off the run or the split point leaves a
        circuit empty.

    Notes
    -----
    On a ring the circuits leave the manifold in opposite directions and meet
    between the split emitter and the next; the manifold sits at the floor's
    start unless given. An open run cannot wrap round, so there the split lies at
    the manifold: a given manifold position fixes the split, a given split places
    the manifold midway between the split emitter and the next, and with neither
    the manifold goes where the two circuits' design flows come closest. A
    floor with a single emitter gets one circuit (``back`` is empty).
    """
    tees = floor.tees
    n = len(tees)
    if n < 2:
        if floor.split_after is not None:
            raise ScenarioError(
                f"{where}.split_after_emitter: the floor has a single emitter; "
                "splitting after it leaves the second circuit empty"
            )
        # One emitter: a single circuit from a manifold at the floor's start.
        return SplitRun(0.0, 0.0, ((tees[0], tees[0].header_length_m),), ())
    x = tee_positions_m(floor)
    ring = ring_length_m(floor)
    load = np.array([design_flow_kg_s[t.emitter] for t in tees])
    index_of = {t.emitter: i for i, t in enumerate(tees)}
    given_k = None if floor.split_after is None else index_of[floor.split_after]
    manifold = floor.manifold_position_m
    if ring is None and manifold is None:
        candidates = [given_k] if given_k is not None else range(n - 1)
        k = min(
            candidates, key=lambda i: abs(load[: i + 1].sum() - load[i + 1 :].sum())
        )
        manifold = float(0.5 * (x[k] + x[k + 1])) if k < n - 1 else float(x[k])
        if k == n - 1:
            raise ScenarioError(
                f"{where}.split_after_emitter: splitting after the last emitter "
                "leaves the second circuit empty"
            )
    elif manifold is None:
        manifold = 0.0
    choices = [given_k] if given_k is not None else range(n)
    best = None
    for k in choices:
        circuits = _circuits(floor, manifold, k)
        if circuits is None or not circuits[0] or not circuits[1]:
            continue
        ahead_load = sum(design_flow_kg_s[t.emitter] for t, _ in circuits[0])
        back_load = sum(design_flow_kg_s[t.emitter] for t, _ in circuits[1])
        score = abs(ahead_load - back_load)
        if best is None or score < best[0]:
            best = (score, circuits)
    if best is None:
        if given_k is not None:
            raise ScenarioError(
                f"{where}.split_after_emitter: splitting after this emitter with the "
                f"manifold at {manifold:g} m leaves a circuit empty"
                + (
                    "; on an open run the split lies at the manifold (close the run "
                    "with closing_length_m to split elsewhere)"
                    if ring is None
                    else ""
                )
            )
        raise ScenarioError(
            f"{where}.manifold_position_m: a manifold at {manifold:g} m leaves one "
            "circuit empty on this open run; place it between two emitters or close "
            "the run into a ring with closing_length_m"
        )
    feed = route_distance_m(floor, 0.0, manifold)
    return SplitRun(manifold, feed, best[1][0], best[1][1])


def check_route(route: Route, design_flow_kg_s: np.ndarray, origin: str) -> None:
    """Check every floor's manifold position and split point against its run.

    Parameters
    ----------
    route : Route
        The scenario's route. [-]
    design_flow_kg_s : ndarray
        Design mass flow per emitter (the load measure of :func:`split_run`). [kg/s]
    origin : str
        Scenario file name, for messages. [-]

    Raises
    ------
    ScenarioError
        ``route.floors[i].manifold_position_m`` when the position lies beyond
        the run (past the last tee of an open run, or once round a ring);
        ``route.floors[i].split_after_emitter`` when splitting after that
        emitter leaves a circuit empty (:func:`split_run`).
    """
    for floor in route.floors:
        position = floor.manifold_position_m
        if position is not None:
            extent = run_extent_m(floor)
            if position > extent:
                along = (
                    "round the ring" if floor.closing_length_m else "to the last tee"
                )
                raise ScenarioError(
                    f"{floor.where}.manifold_position_m: must lie on the run, 0 to "
                    f"{extent:g} m ({along}), got {position:g} ({origin})"
                )
        if floor.split_after is not None:
            split_run(floor, design_flow_kg_s, floor.where)
