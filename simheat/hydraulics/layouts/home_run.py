"""Home-run manifold: one supply/return pair from a manifold to each emitter.

The manifold sits at a given position on the floor's run (its start unless
given), fed by a supply/return pair along the run from the riser. Each emitter's
pair runs from the manifold along the run to the emitter's tee point and on along
its branch: one leg is the route distance from the manifold to the tee plus the
branch length.
"""

from __future__ import annotations

from simheat.hydraulics.layouts.builder import Builder
from simheat.hydraulics.layouts.circuits import circuit_return
from simheat.hydraulics.layouts.drawing import EMITTER_Y, floor_y
from simheat.hydraulics.layouts.split import manifold_pair
from simheat.resolve.route import route_distance_m, tee_positions_m
from simheat.scenario.circuits import manifold_circuit
from simheat.scenario.model import FloorRoute


def home_run_floor(
    b: Builder, floor: FloorRoute, index: int, supply: int, ret: int
) -> None:
    """A manifold with one supply/return pair per emitter on one floor.

    Parameters
    ----------
    b : Builder
        The network under construction. [-]
    floor : FloorRoute
        The floor's run. [-]
    index : int
        Route index of the floor (for drawing). [-]
    supply, ret : int
        Supply and return nodes where the floor's circuit starts. [-]
    """
    s = b.scenario
    p = floor.manifold_position_m or 0.0  # on the run: checked by the resolve step
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
        link = b.emitter(
            tee.emitter,
            m_supply,
            m_return,
            2.0 * leg_m,
            pipe,
            fittings,
            (float(x), y + EMITTER_Y),
            role="home_run",
            along=b.geometry.shorter_along(index, p, float(x)),
        )
        b.links[link].pipes = 2  # the pair's supply and return legs
        name = manifold_circuit(floor.floor, s.emitters[tee.emitter].id)
        circuit_return(b, name, m_return, link, [tee.emitter])
