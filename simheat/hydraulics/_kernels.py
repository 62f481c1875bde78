"""Compiled kernels of the network flow solve (global gradient algorithm).

Unknowns are the signed mass flow of every link and the gauge pressure of every
node but the reference node. Each link obeys

    p_from - p_to = F(m) = pipe_dp(m) + valve_dp(m) - pump_rise(m)

and every node conserves mass. A Newton step linearises ``F`` with the diagonal
``D = dF/dm`` and eliminates the flow increments, leaving the weighted graph
Laplacian ``A D^-1 A^T`` (reference node removed) for the pressure increments.
With every ``D > 0`` that matrix is symmetric positive definite for a connected
network; after a reverse Cuthill-McKee ordering of the nodes it is banded with a
small half bandwidth, so a banded ``L D L^T`` factorization costs ``O(n b^2)``.

A pump working on a rising stretch of its curve gives its link ``D < 0``. The
exact Newton step is then tried first (the matrix may be indefinite, so the
factorization is ``L D L^T`` with a stricter pivot test); if that fails or the
line search finds no decrease, the step is retaken with ``|D|``, which keeps
the matrix positive definite.

Everything of one solve runs here, with no Python per iteration, so the
dynamics can call :func:`solve_network` from its own compiled code.

References
----------
.. [1] E. Todini, S. Pilati, "A gradient algorithm for the analysis of pipe
   networks", in Computer Applications in Water Supply, vol. 1, Research Studies
   Press, 1988, pp. 1-20.
.. [2] D. J. Wood, C. O. A. Charles, "Hydraulic network analysis using linear
   theory", J. Hydraul. Div. ASCE 98(7), 1972 (linearised start).
.. [3] J. E. Dennis, R. B. Schnabel, Numerical Methods for Unconstrained
   Optimization and Nonlinear Equations, SIAM, 1996, sec. 6.3 (backtracking).
.. [4] G. H. Golub, C. F. Van Loan, Matrix Computations, 4th ed., Johns Hopkins,
   2013, sec. 4.1 and 4.3 (L D L^T, band factorizations).
"""

from __future__ import annotations

import math

import numpy as np
from numba import njit

from simheat.physics._kernels import (
    pipe_pressure_drop_Pa,
    pump_pressure_rise_Pa,
    valve_pressure_drop_Pa,
)

# Result codes of solve_network.
STATUS_CONVERGED = 0
STATUS_MAX_ITER = 1
STATUS_NOT_POSITIVE_DEFINITE = 2
STATUS_NOT_FINITE = 3

# Rows of the per-link workspace, shape (N_LINK_ROWS, n_links).
_F, _S, _R, _DM, _MT, _FT, _ST, _RT, _W = 0, 1, 2, 3, 4, 5, 6, 7, 8
N_LINK_ROWS = 9
# Rows of the per-node workspace, shape (N_NODE_ROWS, n_nodes).
_G, _DP, _PT, _GT, _X, _SC = 0, 1, 2, 3, 4, 5
N_NODE_ROWS = 6

# Armijo sufficient-decrease constant and the number of step halvings, [3] sec. 6.3.
_ARMIJO = 1e-4
_MAX_HALVINGS = 30
# A pivot smaller than this fraction of its row's absolute weight sum means a
# singular matrix: for the positive definite (|D|) matrix, and for the possibly
# indefinite exact matrix, where a fallback exists and we demand more. [-]
PIVOT_FRACTION_DEFINITE = 1e-14
PIVOT_FRACTION_INDEFINITE = 1e-8


