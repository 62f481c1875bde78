"""Design figures of a built layout: index circuit, pump duties, sizing checks.

With every emitter at its design flow, the pressure need of an emitter is the
largest sum of pressure drops along a path from its pump's outlet through the
emitter back to the pump's inlet, following the design flow. The emitter with the
largest need is the index circuit; its need is the head the pump must give at the
design flow (its duty point). Pipe sizes themselves are chosen while the layout
is built (:mod:`simheat.hydraulics.layouts.pipes`); here every run is checked
against the sizing limits and every header segment is listed with the size it
has, its design flow, velocity and friction gradient. The figures also carry the
layout's heights (:mod:`simheat.hydraulics.heights`) and what each obstacle on
the route costs it (:mod:`simheat.hydraulics.detours`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from simheat.errors import ScenarioError
from simheat.hydraulics.detours import ObstacleCost, obstacle_costs
from simheat.hydraulics.heights import HeightFigures, height_figures
from simheat.hydraulics.layouts.pipes import (
    friction_gradient_Pa_m,
    link_pressure_drop_Pa,
    rule_limits,
    velocity_m_s,
)
from simheat.hydraulics.layouts.records import (
    BRANCH_ROLES,
    HEADER_ROLES,
    BuiltLayout,
    sizing_rule,
)
from simheat.hydraulics.network import LINK_EMITTER, LINK_PUMP
from simheat.physics._kernels import water_density_kg_m3

# Emitter needs closer than this fraction count as equal (round-off). [-]
TIE_RTOL = 1e-9

__all__ = ["DesignFigures", "HeaderSegment", "PumpDuty", "design_figures"]


@dataclass(frozen=True)
class PumpDuty:
    """Duty point a pump needs so that every emitter it drives gets design flow.

    Attributes
    ----------
    pump : str
        Pump link name. [-]
    flow_m3_h : float
        Design volume flow through the pump. [m3/h]
    head_kPa : float
        Pressure rise needed: the need of its index circuit. [kPa]
    index_emitter : str or None
        Emitter of its index circuit (None for a primary pump without emitters). [-]
    """

    pump: str
    flow_m3_h: float
    head_kPa: float
    index_emitter: str | None


@dataclass(frozen=True)
class HeaderSegment:
    """One header-class pipe (feed, riser, header, loop, ...) as sized.

    Attributes
    ----------
    link : str
        Link name. [-]
    role : str
        Its role in the plan (``feed``, ``riser``, ``header``, ...). [-]
    pipe : str
        Pipe type it has (chosen by automatic sizing, or given). [-]
    length_m : float
        Its length. [m]
    flow_kg_h : float
        Design mass flow. [kg/h]
    velocity_m_s : float
        Mean velocity at design flow. [m/s]
    gradient_Pa_m : float
        Friction pressure gradient at design flow. [Pa/m]
    """

    link: str
    role: str
    pipe: str
    length_m: float
    flow_kg_h: float
    velocity_m_s: float
    gradient_Pa_m: float

    def to_dict(self) -> dict:
        """JSON-ready segment (units in the keys)."""
        return {
            "link": self.link,
            "role": self.role,
            "pipe": self.pipe,
            "length_m": round(self.length_m, 4),
            "flow_kg_per_h": round(self.flow_kg_h, 3),
            "velocity_m_per_s": round(self.velocity_m_s, 4),
            "gradient_Pa_per_m": round(self.gradient_Pa_m, 2),
        }


@dataclass(frozen=True)
class DesignFigures:
    """Design figures of one layout.

    Attributes
    ----------
    scheme : str
        Scheme name. [-]
    pipe_length_m : dict of str to float
        Total pipe length by pipe type (both legs of every pair counted). [m]
    fitting_count : dict of str to int
        Fittings by kind. [-]
    emitter_need_kPa : dict of str to float
        Pressure need of each emitter's circuit at design flows. [kPa]
    index_emitter : str
        Emitter with the largest need. [-]
    index_pressure_drop_kPa : float
        Its need. [kPa]
    pumps : tuple of PumpDuty
        Duty point of every pump. [-]
    water_volume_L : float
        Water in pipes, radiators, source and pumps. [L]
    over_limit : tuple of (str, float, float)
        Links whose design velocity [m/s] or gradient [Pa/m] exceeds the sizing
        limits: (name, velocity, gradient).
    header_segments : tuple of HeaderSegment
        Every header-class pipe with its size, flow, velocity and gradient. [-]
    obstacles : tuple of ObstacleCost
        What each obstacle on the route costs this layout. [-]
    heights : HeightFigures or None
        Static head, cold fill pressure, high and low points. [-]
    """

    scheme: str
    pipe_length_m: dict[str, float]
    fitting_count: dict[str, int]
    emitter_need_kPa: dict[str, float]
    index_emitter: str
    index_pressure_drop_kPa: float
    pumps: tuple[PumpDuty, ...]
    water_volume_L: float
    over_limit: tuple[tuple[str, float, float], ...]
    header_segments: tuple[HeaderSegment, ...] = ()
    obstacles: tuple[ObstacleCost, ...] = ()
    heights: HeightFigures | None = None

    def to_dict(self) -> dict:
        """JSON-ready figures (practical units named in the keys)."""
        return {
            "name": self.scheme,
            "pipe_length_m": round(sum(self.pipe_length_m.values()), 3),
            "pipe_length_by_size_m": {
                k: round(v, 3) for k, v in self.pipe_length_m.items()
            },
            "fittings": dict(self.fitting_count),
            "index_emitter": self.index_emitter,
            "index_pressure_drop_kPa": round(self.index_pressure_drop_kPa, 4),
            "emitter_pressure_need_kPa": {
                k: round(v, 4) for k, v in self.emitter_need_kPa.items()
            },
            "pumps": [
                {
                    "pump": p.pump,
                    "flow_m3_per_h": round(p.flow_m3_h, 5),
                    "head_kPa": round(p.head_kPa, 4),
                    "index_emitter": p.index_emitter,
                }
                for p in self.pumps
            ],
            "water_volume_L": round(self.water_volume_L, 3),
            "over_limit": [
                {
                    "link": n,
                    "velocity_m_per_s": round(v, 4),
                    "gradient_Pa_per_m": round(g, 2),
                }
                for n, v, g in self.over_limit
            ],
            "header_segments": [seg.to_dict() for seg in self.header_segments],
            "obstacles": [o.to_dict() for o in self.obstacles],
            "heights": None if self.heights is None else self.heights.to_dict(),
        }


def _longest_paths(n_nodes, edges, start, reverse=False):
    """Largest pressure-drop sum from ``start`` to every node (to it if reverse).

    ``edges`` are (from, to, dp) along the design flow; zero-flow links appear
    both ways with zero weight. Label-correcting relaxation; the design flow
    field has no cycle of positive weight.
    """
    best = np.full(n_nodes, -np.inf)
    best[start] = 0.0
    for _ in range(n_nodes):
        changed = False
        for a, b, w in edges:
            src, dst = (b, a) if reverse else (a, b)
            if best[src] > -np.inf and best[src] + w > best[dst] + 1e-9:
                best[dst] = best[src] + w
                changed = True
        if not changed:
            break
    return best


def design_figures(built: BuiltLayout) -> DesignFigures:
    """Pipe lengths, fittings, index circuit, pump duties and water volume.

    Parameters
    ----------
    built : BuiltLayout
        A layout from :func:`simheat.hydraulics.layouts.describe`. [-]

    Returns
    -------
    DesignFigures
        The layout's design figures at design flows, valves fully open at
        their presets, water at the mean design temperature.
    """
    net = built.network
    temp = built.design_temp_C
    rho = float(water_density_kg_m3(temp))
    flows = built.design_flow_kg_s
    dp = np.array(
        [
            link_pressure_drop_Pa(spec, flows[k], float(net.zeta[k]), temp)
            for k, spec in enumerate(built.links)
        ]
    )
    edges = []
    for k in range(net.n_links):
        if net.link_kind[k] in (LINK_EMITTER, LINK_PUMP):
            continue
        a, b = int(net.from_node[k]), int(net.to_node[k])
        if flows[k] > 0.0:
            edges.append((a, b, dp[k]))
        elif flows[k] < 0.0:
            edges.append((b, a, -dp[k]))
        else:
            edges += [(a, b, 0.0), (b, a, 0.0)]
    emitter_links = net.emitter_links()
    need = np.full(len(emitter_links), -np.inf)
    duties = []
    for p in net.pump_links():
        inlet, outlet = int(net.from_node[p]), int(net.to_node[p])
        out = _longest_paths(net.n_nodes, edges, outlet)
        back = _longest_paths(net.n_nodes, edges, inlet, reverse=True)
        head = out[inlet] if np.isfinite(out[inlet]) else 0.0
        index = None
        for i, link in enumerate(emitter_links):
            s, r = int(net.from_node[link]), int(net.to_node[link])
            total = out[s] + dp[link] + back[r]
            if np.isfinite(total):
                need[i] = max(need[i], total)
                if total > head:
                    head, index = total, net.emitter_ids[i]
        duties.append(
            PumpDuty(
                net.link_names[p],
                abs(flows[p]) / rho * 3600.0,
                float(head) / 1e3,
                index,
            )
        )
    if not np.all(np.isfinite(need)):
        missing = [net.emitter_ids[i] for i in np.flatnonzero(~np.isfinite(need))]
        raise ScenarioError(
            f"network {net.scheme!r}: no pump drives emitter(s) {', '.join(missing)}"
        )
    # Ties (a one-pipe loop, where every emitter's circuit is the whole loop) go
    # to the emitter farthest along the pipe from the source.
    tied = np.flatnonzero(need >= np.max(need) * (1.0 - TIE_RTOL))
    distance = net.node_distance_m[net.from_node[emitter_links[tied]]]
    worst = int(tied[np.argmax(distance)])
    lengths: dict[str, float] = {}
    over = []
    segments = []
    for k, spec in enumerate(built.links):
        if spec.pipe is None or spec.length_m <= 0.0 or spec.role == "source":
            continue
        lengths[spec.pipe.name] = lengths.get(spec.pipe.name, 0.0) + spec.length_m
        if spec.role not in HEADER_ROLES | BRANCH_ROLES:
            continue
        v_max, g_max = rule_limits(sizing_rule(spec.role), built.limits)
        d = spec.pipe.inner_diameter_m
        v = velocity_m_s(flows[k], d, temp)
        g = friction_gradient_Pa_m(flows[k], d, spec.pipe.roughness_m, temp)
        if v > v_max * (1 + 1e-9) or g > g_max * (1 + 1e-9):
            over.append((spec.name, v, g))
        if spec.role in HEADER_ROLES:
            segments.append(
                HeaderSegment(
                    spec.name,
                    spec.role,
                    spec.pipe.name,
                    float(spec.length_m),
                    float(abs(flows[k])) * 3600.0,
                    float(v),
                    float(g),
                )
            )
    return DesignFigures(
        scheme=net.scheme,
        pipe_length_m=dict(sorted(lengths.items())),
        fitting_count=dict(built.fitting_count),
        emitter_need_kPa={
            net.emitter_ids[i]: float(need[i]) / 1e3 for i in range(len(need))
        },
        index_emitter=net.emitter_ids[worst],
        index_pressure_drop_kPa=float(need[worst]) / 1e3,
        pumps=tuple(duties),
        water_volume_L=float(np.sum(net.water_volume_m3)) * 1e3,
        over_limit=tuple(over),
        header_segments=tuple(segments),
        obstacles=obstacle_costs(built),
        heights=height_figures(built),
    )
