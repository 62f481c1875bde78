"""The pieces every scheme starts from: plant, feed, risers, low-loss header pipe.

The plant is the pump on the return before the heat source, with the expansion
vessel at the pump's suction as the network's pressure reference. The feed runs
from the plant to the foot of the riser; risers climb between floors. Heights are
above the plant (its nodes at 0).
"""

from __future__ import annotations

from simheat.hydraulics.layouts.builder import Builder
from simheat.hydraulics.layouts.drawing import (
    PLANT_PUMP_OUTLET_XY,
    PLANT_RETURN_XY,
    PLANT_SUPPLY_XY,
    RETURN_RISER_X,
    SUPPLY_Y,
    floor_y,
)
from simheat.hydraulics.layouts.records import PLANT_PUMP_LINK, LinkSpec
from simheat.hydraulics.network import LINE_OTHER, LINE_RETURN, LINE_SUPPLY, LINK_SOURCE
from simheat.resolve import ResolvedPump
from simheat.scenario.model import PipeSpec, Scenario

SOURCE_CONNECTION_LENGTH_M = 0.5  # the heat source's own pipe stubs [m]
# Whether a pump gets a check valve when the scenario does not say. The plant's
# pump (alone, or the primary pump) is the only pump in its loop: nothing can
# drive water backwards through it, so it gets none. Floor pumps are pumps in
# parallel off one low-loss header; each such pump is fitted with a non-return
# valve so that a running circuit cannot draw water backwards through an idle
# one and hot water does not rise by gravity through it (common trade practice,
# from memory). A check valve adds no loss to forward flow, so the default
# changes nothing while every pump runs forward.
PLANT_PUMP_CHECK_VALVE = False
FLOOR_PUMP_CHECK_VALVE = True
# Bore of a low-loss header against its connections' bore when not given
# (common trade practice, from memory; see low_loss_header_pipe). [-]
LOW_LOSS_HEADER_BORE_RATIO = 3.0


def plant(
    b: Builder,
    pump: ResolvedPump,
    flow_kg_s: float,
    origin: tuple[float, float] = (0.0, 0.0),
) -> tuple[int, int, int]:
    """Pump on the return before the source; return (reference, supply, return).

    The expansion vessel sits at the pump's suction, the network's pressure
    reference. The pump has no check valve unless the scenario asks for one
    (``PLANT_PUMP_CHECK_VALVE``).

    Parameters
    ----------
    b : Builder
        The network under construction. [-]
    pump : ResolvedPump
        The plant's pump. [-]
    flow_kg_s : float
        Design flow through the source. [kg/s]
    origin : (float, float), optional
        Offset of the plant's drawing positions. [drawing units]

    Returns
    -------
    tuple of int
        The pump's suction (the reference node), the source's outlet and the
        pump's outlet.
    """

    def at(xy: tuple[float, float]) -> tuple[float, float]:
        return (xy[0] + origin[0], xy[1] + origin[1])

    plant_return = b.node("plant:return", LINE_RETURN, 0.0, at(PLANT_RETURN_XY))
    pump_out = b.node("plant:pump_outlet", LINE_OTHER, 0.0, at(PLANT_PUMP_OUTLET_XY))
    plant_supply = b.node("plant:supply", LINE_SUPPLY, 0.0, at(PLANT_SUPPLY_XY))
    b.pump(
        PLANT_PUMP_LINK, plant_return, pump_out, pump, flow_kg_s, PLANT_PUMP_CHECK_VALVE
    )
    b.add(
        LinkSpec(
            "source",
            pump_out,
            plant_supply,
            LINK_SOURCE,
            "source",
            length_m=SOURCE_CONNECTION_LENGTH_M,
            pipe=b.scenario.route.feed_pipe,
            fittings={"heat_source": 1},
            extra_volume_m3=b.scenario.source.water_volume_m3
            + b.scenario.source.buffer_volume_m3,
            design_flow_kg_s=flow_kg_s,
            sized=False,
        )
    )
    return plant_return, plant_supply, pump_out


