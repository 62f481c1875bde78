"""The network builder every scheme shares: nodes, links, plant, feed and risers.

Links are collected as :class:`LinkSpec` records that keep what the network arrays
do not: the pipe type, the fitting counts, the role in the plan and the design
flow. :meth:`Builder.finish` sizes pipes when asked, turns fitting counts into
zeta with the scenario's fitting table and freezes everything into a
:class:`~simheat.hydraulics.network.Network` inside a :class:`BuiltLayout`.
"""

from __future__ import annotations

import math
from collections import Counter
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

from simheat.hydraulics import sizing
from simheat.hydraulics.fittings import FittingTable, fitting_table
from simheat.hydraulics.network import (
    LINE_OTHER,
    LINE_RETURN,
    LINE_SUPPLY,
    LINK_EMITTER,
    LINK_PIPE,
    LINK_PUMP,
    LINK_SOURCE,
    PUMP_MODE_NAMES,
    Network,
)
from simheat.physics.pipe_heat import pipe_loss_W_per_m_K
from simheat.scenario.model import FloorRoute, PipeSpec, Pump, Scenario, SizingLimits

PUMP_CASING_VOLUME_M3 = 0.2e-3  # water in a small circulator and its unions
SOURCE_CONNECTION_LENGTH_M = 0.5  # the heat source's own pipe stubs [m]
PUMP_MODE_CODES = {name: code for code, name in PUMP_MODE_NAMES.items()}
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
# Link name of the pump at the heat source: the only pump of a shared-pump scheme,
# the primary pump of a "_floor_pumps" scheme.
PLANT_PUMP_LINK = "pump"

# Schematic coordinates (drawing units, about metres along x).
# The plant is drawn below the foot of the riser.
PLANT_RETURN_XY = (-2.0, -1.8)
PLANT_PUMP_OUTLET_XY = (-1.0, -3.0)
PLANT_SUPPLY_XY = (0.0, -1.8)
RETURN_RISER_X = -0.6  # return riser drawn beside the supply riser
FLOOR_SPACING = 4.0  # vertical distance between floors' bands
SUPPLY_Y = 1.2  # supply line above the floor's return line
EMITTER_Y = 0.6  # emitter boxes between the lines
ONE_PIPE_EMITTER_Y = 2.2  # one-pipe emitters above the loop

# Link roles: which sizing rule applies and how the report groups pipe.
HEADER_ROLES = frozenset({"feed", "riser", "header", "loop", "bypass", "manifold_feed"})
BRANCH_ROLES = frozenset({"emitter", "home_run"})


@dataclass
class LinkSpec:
    """One link while the network is being built (see :class:`Network`)."""

    name: str
    a: int
    b: int
    kind: int
    role: str
    length_m: float = 0.0
    pipe: PipeSpec | None = None
    fittings: dict[str, float] = field(default_factory=dict)
    extra_zeta: float = 0.0
    kv: float = 0.0
    pump: tuple[float, float, float] = (0.0, 0.0, 0.0)
    pump_mode: int = 0  # network code, see PUMP_MODE_NAMES
    pump_setpoint_Pa: float = 0.0
    check_valve: bool = False
    emitter: int = -1
    extra_volume_m3: float = 0.0
    room: int = -1
    design_flow_kg_s: float = 0.0
    sized: bool = True  # whether automatic sizing may change the pipe


