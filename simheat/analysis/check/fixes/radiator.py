"""A bigger radiator for one whose flow is enough but whose output falls short."""

from __future__ import annotations

from simheat.analysis.check.edits import ScenarioEdit, apply_edits
from simheat.analysis.check.fixes.core import Fix, round_up, verify
from simheat.analysis.check.loads import room_loads
from simheat.analysis.check.radiators import output_per_nominal, radiator_checks
from simheat.analysis.check.starving import DesignPoint
from simheat.analysis.flows import STARVING_FRACTION
from simheat.resolve import resolve

# A bigger radiator's nominal output is rounded up to this. [W]
RADIATOR_STEP_W = 10.0


def radiator_fix(point: DesignPoint, emitter: int) -> Fix | None:
    """A bigger radiator for one whose flow is fine but whose output falls short.

    Parameters
    ----------
    point : DesignPoint
        The scheme at design conditions. [-]
    emitter : int
        Index of the emitter. [-]

    Returns
    -------
    Fix or None
        The nominal output, rounded up to 10 W, at which the radiator's output
        at the design supply temperature, design flow and room setpoint meets
        its share of the room load; verified by resolving the changed scenario
        and solving its flow split. None when the design return temperature
        does not lie above the room's setpoint (no size meets the load).

    Notes
    -----
    With ``g`` the output per nominal watt at the design temperatures
    (:func:`simheat.analysis.check.radiators.output_per_nominal`), a radiator
    of nominal ``N`` in a room of load ``L`` whose other radiators sum to
    ``S`` meets its share ``L N / (N + S)`` when ``N g >= L N / (N + S)``, i.e.
    ``N >= L / g - S``.
    """
    scenario = point.scenario
    design = scenario.design
    e = scenario.emitters[emitter]
    room = scenario.rooms[e.room]
    per_nominal = output_per_nominal(
        e.exponent, design.supply_temp_C, design.temperature_drop_K, room.setpoint_C
    )
    if per_nominal is None:
        return None
    load_W = resolve(scenario).rooms[e.room].design_heat_load_W
    others = sum(
        o.nominal_power_W
        for o in scenario.emitters
        if o.room == e.room and not o.closed  # one shut for good takes no share
    )
    others -= e.nominal_power_W
    nominal = round_up(
        max(load_W / per_nominal - others, e.nominal_power_W), RADIATOR_STEP_W
    )
    edits = (ScenarioEdit(("emitters", emitter, "nominal_power_kW"), nominal / 1e3),)
    verified = verify(scenario, point.scheme, edits, emitter, point.split)
    fixed = apply_edits(scenario, edits)
    resolved = resolve(fixed)
    after = radiator_checks(fixed, resolved, room_loads(fixed, resolved))[emitter]
    lifts = after.output_W >= after.share_W and verified.fraction >= STARVING_FRACTION
    words = (
        f"a bigger radiator: emitters[{emitter}].nominal_power_kW = "
        f"{nominal / 1e3:g} (was {e.nominal_power_W / 1e3:g}); gives "
        f"{after.output_W:.0f} W against its share of {after.share_W:.0f} W"
    )
    return Fix("radiator", words, edits, verified, lifts, after.output_W)