def feed(
    b: Builder,
    plant_supply: int,
    plant_return: int,
    flow_kg_s: float,
    end_x: float,
    *,
    ends_xy: tuple[tuple[float, float], tuple[float, float]] | None = None,
    via: tuple[tuple[tuple[float, float], ...], tuple[tuple[float, float], ...]] = (
        (),
        (),
    ),
) -> tuple[int, int]:
    """Feed pair from the plant to the foot of the riser; return its far ends.

    Parameters
    ----------
    b : Builder
        The network under construction. [-]
    plant_supply, plant_return : int
        The plant's supply and return nodes. [-]
    flow_kg_s : float
        Design flow. [kg/s]
    end_x : float
        Drawing position of the riser's foot. [drawing units]
    ends_xy : pair of (float, float), optional
        Drawing positions of the supply and return ends, when not at the riser's
        foot. [drawing units]
    via : pair of tuple of (float, float), optional
        Drawing waypoints of the supply and the return pipe. [drawing units]

    Returns
    -------
    tuple of int
        Supply and return nodes at the foot of the riser.
    """
    s = b.scenario
    pipe = s.route.feed_pipe
    fittings = {"elbow": b.table.elbows_per_feed}
    length = s.route.feed_length_m
    y0 = floor_y(0)
    if ends_xy is None:
        ends_xy = ((end_x, y0 + SUPPLY_Y), (end_x + RETURN_RISER_X, y0))
    supply_end = b.pipe(
        "feed:supply",
        plant_supply,
        length,
        pipe,
        fittings,
        LINE_SUPPLY,
        -1,
        role="feed",
        flow_kg_s=flow_kg_s,
        end_xy=ends_xy[0],
        via=via[0],
        end_height_m=b.geometry.feed_end_height_m,
    )
    return_end = b.node(
        "feed:return:start",
        LINE_RETURN,
        length,
        ends_xy[1],
        b.geometry.feed_end_height_m,
    )
    b.pipe(
        "feed:return",
        return_end,
        length,
        pipe,
        fittings,
        LINE_RETURN,
        -1,
        role="feed",
        flow_kg_s=flow_kg_s,
        end=plant_return,
        via=via[1],
    )
    return supply_end, return_end


def riser_pair(
    b: Builder,
    name: str,
    supply: int,
    ret: int,
    length_m: float,
    flow_kg_s: float,
    top_y: float,
    top_height_m: float,
) -> tuple[int, int]:
    """Supply and return riser of ``length_m`` from (supply, ret); return the tops.

    Parameters
    ----------
    b : Builder
        The network under construction. [-]
    name : str
        Link name prefix. [-]
    supply, ret : int
        Nodes at the riser's foot. [-]
    length_m : float
        Riser length; none is added when 0. [m]
    flow_kg_s : float
        Design flow up the riser. [kg/s]
    top_y : float
        Drawing height of the floor it reaches. [drawing units]
    top_height_m : float
        Height of its top above the plant. [m]

    Returns
    -------
    tuple of int
        Supply and return nodes at the top.
    """
    if length_m <= 0.0:
        return supply, ret
    pipe = b.scenario.route.feed_pipe
    fittings = {"elbow": b.table.elbows_per_riser}
    sx = b.xy(supply)[0]
    rx = b.xy(ret)[0]
    top_supply = b.pipe(
        f"{name}:supply",
        supply,
        length_m,
        pipe,
        fittings,
        LINE_SUPPLY,
        -1,
        role="riser",
        flow_kg_s=flow_kg_s,
        end_xy=(sx, top_y + SUPPLY_Y),
        end_height_m=top_height_m,
    )
    top_return = b.node(
        f"{name}:return:start",
        LINE_RETURN,
        b.distance(ret) + length_m,
        (rx, top_y),
        top_height_m,
    )
    b.pipe(
        f"{name}:return",
        top_return,
        length_m,
        pipe,
        fittings,
        LINE_RETURN,
        -1,
        role="riser",
        flow_kg_s=flow_kg_s,
        end=ret,
    )
    return top_supply, top_return


def low_loss_header_pipe(scenario: Scenario) -> PipeSpec:
    """Pipe of the low-loss header: given, or three times the feed bore.

    Parameters
    ----------
    scenario : Scenario
        The house (its ``[layout]`` and feed pipe).

    Returns
    -------
    PipeSpec
        The header's pipe type.

    Notes
    -----
    A header bore of about three times its connections' bore keeps the velocity
    in it near a tenth of theirs, so it adds almost no pressure difference
    between the primary and secondary circuits (common trade practice, from
    memory).
    """
    given = scenario.layout.low_loss_header_pipe
    if given is not None:
        return given
    f = scenario.route.feed_pipe
    bore = LOW_LOSS_HEADER_BORE_RATIO * f.inner_diameter_m
    return PipeSpec(
        "low_loss_header",
        bore,
        f.roughness_m,
        bore + (f.outer_diameter_m - f.inner_diameter_m),
    )