@dataclass(frozen=True, eq=False)
class BuiltLayout:
    """A built network with what the plan knows beyond the arrays.

    Attributes
    ----------
    network : Network
        The network the solver and the dynamics consume.
    links : tuple of LinkSpec
        Per link: pipe type, fitting counts, role and design flow.
    fitting_count : dict of str to int
        Fittings of the whole layout by kind: ``tee``, ``elbow``,
        ``manifold_connection``, ``diverter_tee``, ``low_loss_header``.
    node_xy : ndarray, shape (n_nodes, 2)
        Schematic drawing position of each node.
    emitter_xy : dict of int to (float, float)
        Schematic position of each emitter's box, by emitter index.
    fittings : FittingTable
        The fitting table used.
    design_temp_C : float
        Mean design water temperature of the design flows. [°C]
    limits : SizingLimits
        Sizing limits of the scenario.
    """

    network: Network
    links: tuple[LinkSpec, ...]
    fitting_count: dict[str, int]
    node_xy: np.ndarray
    emitter_xy: dict[int, tuple[float, float]]
    fittings: FittingTable
    design_temp_C: float
    limits: SizingLimits

    @property
    def design_flow_kg_s(self) -> np.ndarray:
        """Design mass flow per link, positive from ``from_node``. [kg/s]."""
        return np.array([k.design_flow_kg_s for k in self.links])

    @property
    def emitter_design_flow_kg_s(self) -> np.ndarray:
        """Design mass flow through each emitter, in scenario order. [kg/s].

        In two-pipe schemes this is the emitter's share of its room's design load at
        the design temperature drop; in a one-pipe loop it is the emitter's share of
        the loop's design flow.
        """
        return self.design_flow_kg_s[self.network.emitter_links()]


def floor_pump_link(floor: int) -> str:
    """Link name of a floor's own pump in the ``_floor_pumps`` schemes.

    Parameters
    ----------
    floor : int
        Storey number of the floor (``[[route.floors]] floor``). [-]

    Returns
    -------
    str
        The pump link's name.

    Examples
    --------
    >>> floor_pump_link(1)
    'pump:floor1'
    """
    return f"pump:floor{floor}"


def floor_y(index: int) -> float:
    """Drawing height of the return line of the floor with route index ``index``."""
    return FLOOR_SPACING * index


