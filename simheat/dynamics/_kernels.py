"""Compiled kernels of the thermal right-hand side (numba, cached on disk).

Inputs are plain arrays; the orchestration in :mod:`simheat.dynamics.integrate`
unpacks the model and the controls. Temperatures in °C, flows in kg/s, heat in W.
"""

from __future__ import annotations

import math

import numpy as np
from numba import njit

from simheat.hydraulics._kernels import solve_network
from simheat.physics._kernels import thermostatic_opening

# Regularising flow used in node mixing so a node without inflow has a defined
# temperature (the mean of the cells touching it); negligible against real flows.
MIXING_EPS_KG_S = 1e-9
# EN 442 nominal log mean excess temperature of 75/65/20 °C. [K]
NOMINAL_EXCESS_K = 49.83289654


@njit(cache=True)
def node_temperatures(
    cell_temp_C, mass_flow_kg_s, from_node, to_node, link_start, link_count, n_nodes
):
    """Mixed temperature at every node from the streams flowing into it. [°C]."""
    num = np.zeros(n_nodes)
    den = np.zeros(n_nodes)
    for link in range(mass_flow_kg_s.shape[0]):
        first = link_start[link]
        last = first + link_count[link] - 1
        a = from_node[link]
        b = to_node[link]
        num[b] += MIXING_EPS_KG_S * cell_temp_C[last]
        den[b] += MIXING_EPS_KG_S
        num[a] += MIXING_EPS_KG_S * cell_temp_C[first]
        den[a] += MIXING_EPS_KG_S
        m = mass_flow_kg_s[link]
        if m > 0.0:
            num[b] += m * cell_temp_C[last]
            den[b] += m
        elif m < 0.0:
            num[a] -= m * cell_temp_C[first]
            den[a] -= m
    return num / den


@njit(cache=True)
def smooth_clip(x, high, width):
    """C1-smooth ``min(max(x, 0), high)`` with corners of width ``width``."""
    low_clipped = 0.5 * (x + math.sqrt(x * x + width * width))
    d = high - low_clipped
    return high - 0.5 * (d + math.sqrt(d * d + width * width))


@njit(cache=True)
def emitter_cell_output_W(nominal_W, exponent, excess_K):
    """EN 442 characteristic for one cell, odd in the excess temperature. [W]."""
    r = excess_K / NOMINAL_EXCESS_K
    if r >= 0.0:
        return nominal_W * r**exponent
    return -nominal_W * (-r) ** exponent


@njit(cache=True)
def advect_cells(
    cell_temp_C,
    node_temp_C,
    mass_flow_kg_s,
    from_node,
    to_node,
    link_start,
    link_count,
    cp_J_kg_K,
    dH_W,
):
    """Upwind transport of heat along every link's cells into ``dH_W``. [W]."""
    for link in range(mass_flow_kg_s.shape[0]):
        m = mass_flow_kg_s[link]
        first = link_start[link]
        n = link_count[link]
        if m >= 0.0:
            upstream = node_temp_C[from_node[link]]
            for k in range(first, first + n):
                dH_W[k] += m * cp_J_kg_K * (upstream - cell_temp_C[k])
                upstream = cell_temp_C[k]
        else:
            upstream = node_temp_C[to_node[link]]
            for k in range(first + n - 1, first - 1, -1):
                dH_W[k] -= m * cp_J_kg_K * (upstream - cell_temp_C[k])
                upstream = cell_temp_C[k]


@njit(cache=True)
def exchange_heat(
    cell_temp_C,
    air_C,
    cell_kind,
    cell_room,
    cell_loss_W_K,
    cell_nominal_W,
    cell_exponent,
    cell_convective,
    unheated_C,
    dH_cells_W,
    q_air_W,
    q_structure_W,
):
    """Heat from cells to rooms (emitters, pipes in rooms) and unheated space.

    Returns (emitted to rooms [W], lost by pipes [W]).
    """
    emitted = 0.0
    pipe_loss = 0.0
    for k in range(cell_temp_C.shape[0]):
        kind = cell_kind[k]
        room = cell_room[k]
        if kind == 1:  # emitter
            q = emitter_cell_output_W(
                cell_nominal_W[k], cell_exponent[k], cell_temp_C[k] - air_C[room]
            )
            dH_cells_W[k] -= q
            q_air_W[room] += cell_convective[k] * q
            q_structure_W[room] += (1.0 - cell_convective[k]) * q
            emitted += q
        elif kind == 0 and cell_loss_W_K[k] > 0.0:  # pipe
            around = air_C[room] if room >= 0 else unheated_C
            q = cell_loss_W_K[k] * (cell_temp_C[k] - around)
            dH_cells_W[k] -= q
            if room >= 0:
                q_air_W[room] += q
            pipe_loss += q
    return emitted, pipe_loss


