"""Compiled kernels of the warm-up right-hand side (numba, cached on disk).

The kernels take the named records of :mod:`simheat.dynamics._records`: the
thermal model (:class:`~simheat.dynamics._records.ThermalArrays`), what holds at
one time of one schedule segment (:class:`~simheat.dynamics._records.Controls`),
and :class:`~simheat.dynamics._records.WarmUpArrays`, which bundles the model
with the flow solver's record and the workspaces. Temperatures in °C, flows in
kg/s, heat in W.

The state vector is ``[water cells | room air | room structure | head sensors |
energy counters]`` (see :mod:`simheat.dynamics.model`; the counters' order is
``ENERGY_*`` of :mod:`simheat.dynamics._records`). The cells' heat exchange
with rooms and surroundings is in :mod:`simheat.dynamics._exchange_kernels`, the
source's capacity, COP and electricity in :mod:`simheat.dynamics._source_kernels`.
"""

from __future__ import annotations

import math

from simheat._jit import njit
from simheat.dynamics._exchange_kernels import pipe_exchange, radiator_exchange
from simheat.dynamics._records import (
    ENERGY_ELECTRIC,
    ENERGY_EMITTED,
    ENERGY_PIPES,
    ENERGY_SOURCE,
    ENERGY_UNHEATED,
    REPORT_CAPACITY_W,
    REPORT_ELECTRIC_W,
    REPORT_FLOW_STATUS,
    REPORT_INLET_C,
    REPORT_OUTLET_C,
    REPORT_SOURCE_W,
    SOURCE_HEAT_PUMP,
)
from simheat.dynamics._source_kernels import (
    source_capacity_W,
    source_electric_W,
    source_flow_share,
)
from simheat.hydraulics._kernels import (
    OP_OPENING,
    OP_SPEED,
    OP_TEMP,
    START_COLD,
    START_FLOWS_PRESSURES,
    STATUS_CONVERGED,
    solve_network,
)
from simheat.physics._kernels import thermostatic_opening

# Regularising flow used in node mixing so a node without inflow has a defined
# temperature (the mean of the cells touching it); negligible against real flows.
MIXING_EPS_KG_S = 1e-9
# Bounds of the water temperature handed to the flow solve: trial states of the
# implicit integrator may stray a little outside the property fits' 0-100 °C.
FLOW_SOLVE_MIN_C = 0.0
FLOW_SOLVE_MAX_C = 100.0


@njit(cache=True)
def smooth_clip(x, high, width):
    """C1-smooth ``min(max(x, 0), high)`` with corners of width ``width``.

    Each corner is a hyperbola, ``(x + sqrt(x^2 + width^2)) / 2`` for the lower
    one and its mirror for the upper; away from a corner the result differs
    from the sharp clip by about ``width^2 / (4 d)`` at a distance ``d``.

    Parameters
    ----------
    x : float
        Value to clip (the source calls it with a power). [any]
    high : float
        Upper limit, > 0, in the unit of ``x``. [any]
    width : float
        Width of each rounded corner, > 0, in the unit of ``x``. [any]
    """
    low_clipped = 0.5 * (x + math.sqrt(x * x + width * width))
    d = high - low_clipped
    return high - 0.5 * (d + math.sqrt(d * d + width * width))


@njit(cache=True)
def node_temperatures(chains, cell_temp_C, mass_flow_kg_s, num, den, node_temp_C):
    """Mixed temperature at every node from the streams flowing into it.

    Each node takes the mass-weighted mean of the link-end cells flowing into
    it, plus ``MIXING_EPS_KG_S`` from every link end touching it so that a node
    without inflow has a defined temperature.

    Parameters
    ----------
    chains : CellChains
        Each link's cells and end nodes. [-]
    cell_temp_C : ndarray, shape (n_cells,)
        Water temperature of every cell. [°C]
    mass_flow_kg_s : ndarray, shape (n_links,)
        Signed mass flow of every link, positive from ``from_node`` to
        ``to_node``. [kg/s]
    num : ndarray, shape (n_nodes,)
        Workspace: mass-weighted temperature sum at each node. [kg °C/s]
    den : ndarray, shape (n_nodes,)
        Workspace: mass flow into each node. [kg/s]
    node_temp_C : ndarray, shape (n_nodes,)
        Written: mixed temperature at every node. [°C]
    """
    num[:] = 0.0
    den[:] = 0.0
    for link in range(mass_flow_kg_s.shape[0]):
        first = chains.link_start[link]
        last = first + chains.link_count[link] - 1
        a = chains.from_node[link]
        b = chains.to_node[link]
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


