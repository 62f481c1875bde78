"""Compiled kernels of the thermal right-hand side (numba, cached on disk).

Inputs are plain arrays; the orchestration in :mod:`simheat.dynamics.integrate`
unpacks the model and the controls. Temperatures in °C, flows in kg/s, heat in W.
"""

from __future__ import annotations

import math

import numpy as np
from numba import njit

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