@njit(cache=True)
def link_loss_Pa(
    mass_flow_kg_s,
    length_m,
    inner_diameter_m,
    roughness_m,
    zeta,
    kv_m3_h,
    opening,
    pump_a0,
    pump_a1,
    pump_a2,
    pump_speed,
    temp_C,
):
    """Pressure loss of one link minus its pump rise, and its flow derivative.

    Parameters
    ----------
    mass_flow_kg_s : float
        Signed mass flow, positive from ``from_node`` to ``to_node``. [kg/s]
    length_m : float
        Pipe length, zero for no pipe. [m]
    inner_diameter_m : float
        Inner pipe diameter (reference for ``zeta``). [m]
    roughness_m : float
        Absolute wall roughness. [m]
    zeta : float
        Sum of local loss coefficients. [-]
    kv_m3_h : float
        Fully open valve Kv, zero for no valve. [m3/h at 1 bar]
    opening : float
        Valve opening, 0 closed to 1 fully open. [-]
    pump_a0, pump_a1, pump_a2 : float
        Pump curve at nominal speed, rise ``a0 + a1*Q + a2*Q**2``.
        [Pa, Pa s/m3, Pa s2/m6]
    pump_speed : float
        Pump speed relative to nominal. [-]
    temp_C : float
        Water temperature in the link. [°C]

    Returns
    -------
    loss_Pa : float
        ``pipe_dp + valve_dp - pump_rise``, equal to ``p_from - p_to``. [Pa]
    slope_Pa_s_kg : float
        Derivative of ``loss_Pa`` with respect to the mass flow. [Pa s/kg]
    """
    loss = 0.0
    slope = 0.0
    if length_m > 0.0 or zeta > 0.0:
        dp, ds = pipe_pressure_drop_Pa(
            mass_flow_kg_s, length_m, inner_diameter_m, roughness_m, zeta, temp_C
        )
        loss += dp
        slope += ds
    if kv_m3_h > 0.0:
        dp, ds = valve_pressure_drop_Pa(mass_flow_kg_s, kv_m3_h, opening, temp_C)
        loss += dp
        slope += ds
    if pump_a0 != 0.0 or pump_a1 != 0.0 or pump_a2 != 0.0:
        rise, drise = pump_pressure_rise_Pa(
            mass_flow_kg_s, pump_a0, pump_a1, pump_a2, pump_speed, temp_C
        )
        loss -= rise
        slope -= drise
    return loss, slope


@njit(cache=True)
def evaluate_links(
    mass_flow_kg_s,
    length_m,
    inner_diameter_m,
    roughness_m,
    zeta,
    kv_m3_h,
    opening,
    pump_a0,
    pump_a1,
    pump_a2,
    pump_speed,
    temp_C,
    loss_out_Pa,
    slope_out_Pa_s_kg,
):
    """Loss and slope of every link.

    Parameters
    ----------
    mass_flow_kg_s : ndarray
        Link mass flows. [kg/s]
    length_m, inner_diameter_m, roughness_m, zeta, kv_m3_h, opening : ndarray
        Link parts as in :func:`link_loss_Pa`. [m], [m], [m], [-], [m3/h], [-]
    pump_a0, pump_a1, pump_a2, pump_speed, temp_C : ndarray
        Link pump curve, speed and water temperature.
        [Pa], [Pa s/m3], [Pa s2/m6], [-], [°C]
    loss_out_Pa : ndarray
        Written: link loss minus pump rise. [Pa]
    slope_out_Pa_s_kg : ndarray
        Written: its signed derivative with respect to the mass flow. [Pa s/kg]

    Returns
    -------
    int
        Index of the first link with a non-finite loss or slope, else -1. [-]
    """
    bad = -1
    for k in range(mass_flow_kg_s.shape[0]):
        loss, slope = link_loss_Pa(
            mass_flow_kg_s[k],
            length_m[k],
            inner_diameter_m[k],
            roughness_m[k],
            zeta[k],
            kv_m3_h[k],
            opening[k],
            pump_a0[k],
            pump_a1[k],
            pump_a2[k],
            pump_speed[k],
            temp_C[k],
        )
        if bad < 0 and not (math.isfinite(loss) and math.isfinite(slope)):
            bad = k
        loss_out_Pa[k] = loss
        slope_out_Pa_s_kg[k] = slope
    return bad


