"""Circulating pumps: head curves from data points, speed by the affinity laws.

Thin array wrappers over :mod:`simheat.physics._kernels` plus the curve fit.
"""

from __future__ import annotations

import warnings

import numpy as np
import numpy.typing as npt
from scipy.optimize import lsq_linear

from simheat.errors import ScenarioError
from simheat.physics import _kernels
from simheat.physics.water import FloatArray, _apply, _check_temperature

SECONDS_PER_HOUR = 3600.0  # [s/h]
PA_PER_KPA = 1000.0  # [Pa/kPa]


def fit_pump_curve(
    flow_m3_h: npt.ArrayLike, head_kPa: npt.ArrayLike
) -> tuple[float, float, float]:
    r"""Fit a falling quadratic head curve through pump data points.

    Parameters
    ----------
    flow_m3_h : array_like
        Volume flows of the data points, >= 0 and distinct, any order. [m3/h]
    head_kPa : array_like
        Pressure rise (pump head as a pressure) at each flow. [kPa]

    Returns
    -------
    a0 : float
        Rise at zero flow (shut-off head). [Pa]
    a1 : float
        Linear coefficient, <= 0. [Pa s/m3]
    a2 : float
        Quadratic coefficient, <= 0. [Pa s2/m6]

    Raises
    ------
    ScenarioError
        When fewer than 2 points are given, the columns differ in length, a value
        is not finite, a flow is negative or repeated, the head does not fall with
        flow (after sorting by flow each head must be no higher than the one before
        and the last below the first), or the fitted curve has no positive head at
        zero flow.

    Notes
    -----
    The curve is :math:`\Delta p = a_0 + a_1 Q + a_2 Q^2` in SI units
    (Pa, m3/s) at nominal speed, the form used with the affinity laws in
    :func:`pump_pressure_rise_Pa`.

    - Two points: the flat-top assumption :math:`a_1 = 0` (the curve's maximum at
      zero flow) and :math:`a_0, a_2` through both points exactly.
    - Three or more points: least squares with the bounds :math:`a_1 \le 0`,
      :math:`a_2 \le 0`, so the fitted head falls monotonically over all
      forward flows and the network solve sees a pump whose rise never grows with
      flow. Points on a falling parabola are reproduced exactly.

    A quadratic is a planning approximation of a measured curve; check the fit
    against the data near the duty point.

    Examples
    --------
    >>> a0, a1, a2 = fit_pump_curve([0.0, 1.0, 2.0], [40.0, 36.0, 28.0])
    >>> round(a0), round(a1 * 1e-6, 3), round(a2 * 1e-9, 3)
    (40000, -7.2, -25.92)
    """
    flow = np.asarray(flow_m3_h, dtype=np.float64).ravel()
    head = np.asarray(head_kPa, dtype=np.float64).ravel()
    if flow.size != head.size:
        raise ScenarioError(
            f"flow_m3_h and head_kPa must have the same length, got {flow.size} "
            f"and {head.size}"
        )
    if flow.size < 2:
        raise ScenarioError(
            f"a pump curve needs at least 2 points (flow_m3_h, head_kPa), got "
            f"{flow.size}"
        )
    if not (np.all(np.isfinite(flow)) and np.all(np.isfinite(head))):
        raise ScenarioError("flow_m3_h and head_kPa must be finite numbers")
    if np.any(flow < 0.0):
        raise ScenarioError(f"flow_m3_h must be >= 0, got {flow.tolist()}")
    order = np.argsort(flow)
    flow = flow[order]
    head = head[order]
    if np.any(np.diff(flow) == 0.0):
        raise ScenarioError(f"flow_m3_h must be distinct, got {flow.tolist()}")
    if np.any(np.diff(head) > 0.0) or not head[-1] < head[0]:
        raise ScenarioError(
            f"head_kPa must fall with flow, got {head.tolist()} at flows "
            f"{flow.tolist()} m3/h"
        )
    q = flow / SECONDS_PER_HOUR  # [m3/s]
    dp = head * PA_PER_KPA  # [Pa]
    if flow.size == 2:
        a2 = (dp[1] - dp[0]) / (q[1] ** 2 - q[0] ** 2)
        a1 = 0.0
        a0 = dp[0] - a2 * q[0] ** 2
    else:
        q_scale = q[-1]
        dp_scale = float(np.max(np.abs(dp)))
        x = q / q_scale
        matrix = np.column_stack([np.ones_like(x), x, x * x])
        result = lsq_linear(
            matrix,
            dp / dp_scale,
            bounds=([-np.inf, -np.inf, -np.inf], [np.inf, 0.0, 0.0]),
            method="bvls",
            tol=1e-14,
        )
        b0, b1, b2 = result.x
        a0 = b0 * dp_scale
        a1 = min(b1, 0.0) * dp_scale / q_scale
        a2 = min(b2, 0.0) * dp_scale / q_scale**2
    if not a0 > 0.0:
        raise ScenarioError(
            f"the fitted pump curve has no positive head at zero flow "
            f"(a0 = {a0:g} Pa); check head_kPa {head.tolist()}"
        )
    return float(a0), float(a1), float(a2)


