"""The warm-up Jacobian's sparsity pattern and its finite-difference columns.

The implicit integrator needs ``d(dy/dt)/dy``. Which derivative depends on which
state follows from the model's structure (:func:`jacobian_sparsity`); columns
that share no row can be perturbed together (:func:`column_groups`), so the
Jacobian costs one right-hand side per group, taken in compiled code
(:func:`simheat.dynamics._kernels.warmup_jacobian` on the record
:func:`jacobian_arrays` builds).
"""

from __future__ import annotations

import numpy as np
from scipy.sparse import coo_matrix

from simheat.dynamics._records import JacobianArrays
from simheat.dynamics.model import CELL_EMITTER, CELL_PIPE, ThermalModel
from simheat.hydraulics.network import Network

__all__ = [
    "JACOBIAN_STEP_FACTOR",
    "column_groups",
    "difference_steps",
    "jacobian_arrays",
    "jacobian_sparsity",
]

# Relative difference step of the finite-difference Jacobian: sqrt of the float64
# machine epsilon, scipy's num_jac default. [-]
JACOBIAN_STEP_FACTOR = float(np.finfo(np.float64).eps) ** 0.5


def jacobian_sparsity(model: ThermalModel, network: Network, source_link: int):
    """Which derivative depends on which state (sparse 0/1 matrix, CSR).

    Parameters
    ----------
    model : ThermalModel
        The thermal model's arrays (cells, rooms, sensors, state slices). [-]
    network : Network
        Its network. [-]
    source_link : int
        The heat source's link. [-]

    Returns
    -------
    scipy.sparse.csr_matrix
        Shape ``(n_states, n_states)``; entry ``(i, j)`` is 1 where
        ``d(dy_i/dt)/dy_j`` may be nonzero.

    Notes
    -----
    A cell depends on itself, its neighbours in the chain, the link-end cells
    mixing at its link's end nodes, the room around it and every head sensor
    (valve openings move every flow); a radiator cell also on both ends of its
    link (the inlet, which sets the chain's cell law, is the end the flow comes
    from), and so does its room; the source's cells and the cells feeding
    its inlet node depend on each other (the power control). Rooms depend on
    their own nodes, their cells and the rooms joined by internal walls;
    sensors on themselves and their room's air. The energy counters are
    quadratures that nothing depends on: leaving their rows out keeps them from
    filling every column (which would force one finite-difference group per
    state). The Newton iteration still converges on them, one iteration behind
    the states they integrate.
    """
    m = model
    net = network
    s = m.slices()
    n = m.n_states
    rows: list[int] = []
    columns: list[int] = []

    def mark(row: int, column: int) -> None:
        rows.append(row)
        columns.append(column)

    air0, struct0, sens0 = s["air"].start, s["structure"].start, s["sensors"].start
    sensor_cols = list(range(sens0, sens0 + m.n_sensors))
    ends_at_node: list[list[int]] = [[] for _ in range(net.n_nodes)]
    for link in range(net.n_links):
        first = m.link_cell_start[link]
        last = first + m.link_cell_count[link] - 1
        ends_at_node[net.from_node[link]].append(first)
        ends_at_node[net.to_node[link]].append(last)
    source_group = set(m.source_cells) | set(ends_at_node[net.from_node[source_link]])
    for k in range(m.n_cells):
        link = m.cell_link[k]
        first = m.link_cell_start[link]
        last = first + m.link_cell_count[link] - 1
        cols = {k, max(k - 1, first), min(k + 1, last)}
        if k == first:
            cols.update(ends_at_node[net.from_node[link]])
        if k == last:
            cols.update(ends_at_node[net.to_node[link]])
        room = m.cell_room[k]
        if room >= 0 and m.cell_kind[k] in (CELL_EMITTER, CELL_PIPE):
            cols.update((air0 + room,))
        if m.cell_kind[k] == CELL_EMITTER:
            cols.update((first, last))  # the radiator's inlet, either way round
        if k in source_group:
            cols.update(source_group)
        for c in cols:
            mark(k, c)
        for c in sensor_cols:
            mark(k, c)
    for r in range(m.n_rooms):
        for c in (air0 + r, struct0 + r):
            mark(air0 + r, c)
            mark(struct0 + r, c)
    for k in range(m.n_cells):
        room = m.cell_room[k]
        if room >= 0 and m.cell_kind[k] in (CELL_EMITTER, CELL_PIPE):
            mark(air0 + room, k)
            mark(struct0 + room, k)
        if m.cell_kind[k] == CELL_EMITTER:
            link = m.cell_link[k]
            first = m.link_cell_start[link]
            for c in (first, first + m.link_cell_count[link] - 1):
                mark(air0 + room, c)
                mark(struct0 + room, c)
    for a, b in zip(m.wall_a, m.wall_b, strict=True):
        mark(air0 + a, air0 + b)
        mark(air0 + b, air0 + a)
    for i, room in enumerate(m.sensor_room):
        mark(sens0 + i, sens0 + i)
        mark(sens0 + i, air0 + room)
    pattern = coo_matrix(
        (np.ones(len(rows), dtype=np.int8), (rows, columns)), shape=(n, n)
    ).tocsr()
    pattern.sum_duplicates()
    pattern.data[:] = 1
    return pattern


