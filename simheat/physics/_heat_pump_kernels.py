"""Compiled kernels of a heat pump: rating-table lookup and minimum-flow share.

Small ``@njit(cache=True)`` functions of float64 scalars (and a table's arrays),
called from the Python wrappers of :mod:`simheat.physics.heat_pump` and from the
dynamics' compiled source block (:mod:`simheat.dynamics._source_kernels`). Each
is the one home of its law. Kernels never raise or warn; tables are checked
where they are read.
"""

from __future__ import annotations

from simheat._jit import njit

# --- rating tables (heat pump capacity and COP) ------------------------------------


@njit(cache=True)
def _axis_position(axis, x):
    """Interval ``i`` and weight ``w`` of ``x`` on an increasing axis, clamped.

    Parameters
    ----------
    axis : ndarray
        Strictly increasing points, at least two (checked where the table is
        read). [unit of the axis]
    x : float
        Where on the axis. [unit of the axis]

    Returns
    -------
    (int, float)
        ``i`` and ``w`` [-]: the value between ``axis[i]`` and ``axis[i + 1]`` is
        ``(1 - w) v[i] + w v[i + 1]``; below the first point ``(0, 0)``, above the
        last ``(n - 2, 1)``.
    """
    n = axis.shape[0]
    if x <= axis[0]:
        return 0, 0.0
    if x >= axis[n - 1]:
        return n - 2, 1.0
    i = 0
    while axis[i + 1] < x:  # rating tables are short: a scan beats a bisection
        i += 1
    return i, (x - axis[i]) / (axis[i + 1] - axis[i])


@njit(cache=True)
def table_lookup(row_axis, column_axis, table, row_value, column_value):
    """Bilinear interpolation in a 2-D table, clamped to its edges.

    Parameters
    ----------
    row_axis, column_axis : ndarray
        Strictly increasing points of the rows and columns, at least two each
        (a heat pump's outdoor and flow temperatures). [°C]
    table : ndarray, shape (len(row_axis), len(column_axis))
        ``table[i, j]`` belongs to ``row_axis[i]`` and ``column_axis[j]``.
        [unit of the table: W or -]
    row_value, column_value : float
        The point. [°C]

    Returns
    -------
    float
        The bilinear interpolation between the four surrounding points. A point
        outside the table takes the value at the nearest edge (each coordinate
        clamped to its axis): no extrapolation. [unit of the table]
    """
    i, u = _axis_position(row_axis, row_value)
    j, v = _axis_position(column_axis, column_value)
    return (1.0 - u) * ((1.0 - v) * table[i, j] + v * table[i, j + 1]) + u * (
        (1.0 - v) * table[i + 1, j] + v * table[i + 1, j + 1]
    )


# --- minimum flow through a heat pump ----------------------------------------------
# Below its minimum flow a heat pump stops heating (its flow switch trips). Between
# (1 - MIN_FLOW_RAMP_FRACTION) and 1 times the minimum flow its output is ramped to
# zero by a C1 cubic, so the integrator never meets a jump: the ramp stands, time
# averaged, for a unit that trips and restarts on its flow switch. Our modelling
# choice. [-]
MIN_FLOW_RAMP_FRACTION = 0.2


@njit(cache=True)
def min_flow_share(mass_flow_kg_s, min_flow_kg_s):
    """Share of a heat pump's output that its flow allows: 0 below, 1 above.

    Parameters
    ----------
    mass_flow_kg_s : float
        Water flow through the heat pump. [kg/s]
    min_flow_kg_s : float
        Its minimum flow; 0 or less for none. [kg/s]

    Returns
    -------
    float
        1 at ``mass_flow_kg_s >= min_flow_kg_s`` (always without a minimum), 0 at
        or below ``(1 - MIN_FLOW_RAMP_FRACTION) min_flow_kg_s``, the C1 cubic
        ``3 s^2 - 2 s^3`` of the fraction ``s`` of the way up between. [-]
    """
    if min_flow_kg_s <= 0.0 or mass_flow_kg_s >= min_flow_kg_s:
        return 1.0
    low = (1.0 - MIN_FLOW_RAMP_FRACTION) * min_flow_kg_s
    if mass_flow_kg_s <= low:
        return 0.0
    s = (mass_flow_kg_s - low) / (min_flow_kg_s - low)
    return s * s * (3.0 - 2.0 * s)
