"""Valves: Kv-rated pressure drop, preset tables, thermostatic heads.

Thin array wrappers over :mod:`simheat.physics._kernels` that validate inputs.
"""

from __future__ import annotations

import numpy as np
import numpy.typing as npt

from simheat.errors import ScenarioError
from simheat.physics import _kernels
from simheat.physics.friction import _require
from simheat.physics.water import (
    FloatArray,
    _apply,
    _check_temperature,
    _scalar_or_array,
)

LEAKAGE_FRACTION = _kernels.LEAKAGE_FRACTION  # Kv fraction passed when closed [-]
REGULARISATION_MASS_FLOW_KG_S = _kernels.REGULARISATION_MASS_FLOW_KG_S  # [kg/s]
TRV_CORNER_FRACTION = _kernels.TRV_CORNER_FRACTION  # corner width / band [-]


def valve_pressure_drop_Pa(
    mass_flow_kg_s: npt.ArrayLike,
    kv_m3_h: npt.ArrayLike,
    opening: npt.ArrayLike,
    temp_C: npt.ArrayLike,
) -> tuple[float | FloatArray, float | FloatArray]:
    r"""Signed pressure drop across a Kv-rated valve, and its slope.

    Parameters
    ----------
    mass_flow_kg_s : float or array_like
        Mass flow, signed in the valve's direction. [kg/s]
    kv_m3_h : float or array_like
        Flow coefficient of the fully open valve (at its preset), > 0. [m3/h]
    opening : float or array_like
        Opening of the valve stroke, 0 closed ... 1 fully open. [-]
    temp_C : float or array_like
        Water temperature, for the density. [°C]

    Returns
    -------
    dp_Pa : float or ndarray
        Pressure drop in the flow direction, same sign as the flow. [Pa]
    slope_Pa_s_per_kg : float or ndarray
        Exact derivative :math:`\mathrm{d}(\Delta p)/\mathrm{d}\dot m`, > 0 at every
        flow, zero included. [Pa s/kg]

    Raises
    ------
    ScenarioError
        When ``kv_m3_h`` <= 0, ``opening`` is outside [0, 1], or an input is NaN.

    Warns
    -----
    UserWarning
        When a temperature lies outside 0-100 °C.

    Notes
    -----
    The Kv definition [1]_ [2]_, :math:`Q = K_v\sqrt{\Delta p\cdot 1000/\rho}`
    with Q in m3/h and :math:`\Delta p` in bar, solved for the pressure drop at
    the real water density:

    .. math:: \Delta p = \frac{1.296\times 10^{9}}{\rho K_{v,e}^2}
              \,\dot m\sqrt{\dot m^2 + \dot m_0^2}\quad[\mathrm{Pa}],

    with :math:`\dot m_0` = 1e-5 kg/s (0.036 L/h) replacing :math:`|\dot m|` so the
    slope is positive at zero flow; the relative change is below
    :math:`\dot m_0^2/(2\dot m^2)`, 5e-5 at 1e-3 kg/s.

    The effective coefficient is
    :math:`K_{v,e} = K_v\,(\lambda + (1-\lambda)\,x)` for opening :math:`x`,
    with leakage fraction :math:`\lambda` = 0.005. This is our assumption, not a
    standard value: valves are not drop-tight when closed, and a small leakage
    keeps the network well posed when every valve of a branch is shut. The form is
    linear in the opening, exact at full opening, and has no kink for the time
    integration to trip over.

    References
    ----------
    .. [1] EN 60534-2-1, "Industrial-process control valves - Part 2-1: Flow
       capacity - Sizing equations for fluid flow under installed conditions".
    .. [2] VDI/VDE 2173, "Strömungstechnische Kenngrößen von Stellventilen und
       deren Bestimmung", 1962.

    Examples
    --------
    >>> dp, slope = valve_pressure_drop_Pa(1000.0 / 3600.0, 1.0, 1.0, 4.0)
    >>> round(dp / 1e5, 3)  # 1 m3/h through Kv 1 at about 1000 kg/m3: 1 bar
    1.0
    """
    _check_temperature(temp_C)
    m = np.asarray(mass_flow_kg_s, dtype=np.float64)
    if np.any(np.isnan(m)):
        raise ScenarioError("mass_flow_kg_s must be a number, got NaN")
    kv = _require(kv_m3_h, "kv_m3_h", positive=True)
    x = np.asarray(opening, dtype=np.float64)
    if np.any(np.isnan(x)) or np.any(x < 0.0) or np.any(x > 1.0):
        raise ScenarioError(
            f"opening must be within [0, 1], got {x[(x < 0) | (x > 1) | np.isnan(x)]}"
        )
    return _apply(_kernels.valve_pressure_drop_Pa, m, kv, x, temp_C, n_out=2)


