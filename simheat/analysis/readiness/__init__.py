"""``simheat readiness``: are the radiators ready for low flow temperatures.

The question of every heat-pump retrofit, answered at design conditions
(design outdoor temperature, every room at its setpoint and its design load):

- on the *basis* (the design drop kept, or a given return temperature), the
  lowest flow temperature at which every radiator gives its share of its
  room's load, and the radiators that set it (:mod:`~.emitters`, EN 442);
- per scheme, the same with the scheme's own flow split and steady network
  temperatures, as piped (:mod:`~.piped`, :mod:`~.steady`);
- at each target flow temperature: every radiator's output against its share,
  the nominal output a replacement would need (recomputed at the target), and
  as piped before and after the replacements (the scenario changed and solved
  again);
- for a heat pump, its capacity and COP at the design outdoor temperature and
  each target (its rating table);
- optionally the morning simulated at each target, as the radiators are and
  with that target's replacements in place (:mod:`~.mornings`).
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from simheat.analysis.readiness.emitters import (
    FLOW_STEP_K,
    HIGHEST_FLOW_C,
    output_curves,
    radiator_limits,
    replacement_W,
    room_shares_W,
    verified_output_W,
)
from simheat.analysis.readiness.mornings import at_flow_temperature, morning_at
from simheat.analysis.readiness.piped import PipedScheme, lowest_as_piped
from simheat.analysis.readiness.result import (
    Basis,
    OutputCurves,
    RadiatorAtTarget,
    RadiatorLimit,
    Readiness,
    ReadinessMorning,
    SchemeReadiness,
    TargetResult,
)
from simheat.errors import ScenarioError
from simheat.physics.heat_pump import (
    outside_rating,
    rating_value,
    warn_outside_rating,
)
from simheat.resolve import resolve
from simheat.scenario.model import Scenario

__all__ = [
    "DEFAULT_TARGETS_C",
    "Basis",
    "RadiatorAtTarget",
    "RadiatorLimit",
    "Readiness",
    "ReadinessMorning",
    "SchemeReadiness",
    "TargetResult",
    "at_flow_temperature",
    "readiness",
]

DEFAULT_TARGETS_C = (55.0, 50.0, 45.0, 35.0)
# Flow temperatures of the figure's curves: from floor heating to the
# nominal 75 °C and a little beyond. [°C]
CURVE_FLOW_C = np.arange(25.0, 80.01, 0.5)
# Radiators whose own lowest flow temperature lies within this below the
# house's are listed as close behind it (they would set the limit next). [K]
NEAR_LIMIT_K = 0.5
# Targets and a given return temperature stay within the scenario's flow
# temperature bounds. [°C]
LOWEST_TARGET_C = 25.0


def _basis(scenario: Scenario, drop_K: float | None, return_C: float | None) -> Basis:
    """The return rule, checked: a drop or a return temperature, not both."""
    if drop_K is not None and return_C is not None:
        raise ScenarioError("give either drop_K or return_C, not both")
    warmest = max(r.setpoint_C for r in scenario.rooms)
    if return_C is not None:
        if not warmest < return_C < HIGHEST_FLOW_C:
            raise ScenarioError(
                f"return_C: must lie above every room's setpoint ({warmest:g} °C) "
                f"and below {HIGHEST_FLOW_C:g} °C, got {return_C:g}"
            )
        return Basis(None, float(return_C))
    drop = scenario.design.temperature_drop_K if drop_K is None else float(drop_K)
    if not 0.0 < drop < HIGHEST_FLOW_C - warmest:
        raise ScenarioError(f"drop_K: must be > 0 and leave room for it, got {drop:g}")
    return Basis(drop, None)


def _targets(scenario: Scenario, targets_C: Sequence[float], basis: Basis):
    """Targets checked and sorted highest first."""
    warmest = max(r.setpoint_C for r in scenario.rooms)
    targets = sorted({float(t) for t in targets_C}, reverse=True)
    if not targets:
        raise ScenarioError("targets_C: give at least one target flow temperature")
    for t in targets:
        if not LOWEST_TARGET_C <= t <= HIGHEST_FLOW_C or t <= warmest:
            raise ScenarioError(
                f"targets_C: every target must lie within {LOWEST_TARGET_C:g} to "
                f"{HIGHEST_FLOW_C:g} °C and above every room's setpoint "
                f"({warmest:g} °C), got {t:g}"
            )
        if basis.return_C is not None and t <= basis.return_C:
            raise ScenarioError(
                f"targets_C: every target must lie above the return temperature "
                f"{basis.return_C:g} °C, got {t:g}"
            )
    return tuple(targets)


def _mornings(
    scenario: Scenario,
    simulate: bool,
    ready_by_clock_s: float | None,
    ready_rooms: Sequence[str] | None,
) -> dict | None:
    """What each simulated morning is asked (checked), or None without mornings."""
    if ready_by_clock_s is None:
        if ready_rooms is not None:
            raise ScenarioError("ready_rooms: give a ready time (ready_by) too")
        return {} if simulate else None
    if not simulate:
        raise ScenarioError("ready_by: the latest start needs the mornings simulated")
    from simheat.analysis.start_time import ready_by_time_s, room_indices

    ready_by_time_s(scenario, ready_by_clock_s)
    room_indices(scenario, ready_rooms)
    return {"ready_by_clock_s": ready_by_clock_s, "ready_rooms": ready_rooms}


def _replaced(scenario: Scenario, needs: dict[int, float]) -> Scenario:
    """The scenario with radiators replaced by the nominal outputs given."""
    from simheat.analysis.check.edits import ScenarioEdit, apply_edits

    edits = [
        ScenarioEdit(("emitters", i, "nominal_power_kW"), nominal / 1e3)
        for i, nominal in needs.items()
    ]
    return apply_edits(scenario, edits)


def _target(
    scenario: Scenario,
    scheme: str,
    piped: PipedScheme,
    limits: tuple[RadiatorLimit, ...],
    basis: Basis,
    flow_C: float,
    mornings: dict | None,
) -> TargetResult:
    """Every radiator of one scheme at one target flow temperature.

    ``mornings`` holds the ready time and rooms for :func:`morning_at`; None
    when the mornings are not simulated.
    """
    now = piped.at(flow_C)
    found = [replacement_W(limit, flow_C, basis) for limit in limits]
    needs = {
        limit.emitter: n
        for limit, (_, n) in zip(limits, found, strict=True)
        if n is not None
    }
    after = replaced = None
    if needs:
        replaced = _replaced(scenario, needs)
        after = PipedScheme(replaced, scheme).at(flow_C)
    radiators = []
    for limit, (output, nominal) in zip(limits, found, strict=True):
        i = limit.emitter
        verified = None
        if nominal is not None:
            verified = verified_output_W(
                nominal, limit.exponent, limit.share_W, flow_C, limit.room_C, basis
            )
        radiators.append(
            RadiatorAtTarget(
                id=limit.id,
                share_W=limit.share_W,
                output_W=output,
                nominal_needed_W=nominal,
                verified_output_W=verified,
                flow_as_piped_kg_s=float(now.emitter_flow_kg_s[i]),
                inlet_as_piped_C=float(now.heat.emitter_inlet_C[i]),
                output_as_piped_W=float(now.heat.emitter_output_W[i]),
                replaced_as_piped_W=(
                    None if after is None else float(after.heat.emitter_output_W[i])
                ),
            )
        )
    morning = morning_replaced = None
    if mornings is not None:
        morning = morning_at(scenario, scheme, flow_C, **mornings)
        if replaced is not None:
            morning_replaced = morning_at(replaced, scheme, flow_C, **mornings)
    capacity = cop = outside = None
    hp = scenario.source.heat_pump
    if hp is not None:
        point = (scenario.design.outdoor_temp_C, flow_C)
        axes = (hp.outdoor_temp_C, hp.flow_temp_C)
        capacity = float(rating_value(*axes, hp.capacity_W, *point))
        cop = float(rating_value(*axes, hp.cop, *point))
        outside = outside_rating(*axes, (point[0],) * 2, (flow_C,) * 2)
    return TargetResult(
        flow_C, tuple(radiators), morning, capacity, cop, morning_replaced, outside
    )


def readiness(
    scenario: Scenario,
    schemes: Sequence[str] | None = None,
    *,
    targets_C: Sequence[float] = DEFAULT_TARGETS_C,
    drop_K: float | None = None,
    return_C: float | None = None,
    simulate: bool = False,
    ready_by_clock_s: float | None = None,
    ready_rooms: Sequence[str] | None = None,
) -> Readiness:
    """Low-temperature readiness of a house's radiators, per scheme.

    Parameters
    ----------
    scenario : Scenario
        The house at design conditions. [-]
    schemes : sequence of str, optional
        Piping schemes; the scenario's first when omitted. [-]
    targets_C : sequence of float
        Target flow temperatures. [°C]
    drop_K : float, optional
        Supply-return difference kept at every flow temperature; the design
        drop by default. [K]
    return_C : float, optional
        A fixed return temperature instead of a kept drop. [°C]
    simulate : bool
        Also simulate the morning at each target, and again with the target's
        replacements in place when it has any. [-]
    ready_by_clock_s : float, optional
        With ``simulate``: in each of those mornings also find the latest
        heating start that has the rooms at setpoint by this clock time,
        seconds after midnight (:func:`simheat.analysis.start_time.latest_start`).
        [s]
    ready_rooms : sequence of str, optional
        The rooms that must be ready then; every room by default. [-]

    Returns
    -------
    Readiness
        Limits, per-target outputs and replacements, per scheme as piped, and
        the curves of the figure.

    Raises
    ------
    ScenarioError
        On a drop and a return both given, a return not above every room's
        setpoint, or a target outside 25-95 °C, not above every setpoint, or not
        above a given return; a ready time without ``simulate``, at the clock
        time the run (or its night) starts, or an unknown ready room.

    Warns
    -----
    RatingTableWarning
        Once, when a heat pump's table does not reach the design outdoor
        temperature (with ``simulate``, the outdoor temperatures of the
        mornings too) or a target (capacity and COP held at its edge; each
        target's ``outside_table`` says where). The mornings' own warnings
        are not repeated.

    Notes
    -----
    Loads are the rooms' design loads (given, or computed from the envelope),
    each radiator taking a share by nominal output as the design flows do;
    the rooms are at their setpoints. See :mod:`.emitters` for the EN 442
    law on the basis and :mod:`.steady` for the as-piped temperatures.
    """
    schemes = tuple(schemes) if schemes else (scenario.schemes[0],)
    basis = _basis(scenario, drop_K, return_C)
    targets = _targets(scenario, targets_C, basis)
    mornings = _mornings(scenario, simulate, ready_by_clock_s, ready_rooms)
    hp = scenario.source.heat_pump
    if hp is not None:
        outdoor = [scenario.design.outdoor_temp_C]
        if simulate:  # the mornings run in the scenario's weather
            from simheat.dynamics.source import run_conditions

            outdoor.extend(run_conditions(scenario)[0])
        flows = (min(targets), max(targets))
        warn_outside_rating(
            hp.outdoor_temp_C, hp.flow_temp_C, (min(outdoor), max(outdoor)), flows
        )
    resolved = resolve(scenario)
    shares = room_shares_W(scenario, resolved)
    limits = radiator_limits(scenario, shares, basis)
    own = [limit.lowest_flow_temp_C for limit in limits]
    near: tuple[str, ...] = ()
    if any(t is None for t in own):
        lowest = None
        limiting = tuple(lim.id for lim in limits if lim.lowest_flow_temp_C is None)
    else:
        lowest = max(own)
        tie = 0.5 * FLOW_STEP_K  # the limits are rounded to FLOW_STEP_K
        pairs = list(zip(limits, own, strict=True))
        limiting = tuple(lim.id for lim, t in pairs if t >= lowest - tie)
        near = tuple(
            lim.id for lim, t in pairs if lowest - NEAR_LIMIT_K <= t < lowest - tie
        )
    per_scheme = []
    for scheme in schemes:
        piped = PipedScheme(scenario, scheme)
        lowest_piped, limiting_piped = lowest_as_piped(piped, shares)
        per_scheme.append(
            SchemeReadiness(
                scheme=scheme,
                lowest_flow_temp_as_piped_C=lowest_piped,
                limiting_as_piped=limiting_piped,
                targets=tuple(
                    _target(scenario, scheme, piped, limits, basis, t, mornings)
                    for t in targets
                ),
            )
        )
    return Readiness(
        scenario_name=scenario.name,
        source_kind=scenario.source.kind,
        basis=basis,
        radiators=limits,
        lowest_flow_temp_C=lowest,
        limiting=limiting,
        near_limit=near,
        targets_C=targets,
        schemes=tuple(per_scheme),
        curves=OutputCurves(
            flow_temp_C=CURVE_FLOW_C.copy(),
            percent_of_share=output_curves(limits, basis, CURVE_FLOW_C),
            ids=tuple(lim.id for lim in limits),
        ),
        highest_flow_C=HIGHEST_FLOW_C,
        design_load_W=float(sum(r.design_heat_load_W for r in resolved.rooms)),
    )
