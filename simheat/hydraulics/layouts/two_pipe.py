"""Two-pipe circuits: direct return and reverse return along a floor's run.

- Direct return: the return header runs back beside the supply header, so the
  first emitter has the shortest loop and the last the longest.
- Reverse return: the return header starts at the first emitter and runs with
  the flow to the last, then back to the riser, so every emitter's loop through
  the headers has the same length.
"""

from __future__ import annotations

import numpy as np

from simheat.hydraulics.layouts.builder import Builder
from simheat.hydraulics.layouts.drawing import EMITTER_Y, SUPPLY_Y, floor_y, tail_lane
from simheat.hydraulics.layouts.records import Along
from simheat.hydraulics.network import LINE_RETURN, LINE_SUPPLY
from simheat.scenario.model import FloorRoute, PipeSpec, Tee


def direct_circuit(
    b: Builder,
    stops: list[tuple[Tee, float]],
    header: PipeSpec,
    branch: PipeSpec,
    supply_start: int,
    return_start: int,
    index: int,
    x0: float = 0.0,
    direction: float = 1.0,
) -> None:
    """A direct-return pair of headers through ``stops`` in flow order.

    Parameters
    ----------
    b : Builder
        The network under construction. [-]
    stops : list of (Tee, float)
        Tees in flow order with the header length from the previous stop. [m]
    header, branch : PipeSpec
        Pipe types of the headers and the branches. [-]
    supply_start, return_start : int
        Nodes where the circuit's supply header starts and its return ends. [-]
    index : int
        Route index of the floor (for drawing). [-]
    x0, direction : float
        Position of the start along the run (also its drawing position) and
        the direction the circuit runs (+1 forward, -1 back along the run).
        [m], [-]
    """
    s = b.scenario
    y = floor_y(index)
    served = [t.emitter for t, _ in stops]
    # Each stop's stretch of the run, from the previous stop (x0 first) to it.
    forward = direction > 0.0
    stretches = []
    previous = x0
    for tee, _ in stops:
        here = b.geometry.tee_position_m[tee.emitter]
        stretches.append((previous, here))
        previous = here
    supply_nodes = []
    node = supply_start
    x = x0
    for i, (tee, length) in enumerate(stops):
        e = s.emitters[tee.emitter]
        x += direction * length
        node = b.pipe(
            f"header:supply:{e.id}",
            node,
            length,
            header,
            b.header_fittings(),
            LINE_SUPPLY,
            e.room,
            role="header",
            flow_kg_s=b.flow(served[i:]),
            end_xy=(x, y + SUPPLY_Y),
            end_height_m=b.geometry.tee_height(index, tee),
            along=Along(index, *stretches[i], forward),
        )
        supply_nodes.append(node)
        b.count["tee"] += 1
    return_nodes = []
    downstream = return_start
    position = b.distance(return_start)
    x = b.xy(return_start)[0]
    for i, (tee, length) in enumerate(stops):
        e = s.emitters[tee.emitter]
        position += length
        x = (x0 if i == 0 else x) + direction * length
        if length > 0.0:
            name = f"header:return:{e.id}"
            upstream = b.node(
                name + ":start",
                LINE_RETURN,
                position,
                (x, y),
                b.geometry.tee_height(index, tee),
            )
            b.pipe(
                name,
                upstream,
                length,
                header,
                b.header_fittings(),
                LINE_RETURN,
                e.room,
                role="header",
                flow_kg_s=b.flow(served[i:]),
                end=downstream,
                along=Along(index, *stretches[i][::-1], not forward),
            )
            downstream = upstream
        return_nodes.append(downstream)
        b.count["tee"] += 1
    for (tee, _), sup, ret in zip(stops, supply_nodes, return_nodes, strict=True):
        b.emitter(
            tee.emitter,
            sup,
            ret,
            2.0 * tee.branch_length_m,
            branch,
            b.emitter_fittings(),
            (b.xy(sup)[0], y + EMITTER_Y),
        )


def direct_floor(
    b: Builder, floor: FloorRoute, index: int, supply: int, ret: int
) -> None:
    """Direct return along the whole run of one floor.

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
    stops = [(t, t.header_length_m) for t in floor.tees]
    direct_circuit(b, stops, floor.header_pipe, floor.branch_pipe, supply, ret, index)


def reverse_floor(
    b: Builder, floor: FloorRoute, index: int, supply: int, ret: int
) -> None:
    """Reverse return: the return header runs with the flow, then back.

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
    y = floor_y(index)
    header = floor.header_pipe
    served = [t.emitter for t in floor.tees]
    supply_nodes = []
    node = supply
    x = 0.0
    for i, tee in enumerate(floor.tees):
        e = s.emitters[tee.emitter]
        x += tee.header_length_m
        node = b.pipe(
            f"header:supply:{e.id}",
            node,
            tee.header_length_m,
            header,
            b.header_fittings(),
            LINE_SUPPLY,
            e.room,
            role="header",
            flow_kg_s=b.flow(served[i:]),
            end_xy=(x, y + SUPPLY_Y),
            end_height_m=b.geometry.tee_height(index, tee),
            along=Along(index, x - tee.header_length_m, x),
        )
        supply_nodes.append(node)
        b.count["tee"] += 1
    base_m = b.distance(ret)
    positions = np.cumsum([t.header_length_m for t in floor.tees])
    total_m = float(positions[-1])
    first_room = s.emitters[floor.tees[0].emitter].room
    far_end = b.node(
        f"floor{floor.floor}:return:far_end",
        LINE_RETURN,
        base_m + total_m,
        (total_m, y),
        b.geometry.tee_height(index, floor.tees[-1]),
    )
    b.pipe(
        f"floor{floor.floor}:return:back",
        far_end,
        total_m,
        header,
        b.header_fittings(),
        LINE_RETURN,
        first_room,
        role="header",
        flow_kg_s=b.flow(served),
        end=ret,
        along=Along(index, total_m, 0.0, False),
        via=tail_lane(b.xy(far_end), b.xy(ret)),
    )
    nodes = [far_end]
    for i in range(len(floor.tees) - 2, -1, -1):
        length = float(positions[i + 1] - positions[i])
        downstream = nodes[-1]
        if length > 0.0:
            e = s.emitters[floor.tees[i].emitter]
            name = f"header:return:{e.id}"
            upstream = b.node(
                name + ":start",
                LINE_RETURN,
                base_m + positions[i],
                (positions[i], y),
                b.geometry.tee_height(index, floor.tees[i]),
            )
            b.pipe(
                name,
                upstream,
                length,
                header,
                b.header_fittings(),
                LINE_RETURN,
                e.room,
                role="header",
                flow_kg_s=b.flow(served[: i + 1]),
                end=downstream,
                along=Along(index, float(positions[i]), float(positions[i + 1])),
            )
            downstream = upstream
        nodes.append(downstream)
    b.count["tee"] += len(floor.tees)
    for tee, sup, r in zip(floor.tees, supply_nodes, nodes[::-1], strict=True):
        b.emitter(
            tee.emitter,
            sup,
            r,
            2.0 * tee.branch_length_m,
            floor.branch_pipe,
            b.emitter_fittings(),
            (b.xy(sup)[0], y + EMITTER_Y),
        )
