"""Named records and row layouts of the compiled flow solve.

Every compiled kernel of the solve works on :class:`FlowArrays`, one record of
the arrays :class:`~simheat.hydraulics.solver.FlowSolver` builds once per
network: the network's fixed link data, the operating point, the per-solve link
constants, the solution and the workspaces. Solver settings travel as
:class:`SolveSettings` (the two together, from Python, as :class:`SolveInputs`),
an outcome as :class:`SolveResult`. Inside the Newton
driver the current and trial iterates are :class:`Iterate` records of workspace
rows (swapping two records swaps the rows, nothing is copied), and the step's
arrays a :class:`StepArrays` record.

Named tuples of arrays are numba's records here: they compile with
``cache=True``, are cheap to pass from Python, and their fields read as names.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from simheat._jit import njit
from simheat.physics._kernels import WATER_TEMP_MAX_C, WATER_TEMP_MIN_C

# Result codes of solve_network.
STATUS_CONVERGED = 0
STATUS_MAX_ITER = 1
STATUS_NOT_POSITIVE_DEFINITE = 2
STATUS_NOT_FINITE = 3
STATUS_NOT_RUN = 4  # a check before the solve failed (load_and_solve)

# How solve_network starts.
START_COLD = 0  # from rest, linear-theory passes
START_FLOWS = 1  # from the given flows (pressures are recomputed by Newton)
START_FLOWS_PRESSURES = 2  # from given flows and pressures (a previous solution)

# Rows of the static per-link data, shape (N_DATA_ROWS, n_links).
D_LENGTH, D_DIAMETER, D_ROUGHNESS, D_ZETA, D_KV = 0, 1, 2, 3, 4
D_A0, D_A1, D_A2 = 5, 6, 7
D_CHECK, D_MODE, D_SETPOINT, D_CONTROL_FLOW = 8, 9, 10, 11
D_F_ONSET, D_DF_ONSET = 12, 13  # Colebrook-White f and df/dRe at Re 4000
N_DATA_ROWS = 14
# Rows of the operating point, shape (N_OP_ROWS, n_links).
OP_TEMP, OP_OPENING, OP_SPEED = 0, 1, 2
N_OP_ROWS = 3
# Valid range of each operating row (load_operating_point). [°C], [-], [-]
OP_LOWER = (WATER_TEMP_MIN_C, 0.0, 0.0)
OP_UPPER = (WATER_TEMP_MAX_C, 1.0, np.inf)
# load_operating_point's row code when every value is valid but no pump runs.
NO_RUNNING_PUMP = N_OP_ROWS
# load_start's result codes.
START_OK, START_FLOW_NOT_FINITE, START_PRESSURE_NOT_FINITE = 0, 1, 2
# Rows of the per-solve link coefficients, shape (N_COEF_ROWS, n_links).
C_RE = 0  # Reynolds number per kg/s of flow, 0 without pipe length [s/kg]
C_LAM = 1  # laminar friction: dp = C_LAM m [Pa s/kg]
C_TURB = 2  # turbulent friction: dp = C_TURB f m|m| [Pa s2/kg2]
C_RR = 3  # relative roughness [-]
C_F_ONSET, C_DF_ONSET = 4, 5  # Colebrook-White at Re 4000 [-]
C_ZETA = 6  # local losses: dp = C_ZETA m sqrt(m^2 + C_ZETA_M0^2) [Pa s2/kg2]
C_ZETA_M0 = 7  # zeta regularisation as a mass flow [kg/s]
C_VALVE = 8  # valve: dp = C_VALVE m sqrt(m^2 + m0^2) [Pa s2/kg2]
C_CHECK = 9  # 1 where a check valve sits [-]
C_P0, C_P1, C_P2 = 10, 11, 12  # pump curve in mass flow at the speed [Pa, ...]
C_MODE = 13  # pump mode, -1 without a pump [-]
C_SET = 14  # set head of a regulated pump [Pa]
C_GAIN = 15  # proportional-pressure line slope [Pa s/kg]
N_COEF_ROWS = 16

# Rows of the per-link workspace, shape (N_LINK_ROWS, n_links): the current
# iterate's loss, slope and residual (W_LOSS, W_SLOPE, W_RESID), the trial
# iterate's flow, loss, slope and residual (W_FLOW_T ...), the step's flow
# increments and weights, and each turbulent pipe's last Colebrook-White
# solution x = 1/sqrt(f), the Reynolds number it was solved at and dx/dRe there
# (W_CB_X, W_CB_RE, W_CB_DX: the next solve's first-order start).
W_LOSS, W_SLOPE, W_RESID, W_DM = 0, 1, 2, 3
W_FLOW_T, W_LOSS_T, W_SLOPE_T, W_RESID_T, W_WEIGHT = 4, 5, 6, 7, 8
W_CB_X, W_CB_RE, W_CB_DX = 9, 10, 11
N_LINK_ROWS = 12
# Rows of the per-node workspace, shape (N_NODE_ROWS, n_nodes): the current and
# trial imbalances, the pressure increment and trial pressures, the reduced
# right-hand side and the Laplacian's row scales.
N_IMB, N_DP, N_PRESSURE_T, N_IMB_T, N_REDUCED, N_SCALE = 0, 1, 2, 3, 4, 5
N_NODE_ROWS = 6


class FlowArrays(NamedTuple):
    """Every array of one network's flow solve, built once per network.

    Attributes
    ----------
    from_node, to_node : ndarray of int64, shape (n_links,)
        Link end nodes. [-]
    node_position : ndarray of int64, shape (n_nodes,)
        Row of each node in the reverse Cuthill-McKee ordered reduced
        Laplacian; -1 for the reference node. [-]
    reference_node : int
        The node whose pressure is zero. [-]
    data : ndarray, shape (N_DATA_ROWS, n_links)
        Static link data (rows ``D_*``). [SI]
    pump_links : ndarray of int64
        Links with a pump curve. [-]
    pump_a0 : ndarray
        Their shut-off heads at nominal speed. [Pa]
    operating : ndarray, shape (N_OP_ROWS, n_links)
        The operating point of the next solve: water temperature [°C], valve
        opening [-], pump speed [-] per link (rows ``OP_*``).
    loaded : ndarray, shape (N_OP_ROWS, n_links)
        The operating point last loaded from Python (NaN: none), so that a
        load can tell whether the point changed. [°C, -, -]
    single_values : ndarray, shape (N_OP_ROWS,)
        The value of each operating row where the caller gave one value for
        every link (written by the caller before a load). [°C, -, -]
    prepared_for : ndarray, shape (N_OP_ROWS, n_links)
        The operating point ``coef`` was last prepared for (NaN: never). [°C, -, -]
    coef : ndarray, shape (N_COEF_ROWS, n_links)
        Per-solve link constants (rows ``C_*``). [SI]
    flow_kg_s : ndarray, shape (n_links,)
        Start flows on entry to a warm solve, the solution on exit. [kg/s]
    pressure_Pa : ndarray, shape (n_nodes,)
        Start pressures on entry to a warm solve, the solution on exit, zero at
        the reference node. [Pa]
    band : ndarray, shape (n_nodes - 1, half_bandwidth + 1)
        The banded Laplacian and its factor. [kg/(Pa s)]
    work_links : ndarray, shape (N_LINK_ROWS, n_links)
        Per-link workspace (rows ``W_*``). [SI]
    work_nodes : ndarray, shape (N_NODE_ROWS, n_nodes)
        Per-node workspace (rows ``N_*``). [SI]
    """

    from_node: np.ndarray
    to_node: np.ndarray
    node_position: np.ndarray
    reference_node: int
    data: np.ndarray
    pump_links: np.ndarray
    pump_a0: np.ndarray
    operating: np.ndarray
    loaded: np.ndarray
    single_values: np.ndarray
    prepared_for: np.ndarray
    coef: np.ndarray
    flow_kg_s: np.ndarray
    pressure_Pa: np.ndarray
    band: np.ndarray
    work_links: np.ndarray
    work_nodes: np.ndarray


class NetworkArrays(NamedTuple):
    """The network as the pieces of a Newton step see it.

    :func:`~simheat.hydraulics._kernels.newton.solve_network` makes this small
    record from its :class:`FlowArrays` once per solve and hands it to the
    pieces of a step: a compiled helper that receives the whole
    :class:`FlowArrays` pays reference counting for every array in it at
    every call, which for a small network costs more than the helper's work.

    Attributes
    ----------
    from_node, to_node : ndarray of int64, shape (n_links,)
        Link end nodes. [-]
    node_position : ndarray of int64, shape (n_nodes,)
        Row of each node in the ordered reduced Laplacian, -1 for the
        reference node. [-]
    band : ndarray, shape (n_nodes - 1, half_bandwidth + 1)
        The banded Laplacian and its factor. [kg/(Pa s)]
    coef : ndarray, shape (N_COEF_ROWS, n_links)
        Per-solve link constants (rows ``C_*``). [SI]
    """

    from_node: np.ndarray
    to_node: np.ndarray
    node_position: np.ndarray
    band: np.ndarray
    coef: np.ndarray


class SolveSettings(NamedTuple):
    """Settings of a flow solve.

    Attributes
    ----------
    start_flow_kg_s : float
        Flow at which a cold start takes secant resistances. [kg/s]
    slope_floor_Pa_s_kg : float
        Smallest link slope magnitude used in a Newton step. [Pa s/kg]
    tol_kg_s : float
        Tolerance on the largest node mass imbalance. [kg/s]
    tol_Pa : float
        Tolerance on the largest link equation residual. [Pa]
    max_iter : int
        Most Laplacian factorizations (linear start included). [-]
    """

    start_flow_kg_s: float
    slope_floor_Pa_s_kg: float
    tol_kg_s: float
    tol_Pa: float
    max_iter: int


class SolveResult(NamedTuple):
    """Outcome of :func:`~simheat.hydraulics._kernels.newton.solve_network`.

    Attributes
    ----------
    status : int
        ``STATUS_CONVERGED``, ``STATUS_MAX_ITER``, ``STATUS_NOT_POSITIVE_DEFINITE``
        or ``STATUS_NOT_FINITE``. [-]
    iterations : int
        Laplacian factorizations done. [-]
    max_imbalance_kg_s : float
        Largest node mass imbalance at exit. [kg/s]
    max_residual_Pa : float
        Largest link equation residual at exit (estimated when the solve ended
        on a small last step). [Pa]
    worst_node : int
        Node with the largest imbalance. [-]
    worst_link : int
        Link with the largest residual (the first non-finite link for
        ``STATUS_NOT_FINITE``). [-]
    evaluations : int
        Evaluations of all link laws (the dominant cost). [-]
    """

    status: int
    iterations: int
    max_imbalance_kg_s: float
    max_residual_Pa: float
    worst_node: int
    worst_link: int
    evaluations: int


class SolveInputs(NamedTuple):
    """What one call from Python into the compiled solve reads.

    :func:`~simheat.hydraulics._kernels.entry.load_and_solve` takes this
    record in one :class:`~simheat._handle.Handle`: each handle passed from
    Python costs about 0.3 µs to unbox, a few per cent of a small network's
    whole solve.

    Attributes
    ----------
    arrays : FlowArrays
        The network's arrays; units on the record's fields. [-]
    settings : SolveSettings
        Tolerances and limits of the solve; units on the record's fields. [-]
    """

    arrays: FlowArrays
    settings: SolveSettings


class Iterate(NamedTuple):
    """One point of the Newton iteration: flows, pressures and what they give.

    Attributes
    ----------
    flow_kg_s : ndarray
        Link flows. [kg/s]
    pressure_Pa : ndarray
        Node pressures. [Pa]
    loss_Pa : ndarray
        Link loss minus pump rise at the flows. [Pa]
    slope_Pa_s_kg : ndarray
        Its derivative in the flow. [Pa s/kg]
    residual_Pa : ndarray
        Link equation residual ``loss - (p_from - p_to)``. [Pa]
    imbalance_kg_s : ndarray
        Net flow out of every node. [kg/s]
    """

    flow_kg_s: np.ndarray
    pressure_Pa: np.ndarray
    loss_Pa: np.ndarray
    slope_Pa_s_kg: np.ndarray
    residual_Pa: np.ndarray
    imbalance_kg_s: np.ndarray


class StepArrays(NamedTuple):
    """Arrays of one Newton step.

    Attributes
    ----------
    weight : ndarray
        Link weights ``1/D`` of the factored Laplacian. [kg/(Pa s)]
    dm_kg_s : ndarray
        Link flow increments. [kg/s]
    dp_Pa : ndarray
        Node pressure increments, zero at the reference. [Pa]
    reduced : ndarray
        Right-hand side in the reduced (ordered) node numbering. [any]
    row_scale : ndarray
        Sum of absolute link weights at each Laplacian row. [kg/(Pa s)]
    """

    weight: np.ndarray
    dm_kg_s: np.ndarray
    dp_Pa: np.ndarray
    reduced: np.ndarray
    row_scale: np.ndarray


class ColebrookMemory(NamedTuple):
    """Each turbulent pipe's last Colebrook-White solution (a warm start).

    Attributes
    ----------
    x : ndarray
        ``1/sqrt(f)``, 0 where none yet. [-]
    reynolds : ndarray
        The Reynolds number it belongs to. [-]
    dx_dre : ndarray
        ``dx/dRe`` there. [-]
    """

    x: np.ndarray
    reynolds: np.ndarray
    dx_dre: np.ndarray


def new_flow_arrays(
    from_node: np.ndarray,
    to_node: np.ndarray,
    node_position: np.ndarray,
    half_bandwidth: int,
    reference_node: int,
    data: np.ndarray,
    pump_links: np.ndarray,
    pump_a0: np.ndarray,
) -> FlowArrays:
    """A :class:`FlowArrays` with fresh workspaces, ready for a first solve.

    Parameters
    ----------
    from_node, to_node : ndarray of int64
        Link end nodes. [-]
    node_position : ndarray of int64
        Reduced Laplacian row of each node, -1 for the reference. [-]
    half_bandwidth : int
        Half bandwidth of the ordered reduced Laplacian. [-]
    reference_node : int
        The node whose pressure is zero. [-]
    data : ndarray, shape (N_DATA_ROWS, n_links)
        Static link data. [SI]
    pump_links : ndarray of int64
        Links with a pump curve. [-]
    pump_a0 : ndarray
        Their shut-off heads. [Pa]

    Returns
    -------
    FlowArrays
        Zeroed workspaces; ``prepared_for`` NaN (prepared for no point yet).
    """
    n_links, n_nodes = from_node.shape[0], node_position.shape[0]
    contiguous = np.ascontiguousarray
    return FlowArrays(
        from_node=contiguous(from_node, dtype=np.int64),
        to_node=contiguous(to_node, dtype=np.int64),
        node_position=contiguous(node_position, dtype=np.int64),
        reference_node=int(reference_node),
        data=contiguous(data, dtype=np.float64),
        pump_links=contiguous(pump_links, dtype=np.int64),
        pump_a0=contiguous(pump_a0, dtype=np.float64),
        operating=np.zeros((N_OP_ROWS, n_links)),
        loaded=np.full((N_OP_ROWS, n_links), np.nan),
        single_values=np.zeros(N_OP_ROWS),
        prepared_for=np.full((N_OP_ROWS, n_links), np.nan),
        coef=np.zeros((N_COEF_ROWS, n_links)),
        flow_kg_s=np.zeros(n_links),
        pressure_Pa=np.zeros(n_nodes),
        band=np.zeros((n_nodes - 1, half_bandwidth + 1)),
        work_links=np.zeros((N_LINK_ROWS, n_links)),
        work_nodes=np.zeros((N_NODE_ROWS, n_nodes)),
    )


@njit(cache=True)
def network_arrays(arrays):
    """The :class:`NetworkArrays` of a :class:`FlowArrays` (shared arrays).

    Parameters
    ----------
    arrays : FlowArrays
        The network's flow-solve record; the result shares its arrays. [-]
    """
    return NetworkArrays(
        arrays.from_node, arrays.to_node, arrays.node_position, arrays.band, arrays.coef
    )


@njit(cache=True)
def current_iterate(arrays):
    """The current iterate: the solution arrays and the current workspace rows.

    Parameters
    ----------
    arrays : FlowArrays
        The network's flow-solve record; the result holds its ``flow_kg_s``
        and ``pressure_Pa`` and views of its current workspace rows. [-]
    """
    wl, wn = arrays.work_links, arrays.work_nodes
    return Iterate(
        arrays.flow_kg_s,
        arrays.pressure_Pa,
        wl[W_LOSS],
        wl[W_SLOPE],
        wl[W_RESID],
        wn[N_IMB],
    )


@njit(cache=True)
def trial_iterate(arrays):
    """The trial iterate: the workspace rows a line search builds its point in.

    Parameters
    ----------
    arrays : FlowArrays
        The network's flow-solve record; the result's arrays are views of its
        trial workspace rows (``W_*_T``, ``N_PRESSURE_T``, ``N_IMB_T``). [-]
    """
    wl, wn = arrays.work_links, arrays.work_nodes
    return Iterate(
        wl[W_FLOW_T],
        wn[N_PRESSURE_T],
        wl[W_LOSS_T],
        wl[W_SLOPE_T],
        wl[W_RESID_T],
        wn[N_IMB_T],
    )


@njit(cache=True)
def step_arrays(arrays):
    """The Newton step's workspace rows.

    Parameters
    ----------
    arrays : FlowArrays
        The network's flow-solve record; the result's arrays are views of its
        workspace rows ``W_WEIGHT``, ``W_DM``, ``N_DP``, ``N_REDUCED``,
        ``N_SCALE``. [-]
    """
    wl, wn = arrays.work_links, arrays.work_nodes
    return StepArrays(wl[W_WEIGHT], wl[W_DM], wn[N_DP], wn[N_REDUCED], wn[N_SCALE])


@njit(cache=True)
def colebrook_memory(work_links):
    """The Colebrook-White rows of a per-link workspace.

    Parameters
    ----------
    work_links : ndarray, shape (N_LINK_ROWS, n_links)
        A :class:`FlowArrays` ``work_links``; the result's arrays are views of
        its rows ``W_CB_X``, ``W_CB_RE``, ``W_CB_DX``. [SI]
    """
    return ColebrookMemory(work_links[W_CB_X], work_links[W_CB_RE], work_links[W_CB_DX])
