"""What each obstacle on the route costs a layout: pipe, elbows, pressure drop, vents.

Every pipe laid along a run past an obstacle takes a detour over, under or
around it (:mod:`simheat.hydraulics.layouts.route_detail`). The cost of one
obstacle in one scheme is summed over the pipes passing it: the extra pipe, the
extra elbows, the extra pressure drop at the design flow of each pipe, and the
high points (air vents) or low points (drains) the detours make.
"""

from __future__ import annotations

from dataclasses import dataclass

from simheat.hydraulics.layouts.records import BuiltLayout
from simheat.physics._kernels import pipe_pressure_drop_Pa

__all__ = ["ObstacleCost", "obstacle_costs"]


@dataclass(frozen=True)
class ObstacleCost:
    """The cost of one obstacle in one layout, over every pipe passing it.

    Attributes
    ----------
    name : str
        The obstacle's name. [-]
    where : str
        Key path of its table in the scenario. [-]
    passed : str
        ``"over"``, ``"under"`` or ``"around"``. [-]
    pipes : int
        Pipes passing it (each leg of a home-run pair counts). [-]
    extra_length_m : float
        Pipe added. [m]
    extra_elbows : int
        Elbows added. [-]
    extra_pressure_drop_kPa : float
        Pressure drop added at each pipe's design flow, summed over the pipes
        (supply and return in series: the extra head the circuits beyond it
        need). [kPa]
    air_vents, drains : int
        High points (over) and low points (under) its detours make. [-]
    """

    name: str
    where: str
    passed: str
    pipes: int
    extra_length_m: float
    extra_elbows: int
    extra_pressure_drop_kPa: float
    air_vents: int
    drains: int

    def to_dict(self) -> dict:
        """JSON-ready cost (units in the keys)."""
        return {
            "name": self.name,
            "key": self.where,
            "passed": self.passed,
            "pipes": self.pipes,
            "extra_length_m": round(self.extra_length_m, 4),
            "extra_elbows": self.extra_elbows,
            "extra_pressure_drop_kPa": round(self.extra_pressure_drop_kPa, 5),
            "air_vents": self.air_vents,
            "drains": self.drains,
        }


def obstacle_costs(built: BuiltLayout) -> tuple[ObstacleCost, ...]:
    """Cost of every obstacle of the route in a built layout.

    Parameters
    ----------
    built : BuiltLayout
        A layout from :func:`simheat.hydraulics.layouts.describe`. [-]

    Returns
    -------
    tuple of ObstacleCost
        One per obstacle of the route, in the route's order; an obstacle no
        pipe of this scheme passes costs nothing.

    Notes
    -----
    At a fixed flow the Darcy-Weisbach pressure drop of a pipe is linear in its
    length and in its sum of zeta values, so the detour's share is the drop of
    its own extra length and elbows at the pipe's design flow and the mean
    design water temperature: ``f(Re) dL/D rho v^2/2 + n zeta_elbow rho v^2/2``
    (:func:`simheat.physics._kernels.pipe_pressure_drop_Pa`).
    """
    temp = built.design_temp_C
    elbow_zeta = built.fittings.elbow_zeta
    totals = {
        o.where: [o, 0, 0.0, 0, 0.0, 0, 0]  # pipes, m, elbows, Pa, vents, drains
        for o in built.obstacles
    }
    for k, spec in enumerate(built.links):
        if not spec.detours:
            continue
        flow = abs(built.design_flow_kg_s[k])
        d = spec.pipe.inner_diameter_m
        for detour in spec.detours:
            o = detour.obstacle
            n = spec.pipes
            length = n * o.extra_length_m
            elbows = n * o.elbows
            dp, _ = pipe_pressure_drop_Pa(
                flow, length, d, spec.pipe.roughness_m, elbows * elbow_zeta, temp
            )
            t = totals[o.where]
            t[1] += n
            t[2] += length
            t[3] += elbows
            t[4] += float(dp)
            t[5] += n if o.passed == "over" else 0
            t[6] += n if o.passed == "under" else 0
    return tuple(
        ObstacleCost(
            o.name, o.where, o.passed, pipes, length, elbows, dp / 1e3, vents, drains
        )
        for o, pipes, length, elbows, dp, vents, drains in totals.values()
    )
