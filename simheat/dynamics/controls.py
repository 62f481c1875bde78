"""Schedules and controls: setpoints, source and pump on/off, outdoor temperature."""

from __future__ import annotations

import numpy as np

from simheat.scenario.model import Scenario

# Time constant of the source's flow-temperature control loop: a modulating source
# settles its flow temperature within a few minutes (our modelling choice). [s]
SOURCE_CONTROL_TIME_S = 60.0
# Corner width of the source power limit as a fraction of the maximum power. [-]
SOURCE_LIMIT_SMOOTHING = 0.005


def segment_edges_s(scenario: Scenario) -> list[float]:
    """Times where a schedule switches, from the start to the end of the run. [s]."""
    edges = [0.0, scenario.schedule.comfort_start_s, scenario.simulation.duration_s]
    return sorted(set(edges))


def in_comfort(scenario: Scenario, time_s: float) -> bool:
    """Whether comfort is on at ``time_s`` (seconds from the start)."""
    return time_s >= scenario.schedule.comfort_start_s


def heating_on(scenario: Scenario, time_s: float) -> bool:
    """Whether the source and the pump run at ``time_s``."""
    return in_comfort(scenario, time_s) or scenario.schedule.before_comfort == "setback"


def emitter_setpoints_C(
    scenario: Scenario, time_s: float, emitters: np.ndarray
) -> np.ndarray:
    """Setpoint each listed emitter's thermostatic head aims at. [°C]."""
    if in_comfort(scenario, time_s):
        return np.array(
            [scenario.rooms[scenario.emitters[i].room].setpoint_C for i in emitters]
        )
    return np.full(len(emitters), scenario.schedule.setback_setpoint_C)


def outdoor_temp_C(scenario: Scenario, time_s: float) -> float:
    """Outdoor temperature, linear between the weather points, held beyond. [°C]."""
    w = scenario.weather
    return float(np.interp(time_s, w.time_s, w.outdoor_temp_C))
