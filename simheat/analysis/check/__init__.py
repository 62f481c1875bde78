"""``simheat check``: heat loads, radiator and pipe sizing, pump, source, starving.

:func:`check_scheme` answers, for one scheme of a scenario:

- :mod:`~.loads`: each room's design load, given and computed from its envelope;
- :mod:`~.radiators`: each radiator's output at design against its share;
- :mod:`~.pipes`: the pipe schedule against the sizing limits;
- :mod:`~.pump`: each pump's operating point and its margin at the index circuit;
- :mod:`~.source`: design load against the source's power (and its time at the
  limit in a simulated morning);
- :mod:`~.starving`: radiators starving at design conditions and where their
  pressure goes; :mod:`~.fixes`: the fixes, one module per kind, each a
  scenario change verified by re-solving (:mod:`~.edits` makes the change to
  the scenario's text).

With ``simulate=True`` the morning is simulated, and re-simulated with the best
fix of each starving radiator (times to setpoint before and after).
"""

from __future__ import annotations

from dataclasses import dataclass

from simheat.analysis.check.fixes import (
    Fix,
    PresetSettings,
    balance_settings,
    radiator_fix,
    starving_fixes,
)
from simheat.analysis.check.loads import RoomLoad, room_loads
from simheat.analysis.check.pipes import PipeRow, pipe_schedule
from simheat.analysis.check.pump import PumpCheck, pump_checks
from simheat.analysis.check.radiators import RadiatorCheck, radiator_checks
from simheat.analysis.check.source import SourceCheck, source_check
from simheat.analysis.check.starving import (
    Cause,
    DesignPoint,
    design_point,
    locate_cause,
    starving_at_design,
    starving_emitters,
)
from simheat.resolve import resolve
from simheat.scenario.model import Scenario

__all__ = [
    "CheckResult",
    "Morning",
    "ShortRadiator",
    "check_scheme",
    "starving_at_design",
]


@dataclass(frozen=True)
class ShortRadiator:
    """A radiator short of heat at design conditions, its cause and its fixes.

    Attributes
    ----------
    id : str
        Emitter id. [-]
    flow_fraction : float
        Its flow over its design flow at design conditions. [-]
    reason : str
        ``"flow"`` (below the starving fraction of its design flow) or
        ``"output"`` (flow enough, radiator too small for its share). [-]
    cause : Cause or None
        Where its pressure goes (for ``"flow"``). [-]
    fixes : tuple of Fix
        Verified fixes, ranked (the first that is ``ok`` is the best). [-]
    """

    id: str
    flow_fraction: float
    reason: str
    cause: Cause | None
    fixes: tuple[Fix, ...]

    @property
    def best(self) -> Fix | None:
        """The best fix: the first that lifts it and starves no other."""
        return next((f for f in self.fixes if f.ok), None)


@dataclass(frozen=True)
class Morning:
    """A simulated morning before and after a fix.

    Attributes
    ----------
    fix : Fix
        The fix simulated. [-]
    for_emitters : tuple of str
        The radiators it is the best fix of. [-]
    before_s, after_s : dict of str to float or None
        Time to setpoint of each room from the start of comfort, before and
        after; None when not reached. [s]
    """

    fix: Fix
    for_emitters: tuple[str, ...]
    before_s: dict[str, float | None]
    after_s: dict[str, float | None]


@dataclass(frozen=True)
class CheckResult:
    """Everything ``simheat check`` reports for one scheme.

    Attributes
    ----------
    scenario_name, scheme : str
        The house and the piping scheme. [-]
    loads : tuple of RoomLoad
        Room design loads. [-]
    radiators : tuple of RadiatorCheck
        Radiator output at design. [-]
    pipes : tuple of PipeRow
        The pipe schedule. [-]
    pumps : tuple of PumpCheck
        Every pump. [-]
    source : SourceCheck
        Source power against the design load. [-]
    starving : tuple of ShortRadiator
        Radiators short of heat at design conditions, with causes and fixes. [-]
    mornings : tuple of Morning
        Simulated mornings with the best fixes (``simulate=True``). [-]
    not_offered : dict of str to str
        Fix kinds not offered, with the reason (``balance_presets`` when
        balance cannot balance the scheme). [-]
    water_temp_C : float
        Water temperature of the design-conditions solve. [°C]
    """

    scenario_name: str
    scheme: str
    loads: tuple[RoomLoad, ...]
    radiators: tuple[RadiatorCheck, ...]
    pipes: tuple[PipeRow, ...]
    pumps: tuple[PumpCheck, ...]
    source: SourceCheck
    starving: tuple[ShortRadiator, ...]
    mornings: tuple[Morning, ...]
    not_offered: dict[str, str]
    water_temp_C: float