class Builder:
    """Accumulates nodes and links of one scheme's network."""

    def __init__(self, scenario: Scenario) -> None:
        self.scenario = scenario
        self.table = fitting_table(scenario.layout.fittings)
        self.design_flow = scenario.design_mass_flow_kg_s()
        self.nodes: list[tuple[str, int, float, tuple[float, float]]] = []
        self.links: list[LinkSpec] = []
        self.count: Counter[str] = Counter()
        self.emitter_xy: dict[int, tuple[float, float]] = {}
        self.after_sizing: list[Callable[[Builder], None]] = []

    # -- primitives -------------------------------------------------------------
    def node(
        self, name: str, line: int, distance_m: float, xy: tuple[float, float]
    ) -> int:
        """Add a node; return its index."""
        self.nodes.append((name, line, float(distance_m), (float(xy[0]), float(xy[1]))))
        return len(self.nodes) - 1

    def distance(self, node: int) -> float:
        """Route distance of a node from the heat source. [m]."""
        return self.nodes[node][2]

    def xy(self, node: int) -> tuple[float, float]:
        """Drawing position of a node."""
        return self.nodes[node][3]

    def add(self, spec: LinkSpec) -> int:
        """Add a link; count its elbows; return its index."""
        self.links.append(spec)
        self.count["elbow"] += int(spec.fittings.get("elbow", 0))
        return len(self.links) - 1

    def flow(self, emitters) -> float:
        """Sum of the design flows of some emitters. [kg/s]."""
        return float(sum(self.design_flow[i] for i in emitters))

    def pipe(
        self,
        name: str,
        start: int,
        length_m: float,
        pipe: PipeSpec,
        fittings: dict[str, float],
        line: int,
        room: int,
        *,
        role: str,
        flow_kg_s: float,
        end_xy: tuple[float, float] | None = None,
        reverse: bool = False,
        end: int | None = None,
    ) -> int:
        """Add a pipe from ``start`` (into it when ``reverse``); return the far node.

        A zero-length pipe without a given ``end`` adds nothing and returns
        ``start``. ``flow_kg_s`` is the design flow in the direction of the water.
        """
        if length_m == 0.0 and end is None:
            return start
        if end is None:
            xy = end_xy if end_xy is not None else self.xy(start)
            end = self.node(name + ":end", line, self.distance(start) + length_m, xy)
        a, b = (end, start) if reverse else (start, end)
        self.add(
            LinkSpec(
                name,
                a,
                b,
                LINK_PIPE,
                role,
                length_m=length_m,
                pipe=pipe,
                fittings=dict(fittings),
                room=room,
                design_flow_kg_s=flow_kg_s,
            )
        )
        return end

    def emitter(
        self,
        index: int,
        supply: int,
        ret: int,
        length_m: float,
        pipe: PipeSpec,
        fittings: dict[str, float],
        box_xy: tuple[float, float],
        *,
        role: str = "emitter",
        flow_kg_s: float | None = None,
    ) -> int:
        """Add the link of emitter ``index`` (branches, valve, radiator)."""
        e = self.scenario.emitters[index]
        self.emitter_xy[index] = box_xy
        return self.add(
            LinkSpec(
                f"emitter:{e.id}",
                supply,
                ret,
                LINK_EMITTER,
                role,
                length_m=length_m,
                pipe=pipe,
                fittings=dict(fittings),
                kv=e.kv_m3_h,
                emitter=index,
                extra_volume_m3=e.water_volume_m3,
                room=e.room,
                design_flow_kg_s=(
                    self.design_flow[index] if flow_kg_s is None else flow_kg_s
                ),
            )
        )

    def emitter_fittings(self, tee_branches: int = 2) -> dict[str, float]:
        """Fittings of a two-pipe emitter circuit: tee branches, elbows, radiator."""
        return {
            "tee_branch": tee_branches,
            "elbow": self.table.elbows_per_emitter_circuit,
            "radiator": 1,
        }

    def header_fittings(self) -> dict[str, float]:
        """Fittings of a header segment: the run of the tee at its end, elbows."""
        return {"tee_run": 1, "elbow": self.table.elbows_per_header_segment}

    def pump(
        self,
        name: str,
        inlet: int,
        outlet: int,
        pump: Pump,
        flow_kg_s: float,
        check_valve: bool,
    ):
        """Add a pump link from ``inlet`` to ``outlet``.

        Curve, control mode and set head come from ``pump``; it holds a check
        valve when ``pump.check_valve`` says so, else when ``check_valve`` (the
        default for the pump's place) is True.
        """
        return self.add(
            LinkSpec(
                name,
                inlet,
                outlet,
                LINK_PUMP,
                "pump",
                pump=tuple(float(c) for c in pump.coeffs),
                pump_mode=PUMP_MODE_CODES[pump.mode],
                pump_setpoint_Pa=float(pump.setpoint_Pa),
                check_valve=(
                    check_valve if pump.check_valve is None else pump.check_valve
                ),
                extra_volume_m3=PUMP_CASING_VOLUME_M3,
                design_flow_kg_s=flow_kg_s,
                sized=False,
            )
        )

    # -- finishing --------------------------------------------------------------
    def finish(self, scheme: str, reference: int) -> BuiltLayout:
        """Size pipes if asked, apply fittings and freeze the network."""
        s = self.scenario
        limits = s.layout.sizing
        d = s.design
        design_temp_C = d.supply_temp_C - 0.5 * d.temperature_drop_K
        if limits.mode == "auto":
            for spec in self.links:
                if spec.pipe is None or not spec.sized or spec.length_m <= 0.0:
                    continue
                rule = "branch" if spec.role in BRANCH_ROLES else "header"
                spec.pipe = sizing.choose_pipe(
                    abs(spec.design_flow_kg_s), spec.pipe, rule, limits, design_temp_C
                )
        for hook in self.after_sizing:
            hook(self)
        links = self.links
        pipes = [k.pipe for k in links]
        length = np.array([k.length_m for k in links])
        diameter = np.array([p.inner_diameter_m if p else 0.0 for p in pipes])
        volume = math.pi / 4.0 * diameter**2 * length
        volume += np.array([k.extra_volume_m3 for k in links])
        insulated = s.route.insulated
        network = Network(
            scheme=scheme,
            node_names=tuple(n[0] for n in self.nodes),
            node_line=np.array([n[1] for n in self.nodes], dtype=np.int8),
            node_distance_m=np.array([n[2] for n in self.nodes]),
            reference_node=reference,
            link_names=tuple(k.name for k in links),
            link_kind=np.array([k.kind for k in links], dtype=np.int8),
            from_node=np.array([k.a for k in links], dtype=np.int64),
            to_node=np.array([k.b for k in links], dtype=np.int64),
            length_m=length,
            inner_diameter_m=diameter,
            roughness_m=np.array([p.roughness_m if p else 0.0 for p in pipes]),
            zeta=np.array([self.table.zeta(k.fittings) + k.extra_zeta for k in links]),
            kv_m3_h=np.array([k.kv for k in links]),
            pump_coeffs=np.array([k.pump for k in links], dtype=float).reshape(-1, 3),
            emitter_index=np.array([k.emitter for k in links], dtype=np.int64),
            emitter_ids=tuple(e.id for e in s.emitters),
            water_volume_m3=volume,
            loss_W_per_m_K=np.array(
                [
                    pipe_loss_W_per_m_K(p.outer_diameter_m, insulated)
                    if p is not None and k.kind != LINK_SOURCE
                    else 0.0
                    for k, p in zip(links, pipes, strict=True)
                ]
            ),
            surroundings_room=np.array([k.room for k in links], dtype=np.int64),
            check_valve=np.array([k.check_valve for k in links], dtype=bool),
            pump_mode=np.array([k.pump_mode for k in links], dtype=np.int8),
            pump_setpoint_Pa=np.array([k.pump_setpoint_Pa for k in links]),
        )
        count = {
            kind: int(self.count.get(kind, 0))
            for kind in (
                "tee",
                "elbow",
                "manifold_connection",
                "diverter_tee",
                "low_loss_header",
            )
        }
        return BuiltLayout(
            network=network,
            links=tuple(links),
            fitting_count=count,
            node_xy=np.array([n[3] for n in self.nodes], dtype=float).reshape(-1, 2),
            emitter_xy=dict(self.emitter_xy),
            fittings=self.table,
            design_temp_C=design_temp_C,
            limits=limits,
        )