def column_groups(pattern) -> tuple[np.ndarray, np.ndarray]:
    """Greedy grouping of the columns of a sparse pattern that share no row.

    Curtis, Powell and Reid's idea: the columns of one group can be perturbed
    together in a finite-difference Jacobian. Columns without entries are left
    out.

    Parameters
    ----------
    pattern : scipy.sparse matrix
        0/1 pattern, shape (n_rows, n_columns). [-]

    Returns
    -------
    (ndarray, ndarray) of int64
        ``start`` (n_groups + 1) and ``columns``: group ``g`` holds
        ``columns[start[g]:start[g + 1]]``.

    References
    ----------
    .. [1] A. R. Curtis, M. J. D. Powell, J. K. Reid, "On the estimation of sparse
       Jacobian matrices", IMA J. Appl. Math. 13(1), 1974.
    """
    csc = pattern.tocsc()
    n_rows, n_columns = csc.shape
    used = np.zeros((0, n_rows), dtype=bool)
    members: list[list[int]] = []
    for j in range(n_columns):
        rows = csc.indices[csc.indptr[j] : csc.indptr[j + 1]]
        if rows.size == 0:
            continue
        free = np.flatnonzero(~used[:, rows].any(axis=1))
        if free.size:
            g = int(free[0])
        else:
            g = len(members)
            used = np.vstack([used, np.zeros((1, n_rows), dtype=bool)])
            members.append([])
        used[g, rows] = True
        members[g].append(j)
    start = np.zeros(len(members) + 1, dtype=np.int64)
    start[1:] = np.cumsum([len(m) for m in members])
    columns = np.array([j for m in members for j in m], dtype=np.int64)
    return start, columns


def jacobian_arrays(pattern) -> JacobianArrays:
    """The compiled Jacobian's record for a square pattern.

    Parameters
    ----------
    pattern : scipy.sparse matrix
        0/1 pattern, shape (n, n). [-]

    Returns
    -------
    JacobianArrays
        The pattern in CSC form with sorted indices, its column groups and
        workspaces.
    """
    csc = pattern.tocsc()
    csc.sort_indices()
    start, columns = column_groups(csc)
    n = csc.shape[0]
    return JacobianArrays(
        group_start=start,
        group_columns=columns,
        indptr=csc.indptr.astype(np.int64),
        indices=csc.indices.astype(np.int64),
        data=np.empty(len(csc.indices)),
        y_work=np.empty(n),
        dy_work=np.empty(n),
    )


def difference_steps(y: np.ndarray, f0: np.ndarray, atol: np.ndarray) -> np.ndarray:
    """Forward-difference step of every state, scipy's rule.

    Parameters
    ----------
    y : ndarray
        The state. [state units]
    f0 : ndarray
        Its time derivative. [state units / s]
    atol : ndarray
        Absolute tolerances: the floor of the step's scale. [state units]

    Returns
    -------
    ndarray
        ``sqrt(eps) * sign(f0) * max(atol, |y|)``, rounded so that
        ``y + step`` is exactly representable. [state units]
    """
    scale = np.where(f0 >= 0.0, 1.0, -1.0) * np.maximum(atol, np.abs(y))
    return (y + JACOBIAN_STEP_FACTOR * scale) - y
