"""Whole-house assembly: every floor off one shared pump, or one pump per floor.

A scheme is a floor circuit (:data:`FloorCircuit`, one per scheme family) put
together in one of two ways:

- :func:`shared_pump`: every floor's circuit hangs off one riser and the plant's
  one pump drives them all.
- :func:`floor_pumps`: the plant's pump drives a primary loop to a low-loss
  header; each floor's circuit has its own pump behind the header.
"""

from __future__ import annotations

from collections.abc import Callable

from simheat.hydraulics.layouts.builder import Builder
from simheat.hydraulics.layouts.circuits import circuit_return
from simheat.hydraulics.layouts.drawing import (
    FLOOR_PUMP_OUTLET_X,
    LOW_LOSS_HEADER_X,
    RETURN_STUB_DY,
    SUPPLY_Y,
    floor_flow_lane_x,
    floor_pump_plant_origin,
    floor_pump_run_y,
    floor_return_lane_x,
    floor_y,
)
from simheat.hydraulics.layouts.plant import (
    FLOOR_PUMP_CHECK_VALVE,
    feed,
    low_loss_header_pipe,
    plant,
    riser_pair,
)
from simheat.hydraulics.layouts.records import BuiltLayout, LinkSpec, floor_pump_link
from simheat.hydraulics.network import LINE_RETURN, LINE_SUPPLY, LINK_PIPE
from simheat.resolve import ResolvedScenario
from simheat.scenario.circuits import PRIMARY_CIRCUIT, floor_circuit
from simheat.scenario.model import FloorRoute, Scenario

FloorCircuit = Callable[[Builder, FloorRoute, int, int, int], None]
"""Builds one floor's circuit: ``(builder, floor, floor index, supply, return)``."""


def floor_flow(b: Builder, floor: FloorRoute) -> float:
    """Design flow of all emitters on a floor.

    Parameters
    ----------
    b : Builder
        The network under construction (its design flows). [-]
    floor : FloorRoute
        The floor. [-]

    Returns
    -------
    float
        Sum of the floor's emitters' design flows. [kg/s]
    """
    return b.flow(t.emitter for t in floor.tees)


def shared_pump(
    scenario: Scenario,
    resolved: ResolvedScenario,
    scheme: str,
    circuit: FloorCircuit,
) -> BuiltLayout:
    """Every floor's circuit off one riser, driven by the plant's one pump.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    resolved : ResolvedScenario
        Its derived quantities. [-]
    scheme : str
        Scheme name. [-]
    circuit : FloorCircuit
        Builds each floor's circuit. [-]

    Returns
    -------
    BuiltLayout
        The built scheme.
    """
    b = Builder(scenario, resolved)
    floors = scenario.route.floors
    total = sum(floor_flow(b, f) for f in floors)
    reference, plant_supply, _ = plant(b, resolved.pump, total)
    supply, ret = feed(b, plant_supply, reference, total, 0.0)
    above = total
    for index, floor in enumerate(floors):
        supply, ret = riser_pair(
            b,
            f"riser{floor.floor}",
            supply,
            ret,
            floor.riser_length_m,
            above,
            floor_y(index),
            b.geometry.floor_heights_m[index],
        )
        b.mark("floor", f"floor {floor.floor}", (0.0, floor_y(index)))
        first = len(b.links)
        circuit(b, floor, index, supply, ret)
        circuit_return(b, floor_circuit(floor.floor), ret, first, _served(floor))
        above -= floor_flow(b, floor)
    return b.finish(scheme, reference)


