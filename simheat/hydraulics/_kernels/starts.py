"""Starting points of the Newton iteration: from rest, and from a solution.

A cold start makes linear-theory passes, each link replaced by a secant
resistance [1]_. A warm start from a previous solution with its pressures first
re-solves, at those pressures, the few links whose own equation no longer holds
(a valve that moved), which leaves Newton a small, nearly linear correction.

References
----------
.. [1] D. J. Wood, C. O. A. Charles, "Hydraulic network analysis using linear
   theory", J. Hydraul. Div. ASCE 98(7), 1972.
"""

from __future__ import annotations

import math

import numpy as np

from simheat._jit import njit
from simheat.hydraulics._kernels.laplacian import (
    assemble_laplacian,
    band_ldlt,
    solve_increment,
)
from simheat.hydraulics._kernels.links import evaluate_link_range, pump_rise
from simheat.hydraulics._kernels.records import C_MODE, StepArrays

# Linear-theory passes of a cold start (see linear_start). [-]
LINEAR_START_PASSES = 4
# A pivot smaller than this fraction of its row's absolute weight sum means a
# singular matrix, for a positive definite (|D|) Laplacian. [-]
PIVOT_FRACTION_DEFINITE = 1e-14
# A warm start from flows and pressures re-solves, at those pressures, the links
# whose residual exceeds this fraction of their pressure drop. [-]
HOLD_PRESSURE_RTOL = 1e-2
# Most evaluations of solve_link_for_dp. [-]
_LINK_SOLVE_MAX_ITER = 40


@njit(cache=True)
def linear_start(net, cur, trial, step, memory, settings):
    """Linear-theory passes from rest: each link replaced by a secant resistance.

    Pass 1 takes every link's secant between zero flow and
    ``settings.start_flow_kg_s``; pass 2 the secant at the pass-1 flow (a Picard
    step); the later passes the secant at the geometric mean of the previous
    reference flow and the flow it gave, which is exact for a purely quadratic
    loss law at fixed pressure difference [1]_. Flows too small to take a secant
    at are held at 1e-3 of the start flow. ``LINEAR_START_PASSES`` passes are
    made.

    Parameters
    ----------
    net : NetworkArrays
        The network (``coef`` prepared; ``band`` is overwritten). [-]
    cur : Iterate
        Written: the flows and pressures of the last pass; its loss row holds
        every link's loss at zero flow, its imbalance row zeros. [SI]
    trial : Iterate
        Scratch rows (reference flows, their losses and slopes). [SI]
    step : StepArrays
        Scratch for the step's weights and Laplacian. [SI]
    memory : ColebrookMemory
        The Colebrook-White warm starts (reset by the caller). [-]
    settings : SolveSettings
        ``start_flow_kg_s`` and ``slope_floor_Pa_s_kg`` are used. [SI]

    Returns
    -------
    bool
        False when a Laplacian could not be factored.
    """
    coef = net.coef
    loss0 = cur.loss_Pa
    weight = step.weight
    m_ref = trial.flow_kg_s
    loss_ref = trial.loss_Pa
    mass_flow_kg_s = cur.flow_kg_s
    n_links = mass_flow_kg_s.shape[0]
    start_flow = settings.start_flow_kg_s
    m_small = 1e-3 * start_flow
    # From rest (m = 0, p = 0): residual r = F(0), imbalance 0; the increments
    # of each pass are the new flows and pressures themselves.
    from_rest = StepArrays(
        weight, mass_flow_kg_s, cur.pressure_Pa, step.reduced, step.row_scale
    )
    for k in range(n_links):  # only a pump has a loss at zero flow
        loss0[k] = -pump_rise(k, 0.0, coef)[0] if coef[C_MODE, k] >= 0.0 else 0.0
    for sweep in range(LINEAR_START_PASSES):
        for k in range(n_links):
            m = mass_flow_kg_s[k]
            if sweep == 0:
                m_ref[k] = start_flow
            elif sweep == 1:
                m_ref[k] = math.copysign(max(abs(m), m_small), m)
            else:
                m_abs = max(abs(m), m_small)
                m_ref[k] = math.copysign(math.sqrt(abs(m_ref[k]) * m_abs), m)
        evaluate_link_range(
            m_ref, coef, memory, loss_ref, trial.slope_Pa_s_kg, 0, n_links, False
        )
        for k in range(n_links):
            secant = (loss_ref[k] - loss0[k]) / m_ref[k]
            weight[k] = 1.0 / max(abs(secant), settings.slope_floor_Pa_s_kg)
        cur.imbalance_kg_s[:] = 0.0
        assemble_laplacian(net, step)
        if not band_ldlt(net.band, step.row_scale, PIVOT_FRACTION_DEFINITE, True):
            return False
        solve_increment(net, from_rest, loss0, cur.imbalance_kg_s)
    return True


