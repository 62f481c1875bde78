"""The raw result of an integration: dense output per schedule segment.

:class:`Solution` is what :func:`simheat.dynamics.integrate.integrate` returns:
the model, each segment's settings with ``solve_ivp``'s dense output over it, and
the integrator's statistics; it gives the states at any time of the run.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from simheat.dynamics.segments import Segment

__all__ = ["Solution"]


@dataclass
class Solution:
    """Raw result of an integration: dense output per segment and statistics.

    Attributes
    ----------
    model : simheat.dynamics.integrate.WarmUpModel
        The model that was integrated. [-]
    segments : list of (Segment, scipy.integrate.OdeSolution)
        Each schedule segment in time order with ``solve_ivp``'s dense output
        over it (a function of time [s] giving states). [-]
    wall_time_s : float
        Wall-clock time the integration took. [s]
    n_rhs : int
        Right-hand side evaluations reported by ``solve_ivp`` (``nfev``). [-]
    n_jac : int
        Jacobian evaluations reported by ``solve_ivp`` (``njev``). [-]
    """

    model: Any  # a simheat.dynamics.integrate.WarmUpModel (which imports this)
    segments: list
    wall_time_s: float
    n_rhs: int
    n_jac: int

    def state_at(self, t: np.ndarray) -> np.ndarray:
        """States at times ``t``, shape ``(len(t), n_states)``, from dense output.

        Parameters
        ----------
        t : float or ndarray
            Times from the start of the run; each is clipped into its
            segment's span. [s]

        Returns
        -------
        ndarray, shape (len(t), n_states)
            Cell, air, structure and sensor temperatures [°C], energy
            counters [J].
        """
        t = np.atleast_1d(np.asarray(t, dtype=float))
        if len(t) == 1:  # one time (root finding): straight to its segment
            seg, sol = self.segments[-1]
            for candidate in self.segments:
                if t[0] <= candidate[0].end_s:
                    seg, sol = candidate
                    break
            return sol(min(max(float(t[0]), seg.start_s), seg.end_s))[np.newaxis]
        out = np.empty((len(t), self.model.model.n_states))
        done = np.zeros(len(t), dtype=bool)
        last = self.segments[-1][0]
        for seg, sol in self.segments:
            take = ~done if seg is last else ~done & (t <= seg.end_s)
            if take.any():
                out[take] = sol(np.clip(t[take], seg.start_s, seg.end_s)).T
                done |= take
        return out

    def segment_at(self, t: float) -> Segment:
        """Schedule segment that holds at time ``t``.

        Parameters
        ----------
        t : float
            Time from the start of the run; after the last segment's end, the
            last segment. [s]
        """
        for seg, _ in self.segments:
            if t < seg.end_s:
                return seg
        return self.segments[-1][0]