@njit(cache=True)
def link_residuals_Pa(loss_Pa, pressure_Pa, from_node, to_node, residual_out_Pa):
    """Link equation residual ``loss - (p_from - p_to)`` of every link.

    Parameters
    ----------
    loss_Pa : ndarray
        Link loss minus pump rise. [Pa]
    pressure_Pa : ndarray
        Node gauge pressures. [Pa]
    from_node, to_node : ndarray of int64
        Link end nodes. [-]
    residual_out_Pa : ndarray
        Written: link residuals. [Pa]

    Returns
    -------
    float
        Largest absolute residual. [Pa]
    """
    worst = 0.0
    for k in range(loss_Pa.shape[0]):
        r = loss_Pa[k] - (pressure_Pa[from_node[k]] - pressure_Pa[to_node[k]])
        residual_out_Pa[k] = r
        worst = max(worst, abs(r))
    return worst


@njit(cache=True)
def node_imbalance_kg_s(mass_flow_kg_s, from_node, to_node, imbalance_out_kg_s):
    """Net mass flow leaving every node (zero when mass is conserved).

    Parameters
    ----------
    mass_flow_kg_s : ndarray
        Link mass flows. [kg/s]
    from_node, to_node : ndarray of int64
        Link end nodes. [-]
    imbalance_out_kg_s : ndarray
        Written: outflow minus inflow per node. [kg/s]

    Returns
    -------
    float
        Largest absolute imbalance. [kg/s]
    """
    imbalance_out_kg_s[:] = 0.0
    for k in range(mass_flow_kg_s.shape[0]):
        imbalance_out_kg_s[from_node[k]] += mass_flow_kg_s[k]
        imbalance_out_kg_s[to_node[k]] -= mass_flow_kg_s[k]
    worst = 0.0
    for n in range(imbalance_out_kg_s.shape[0]):
        worst = max(worst, abs(imbalance_out_kg_s[n]))
    return worst


@njit(cache=True)
def newton_weights(slope_Pa_s_kg, slope_floor_Pa_s_kg, exact, weight_out):
    """Link weights ``1/D`` of a Newton step.

    Parameters
    ----------
    slope_Pa_s_kg : ndarray
        Signed link slopes ``dF/dm``. [Pa s/kg]
    slope_floor_Pa_s_kg : float
        Smallest slope magnitude used. [Pa s/kg]
    exact : bool
        Keep slopes below ``-slope_floor_Pa_s_kg`` negative (exact Newton);
        otherwise use ``max(|dF/dm|, floor)`` everywhere. [-]
    weight_out : ndarray
        Written: link weights. [kg/(Pa s)]

    Returns
    -------
    int
        Number of negative weights. [-]
    """
    n_negative = 0
    for k in range(slope_Pa_s_kg.shape[0]):
        s = slope_Pa_s_kg[k]
        if exact and s <= -slope_floor_Pa_s_kg:
            weight_out[k] = 1.0 / s
            n_negative += 1
        else:
            weight_out[k] = 1.0 / max(abs(s), slope_floor_Pa_s_kg)
    return n_negative


@njit(cache=True)
def merit(residual_Pa, slope_Pa_s_kg, imbalance_kg_s, slope_floor_Pa_s_kg):
    """Line-search merit: squared link residuals in flow units plus imbalances.

    Parameters
    ----------
    residual_Pa : ndarray
        Link residuals. [Pa]
    slope_Pa_s_kg : ndarray
        Link slopes; ``max(|slope|, floor)`` scales residuals to flows. [Pa s/kg]
    imbalance_kg_s : ndarray
        Node imbalances. [kg/s]
    slope_floor_Pa_s_kg : float
        Smallest slope magnitude used. [Pa s/kg]

    Returns
    -------
    float
        ``sum((r/|D|)**2) + sum(g**2)``; an exact Newton step is a descent
        direction of it for any fixed positive scaling. [kg2/s2]
    """
    total = 0.0
    for k in range(residual_Pa.shape[0]):
        q = residual_Pa[k] / max(abs(slope_Pa_s_kg[k]), slope_floor_Pa_s_kg)
        total += q * q
    for n in range(imbalance_kg_s.shape[0]):
        total += imbalance_kg_s[n] * imbalance_kg_s[n]
    return total