@njit(cache=True)
def room_balance(
    air_C,
    structure_C,
    outdoor_C,
    air_loss_W_K,
    structure_loss_W_K,
    air_structure_W_K,
    air_capacity_J_K,
    structure_capacity_J_K,
    gains_W,
    wall_a,
    wall_b,
    wall_W_K,
    q_air_W,
    q_structure_W,
    d_air,
    d_structure,
):
    """Time derivatives of the air and structure nodes of every room. [K/s]."""
    for r in range(air_C.shape[0]):
        coupling = air_structure_W_K[r] * (structure_C[r] - air_C[r])
        q_a = (
            air_loss_W_K[r] * (outdoor_C - air_C[r])
            + coupling
            + gains_W[r]
            + q_air_W[r]
        )
        q_s = (
            structure_loss_W_K[r] * (outdoor_C - structure_C[r])
            - coupling
            + q_structure_W[r]
        )
        d_air[r] = q_a
        d_structure[r] = q_s
    for w in range(wall_a.shape[0]):
        q = wall_W_K[w] * (air_C[wall_b[w]] - air_C[wall_a[w]])
        d_air[wall_a[w]] += q
        d_air[wall_b[w]] -= q
    for r in range(air_C.shape[0]):
        d_air[r] /= air_capacity_J_K[r]
        d_structure[r] /= structure_capacity_J_K[r]


@njit(cache=True)
def node_temperatures_into(
    cell_temp_C,
    mass_flow_kg_s,
    from_node,
    to_node,
    link_start,
    link_count,
    num,
    den,
    node_temp_C,
):
    """:func:`node_temperatures` into preallocated arrays (no allocation). [°C]."""
    num[:] = 0.0
    den[:] = 0.0
    for link in range(mass_flow_kg_s.shape[0]):
        first = link_start[link]
        last = first + link_count[link] - 1
        a = from_node[link]
        b = to_node[link]
        num[b] += MIXING_EPS_KG_S * cell_temp_C[last]
        den[b] += MIXING_EPS_KG_S
        num[a] += MIXING_EPS_KG_S * cell_temp_C[first]
        den[a] += MIXING_EPS_KG_S
        m = mass_flow_kg_s[link]
        if m > 0.0:
            num[b] += m * cell_temp_C[last]
            den[b] += m
        elif m < 0.0:
            num[a] -= m * cell_temp_C[first]
            den[a] -= m
    for n in range(num.shape[0]):
        node_temp_C[n] = num[n] / den[n]


# Slots of the ``report`` array filled by :func:`warmup_rhs`.
REPORT_SOURCE_W = 0
REPORT_INLET_C = 1
REPORT_OUTLET_C = 2
REPORT_FLOW_STATUS = 3
N_REPORT = 4
# Bounds of the water temperature handed to the flow solve: trial states of the
# implicit integrator may stray a little outside the property fits' 0-100 °C.
FLOW_SOLVE_MIN_C = 0.0
FLOW_SOLVE_MAX_C = 100.0


