"""The network builder every scheme shares: nodes, links, and the finished layout.

Links are collected as :class:`~simheat.hydraulics.layouts.records.LinkSpec`
records; every node has a height above the plant. :meth:`Builder.finish` applies
the route's detail (:func:`~simheat.hydraulics.layouts.route_detail.apply_route_detail`:
tapered headers, fittings where they are, obstacle detours), sizes pipes when
asked, turns fitting counts into zeta with the scenario's fitting table and
freezes everything into a
:class:`~simheat.hydraulics.network.Network` inside a
:class:`~simheat.hydraulics.layouts.records.BuiltLayout`. The builder reads the
scenario for what it states and the resolved scenario
(:func:`simheat.resolve.resolve`) for what is derived: Kv, pump curves, design
flows.
"""

from __future__ import annotations

import math
from collections import Counter
from collections.abc import Callable, Iterable

import numpy as np

from simheat.hydraulics.layouts.geometry import RunGeometry
from simheat.hydraulics.layouts.pipes import choose_pipe
from simheat.hydraulics.layouts.records import (
    Along,
    BuiltLayout,
    Circuit,
    DrawingMark,
    LinkSpec,
    sizing_rule,
)
from simheat.hydraulics.layouts.route_detail import apply_route_detail
from simheat.hydraulics.network import (
    LINE_RETURN,
    LINK_EMITTER,
    LINK_PIPE,
    LINK_PUMP,
    LINK_SOURCE,
    PUMP_MODE_NAMES,
    Network,
)
from simheat.physics.pipe_heat import pipe_loss_W_per_m_K
from simheat.resolve import ResolvedPump, ResolvedScenario
from simheat.scenario.model import PipeSpec, Scenario

PUMP_CASING_VOLUME_M3 = 0.2e-3  # water in a small circulator and its unions
PUMP_MODE_CODES = {name: code for code, name in PUMP_MODE_NAMES.items()}
FITTING_KINDS = (
    "tee",
    "elbow",
    "manifold_connection",
    "diverter_tee",
    "low_loss_header",
)
"""Fitting kinds every layout counts; fittings placed by name add their kinds."""