@njit(cache=True)
def assemble_laplacian(weight, from_node, to_node, node_position, band, row_scale):
    """Weighted graph Laplacian ``A W A^T`` in lower band storage.

    Parameters
    ----------
    weight : ndarray
        Link weights ``1/D``. [kg/(Pa s)]
    from_node, to_node : ndarray of int64
        Link end nodes. [-]
    node_position : ndarray of int64
        Row of each node in the ordered reduced matrix, -1 for the reference. [-]
    band : ndarray, shape (n_reduced, half_bandwidth + 1)
        Written: ``band[i, k]`` holds entry ``(i, i - k)``. [kg/(Pa s)]
    row_scale : ndarray, shape (>= n_reduced,)
        Written: sum of absolute link weights at each row. [kg/(Pa s)]
    """
    band[:, :] = 0.0
    row_scale[: band.shape[0]] = 0.0
    for k in range(weight.shape[0]):
        i = node_position[from_node[k]]
        j = node_position[to_node[k]]
        w = weight[k]
        if i >= 0:
            band[i, 0] += w
            row_scale[i] += abs(w)
        if j >= 0:
            band[j, 0] += w
            row_scale[j] += abs(w)
        if i >= 0 and j >= 0:
            if i > j:
                band[i, i - j] -= w
            else:
                band[j, j - i] -= w


@njit(cache=True)
def band_ldlt(band, row_scale, pivot_fraction, require_positive):
    """Factor a banded symmetric matrix in place as ``L D L^T``.

    Parameters
    ----------
    band : ndarray, shape (n, b + 1)
        On entry ``band[i, k]`` = ``M[i, i - k]``; on exit ``band[i, 0]`` holds
        the pivot ``D[i]`` and ``band[i, k]`` (k > 0) the unit lower factor
        ``L[i, i - k]``. [any]
    row_scale : ndarray
        Magnitude against which each pivot is judged. [any]
    pivot_fraction : float
        A pivot below ``pivot_fraction * row_scale[i]`` in magnitude fails. [-]
    require_positive : bool
        Fail on any pivot that is not positive (positive definite matrices). [-]

    Returns
    -------
    bool
        False when a pivot fails (matrix singular, or indefinite when positive
        pivots are required).

    Notes
    -----
    Row-oriented ``L D L^T`` without pivoting restricted to the band, ``O(n b^2)``
    operations [4]_. Without pivoting it is stable for positive definite
    matrices; for indefinite ones the pivot test guards against breakdown.
    """
    n = band.shape[0]
    b = band.shape[1] - 1
    for i in range(n):
        j0 = max(0, i - b)
        for j in range(j0, i):
            s = band[i, i - j]
            for k in range(j0, j):
                s -= band[i, i - k] * band[k, 0] * band[j, j - k]
            band[i, i - j] = s / band[j, 0]
        d = band[i, 0]
        for k in range(j0, i):
            d -= band[i, i - k] * band[i, i - k] * band[k, 0]
        if not math.isfinite(d) or abs(d) <= pivot_fraction * row_scale[i]:
            return False
        if require_positive and d < 0.0:
            return False
        band[i, 0] = d
    return True


@njit(cache=True)
def band_solve(band, rhs):
    """Solve ``L D L^T x = rhs`` in place with a factor from :func:`band_ldlt`.

    Parameters
    ----------
    band : ndarray, shape (n, b + 1)
        Factor in lower band storage. [any]
    rhs : ndarray, shape (n,)
        Right-hand side on entry, solution on exit. [any]
    """
    n = band.shape[0]
    b = band.shape[1] - 1
    for i in range(n):
        s = rhs[i]
        for k in range(max(0, i - b), i):
            s -= band[i, i - k] * rhs[k]
        rhs[i] = s
    for i in range(n):
        rhs[i] /= band[i, 0]
    for i in range(n - 1, -1, -1):
        s = rhs[i]
        for k in range(i + 1, min(n, i + b + 1)):
            s -= band[k, k - i] * rhs[k]
        rhs[i] = s


