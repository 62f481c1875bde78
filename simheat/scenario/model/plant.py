"""The heat source and the circulation pump, as the file gives them.

Part of :mod:`simheat.scenario.model` (values as given, SI units, validated;
nothing computed).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from simheat.scenario.heat_pump import HeatPump


@dataclass(frozen=True)
class Source:
    """Heat source: power limit, flow-temperature control and water content.

    Attributes
    ----------
    max_power_W : float
        Power limit; for a heat pump the largest capacity of its table (its
        limit at a moment follows the table). [W]
    flow_temp_C : float
        Fixed flow-temperature setpoint; with a schedule or a heating curve, the
        highest flow temperature it asks for. [°C]
    water_volume_m3 : float
        Water content. [m3]
    flow_schedule_time_s, flow_schedule_temp_C : tuple of float or None
        Scheduled flow temperature: times from the start [s] and setpoints [°C],
        linear between the points and held beyond them.
    curve_outdoor_temp_C, curve_flow_temp_C : tuple of float or None
        Heating curve: outdoor temperatures, increasing [°C], and the flow
        temperatures at them [°C], linear between the points and held beyond.
    kind : str
        ``"boiler"`` (a fixed power limit) or ``"heat_pump"``. [-]
    heat_pump : HeatPump or None
        The heat pump's table (``kind == "heat_pump"``). [-]
    """

    max_power_W: float
    flow_temp_C: float
    water_volume_m3: float
    flow_schedule_time_s: tuple[float, ...] | None = None
    flow_schedule_temp_C: tuple[float, ...] | None = None
    curve_outdoor_temp_C: tuple[float, ...] | None = None
    curve_flow_temp_C: tuple[float, ...] | None = None
    kind: str = "boiler"
    heat_pump: HeatPump | None = None

    @property
    def flow_control(self) -> str:
        """``"fixed"``, ``"schedule"`` or ``"heating_curve"``."""
        if self.curve_outdoor_temp_C is not None:
            return "heating_curve"
        if self.flow_schedule_time_s is not None:
            return "schedule"
        return "fixed"

    @property
    def lowest_flow_temp_C(self) -> float:
        """Lowest flow-temperature setpoint the control can ask for. [°C]."""
        if self.curve_flow_temp_C is not None:
            return min(self.curve_flow_temp_C)
        if self.flow_schedule_temp_C is not None:
            return min(self.flow_schedule_temp_C)
        return self.flow_temp_C

    @property
    def buffer_volume_m3(self) -> float:
        """Water content of a heat pump's buffer tank; 0 without one. [m3]."""
        return 0.0 if self.heat_pump is None else self.heat_pump.buffer_volume_m3


# Pump control modes a scenario may name, in the order of their network codes
# (simheat.hydraulics.network.PUMP_MODE_NAMES).
PUMP_MODES = ("fixed_speed", "constant_dp", "proportional_dp")


@dataclass(frozen=True)
class Pump:
    """Circulation pump: head curve points (volume flow [m3/s], head [Pa]) as given.

    The points are distinct in flow and the head falls with flow; the curve
    through them is fitted by the resolve step (:mod:`simheat.resolve.pumps`).

    Attributes
    ----------
    flow_m3_s : ndarray
        Volume flow of each curve point. [m3/s]
    head_Pa : ndarray
        Head of each curve point. [Pa]
    stop_s : float or None
        Time from the start when the pump stops for good (a failure case),
        ``None`` when it runs as scheduled. On ``Scenario.pump`` it stops every
        pump of the network (the whole system stops circulating); on
        ``LayoutOptions.primary_pump`` only the primary pump, and on an entry of
        ``LayoutOptions.floor_pumps`` only that floor's pump (see
        :func:`simheat.dynamics.controls.pump_stop_times_s`). [s]
    mode : str
        One of :data:`PUMP_MODES`: ``"fixed_speed"`` runs on the curve;
        ``"constant_dp"`` and ``"proportional_dp"`` vary the speed to hold
        ``setpoint_Pa``, the curve then being the one at maximum speed. [-]
    setpoint_Pa : float
        Set head of a regulated pump (> 0; the resolve step checks it lies below
        the fitted curve's shut-off head); 0 for a fixed-speed pump. [Pa]
    check_valve : bool or None
        True or False when the scenario says so, ``None`` to take the layout's
        default for the pump's place. [-]
    speed : float
        Speed setting of a fixed-speed pump as a fraction of the speed of its
        curve points (1 for a regulated pump). [-]
    speed_steps : tuple of float or None
        Speeds a fixed-speed pump can be set to, increasing; None for any. [-]
    setpoint_steps_Pa : tuple of float or None
        Set heads a regulated pump can be set to, increasing; None for any. [Pa]
    """

    flow_m3_s: np.ndarray
    head_Pa: np.ndarray
    stop_s: float | None = None
    mode: str = "fixed_speed"
    setpoint_Pa: float = 0.0
    check_valve: bool | None = None
    speed: float = 1.0
    speed_steps: tuple[float, ...] | None = None
    setpoint_steps_Pa: tuple[float, ...] | None = None