@njit(cache=True)
def warmup_rhs(
    y,
    dy,
    flow_temp_C,
    outdoor_C,
    heating,
    circulating,
    start_code,
    sizes,
    cells_static,
    cell_arrays,
    room_arrays,
    walls,
    sensors,
    sensor_setpoint_C,
    link_opening,
    link_pump_speed,
    source,
    hydraulics,
    hydraulic_settings,
    work,
    node_temp_C,
    report,
):
    """The whole warm-up right-hand side in compiled code, without allocation.

    The arguments are tuples of the flat arrays of
    :class:`simheat.dynamics.model.ThermalModel` and of the flow solver; see
    :meth:`simheat.dynamics.integrate.WarmUpModel.rhs`, which builds them once.
    The flow split is re-solved by :func:`simheat.hydraulics._kernels.solve_network`
    from ``start_code`` (warm from the previous solution left in the solver's
    arrays, or cold) at the link temperatures, the valve openings
    (``link_opening`` times the thermostatic heads') and the pump speeds
    ``link_pump_speed`` (per link; 0 is a stopped pump, a resistance) written
    into the solver's operating rows (temperature, opening, speed). Writes the
    derivative into ``dy``, node temperatures into ``node_temp_C`` and
    (source power [W], return [°C], supply [°C], flow-solve status) into
    ``report``; a non-zero status means the flow solve failed and ``dy`` is not
    valid.
    """
    n_cells, n_rooms, n_sensors, n_nodes = sizes
    link_start, link_count, from_node, to_node, solver_link = cells_static
    (
        cell_kind,
        cell_room,
        cell_loss_W_K,
        cell_nominal_W,
        cell_exponent,
        cell_convective,
        cell_capacity_J_K,
    ) = cell_arrays
    (
        air_loss_W_K,
        structure_loss_W_K,
        air_structure_W_K,
        air_capacity_J_K,
        structure_capacity_J_K,
        gains_W,
    ) = room_arrays
    wall_a, wall_b, wall_W_K = walls
    sensor_link, sensor_room, sensor_band_K, sensor_time_constant_s = sensors
    (
        source_link,
        source_cells,
        source_capacity_J_K,
        max_power_W,
        control_time_s,
        smoothing,
        unheated_C,
        cp_J_kg_K,
    ) = source
    (
        h_from,
        h_to,
        node_position,
        data,
        operating,
        coef,
        band,
        flow,
        pressure,
        work_links,
        work_nodes,
    ) = hydraulics
    cold_flow, slope_floor, tol_kg_s, tol_Pa, max_iter = hydraulic_settings
    dH, q_air, q_structure, num, den, d_air, d_structure, link_flow = work

    cells = y[:n_cells]
    air = y[n_cells : n_cells + n_rooms]
    structure = y[n_cells + n_rooms : n_cells + 2 * n_rooms]
    sensor_temp = y[n_cells + 2 * n_rooms : n_cells + 2 * n_rooms + n_sensors]
    n_links = link_start.shape[0]

    status = 0
    if circulating:
        # The flow solve works on the links that can move (solver_link: each
        # link's index in the solver's arrays, -1 for one that stands still).
        for link in range(n_links):
            solved = solver_link[link]
            if solved < 0:
                continue
            first = link_start[link]
            total = 0.0
            for k in range(first, first + link_count[link]):
                total += cells[k]
            mean = total / link_count[link]
            operating[0, solved] = min(max(mean, FLOW_SOLVE_MIN_C), FLOW_SOLVE_MAX_C)
            operating[1, solved] = link_opening[link]
            operating[2, solved] = link_pump_speed[link]
        for i in range(n_sensors):
            solved = solver_link[sensor_link[i]]
            if solved >= 0:
                operating[1, solved] *= thermostatic_opening(
                    sensor_temp[i], sensor_setpoint_C[i], sensor_band_K[i]
                )
        result = solve_network(
            h_from,
            h_to,
            node_position,
            data,
            operating,
            coef,
            band,
            flow,
            pressure,
            work_links,
            work_nodes,
            start_code,
            cold_flow,
            slope_floor,
            tol_kg_s,
            tol_Pa,
            max_iter,
        )
        status = result[0]
        for link in range(n_links):
            solved = solver_link[link]
            link_flow[link] = flow[solved] if solved >= 0 else 0.0
    else:
        link_flow[:] = 0.0
    report[REPORT_FLOW_STATUS] = status
    if status != 0:
        return
    flow = link_flow  # every link's flow from here on

    node_temperatures_into(
        cells, flow, from_node, to_node, link_start, link_count, num, den, node_temp_C
    )
    dH[:] = 0.0
    advect_cells(
        cells,
        node_temp_C,
        flow,
        from_node,
        to_node,
        link_start,
        link_count,
        cp_J_kg_K,
        dH,
    )
    source_W = 0.0
    inlet_C = node_temp_C[from_node[source_link]]
    outlet_C = cells[source_cells[source_cells.shape[0] - 1]]
    if heating:
        demand = max(flow[source_link], 0.0) * cp_J_kg_K * (
            flow_temp_C - inlet_C
        ) + source_capacity_J_K / control_time_s * (flow_temp_C - outlet_C)
        source_W = smooth_clip(demand, max_power_W, smoothing * max_power_W)
        share = source_W / source_cells.shape[0]
        for k in source_cells:
            dH[k] += share
    q_air[:] = 0.0
    q_structure[:] = 0.0
    emitted, pipe_loss = exchange_heat(
        cells,
        air,
        cell_kind,
        cell_room,
        cell_loss_W_K,
        cell_nominal_W,
        cell_exponent,
        cell_convective,
        unheated_C,
        dH,
        q_air,
        q_structure,
    )
    for k in range(n_cells):
        dy[k] = dH[k] / cell_capacity_J_K[k]
    room_balance(
        air,
        structure,
        outdoor_C,
        air_loss_W_K,
        structure_loss_W_K,
        air_structure_W_K,
        air_capacity_J_K,
        structure_capacity_J_K,
        gains_W,
        wall_a,
        wall_b,
        wall_W_K,
        q_air,
        q_structure,
        d_air,
        d_structure,
    )
    for r in range(n_rooms):
        dy[n_cells + r] = d_air[r]
        dy[n_cells + n_rooms + r] = d_structure[r]
    base = n_cells + 2 * n_rooms
    for i in range(n_sensors):
        dy[base + i] = (air[sensor_room[i]] - sensor_temp[i]) / sensor_time_constant_s[
            i
        ]
    dy[base + n_sensors] = source_W
    dy[base + n_sensors + 1] = emitted
    dy[base + n_sensors + 2] = pipe_loss
    report[REPORT_SOURCE_W] = source_W
    report[REPORT_INLET_C] = inlet_C
    report[REPORT_OUTLET_C] = outlet_C


