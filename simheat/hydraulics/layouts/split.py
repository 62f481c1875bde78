"""Split direct return: two direct-return circuits from one supply/return manifold.

The manifold sits on the floor's run (at its start unless given) and is fed by a
supply/return pair along the run from the riser. The two circuits leave it in
opposite directions and meet at the split point, given or chosen so that both
carry about the same design load (see :func:`simheat.resolve.route.split_run`).
"""

from __future__ import annotations

from simheat.hydraulics.layouts.builder import Builder
from simheat.hydraulics.layouts.circuits import circuit_return
from simheat.hydraulics.layouts.drawing import SUPPLY_Y, floor_y
from simheat.hydraulics.layouts.records import Along
from simheat.hydraulics.layouts.two_pipe import direct_circuit
from simheat.hydraulics.network import LINE_RETURN, LINE_SUPPLY
from simheat.resolve.route import split_run
from simheat.scenario.circuits import SPLIT_SIDES, manifold_circuit
from simheat.scenario.model import FloorRoute


def manifold_pair(
    b: Builder,
    floor: FloorRoute,
    index: int,
    supply: int,
    ret: int,
    feed_m: float,
    manifold_x: float,
    connections: int,
) -> tuple[int, int]:
    """Supply/return pair from the floor's start to its manifold; the manifold ends.

    ``connections`` circuits leave the manifold bar; each counts one manifold
    connection on its supply and one on its return.

    Parameters
    ----------
    b : Builder
        The network under construction. [-]
    floor : FloorRoute
        The floor's run. [-]
    index : int
        Route index of the floor (for drawing). [-]
    supply, ret : int
        Supply and return nodes at the floor's start. [-]
    feed_m : float
        Pipe distance from the floor's start to the manifold. [m]
    manifold_x : float
        Position of the manifold along the run (also its drawing position). [m]
    connections : int
        Circuits leaving the manifold bar. [-]

    Returns
    -------
    tuple of int
        The manifold's supply and return nodes.
    """
    y = floor_y(index)
    flow = b.flow(t.emitter for t in floor.tees)
    fittings = {"elbow": b.table.elbows_per_header_segment}
    name = f"floor{floor.floor}:manifold"
    along = b.geometry.shorter_along(index, 0.0, manifold_x)
    height = b.geometry.run_height(index, manifold_x)
    m_supply = b.pipe(
        f"{name}:supply",
        supply,
        feed_m,
        floor.header_pipe,
        fittings,
        LINE_SUPPLY,
        -1,
        role="manifold_feed",
        flow_kg_s=flow,
        end_xy=(manifold_x, y + SUPPLY_Y),
        end_height_m=height,
        along=along,
    )
    if feed_m > 0.0:
        m_return = b.node(
            f"{name}:return:end",
            LINE_RETURN,
            b.distance(ret) + feed_m,
            (manifold_x, y),
            height,
        )
        b.pipe(
            f"{name}:return",
            m_return,
            feed_m,
            floor.header_pipe,
            fittings,
            LINE_RETURN,
            -1,
            role="manifold_feed",
            flow_kg_s=flow,
            end=ret,
            along=Along(index, manifold_x, 0.0, not along.goes_forward),
        )
    else:
        m_return = ret
    b.count["manifold_connection"] += 2 * connections
    return m_supply, m_return


def split_floor(
    b: Builder, floor: FloorRoute, index: int, supply: int, ret: int
) -> None:
    """Split direct return on one floor.

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
    run = split_run(floor, b.design_flow, floor.where)
    m_supply, m_return = manifold_pair(
        b,
        floor,
        index,
        supply,
        ret,
        run.feed_m,
        run.manifold_m,
        2 if run.back else 1,
    )
    for side, stops, direction in zip(
        SPLIT_SIDES, (run.ahead, run.back), (1.0, -1.0), strict=True
    ):
        if not stops:
            continue
        first = len(b.links)
        direct_circuit(
            b,
            list(stops),
            floor.header_pipe,
            floor.branch_pipe,
            m_supply,
            m_return,
            index,
            x0=run.manifold_m,
            direction=direction,
        )
        add_manifold_connections(b, stops[0][0].emitter)
        served = [t.emitter for t, _ in stops]
        circuit_return(b, manifold_circuit(floor.floor, side), m_return, first, served)
    mark_split(b, run, index, floor.closing_length_m is not None)


def mark_split(b: Builder, run, index: int, ring: bool) -> None:
    """Mark where the two circuits of a split direct return divide the run.

    On an open run they divide at the manifold; on a ring they meet between the
    last emitters of the two circuits, which the unrolled drawing shows at both
    ends of the run.

    Parameters
    ----------
    b : Builder
        The network under construction. [-]
    run : SplitRun
        The floor's split (:func:`simheat.resolve.route.split_run`). [-]
    index : int
        Route index of the floor (for drawing). [-]
    ring : bool
        Whether the run closes on itself. [-]
    """
    if not run.back:
        return
    y = floor_y(index)
    if not ring:
        b.mark("split", "split at manifold", (run.manifold_m, y))
        return
    ahead_end = run.manifold_m + sum(length for _, length in run.ahead)
    back_end = run.manifold_m - sum(length for _, length in run.back)
    for x in (ahead_end, back_end):
        b.mark("split", "circuits meet", (x, y))


def add_manifold_connections(b: Builder, emitter: int) -> None:
    """Charge a circuit's two manifold connections to its first header segments.

    When the first tee sits at the manifold (no header segment), the emitter's
    own link carries them.

    Parameters
    ----------
    b : Builder
        The network under construction. [-]
    emitter : int
        Index of the circuit's first emitter. [-]
    """
    e_id = b.scenario.emitters[emitter].id
    names = {f"header:supply:{e_id}", f"header:return:{e_id}"}
    segments = [spec for spec in b.links if spec.name in names]
    if not segments:
        segments = [spec for spec in b.links if spec.name == f"emitter:{e_id}"] * 2
    for spec in segments:
        spec.fittings["manifold_connection"] = (
            spec.fittings.get("manifold_connection", 0) + 1
        )