class Builder:
    """Accumulates nodes and links of one scheme's network.

    Parameters
    ----------
    scenario : Scenario
        The house as given. [-]
    resolved : ResolvedScenario
        Its derived quantities (:func:`simheat.resolve.resolve`). [-]

    Attributes
    ----------
    geometry : RunGeometry
        Heights and positions along the floors' runs. [-]
    """

    def __init__(self, scenario: Scenario, resolved: ResolvedScenario) -> None:
        self.scenario = scenario
        self.resolved = resolved
        self.table = scenario.layout.fittings
        self.design_flow = resolved.design_mass_flow_kg_s
        self.geometry = RunGeometry(scenario.route)
        self.nodes: list[tuple[str, int, float, tuple[float, float], float]] = []
        self.links: list[LinkSpec] = []
        self.count: Counter[str] = Counter()
        self.emitter_xy: dict[int, tuple[float, float]] = {}
        self.link_via: dict[int, tuple[tuple[float, float], ...]] = {}
        self.marks: list[DrawingMark] = []
        self.after_sizing: list[Callable[[Builder], None]] = []
        self.circuits: list[Circuit] = []  # see layouts.circuits.circuit_return

    # -- primitives -------------------------------------------------------------
    def node(
        self,
        name: str,
        line: int,
        distance_m: float,
        xy: tuple[float, float],
        height_m: float = 0.0,
    ) -> int:
        """Add a node; return its index.

        Parameters
        ----------
        name : str
            Node name. [-]
        line : int
            Line code (``LINE_SUPPLY``, ``LINE_RETURN``, ``LINE_OTHER``). [-]
        distance_m : float
            Route distance from the heat source. [m]
        xy : (float, float)
            Schematic drawing position. [drawing units]
        height_m : float
            Height above the plant. [m]

        Returns
        -------
        int
            Index of the new node.
        """
        point = (float(xy[0]), float(xy[1]))
        self.nodes.append((name, line, float(distance_m), point, float(height_m)))
        return len(self.nodes) - 1

    def height(self, node: int) -> float:
        """Height of a node above the plant.

        Parameters
        ----------
        node : int
            Node index. [-]

        Returns
        -------
        float
            Height. [m]
        """
        return self.nodes[node][4]

    def distance(self, node: int) -> float:
        """Route distance of a node from the heat source.

        Parameters
        ----------
        node : int
            Node index. [-]

        Returns
        -------
        float
            Distance along the pipes from the heat source. [m]
        """
        return self.nodes[node][2]

    def xy(self, node: int) -> tuple[float, float]:
        """Drawing position of a node.

        Parameters
        ----------
        node : int
            Node index. [-]

        Returns
        -------
        (float, float)
            Schematic position. [drawing units]
        """
        return self.nodes[node][3]

    def add(self, spec: LinkSpec) -> int:
        """Add a link; count its elbows; return its index.

        Parameters
        ----------
        spec : LinkSpec
            The link. [-]

        Returns
        -------
        int
            Index of the new link.
        """
        self.links.append(spec)
        self.count["elbow"] += int(spec.fittings.get("elbow", 0))
        return len(self.links) - 1

    def draw_via(self, link: int, via: tuple[tuple[float, float], ...]) -> None:
        """Record drawing waypoints of a link (none: a straight segment).

        Parameters
        ----------
        link : int
            Link index. [-]
        via : tuple of (float, float)
            Waypoints from the link's from-node to its to-node. [drawing units]
        """
        if via:
            self.link_via[link] = tuple((float(x), float(y)) for x, y in via)

    def mark(self, kind: str, label: str, xy: tuple[float, float]) -> None:
        """Add a drawing label that belongs to no link (floor name, split point).

        Parameters
        ----------
        kind : str
            ``"floor"`` or ``"split"``. [-]
        label : str
            Text. [-]
        xy : (float, float)
            Drawing position. [drawing units]
        """
        self.marks.append(DrawingMark(kind, label, (float(xy[0]), float(xy[1]))))

    def flow(self, emitters: Iterable[int]) -> float:
        """Sum of the design flows of some emitters.

        Parameters
        ----------
        emitters : iterable of int
            Emitter indices. [-]

        Returns
        -------
        float
            Their design mass flows summed. [kg/s]
        """
        return float(sum(self.design_flow[i] for i in emitters))

    def zeta(self, counts: dict[str, float]) -> float:
        """Sum of zeta over a count of fitting kinds, from the scenario's table.

        Parameters
        ----------
        counts : dict of str to float
            Number of each kind: ``tee_run``, ``tee_branch``, ``elbow``,
            ``manifold_connection``, ``radiator``, ``heat_source``. [-]

        Returns
        -------
        float
            Sum of local loss coefficients. [-]
        """
        return float(
            sum(getattr(self.table, f"{kind}_zeta") * n for kind, n in counts.items())
        )

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
        end_height_m: float | None = None,
        along: Along | None = None,
        via: tuple[tuple[float, float], ...] = (),
    ) -> int:
        """Add a pipe from ``start`` (into it when ``reverse``); return the far node.

        A zero-length pipe without a given ``end`` adds nothing and returns
        ``start``.

        Parameters
        ----------
        name : str
            Link name; a new far node is named ``<name>:end``. [-]
        start : int
            Node the pipe starts from (ends at, when ``reverse``). [-]
        length_m : float
            Pipe length. [m]
        pipe : PipeSpec
            Pipe type. [-]
        fittings : dict of str to float
            Fitting counts by kind. [-]
        line : int
            Line code of a new far node. [-]
        room : int
            Room around the pipe, -1 for none. [-]
        role : str
            Role in the plan (sizing rule, report grouping). [-]
        flow_kg_s : float
            Design flow in the direction of the water. [kg/s]
        end_xy : (float, float), optional
            Drawing position of a new far node; the start's by default. [drawing units]
        reverse : bool
            Whether the water flows into ``start``. [-]
        end : int, optional
            Existing far node; a new one is made when omitted. [-]
        end_height_m : float, optional
            Height of a new far node; the start's by default. [m]
        along : Along, optional
            Where the pipe runs along a floor's run (for its stretch's detail
            and the obstacles it passes). [-]
        via : tuple of (float, float), optional
            Drawing waypoints from the link's from-node to its to-node, for a
            pipe not drawn as one straight segment. [drawing units]

        Returns
        -------
        int
            The far node.
        """
        if length_m == 0.0 and end is None:
            return start
        if end is None:
            xy = end_xy if end_xy is not None else self.xy(start)
            height = self.height(start) if end_height_m is None else end_height_m
            end = self.node(
                name + ":end", line, self.distance(start) + length_m, xy, height
            )
        a, b = (end, start) if reverse else (start, end)
        self.draw_via(len(self.links), via)
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
                along=along,
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
        along: Along | None = None,
    ) -> int:
        """Add the link of emitter ``index`` (branches, valve, radiator).

        Parameters
        ----------
        index : int
            Emitter index in the scenario. [-]
        supply, ret : int
            Nodes of its supply and return connections. [-]
        length_m : float
            Branch pipe length, supply and return together. [m]
        pipe : PipeSpec
            Branch pipe type. [-]
        fittings : dict of str to float
            Fitting counts by kind. [-]
        box_xy : (float, float)
            Drawing position of the emitter's box. [drawing units]
        role : str
            Role in the plan (``emitter`` or ``home_run``). [-]
        flow_kg_s : float, optional
            Design flow; the emitter's share of its room's load by default.
            [kg/s]
        along : Along, optional
            Where its pipes run along a floor's run (a home-run pair), for the
            obstacles they pass. [-]

        Returns
        -------
        int
            Index of the new link.
        """
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
                kv=self.resolved.emitters[index].kv_m3_h,
                emitter=index,
                extra_volume_m3=e.water_volume_m3,
                room=e.room,
                design_flow_kg_s=(
                    self.design_flow[index] if flow_kg_s is None else flow_kg_s
                ),
                along=along,
            )
        )

    def emitter_fittings(self, tee_branches: int = 2) -> dict[str, float]:
        """Fittings of a two-pipe emitter circuit: tee branches, elbows, radiator.

        Parameters
        ----------
        tee_branches : int
            Tee branches passed (supply and return). [-]

        Returns
        -------
        dict of str to float
            Fitting counts by kind. [-]
        """
        return {
            "tee_branch": tee_branches,
            "elbow": self.table.elbows_per_emitter_circuit,
            "radiator": 1,
        }

    def header_fittings(self) -> dict[str, float]:
        """Fittings of a header segment: the run of the tee at its end, elbows.

        Returns
        -------
        dict of str to float
            Fitting counts by kind. [-]
        """
        return {"tee_run": 1, "elbow": self.table.elbows_per_header_segment}

    def pump(
        self,
        name: str,
        inlet: int,
        outlet: int,
        pump: ResolvedPump,
        flow_kg_s: float,
        check_valve: bool,
        via: tuple[tuple[float, float], ...] = (),
    ) -> int:
        """Add a pump link from ``inlet`` to ``outlet``.

        Curve, control mode and set head come from ``pump``; it holds a check
        valve when ``pump.check_valve`` says so, else when ``check_valve`` (the
        default for the pump's place) is True.

        Parameters
        ----------
        name : str
            Link name. [-]
        inlet, outlet : int
            Suction and outlet nodes. [-]
        pump : ResolvedPump
            The pump with its fitted curve. [-]
        flow_kg_s : float
            Design flow through the pump. [kg/s]
        check_valve : bool
            Default check valve of the pump's place. [-]
        via : tuple of (float, float), optional
            Drawing waypoints from inlet to outlet. [drawing units]

        Returns
        -------
        int
            Index of the new link.
        """
        self.draw_via(len(self.links), via)
        return self.add(
            LinkSpec(
                name,
                inlet,
                outlet,
                LINK_PUMP,
                "pump",
                pump=pump.coeffs,
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
        """Size pipes if asked, apply fittings and freeze the network.

        Parameters
        ----------
        scheme : str
            Scheme name, recorded on the network. [-]
        reference : int
            Pressure reference node (the expansion vessel). [-]

        Returns
        -------
        BuiltLayout
            The network with its link records, fitting counts and drawing
            positions.
        """
        s = self.scenario
        limits = s.layout.sizing
        design_temp_C = self.resolved.design_water_temp_C
        apply_route_detail(
            s.route,
            self.links,
            lambda spec: self.nodes[spec.a][1] == LINE_RETURN,
            self.geometry.run_height,
            self.count,
        )
        if limits.mode == "auto":
            for spec in self.links:
                if spec.pipe is None or not spec.sized or spec.length_m <= 0.0:
                    continue
                spec.pipe = choose_pipe(
                    abs(spec.design_flow_kg_s),
                    spec.pipe,
                    sizing_rule(spec.role),
                    limits,
                    design_temp_C,
                )
        for hook in self.after_sizing:
            hook(self)
        return BuiltLayout(
            network=self._network(scheme, reference),
            links=tuple(self.links),
            fitting_count={
                **{kind: int(self.count.get(kind, 0)) for kind in FITTING_KINDS},
                **{
                    kind: int(n)
                    for kind, n in sorted(self.count.items())
                    if kind not in FITTING_KINDS and n
                },
            },
            node_xy=np.array([n[3] for n in self.nodes], dtype=float).reshape(-1, 2),
            node_height_m=np.array([n[4] for n in self.nodes], dtype=float),
            emitter_xy=dict(self.emitter_xy),
            fittings=self.table,
            design_temp_C=design_temp_C,
            limits=limits,
            obstacles=tuple(o for f in s.route.floors for o in f.obstacles),
            link_via=dict(self.link_via),
            marks=tuple(self.marks),
            circuits=tuple(self.circuits),
        )

    def _network(self, scheme: str, reference: int) -> Network:
        """The network arrays of the links and nodes collected so far."""
        s = self.scenario
        links = self.links
        pipes = [k.pipe for k in links]
        length = np.array([k.length_m for k in links])
        diameter = np.array([p.inner_diameter_m if p else 0.0 for p in pipes])
        volume = math.pi / 4.0 * diameter**2 * length
        volume += np.array([k.extra_volume_m3 for k in links])
        insulated = s.route.insulated
        return Network(
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
            zeta=np.array([self.zeta(k.fittings) + k.extra_zeta for k in links]),
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
            closed=np.array(
                [k.emitter >= 0 and s.emitters[k.emitter].closed for k in links],
                dtype=bool,
            ),
        )
