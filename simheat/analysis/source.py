"""When a run's heat source sat at its power limit.

A source at its limit cannot give more heat however cold the rooms: the warm-up
is then limited by the source, not by the pipes. A source counts as at its limit
when its output is at least :data:`~simheat.runs.metrics.AT_LIMIT_FRACTION` of
its maximum, the rule of the run summary's ``source_at_limit``; the model's
output is a smooth clip of the demand whose corner
(:data:`~simheat.dynamics.controls.SOURCE_LIMIT_SMOOTHING` of the limit) lies
within that band. Here the stretches at the limit are found over the whole run,
for the source figure's shading and the report.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from simheat.runs.metrics import AT_LIMIT_FRACTION
from simheat.runs.run import Run

__all__ = ["PowerLimitTime", "power_limit_time", "run_power_limit_time"]


@dataclass(frozen=True)
class PowerLimitTime:
    """Time a run's heat source spent at its power limit.

    Attributes
    ----------
    max_power_W : float
        The source's power limit (a heat pump's largest capacity in the run). [W]
    intervals_s : tuple of (float, float)
        Each stretch at the limit, from its first to its last output sample at
        the limit (times since the start of the run). [s]
    duration_s : float
        Run length. [s]
    """

    max_power_W: float
    intervals_s: tuple[tuple[float, float], ...]
    duration_s: float

    @property
    def total_s(self) -> float:
        """Time at the limit, summed over the stretches. [s]."""
        return float(sum(end - start for start, end in self.intervals_s))

    @property
    def share(self) -> float:
        """Time at the limit as a share of the run. [-]."""
        return self.total_s / self.duration_s if self.duration_s > 0.0 else 0.0


def power_limit_time(
    time_s: np.ndarray, source_power_W: np.ndarray, max_power_W: float | np.ndarray
) -> PowerLimitTime:
    """Stretches of time in which the source gives its maximum power.

    Parameters
    ----------
    time_s : ndarray
        Output times, increasing. [s]
    source_power_W : ndarray
        Source output at those times. [W]
    max_power_W : float or ndarray
        The source's power limit, or its capacity at each output time (a heat
        pump's, from its rating table). [W]

    Returns
    -------
    PowerLimitTime
        The stretches and their total.

    Notes
    -----
    A sample counts as at the limit when ``P >= AT_LIMIT_FRACTION P_max``
    (:func:`simheat.runs.metrics.source_at_limit` uses the same rule). A stretch
    runs from its
    first to its last sample at the limit, so the total is resolved to the output
    step; a single sample at the limit counts as a stretch of zero length.

    Examples
    --------
    >>> t = np.array([0.0, 60.0, 120.0, 180.0])
    >>> p = np.array([5.0, 1000.0, 999.9, 400.0])
    >>> power_limit_time(t, p, 1000.0).intervals_s
    ((60.0, 120.0),)
    """
    time_s = np.asarray(time_s, dtype=float)
    at = np.asarray(source_power_W) >= AT_LIMIT_FRACTION * max_power_W
    edges = np.diff(np.concatenate([[0], at.astype(np.int8), [0]]))
    starts = np.flatnonzero(edges == 1)
    ends = np.flatnonzero(edges == -1) - 1
    intervals = tuple(
        (float(time_s[a]), float(time_s[b])) for a, b in zip(starts, ends, strict=True)
    )
    duration = float(time_s[-1] - time_s[0]) if len(time_s) else 0.0
    return PowerLimitTime(float(np.max(max_power_W)), intervals, duration)


def run_power_limit_time(run: Run) -> PowerLimitTime:
    """:func:`power_limit_time` of a run's source.

    Parameters
    ----------
    run : Run
        A simulated run. [-]

    Returns
    -------
    PowerLimitTime
        When its source sat at its power limit (a heat pump's capacity of the
        moment, ``Run.source_capacity_W``).
    """
    capacity = getattr(run, "source_capacity_W", None)
    limit = run.scenario.source.max_power_W if capacity is None else capacity
    return power_limit_time(run.time_s, run.source_power_W, limit)
