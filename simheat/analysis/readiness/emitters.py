"""Radiators at low flow temperatures by the EN 442 law: limits and replacements.

On the *basis* (:class:`~simheat.analysis.readiness.result.Basis`) the return
temperature follows the flow temperature: the design drop kept (the radiator's
flow set to whatever carries its share across that drop, as after balancing),
or a fixed return temperature. A radiator of nominal output ``N`` and exponent
``n`` in a room at ``t_i`` then gives ``N g(T)`` at flow temperature ``T`` with

    g(T) = (dT_lm(T, T_return(T), t_i) / dT_n) ** n,

the EN 442 characteristic with the log-mean excess (EN 442-2:2014, eq. 4 and
section 3; the one law, :func:`simheat.physics.emitter.emitter_output_W`). It
meets its share ``S`` of the room's design load when ``N g(T) >= S``; the
lowest such ``T`` is found by Brent's method, the replacement that meets it at
a target is ``S / g(T)``. Each answer is recomputed by the steady energy
balance of :func:`simheat.physics.emitter.steady_output_W` (outlet found by
root finding) at the flow that carries the share across the basis'
temperatures: a different route to the same law.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.optimize import brentq

from simheat.analysis.readiness.result import Basis, RadiatorLimit
from simheat.physics.emitter import emitter_output_W, log_mean_excess_K, steady_output_W
from simheat.physics.water import specific_heat_J_kg_K
from simheat.resolve import ResolvedScenario
from simheat.scenario.model import Scenario

# Flow temperatures are searched up to this: the scenario's highest flow
# temperature. [°C]
HIGHEST_FLOW_C = 95.0
# A lowest flow temperature is rounded up to this step, and a replacement's
# nominal output up to REPLACEMENT_STEP_W, so the figure shown meets the load.
FLOW_STEP_K = 0.1  # [K]
REPLACEMENT_STEP_W = 10.0  # [W]
# Brent's method stops within this of the root. [K]
FLOW_XTOL_K = 1e-6
# A return this close above the room still counts as below it: the log-mean
# excess collapses there. [K]
RETURN_MARGIN_K = 1e-6


def round_up(value: float, step: float) -> float:
    """Round up to a multiple of ``step`` (a hair of round-off tolerated).

    Parameters
    ----------
    value : float
        The value. [any]
    step : float
        The step. [same unit]

    Returns
    -------
    float
        The smallest multiple of ``step`` not below ``value`` (less 1e-9 steps).

    Examples
    --------
    >>> round_up(47.31, 0.1), round_up(1230.0, 10.0), round_up(1230.4, 10.0)
    (47.4, 1230.0, 1240.0)
    """
    return round(math.ceil(value / step - 1e-9) * step, 10)


def output_per_nominal(
    exponent: float, flow_C: float, return_C: float, room_C: float
) -> float | None:
    """Output per watt of nominal output at a flow and return temperature.

    Parameters
    ----------
    exponent : float
        EN 442 exponent n. [-]
    flow_C, return_C : float
        Water in and out. [°C]
    room_C : float
        Room temperature. [°C]

    Returns
    -------
    float or None
        ``(dT_lm / dT_n) ** n`` (EN 442-2:2014, eq. 4); None when the return
        does not lie above the room or the flow not above the return. [-]

    Examples
    --------
    At the nominal point it is 1; at 45/35 °C and 20 °C, with n = 1.3,
    dT_lm = 10 / ln(25/15) = 19.58 K and (19.58 / 49.83) ** 1.3 = 0.2968:

    >>> round(output_per_nominal(1.3, 75.0, 65.0, 20.0), 9)
    1.0
    >>> round(output_per_nominal(1.3, 45.0, 35.0, 20.0), 4)
    0.2968
    """
    if return_C <= room_C + RETURN_MARGIN_K or flow_C <= return_C:
        return None
    excess = float(log_mean_excess_K(flow_C, return_C, room_C))
    return float(emitter_output_W(1.0, exponent, excess))


def room_shares_W(scenario: Scenario, resolved: ResolvedScenario) -> np.ndarray:
    """Each radiator's share of its room's design load, by nominal output. [W].

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    resolved : ResolvedScenario
        Its resolve step (room design loads). [-]

    Returns
    -------
    ndarray
        One share per emitter, in scenario order (as the design flows share
        the load); 0 for a radiator shut for good, which takes none. [W]
    """
    nominal_by_room = np.zeros(len(scenario.rooms))
    for e in scenario.emitters:
        if not e.closed:
            nominal_by_room[e.room] += e.nominal_power_W
    return np.array(
        [
            0.0
            if e.closed
            else resolved.rooms[e.room].design_heat_load_W
            * e.nominal_power_W
            / nominal_by_room[e.room]
            for e in scenario.emitters
        ]
    )


def lowest_flow_for(
    nominal_W: float, exponent: float, share_W: float, room_C: float, basis: Basis
) -> float | None:
    """Lowest flow temperature at which a radiator gives its share. [°C].

    Parameters
    ----------
    nominal_W : float
        Output at 75/65/20 °C. [W]
    exponent : float
        EN 442 exponent. [-]
    share_W : float
        What it must give. [W]
    room_C : float
        Room temperature. [°C]
    basis : Basis
        Return temperature rule. [-]

    Returns
    -------
    float or None
        The root of ``N g(T) = S`` (not rounded); None when even
        :data:`HIGHEST_FLOW_C` is not enough.

    Notes
    -----
    ``g`` rises with ``T`` from zero where the return meets the room, so the
    root is bracketed between there and :data:`HIGHEST_FLOW_C`. With the drop
    ``d`` kept it has a closed form: with ``L`` the log-mean excess that gives
    the share, ``T = t_i + d q / (q - 1)``, ``q = exp(d / L)``; the tests use it.
    """
    if basis.drop_K is None:
        low = max(basis.return_C, room_C) + 2.0 * RETURN_MARGIN_K
    else:
        low = room_C + basis.drop_K + 2.0 * RETURN_MARGIN_K

    def margin(flow_C: float) -> float:
        g = output_per_nominal(exponent, flow_C, basis.return_at(flow_C), room_C)
        return (0.0 if g is None else nominal_W * g) - share_W

    if low >= HIGHEST_FLOW_C or margin(HIGHEST_FLOW_C) < 0.0:
        return None
    if margin(low) >= 0.0:
        return low
    return float(brentq(margin, low, HIGHEST_FLOW_C, xtol=FLOW_XTOL_K))


def carried_flow_kg_s(share_W: float, flow_C: float, basis: Basis) -> float:
    """Mass flow that carries a share across the basis' temperatures. [kg/s].

    Parameters
    ----------
    share_W : float
        Heat to carry. [W]
    flow_C : float
        Flow temperature. [°C]
    basis : Basis
        Return temperature rule. [-]
    """
    cp = float(specific_heat_J_kg_K(flow_C))
    return share_W / (cp * (flow_C - basis.return_at(flow_C)))


def verified_output_W(
    nominal_W: float,
    exponent: float,
    share_W: float,
    flow_C: float,
    room_C: float,
    basis: Basis,
) -> float:
    """A radiator's output recomputed by the steady energy balance. [W].

    Parameters
    ----------
    nominal_W : float
        Output at 75/65/20 °C. [W]
    exponent : float
        EN 442 exponent. [-]
    share_W : float
        Its share: the flow is the one that carries it across the basis. [W]
    flow_C : float
        Flow temperature. [°C]
    room_C : float
        Room temperature. [°C]
    basis : Basis
        Return temperature rule. [-]

    Returns
    -------
    float
        :func:`~simheat.physics.emitter.steady_output_W` at that flow: at least
        the share exactly when ``N g(T) >= S`` (a bigger radiator cools the
        water further, below the basis' return). [W]
    """
    flow_kg_s = carried_flow_kg_s(share_W, flow_C, basis)
    cp = float(specific_heat_J_kg_K(flow_C))
    return steady_output_W(nominal_W, exponent, flow_C, flow_kg_s, room_C, cp)


def radiator_limits(
    scenario: Scenario, shares_W: np.ndarray, basis: Basis
) -> tuple[RadiatorLimit, ...]:
    """Every radiator's lowest flow temperature on the basis, verified.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    shares_W : ndarray
        Each radiator's share of its room's load (:func:`room_shares_W`). [W]
    basis : Basis
        Return temperature rule. [-]

    Returns
    -------
    tuple of RadiatorLimit
        In scenario order, radiators shut for good left out; each limit
        rounded up to :data:`FLOW_STEP_K` and the output there recomputed
        (:func:`verified_output_W`).
    """
    out = []
    for i, (e, share) in enumerate(zip(scenario.emitters, shares_W, strict=True)):
        if e.closed:  # shut for good: no water, no share, nothing to judge
            continue
        room = scenario.rooms[e.room]
        root = lowest_flow_for(
            e.nominal_power_W, e.exponent, float(share), room.setpoint_C, basis
        )
        lowest = verified = None
        if root is not None:
            lowest = min(round_up(root, FLOW_STEP_K), HIGHEST_FLOW_C)
            verified = verified_output_W(
                e.nominal_power_W, e.exponent, float(share), lowest,
                room.setpoint_C, basis,
            )  # fmt: skip
        out.append(
            RadiatorLimit(
                id=e.id,
                room=room.id,
                nominal_W=e.nominal_power_W,
                exponent=e.exponent,
                room_C=room.setpoint_C,
                share_W=float(share),
                lowest_flow_temp_C=lowest,
                verified_output_W=verified,
                emitter=i,
            )
        )
    return tuple(out)


def replacement_W(
    limit: RadiatorLimit, flow_C: float, basis: Basis
) -> tuple[float | None, float | None]:
    """Output on the basis and the nominal output a replacement would need.

    Parameters
    ----------
    limit : RadiatorLimit
        The radiator (nominal output, exponent, share, room). [-]
    flow_C : float
        Target flow temperature. [°C]
    basis : Basis
        Return temperature rule. [-]

    Returns
    -------
    (float or None, float or None)
        Its output at the target (None when the basis' return would not lie
        above the room) and, when that falls short of the share, the nominal
        output of a replacement of the same exponent that meets it, rounded up
        to :data:`REPLACEMENT_STEP_W` (None when enough, or when none can). [W]
    """
    g = output_per_nominal(
        limit.exponent, flow_C, basis.return_at(flow_C), limit.room_C
    )
    if g is None:
        return None, None
    output = limit.nominal_W * g
    if output >= limit.share_W:
        return output, None
    return output, round_up(limit.share_W / g, REPLACEMENT_STEP_W)


def output_curves(
    limits: tuple[RadiatorLimit, ...], basis: Basis, flow_C: np.ndarray
) -> np.ndarray:
    """Output over share on the basis for each radiator along flow temperatures.

    Parameters
    ----------
    limits : tuple of RadiatorLimit
        The radiators. [-]
    basis : Basis
        Return temperature rule. [-]
    flow_C : ndarray
        Flow temperatures. [°C]

    Returns
    -------
    ndarray, shape (n_radiators, len(flow_C))
        Per cent of the share; NaN where the basis' return would not lie above
        the room. [%]
    """
    out = np.full((len(limits), len(flow_C)), np.nan)
    for i, limit in enumerate(limits):
        for j, temp in enumerate(flow_C):
            g = output_per_nominal(
                limit.exponent, float(temp), basis.return_at(float(temp)), limit.room_C
            )
            if g is not None and limit.share_W > 0.0:
                out[i, j] = 100.0 * limit.nominal_W * g / limit.share_W
    return out