@njit(cache=True)
def advect_cells(chains, cell_temp_C, node_temp_C, mass_flow_kg_s, cp_J_kg_K, dH_W):
    """Upwind transport of heat along every link's cells, added to ``dH_W``.

    Each cell receives ``m cp (T_upstream - T_cell)`` from the cell (or node)
    upstream of it in the direction the water flows: the first-order upwind
    finite-volume scheme (Patankar, Numerical Heat Transfer and Fluid Flow,
    1980, chapter 5).

    Parameters
    ----------
    chains : CellChains
        Each link's cells (in order from ``from_node``) and end nodes. [-]
    cell_temp_C : ndarray, shape (n_cells,)
        Water temperature of every cell. [°C]
    node_temp_C : ndarray, shape (n_nodes,)
        Mixed temperature at every node (:func:`node_temperatures`). [°C]
    mass_flow_kg_s : ndarray, shape (n_links,)
        Signed mass flow of every link. [kg/s]
    cp_J_kg_K : float
        Specific heat of the water in transport. [J/(kg K)]
    dH_W : ndarray, shape (n_cells,)
        Heat into each cell; the transport is added to it. [W]
    """
    for link in range(mass_flow_kg_s.shape[0]):
        m = mass_flow_kg_s[link]
        first = chains.link_start[link]
        n = chains.link_count[link]
        if m >= 0.0:
            upstream = node_temp_C[chains.from_node[link]]
            for k in range(first, first + n):
                dH_W[k] += m * cp_J_kg_K * (upstream - cell_temp_C[k])
                upstream = cell_temp_C[k]
        else:
            upstream = node_temp_C[chains.to_node[link]]
            for k in range(first + n - 1, first - 1, -1):
                dH_W[k] -= m * cp_J_kg_K * (upstream - cell_temp_C[k])
                upstream = cell_temp_C[k]


@njit(cache=True)
def room_balance(
    rooms, air_C, structure_C, outdoor_C, q_air_W, q_structure_W, d_air, d_structure
):
    """Time derivatives of the air and structure nodes of every room.

    Two-node RC rooms: conductances to outdoors from both nodes, between them,
    and between the air nodes of rooms joined by an internal wall; internal
    gains into the air; ``q_air_W`` and ``q_structure_W`` from the emitters
    and pipes.

    Parameters
    ----------
    rooms : RoomArrays
        Conductances, capacities, gains and internal walls; units on its
        fields. [-]
    air_C : ndarray, shape (n_rooms,)
        Air node temperature of every room. [°C]
    structure_C : ndarray, shape (n_rooms,)
        Structure node temperature of every room. [°C]
    outdoor_C : float
        Outdoor temperature. [°C]
    q_air_W : ndarray, shape (n_rooms,)
        Heat from emitters and pipes into each air node. [W]
    q_structure_W : ndarray, shape (n_rooms,)
        Heat from emitters into each structure node. [W]
    d_air : ndarray, shape (n_rooms,)
        Written: time derivative of each air temperature. [K/s]
    d_structure : ndarray, shape (n_rooms,)
        Written: time derivative of each structure temperature. [K/s]

    Notes
    -----
    A lumped two-node model after the resistance-capacitance network of the
    simple hourly method of ISO 13790:2008 (its capacities and air-structure
    coupling, :mod:`simheat.physics.room`), integrated in time.
    """
    for r in range(air_C.shape[0]):
        coupling = rooms.air_structure_W_K[r] * (structure_C[r] - air_C[r])
        d_air[r] = (
            rooms.air_loss_W_K[r] * (outdoor_C - air_C[r])
            + coupling
            + rooms.gains_W[r]
            + q_air_W[r]
        )
        d_structure[r] = (
            rooms.structure_loss_W_K[r] * (outdoor_C - structure_C[r])
            - coupling
            + q_structure_W[r]
        )
    for w in range(rooms.wall_a.shape[0]):
        a, b = rooms.wall_a[w], rooms.wall_b[w]
        q = rooms.wall_W_K[w] * (air_C[b] - air_C[a])
        d_air[a] += q
        d_air[b] -= q
    for r in range(air_C.shape[0]):
        d_air[r] /= rooms.air_capacity_J_K[r]
        d_structure[r] /= rooms.structure_capacity_J_K[r]


