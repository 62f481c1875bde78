"""Weather, the morning's schedule, the simulation settings and the design conditions.

Part of :mod:`simheat.scenario.model` (values as given, SI units, validated;
nothing computed).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

SECONDS_PER_DAY = 86400.0


@dataclass(frozen=True)
class Weather:
    """Outdoor temperature series: times from the start [s] and values [°C].

    Attributes
    ----------
    time_s : ndarray
        Times from the start of the run, strictly increasing. [s]
    outdoor_temp_C : ndarray
        Outdoor temperature at each time. [°C]
    """

    time_s: np.ndarray
    outdoor_temp_C: np.ndarray


@dataclass(frozen=True)
class Schedule:
    """Heating schedule.

    Attributes
    ----------
    start_clock_s : float
        Clock time at the simulation start, seconds after midnight. [s]
    comfort_start_s : float
        Time after the simulation start when comfort begins. [s]
    before_comfort : str
        ``"off"`` (source and pump off) or ``"setback"`` (running at the setback
        setpoint). [-]
    setback_setpoint_C : float
        Setpoint of thermostatic heads before comfort. [°C]
    off_clock_s : float or None
        Clock time the heating went off the evening before, seconds after
        midnight: the run starts there, from the house's steady state at the
        comfort setpoints, and the house cools (heating and pumps off) until
        ``start_clock_s``. None when the scenario gives the initial state
        instead. [s]
    """

    start_clock_s: float
    comfort_start_s: float
    before_comfort: str
    setback_setpoint_C: float
    off_clock_s: float | None = None

    @property
    def night_s(self) -> float:
        """Length of the night before the start, 0 without one. [s]."""
        if self.off_clock_s is None:
            return 0.0
        return (self.start_clock_s - self.off_clock_s) % SECONDS_PER_DAY


@dataclass(frozen=True)
class Simulation:
    """Simulation settings.

    Attributes
    ----------
    duration_s, output_step_s : float
        Simulated time and output step. [s]
    initial_air_temp_C, initial_structure_temp_C : float or None
        Initial air and structure temperature of every room without its own,
        when the scenario gives the initial state; None otherwise. [°C]
    initial_water_temp_C : float or None
        Initial temperature of all water with a given initial state; None when
        the night sets it. [°C]
    reached_tolerance_K : float
        A room counts as at setpoint once its air is within this of the setpoint. [K]
    rtol : float
        Relative tolerance of the time integration. [-]
    pipe_cell_length_m : float
        Length of one water cell along pipes for transport delay. [m]
    emitter_cells : int
        Water cells in series per radiator. [-]
    """

    duration_s: float
    output_step_s: float
    initial_air_temp_C: float | None
    initial_structure_temp_C: float | None
    initial_water_temp_C: float | None
    reached_tolerance_K: float
    rtol: float
    pipe_cell_length_m: float
    emitter_cells: int


@dataclass(frozen=True)
class Design:
    """Design conditions: outdoor and supply temperatures [°C], drop [K].

    Attributes
    ----------
    outdoor_temp_C : float
        Design outdoor temperature. [°C]
    supply_temp_C : float
        Design supply (flow) temperature. [°C]
    temperature_drop_K : float
        Design drop from supply to return temperature across the emitters. [K]
    """

    outdoor_temp_C: float
    supply_temp_C: float
    temperature_drop_K: float