def _short_radiators(
    point: DesignPoint, radiators: tuple[RadiatorCheck, ...]
) -> tuple[tuple[ShortRadiator, ...], dict[str, str]]:
    """Starving radiators (flow) and undersized ones with enough flow (output).

    Also the fix kinds not offered, with the reason (balance's presets when it
    cannot balance the scheme; asked only when a radiator starves).
    """
    fractions = point.flow_fraction()
    starving = set(starving_emitters(point))
    presets: PresetSettings | None = None
    not_offered = {}
    if starving:
        found = balance_settings(point)
        if isinstance(found, str):
            not_offered["balance_presets"] = found
        else:
            presets = found
    out = []
    for i, e in enumerate(point.scenario.emitters):
        if i in starving:
            cause = locate_cause(point, i)
            fixes = tuple(starving_fixes(point, i, cause, presets))
            out.append(ShortRadiator(e.id, float(fractions[i]), "flow", cause, fixes))
        elif radiators[i].undersized:
            fix = radiator_fix(point, i)
            fixes = () if fix is None else (fix,)
            out.append(ShortRadiator(e.id, float(fractions[i]), "output", None, fixes))
    return tuple(out), not_offered


def check_scheme(
    scenario: Scenario, scheme: str | None = None, *, simulate: bool = False
) -> CheckResult:
    """Check one scheme of a scenario: loads, radiators, pipes, pump, source, starving.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    scheme : str, optional
        Piping scheme; the scenario's first when omitted. [-]
    simulate : bool
        Also simulate the morning (the source's time at its power limit) and
        re-simulate it with each starving radiator's best fix. [-]

    Returns
    -------
    CheckResult
        The findings; every fix verified by re-solving the changed scenario.

    Notes
    -----
    Design conditions: every valve open at its preset, water at the design
    supply temperature (:mod:`simheat.analysis.check.starving`).
    """
    from simheat.analysis.check.edits import apply_edits
    from simheat.dynamics.simulate import simulate as simulate_morning

    scheme = scenario.schemes[0] if scheme is None else scheme
    resolved = resolve(scenario)
    loads = room_loads(scenario, resolved)
    radiators = radiator_checks(scenario, resolved, loads)
    point = design_point(scenario, scheme)
    pipes = pipe_schedule(point.built, point.flows, point.water_temp_C)
    pumps = pump_checks(point.built, point.flows, point.figures)
    starving, not_offered = _short_radiators(point, radiators)
    run = simulate_morning(scenario, scheme) if simulate else None
    mornings = []
    if run is not None:
        before = {r.id: r.time_to_setpoint_s for r in run.summary.rooms}
        by_change: dict[tuple, list[str]] = {}
        fixes: dict[tuple, Fix] = {}
        for short in starving:
            best = short.best
            if best is None:
                continue
            key = tuple(e.text() for e in best.edits)
            by_change.setdefault(key, []).append(short.id)
            fixes.setdefault(key, best)
        for key, ids in by_change.items():
            fixed = simulate_morning(apply_edits(scenario, fixes[key].edits), scheme)
            after = {r.id: r.time_to_setpoint_s for r in fixed.summary.rooms}
            mornings.append(Morning(fixes[key], tuple(ids), before, after))
    return CheckResult(
        scenario_name=scenario.name,
        scheme=scheme,
        loads=loads,
        radiators=radiators,
        pipes=pipes,
        pumps=pumps,
        source=source_check(scenario, loads, run),
        starving=starving,
        mornings=tuple(mornings),
        not_offered=not_offered,
        water_temp_C=point.water_temp_C,
    )
