"""Reverse return across the floors: one loop through every floor, or reverse risers.

Both schemes share the plant and the feed with the others, and join the floors
in reverse return themselves (so neither has a ``_floor_pumps`` variant, see
:data:`simheat.schemes.HOUSE_SCHEMES`):

- :func:`single_loop` (``reverse_return_single_loop``): the supply rises from
  the foot of the riser straight to the top floor, serves its emitters in route
  order, drops to the start of the floor below and serves its emitters, and so
  on down. The return starts at the first emitter served and follows the supply
  the same way, and from the lowest floor's last tee runs back along its run and
  down its riser to the plant. Every emitter's loop through the feed, the
  risers, the drops and the headers then has the same length:
  ``2 feed + sum of risers + 2 (runs and drops) + lowest run``, less nothing
  that depends on the emitter.
- :func:`reverse_risers` (``reverse_return_risers``): each floor in reverse
  return (:func:`~simheat.hydraulics.layouts.two_pipe.reverse_floor`) off a
  supply riser as usual; the return riser starts at the lowest floor, climbs
  past the others collecting their returns and drops from the top back to the
  plant. The floor nearest the plant on the supply is the farthest on the
  return, so every floor circuit sees twice the whole riser height in riser
  pipe.

A drop between floors is the floor's ``drop_length_m``, or back along its run
and down beside its riser when not given (then it passes the run's obstacles).

Circuits (:mod:`~simheat.hydraulics.layouts.circuits`): each floor of reverse
risers is a circuit ``floor<N>`` returning into the return riser; the single
loop is one circuit through the plant and has none that share a header.
"""

from __future__ import annotations

from simheat.hydraulics.layouts.assembly import floor_flow
from simheat.hydraulics.layouts.builder import Builder
from simheat.hydraulics.layouts.circuits import circuit_return
from simheat.hydraulics.layouts.drawing import (
    EMITTER_Y,
    RETURN_RISER_X,
    RETURN_TAIL_DY,
    SUPPLY_Y,
    floor_y,
    tail_lane,
)
from simheat.hydraulics.layouts.plant import feed, plant
from simheat.hydraulics.layouts.records import Along, BuiltLayout
from simheat.hydraulics.layouts.two_pipe import reverse_floor
from simheat.hydraulics.network import LINE_RETURN, LINE_SUPPLY
from simheat.resolve import ResolvedScenario
from simheat.resolve.route import tee_positions_m
from simheat.scenario.circuits import floor_circuit
from simheat.scenario.model import Scenario

__all__ = ["reverse_risers", "single_loop"]

# Reverse risers drawing: the return riser climbs at RETURN_RISER_X, each floor's
# return tail joining it from the left; the drop from its top runs up a little,
# left past the tails and down to the foot of the riser, drawn at RETURN_FOOT_XY
# below the lowest floor's tail lane.
RETURN_DROP_X = RETURN_RISER_X - 0.9
RETURN_DROP_UP = 0.3
RETURN_FOOT_XY = (RETURN_DROP_X, floor_y(0) - 2.0 * RETURN_TAIL_DY)
# Single loop drawing: a floor below the top one starts right of the riser (the
# drop feeds it, not the riser), its supply drop comes down the right of every
# run and in from above its supply line, its return drop back under the run
# above and down between the riser and the supply drop. No pipe lies on
# another and the drops cross nothing.
DROP_SUPPLY_X = 0.6
DROP_RETURN_X = 0.3
DROP_LANE_DY = 0.35  # the supply drop's lane above the floor's supply line
DROP_RIGHT_DX = 1.3  # right of the last tee, clear of its emitter box


def _riser_pipe(
    b: Builder,
    name: str,
    start: int,
    length_m: float,
    line: int,
    flow_kg_s: float,
    *,
    end: int | None = None,
    end_xy: tuple[float, float] | None = None,
    end_height_m: float | None = None,
    along: Along | None = None,
    via: tuple[tuple[float, float], ...] = (),
) -> int:
    """A riser or drop pipe with the riser's elbows; returns its far node."""
    return b.pipe(
        name,
        start,
        length_m,
        b.scenario.route.feed_pipe,
        {"elbow": b.table.elbows_per_riser},
        line,
        -1,
        role="riser",
        flow_kg_s=flow_kg_s,
        end=end,
        end_xy=end_xy,
        end_height_m=end_height_m,
        along=along,
        via=via,
    )


