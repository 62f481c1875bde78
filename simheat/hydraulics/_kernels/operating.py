"""Loading a solve's operating point and warm start, with their value checks.

Python checks single numbers and array shapes; these kernels copy the per-link
values into the solver's arrays and check them in the same pass, so that
Python builds an error message only for a bad value.
"""

from __future__ import annotations

import math

from simheat._jit import njit
from simheat.hydraulics._kernels.records import (
    NO_RUNNING_PUMP,
    OP_LOWER,
    OP_OPENING,
    OP_SPEED,
    OP_TEMP,
    OP_UPPER,
    START_COLD,
    START_FLOW_NOT_FINITE,
    START_FLOWS_PRESSURES,
    START_OK,
    START_PRESSURE_NOT_FINITE,
)


@njit(cache=True)
def any_running_pump(speed, pump_links, pump_a0):
    """Whether some pump link has a shut-off head > 0 and a speed > 0.

    Parameters
    ----------
    speed : ndarray
        Speed ratio per link. [-]
    pump_links : ndarray of int64
        Links with a pump curve. [-]
    pump_a0 : ndarray
        Their shut-off heads. [Pa]

    Returns
    -------
    bool
    """
    for i in range(pump_links.shape[0]):
        if pump_a0[i] > 0.0 and speed[pump_links[i]] > 0.0:
            return True
    return False


@njit(cache=True)
def _fill_operating_row(row, seen, values, value, lo, hi):
    """Write ``values`` (one per link), or ``value`` when ``values`` is empty.

    Returns the first index outside [lo, hi] or not finite (-1 if none; a
    single ``value`` is checked by the caller), and whether any entry differs
    from ``seen``, which is updated to the new values.
    """
    # branch-free loops (they vectorise); v - v == 0 fails for inf and NaN
    changed = False
    if values.shape[0] == 0:
        for k in range(row.shape[0]):
            changed |= seen[k] != value
            seen[k] = value
            row[k] = value
        return -1, changed
    valid = True
    for k in range(row.shape[0]):
        v = values[k]
        valid &= (v >= lo) & (v <= hi) & (v - v == 0.0)
        changed |= seen[k] != v
        seen[k] = v
        row[k] = v
    if valid:
        return -1, changed
    for k in range(row.shape[0]):
        v = values[k]
        if not (lo <= v <= hi and math.isfinite(v)):
            return k, changed
    return -1, changed  # not reached: some value failed above


@njit(cache=True)
def _load_row(arrays, row, values):
    """Load one operating row (see :func:`_fill_operating_row`)."""
    return _fill_operating_row(
        arrays.operating[row],
        arrays.loaded[row],
        values,
        arrays.single_values[row],
        OP_LOWER[row],
        OP_UPPER[row],
    )


@njit(cache=True)
def load_operating_point(arrays, temp_values, opening_values, speed_values):
    """Fill and check the operating point of a solve in one pass.

    Parameters
    ----------
    arrays : FlowArrays
        The solver's arrays: ``operating`` is written, ``loaded`` compared
        with the new point and updated, ``single_values`` read. Units on the
        record's fields. [-]
    temp_values, opening_values, speed_values : ndarray
        Water temperature [°C], valve opening [-] and pump speed [-], one
        value per link, or empty to use the row's ``single_values`` entry
        (checked by the caller).

    Returns
    -------
    row : int
        -1 when all is well; the first row (``OP_*``) with a value outside
        ``OP_LOWER``-``OP_UPPER`` or not finite; ``NO_RUNNING_PUMP`` when no
        pump has a shut-off head > 0 and a speed > 0. [-]
    index : int
        The link of that value (-1 when none). [-]
    changed : bool
        Whether any value differs from ``loaded``. [-]
    """
    bad, changed = _load_row(arrays, OP_TEMP, temp_values)
    if bad >= 0:
        return OP_TEMP, bad, True
    bad, changed_now = _load_row(arrays, OP_OPENING, opening_values)
    changed |= changed_now
    if bad >= 0:
        return OP_OPENING, bad, True
    bad, changed_now = _load_row(arrays, OP_SPEED, speed_values)
    changed |= changed_now
    if bad >= 0:
        return OP_SPEED, bad, True
    operating = arrays.operating
    if not any_running_pump(operating[OP_SPEED], arrays.pump_links, arrays.pump_a0):
        return NO_RUNNING_PUMP, -1, changed
    return -1, -1, changed


@njit(cache=True)
def load_start(arrays, start, flow_in, pressure_in):
    """Check a warm start and copy it into the solver's arrays.

    Parameters
    ----------
    arrays : FlowArrays
        The solver's arrays; ``flow_kg_s`` and ``pressure_Pa`` (less the
        reference node's pressure) are written. [-]
    start : int
        ``START_COLD`` (nothing to copy), ``START_FLOWS`` or
        ``START_FLOWS_PRESSURES``. [-]
    flow_in : ndarray
        Start flows, one per link. [kg/s]
    pressure_in : ndarray
        Start pressures, one per node (``START_FLOWS_PRESSURES`` only). [Pa]

    Returns
    -------
    int
        ``START_OK``, ``START_FLOW_NOT_FINITE`` or ``START_PRESSURE_NOT_FINITE``;
        nothing is written unless all is well. [-]
    """
    if start == START_COLD:
        return START_OK
    # branch-free checks (they vectorise): v - v == 0 fails for inf and NaN
    finite = True
    for k in range(flow_in.shape[0]):
        finite &= flow_in[k] - flow_in[k] == 0.0
    if not finite:
        return START_FLOW_NOT_FINITE
    if start == START_FLOWS_PRESSURES:
        for n in range(pressure_in.shape[0]):
            finite &= pressure_in[n] - pressure_in[n] == 0.0
        if not finite:
            return START_PRESSURE_NOT_FINITE
        reference = pressure_in[arrays.reference_node]
        pressure = arrays.pressure_Pa
        for n in range(pressure_in.shape[0]):
            pressure[n] = pressure_in[n] - reference
    flow = arrays.flow_kg_s
    for k in range(flow_in.shape[0]):  # shapes checked by the caller
        flow[k] = flow_in[k]
    return START_OK