# -- plant, feed and risers -------------------------------------------------------
def plant(b: Builder, pump: Pump, flow_kg_s: float) -> tuple[int, int, int]:
    """Pump on the return before the source; return (reference, supply, return).

    The expansion vessel sits at the pump's suction, the network's pressure
    reference. The pump has no check valve unless the scenario asks for one
    (``PLANT_PUMP_CHECK_VALVE``).
    """
    plant_return = b.node("plant:return", LINE_RETURN, 0.0, PLANT_RETURN_XY)
    pump_out = b.node("plant:pump_outlet", LINE_OTHER, 0.0, PLANT_PUMP_OUTLET_XY)
    plant_supply = b.node("plant:supply", LINE_SUPPLY, 0.0, PLANT_SUPPLY_XY)
    b.pump(
        PLANT_PUMP_LINK, plant_return, pump_out, pump, flow_kg_s, PLANT_PUMP_CHECK_VALVE
    )
    feed = b.scenario.route.feed_pipe
    b.add(
        LinkSpec(
            "source",
            pump_out,
            plant_supply,
            LINK_SOURCE,
            "source",
            length_m=SOURCE_CONNECTION_LENGTH_M,
            pipe=feed,
            fittings={"heat_source": 1},
            extra_volume_m3=b.scenario.source.water_volume_m3,
            design_flow_kg_s=flow_kg_s,
            sized=False,
        )
    )
    return plant_return, plant_supply, pump_out


def feed(
    b: Builder, plant_supply: int, plant_return: int, flow_kg_s: float, end_x: float
) -> tuple[int, int]:
    """Feed pair from the plant to the foot of the riser; return its far ends."""
    s = b.scenario
    pipe = s.route.feed_pipe
    fittings = {"elbow": b.table.elbows_per_feed}
    length = s.route.feed_length_m
    y0 = floor_y(0)
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
        end_xy=(end_x, y0 + SUPPLY_Y),
    )
    return_end = b.node(
        "feed:return:start", LINE_RETURN, length, (end_x + RETURN_RISER_X, y0)
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
) -> tuple[int, int]:
    """Supply and return riser of ``length_m`` from (supply, ret); return the tops."""
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
    )
    top_return = b.node(
        f"{name}:return:start", LINE_RETURN, b.distance(ret) + length_m, (rx, top_y)
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


FloorCircuit = Callable[[Builder, FloorRoute, int, int, int], None]
"""Builds one floor's circuit: ``(builder, floor, floor index, supply, return)``."""


def floor_flow(b: Builder, floor: FloorRoute) -> float:
    """Design flow of all emitters on a floor. [kg/s]."""
    return b.flow(t.emitter for t in floor.tees)


def shared_pump(scenario: Scenario, scheme: str, circuit: FloorCircuit) -> BuiltLayout:
    """Every floor's circuit off one riser, driven by the plant's one pump."""
    b = Builder(scenario)
    floors = scenario.route.floors
    total = sum(floor_flow(b, f) for f in floors)
    reference, plant_supply, _ = plant(b, scenario.pump, total)
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
        )
        circuit(b, floor, index, supply, ret)
        above -= floor_flow(b, floor)
    return b.finish(scheme, reference)


