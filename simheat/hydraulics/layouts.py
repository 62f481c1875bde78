"""Build the network of each piping scheme from one description of the house.

All schemes share the plant (pump on the return before the heat source, expansion
vessel at the pump's suction as the pressure reference), the feed from the plant to
the foot of the riser, and the risers between floors. They differ in how each
floor's supply and return headers connect the emitters:

- ``direct_return``: the return header runs back beside the supply header, so the
  first emitter has the shortest loop and the last the longest;
- ``reverse_return``: the return header starts at the first emitter and runs with
  the flow to the last, then back to the riser, so every emitter's loop through the
  headers has the same length.
"""

from __future__ import annotations

import math
from collections.abc import Callable

import numpy as np

from simheat.hydraulics import fittings
from simheat.hydraulics.network import (
    LINE_OTHER,
    LINE_RETURN,
    LINE_SUPPLY,
    LINK_EMITTER,
    LINK_PIPE,
    LINK_PUMP,
    LINK_SOURCE,
    Network,
)
from simheat.physics.pipe_heat import pipe_loss_W_per_m_K
from simheat.scenario.model import FloorRoute, PipeSpec, Scenario

PUMP_CASING_VOLUME_M3 = 0.2e-3  # water in a small circulator and its unions


class _Builder:
    """Accumulates nodes and links; merges the ends of zero-length pipes."""

    def __init__(self, scenario: Scenario) -> None:
        self.scenario = scenario
        self.nodes: list[tuple[str, int, float]] = []
        self.links: list[dict] = []

    def node(self, name: str, line: int, distance_m: float) -> int:
        self.nodes.append((name, line, distance_m))
        return len(self.nodes) - 1

    def link(self, name: str, a: int, b: int, kind: int, **parts) -> int:
        parts.setdefault("length_m", 0.0)
        parts.setdefault("diameter_m", 0.0)
        parts.setdefault("roughness_m", 0.0)
        parts.setdefault("zeta", 0.0)
        parts.setdefault("kv", 0.0)
        parts.setdefault("pump", (0.0, 0.0, 0.0))
        parts.setdefault("emitter", -1)
        parts.setdefault("extra_volume_m3", 0.0)
        parts.setdefault("loss", 0.0)
        parts.setdefault("room", -1)
        self.links.append(dict(name=name, a=a, b=b, kind=kind, **parts))
        return len(self.links) - 1

    def pipe(
        self,
        name: str,
        start: int,
        length_m: float,
        pipe: PipeSpec,
        zeta: float,
        line: int,
        room: int,
        *,
        reverse: bool = False,
        end: int | None = None,
    ) -> int:
        """Add a pipe from ``start`` (or into it when ``reverse``); return the far node.

        A zero-length pipe adds nothing and returns ``start``.
        """
        if length_m == 0.0 and end is None:
            return start
        if end is None:
            distance = self.nodes[start][2] + length_m
            end = self.node(name + ":end", line, distance)
        a, b = (end, start) if reverse else (start, end)
        self.link(
            name,
            a,
            b,
            LINK_PIPE,
            length_m=length_m,
            diameter_m=pipe.inner_diameter_m,
            roughness_m=pipe.roughness_m,
            zeta=zeta,
            loss=pipe_loss_W_per_m_K(
                pipe.outer_diameter_m, self.scenario.route.insulated
            ),
            room=room,
        )
        return end

    def emitter(
        self, index: int, supply: int, ret: int, floor: FloorRoute, tee
    ) -> None:
        e = self.scenario.emitters[index]
        pipe = floor.branch_pipe
        self.link(
            f"emitter:{e.id}",
            supply,
            ret,
            LINK_EMITTER,
            length_m=2.0 * tee.branch_length_m,
            diameter_m=pipe.inner_diameter_m,
            roughness_m=pipe.roughness_m,
            zeta=fittings.emitter_circuit_zeta(),
            kv=e.kv_m3_h,
            emitter=index,
            extra_volume_m3=e.water_volume_m3,
            loss=pipe_loss_W_per_m_K(
                pipe.outer_diameter_m, self.scenario.route.insulated
            ),
            room=e.room,
        )

    def finish(self, scheme: str, reference: int) -> Network:
        links = self.links
        length = np.array([k["length_m"] for k in links])
        diameter = np.array([k["diameter_m"] for k in links])
        volume = math.pi / 4.0 * diameter**2 * length
        volume += np.array([k["extra_volume_m3"] for k in links])
        return Network(
            scheme=scheme,
            node_names=tuple(n[0] for n in self.nodes),
            node_line=np.array([n[1] for n in self.nodes], dtype=np.int8),
            node_distance_m=np.array([n[2] for n in self.nodes]),
            reference_node=reference,
            link_names=tuple(k["name"] for k in links),
            link_kind=np.array([k["kind"] for k in links], dtype=np.int8),
            from_node=np.array([k["a"] for k in links], dtype=np.int64),
            to_node=np.array([k["b"] for k in links], dtype=np.int64),
            length_m=length,
            inner_diameter_m=diameter,
            roughness_m=np.array([k["roughness_m"] for k in links]),
            zeta=np.array([k["zeta"] for k in links]),
            kv_m3_h=np.array([k["kv"] for k in links]),
            pump_coeffs=np.array([k["pump"] for k in links], dtype=float).reshape(
                -1, 3
            ),
            emitter_index=np.array([k["emitter"] for k in links], dtype=np.int64),
            emitter_ids=tuple(e.id for e in self.scenario.emitters),
            water_volume_m3=volume,
            loss_W_per_m_K=np.array([k["loss"] for k in links]),
            surroundings_room=np.array([k["room"] for k in links], dtype=np.int64),
        )