# ------------------------------------------------- the right-hand side


@njit(cache=True)
def _solve_flows(arrays, controls, cell_temp_C, sensor_temp_C):
    """Re-solve the flow split at the state's temperatures and head openings.

    Writes the flow solver's operating rows: each link's mean cell temperature
    (held within the property fits' range), the manual opening times the
    thermostatic head's, and the pump speeds; then solves, warm from the last
    solution when ``controls.warm_start``, and copies every link's flow into
    ``work.link_flow_kg_s`` (the solver's arrays hold the moving links only,
    ``model.solver_link``; a still link gets zero). Returns the solve's
    status.
    """
    model, flow = arrays.model, arrays.flow
    chains, sensors = model.chains, model.sensors
    solver_link = model.solver_link
    operating = flow.operating
    for link in range(chains.link_start.shape[0]):
        solved = solver_link[link]  # -1: a link that stands still
        if solved < 0:
            continue
        first = chains.link_start[link]
        total = 0.0
        for k in range(first, first + chains.link_count[link]):
            total += cell_temp_C[k]
        mean = total / chains.link_count[link]
        operating[OP_TEMP, solved] = min(max(mean, FLOW_SOLVE_MIN_C), FLOW_SOLVE_MAX_C)
        operating[OP_OPENING, solved] = controls.link_opening[link]
        operating[OP_SPEED, solved] = controls.pump_speed[link]
    for i in range(sensors.link.shape[0]):
        solved = solver_link[sensors.link[i]]
        if solved >= 0:
            operating[OP_OPENING, solved] *= thermostatic_opening(
                sensor_temp_C[i], controls.setpoint_C[i], sensors.band_K[i]
            )
    start = START_FLOWS_PRESSURES if controls.warm_start else START_COLD
    status = solve_network(flow, arrays.flow_settings, start).status
    link_flow = arrays.work.link_flow_kg_s
    for link in range(link_flow.shape[0]):
        solved = solver_link[link]
        link_flow[link] = flow.flow_kg_s[solved] if solved >= 0 else 0.0
    return status


@njit(cache=True)
def _source_power_W(source, controls, flow_kg_s, inlet_C, outlet_C, capacity_W):
    """Heat the source puts in: flow-temperature control under a smooth limit.

    The demand heats the circulating flow from the inlet to the setpoint and
    brings the source's own water there in ``control_time_s``; the power is
    that demand clipped smoothly to [0, capacity_W]. A heat pump's power is
    further scaled by the share its flow allows (zero below its minimum flow,
    :func:`simheat.dynamics._source_kernels.source_flow_share`). [W]
    """
    if not controls.heating:
        return 0.0
    target = controls.flow_temp_C
    demand = max(flow_kg_s, 0.0) * source.cp_J_kg_K * (
        target - inlet_C
    ) + source.capacity_J_K / source.control_time_s * (target - outlet_C)
    power = smooth_clip(demand, capacity_W, source.smoothing * source.max_power_W)
    return power * source_flow_share(source, flow_kg_s)