def pump_pressure_rise_Pa(
    mass_flow_kg_s: npt.ArrayLike,
    a0: npt.ArrayLike,
    a1: npt.ArrayLike,
    a2: npt.ArrayLike,
    speed_ratio: npt.ArrayLike,
    temp_C: npt.ArrayLike,
) -> tuple[float | FloatArray, float | FloatArray]:
    r"""Pressure rise of a pump at a speed, and its slope in mass flow.

    Parameters
    ----------
    mass_flow_kg_s : float or array_like
        Mass flow through the pump, positive in its pumping direction. [kg/s]
    a0 : float or array_like
        Rise at zero flow and nominal speed, >= 0. [Pa]
    a1 : float or array_like
        Linear curve coefficient at nominal speed. [Pa s/m3]
    a2 : float or array_like
        Quadratic curve coefficient, < 0 for a falling curve. [Pa s2/m6]
    speed_ratio : float or array_like
        Speed over nominal speed, >= 0; 0 is a stopped pump. [-]
    temp_C : float or array_like
        Water temperature, for the density. [°C]

    Returns
    -------
    rise_Pa : float or ndarray
        Pressure rise across the pump in its pumping direction. [Pa]
    slope_Pa_s_per_kg : float or ndarray
        Exact derivative :math:`\mathrm{d}(\Delta p)/\mathrm{d}\dot m`; < 0 at
        every flow when ``a2`` < 0 and ``a1`` <= 0. [Pa s/kg]

    Raises
    ------
    ScenarioError
        When ``a0`` < 0, ``speed_ratio`` < 0, or an input is NaN.

    Warns
    -----
    UserWarning
        When a temperature lies outside 0-100 °C, or a stopped pump has
        ``a2`` >= 0 (it would then offer no resistance to flow).

    Notes
    -----
    With :math:`Q = \dot m/\rho` and speed ratio :math:`s`, the affinity laws
    [1]_ scale flow with :math:`s` and head with :math:`s^2`, which turns the
    nominal curve :math:`a_0 + a_1 Q + a_2 Q^2` into

    .. math:: \Delta p = a_0 s^2 + a_1 s Q + a_2 Q\sqrt{Q^2 + Q_0^2},

    where :math:`Q\sqrt{Q^2+Q_0^2}` (with :math:`Q_0 = 10^{-5}\,\mathrm{kg/s}/\rho`)
    stands for :math:`Q|Q|`: it keeps the curve's sign for reverse flow, and its
    slope stays nonzero at zero flow. A stopped pump (:math:`s = 0`) is thus the
    resistance :math:`a_2 Q|Q|`, a loss since :math:`a_2 < 0`. The affinity laws
    hold for similar operating points and speeds not far from nominal; at low
    speeds they overstate the head.

    References
    ----------
    .. [1] I. J. Karassik, J. P. Messina, P. Cooper, C. C. Heald, "Pump handbook",
       4th ed., McGraw-Hill, 2008, section 2.1 (affinity laws).

    Examples
    --------
    >>> rise, slope = pump_pressure_rise_Pa(0.0, 40e3, 0.0, -6.48e10, 0.5, 60.0)
    >>> round(rise)
    10000
    """
    _check_temperature(temp_C)
    arrays = {
        "mass_flow_kg_s": mass_flow_kg_s,
        "a0": a0,
        "a1": a1,
        "a2": a2,
        "speed_ratio": speed_ratio,
    }
    arrays = {k: np.asarray(v, dtype=np.float64) for k, v in arrays.items()}
    for name, value in arrays.items():
        if np.any(np.isnan(value)):
            raise ScenarioError(f"{name} must be a number, got NaN")
    for name in ("a0", "speed_ratio"):
        if np.any(arrays[name] < 0.0):
            raise ScenarioError(
                f"{name} must be >= 0, got {arrays[name][arrays[name] < 0].flat[0]!r}"
            )
    stopped, curve_a2 = np.broadcast_arrays(arrays["speed_ratio"] == 0.0, arrays["a2"])
    if np.any(stopped & (curve_a2 >= 0.0)):
        warnings.warn(
            "a stopped pump with a2 >= 0 offers no resistance to flow",
            stacklevel=2,
        )
    return _apply(
        _kernels.pump_pressure_rise_Pa,
        arrays["mass_flow_kg_s"],
        arrays["a0"],
        arrays["a1"],
        arrays["a2"],
        arrays["speed_ratio"],
        temp_C,
        n_out=2,
    )


