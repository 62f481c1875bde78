"""Heat pump as a heat source: capacity and COP from rating tables, minimum flow.

Manufacturers publish a heat pump's heating capacity and coefficient of
performance (COP) as rating points over the outdoor (source) temperature and the
water flow temperature, measured under the test conditions of EN 14511 (for an
air-to-water unit: outdoor air dry bulb at the unit's inlet, water outlet
temperature, at full load, each point with the defrost losses of that air
temperature averaged in where the unit defrosts). simheat interpolates those
points bilinearly (:func:`rating_value`, the compiled
:func:`simheat.physics._heat_pump_kernels.table_lookup`) and holds them at the
table's edges outside it; a run that asks for outside the table is warned about
(:func:`warn_outside_rating`). Below its minimum flow the unit stops heating
(:func:`min_flow_share`). What this leaves out is listed in the README.

The compiled kernels are imported where they are called: the scenario reader
checks COP against :func:`carnot_cop` without loading the compiler.
"""

from __future__ import annotations

import warnings

import numpy as np
import numpy.typing as npt

from simheat.errors import RatingTableWarning, ScenarioError

FloatArray = npt.NDArray[np.float64]

# 0 °C in kelvin, for the Carnot limit. [K]
KELVIN_OFFSET_K = 273.15


def _check_table(outdoor_axis_C, flow_axis_C, table) -> tuple:
    """Arrays of a rating table; ScenarioError on a bad shape or axis."""
    rows = np.ascontiguousarray(outdoor_axis_C, dtype=np.float64)
    columns = np.ascontiguousarray(flow_axis_C, dtype=np.float64)
    values = np.ascontiguousarray(table, dtype=np.float64)
    for name, axis in (("outdoor_axis_C", rows), ("flow_axis_C", columns)):
        if axis.ndim != 1 or axis.size < 2 or np.any(np.diff(axis) <= 0.0):
            raise ScenarioError(
                f"{name}: must be at least two strictly increasing temperatures, "
                f"got {axis.tolist()}"
            )
    if values.shape != (rows.size, columns.size):
        raise ScenarioError(
            f"table: must have shape ({rows.size}, {columns.size}) (outdoor x flow), "
            f"got {values.shape}"
        )
    return rows, columns, values


def rating_value(
    outdoor_axis_C: npt.ArrayLike,
    flow_axis_C: npt.ArrayLike,
    table: npt.ArrayLike,
    outdoor_C: npt.ArrayLike,
    flow_C: npt.ArrayLike,
) -> float | FloatArray:
    """A rating table's value (capacity or COP) between its points, clamped.

    Parameters
    ----------
    outdoor_axis_C : array_like, shape (n,)
        Outdoor temperatures of the table's rows, strictly increasing. [°C]
    flow_axis_C : array_like, shape (m,)
        Flow temperatures of its columns, strictly increasing. [°C]
    table : array_like, shape (n, m)
        The rated values. [unit of the table: W for capacity, - for COP]
    outdoor_C, flow_C : float or array_like
        Where to read the table (broadcast together). [°C]

    Returns
    -------
    float or ndarray
        Bilinear interpolation between the four surrounding points; outside the
        table each temperature is held at the nearest end of its axis.
        [unit of the table]

    Raises
    ------
    ScenarioError
        On an axis with fewer than two points or not strictly increasing, or a
        table whose shape is not (rows, columns).

    Notes
    -----
    Bilinear interpolation on a rectangular grid: with ``u`` and ``v`` the
    fractions of the way across the surrounding interval of each axis,
    ``f = (1-u)(1-v) f00 + u(1-v) f10 + (1-u) v f01 + u v f11``. It is exact for
    values linear in each temperature and continuous everywhere (its slope jumps
    at grid lines).

    Examples
    --------
    Halfway between two outdoor and two flow temperatures, the mean of the four:

    >>> rating_value([-7, 7], [35, 55], [[6.0, 5.0], [9.0, 8.0]], 0.0, 45.0)
    7.0
    """
    from simheat.physics._heat_pump_kernels import table_lookup as lookup

    rows, columns, values = _check_table(outdoor_axis_C, flow_axis_C, table)
    outdoor, flow = np.broadcast_arrays(
        np.asarray(outdoor_C, dtype=np.float64), np.asarray(flow_C, dtype=np.float64)
    )
    out = np.empty(outdoor.shape)
    for index in np.ndindex(outdoor.shape):
        out[index] = lookup(
            rows, columns, values, float(outdoor[index]), float(flow[index])
        )
    return float(out) if out.ndim == 0 else out


