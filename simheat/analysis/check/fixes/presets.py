"""The presets fix: the commissioning settings of ``simheat balance``.

A starving radiator is, first of all, an unbalanced system: the radiators
nearer the pump take more than their design flow. :func:`balance_settings`
asks :func:`simheat.analysis.balance.balance_scheme` (continuous presets) for
the scheme's settings — each radiator's preset (or lockshield turns, or Kv),
each declared circuit valve's preset, and the pump setting — and turns them
into edits of the scenario file (:func:`simheat.scenario.settings.settings_edits`,
without the ``schemes`` line balance's own file gets); :func:`preset_fix`
verifies them for one starving radiator as every fix is verified, by loading
the changed file and re-solving it.

Which pump setting: the smaller change. The pump stays as the user set it
(``keep_pump``: its surplus goes into the valves, only valve settings change)
when balance can do so with every radiator within its verification band;
otherwise the fix takes the pump setting balance chooses (the least that
serves the index circuit, which may be a raise). When balance cannot balance
the scheme either way (a pump short of its index circuit even at its highest
setting, design flows a one-pipe loop cannot hold), the fix is not offered and
:func:`balance_settings` returns the reason.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

from simheat.analysis.balance import SchemeBalance, balance_scheme
from simheat.analysis.balance.pumps import SETTING_SPEED, scenario_setting
from simheat.analysis.check.edits import ScenarioEdit, read_document
from simheat.analysis.check.fixes.core import Fix, FixFinder
from simheat.analysis.check.starving import DesignPoint
from simheat.errors import BalanceError, ScenarioError
from simheat.resolve import ResolvedScenario, resolve
from simheat.scenario.settings import PLANT_PUMP, PRIMARY_PUMP, settings_edits

KIND = "balance_presets"


@dataclass(frozen=True)
class PresetSettings:
    """Balance's settings for one scheme as a change to the scenario file.

    Attributes
    ----------
    edits : tuple of ScenarioEdit
        The settings that differ from the file's. [-]
    change : str
        The change in words. [-]
    balance : SchemeBalance
        The balance they come from (its own verification included). [-]
    """

    edits: tuple[ScenarioEdit, ...]
    change: str
    balance: SchemeBalance


def balance_settings(point: DesignPoint) -> PresetSettings | str:
    """Balance's settings for a scheme, the pump kept as set where it can be.

    Parameters
    ----------
    point : DesignPoint
        The scheme at design conditions. [-]

    Returns
    -------
    PresetSettings or str
        The settings with the pump as the scenario sets it when balance keeps
        every radiator within :data:`simheat.analysis.balance.VERIFY_TOLERANCE`
        that way; else with the pump setting balance chooses; else, when one
        of the two balances, the one whose worst radiator is nearer its target.
        When neither balances: why, as a line for ``not_offered``.
    """
    balanced, errors = [], []
    for keep_pump in (True, False):
        try:
            result = balance_scheme(point.scenario, point.scheme, keep_pump=keep_pump)
        except (BalanceError, ScenarioError) as exc:
            errors.append(str(exc))
            continue
        if result.within_tolerance:
            return _as_edits(point, result)
        balanced.append(result)
    if balanced:
        return _as_edits(point, min(balanced, key=lambda b: abs(b.worst.deviation)))
    return (
        f"presets from simheat balance: {point.scheme} cannot be balanced "
        f"({errors[-1]})"
    )


def preset_fix(finder: FixFinder, settings: PresetSettings) -> Fix:
    """Balance's settings as a fix for one starving radiator, verified.

    Parameters
    ----------
    finder : FixFinder
        The starving emitter and its scheme. [-]
    settings : PresetSettings
        From :func:`balance_settings` for the same scheme. [-]

    Returns
    -------
    Fix
        Kind ``balance_presets``, verified by re-solving the changed file.
    """
    return finder.fix(KIND, settings.change, settings.edits)


def _as_edits(point: DesignPoint, balance: SchemeBalance) -> PresetSettings:
    """The balance's settings that change the file, and the change in words."""
    resolved = resolve(point.scenario)
    pumps = {
        table: value
        for table, value in balance.settings.pumps.items()
        if not _pump_as_set(resolved, table, value)
    }
    settings = replace(balance.settings, scheme=None, note="", pumps=pumps)
    document = read_document(point.scenario)
    edits = tuple(
        e
        for e in settings_edits(point.scenario.text, settings)
        if not _already(document, e)
    )
    circuits = sum(1 for c in balance.circuits if c.setting is not None)
    command = f"simheat balance --scheme {point.scheme}" + (
        " --keep-pump" if balance.keep_pump else ""
    )
    words = (
        f"the settings `{command}` gives: {len(balance.valves)} radiator valves"
        + (f", {circuits} circuit valves" if circuits else "")
        + ", "
        + (_pump_words(balance) if pumps else "pumps as set")
        + "; every radiator within "
        f"{abs(balance.worst_deviation_pct):.1f} % of its design flow"
    )
    return PresetSettings(edits, words, balance)


def _pump_as_set(
    resolved: ResolvedScenario, table: str | int, value: tuple[str, float]
) -> bool:
    """Whether a pump setting from balance is the scenario's own."""
    if table == PLANT_PUMP:
        pump = resolved.pump
    elif table == PRIMARY_PUMP:
        pump = resolved.plant_pump()
    else:
        pump = resolved.floor_pump(table)
    key, setting = value
    own = scenario_setting(pump)
    if key != SETTING_SPEED:
        own /= 1e3  # the set head is written in kPa
    return abs(setting - own) <= 1e-9 * max(1.0, abs(own))


def _pump_words(balance: SchemeBalance) -> str:
    """The pump settings balance changes, as ``pump speed 95.44 % (was 100 %)``."""
    words = []
    for p in balance.pumps:
        if abs(p.setting - p.scenario_setting) <= 1e-9 * max(1.0, p.scenario_setting):
            continue
        if p.key == SETTING_SPEED:
            words.append(
                f"{p.table} speed {100 * p.setting:.2f} % "
                f"(was {100 * p.scenario_setting:.0f} %)"
            )
        else:
            words.append(
                f"{p.table} set head {p.setting / 1e3:.3f} kPa "
                f"(was {p.scenario_setting / 1e3:g} kPa)"
            )
    return "; ".join(words)


def _already(document: dict, edit: ScenarioEdit) -> bool:
    """Whether the file already holds the edit's value (an edit with no effect)."""
    if edit.append:
        return False
    node = document
    for step in edit.path:
        try:
            node = node[step]
        except (KeyError, IndexError, TypeError):
            return False
    return node == edit.value