def control_flow_m3_s(a0: float, a1: float, a2: float, setpoint_Pa: float) -> float:
    r"""Flow at which a falling pump curve delivers a set head.

    Parameters
    ----------
    a0 : float
        Rise at zero flow and nominal speed, > ``setpoint_Pa``. [Pa]
    a1 : float
        Linear curve coefficient, with ``a2`` making the curve fall. [Pa s/m3]
    a2 : float
        Quadratic curve coefficient, <= 0. [Pa s2/m6]
    setpoint_Pa : float
        Set head, 0 < ``setpoint_Pa`` < ``a0``. [Pa]

    Returns
    -------
    float
        The flow :math:`Q_c > 0` with :math:`a_0 + a_1 Q_c + a_2 Q_c^2 =` the set
        head (the regularisation of :math:`Q|Q|` is negligible there). [m3/s]

    Raises
    ------
    ScenarioError
        When the set head is not between zero and the shut-off head, or the
        curve never falls to it.

    Notes
    -----
    A proportional-pressure pump follows the control line from half the set
    head at zero flow to the set head at :math:`Q_c` on its maximum-speed curve
    (common trade description of the mode, from memory).

    Examples
    --------
    >>> round(control_flow_m3_s(40e3, 0.0, -1e10, 30e3) * 3600.0, 3)
    3.6
    """
    if not (np.isfinite(setpoint_Pa) and 0.0 < setpoint_Pa < a0):
        raise ScenarioError(
            f"set head {setpoint_Pa / PA_PER_KPA:g} kPa must lie between 0 and the "
            f"pump's shut-off head {a0 / PA_PER_KPA:g} kPa"
        )
    c = a0 - setpoint_Pa
    if a2 < 0.0:
        # positive root of a2 Q^2 + a1 Q + c = 0, written to avoid cancellation
        disc = a1 * a1 - 4.0 * a2 * c
        q = 2.0 * c / (-a1 + np.sqrt(disc))
    elif a1 < 0.0:
        q = -c / a1
    else:
        raise ScenarioError(
            f"a pump curve with a1 = {a1:g} and a2 = {a2:g} never falls to the set "
            f"head {setpoint_Pa / PA_PER_KPA:g} kPa"
        )
    return float(q)


def curve_at_speed(
    a0: float, a1: float, a2: float, speed_ratio: float
) -> tuple[float, float, float]:
    r"""Head-curve coefficients of a pump run at a fraction of its curve's speed.

    Parameters
    ----------
    a0 : float
        Rise at zero flow at the curve's speed. [Pa]
    a1 : float
        Linear coefficient at the curve's speed. [Pa s/m3]
    a2 : float
        Quadratic coefficient. [Pa s2/m6]
    speed_ratio : float
        Speed over the curve's speed, > 0. [-]

    Returns
    -------
    tuple of float
        :math:`(a_0 s^2, a_1 s, a_2)`: the curve that :func:`pump_pressure_rise_Pa`
        evaluates at speed ratio :math:`s`, as coefficients at speed ratio 1.
        [Pa], [Pa s/m3], [Pa s2/m6]

    Raises
    ------
    ScenarioError
        When ``speed_ratio`` is not a positive finite number.

    Notes
    -----
    The affinity laws [1]_ as :func:`pump_pressure_rise_Pa` applies them (flow
    with :math:`s`, head with :math:`s^2`): :math:`a_0 s^2 + a_1 s Q + a_2 Q^2`.
    A test checks that both give the same rise at every flow.

    References
    ----------
    .. [1] I. J. Karassik, J. P. Messina, P. Cooper, C. C. Heald, "Pump handbook",
       4th ed., McGraw-Hill, 2008, section 2.1 (affinity laws).

    Examples
    --------
    >>> curve_at_speed(40e3, -1e6, -6.48e10, 0.5)
    (10000.0, -500000.0, -64800000000.0)
    """
    if not (np.isfinite(speed_ratio) and speed_ratio > 0.0):
        raise ScenarioError(f"speed_ratio must be > 0, got {speed_ratio!r}")
    s = float(speed_ratio)
    return float(a0) * s * s, float(a1) * s, float(a2)
