"""Compiled heat exchange of the water cells: radiators to rooms, pipes to surroundings.

Kernels of the warm-up right-hand side (:func:`simheat.dynamics._kernels.warmup_rhs`
calls them once per evaluation) on the records of :mod:`simheat.dynamics._records`:
every radiator's cells emit by the chain's cell law of
:mod:`simheat.physics._emitter_kernels` (one output law with the steady
calculations), pipe cells lose heat through their conductance. Temperatures in
°C, flows in kg/s, heat in W.
"""

from __future__ import annotations

from simheat._jit import njit
from simheat.dynamics._records import CELL_PIPE
from simheat.physics._emitter_kernels import (
    emitter_cell_output_W,
    emitter_chain_constant,
)

__all__ = ["pipe_exchange", "radiator_exchange"]


@njit(cache=True)
def radiator_exchange(
    cells,
    radiators,
    cell_temp_C,
    air_C,
    mass_flow_kg_s,
    cp_J_kg_K,
    dH_W,
    q_air_W,
    q_structure_W,
    emitter_W,
):
    """Heat from every radiator's cells to its room, by the chain's cell law.

    Each radiator's cells take the water from upstream (the link's pipe
    half-cell on the side the flow comes from, then cell by cell) and emit by
    :func:`simheat.physics._emitter_kernels.emitter_cell_output_W`, with the
    chain constant of the radiator's inlet and flow: at steady state the chain
    gives the EN 442 log-mean output at any flow; standing water emits by its
    own temperature. Split into the air and structure nodes by the convective
    fraction.

    Parameters
    ----------
    cells : CellArrays
        What each cell exchanges heat with; units on its fields. [-]
    radiators : RadiatorArrays
        Every radiator's link, cells and rating; units on its fields. [-]
    cell_temp_C : ndarray, shape (n_cells,)
        Water temperature of every cell. [°C]
    air_C : ndarray, shape (n_rooms,)
        Air temperature of every room. [°C]
    mass_flow_kg_s : ndarray, shape (n_links,)
        Mass flow of every link. [kg/s]
    cp_J_kg_K : float
        Specific heat of the water in transport. [J/(kg K)]
    dH_W : ndarray, shape (n_cells,)
        Heat into each cell; what a radiator cell gives off is subtracted. [W]
    q_air_W : ndarray, shape (n_rooms,)
        Heat into each room's air node; the convective part is added. [W]
    q_structure_W : ndarray, shape (n_rooms,)
        Heat into each room's structure node; the radiant part is added. [W]
    emitter_W : ndarray, shape (n_emitters,)
        Written: each radiator's output. [W]

    Returns
    -------
    float
        Heat emitted to the rooms. [W]
    """
    emitted = 0.0
    for e in range(radiators.link.shape[0]):
        m = mass_flow_kg_s[radiators.link[e]]
        n = radiators.cells[e]
        first = radiators.first_cell[e]
        if m >= 0.0:
            inlet_cell, step, k = first - 1, 1, first
        else:
            inlet_cell, step, k = first + n, -1, first + n - 1
        room = cells.room[k]
        air = air_C[room]
        flow = abs(m)
        inlet = cell_temp_C[inlet_cell] - air
        constant = emitter_chain_constant(
            radiators.nominal_W[e],
            radiators.exponent[e],
            n,
            inlet,
            flow,
            cp_J_kg_K,
        )
        total = 0.0
        for _ in range(n):
            excess = cell_temp_C[k] - air
            q = emitter_cell_output_W(
                cells.nominal_W[k],
                cells.exponent[k],
                inlet,
                excess,
                flow,
                cp_J_kg_K,
                constant,
            )
            dH_W[k] -= q
            q_air_W[room] += cells.convective[k] * q
            q_structure_W[room] += (1.0 - cells.convective[k]) * q
            total += q
            inlet = excess
            k += step
        emitter_W[e] = total
        emitted += total
    return emitted


@njit(cache=True)
def pipe_exchange(cells, cell_temp_C, air_C, unheated_C, dH_W, q_air_W):
    """Heat pipe cells lose to the room around them or to unheated space.

    Parameters
    ----------
    cells : CellArrays
        What each cell exchanges heat with; units on its fields. [-]
    cell_temp_C : ndarray, shape (n_cells,)
        Water temperature of every cell. [°C]
    air_C : ndarray, shape (n_rooms,)
        Air temperature of every room. [°C]
    unheated_C : float
        Temperature of the unheated space around pipes outside the rooms. [°C]
    dH_W : ndarray, shape (n_cells,)
        Heat into each cell; what a pipe cell loses is subtracted. [W]
    q_air_W : ndarray, shape (n_rooms,)
        Heat into each room's air node; the losses of pipes in it are added. [W]

    Returns
    -------
    (pipe_loss_W, unheated_loss_W) : tuple of float
        Heat lost by the pipes, and of that lost to unheated space. [W]
    """
    pipe_loss = 0.0
    unheated_loss = 0.0
    for k in range(cell_temp_C.shape[0]):
        if cells.kind[k] == CELL_PIPE and cells.loss_W_K[k] > 0.0:
            room = cells.room[k]
            around = air_C[room] if room >= 0 else unheated_C
            q = cells.loss_W_K[k] * (cell_temp_C[k] - around)
            dH_W[k] -= q
            if room >= 0:
                q_air_W[room] += q
            else:
                unheated_loss += q
            pipe_loss += q
    return pipe_loss, unheated_loss
