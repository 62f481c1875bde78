"""Route geometry: positions along a floor's run, ring distances, the split in two.

A floor's run starts at the foot of its riser (position 0) and visits its tees in
order; tee ``i`` sits at the sum of the header lengths up to it. With
``closing_length_m`` the run closes back on its start and is a ring: distances may
then go either way round. Every error names the scenario field it comes from.

Heights: every floor's run starts at a height above the plant (given, or the
floor below plus this floor's riser taken as vertical) and each tee sits at its
own height (given, or the floor's); the run's height between them is linear in
the position along it. A pipe laid along the run covers a stretch of it
(:func:`run_intervals`), which tells which tee's header stretch it belongs to
(:func:`stretch_index`) and which obstacles it passes (:func:`obstacles_passed`).

The layout builders place pipes with these functions; :func:`check_route` checks
the scenario's manifold positions, split points, obstacle positions and heights
against the runs when the scenario is resolved, so a bad value is reported
whichever scheme is built.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from simheat.errors import ScenarioError
from simheat.scenario.model import FloorRoute, Obstacle, Route, Tee

# Positions closer than this count as the same point of the run. [m]
POSITION_TOL_M = 1e-6


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


def floor_heights_m(route: Route) -> list[float]:
    """Height of each floor's run at its start above the plant.

    Parameters
    ----------
    route : Route
        The route, floors in ascending order. [-]

    Returns
    -------
    list of float
        Per floor: its ``height_m`` when given, else the floor below's height
        plus this floor's riser length (risers taken as vertical; the first
        floor's riser climbs from the plant's height, 0). [m]

    Examples
    --------
    >>> from types import SimpleNamespace as F
    >>> floors = (F(height_m=None, riser_length_m=0.0),
    ...           F(height_m=None, riser_length_m=2.8),
    ...           F(height_m=6.0, riser_length_m=3.0))
    >>> floor_heights_m(F(floors=floors))
    [0.0, 2.8, 6.0]
    """
    heights: list[float] = []
    below = 0.0
    for floor in route.floors:
        h = below + floor.riser_length_m if floor.height_m is None else floor.height_m
        heights.append(float(h))
        below = h
    return heights


def feed_end_height_m(route: Route, heights: list[float]) -> float:
    """Height of the foot of the riser, where the feed ends. [m].

    The lowest floor's start when its riser is 0 long (the feed runs straight
    into that floor), else the plant's height (0), from where its riser climbs.

    Parameters
    ----------
    route : Route
        The route. [-]
    heights : list of float
        Start height of each floor (:func:`floor_heights_m`). [m]

    Returns
    -------
    float
        Height above the plant. [m]
    """
    return heights[0] if route.floors[0].riser_length_m == 0.0 else 0.0


def tee_heights_m(floor: FloorRoute, floor_height_m: float) -> np.ndarray:
    """Height of the header at each tee: given, or the floor's.

    Parameters
    ----------
    floor : FloorRoute
        The floor's run. [-]
    floor_height_m : float
        Height of the run at the floor's start. [m]

    Returns
    -------
    ndarray
        One height per tee. [m]
    """
    return np.array(
        [floor_height_m if t.height_m is None else t.height_m for t in floor.tees]
    )


def run_height_m(floor: FloorRoute, floor_height_m: float, position_m: float) -> float:
    """Height of the run at a position along it, linear between the tees.

    Parameters
    ----------
    floor : FloorRoute
        The floor's run. [-]
    floor_height_m : float
        Height at the floor's start (and, on a ring, at the end of the closing
        pipe). [m]
    position_m : float
        Position along the run from its start. [m]

    Returns
    -------
    float
        Height above the plant; on an open run held at the last tee's height
        beyond it. [m]
    """
    x = [0.0, *tee_positions_m(floor).tolist()]
    h = [floor_height_m, *tee_heights_m(floor, floor_height_m).tolist()]
    ring = ring_length_m(floor)
    if ring is not None:
        x.append(ring)
        h.append(floor_height_m)
    # np.interp takes the last of equal x; the checks make equal x equal height.
    return float(np.interp(position_m, x, h))


def run_intervals(
    floor: FloorRoute, from_m: float, to_m: float
) -> tuple[tuple[float, float], ...]:
    """The stretch of the run a pipe covers going forward from one position to another.

    Parameters
    ----------
    floor : FloorRoute
        The floor's run. [-]
    from_m, to_m : float
        Positions along the run; on an open run the order does not matter, on a
        ring the pipe goes forward (wrapping past the start) from ``from_m`` to
        ``to_m``. [m]

    Returns
    -------
    tuple of (float, float)
        Intervals ``(low, high)`` of positions covered, one, or two when the
        stretch wraps past a ring's start. [m]
    """
    ring = ring_length_m(floor)
    if ring is None or to_m >= from_m:
        return ((min(from_m, to_m), max(from_m, to_m)),)
    return ((from_m, ring), (0.0, to_m))


def stretch_index(
    floor: FloorRoute, intervals: tuple[tuple[float, float], ...]
) -> int | None:
    """The tee whose header stretch holds a covered stretch, if one does.

    Tee ``i``'s stretch runs from the previous tee (or the floor's start) to
    it. A pipe covering a single interval within one such stretch belongs to
    that tee; a pipe spanning several stretches, or any part of a ring's
    closing pipe, belongs to none.

    Parameters
    ----------
    floor : FloorRoute
        The floor's run. [-]
    intervals : tuple of (float, float)
        Covered stretch (:func:`run_intervals`). [m]

    Returns
    -------
    int or None
        Index of the tee in ``floor.tees``.
    """
    if len(intervals) != 1:
        return None
    low, high = intervals[0]
    x = tee_positions_m(floor)
    start = 0.0
    for i, end in enumerate(x):
        if low >= start - POSITION_TOL_M and high <= end + POSITION_TOL_M:
            return i
        start = float(end)
    return None


def obstacles_passed(
    floor: FloorRoute, intervals: tuple[tuple[float, float], ...]
) -> tuple[Obstacle, ...]:
    """Obstacles inside a covered stretch, in order along it.

    Parameters
    ----------
    floor : FloorRoute
        The floor's run. [-]
    intervals : tuple of (float, float)
        Covered stretch (:func:`run_intervals`). [m]

    Returns
    -------
    tuple of Obstacle
        Those strictly inside an interval (the checks keep obstacles off the
        tees and the run's ends).
    """
    passed = []
    for low, high in intervals:
        passed += sorted(
            (o for o in floor.obstacles if low < o.position_m < high),
            key=lambda o: o.position_m,
        )
    return tuple(passed)


def _check_obstacles(floor: FloorRoute, origin: str) -> None:
    """Obstacles must lie on the run, off its tees and its start."""
    extent = run_extent_m(floor)
    x = tee_positions_m(floor)
    for o in floor.obstacles:
        p = o.position_m
        if p >= extent - POSITION_TOL_M:
            along = "round the ring" if floor.closing_length_m else "to the last tee"
            raise ScenarioError(
                f"{o.where}.position_m: must lie on the run, between its start and "
                f"{extent:g} m ({along}), got {p:g} ({origin})"
            )
        at = np.flatnonzero(np.abs(x - p) <= POSITION_TOL_M)
        if at.size:
            raise ScenarioError(
                f"{o.where}.position_m: lies at a tee ({p:g} m); place the obstacle "
                f"between two tees ({origin})"
            )


def _check_climb(what: str, rise_m: float, length_m: float, origin: str) -> None:
    if abs(rise_m) > length_m + POSITION_TOL_M:
        raise ScenarioError(
            f"{what}: a pipe of {length_m:g} m cannot climb or fall {abs(rise_m):g} m "
            f"({origin})"
        )


def _check_heights(route: Route, origin: str) -> None:
    """Every pipe along the route must be long enough for the height it changes."""
    heights = floor_heights_m(route)
    feed_end = feed_end_height_m(route, heights)
    _check_climb(
        "route.floors[0].height_m (the feed from the plant)",
        feed_end,
        route.feed_length_m,
        origin,
    )
    below = feed_end
    for i, (floor, h) in enumerate(zip(route.floors, heights, strict=True)):
        _check_climb(
            f"{floor.where}.height_m (its riser from "
            + ("the feed" if i == 0 else "the floor below")
            + ")",
            h - below,
            floor.riser_length_m,
            origin,
        )
        below = h
        previous = h
        tee_h = tee_heights_m(floor, h)
        for j, tee in enumerate(floor.tees):
            _check_climb(
                f"{floor.where}.tees[{j}].height_m (the header from the "
                + ("floor's start" if j == 0 else "previous tee")
                + ")",
                tee_h[j] - previous,
                tee.header_length_m,
                origin,
            )
            previous = tee_h[j]
        if floor.closing_length_m is not None:
            _check_climb(
                f"{floor.where}.closing_length_m (back to the floor's start)",
                h - previous,
                floor.closing_length_m,
                origin,
            )
        if floor.drop_length_m is not None:
            if i == 0:
                raise ScenarioError(
                    f"{floor.where}.drop_length_m: there is no floor below this "
                    f"one to drop to ({origin})"
                )
            _check_climb(
                f"{floor.where}.drop_length_m (to the floor below's start)",
                heights[i - 1] - previous,
                floor.drop_length_m,
                origin,
            )


def check_route(route: Route, design_flow_kg_s: np.ndarray, origin: str) -> None:
    """Check every floor's positions and heights against its run.

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
        emitter leaves a circuit empty (:func:`split_run`);
        ``route.floors[i].obstacles[j].position_m`` when an obstacle lies off
        the run or at a tee; a height (``route.floors[i].height_m``,
        ``...tees[j].height_m``, ``...drop_length_m``) that a pipe is too short
        to climb.
    """
    _check_heights(route, origin)
    for floor in route.floors:
        _check_obstacles(floor, origin)
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