def _drop(b: Builder, index: int) -> tuple[float, Along | None]:
    """Length of the drop from floor ``index``'s last tee, and its stretch of run."""
    floor = b.scenario.route.floors[index]
    last_m = float(tee_positions_m(floor)[-1])
    if floor.drop_length_m is not None:
        return floor.drop_length_m, None
    return last_m + floor.riser_length_m, Along(index, last_m, 0.0, False)


def single_loop(
    scenario: Scenario, resolved: ResolvedScenario, scheme: str
) -> BuiltLayout:
    """One reverse-return loop through every floor, top floor first.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    resolved : ResolvedScenario
        Its derived quantities. [-]
    scheme : str
        Scheme name. [-]

    Returns
    -------
    BuiltLayout
        The built scheme.
    """
    b = Builder(scenario, resolved)
    s = scenario
    floors = s.route.floors
    order = list(range(len(floors)))[::-1]  # top floor first
    served = [t.emitter for i in order for t in floors[i].tees]
    total = b.flow(served)
    reference, plant_supply, _ = plant(b, resolved.pump, total)
    foot_supply, foot_return = feed(b, plant_supply, reference, total, 0.0)
    top = order[0]
    right_x = max(float(tee_positions_m(f)[-1]) for f in floors) + DROP_RIGHT_DX
    node = _riser_pipe(
        b,
        "riser:supply",
        foot_supply,
        sum(f.riser_length_m for f in floors),
        LINE_SUPPLY,
        total,
        end_xy=(0.0, floor_y(top) + SUPPLY_Y),
        end_height_m=b.geometry.floor_heights_m[top],
    )
    # Supply: along each floor's run, then down the drop to the next floor.
    supply_nodes: dict[int, int] = {}
    done = 0
    for step, index in enumerate(order):
        floor = floors[index]
        y = floor_y(index)
        x = 0.0
        for tee in floor.tees:
            e = s.emitters[tee.emitter]
            x += tee.header_length_m
            node = b.pipe(
                f"header:supply:{e.id}",
                node,
                tee.header_length_m,
                floor.header_pipe,
                b.header_fittings(),
                LINE_SUPPLY,
                e.room,
                role="header",
                flow_kg_s=b.flow(served[done:]),
                end_xy=(x, y + SUPPLY_Y),
                end_height_m=b.geometry.tee_height(index, tee),
                along=Along(index, x - tee.header_length_m, x),
            )
            supply_nodes[tee.emitter] = node
            done += 1
            b.count["tee"] += 1
        if step + 1 < len(order):
            below = order[step + 1]
            length, along = _drop(b, index)
            lane_y = floor_y(below) + SUPPLY_Y + DROP_LANE_DY
            node = _riser_pipe(
                b,
                f"floor{floor.floor}:drop:supply",
                node,
                length,
                LINE_SUPPLY,
                b.flow(served[done:]),
                end_xy=(DROP_SUPPLY_X, floor_y(below) + SUPPLY_Y),
                end_height_m=b.geometry.floor_heights_m[below],
                along=along,
                via=(
                    (right_x, y + SUPPLY_Y),
                    (right_x, lane_y),
                    (DROP_SUPPLY_X, lane_y),
                ),
            )
    # Return: from the first emitter served, the same way, then back to the plant.
    return_nodes = _single_loop_return(b, order, served, foot_return)
    for index in order:
        floor = floors[index]
        for tee in floor.tees:
            sup = supply_nodes[tee.emitter]
            b.emitter(
                tee.emitter,
                sup,
                return_nodes[tee.emitter],
                2.0 * tee.branch_length_m,
                floor.branch_pipe,
                b.emitter_fittings(),
                (b.xy(sup)[0], floor_y(index) + EMITTER_Y),
            )
            b.count["tee"] += 1
    return b.finish(scheme, reference)