@njit(cache=True)
def warmup_rhs(y, dy, arrays, controls):
    """The whole warm-up right-hand side in compiled code, without allocation.

    Parameters
    ----------
    y : ndarray
        State: cell, air, structure and sensor temperatures [°C], energies [J].
    dy : ndarray
        Written: its time derivative. [K/s, W]
    arrays : WarmUpArrays
        The model, the flow solver's record, settings and workspaces; units
        on the records' fields. [-]
    controls : Controls
        What holds at this time of this segment; units on its fields. [-]

    Notes
    -----
    When circulating, the flow split is re-solved (:func:`_solve_flows`, the
    flow solver's :func:`~simheat.hydraulics._kernels.solve_network`) at the
    link temperatures, the valve openings and the pump speeds; otherwise the
    flows are zero. Then: node mixing, upwind transport, the source, heat
    exchange to rooms (radiators by their cell law at the link flows) and
    unheated space, room balances, sensor lags and the energy counters (source
    heat, heat emitted, pipe losses, of them the heat lost to unheated space,
    and a heat pump's electricity: its heat over the COP at the moment's
    outdoor and flow temperatures). ``arrays.work.report`` receives the source
    power [W], return [°C], supply [°C], the flow-solve status, the source's
    capacity [W] and its electric power [W]; a non-zero status means the solve
    failed and ``dy`` is not valid.
    """
    model, work = arrays.model, arrays.work
    n_cells = model.cells.kind.shape[0]
    n_rooms = model.rooms.gains_W.shape[0]
    n_sensors = model.sensors.link.shape[0]
    cells = y[:n_cells]
    air = y[n_cells : n_cells + n_rooms]
    structure = y[n_cells + n_rooms : n_cells + 2 * n_rooms]
    sensor_temp = y[n_cells + 2 * n_rooms : n_cells + 2 * n_rooms + n_sensors]
    flow = work.link_flow_kg_s  # every link's, still ones at zero

    status = STATUS_CONVERGED
    if controls.circulating:
        status = _solve_flows(arrays, controls, cells, sensor_temp)
    else:
        flow[:] = 0.0
    work.report[REPORT_FLOW_STATUS] = status
    if status != STATUS_CONVERGED:
        return

    source = model.source
    node_temp = work.node_temp_C
    node_temperatures(model.chains, cells, flow, work.num, work.den, node_temp)
    dH = work.dH_W
    dH[:] = 0.0
    advect_cells(model.chains, cells, node_temp, flow, source.cp_J_kg_K, dH)
    inlet_C = node_temp[model.chains.from_node[source.link]]
    outlet_C = cells[source.cells[source.cells.shape[0] - 1]]
    heated_inlet_C = inlet_C if source.inlet_cell < 0 else cells[source.inlet_cell]
    capacity_W = source_capacity_W(source, controls.outdoor_C, outlet_C)
    source_W = _source_power_W(
        source, controls, flow[source.link], heated_inlet_C, outlet_C, capacity_W
    )
    electric_W = source_electric_W(source, source_W, controls.outdoor_C, outlet_C)
    share = source_W / source.cells.shape[0]
    for k in source.cells:
        dH[k] += share
    work.q_air_W[:] = 0.0
    work.q_structure_W[:] = 0.0
    emitted = radiator_exchange(
        model.cells,
        model.radiators,
        cells,
        air,
        flow,
        source.cp_J_kg_K,
        dH,
        work.q_air_W,
        work.q_structure_W,
        work.emitter_W,
    )
    pipe_loss, unheated_loss = pipe_exchange(
        model.cells, cells, air, model.unheated_C, dH, work.q_air_W
    )
    for k in range(n_cells):
        dy[k] = dH[k] / model.cells.capacity_J_K[k]
    room_balance(
        model.rooms,
        air,
        structure,
        controls.outdoor_C,
        work.q_air_W,
        work.q_structure_W,
        work.d_air,
        work.d_structure,
    )
    for r in range(n_rooms):
        dy[n_cells + r] = work.d_air[r]
        dy[n_cells + n_rooms + r] = work.d_structure[r]
    base = n_cells + 2 * n_rooms
    sensors = model.sensors
    for i in range(n_sensors):
        lag = (air[sensors.room[i]] - sensor_temp[i]) / sensors.time_constant_s[i]
        dy[base + i] = lag
    energy = base + n_sensors
    dy[energy + ENERGY_SOURCE] = source_W
    dy[energy + ENERGY_EMITTED] = emitted
    dy[energy + ENERGY_PIPES] = pipe_loss
    dy[energy + ENERGY_UNHEATED] = unheated_loss
    if source.kind == SOURCE_HEAT_PUMP:  # only a heat pump's state counts it
        dy[energy + ENERGY_ELECTRIC] = electric_W
    work.report[REPORT_SOURCE_W] = source_W
    work.report[REPORT_INLET_C] = inlet_C
    work.report[REPORT_OUTLET_C] = outlet_C
    work.report[REPORT_CAPACITY_W] = capacity_W
    work.report[REPORT_ELECTRIC_W] = electric_W