def carnot_cop(flow_C: npt.ArrayLike, outdoor_C: npt.ArrayLike) -> float | FloatArray:
    """Carnot (ideal) heating COP between the outdoor and the flow temperature.

    Parameters
    ----------
    flow_C : float or array_like
        Temperature heat is delivered at. [°C]
    outdoor_C : float or array_like
        Temperature heat is taken from. [°C]

    Returns
    -------
    float or ndarray
        ``T_flow / (T_flow - T_outdoor)`` in kelvin; infinite where the flow is not
        warmer than outdoors. No real heat pump reaches it. [-]

    Notes
    -----
    Second law of thermodynamics: a heat pump lifting heat from ``T_c`` to
    ``T_h`` (absolute) needs at least ``(1 - T_c / T_h)`` of the heat as work.

    Examples
    --------
    308.15 K over a lift of 28 K:

    >>> round(carnot_cop(35.0, 7.0), 2)
    11.01
    """
    hot = np.asarray(flow_C, dtype=np.float64) + KELVIN_OFFSET_K
    lift = np.asarray(flow_C, dtype=np.float64) - np.asarray(outdoor_C, dtype=float)
    with np.errstate(divide="ignore"):
        cop = np.where(lift > 0.0, hot / np.where(lift > 0.0, lift, 1.0), np.inf)
    return float(cop) if cop.ndim == 0 else cop


def min_flow_share(
    mass_flow_kg_s: npt.ArrayLike, min_flow_kg_s: float
) -> float | FloatArray:
    """Share of its output a heat pump gives at a flow: the minimum-flow cut-off.

    Parameters
    ----------
    mass_flow_kg_s : float or array_like
        Water flow through the heat pump. [kg/s]
    min_flow_kg_s : float
        Its minimum flow; 0 for none. [kg/s]

    Returns
    -------
    float or ndarray
        1 at or above the minimum flow, 0 at or below
        ``(1 - MIN_FLOW_RAMP_FRACTION)`` of it
        (:data:`simheat.physics._heat_pump_kernels.MIN_FLOW_RAMP_FRACTION`,
        0.2), a smooth cubic between. [-]

    Notes
    -----
    Below its minimum flow a heat pump's flow switch stops the compressor. The
    model ramps the output down over the last fifth of the minimum flow rather
    than cutting it (our modelling choice: the integrator needs a continuous
    law); the ramp stands for a unit tripping and restarting, averaged in time.
    The compiled :func:`simheat.physics._heat_pump_kernels.min_flow_share` is
    the law.

    Examples
    --------
    >>> [round(x, 6) for x in min_flow_share([0.05, 0.095, 0.2], 0.1).tolist()]
    [0.0, 0.84375, 1.0]
    """
    from simheat.physics._heat_pump_kernels import min_flow_share as share

    flow = np.asarray(mass_flow_kg_s, dtype=np.float64)
    out = np.empty(flow.shape)
    for index in np.ndindex(flow.shape):
        out[index] = share(float(flow[index]), float(min_flow_kg_s))
    return float(out) if out.ndim == 0 else out


def outside_rating(
    outdoor_axis_C: npt.ArrayLike,
    flow_axis_C: npt.ArrayLike,
    outdoor_range_C: tuple[float, float],
    flow_range_C: tuple[float, float],
) -> str | None:
    """Describe where the conditions asked for leave a rating table, if they do.

    Parameters
    ----------
    outdoor_axis_C, flow_axis_C : array_like
        The table's axes. [°C]
    outdoor_range_C : (float, float)
        Lowest and highest outdoor temperature asked for. [°C]
    flow_range_C : (float, float)
        Lowest and highest flow temperature asked for. [°C]

    Returns
    -------
    str or None
        One line naming each temperature outside its axis, or None.

    Examples
    --------
    >>> outside_rating([-7, 7], [35, 55], (-10.0, 0.0), (45.0, 50.0))
    'outdoor temperature down to -10 °C, below the table (-7 to 7 °C)'
    """
    rows = np.asarray(outdoor_axis_C, dtype=float)
    columns = np.asarray(flow_axis_C, dtype=float)
    parts = []
    for what, axis, (low, high) in (
        ("outdoor temperature", rows, outdoor_range_C),
        ("flow temperature", columns, flow_range_C),
    ):
        span = f"{axis[0]:g} to {axis[-1]:g} °C"
        if low < axis[0]:
            parts.append(f"{what} down to {low:g} °C, below the table ({span})")
        if high > axis[-1]:
            parts.append(f"{what} up to {high:g} °C, above the table ({span})")
    return "; ".join(parts) if parts else None


def warn_outside_rating(
    outdoor_axis_C: npt.ArrayLike,
    flow_axis_C: npt.ArrayLike,
    outdoor_range_C: tuple[float, float],
    flow_range_C: tuple[float, float],
) -> bool:
    """Warn when the conditions asked for leave the rating table.

    Parameters
    ----------
    outdoor_axis_C, flow_axis_C : array_like
        The table's axes. [°C]
    outdoor_range_C : (float, float)
        Lowest and highest outdoor temperature of the run. [°C]
    flow_range_C : (float, float)
        Lowest and highest flow-temperature setpoint of the run. [°C]

    Returns
    -------
    bool
        Whether a :class:`~simheat.errors.RatingTableWarning` was issued.
    """
    where = outside_rating(outdoor_axis_C, flow_axis_C, outdoor_range_C, flow_range_C)
    if where is None:
        return False
    warnings.warn(
        f"heat pump asked for {where}: capacity and COP are held at the "
        "table's edge there",
        RatingTableWarning,
        stacklevel=2,
    )
    return True