@njit(cache=True)
def solve_increment(
    weight,
    residual_Pa,
    imbalance_kg_s,
    from_node,
    to_node,
    node_position,
    band,
    reduced,
    dp_out_Pa,
    dm_out_kg_s,
):
    """Newton increments from a factored Laplacian.

    Solves ``(A W A^T) dp = A W r - g`` and sets ``dm = W (A^T dp - r)``, so that
    the linearised equations hold: ``A dm = -g`` and ``dm / W - A^T dp = -r``.

    Parameters
    ----------
    weight : ndarray
        Link weights of the factored matrix. [kg/(Pa s)]
    residual_Pa : ndarray
        Link residuals ``r``. [Pa]
    imbalance_kg_s : ndarray
        Node imbalances ``g``. [kg/s]
    from_node, to_node : ndarray of int64
        Link end nodes. [-]
    node_position : ndarray of int64
        Row of each node in the reduced matrix, -1 for the reference. [-]
    band : ndarray
        Factor from :func:`band_ldlt`. [any]
    reduced : ndarray, shape (>= n_nodes - 1,)
        Workspace. [Pa]
    dp_out_Pa : ndarray
        Written: node pressure increments, zero at the reference. [Pa]
    dm_out_kg_s : ndarray
        Written: link flow increments. [kg/s]
    """
    n_red = band.shape[0]
    rhs = reduced[:n_red]
    for n in range(node_position.shape[0]):
        i = node_position[n]
        if i >= 0:
            rhs[i] = -imbalance_kg_s[n]
    for k in range(weight.shape[0]):
        q = weight[k] * residual_Pa[k]
        i = node_position[from_node[k]]
        j = node_position[to_node[k]]
        if i >= 0:
            rhs[i] += q
        if j >= 0:
            rhs[j] -= q
    band_solve(band, rhs)
    for n in range(node_position.shape[0]):
        i = node_position[n]
        dp_out_Pa[n] = rhs[i] if i >= 0 else 0.0
    for k in range(weight.shape[0]):
        dm_out_kg_s[k] = weight[k] * (
            dp_out_Pa[from_node[k]] - dp_out_Pa[to_node[k]] - residual_Pa[k]
        )


@njit(cache=True)
def _worst_index(values):
    worst = 0
    for k in range(values.shape[0]):
        if abs(values[k]) > abs(values[worst]):
            worst = k
    return worst


@njit(cache=True)
def _linear_start(
    from_node,
    to_node,
    parts,
    node_position,
    band,
    mass_flow_kg_s,
    pressure_Pa,
    work_links,
    work_nodes,
    start_flow_kg_s,
    slope_floor_Pa_s_kg,
):
    """Two linear-theory passes from rest: secant resistances, then refined ones.

    Pass 1 uses the secant of every link between zero flow and
    ``start_flow_kg_s``; pass 2 the secant at the geometric mean of that flow and
    the pass-1 flow, which is exact for a purely quadratic loss law [2]_.

    Returns
    -------
    bool
        False when a Laplacian could not be factored.
    """
    loss0 = work_links[_F]
    weight = work_links[_W]
    for sweep in range(2):
        for k in range(mass_flow_kg_s.shape[0]):
            if sweep == 0:
                m_ref = start_flow_kg_s
            else:
                m_abs = max(abs(mass_flow_kg_s[k]), 1e-3 * start_flow_kg_s)
                m_ref = math.copysign(
                    math.sqrt(start_flow_kg_s * m_abs), mass_flow_kg_s[k]
                )
            args = (
                parts[0][k],
                parts[1][k],
                parts[2][k],
                parts[3][k],
                parts[4][k],
                parts[5][k],
                parts[6][k],
                parts[7][k],
                parts[8][k],
                parts[9][k],
                parts[10][k],
            )
            f0, _ = link_loss_Pa(0.0, *args)
            f1, _ = link_loss_Pa(m_ref, *args)
            loss0[k] = f0
            weight[k] = 1.0 / max(abs((f1 - f0) / m_ref), slope_floor_Pa_s_kg)
        # From rest (m = 0, p = 0): residual r = F(0), imbalance 0.
        work_nodes[_G, :] = 0.0
        assemble_laplacian(
            weight, from_node, to_node, node_position, band, work_nodes[_SC]
        )
        if not band_ldlt(band, work_nodes[_SC], PIVOT_FRACTION_DEFINITE, True):
            return False
        solve_increment(
            weight,
            loss0,
            work_nodes[_G],
            from_node,
            to_node,
            node_position,
            band,
            work_nodes[_X],
            pressure_Pa,
            mass_flow_kg_s,
        )
    return True


