"""Pipe sizes from the catalog within velocity and gradient limits.

Sizing rule (common trade practice for water heating in dwellings, from memory):
mean velocity at most 0.7 m/s in headers, feeds and risers and at most 0.5 m/s in
radiator branches and home-run pairs, to keep flow noise down, and a friction
pressure gradient at most 150 Pa/m so pump heads stay small. A scenario may state
its own limits (``[layout.sizing]``). Also here: the pressure drop of one link
record at a given flow, which the one-pipe tees and the design figures share.
"""

from __future__ import annotations

import math

from simheat.errors import ScenarioError
from simheat.hydraulics.layouts.records import LinkSpec
from simheat.physics._kernels import (
    pipe_pressure_drop_Pa,
    valve_pressure_drop_Pa,
    water_density_kg_m3,
)
from simheat.physics.pipe_catalog import PIPE_CATALOG, PipeType
from simheat.scenario.model import PipeSpec, SizingLimits

# Sizing limits, common trade practice for dwellings (from memory); the defaults
# of SizingLimits.
HEADER_VELOCITY_MAX_M_S = SizingLimits.header_velocity_max_m_s  # headers, risers
BRANCH_VELOCITY_MAX_M_S = SizingLimits.branch_velocity_max_m_s  # branches [m/s]
GRADIENT_MAX_PA_M = SizingLimits.gradient_max_Pa_m  # friction gradient [Pa/m]


def pipe_series(name: str) -> list[PipeType]:
    """Catalog sizes of the series (material prefix) of a catalog name, by bore.

    Parameters
    ----------
    name : str
        A catalog name such as ``"cu_15x1"``; its prefix (``cu``) is the series. [-]

    Returns
    -------
    list of PipeType
        The series' sizes in increasing bore; empty for a name outside the
        catalog (a custom pipe).

    Examples
    --------
    >>> [p.name for p in pipe_series("pex_16x2")][:2]
    ['pex_14x2', 'pex_16x2']
    """
    if name not in PIPE_CATALOG:
        return []
    prefix = name.split("_", 1)[0] + "_"
    sizes = [p for key, p in PIPE_CATALOG.items() if key.startswith(prefix)]
    return sorted(sizes, key=lambda p: p.inner_diameter_m)


def velocity_m_s(
    mass_flow_kg_s: float, inner_diameter_m: float, temp_C: float
) -> float:
    """Mean velocity of water in a pipe.

    Parameters
    ----------
    mass_flow_kg_s : float
        Mass flow. [kg/s]
    inner_diameter_m : float
        Bore. [m]
    temp_C : float
        Water temperature. [°C]

    Returns
    -------
    float
        Mean velocity, ``m / (rho pi d^2 / 4)``. [m/s]

    Examples
    --------
    >>> round(velocity_m_s(0.1, 0.02, 60.0), 3)
    0.324
    """
    area = math.pi / 4.0 * inner_diameter_m**2
    return abs(mass_flow_kg_s) / (water_density_kg_m3(temp_C) * area)


def friction_gradient_Pa_m(
    mass_flow_kg_s: float, inner_diameter_m: float, roughness_m: float, temp_C: float
) -> float:
    """Friction pressure drop per metre of straight pipe (Darcy-Weisbach).

    Parameters
    ----------
    mass_flow_kg_s : float
        Mass flow. [kg/s]
    inner_diameter_m : float
        Bore. [m]
    roughness_m : float
        Absolute wall roughness. [m]
    temp_C : float
        Water temperature. [°C]

    Returns
    -------
    float
        Pressure gradient. [Pa/m]

    Notes
    -----
    Colebrook-White friction with the laminar-turbulent blend of
    :mod:`simheat.physics.friction`.
    """
    dp, _ = pipe_pressure_drop_Pa(
        abs(mass_flow_kg_s), 1.0, inner_diameter_m, roughness_m, 0.0, temp_C
    )
    return float(dp)


def rule_limits(rule: str, limits: SizingLimits) -> tuple[float, float]:
    """Velocity [m/s] and gradient [Pa/m] limits of a sizing rule.

    Parameters
    ----------
    rule : str
        ``"header"`` or ``"branch"``. [-]
    limits : SizingLimits
        The scenario's limits. [m/s], [Pa/m]

    Returns
    -------
    tuple of float
        Largest mean velocity [m/s] and friction gradient [Pa/m].
    """
    velocity = (
        limits.branch_velocity_max_m_s
        if rule == "branch"
        else limits.header_velocity_max_m_s
    )
    return velocity, limits.gradient_max_Pa_m


def choose_pipe(
    mass_flow_kg_s: float,
    given: PipeSpec,
    rule: str,
    limits: SizingLimits,
    temp_C: float,
) -> PipeSpec:
    """Smallest catalog size of the given pipe's series within the limits.

    Parameters
    ----------
    mass_flow_kg_s : float
        Design mass flow of the run. [kg/s]
    given : PipeSpec
        The route's pipe type; its catalog series is searched. A custom pipe
        (not in the catalog) is kept as given. [-]
    rule : str
        ``"header"`` or ``"branch"``: which velocity limit applies. [-]
    limits : SizingLimits
        Velocity and gradient limits. [m/s], [Pa/m]
    temp_C : float
        Design water temperature. [°C]

    Returns
    -------
    PipeSpec
        The chosen size.

    Raises
    ------
    ScenarioError
        When even the largest size of the series exceeds a limit.
    """
    series = pipe_series(given.name)
    if not series:
        return given
    v_max, g_max = rule_limits(rule, limits)
    for p in series:
        if (
            velocity_m_s(mass_flow_kg_s, p.inner_diameter_m, temp_C) <= v_max
            and friction_gradient_Pa_m(
                mass_flow_kg_s, p.inner_diameter_m, p.roughness_m, temp_C
            )
            <= g_max
        ):
            return PipeSpec(
                p.name, p.inner_diameter_m, p.roughness_m, p.outer_diameter_m
            )
    largest = series[-1]
    raise ScenarioError(
        f"layout.sizing: a design flow of {mass_flow_kg_s * 3600:.0f} kg/h exceeds "
        f"the limits ({v_max:g} m/s, {g_max:g} Pa/m) even in {largest.name}; raise "
        "the limits or choose another pipe series"
    )


def link_pressure_drop_Pa(
    spec: LinkSpec, mass_flow_kg_s: float, zeta: float, temp_C: float
) -> float:
    """Pressure drop of a link's pipe, local losses and fully open valve.

    Parameters
    ----------
    spec : LinkSpec
        The link (length, pipe, valve Kv). [-]
    mass_flow_kg_s : float
        Signed mass flow. [kg/s]
    zeta : float
        Sum of the link's local loss coefficients. [-]
    temp_C : float
        Water temperature. [°C]

    Returns
    -------
    float
        Signed pressure drop, pump rise excluded. [Pa]
    """
    dp = 0.0
    if spec.pipe is not None and (spec.length_m > 0.0 or zeta > 0.0):
        dp += pipe_pressure_drop_Pa(
            mass_flow_kg_s,
            spec.length_m,
            spec.pipe.inner_diameter_m,
            spec.pipe.roughness_m,
            zeta,
            temp_C,
        )[0]
    if spec.kv > 0.0:
        dp += valve_pressure_drop_Pa(mass_flow_kg_s, spec.kv, 1.0, temp_C)[0]
    return float(dp)
