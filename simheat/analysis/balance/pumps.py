"""The pump setting that gives a circuit's need at its design flow.

A fixed-speed pump is set by its speed (the affinity laws scale its curve), a
regulated pump by its set head (its control line then passes through the need
at the design flow). Every rise is evaluated with the physics kernels the flow
solver uses, and a setting is found by root finding on them (Brent's method),
so the setting and the solve agree.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from scipy.optimize import brentq

from simheat.physics._kernels import regulated_pump_rise_Pa
from simheat.physics.pump import control_flow_m3_s
from simheat.resolve import ResolvedPump
from simheat.scenario.plant import MIN_PUMP_SPEED

MODE_CODES = {"fixed_speed": 0, "constant_dp": 1, "proportional_dp": 2}
# Continuous settings are rounded up to these steps, so the pump never falls
# short of the need by the rounding: a speed to 0.0001 of full speed, a set head
# to 0.001 kPa (finer than any pump's own scale; the surplus the rounding leaves,
# a few pascals, goes into the valves). [-], [Pa]
SPEED_STEP = 1e-4
SETPOINT_STEP_PA = 1.0
# A regulated pump's set head stays this fraction below its curve's shut-off
# head (as the resolve step requires). [-]
SET_HEAD_MARGIN = 1e-6
BRENT_XTOL = 1e-12  # [-] speed or [Pa] set head: far below the rounding above

SETTING_SPEED = "speed"
SETTING_SETPOINT = "setpoint_kPa"


@dataclass(frozen=True)
class PumpSetting:
    """A pump's setting and its rise at the design flow.

    Attributes
    ----------
    key : str
        ``speed`` (fixed-speed pump, ratio [-]) or ``setpoint_kPa`` (regulated
        pump; ``value`` in Pa).
    value : float
        Speed ratio [-] or set head [Pa].
    rise_Pa : float
        Pressure rise at the design flow with this setting. [Pa]
    """

    key: str
    value: float
    rise_Pa: float


def rise_Pa(
    pump: ResolvedPump, setting: float, mass_flow_kg_s: float, temp_C: float
) -> float:
    """Pressure rise of a pump at a setting and a flow.

    Parameters
    ----------
    pump : ResolvedPump
        The pump (its full-speed curve and mode). [-]
    setting : float
        Speed ratio [-] for a fixed-speed pump, set head [Pa] for a regulated
        one.
    mass_flow_kg_s : float
        Flow through the pump. [kg/s]
    temp_C : float
        Water temperature. [°C]

    Returns
    -------
    float
        The rise :func:`simheat.physics._kernels.regulated_pump_rise_Pa` gives.
        [Pa]
    """
    a0, a1, a2 = pump.full_speed_coeffs
    mode = MODE_CODES[pump.mode]
    if mode == 0:
        rise, _ = regulated_pump_rise_Pa(
            mass_flow_kg_s, a0, a1, a2, setting, 0, 0.0, 0.0, temp_C
        )
    else:
        control = control_flow_m3_s(a0, a1, a2, setting) if mode == 2 else 0.0
        rise, _ = regulated_pump_rise_Pa(
            mass_flow_kg_s, a0, a1, a2, 1.0, mode, setting, control, temp_C
        )
    return float(rise)


def scenario_setting(pump: ResolvedPump) -> float:
    """The scenario's own setting: speed [-] or set head [Pa].

    Parameters
    ----------
    pump : ResolvedPump
        The pump (mode, setting, steps). [-]

    Returns
    -------
    float
        Speed ratio [-] or set head. [Pa]
    """
    return pump.speed if pump.mode == "fixed_speed" else pump.setpoint_Pa


def setting_range(pump: ResolvedPump) -> tuple[float, float]:
    """Lowest and highest setting: speeds [-] or set heads [Pa].

    Parameters
    ----------
    pump : ResolvedPump
        The pump (mode, setting, steps). [-]

    Returns
    -------
    tuple of float
        Lowest and highest speed ratio [-] or set head. [Pa]
    """
    if pump.mode == "fixed_speed":
        return MIN_PUMP_SPEED, 1.0
    return 0.0, pump.full_speed_coeffs[0] * (1.0 - SET_HEAD_MARGIN)


def steps(pump: ResolvedPump) -> tuple[float, ...] | None:
    """Available settings, increasing (None: any).

    Parameters
    ----------
    pump : ResolvedPump
        The pump (mode, setting, steps). [-]

    Returns
    -------
    tuple of float or None
        Speed ratios [-] or set heads [Pa]; None when any setting will do.
    """
    return pump.speed_steps if pump.mode == "fixed_speed" else pump.setpoint_steps_Pa


def lowest_setting(
    pump: ResolvedPump, need_Pa: float, mass_flow_kg_s: float, temp_C: float
) -> float | None:
    """The lowest setting whose rise at the design flow meets the need.

    Parameters
    ----------
    pump : ResolvedPump
        The pump. [-]
    need_Pa : float
        Pressure rise needed at the design flow. [Pa]
    mass_flow_kg_s : float
        Design flow through the pump. [kg/s]
    temp_C : float
        Water temperature. [°C]

    Returns
    -------
    float or None
        Speed ratio [-] or set head [Pa], continuous and rounded up to
        :data:`SPEED_STEP` or :data:`SETPOINT_STEP_PA`; the lowest allowed
        when even that gives more; None when the highest setting gives less.
    """
    low, high = setting_range(pump)

    def excess(x: float) -> float:
        return rise_Pa(pump, x, mass_flow_kg_s, temp_C) - need_Pa

    if excess(high) < 0.0:
        return None
    start = low if pump.mode == "fixed_speed" else min(need_Pa, high) * 1e-3
    if excess(start) >= 0.0:
        return start
    x = float(brentq(excess, start, high, xtol=BRENT_XTOL))
    step = SPEED_STEP if pump.mode == "fixed_speed" else SETPOINT_STEP_PA
    rounded = math.ceil(x / step - 1e-9) * step
    return rounded if rounded <= high and excess(rounded) >= 0.0 else x


def choose_setting(
    pump: ResolvedPump,
    need_Pa: float,
    mass_flow_kg_s: float,
    temp_C: float,
    keep: bool,
) -> tuple[PumpSetting, float]:
    """The setting balancing gives a pump, and how far it falls short.

    Parameters
    ----------
    pump : ResolvedPump
        The pump with the scenario's setting and available steps. [-]
    need_Pa : float
        Rise its index circuit needs at the design flow. [Pa]
    mass_flow_kg_s : float
        Design flow through the pump. [kg/s]
    temp_C : float
        Water temperature. [°C]
    keep : bool
        Keep the scenario's setting instead of the lowest that meets the need. [-]

    Returns
    -------
    setting : PumpSetting
        The scenario's setting when ``keep``; else the next available step up
        from the lowest setting that meets the need, or that setting itself
        when the pump has no steps; the highest setting when none meets it.
    shortfall_Pa : float
        How much less than the need the setting gives (0 when it meets it).
        [Pa]
    """
    key = SETTING_SPEED if pump.mode == "fixed_speed" else SETTING_SETPOINT
    if keep:
        value = scenario_setting(pump)
    else:
        lowest = lowest_setting(pump, need_Pa, mass_flow_kg_s, temp_C)
        available = steps(pump)
        if lowest is None:
            value = available[-1] if available else setting_range(pump)[1]
        elif available:
            up = [s for s in available if s >= lowest - 1e-12 * max(1.0, lowest)]
            value = up[0] if up else available[-1]
        else:
            value = lowest
    rise = rise_Pa(pump, value, mass_flow_kg_s, temp_C)
    return PumpSetting(key, value, rise), max(0.0, need_Pa - rise)