def _single_loop_return(
    b: Builder, order: list[int], served: list[int], foot_return: int
) -> dict[int, int]:
    """The return line of the single loop; the return node of each emitter.

    Built from the plant's end backwards (each pipe's far node exists before
    the pipe that flows into it): down the lowest floor's riser, back along its
    run, then tee by tee and drop by drop against the flow up to the first
    emitter served.
    """
    s = b.scenario
    floors = s.route.floors
    lowest = order[-1]
    low = floors[lowest]
    last_m = float(tee_positions_m(low)[-1])
    height = b.geometry.floor_heights_m[lowest]
    y = floor_y(lowest)
    downstream = foot_return
    if low.riser_length_m > 0.0:
        start = b.node(
            f"floor{low.floor}:return:start",
            LINE_RETURN,
            b.distance(foot_return) + low.riser_length_m,
            (RETURN_RISER_X, y),
            height,
        )
        _riser_pipe(
            b,
            f"riser{low.floor}:return",
            start,
            low.riser_length_m,
            LINE_RETURN,
            b.flow(served),
            end=foot_return,
        )
        downstream = start
    far = b.node(
        f"floor{low.floor}:return:far_end",
        LINE_RETURN,
        b.distance(downstream) + last_m,
        (last_m, y),
        b.geometry.tee_height(lowest, low.tees[-1]),
    )
    b.pipe(
        f"floor{low.floor}:return:back",
        far,
        last_m,
        low.header_pipe,
        b.header_fittings(),
        LINE_RETURN,
        s.emitters[low.tees[0].emitter].room,
        role="header",
        flow_kg_s=b.flow(served),
        end=downstream,
        along=Along(lowest, last_m, 0.0, False),
        via=tail_lane(b.xy(far), b.xy(downstream)),
    )
    nodes: dict[int, int] = {}
    downstream = far
    upstream_count = len(served)  # emitters upstream of `downstream`, inclusive
    for step in range(len(order) - 1, -1, -1):
        index = order[step]
        floor = floors[index]
        x = tee_positions_m(floor)
        y = floor_y(index)
        for i in range(len(floor.tees) - 1, -1, -1):
            tee = floor.tees[i]
            nodes[tee.emitter] = downstream
            upstream_count -= 1
            if i == 0:
                break
            length = float(x[i] - x[i - 1])
            if length > 0.0:
                prev = floor.tees[i - 1]
                name = f"header:return:{s.emitters[prev.emitter].id}"
                upstream = b.node(
                    name + ":start",
                    LINE_RETURN,
                    b.distance(downstream) + length,
                    (float(x[i - 1]), y),
                    b.geometry.tee_height(index, prev),
                )
                b.pipe(
                    name,
                    upstream,
                    length,
                    floor.header_pipe,
                    b.header_fittings(),
                    LINE_RETURN,
                    s.emitters[prev.emitter].room,
                    role="header",
                    flow_kg_s=b.flow(served[:upstream_count]),
                    end=downstream,
                    along=Along(index, float(x[i - 1]), float(x[i])),
                )
                downstream = upstream
        if step == 0:
            break
        # From the floor above's last tee: its drop, then this floor's first
        # stretch to the first tee.
        above = order[step - 1]
        first = floor.tees[0]
        start_node = downstream
        if first.header_length_m > 0.0:
            name = f"floor{floor.floor}:return:to_first_tee"
            start_node = b.node(
                f"floor{floor.floor}:return:start",
                LINE_RETURN,
                b.distance(downstream) + first.header_length_m,
                (DROP_RETURN_X, y),
                b.geometry.floor_heights_m[index],
            )
            b.pipe(
                name,
                start_node,
                first.header_length_m,
                floor.header_pipe,
                b.header_fittings(),
                LINE_RETURN,
                s.emitters[first.emitter].room,
                role="header",
                flow_kg_s=b.flow(served[:upstream_count]),
                end=downstream,
                along=Along(index, 0.0, float(x[0])),
            )
        length, along = _drop(b, above)
        up = floors[above]
        top_node = b.node(
            f"floor{up.floor}:drop:return:start",
            LINE_RETURN,
            b.distance(start_node) + length,
            (float(tee_positions_m(up)[-1]), floor_y(above)),
            b.geometry.tee_height(above, up.tees[-1]),
        )
        lane_y = floor_y(above) - RETURN_TAIL_DY
        _riser_pipe(
            b,
            f"floor{up.floor}:drop:return",
            top_node,
            length,
            LINE_RETURN,
            b.flow(served[:upstream_count]),
            end=start_node,
            along=along,
            via=(
                (b.xy(top_node)[0], lane_y),
                (DROP_RETURN_X, lane_y),
                (DROP_RETURN_X, y),
            ),
        )
        downstream = top_node
    return nodes