@njit(cache=True)
def warmup_jacobian(y, f0, step, jac, arrays, controls):
    """Forward-difference Jacobian of :func:`warmup_rhs` by column groups.

    Parameters
    ----------
    y : ndarray
        The state. [state units]
    f0 : ndarray
        :func:`warmup_rhs` at ``y``. [state units / s]
    step : ndarray
        Difference step of every column. [state units]
    jac : JacobianArrays
        Pattern, groups and workspaces; ``jac.data`` is written in the
        pattern's order. [1/s]
    arrays : WarmUpArrays
        As for :func:`warmup_rhs`. [-]
    controls : Controls
        As for :func:`warmup_rhs`; the flow solve of every perturbed state
        starts from the one before (warm when ``controls.warm_start``). [-]

    Returns
    -------
    float
        The flow-solve status: non-zero means a solve failed and ``jac.data``
        is not valid. [-]

    Notes
    -----
    Columns of one group share no row of the pattern, so one right-hand side
    per group gives all their entries (Curtis, Powell and Reid's grouping).
    """
    start, columns = jac.group_start, jac.group_columns
    y_work, dy_work = jac.y_work, jac.dy_work
    report = arrays.work.report
    for j in range(y.shape[0]):  # a loop: a slice copy compiles a shape check
        y_work[j] = y[j]
    for g in range(start.shape[0] - 1):
        for c in range(start[g], start[g + 1]):
            j = columns[c]
            y_work[j] = y[j] + step[j]
        warmup_rhs(y_work, dy_work, arrays, controls)
        status = report[REPORT_FLOW_STATUS]
        if status != STATUS_CONVERGED:
            return status
        for c in range(start[g], start[g + 1]):
            j = columns[c]
            y_work[j] = y[j]
            for p in range(jac.indptr[j], jac.indptr[j + 1]):
                i = jac.indices[p]
                jac.data[p] = (dy_work[i] - f0[i]) / step[j]
    return 0.0


# ------------------------------------------------------ calls from Python


@njit(cache=True)
def warmup_rhs_entry(y, dy, handle, controls):
    """:func:`warmup_rhs` on the record a :class:`~simheat._handle.Handle` holds.

    The integrator's call into compiled code: a handle costs one argument of
    typing where the nested records would cost tens of microseconds per call.

    Parameters
    ----------
    y : ndarray
        State: cell, air, structure and sensor temperatures [°C], energies [J].
    dy : ndarray
        Written: its time derivative. [K/s, W]
    handle : Handle of WarmUpArrays
        The run's records (model, flow solver, settings, workspaces). [-]
    controls : Controls
        What holds at this time of this segment; units on its fields. [-]
    """
    warmup_rhs(y, dy, handle.record, controls)


@njit(cache=True)
def warmup_jacobian_entry(y, f0, step, jac_handle, handle, controls):
    """:func:`warmup_jacobian` on the records two handles hold.

    Parameters
    ----------
    y : ndarray
        The state. [state units]
    f0 : ndarray
        :func:`warmup_rhs` at ``y``. [state units / s]
    step : ndarray
        Difference step of every column. [state units]
    jac_handle : Handle of JacobianArrays
        Pattern, groups and workspaces; its ``data`` is written. [-]
    handle : Handle of WarmUpArrays
        The run's records, as for :func:`warmup_rhs_entry`. [-]
    controls : Controls
        What holds at this time of this segment; units on its fields. [-]

    Returns
    -------
    float
        The flow-solve status, as :func:`warmup_jacobian` returns it. [-]
    """
    return warmup_jacobian(y, f0, step, jac_handle.record, handle.record, controls)
