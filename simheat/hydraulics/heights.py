"""Heights of a built layout: static head, cold fill pressure, high and low points.

Every node of a built layout has a height above the plant, and a pipe passing an
obstacle over or under it rises to, or dips to, the detour's height on the way.
From that geometry:

- the highest and lowest points of the pipework, the static head between them,
  and the minimum cold fill pressure at the plant: the highest point's static
  head plus a margin (:data:`FILL_MARGIN_KPA`, common trade practice);
- every high point, where air collects and an automatic air vent is needed, and
  every low point, where a drain is needed.

High and low points are found on the pipes alone: radiators are taken to sit
above the pipes they hang from and to be vented by their own bleed valves, so a
radiator circuit neither carries air away from a header nor drains it. A detour
over an obstacle is a high point of each pipe passing it (one per leg of a
home-run pair), a detour under one a low point. Elsewhere a high point is a
level stretch of connected pipe (a single node, or several joined by level
pipes) from which every pipe leading away falls; a low point one from which
every pipe rises. A pipework with no height differences at all is one level
stretch with nothing leading away: it counts as one high point and one low
point (it still needs one vent and one drain).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from simheat.hydraulics.layouts.records import BuiltLayout
from simheat.hydraulics.network import LINK_EMITTER
from simheat.physics._kernels import water_density_kg_m3

__all__ = [
    "COLD_FILL_TEMP_C",
    "FILL_MARGIN_KPA",
    "HeightFigures",
    "PipePoint",
    "height_figures",
]

STANDARD_GRAVITY_M_S2 = 9.80665  # 3rd CGPM (1901)
# Water temperature of a cold fill, for the static head. [°C]
COLD_FILL_TEMP_C = 10.0
# Cold fill pressure at the plant above the static head of the highest point:
# keeps the top of the system above atmospheric pressure, so automatic air vents
# expel air rather than draw it in. 0.3 bar is common trade practice for sealed
# systems in dwellings (from memory). [kPa]
FILL_MARGIN_KPA = 30.0
# Heights closer than this count as level. [m]
LEVEL_TOL_M = 1e-9


@dataclass(frozen=True)
class PipePoint:
    """A high point (needs an automatic air vent) or a low point (needs a drain).

    Attributes
    ----------
    kind : str
        ``"high"`` or ``"low"``. [-]
    height_m : float
        Height above the plant. [m]
    where : str
        Node name (a level stretch: the node farthest along the pipes from the
        source for a high point, nearest for a low point) or link name (a
        detour; ``... (supply leg)`` / ``(return leg)`` on a home-run pair). [-]
    obstacle : str or None
        Name of the obstacle whose detour makes it, None for a level stretch. [-]
    """

    kind: str
    height_m: float
    where: str
    obstacle: str | None = None


@dataclass(frozen=True)
class HeightFigures:
    """Static heights and pressures of one layout, and where vents and drains go.

    Attributes
    ----------
    highest_m, lowest_m : float
        Highest and lowest points of the pipework above the plant. [m]
    static_head_kPa : float
        Static pressure of the water column from the highest point down to the
        lowest, cold. [kPa]
    fill_pressure_kPa : float
        Minimum cold fill pressure at the plant (gauge): the static head of
        the highest point above the plant plus :data:`FILL_MARGIN_KPA`. [kPa]
    lowest_point_pressure_kPa : float
        Gauge pressure at the lowest point, cold, filled to that pressure. [kPa]
    high_points, low_points : tuple of PipePoint
        Where air collects (automatic air vents) and where water stays
        (drains). [-]
    """

    highest_m: float
    lowest_m: float
    static_head_kPa: float
    fill_pressure_kPa: float
    lowest_point_pressure_kPa: float
    high_points: tuple[PipePoint, ...]
    low_points: tuple[PipePoint, ...]

    def to_dict(self) -> dict:
        """JSON-ready figures (units in the keys)."""

        def points(ps):
            return [
                {
                    "where": p.where,
                    "height_m": round(p.height_m, 4),
                    "obstacle": p.obstacle,
                }
                for p in ps
            ]

        return {
            "highest_m": round(self.highest_m, 4),
            "lowest_m": round(self.lowest_m, 4),
            "static_head_kPa": round(self.static_head_kPa, 3),
            "fill_pressure_kPa": round(self.fill_pressure_kPa, 3),
            "fill_margin_kPa": FILL_MARGIN_KPA,
            "lowest_point_pressure_kPa": round(self.lowest_point_pressure_kPa, 3),
            "air_vents": points(self.high_points),
            "drains": points(self.low_points),
        }


def _plateaus(n_nodes: int, level_links: list[tuple[int, int]]) -> np.ndarray:
    """Label of the level stretch of every node (union-find)."""
    parent = list(range(n_nodes))

    def root(i: int) -> int:
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    for a, b in level_links:
        parent[root(a)] = root(b)
    return np.array([root(i) for i in range(n_nodes)])


def height_figures(built: BuiltLayout) -> HeightFigures:
    """Static head, cold fill pressure, high and low points of a built layout.

    Parameters
    ----------
    built : BuiltLayout
        A layout from :func:`simheat.hydraulics.layouts.describe`, with node
        heights and the detours of its pipes. [-]

    Returns
    -------
    HeightFigures
        The figures; see the module notes for how points are found.

    Notes
    -----
    Hydrostatics: ``p = rho g dh`` with cold water (``COLD_FILL_TEMP_C``,
    density from the IAPWS-95 fit of :mod:`simheat.physics.water`) and standard
    gravity. The margin of the fill pressure is common trade practice.
    """
    net = built.network
    h = built.node_height_m
    extremes: list[PipePoint] = []
    # first point of each pipe's profile seen from each end: (node, height)
    leaving: list[tuple[int, float]] = []
    level: list[tuple[int, int]] = []
    for k, spec in enumerate(built.links):
        bumps = [d for d in spec.detours if d.obstacle.passed != "around"]
        for d in bumps:
            kind = "high" if d.obstacle.passed == "over" else "low"
            legs = ("supply leg", "return leg") if spec.pipes == 2 else ("",)
            for leg in legs:
                where = f"{spec.name} ({leg})" if leg else spec.name
                extremes.append(PipePoint(kind, d.height_m, where, d.obstacle.name))
        if net.link_kind[k] == LINK_EMITTER:
            continue
        a, b = int(net.from_node[k]), int(net.to_node[k])
        if bumps:
            leaving += [(a, bumps[0].height_m), (b, bumps[-1].height_m)]
        elif abs(h[a] - h[b]) <= LEVEL_TOL_M:
            level.append((a, b))
        else:
            leaving += [(a, float(h[b])), (b, float(h[a]))]
    label = _plateaus(net.n_nodes, level)
    above = np.zeros(net.n_nodes, dtype=bool)  # some pipe rises from the stretch
    below = np.zeros(net.n_nodes, dtype=bool)  # some pipe falls from it
    for node, next_m in leaving:
        above[label[node]] |= next_m > h[node] + LEVEL_TOL_M
        below[label[node]] |= next_m < h[node] - LEVEL_TOL_M
    distance = net.node_distance_m
    highs, lows = [], []
    for stretch in np.unique(label):
        members = np.flatnonzero(label == stretch)
        height = float(h[members[0]])
        if not above[stretch]:
            far = members[np.argmax(distance[members])]
            highs.append(PipePoint("high", height, net.node_names[far]))
        if not below[stretch]:
            near = members[np.argmin(distance[members])]
            lows.append(PipePoint("low", height, net.node_names[near]))
    highs += [p for p in extremes if p.kind == "high"]
    lows += [p for p in extremes if p.kind == "low"]
    highest = max([float(np.max(h))] + [p.height_m for p in highs])
    lowest = min([float(np.min(h))] + [p.height_m for p in lows])
    rho_g_kPa = float(water_density_kg_m3(COLD_FILL_TEMP_C)) * STANDARD_GRAVITY_M_S2
    rho_g_kPa /= 1e3
    fill = rho_g_kPa * max(highest, 0.0) + FILL_MARGIN_KPA
    return HeightFigures(
        highest_m=highest,
        lowest_m=lowest,
        static_head_kPa=rho_g_kPa * (highest - lowest),
        fill_pressure_kPa=fill,
        lowest_point_pressure_kPa=fill - rho_g_kPa * lowest,
        high_points=tuple(highs),
        low_points=tuple(lows),
    )