def reverse_risers(
    scenario: Scenario, resolved: ResolvedScenario, scheme: str
) -> BuiltLayout:
    """Each floor in reverse return, the floors joined in reverse return on the risers.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    resolved : ResolvedScenario
        Its derived quantities. [-]
    scheme : str
        Scheme name. [-]

    Returns
    -------
    BuiltLayout
        The built scheme.
    """
    b = Builder(scenario, resolved)
    floors = scenario.route.floors
    flows = [floor_flow(b, f) for f in floors]
    total = sum(flows)
    reference, plant_supply, _ = plant(b, resolved.pump, total)
    rise_m = sum(f.riser_length_m for f in floors)
    ends = ((0.0, floor_y(0) + SUPPLY_Y), RETURN_FOOT_XY) if rise_m > 0.0 else None
    foot_supply, foot_return = feed(
        b, plant_supply, reference, total, 0.0, ends_xy=ends
    )
    # Return riser first, from the plant's end back up: the drop from the top,
    # then down the riser floor by floor (each pipe's far node exists first).
    top = len(floors) - 1
    returns = [foot_return] * len(floors)
    if rise_m > 0.0:
        top_y = floor_y(top)
        node = b.node(
            "return_riser:top",
            LINE_RETURN,
            b.distance(foot_return) + rise_m,
            (RETURN_RISER_X, top_y),
            b.geometry.floor_heights_m[top],
        )
        _riser_pipe(
            b,
            "return_riser:drop",
            node,
            rise_m,
            LINE_RETURN,
            total,
            end=foot_return,
            via=(
                (RETURN_RISER_X, top_y + RETURN_DROP_UP),
                (RETURN_DROP_X, top_y + RETURN_DROP_UP),
            ),
        )
        returns[top] = node
        for index in range(top, 0, -1):
            floor = floors[index]
            below = node
            if floor.riser_length_m > 0.0:
                below = b.node(
                    f"riser{floor.floor}:return:start",
                    LINE_RETURN,
                    b.distance(node) + floor.riser_length_m,
                    (RETURN_RISER_X, floor_y(index - 1)),
                    b.geometry.floor_heights_m[index - 1],
                )
                _riser_pipe(
                    b,
                    f"riser{floor.floor}:return",
                    below,
                    floor.riser_length_m,
                    LINE_RETURN,
                    sum(flows[:index]),
                    end=node,
                )
            returns[index - 1] = below
            node = below
    supply = foot_supply
    for index, floor in enumerate(floors):
        supply = _riser_pipe(
            b,
            f"riser{floor.floor}:supply",
            supply,
            floor.riser_length_m,
            LINE_SUPPLY,
            sum(flows[index:]),
            end_xy=(b.xy(supply)[0], floor_y(index) + SUPPLY_Y),
            end_height_m=b.geometry.floor_heights_m[index],
        )
        first = len(b.links)
        reverse_floor(b, floor, index, supply, returns[index])
        circuit_return(
            b,
            floor_circuit(floor.floor),
            returns[index],
            first,
            [t.emitter for t in floor.tees],
        )
    return b.finish(scheme, reference)
