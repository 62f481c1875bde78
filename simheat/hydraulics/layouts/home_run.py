"""Home-run manifold: one supply/return pair from a manifold to each emitter.

The manifold sits at a given position on the floor's run (its start unless
given), fed by a supply/return pair along the run from the riser. Each emitter's
pair runs from the manifold along the run to the emitter's tee point and on along
its branch: one leg is the route distance from the manifold to the tee plus the
branch length.
"""

from __future__ import annotations

from simheat.errors import ScenarioError
from simheat.hydraulics.layouts._core import EMITTER_Y, Builder, floor_y
from simheat.hydraulics.layouts.geometry import (
    floor_where,
    route_distance_m,
    run_extent_m,
    tee_positions_m,
)
from simheat.hydraulics.layouts.split import manifold_pair
from simheat.scenario.model import FloorRoute


def manifold_position_m(floor: FloorRoute, where: str) -> float:
    """The floor's manifold position, checked to lie on the run. [m]."""
    p = floor.manifold_position_m or 0.0
    extent = run_extent_m(floor)
    if not 0.0 <= p <= extent:
        raise ScenarioError(
            f"{where}.manifold_position_m: must lie on the run, 0 to {extent:g} m, "
            f"got {p:g}"
        )
    return p


def home_run_floor(
    b: Builder, floor: FloorRoute, index: int, supply: int, ret: int
) -> None:
    """A manifold with one supply/return pair per emitter on one floor."""
    s = b.scenario
    where = floor_where(s.route.floors.index(floor))
    p = manifold_position_m(floor, where)
    feed_m = route_distance_m(floor, 0.0, p)
    m_supply, m_return = manifold_pair(
        b, floor, index, supply, ret, feed_m, p, len(floor.tees)
    )
    pipe = s.layout.home_run_pipe or floor.branch_pipe
    fittings = {
        "manifold_connection": 2,
        "elbow": b.table.elbows_per_home_run,
        "radiator": 1,
    }
    y = floor_y(index)
    for tee, x in zip(floor.tees, tee_positions_m(floor), strict=True):
        leg_m = route_distance_m(floor, p, float(x)) + tee.branch_length_m
        b.emitter(
            tee.emitter,
            m_supply,
            m_return,
            2.0 * leg_m,
            pipe,
            fittings,
            (float(x), y + EMITTER_Y),
            role="home_run",
        )
