"""Fixes for a short radiator, each a change to the scenario, each verified.

Every candidate is a list of :class:`~simheat.scenario.edits.ScenarioEdit`
verified by loading the changed file and solving its flow split at design
conditions (:mod:`~.core`). One module per kind of fix: :mod:`~.presets`
(``balance_presets``, the settings of ``simheat balance``), :mod:`~.pumps`
(``pump_setpoint``, ``pump_speed``), :mod:`~.tees` (``tee_position``,
``branch_length``), :mod:`~.pipes` (``pipe_size``), :mod:`~.radiator`
(``radiator``, for a radiator whose flow is enough but whose output is short);
:mod:`~.ranking` gathers them for a starving radiator and ranks them.
"""

from simheat.analysis.check.fixes.core import (
    EFFORT,
    Fix,
    FixFinder,
    Verified,
    round_up,
    verify,
)
from simheat.analysis.check.fixes.presets import PresetSettings, balance_settings
from simheat.analysis.check.fixes.radiator import radiator_fix
from simheat.analysis.check.fixes.ranking import starving_fixes
from simheat.analysis.check.fixes.tees import LENGTH_STEP_M, tee_move_edits

__all__ = [
    "EFFORT",
    "LENGTH_STEP_M",
    "Fix",
    "FixFinder",
    "PresetSettings",
    "Verified",
    "balance_settings",
    "radiator_fix",
    "round_up",
    "starving_fixes",
    "tee_move_edits",
    "verify",
]