def low_loss_header_pipe(scenario: Scenario) -> PipeSpec:
    """Pipe of the low-loss header: given, or three times the feed bore.

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
    return PipeSpec(
        "low_loss_header",
        3.0 * f.inner_diameter_m,
        f.roughness_m,
        3.0 * f.inner_diameter_m + (f.outer_diameter_m - f.inner_diameter_m),
    )


def floor_pumps(scenario: Scenario, scheme: str, circuit: FloorCircuit) -> BuiltLayout:
    """Primary loop to a low-loss header; each floor's circuit with its own pump.

    The primary loop (source and primary pump) ends in a short, wide pipe (the
    low-loss header) at the foot of the riser. From the header's supply end each
    floor's pump drives its own flow pipe up to the floor and its circuit; each
    floor's return pipe ends at the header's return end. The header's small
    resistance decouples the circuits: a change in one hardly changes the
    pressure difference the others start from.
    """
    b = Builder(scenario)
    layout = scenario.layout
    floors = scenario.route.floors
    total = sum(floor_flow(b, f) for f in floors)
    primary = layout.primary_pump or scenario.pump
    reference, plant_supply, _ = plant(b, primary, total)
    header_x = -1.5
    header_supply, header_return = feed(b, plant_supply, reference, total, header_x)
    header = low_loss_header_pipe(scenario)
    b.add(
        LinkSpec(
            "low_loss_header",
            header_supply,
            header_return,
            LINK_PIPE,
            "low_loss_header",
            length_m=layout.low_loss_header_length_m,
            pipe=header,
            fittings={"tee_run": 2},
            design_flow_kg_s=0.0,
            sized=False,
        )
    )
    b.count["low_loss_header"] += 1
    rise = 0.0
    for index, floor in enumerate(floors):
        rise += floor.riser_length_m
        flow = floor_flow(b, floor)
        y = floor_y(index)
        pump = layout.floor_pumps.get(floor.floor, scenario.pump)
        outlet = b.node(
            f"floor{floor.floor}:pump_outlet",
            LINE_SUPPLY,
            b.distance(header_supply),
            (header_x + 0.8, floor_y(0) + SUPPLY_Y + 1.0 * index),
        )
        b.pump(
            floor_pump_link(floor.floor),
            header_supply,
            outlet,
            pump,
            flow,
            FLOOR_PUMP_CHECK_VALVE,
        )
        pipe = scenario.route.feed_pipe
        fittings = {"elbow": b.table.elbows_per_riser, "tee_run": 1}
        supply = b.pipe(
            f"floor{floor.floor}:flow",
            outlet,
            rise,
            pipe,
            fittings,
            LINE_SUPPLY,
            -1,
            role="riser",
            flow_kg_s=flow,
            end_xy=(0.0, y + SUPPLY_Y),
        )
        if rise > 0.0:
            ret = b.node(
                f"floor{floor.floor}:return:start",
                LINE_RETURN,
                b.distance(header_return) + rise,
                (RETURN_RISER_X, y),
            )
            b.pipe(
                f"floor{floor.floor}:return",
                ret,
                rise,
                pipe,
                fittings,
                LINE_RETURN,
                -1,
                role="riser",
                flow_kg_s=flow,
                end=header_return,
            )
        else:
            ret = header_return
        circuit(b, floor, index, supply, ret)
    return b.finish(scheme, reference)
