"""Pump curves fitted to the scenario's points, and the checks that need them.

Every pump table (``[pump]``, ``[layout.primary_pump]``, each
``[[layout.floor_pumps]]``) gets a falling quadratic head curve
(:func:`simheat.physics.pump.fit_pump_curve`). Errors name the table's key path,
as the loader's do.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from simheat.errors import ScenarioError
from simheat.physics.pump import curve_at_speed, fit_pump_curve
from simheat.scenario.model import Pump

# Relative margin a regulated pump's set head must keep below the fitted shut-off
# head; far below any head a pump could be set to, far above fit round-off. [-]
SET_HEAD_MARGIN = 1e-6
# Significant digits that undo the round-off of converting the file's m3/h and
# kPa to SI and back, so the fit and the messages see the numbers as written. [-]
AS_WRITTEN_DIGITS = 12


@dataclass(frozen=True)
class ResolvedPump:
    """A pump with its fitted head curve.

    Attributes
    ----------
    where : str
        Key path of the pump's table (``pump``, ``layout.primary_pump``,
        ``layout.floor_pumps[1]``). [-]
    coeffs : tuple of float
        Head curve ``dp = a0 + a1 Q + a2 Q^2`` the pump runs on: at its speed
        setting for a fixed-speed pump, at full speed for a regulated one:
        ``a0`` [Pa], ``a1`` [Pa s/m3], ``a2`` [Pa s2/m6].
    mode : str
        Control mode (:data:`simheat.scenario.model.PUMP_MODES`). [-]
    setpoint_Pa : float
        Set head of a regulated pump, below ``a0``; 0 at fixed speed. [Pa]
    check_valve : bool or None
        Whether the scenario fits a check valve; None for the layout's default. [-]
    curve_coeffs : tuple of float or None
        The curve fitted to the points (full speed): ``a0`` [Pa], ``a1``
        [Pa s/m3], ``a2`` [Pa s2/m6]; None when equal to ``coeffs``.
    speed : float
        Speed setting of a fixed-speed pump over its curve's speed (1 for a
        regulated pump). [-]
    speed_steps, setpoint_steps_Pa : tuple of float or None
        Available speeds [-] or set heads [Pa], increasing; None for any.
    """

    where: str
    coeffs: tuple[float, float, float]
    mode: str
    setpoint_Pa: float
    check_valve: bool | None
    curve_coeffs: tuple[float, float, float] | None = None
    speed: float = 1.0
    speed_steps: tuple[float, ...] | None = None
    setpoint_steps_Pa: tuple[float, ...] | None = None

    @property
    def full_speed_coeffs(self) -> tuple[float, float, float]:
        """Head curve fitted to the points, at full speed. [Pa, Pa s/m3, Pa s2/m6]."""
        return self.coeffs if self.curve_coeffs is None else self.curve_coeffs

    @property
    def shut_off_head_Pa(self) -> float:
        """Rise of the fitted curve at zero flow. [Pa]."""
        return self.coeffs[0]


def _as_written(values_SI: np.ndarray, per_unit: float) -> list[float]:
    """Values in the file's unit (SI times ``per_unit``), as the file wrote them."""
    return [float(f"{v * per_unit:.{AS_WRITTEN_DIGITS}g}") for v in values_SI]


def resolve_pump(pump: Pump, where: str, origin: str) -> ResolvedPump:
    """Fit a pump's head curve and check its set head against it.

    Parameters
    ----------
    pump : Pump
        The pump as the scenario gives it: points [m3/s], [Pa], mode, set head
        [Pa].
    where : str
        Key path of its table, for messages. [-]
    origin : str
        Scenario file name, for messages. [-]

    Returns
    -------
    ResolvedPump
        The pump with its fitted curve.

    Raises
    ------
    ScenarioError
        ``<where>.head_kPa`` when the points give no usable falling curve (no
        positive head at zero flow, a fit that overflows, or one that bends
        upward);
        ``<where>.setpoint_kPa`` when a regulated pump's set head is not below
        the fitted shut-off head (within :data:`SET_HEAD_MARGIN`: points on an
        exact parabola fit to a shut-off head a few ulps above the first
        point's head).
    """
    flow_m3_h = _as_written(pump.flow_m3_s, 3600.0)
    head_kPa = _as_written(pump.head_Pa, 1e-3)
    try:
        with np.errstate(all="ignore"):
            coeffs = fit_pump_curve(np.array(flow_m3_h), np.array(head_kPa))
    except ScenarioError as exc:
        raise ScenarioError(f"{where}.head_kPa: {exc} ({origin})") from None
    a0, a1, a2 = coeffs
    if not (np.all(np.isfinite(coeffs)) and (a1 < 0.0 or a2 < 0.0)):
        raise ScenarioError(
            f"{where}.head_kPa: the points give no usable falling head curve, got "
            f"{head_kPa} at flows {flow_m3_h} m3/h ({origin})"
        )
    if not a2 < 0.0:
        # A centrifugal pump's head falls ever faster with flow; a fit that
        # bends upward comes from a stray point, and leaves the pump link
        # without the quadratic term the flow solve needs there.
        raise ScenarioError(
            f"{where}.head_kPa: the curve fitted through the points bends upward "
            f"(a2 = {a2:.3g} Pa s2/m6), where a pump's head falls ever faster with "
            f"flow; check the points, got {head_kPa} at flows {flow_m3_h} m3/h "
            f"({origin})"
        )
    if pump.mode != "fixed_speed":
        shut_off_kPa = a0 / 1e3
        setpoint_kPa = pump.setpoint_Pa / 1e3
        if not setpoint_kPa < shut_off_kPa * (1.0 - SET_HEAD_MARGIN):
            raise ScenarioError(
                f"{where}.setpoint_kPa: must be below the pump curve's shut-off head "
                f"{shut_off_kPa:.6g} kPa (mode {pump.mode}), got "
                f"{setpoint_kPa:.10g} ({origin})"
            )
        steps_kPa = [x / 1e3 for x in pump.setpoint_steps_Pa or ()]
        if steps_kPa and not steps_kPa[-1] < shut_off_kPa * (1.0 - SET_HEAD_MARGIN):
            raise ScenarioError(
                f"{where}.setpoint_steps_kPa: every step must be below the pump "
                f"curve's shut-off head {shut_off_kPa:.6g} kPa, got "
                f"{steps_kPa[-1]:.10g} ({origin})"
            )
    full = (float(a0), float(a1), float(a2))
    at_speed = full if pump.speed == 1.0 else curve_at_speed(*full, pump.speed)
    return ResolvedPump(
        where=where,
        coeffs=at_speed,
        mode=pump.mode,
        setpoint_Pa=pump.setpoint_Pa,
        check_valve=pump.check_valve,
        curve_coeffs=None if at_speed == full else full,
        speed=pump.speed,
        speed_steps=pump.speed_steps,
        setpoint_steps_Pa=pump.setpoint_steps_Pa,
    )
