"""The morning before and after balancing: times to setpoint per room."""

from __future__ import annotations

from simheat.analysis.compare import SchemeOutcome
from simheat.dynamics.simulate import simulate
from simheat.scenario.model import Scenario


def _outcome(scenario: Scenario, scheme: str, name: str) -> SchemeOutcome:
    run = simulate(scenario, scheme)
    rooms = run.summary.rooms
    return SchemeOutcome(
        name=name,
        room_ids=tuple(r.id for r in rooms),
        times_s=tuple(r.time_to_setpoint_s for r in rooms),
        run=run,
    )


def morning_before_after(
    scenario: Scenario, balanced: Scenario, scheme: str
) -> tuple[SchemeOutcome, SchemeOutcome]:
    """Simulate the scenario's morning as given and as balanced.

    Parameters
    ----------
    scenario : Scenario
        The house as the scenario sets it. [-]
    balanced : Scenario
        The same house with the balance's presets, circuit valves and pump
        settings (:attr:`SchemeBalance.balanced`). [-]
    scheme : str
        Piping scheme. [-]

    Returns
    -------
    tuple of SchemeOutcome
        ``(before, after)``: times to setpoint per room, the time until every
        room is there and the spread, with the runs.
    """
    return (
        _outcome(scenario, scheme, "before"),
        _outcome(balanced, scheme, "after"),
    )