@njit(cache=True)
def hold_pressures(net, memory, cur, scratch, tol_Pa):
    """Re-solve the links whose equation fails at the given pressures.

    A warm start from a previous solution after a change at a few links (a valve
    moved) leaves those links' equations badly off while the rest still hold.
    Each such link without a pump gets the flow its new law passes at the held
    pressure difference, so that Newton starts with only a mass imbalance to
    spread, which it does in a nearly linear step. Links with a pump keep their
    flow (their law need not be monotone).

    Parameters
    ----------
    net : NetworkArrays
        The network (``coef`` prepared). [-]
    memory : ColebrookMemory
        The Colebrook-White warm starts. [-]
    cur : Iterate
        The start point, with every link's law and residual evaluated; flows,
        losses, slopes and residuals are updated for the links changed. [SI]
    scratch : Iterate
        Scratch rows for the single-link solves. [SI]
    tol_Pa : float
        The solve's residual tolerance. [Pa]

    Returns
    -------
    float
        The largest link residual after. [Pa]
    """
    coef = net.coef
    from_node, to_node = net.from_node, net.to_node
    mass_flow_kg_s, pressure_Pa = cur.flow_kg_s, cur.pressure_Pa
    loss, slope, resid = cur.loss_Pa, cur.slope_Pa_s_kg, cur.residual_Pa
    worst = 0.0
    for k in range(mass_flow_kg_s.shape[0]):
        r = resid[k]
        if coef[C_MODE, k] < 0.0:
            # resid = loss - (p_from - p_to)
            held = loss[k] - r
            if abs(r) > HOLD_PRESSURE_RTOL * (abs(loss[k]) + abs(held)) + tol_Pa:
                dp = pressure_Pa[from_node[k]] - pressure_Pa[to_node[k]]
                m, ok, f, s = solve_link_for_dp(
                    k, dp, mass_flow_kg_s[k], coef, memory, scratch
                )
                if ok:
                    mass_flow_kg_s[k] = m
                    loss[k] = f
                    slope[k] = s
                    r = f - dp
                    resid[k] = r
        worst = max(worst, abs(r))
    return worst


@njit(cache=True)
def solve_link_for_dp(k, dp_Pa, m_start, coef, memory, scratch):
    """Flow through link ``k`` at which its loss equals ``dp_Pa`` (no pump).

    Safeguarded Newton's method on the increasing link law, taken in
    logarithms where flow, loss and ``dp_Pa`` share a sign (one step is exact
    for a power law ``F = c m^n``, and the laws here lie between n = 1 and 2);
    each evaluation narrows a bracket around the root, and a step leaving it
    bisects.

    Parameters
    ----------
    k : int
        Link index; the link must have no pump (its law is then increasing). [-]
    dp_Pa : float
        Pressure difference ``p_from - p_to`` to meet. [Pa]
    m_start : float
        First guess. [kg/s]
    coef : ndarray
        Constants from :func:`prepare_links`. [SI]
    memory : ColebrookMemory
        The Colebrook-White warm starts; read and updated. [-]
    scratch : Iterate
        Rows whose entry ``k`` (flow, loss, slope) may be overwritten. [-]

    Returns
    -------
    (mass_flow_kg_s, converged, loss_Pa, slope_Pa_s_kg) : tuple
        The flow [kg/s], whether it meets ``dp_Pa`` to 1e-10 relative, and the
        link's loss [Pa] and slope [Pa s/kg] at that flow.
    """
    flow = scratch.flow_kg_s
    loss_out = scratch.loss_Pa
    slope_out = scratch.slope_Pa_s_kg
    lo = -np.inf
    hi = np.inf
    m = m_start
    loss = np.nan
    slope = np.nan
    for _ in range(_LINK_SOLVE_MAX_ITER):
        flow[k] = m
        evaluate_link_range(flow, coef, memory, loss_out, slope_out, k, k + 1, True)
        loss = loss_out[k]
        slope = slope_out[k]
        gap = loss - dp_Pa
        if abs(gap) <= 1e-10 * abs(dp_Pa) + 1e-12:
            return m, True, loss, slope
        if gap > 0.0:
            hi = m
        else:
            lo = m
        if slope > 0.0 and m * loss > 0.0 and loss * dp_Pa > 0.0:
            # Newton on log F against log m: local exponent n = m D / F
            m_new = m * (dp_Pa / loss) ** (loss / (m * slope))
        elif slope > 0.0:
            m_new = m - gap / slope
        else:
            m_new = np.nan
        if not (lo < m_new < hi):
            if math.isfinite(lo) and math.isfinite(hi):
                m_new = 0.5 * (lo + hi)
            else:
                reach = 2.0 * max(abs(m), 1e-6)
                m_new = m - reach if gap > 0.0 else m + reach
        m = m_new
    return m, False, loss, slope
