"""Pack a validated network into the arrays of the compiled flow solve.

The nodes are ordered (reverse Cuthill-McKee) so the Laplacian of a Newton step
is banded, and the link data is laid out in the rows the link kernels read
(:mod:`simheat.hydraulics._kernels.records`), with the constants that do not
change between solves (the Colebrook-White friction at the onset of turbulence,
a proportional-pressure pump's control flow) computed once.
"""

from __future__ import annotations

import numpy as np
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import reverse_cuthill_mckee

from simheat.hydraulics._kernels import (
    FlowArrays,
    new_flow_arrays,
    onset_friction,
    records,
)
from simheat.hydraulics.network import Network
from simheat.physics._kernels import PUMP_MODE_FIXED_SPEED
from simheat.physics.pump import control_flow_m3_s

__all__ = ["flow_arrays", "link_data", "node_ordering"]


def node_ordering(network: Network) -> tuple[np.ndarray, int]:
    """Row of every node in the ordered reduced Laplacian, and its half bandwidth.

    Parameters
    ----------
    network : Network
        A network that passed :func:`~simheat.hydraulics.checks.validate_network`.
        [-]

    Returns
    -------
    position : ndarray of int64
        Row of each node after a reverse Cuthill-McKee ordering of the nodes but
        the reference, which gets -1. [-]
    half_bandwidth : int
        Largest ``|row(from) - row(to)|`` over links between non-reference
        nodes. [-]

    References
    ----------
    .. [1] E. Cuthill, J. McKee, "Reducing the bandwidth of sparse symmetric
       matrices", Proc. 24th ACM National Conference, 1969.
    """
    n_nodes = network.n_nodes
    ref = network.reference_node
    keep = np.array([n for n in range(n_nodes) if n != ref], dtype=np.int64)
    reduced_index = np.full(n_nodes, -1, dtype=np.int64)
    reduced_index[keep] = np.arange(n_nodes - 1)
    f = reduced_index[network.from_node]
    t = reduced_index[network.to_node]
    both = (f >= 0) & (t >= 0)
    graph = coo_matrix(
        (np.ones(int(both.sum())), (f[both], t[both])),
        shape=(n_nodes - 1, n_nodes - 1),
    ).tocsr()
    graph = graph + graph.T
    order = reverse_cuthill_mckee(graph, symmetric_mode=True)
    position_in_reduced = np.empty(n_nodes - 1, dtype=np.int64)
    position_in_reduced[order] = np.arange(n_nodes - 1)
    position = np.full(n_nodes, -1, dtype=np.int64)
    position[keep] = position_in_reduced
    pf, pt = position[network.from_node], position[network.to_node]
    both = (pf >= 0) & (pt >= 0)
    half_bandwidth = int(np.max(np.abs(pf[both] - pt[both]), initial=0))
    return position, half_bandwidth


def link_data(network: Network) -> np.ndarray:
    """Static per-link data of a validated network, rows ``D_*``.

    Parameters
    ----------
    network : Network
        A network that passed :class:`FlowSolver`'s checks. [-]

    Returns
    -------
    ndarray, shape (N_DATA_ROWS, n_links)
        Pipe, valve, check-valve and pump data, with the proportional-pressure
        control flow [m3/s] and the Colebrook-White friction at Re 4000. [SI]
    """
    k_ = records
    data = np.zeros((k_.N_DATA_ROWS, network.n_links))
    data[k_.D_LENGTH] = network.length_m
    data[k_.D_DIAMETER] = network.inner_diameter_m
    data[k_.D_ROUGHNESS] = network.roughness_m
    data[k_.D_ZETA] = network.zeta
    data[k_.D_KV] = network.kv_m3_h
    coeffs = np.asarray(network.pump_coeffs, dtype=np.float64)
    data[k_.D_A0], data[k_.D_A1], data[k_.D_A2] = coeffs.T
    data[k_.D_CHECK] = np.asarray(network.check_valve, dtype=bool)
    data[k_.D_MODE] = network.pump_mode
    data[k_.D_SETPOINT] = network.pump_setpoint_Pa
    for k in np.flatnonzero(np.asarray(network.pump_mode) != PUMP_MODE_FIXED_SPEED):
        a0, a1, a2 = coeffs[k]
        data[k_.D_CONTROL_FLOW, k] = control_flow_m3_s(
            a0, a1, a2, float(network.pump_setpoint_Pa[k])
        )
    onset_friction(
        data[k_.D_LENGTH].copy(),
        data[k_.D_DIAMETER].copy(),
        data[k_.D_ROUGHNESS].copy(),
        data[k_.D_F_ONSET],
        data[k_.D_DF_ONSET],
    )
    return data


def flow_arrays(network: Network) -> tuple[FlowArrays, int]:
    """The compiled solve's arrays for a validated network, with fresh workspaces.

    Parameters
    ----------
    network : Network
        A network that passed :func:`~simheat.hydraulics.checks.validate_network`.
        [-]

    Returns
    -------
    arrays : FlowArrays
        Ordering, link data, pump links and zeroed workspaces. [-]
    half_bandwidth : int
        Half bandwidth of the ordered reduced Laplacian. [-]
    """
    position, half_bandwidth = node_ordering(network)
    coeffs = np.asarray(network.pump_coeffs, dtype=np.float64)
    pump_links = np.flatnonzero(np.any(coeffs != 0.0, axis=1))
    arrays = new_flow_arrays(
        network.from_node,
        network.to_node,
        position,
        half_bandwidth,
        network.reference_node,
        link_data(network),
        pump_links,
        coeffs[pump_links, 0],
    )
    return arrays, half_bandwidth
