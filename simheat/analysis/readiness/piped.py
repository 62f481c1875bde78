"""A scheme as piped at a flow temperature: its own flows, steady temperatures.

Valves at their presets with the heads open and the pumps on their curves (the
design point ``simheat check`` and ``simheat flows`` use), water at the flow
temperature for the flow solve; then the steady network temperatures at those
flows (:func:`~simheat.analysis.readiness.steady.steady_heat`) give each
radiator's inlet and output. The lowest flow temperature as piped is where the
worst radiator's output meets its share, found by Brent's method with a flow
solve per trial.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.optimize import brentq

from simheat.analysis.readiness.emitters import FLOW_STEP_K, HIGHEST_FLOW_C, round_up
from simheat.analysis.readiness.steady import SteadyHeat, steady_heat
from simheat.hydraulics.layouts import describe
from simheat.hydraulics.solver import FlowSolver
from simheat.scenario.model import Scenario

# Brent's method on the flow temperature stops within this. [K]
PIPED_XTOL_K = 0.005
# Radiators within this share of the worst ratio at the limit set it too. [-]
LIMITING_BAND = 0.005
# The search starts this far above the warmest room's setpoint. [K]
ABOVE_ROOM_K = 0.5


@dataclass(frozen=True)
class PipedPoint:
    """One scheme at one flow temperature, as piped.

    Attributes
    ----------
    flow_temp_C : float
        Flow temperature. [°C]
    emitter_flow_kg_s : ndarray
        Each radiator's flow, scenario order. [kg/s]
    heat : SteadyHeat
        Steady temperatures and outputs. [-]
    """

    flow_temp_C: float
    emitter_flow_kg_s: np.ndarray
    heat: SteadyHeat


class PipedScheme:
    """One scheme's network, solved at any flow temperature.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    scheme : str
        Piping scheme. [-]
    """

    def __init__(self, scenario: Scenario, scheme: str) -> None:
        self.scenario = scenario
        self.scheme = scheme
        self.network = describe(scenario, scheme).network
        self.solver = FlowSolver(self.network)
        self._last = None

    def at(self, flow_temp_C: float) -> PipedPoint:
        """The flow split and steady temperatures at a flow temperature.

        Parameters
        ----------
        flow_temp_C : float
            Flow temperature (and the water temperature of the flow solve). [°C]

        Returns
        -------
        PipedPoint
            Flows, temperatures and outputs.
        """
        flows = self.solver.solve(
            water_temp_C=float(flow_temp_C), initial_mass_flow_kg_s=self._last
        )
        self._last = flows.mass_flow_kg_s.copy()
        heat = steady_heat(
            self.scenario, self.network, flows.mass_flow_kg_s, float(flow_temp_C)
        )
        emitter_flow = flows.mass_flow_kg_s[self.network.emitter_links()].copy()
        return PipedPoint(float(flow_temp_C), emitter_flow, heat)


def lowest_as_piped(
    piped: PipedScheme, shares_W: np.ndarray
) -> tuple[float | None, tuple[str, ...]]:
    """Lowest flow temperature at which every radiator meets its share as piped.

    Parameters
    ----------
    piped : PipedScheme
        The scheme. [-]
    shares_W : ndarray
        Each radiator's share of its room's load. [W]

    Returns
    -------
    (float or None, tuple of str)
        The temperature, rounded up to :data:`FLOW_STEP_K` and checked there
        (raised by a step while a radiator still falls short), and the
        radiators that set it; ``(None, those short at the highest)`` when not
        even :data:`HIGHEST_FLOW_C` is enough.
    """
    judged = [i for i, e in enumerate(piped.scenario.emitters) if not e.closed]
    ids = [piped.scenario.emitters[i].id for i in judged]

    def ratios(flow_C: float) -> np.ndarray:
        # radiators shut for good give nothing and are asked for nothing
        return piped.at(flow_C).heat.emitter_output_W[judged] / shares_W[judged]

    def margin(flow_C: float) -> float:
        return float(np.min(ratios(flow_C)) - 1.0)

    def worst(r: np.ndarray) -> tuple[str, ...]:
        return tuple(
            i for i, x in zip(ids, r, strict=True) if x <= r.min() + LIMITING_BAND
        )

    top = ratios(HIGHEST_FLOW_C)
    if top.min() < 1.0:
        return None, tuple(i for i, x in zip(ids, top, strict=True) if x < 1.0)
    low = max(r.setpoint_C for r in piped.scenario.rooms) + ABOVE_ROOM_K
    if margin(low) >= 0.0:
        return low, worst(ratios(low))
    root = brentq(margin, low, HIGHEST_FLOW_C, xtol=PIPED_XTOL_K)
    found = min(round_up(root, FLOW_STEP_K), HIGHEST_FLOW_C)
    at = ratios(found)
    while at.min() < 1.0 and found < HIGHEST_FLOW_C:
        found = min(round(found + FLOW_STEP_K, 10), HIGHEST_FLOW_C)
        at = ratios(found)
    root_ratios = ratios(root)
    return found, worst(root_ratios)