@njit(cache=True)
def _line_search(
    from_node,
    to_node,
    parts,
    mass_flow_kg_s,
    pressure_Pa,
    work_links,
    work_nodes,
    slope_floor_Pa_s_kg,
    tol_kg_s,
    tol_Pa,
):
    """Backtrack along (dm, dp) until the merit falls enough [3]_.

    Fills the trial rows of the workspaces. Returns whether a step was accepted,
    the trial's largest residual [Pa] and imbalance [kg/s], and the first
    non-finite link (-1 if none).
    """
    m_trial = work_links[_MT]
    p_trial = work_nodes[_PT]
    phi0 = merit(work_links[_R], work_links[_S], work_nodes[_G], slope_floor_Pa_s_kg)
    alpha = 1.0
    max_r = np.inf
    max_g = np.inf
    bad = -1
    for _ in range(_MAX_HALVINGS):
        for k in range(m_trial.shape[0]):
            m_trial[k] = mass_flow_kg_s[k] + alpha * work_links[_DM, k]
        for n in range(p_trial.shape[0]):
            p_trial[n] = pressure_Pa[n] + alpha * work_nodes[_DP, n]
        bad = evaluate_links(
            m_trial,
            parts[0],
            parts[1],
            parts[2],
            parts[3],
            parts[4],
            parts[5],
            parts[6],
            parts[7],
            parts[8],
            parts[9],
            parts[10],
            work_links[_FT],
            work_links[_ST],
        )
        max_r = link_residuals_Pa(
            work_links[_FT], p_trial, from_node, to_node, work_links[_RT]
        )
        max_g = node_imbalance_kg_s(m_trial, from_node, to_node, work_nodes[_GT])
        if bad < 0:
            if max_g <= tol_kg_s and max_r <= tol_Pa:
                return True, max_r, max_g, bad
            phi = merit(
                work_links[_RT], work_links[_S], work_nodes[_GT], slope_floor_Pa_s_kg
            )
            if phi <= (1.0 - 2.0 * _ARMIJO * alpha) * phi0:
                return True, max_r, max_g, bad
        alpha *= 0.5
    return False, max_r, max_g, bad


@njit(cache=True)
def _factor_and_step(
    exact,
    from_node,
    to_node,
    node_position,
    band,
    work_links,
    work_nodes,
    slope_floor_Pa_s_kg,
):
    """Weights, Laplacian, factor and increments of one Newton step.

    Returns whether the factorization succeeded.
    """
    weight = work_links[_W]
    n_negative = newton_weights(work_links[_S], slope_floor_Pa_s_kg, exact, weight)
    assemble_laplacian(weight, from_node, to_node, node_position, band, work_nodes[_SC])
    definite = n_negative == 0
    fraction = PIVOT_FRACTION_DEFINITE if definite else PIVOT_FRACTION_INDEFINITE
    if not band_ldlt(band, work_nodes[_SC], fraction, definite):
        return False
    solve_increment(
        weight,
        work_links[_R],
        work_nodes[_G],
        from_node,
        to_node,
        node_position,
        band,
        work_nodes[_X],
        work_nodes[_DP],
        work_links[_DM],
    )
    return True


@njit(cache=True)
def _has_rising_pump(slope_Pa_s_kg, slope_floor_Pa_s_kg):
    for k in range(slope_Pa_s_kg.shape[0]):
        if slope_Pa_s_kg[k] <= -slope_floor_Pa_s_kg:
            return True
    return False