def floor_pumps(
    scenario: Scenario,
    resolved: ResolvedScenario,
    scheme: str,
    circuit: FloorCircuit,
) -> BuiltLayout:
    """Primary loop to a low-loss header; each floor's circuit with its own pump.

    The primary loop (source and primary pump) ends in a short, wide pipe (the
    low-loss header) at the foot of the riser. From the header's supply end each
    floor's pump drives its own flow pipe up to the floor and its circuit; each
    floor's return pipe ends at the header's return end. The header's small
    resistance decouples the circuits: a change in one hardly changes the
    pressure difference the others start from.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    resolved : ResolvedScenario
        Its derived quantities (primary and floor pumps). [-]
    scheme : str
        Scheme name. [-]
    circuit : FloorCircuit
        Builds each floor's circuit. [-]

    Returns
    -------
    BuiltLayout
        The built scheme.
    """
    b = Builder(scenario, resolved)
    floors = scenario.route.floors
    total = sum(floor_flow(b, f) for f in floors)
    origin = floor_pump_plant_origin(len(floors))
    reference, plant_supply, _ = plant(b, resolved.plant_pump(), total, origin)
    # Drawing: the header is a vertical bar from floor 0's supply line down to its
    # return line; the primary supply enters its top from the left, the primary
    # return leaves its bottom below every floor's return.
    top = (LOW_LOSS_HEADER_X, floor_y(0) + SUPPLY_Y)
    bottom = (LOW_LOSS_HEADER_X, floor_y(0))
    supply_x, supply_y = b.xy(plant_supply)
    return_x, _ = b.xy(reference)
    under = floor_y(0) - RETURN_STUB_DY * (len(floors) + 0.5)
    header_supply, header_return = feed(
        b,
        plant_supply,
        reference,
        total,
        LOW_LOSS_HEADER_X,
        ends_xy=(top, bottom),
        via=(
            ((supply_x, top[1]),),
            ((bottom[0], under), (return_x, under)),
        ),
    )
    b.add(
        LinkSpec(
            "low_loss_header",
            header_supply,
            header_return,
            LINK_PIPE,
            "low_loss_header",
            length_m=scenario.layout.low_loss_header_length_m,
            pipe=low_loss_header_pipe(scenario),
            fittings={"tee_run": 2},
            design_flow_kg_s=0.0,
            sized=False,
        )
    )
    b.count["low_loss_header"] += 1
    rise = 0.0
    for index, floor in enumerate(floors):
        rise += floor.riser_length_m
        first = len(b.links)
        supply, ret = _floor_pump_circuit(
            b, resolved, floor, index, rise, header_supply, header_return
        )
        b.mark("floor", f"floor {floor.floor}", (0.0, floor_y(index)))
        circuit(b, floor, index, supply, ret)
        name = floor_circuit(floor.floor)
        circuit_return(b, name, header_return, first, _served(floor))
    everyone = [t.emitter for floor in floors for t in floor.tees]
    circuit_return(b, PRIMARY_CIRCUIT, reference, 0, everyone)
    return b.finish(scheme, reference)


def _served(floor: FloorRoute) -> list[int]:
    """The emitters on a floor."""
    return [t.emitter for t in floor.tees]


def _floor_pump_circuit(
    b: Builder,
    resolved: ResolvedScenario,
    floor: FloorRoute,
    index: int,
    rise_m: float,
    header_supply: int,
    header_return: int,
) -> tuple[int, int]:
    """A floor's pump off the header and its flow and return pipes up to the floor.

    Returns the floor's supply and return nodes, where its circuit starts.
    """
    flow = floor_flow(b, floor)
    y = floor_y(index)
    run_y = floor_pump_run_y(index)
    outlet = b.node(
        f"floor{floor.floor}:pump_outlet",
        LINE_SUPPLY,
        b.distance(header_supply),
        (FLOOR_PUMP_OUTLET_X, run_y),
        b.height(header_supply),
    )
    b.pump(
        floor_pump_link(floor.floor),
        header_supply,
        outlet,
        resolved.floor_pump(floor.floor),
        flow,
        FLOOR_PUMP_CHECK_VALVE,
        via=((LOW_LOSS_HEADER_X, run_y),) if index else (),
    )
    lane_x = floor_flow_lane_x(index)
    pipe = b.scenario.route.feed_pipe
    fittings = {"elbow": b.table.elbows_per_riser, "tee_run": 1}
    supply = b.pipe(
        f"floor{floor.floor}:flow",
        outlet,
        rise_m,
        pipe,
        fittings,
        LINE_SUPPLY,
        -1,
        role="riser",
        flow_kg_s=flow,
        end_xy=(lane_x, y + SUPPLY_Y),
        via=((lane_x, run_y),),
        end_height_m=b.geometry.floor_heights_m[index],
    )
    if rise_m <= 0.0:
        return supply, header_return
    lane_x = floor_return_lane_x(index)
    stub_y = floor_y(0) - RETURN_STUB_DY * (index + 1)
    ret = b.node(
        f"floor{floor.floor}:return:start",
        LINE_RETURN,
        b.distance(header_return) + rise_m,
        (lane_x, y),
        b.geometry.floor_heights_m[index],
    )
    b.pipe(
        f"floor{floor.floor}:return",
        ret,
        rise_m,
        pipe,
        fittings,
        LINE_RETURN,
        -1,
        role="riser",
        flow_kg_s=flow,
        end=header_return,
        via=((lane_x, stub_y), (LOW_LOSS_HEADER_X, stub_y)),
    )
    return supply, ret
