"""Every fix for a starving radiator, verified and ranked.

Fixes that lift the radiator and starve no other come first, by effort
(:data:`~simheat.analysis.check.fixes.core.EFFORT`: settings — balance's
presets first, then the pump — then moving a tee, then pipe sizes, then
radiators), then by the smallest change they make to
any other radiator's flow.
"""

from __future__ import annotations

from simheat.analysis.check.fixes.core import Fix, FixFinder
from simheat.analysis.check.fixes.pipes import pipe_fixes
from simheat.analysis.check.fixes.presets import PresetSettings, preset_fix
from simheat.analysis.check.fixes.pumps import pump_fixes
from simheat.analysis.check.fixes.tees import tee_fixes
from simheat.analysis.check.starving import Cause, DesignPoint


def starving_fixes(
    point: DesignPoint,
    emitter: int,
    cause: Cause,
    presets: PresetSettings | None = None,
) -> list[Fix]:
    """Every fix for a starving radiator, verified and ranked.

    Parameters
    ----------
    point : DesignPoint
        The scheme at design conditions. [-]
    emitter : int
        Index of the starving emitter. [-]
    cause : Cause
        Where its pressure goes
        (:func:`simheat.analysis.check.starving.locate_cause`). [-]
    presets : PresetSettings, optional
        Balance's settings for the scheme
        (:func:`~simheat.analysis.check.fixes.presets.balance_settings`), the
        same for every starving radiator of it; None when balance cannot
        balance the scheme. [-]

    Returns
    -------
    list of Fix
        Presets, pump, tee and pipe fixes, ranked by :meth:`Fix.rank_key`.
    """
    finder = FixFinder(point, emitter)
    fixes = [] if presets is None else [preset_fix(finder, presets)]
    fixes += [*pump_fixes(finder), *tee_fixes(finder), *pipe_fixes(finder, cause)]
    return sorted(fixes, key=Fix.rank_key)