@njit(cache=True)
def warmup_jacobian(
    y,
    f0,
    step,
    group_start,
    group_columns,
    indptr,
    indices,
    jac_data,
    y_work,
    dy_work,
    flow_temp_C,
    outdoor_C,
    heating,
    circulating,
    start_code,
    sizes,
    cells_static,
    cell_arrays,
    room_arrays,
    walls,
    sensors,
    sensor_setpoint_C,
    link_opening,
    link_pump_speed,
    source,
    hydraulics,
    hydraulic_settings,
    work,
    node_temp_C,
    report,
):
    """Forward-difference Jacobian of :func:`warmup_rhs` by column groups.

    ``f0`` is the derivative at ``y``; ``step`` the difference step of every
    column. Columns of one group (``group_columns[group_start[g]:group_start[g +
    1]]``) share no row of the pattern (CSC ``indptr``/``indices``), so one
    right-hand side per group gives all their entries (Curtis, Powell and
    Reid's grouping). Fills ``jac_data`` in the pattern's order. Returns the
    flow-solve status: non-zero means a solve failed and ``jac_data`` is not
    valid. The remaining arguments are those of :func:`warmup_rhs`; the flow
    solve of every perturbed state warm-starts from the one before.
    """
    n_groups = group_start.shape[0] - 1
    y_work[:] = y
    for g in range(n_groups):
        for c in range(group_start[g], group_start[g + 1]):
            j = group_columns[c]
            y_work[j] = y[j] + step[j]
        warmup_rhs(
            y_work,
            dy_work,
            flow_temp_C,
            outdoor_C,
            heating,
            circulating,
            start_code,
            sizes,
            cells_static,
            cell_arrays,
            room_arrays,
            walls,
            sensors,
            sensor_setpoint_C,
            link_opening,
            link_pump_speed,
            source,
            hydraulics,
            hydraulic_settings,
            work,
            node_temp_C,
            report,
        )
        status = report[REPORT_FLOW_STATUS]
        if status != 0:
            return status
        for c in range(group_start[g], group_start[g + 1]):
            j = group_columns[c]
            y_work[j] = y[j]
            for p in range(indptr[j], indptr[j + 1]):
                i = indices[p]
                jac_data[p] = (dy_work[i] - f0[i]) / step[j]
    return 0.0
