"""The morning simulated with the flow temperature fixed at a target."""

from __future__ import annotations

import warnings
from collections.abc import Sequence

from simheat.analysis.readiness.result import ReadinessMorning
from simheat.errors import RatingTableWarning
from simheat.scenario import Scenario, parse_scenario
from simheat.scenario.edits import (
    ScenarioEdit,
    document_text,
    edit_document,
    parse_document,
)

# The flow-temperature controls a scenario may give; a target replaces them.
FLOW_CONTROLS = ("flow_temp_C", "flow_temp_schedule", "heating_curve")


def at_flow_temperature(scenario: Scenario, flow_temp_C: float) -> Scenario:
    """The scenario with its source's flow temperature fixed at a value.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    flow_temp_C : float
        The fixed flow-temperature setpoint. [°C]

    Returns
    -------
    Scenario
        Its text with ``[source] flow_temp_C`` set and any schedule or heating
        curve removed, parsed and validated again.
    """
    document = parse_document(scenario.text, scenario.source_path)
    source = document["source"]
    for key in FLOW_CONTROLS:
        if key in source:
            del source[key]
    edit_document(document, [ScenarioEdit(("source", "flow_temp_C"), flow_temp_C)])
    return parse_scenario(document_text(document), origin=scenario.source_path)


def morning_at(
    scenario: Scenario,
    scheme: str,
    flow_temp_C: float,
    ready_by_clock_s: float | None = None,
    ready_rooms: Sequence[str] | None = None,
) -> ReadinessMorning:
    """Simulate the scenario's morning with the flow temperature fixed.

    Parameters
    ----------
    scenario : Scenario
        The house and its morning. [-]
    scheme : str
        Piping scheme. [-]
    flow_temp_C : float
        The fixed flow-temperature setpoint. [°C]
    ready_by_clock_s : float, optional
        Also find the latest heating start that has the rooms at setpoint by
        this clock time, seconds after midnight. [s]
    ready_rooms : sequence of str, optional
        The rooms that must be ready then; every room by default. [-]

    Returns
    -------
    ReadinessMorning
        Times to setpoint, final air temperatures, time at the source's limit,
        for a heat pump electricity and mean COP, and the latest start
        (:func:`simheat.analysis.start_time.latest_start` on the same fixed
        flow temperature: each start it reports simulated).
    """
    from simheat.analysis.start_time import latest_start
    from simheat.dynamics.simulate import simulate

    fixed = at_flow_temperature(scenario, flow_temp_C)
    start = None
    with warnings.catch_warnings():
        # readiness() has said where its targets and mornings leave the table
        warnings.simplefilter("ignore", RatingTableWarning)
        run = simulate(fixed, scheme)
        if ready_by_clock_s is not None:
            start = latest_start(fixed, scheme, ready_by_clock_s, ready_rooms)
    books = run.summary.energy
    heat_pump = scenario.source.heat_pump is not None
    return ReadinessMorning(
        flow_temp_C=float(flow_temp_C),
        time_to_setpoint_s={r.id: r.time_to_setpoint_s for r in run.summary.rooms},
        final_air_C={r.id: r.final_air_temp_C for r in run.summary.rooms},
        source_at_limit=run.summary.source_at_limit,
        electric_J=books.electric_J if heat_pump else None,
        mean_cop=books.mean_cop if heat_pump else None,
        start=start,
    )
