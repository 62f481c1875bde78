"""Named records of the warm-up right-hand side's compiled path.

The thermal model travels as records of flat arrays (:class:`CellChains`,
:class:`CellArrays`, :class:`RoomArrays`, :class:`SensorArrays`,
:class:`SourceParams`, gathered in :class:`ThermalArrays`), built once per run;
what holds at one time of one schedule segment is a :class:`Controls` record;
:class:`WarmUpArrays` bundles the model with the flow solver's record
(:class:`~simheat.hydraulics._kernels.FlowArrays`), the flow-solve settings and
the workspaces; :class:`JacobianArrays` carries the finite-difference
Jacobian's pattern and column groups. Named tuples of arrays compile with
numba's ``cache=True`` and read as names in the kernels.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from simheat.hydraulics._kernels import FlowArrays, SolveSettings

# Cell kinds, as simheat.dynamics.model numbers them (a test holds the two
# equal; the kernels do not import the model module, which would tie the
# compiled cache to the scenario data model).
CELL_PIPE = 0
CELL_EMITTER = 1
# Slots of the ``report`` array filled by the right-hand side.
REPORT_SOURCE_W = 0
REPORT_INLET_C = 1
REPORT_OUTLET_C = 2
REPORT_FLOW_STATUS = 3
REPORT_CAPACITY_W = 4
REPORT_ELECTRIC_W = 5
N_REPORT = 6
# Source kinds of SourceParams.kind.
SOURCE_BOILER = 0
SOURCE_HEAT_PUMP = 1
# Energy counters at the end of the state vector, in this order; the electricity
# counter exists with a heat pump only (a test holds these to
# simheat.dynamics.model.N_ENERGY and N_ENERGY_HEAT_PUMP).
ENERGY_SOURCE = 0
ENERGY_EMITTED = 1
ENERGY_PIPES = 2
ENERGY_UNHEATED = 3
ENERGY_ELECTRIC = 4


class CellChains(NamedTuple):
    """Where the water cells sit: a chain per link, in flow order.

    Attributes
    ----------
    link_start, link_count : ndarray of int64
        First cell and number of cells of each link. [-]
    from_node, to_node : ndarray of int64
        Link end nodes. [-]
    """

    link_start: np.ndarray
    link_count: np.ndarray
    from_node: np.ndarray
    to_node: np.ndarray


class CellArrays(NamedTuple):
    """What each water cell exchanges heat with.

    Attributes
    ----------
    kind : ndarray of int64
        ``CELL_PIPE``, ``CELL_EMITTER``, ``CELL_SOURCE`` or ``CELL_PLAIN``. [-]
    room : ndarray of int64
        Room around the cell, -1 for unheated space. [-]
    loss_W_K : ndarray
        Pipe loss conductance to the surroundings. [W/K]
    nominal_W : ndarray
        EN 442 nominal output of the cell's share of its radiator. [W]
    exponent : ndarray
        EN 442 exponent. [-]
    convective : ndarray
        Convective fraction of the output. [-]
    capacity_J_K : ndarray
        Heat capacity, water plus radiator metal. [J/K]
    """

    kind: np.ndarray
    room: np.ndarray
    loss_W_K: np.ndarray
    nominal_W: np.ndarray
    exponent: np.ndarray
    convective: np.ndarray
    capacity_J_K: np.ndarray


class RadiatorArrays(NamedTuple):
    """Every radiator as a chain of cells, in emitter order.

    Attributes
    ----------
    link : ndarray of int64
        The emitter's link. [-]
    first_cell : ndarray of int64
        Its first radiator cell in flow order ``from_node -> to_node``; the link's
        pipe half-cells sit just before and after its cells. [-]
    cells : ndarray of int64
        Number of radiator cells. [-]
    nominal_W : ndarray
        EN 442 nominal output of the whole radiator. [W]
    exponent : ndarray
        EN 442 exponent. [-]
    """

    link: np.ndarray
    first_cell: np.ndarray
    cells: np.ndarray
    nominal_W: np.ndarray
    exponent: np.ndarray


class RoomArrays(NamedTuple):
    """Every room's air and structure nodes, and the internal walls.

    Attributes
    ----------
    air_loss_W_K, structure_loss_W_K : ndarray
        Conductances to outdoors. [W/K]
    air_structure_W_K : ndarray
        Conductance between air and structure. [W/K]
    air_capacity_J_K, structure_capacity_J_K : ndarray
        Heat capacities. [J/K]
    gains_W : ndarray
        Internal gains into the air node. [W]
    wall_a, wall_b : ndarray of int64
        Rooms joined by each internal wall. [-]
    wall_W_K : ndarray
        Conductance of each internal wall. [W/K]
    """

    air_loss_W_K: np.ndarray
    structure_loss_W_K: np.ndarray
    air_structure_W_K: np.ndarray
    air_capacity_J_K: np.ndarray
    structure_capacity_J_K: np.ndarray
    gains_W: np.ndarray
    wall_a: np.ndarray
    wall_b: np.ndarray
    wall_W_K: np.ndarray


class SensorArrays(NamedTuple):
    """The thermostatic heads.

    Attributes
    ----------
    link : ndarray of int64
        Link of each head's emitter. [-]
    room : ndarray of int64
        Room each sensor sits in. [-]
    band_K : ndarray
        Proportional band. [K]
    time_constant_s : ndarray
        First-order sensor time constant. [s]
    """

    link: np.ndarray
    room: np.ndarray
    band_K: np.ndarray
    time_constant_s: np.ndarray


class SourceParams(NamedTuple):
    """The heat source.

    Attributes
    ----------
    link : int
        The source link. [-]
    cells : ndarray of int64
        Its water cells (those it heats). [-]
    capacity_J_K : float
        Their heat capacity. [J/K]
    max_power_W : float
        Power limit of a boiler; a heat pump's largest rated capacity (the
        scale of the limit's smooth corner). [W]
    control_time_s : float
        Time in which the source would bring its water to the setpoint. [s]
    smoothing : float
        Corner width of the smooth power limit, as a fraction of
        ``max_power_W``. [-]
    cp_J_kg_K : float
        Specific heat of the water in transport. [J/(kg K)]
    kind : int
        ``SOURCE_BOILER`` or ``SOURCE_HEAT_PUMP``. [-]
    outdoor_axis_C, flow_axis_C : ndarray
        A heat pump's rating axes (a placeholder pair for a boiler). [°C]
    capacity_W : ndarray, shape (n_outdoor, n_flow)
        Rated heating capacity (placeholder for a boiler). [W]
    cop : ndarray, shape (n_outdoor, n_flow)
        Rated COP (placeholder for a boiler). [-]
    min_flow_kg_s : float
        A heat pump's minimum flow; 0 for none. [kg/s]
    inlet_cell : int
        Cell whose water enters the heated cells (a buffer tank on the return),
        or -1: the water of the source link's inlet node. [-]
    """

    link: int
    cells: np.ndarray
    capacity_J_K: float
    max_power_W: float
    control_time_s: float
    smoothing: float
    cp_J_kg_K: float
    kind: int
    outdoor_axis_C: np.ndarray
    flow_axis_C: np.ndarray
    capacity_W: np.ndarray
    cop: np.ndarray
    min_flow_kg_s: float
    inlet_cell: int


class ThermalArrays(NamedTuple):
    """The whole thermal model: cells, rooms, heads, source, surroundings.

    Attributes
    ----------
    chains : CellChains
        Where the water cells sit, link by link. [-]
    cells : CellArrays
        What each water cell exchanges heat with; units on its fields. [-]
    radiators : RadiatorArrays
        Every radiator as a chain of cells; units on its fields. [-]
    rooms : RoomArrays
        Room air and structure nodes and internal walls; units on its
        fields. [-]
    sensors : SensorArrays
        The thermostatic heads; units on its fields. [-]
    source : SourceParams
        The heat source; units on its fields. [-]
    unheated_C : float
        Temperature of unheated space around pipes outside the rooms. [°C]
    solver_link : ndarray of int64
        Each link's index in the flow solver's arrays, -1 for a link that
        stands still (shut for good, or left on no closed loop by one; the
        flow solver solves the moving part, :mod:`simheat.hydraulics.still`).
        [-]
    """

    chains: CellChains
    cells: CellArrays
    radiators: RadiatorArrays
    rooms: RoomArrays
    sensors: SensorArrays
    source: SourceParams
    unheated_C: float
    solver_link: np.ndarray


class RhsWork(NamedTuple):
    """Workspaces and outputs of :func:`warmup_rhs` besides the derivative.

    Attributes
    ----------
    dH_W : ndarray
        Heat into each cell. [W]
    q_air_W, q_structure_W : ndarray
        Heat into each room's air and structure node. [W]
    d_air, d_structure : ndarray
        Their time derivatives. [K/s]
    num, den : ndarray
        Node mixing sums. [W/(J/kg) , kg/s]
    node_temp_C : ndarray
        Written: mixed temperature at every node. [°C]
    emitter_W : ndarray
        Written: heat output of every emitter, in emitter order. [W]
    report : ndarray, shape (N_REPORT,)
        Written: source power [W], return [°C], supply [°C], flow-solve status,
        the source's capacity [W] and electric power [W].
    link_flow_kg_s : ndarray
        Written: every link's mass flow (zero on still links). [kg/s]
    """

    dH_W: np.ndarray
    q_air_W: np.ndarray
    q_structure_W: np.ndarray
    d_air: np.ndarray
    d_structure: np.ndarray
    num: np.ndarray
    den: np.ndarray
    node_temp_C: np.ndarray
    emitter_W: np.ndarray
    report: np.ndarray
    link_flow_kg_s: np.ndarray


class WarmUpArrays(NamedTuple):
    """Everything the compiled right-hand side works on, built once per run.

    Attributes
    ----------
    model : ThermalArrays
        The thermal model; units on its fields. [-]
    flow : FlowArrays
        The flow solver's record (``FlowSolver.arrays``); solved in place.
        Units on its fields. [-]
    flow_settings : SolveSettings
        Tolerances of the flow solves; units on its fields. [-]
    work : RhsWork
        Workspaces and outputs of the right-hand side; units on its
        fields. [-]
    """

    model: ThermalArrays
    flow: FlowArrays
    flow_settings: SolveSettings
    work: RhsWork


class Controls(NamedTuple):
    """What holds at one time of one schedule segment.

    Attributes
    ----------
    flow_temp_C : float
        Flow-temperature setpoint of the source. [°C]
    outdoor_C : float
        Outdoor temperature. [°C]
    heating : bool
        The source is on. [-]
    circulating : bool
        Some pump runs (else the flows are zero without a solve). [-]
    warm_start : bool
        The flow solver's arrays hold a converged flow split to start from. [-]
    setpoint_C : ndarray
        Setpoint of each thermostatic head. [°C]
    link_opening : ndarray
        Manual valve opening per link, before the heads. [-]
    pump_speed : ndarray
        Speed per link: 1 running pump, 0 stopped pump or no pump. [-]
    """

    flow_temp_C: float
    outdoor_C: float
    heating: bool
    circulating: bool
    warm_start: bool
    setpoint_C: np.ndarray
    link_opening: np.ndarray
    pump_speed: np.ndarray


class JacobianArrays(NamedTuple):
    """A sparse finite-difference Jacobian's pattern, column groups and workspaces.

    Attributes
    ----------
    group_start, group_columns : ndarray of int64
        Group ``g`` holds ``group_columns[group_start[g]:group_start[g + 1]]``;
        the columns of one group share no row of the pattern. [-]
    indptr, indices : ndarray of int64
        The pattern in CSC form. [-]
    data : ndarray
        Written: the entries, in the pattern's order. [1/s]
    y_work, dy_work : ndarray
        Perturbed state and its derivative. [state units]
    """

    group_start: np.ndarray
    group_columns: np.ndarray
    indptr: np.ndarray
    indices: np.ndarray
    data: np.ndarray
    y_work: np.ndarray
    dy_work: np.ndarray


def rhs_work(
    n_cells: int, n_rooms: int, n_nodes: int, n_emitters: int, n_links: int
) -> RhsWork:
    """Fresh workspaces for the right-hand side.

    Parameters
    ----------
    n_cells, n_rooms, n_nodes, n_emitters, n_links : int
        Sizes of the model and network. [-]

    Returns
    -------
    RhsWork
        Zeroed arrays.
    """
    return RhsWork(
        dH_W=np.zeros(n_cells),
        q_air_W=np.zeros(n_rooms),
        q_structure_W=np.zeros(n_rooms),
        d_air=np.zeros(n_rooms),
        d_structure=np.zeros(n_rooms),
        num=np.zeros(n_nodes),
        den=np.zeros(n_nodes),
        node_temp_C=np.zeros(n_nodes),
        emitter_W=np.zeros(n_emitters),
        report=np.zeros(N_REPORT),
        link_flow_kg_s=np.zeros(n_links),
    )
