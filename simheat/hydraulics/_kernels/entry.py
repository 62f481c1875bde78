"""The flow solver's one call from Python into compiled code.

:meth:`~simheat.hydraulics.solver.FlowSolver.solve` loads and checks the
operating point and the warm start, then solves, in one call. Each call from
Python into a kernel costs a few microseconds of argument handling, as much as
a small network's whole solve; one entry taking the solver's
:class:`~simheat._handle.Handle` (of its arrays and settings together) keeps
that to one crossing.
"""

from __future__ import annotations

from simheat._jit import njit
from simheat.hydraulics._kernels.newton import solve_network
from simheat.hydraulics._kernels.operating import load_operating_point, load_start
from simheat.hydraulics._kernels.records import START_OK, STATUS_NOT_RUN, SolveResult


@njit(cache=True)
def load_and_solve(
    handle,
    start,
    flow_in,
    pressure_in,
    temp_values,
    opening_values,
    speed_values,
):
    """Load an operating point and a start into the solver's arrays, then solve.

    Parameters
    ----------
    handle : Handle of SolveInputs
        The solver's arrays (``single_values`` written by the caller) and the
        solve's tolerances and limits; the records' fields carry their
        units. [-]
    start : int
        ``START_COLD``, ``START_FLOWS`` or ``START_FLOWS_PRESSURES``. [-]
    flow_in, pressure_in : ndarray
        The warm start's flows [kg/s] and pressures [Pa] (empty when unused).
    temp_values, opening_values, speed_values : ndarray
        The operating point per link, or empty for the single value (see
        :func:`~simheat.hydraulics._kernels.operating.load_operating_point`).
        [°C, -, -]

    Returns
    -------
    row, index : int
        A bad operating-point value's row and link, or ``NO_RUNNING_PUMP``;
        -1 when the point is valid. [-]
    changed : bool
        Whether the operating point differs from the one loaded before. [-]
    start_code : int
        ``START_OK`` or the warm start's fault. [-]
    status, iterations, max_imbalance_kg_s, max_residual_Pa, worst_node,
    worst_link, evaluations
        The solve's :class:`SolveResult`, field by field (a flat tuple comes
        back to Python cheaper than a nested record); status
        ``STATUS_NOT_RUN`` when a check failed.
    """
    arrays, settings = handle.record
    row, index, changed = load_operating_point(
        arrays, temp_values, opening_values, speed_values
    )
    code = START_OK
    result = SolveResult(STATUS_NOT_RUN, 0, 0.0, 0.0, 0, 0, 0)
    if row < 0:
        code = load_start(arrays, start, flow_in, pressure_in)
        if code == START_OK:
            result = solve_network(arrays, settings, start)
    return (
        row,
        index,
        changed,
        code,
        result.status,
        result.iterations,
        result.max_imbalance_kg_s,
        result.max_residual_Pa,
        result.worst_node,
        result.worst_link,
        result.evaluations,
    )