@njit(cache=True)
def solve_network(
    from_node,
    to_node,
    length_m,
    inner_diameter_m,
    roughness_m,
    zeta,
    kv_m3_h,
    opening,
    pump_a0,
    pump_a1,
    pump_a2,
    pump_speed,
    temp_C,
    node_position,
    band,
    mass_flow_kg_s,
    pressure_Pa,
    work_links,
    work_nodes,
    cold_start,
    start_flow_kg_s,
    slope_floor_Pa_s_kg,
    tol_kg_s,
    tol_Pa,
    max_iter,
):
    """Link flows and node pressures of a closed network by Newton's method.

    Parameters
    ----------
    from_node, to_node : ndarray of int64
        Link end nodes. [-]
    length_m, inner_diameter_m, roughness_m, zeta, kv_m3_h, opening : ndarray
        Link pipe and valve data, per link. [m], [m], [m], [-], [m3/h], [-]
    pump_a0, pump_a1, pump_a2 : ndarray
        Pump curve per link at nominal speed, zeros for no pump.
        [Pa], [Pa s/m3], [Pa s2/m6]
    pump_speed : ndarray
        Pump speed relative to nominal, per link. [-]
    temp_C : ndarray
        Water temperature per link. [°C]
    node_position : ndarray of int64
        Row of each node in the reverse Cuthill-McKee ordered reduced Laplacian;
        -1 for the reference node. [-]
    band : ndarray, shape (n_nodes - 1, half_bandwidth + 1)
        Workspace for the banded Laplacian and its factor. [kg/(Pa s)]
    mass_flow_kg_s : ndarray
        Warm-start flows on entry (ignored on a cold start); solution on exit.
        [kg/s]
    pressure_Pa : ndarray
        Start pressures on entry (ignored on a cold start); solution on exit,
        zero at the reference node. [Pa]
    work_links : ndarray, shape (N_LINK_ROWS, n_links)
        Workspace. [-]
    work_nodes : ndarray, shape (N_NODE_ROWS, n_nodes)
        Workspace. [-]
    cold_start : bool
        Start from rest with two linear-theory passes instead of the given
        flows. [-]
    start_flow_kg_s : float
        Flow at which the cold start takes secant resistances. [kg/s]
    slope_floor_Pa_s_kg : float
        Smallest link slope magnitude used in a Newton step. [Pa s/kg]
    tol_kg_s : float
        Convergence tolerance on the largest node mass imbalance. [kg/s]
    tol_Pa : float
        Convergence tolerance on the largest link equation residual. [Pa]
    max_iter : int
        Most Laplacian factorizations (linear start included). [-]

    Returns
    -------
    status : int
        ``STATUS_CONVERGED``, ``STATUS_MAX_ITER``, ``STATUS_NOT_POSITIVE_DEFINITE``
        or ``STATUS_NOT_FINITE``. [-]
    iterations : int
        Laplacian factorizations done. [-]
    max_imbalance_kg_s : float
        Largest node mass imbalance at exit. [kg/s]
    max_residual_Pa : float
        Largest link equation residual at exit. [Pa]
    worst_node : int
        Node with the largest imbalance. [-]
    worst_link : int
        Link with the largest residual (the first non-finite link for
        ``STATUS_NOT_FINITE``). [-]

    Notes
    -----
    Global gradient algorithm [1]_ in increment form: with ``r = F(m) - A^T p``
    and ``g = A m``, solve ``(A W A^T) dp = A W r - g`` with ``W = D^-1`` and set
    ``dm = W (A^T dp - r)``. The step is damped by backtracking on
    ``sum((r/|D|)^2) + sum(g^2)`` [3]_. On convergence the flows are projected
    once onto mass balance with the last factor, so every node balances to
    round-off.
    """
    n_links = mass_flow_kg_s.shape[0]
    parts = (
        length_m,
        inner_diameter_m,
        roughness_m,
        zeta,
        kv_m3_h,
        opening,
        pump_a0,
        pump_a1,
        pump_a2,
        pump_speed,
        temp_C,
    )
    loss = work_links[_F]
    slope = work_links[_S]
    resid = work_links[_R]
    imb = work_nodes[_G]

    iterations = 0
    if cold_start:
        mass_flow_kg_s[:] = 0.0
        pressure_Pa[:] = 0.0
        iterations = 2
        if not _linear_start(
            from_node,
            to_node,
            parts,
            node_position,
            band,
            mass_flow_kg_s,
            pressure_Pa,
            work_links,
            work_nodes,
            start_flow_kg_s,
            slope_floor_Pa_s_kg,
        ):
            return STATUS_NOT_POSITIVE_DEFINITE, iterations, np.inf, np.inf, 0, 0

    bad = evaluate_links(mass_flow_kg_s, *parts, loss, slope)
    max_r = link_residuals_Pa(loss, pressure_Pa, from_node, to_node, resid)
    max_g = node_imbalance_kg_s(mass_flow_kg_s, from_node, to_node, imb)
    projected = False
    while True:
        if bad >= 0 or not (math.isfinite(max_r) and math.isfinite(max_g)):
            worst = bad if bad >= 0 else _worst_index(resid)
            return STATUS_NOT_FINITE, iterations, max_g, max_r, 0, worst
        if iterations > 0 and max_g <= tol_kg_s and max_r <= tol_Pa:
            if projected:
                break
            # Project onto mass balance with the last factor: solve with r = 0,
            # so dm = W A^T dp and A dm = -g. The correction is tiny, and so is
            # its round-off.
            work_links[_RT, :] = 0.0
            solve_increment(
                work_links[_W],
                work_links[_RT],
                imb,
                from_node,
                to_node,
                node_position,
                band,
                work_nodes[_X],
                work_nodes[_DP],
                work_links[_DM],
            )
            for k in range(n_links):
                mass_flow_kg_s[k] += work_links[_DM, k]
            bad = evaluate_links(mass_flow_kg_s, *parts, loss, slope)
            max_r = link_residuals_Pa(loss, pressure_Pa, from_node, to_node, resid)
            max_g = node_imbalance_kg_s(mass_flow_kg_s, from_node, to_node, imb)
            projected = True
            continue
        if iterations >= max_iter:
            return (
                STATUS_MAX_ITER,
                iterations,
                max_g,
                max_r,
                _worst_index(imb),
                _worst_index(resid),
            )

        # Exact Newton step first when some pump slope is negative, then |D|.
        accepted = False
        for exact in (True, False):
            if exact and not _has_rising_pump(slope, slope_floor_Pa_s_kg):
                continue
            iterations += 1
            if not _factor_and_step(
                exact,
                from_node,
                to_node,
                node_position,
                band,
                work_links,
                work_nodes,
                slope_floor_Pa_s_kg,
            ):
                if exact:
                    continue
                return (
                    STATUS_NOT_POSITIVE_DEFINITE,
                    iterations,
                    max_g,
                    max_r,
                    _worst_index(imb),
                    _worst_index(resid),
                )
            accepted, max_r, max_g, bad = _line_search(
                from_node,
                to_node,
                parts,
                mass_flow_kg_s,
                pressure_Pa,
                work_links,
                work_nodes,
                slope_floor_Pa_s_kg,
                tol_kg_s,
                tol_Pa,
            )
            if accepted:
                break
        # Without an acceptable step the shortest trial is taken; max_iter then
        # ends a stalled solve.
        mass_flow_kg_s[:] = work_links[_MT]
        pressure_Pa[:] = work_nodes[_PT]
        loss[:] = work_links[_FT]
        slope[:] = work_links[_ST]
        resid[:] = work_links[_RT]
        imb[:] = work_nodes[_GT]
        projected = False

    return (
        STATUS_CONVERGED,
        iterations,
        max_g,
        max_r,
        _worst_index(imb),
        _worst_index(resid),
    )