def kv_from_preset(
    preset: npt.ArrayLike, presets: npt.ArrayLike, kv_values: npt.ArrayLike
) -> float | FloatArray:
    """Kv of a balancing or radiator valve at a preset, from the maker's table.

    Parameters
    ----------
    preset : float or array_like
        Preset (setting) of the valve, in the table's own scale. [-]
    presets : array_like
        Presets of the table, distinct, any order. [-]
    kv_values : array_like
        Kv at each preset of ``presets``, > 0. [m3/h]

    Returns
    -------
    float or ndarray
        Kv at ``preset``, linearly interpolated between table rows. [m3/h]

    Raises
    ------
    ScenarioError
        When the table is empty, the two columns differ in length, presets repeat,
        a Kv is not positive, anything is NaN, or ``preset`` lies outside the
        table.

    Notes
    -----
    Preset tables are product data (the Kv a maker publishes per setting); we do
    not extrapolate beyond them.

    Examples
    --------
    >>> kv_from_preset(2.5, [1, 2, 3, 4], [0.1, 0.2, 0.4, 0.6])
    0.30000000000000004
    """
    table_presets = np.asarray(presets, dtype=np.float64).ravel()
    table_kv = np.asarray(kv_values, dtype=np.float64).ravel()
    if table_presets.size == 0:
        raise ScenarioError("presets must list at least one preset, got none")
    if table_presets.size != table_kv.size:
        raise ScenarioError(
            f"presets and kv_values must have the same length, got "
            f"{table_presets.size} and {table_kv.size}"
        )
    if np.any(np.isnan(table_presets)) or np.any(np.isnan(table_kv)):
        raise ScenarioError("presets and kv_values must be numbers, got NaN")
    if np.any(table_kv <= 0.0):
        raise ScenarioError(f"kv_values must be > 0, got {table_kv.tolist()}")
    order = np.argsort(table_presets)
    table_presets = table_presets[order]
    table_kv = table_kv[order]
    if np.any(np.diff(table_presets) == 0.0):
        raise ScenarioError(f"presets must be distinct, got {table_presets.tolist()}")
    p = np.asarray(preset, dtype=np.float64)
    outside = np.isnan(p) | (p < table_presets[0]) | (p > table_presets[-1])
    if np.any(outside):
        raise ScenarioError(
            f"preset must be within the table's {table_presets[0]:g} to "
            f"{table_presets[-1]:g}, got {p[outside].flat[0]!r}"
        )
    return _scalar_or_array(np.interp(p, table_presets, table_kv))


def thermostatic_opening(
    sensor_temp_C: npt.ArrayLike, setpoint_C: npt.ArrayLike, band_K: npt.ArrayLike
) -> float | FloatArray:
    r"""Return the opening of a proportional thermostatic head.

    Parameters
    ----------
    sensor_temp_C : float or array_like
        Temperature the head senses. [°C]
    setpoint_C : float or array_like
        Setpoint, the temperature at the middle of the band. [°C]
    band_K : float or array_like
        Proportional band, the sensor temperature rise that takes the valve from
        fully open to closed, > 0. [K]

    Returns
    -------
    float or ndarray
        Opening in [0, 1]: 1 fully open, 0 closed. [-]

    Raises
    ------
    ScenarioError
        When ``band_K`` <= 0 or an input is NaN.

    Notes
    -----
    A proportional controller in the language of EN 215 [1]_: fully open at or
    below :math:`T_s - b/2`, closed at or above :math:`T_s + b/2`, and in between
    linear in the sensor temperature, except that each end of the straight part is
    rounded by a parabola over 5 % of the band so the opening is continuously
    differentiable (the time integration sees no kink). With
    :math:`u = (T_s + b/2 - T)/b` and :math:`w` = 0.05,

    .. math:: x(u) = \begin{cases}
              k u^2/(2w) & 0 < u < w\\
              k(u - w/2) & w \le u \le 1 - w\\
              1 - k(1-u)^2/(2w) & 1 - w < u < 1
              \end{cases},\qquad k = 1/(1-w),

    so the middle slope is 5.3 % steeper than the plain linear law, the opening
    at the setpoint is exactly 0.5, and the ends are exactly 0 and 1. The head's
    own thermal lag is not part of this function.

    References
    ----------
    .. [1] EN 215, "Thermostatic radiator valves - Requirements and test methods".

    Examples
    --------
    >>> thermostatic_opening(20.0, 20.0, 2.0)
    0.5
    >>> thermostatic_opening(18.0, 20.0, 2.0), thermostatic_opening(22.0, 20.0, 2.0)
    (1.0, 0.0)
    """
    sensor = np.asarray(sensor_temp_C, dtype=np.float64)
    setpoint = np.asarray(setpoint_C, dtype=np.float64)
    if np.any(np.isnan(sensor)) or np.any(np.isnan(setpoint)):
        raise ScenarioError("sensor_temp_C and setpoint_C must be numbers, got NaN")
    band = _require(band_K, "band_K", positive=True)
    return _apply(_kernels.thermostatic_opening, sensor, setpoint, band)


def series_kv_m3_h(*kv_m3_h: float) -> float:
    r"""Kv of valves in series carrying the same flow (valve body, lockshield ...).

    Parameters
    ----------
    *kv_m3_h : float
        Kv of each valve, > 0. [m3/h]

    Returns
    -------
    float
        The single Kv with the same pressure drop at every flow. [m3/h]

    Raises
    ------
    ScenarioError
        When no Kv is given or one is not a positive finite number.

    Notes
    -----
    Each valve's drop is :math:`\Delta p_i \propto \dot m^2/K_{v,i}^2` at the same
    flow and density (the Kv definition, :func:`valve_pressure_drop_Pa`), so the
    drops add as :math:`1/K_v^2 = \sum_i 1/K_{v,i}^2`.

    Examples
    --------
    >>> round(series_kv_m3_h(0.3, 0.4), 6)
    0.24
    """
    if not kv_m3_h:
        raise ScenarioError("series_kv_m3_h needs at least one Kv")
    values = np.asarray(kv_m3_h, dtype=np.float64)
    if not np.all(np.isfinite(values) & (values > 0.0)):
        raise ScenarioError(f"every Kv must be > 0, got {values.tolist()}")
    return float(1.0 / np.sqrt(np.sum(1.0 / values**2)))