def _plant_and_feed(b: _Builder) -> tuple[int, int, int]:
    """Plant (pump, source) and feed; return (reference, supply end, return end)."""
    s = b.scenario
    feed = s.route.feed_pipe
    plant_return = b.node("plant:return", LINE_RETURN, 0.0)
    pump_out = b.node("plant:pump_outlet", LINE_OTHER, 0.0)
    plant_supply = b.node("plant:supply", LINE_SUPPLY, 0.0)
    b.link(
        "pump",
        plant_return,
        pump_out,
        LINK_PUMP,
        pump=s.pump.coeffs,
        extra_volume_m3=PUMP_CASING_VOLUME_M3,
    )
    b.link(
        "source",
        pump_out,
        plant_supply,
        LINK_SOURCE,
        length_m=0.5,
        diameter_m=feed.inner_diameter_m,
        roughness_m=feed.roughness_m,
        zeta=fittings.ZETA_HEAT_SOURCE,
        extra_volume_m3=s.source.water_volume_m3,
    )
    zeta_feed = fittings.ELBOWS_PER_FEED * fittings.ZETA_ELBOW_90
    length = s.route.feed_length_m
    supply_end = b.pipe(
        "feed:supply", plant_supply, length, feed, zeta_feed, LINE_SUPPLY, -1
    )
    return_end = b.node("feed:return:start", LINE_RETURN, length)
    b.pipe(
        "feed:return",
        return_end,
        length,
        feed,
        zeta_feed,
        LINE_RETURN,
        -1,
        end=plant_return,
    )
    return plant_return, supply_end, return_end


def _header_floor(
    b: _Builder, floor: FloorRoute, supply_start: int, return_start: int, reverse: bool
) -> None:
    """Supply and return headers of one floor with their emitters."""
    s = b.scenario
    pipe = floor.header_pipe
    zeta = fittings.header_segment_zeta()
    supply_tees = []
    node = supply_start
    for tee in floor.tees:
        room = s.emitters[tee.emitter].room
        name = f"header:supply:{s.emitters[tee.emitter].id}"
        node = b.pipe(name, node, tee.header_length_m, pipe, zeta, LINE_SUPPLY, room)
        supply_tees.append(node)
    if reverse:
        return_tees = _reverse_return_header(b, floor, return_start)
    else:
        return_tees = _direct_return_header(b, floor, return_start)
    for tee, sup, ret in zip(floor.tees, supply_tees, return_tees, strict=True):
        b.emitter(tee.emitter, sup, ret, floor, tee)


def _return_segment(
    b: _Builder,
    floor: FloorRoute,
    tee,
    start_m: float,
    downstream: int,
    length_m: float,
) -> int:
    """A return header segment ending at ``downstream``; returns its upstream node."""
    if length_m == 0.0:
        return downstream
    s = b.scenario
    emitter = s.emitters[tee.emitter]
    name = f"header:return:{emitter.id}"
    node = b.node(name + ":start", LINE_RETURN, start_m)
    b.pipe(
        name,
        node,
        length_m,
        floor.header_pipe,
        fittings.header_segment_zeta(),
        LINE_RETURN,
        emitter.room,
        end=downstream,
    )
    return node


