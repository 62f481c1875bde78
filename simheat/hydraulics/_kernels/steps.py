"""The pieces of one Newton step of the flow solve.

Link residuals and node imbalances of an iterate, the step's link weights
``1/D``, the banded Laplacian's factor and the increments it gives, the merit
the line search backtracks on [1]_, and the projection of flows onto mass
balance.

References
----------
.. [1] J. E. Dennis, R. B. Schnabel, Numerical Methods for Unconstrained
   Optimization and Nonlinear Equations, SIAM, 1996, sec. 6.3 (backtracking).
"""

from __future__ import annotations

import numpy as np

from simheat._jit import njit
from simheat.hydraulics._kernels.laplacian import (
    assemble_laplacian,
    band_ldlt,
    solve_increment,
)
from simheat.hydraulics._kernels.links import evaluate_links
from simheat.hydraulics._kernels.starts import PIVOT_FRACTION_DEFINITE

# Armijo sufficient-decrease constant and the number of step halvings, [1] sec. 6.3.
_ARMIJO = 1e-4
_MAX_HALVINGS = 30
# The possibly indefinite exact Newton matrix (a pump on a rising stretch of its
# curve) must pass a stricter pivot test than the positive definite one, as a
# fallback with |D| exists. [-]
PIVOT_FRACTION_INDEFINITE = 1e-8


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
    n_negative : int
        Number of negative weights. [-]
    n_inexact : int
        Number of weights that are not ``1/dF/dm`` (floored or sign-flipped). [-]
    """
    n_negative = 0
    n_inexact = 0
    for k in range(slope_Pa_s_kg.shape[0]):
        s = slope_Pa_s_kg[k]
        if s >= slope_floor_Pa_s_kg:
            weight_out[k] = 1.0 / s
        elif exact and s <= -slope_floor_Pa_s_kg:
            weight_out[k] = 1.0 / s
            n_negative += 1
        else:
            weight_out[k] = 1.0 / max(abs(s), slope_floor_Pa_s_kg)
            n_inexact += 1
    return n_negative, n_inexact


@njit(cache=True)
def merit(residual_Pa, weight, imbalance_kg_s):
    """Line-search merit: squared link residuals in flow units plus imbalances.

    Parameters
    ----------
    residual_Pa : ndarray
        Link residuals. [Pa]
    weight : ndarray
        Link weights of the Newton step (:func:`newton_weights`); ``|weight|``
        is ``1 / max(|dF/dm|, floor)`` and scales residuals to flows.
        [kg/(Pa s)]
    imbalance_kg_s : ndarray
        Node imbalances. [kg/s]

    Returns
    -------
    float
        ``sum((r/|D|)**2) + sum(g**2)``; an exact Newton step is a descent
        direction of it for any fixed positive scaling. [kg2/s2]
    """
    total = 0.0
    for k in range(residual_Pa.shape[0]):
        q = residual_Pa[k] * weight[k]
        total += q * q
    for n in range(imbalance_kg_s.shape[0]):
        total += imbalance_kg_s[n] * imbalance_kg_s[n]
    return total


@njit(cache=True)
def _worst_index(values):
    worst = 0
    for k in range(values.shape[0]):
        if abs(values[k]) > abs(values[worst]):
            worst = k
    return worst


@njit(cache=True)
def _max_abs(values):
    scale = 0.0
    for k in range(values.shape[0]):
        scale = max(scale, abs(values[k]))
    return scale


@njit(cache=True)
def _has_rising_pump(slope_Pa_s_kg, slope_floor_Pa_s_kg):
    for k in range(slope_Pa_s_kg.shape[0]):
        if slope_Pa_s_kg[k] <= -slope_floor_Pa_s_kg:
            return True
    return False


@njit(cache=True)
def _residuals_and_imbalances(net, point):
    """Residuals and imbalances of an evaluated point; their largest values."""
    max_r = link_residuals_Pa(
        point.loss_Pa,
        point.pressure_Pa,
        net.from_node,
        net.to_node,
        point.residual_Pa,
    )
    max_g = node_imbalance_kg_s(
        point.flow_kg_s, net.from_node, net.to_node, point.imbalance_kg_s
    )
    return max_r, max_g


@njit(cache=True)
def _line_search(net, memory, cur, trial, step, phi0, settings):
    """Backtrack along (dm, dp) until the merit falls enough [1]_.

    Fills ``trial``; ``step.weight`` are the step's Newton weights, which scale
    the merit, and ``phi0`` the merit at ``cur``. Returns whether a step was
    accepted, the trial's largest residual [Pa] and imbalance [kg/s], the first
    non-finite link (-1 if none), and the number of trials evaluated.
    """
    alpha = 1.0
    max_r = np.inf
    max_g = np.inf
    bad = -1
    dm, dp = step.dm_kg_s, step.dp_Pa
    for attempt in range(_MAX_HALVINGS):
        for k in range(dm.shape[0]):
            trial.flow_kg_s[k] = cur.flow_kg_s[k] + alpha * dm[k]
        for n in range(dp.shape[0]):
            trial.pressure_Pa[n] = cur.pressure_Pa[n] + alpha * dp[n]
        bad = evaluate_links(
            trial.flow_kg_s, net.coef, memory, trial.loss_Pa, trial.slope_Pa_s_kg
        )
        max_r, max_g = _residuals_and_imbalances(net, trial)
        if bad < 0:
            if max_g <= settings.tol_kg_s and max_r <= settings.tol_Pa:
                return True, max_r, max_g, bad, attempt + 1
            phi = merit(trial.residual_Pa, step.weight, trial.imbalance_kg_s)
            if phi <= (1.0 - 2.0 * _ARMIJO * alpha) * phi0:
                return True, max_r, max_g, bad, attempt + 1
        alpha *= 0.5
    return False, max_r, max_g, bad, _MAX_HALVINGS


@njit(cache=True)
def _factor_and_step(net, cur, step, exact, slope_floor_Pa_s_kg):
    """Weights, Laplacian, factor and increments of one Newton step from ``cur``.

    Returns whether the factorization succeeded, whether the step is an exact
    Newton step (every weight ``1/(dF/dm)``), and the merit at ``cur`` with
    these weights (for the line search). [kg2/s2]
    """
    n_negative, n_inexact = newton_weights(
        cur.slope_Pa_s_kg, slope_floor_Pa_s_kg, exact, step.weight
    )
    assemble_laplacian(net, step)
    definite = n_negative == 0
    fraction = PIVOT_FRACTION_DEFINITE if definite else PIVOT_FRACTION_INDEFINITE
    if not band_ldlt(net.band, step.row_scale, fraction, definite):
        return False, False, np.inf
    phi0 = solve_increment(net, step, cur.residual_Pa, cur.imbalance_kg_s)
    return True, n_inexact == 0, phi0


@njit(cache=True)
def _project_onto_balance(net, cur, zeros, step):
    """Correct the flows of ``cur`` onto mass balance with the last factor.

    Solves with ``r = 0`` (``zeros``, a scratch row), so ``dm = W A^T dp`` and
    ``A dm = -g``; the correction is tiny, and so is its round-off.
    """
    zeros[:] = 0.0
    solve_increment(net, step, zeros, cur.imbalance_kg_s)
    m, dm = cur.flow_kg_s, step.dm_kg_s
    for k in range(m.shape[0]):
        m[k] += dm[k]