def _direct_return_header(
    b: _Builder, floor: FloorRoute, return_start: int
) -> list[int]:
    """Return header beside the supply: tee i drains towards tee i-1, then the riser."""
    nodes = []
    downstream = return_start
    position = b.nodes[return_start][2]
    for tee in floor.tees:
        position += tee.header_length_m
        downstream = _return_segment(
            b, floor, tee, position, downstream, tee.header_length_m
        )
        nodes.append(downstream)
    return nodes


def _reverse_return_header(
    b: _Builder, floor: FloorRoute, return_start: int
) -> list[int]:
    """Return header from the first tee with the flow to the last, then back."""
    s = b.scenario
    base_m = b.nodes[return_start][2]
    positions = base_m + np.cumsum([t.header_length_m for t in floor.tees])
    total_m = positions[-1] - base_m
    first_room = s.emitters[floor.tees[0].emitter].room
    far_end = b.node(f"floor{floor.floor}:return:far_end", LINE_RETURN, positions[-1])
    b.pipe(
        f"floor{floor.floor}:return:back",
        far_end,
        total_m,
        floor.header_pipe,
        fittings.header_segment_zeta(),
        LINE_RETURN,
        first_room,
        end=return_start,
    )
    nodes = [far_end]
    for i in range(len(floor.tees) - 2, -1, -1):
        length = positions[i + 1] - positions[i]
        nodes.append(
            _return_segment(
                b, floor, floor.tees[i], positions[i], nodes[-1], float(length)
            )
        )
    return nodes[::-1]


def _two_pipe(scenario: Scenario, scheme: str, reverse: bool) -> Network:
    b = _Builder(scenario)
    reference, supply_node, return_node = _plant_and_feed(b)
    feed = scenario.route.feed_pipe
    zeta_riser = fittings.ELBOWS_PER_RISER * fittings.ZETA_ELBOW_90
    for floor in scenario.route.floors:
        length = floor.riser_length_m
        name = f"riser{floor.floor}"
        supply_node = b.pipe(
            f"{name}:supply", supply_node, length, feed, zeta_riser, LINE_SUPPLY, -1
        )
        if length > 0.0:
            start = b.node(
                f"{name}:return:start", LINE_RETURN, b.nodes[return_node][2] + length
            )
            b.pipe(
                f"{name}:return",
                start,
                length,
                feed,
                zeta_riser,
                LINE_RETURN,
                -1,
                end=return_node,
            )
            return_node = start
        _header_floor(b, floor, supply_node, return_node, reverse)
    return b.finish(scheme, reference)


def direct_return(scenario: Scenario) -> Network:
    """Two-pipe direct return network of the scenario's route.

    Parameters
    ----------
    scenario : Scenario
        The house.

    Returns
    -------
    Network
        The network, with the pump on the return before the source.
    """
    return _two_pipe(scenario, "direct_return", reverse=False)


def reverse_return(scenario: Scenario) -> Network:
    """Two-pipe reverse return network of the scenario's route.

    Parameters
    ----------
    scenario : Scenario
        The house.

    Returns
    -------
    Network
        The network; per floor, the return header starts at the first emitter.
    """
    return _two_pipe(scenario, "reverse_return", reverse=True)


SCHEMES: dict[str, Callable[[Scenario], Network]] = {
    "direct_return": direct_return,
    "reverse_return": reverse_return,
}


def build(scenario: Scenario, scheme: str) -> Network:
    """Build the network of ``scheme`` for ``scenario``.

    Parameters
    ----------
    scenario : Scenario
        The house.
    scheme : str
        One of :data:`SCHEMES`.

    Returns
    -------
    Network
        The network.

    Raises
    ------
    ScenarioError
        For an unknown scheme name.
    """
    from simheat.errors import ScenarioError

    if scheme not in SCHEMES:
        known = ", ".join(sorted(SCHEMES))
        raise ScenarioError(f"scheme: unknown scheme {scheme!r}; known: {known}")
    return SCHEMES[scheme](scenario)
