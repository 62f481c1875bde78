"""The Newton driver of the flow solve (global gradient algorithm).

:func:`solve_network` runs one whole solve in compiled code, with no Python per
iteration, so the dynamics can call it from its own compiled right-hand side.
The smaller kernels here are the pieces of a step: link residuals and node
imbalances, the step's weights and merit, the line search, and the test that
ends a solve on a small last step.

References
----------
.. [1] E. Todini, S. Pilati, "A gradient algorithm for the analysis of pipe
   networks", in Computer Applications in Water Supply, vol. 1, Research Studies
   Press, 1988, pp. 1-20.
.. [2] J. E. Dennis, R. B. Schnabel, Numerical Methods for Unconstrained
   Optimization and Nonlinear Equations, SIAM, 1996, sec. 6.3 (backtracking) and
   sec. 7.2 (stopping on the step).
.. [3] C. T. Kelley, Iterative Methods for Linear and Nonlinear Equations, SIAM,
   1995, ch. 5 (the chord and Shamanskii methods).
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
from simheat.hydraulics._kernels.links import evaluate_links, prepare_links, pump_rise
from simheat.hydraulics._kernels.records import (
    C_MODE,
    START_COLD,
    START_FLOWS,
    START_FLOWS_PRESSURES,
    STATUS_CONVERGED,
    STATUS_MAX_ITER,
    STATUS_NOT_FINITE,
    STATUS_NOT_POSITIVE_DEFINITE,
    SolveResult,
    colebrook_memory,
    current_iterate,
    step_arrays,
    trial_iterate,
)
from simheat.hydraulics._kernels.starts import (
    LINEAR_START_PASSES,
    PIVOT_FRACTION_DEFINITE,
    hold_pressures,
    linear_start,
)
from simheat.physics._kernels import PUMP_MODE_FIXED_SPEED

# Armijo sufficient-decrease constant and the number of step halvings, [2] sec. 6.3.
_ARMIJO = 1e-4
_MAX_HALVINGS = 30
# The possibly indefinite exact Newton matrix (a pump on a rising stretch of its
# curve) must pass a stricter pivot test than the positive definite one, as a
# fallback with |D| exists. [-]
PIVOT_FRACTION_INDEFINITE = 1e-8
# After a converged solve every node must balance to this fraction of the largest
# link flow; otherwise the flows are projected onto mass balance once. [-]
BALANCE_RTOL = 1e-13
# Convergence on the step [2] sec. 7.2: an exact Newton step whose every flow
# increment is below STEP_RTOL of the link flow (plus STEP_FLOW_FLOOR_KG_S) is
# taken as the last one. Newton's error after it is of the order of the step
# squared (relative 1e-10), and its second-order residual, estimated per link as
# |D| dm^2 / (|m| + floor) (twice the exact value for a quadratic law), must also
# be below the pressure tolerance. [-], [kg/s]
STEP_RTOL = 1e-5
STEP_FLOW_FLOOR_KG_S = 1e-6
# A chord step (the factor of an earlier iterate) ends a solve only when the
# residual it leaves is at the round-off of the node pressures: below this
# fraction of the largest of them (about 450 machine epsilons), as well as below
# the tolerance. An exact Newton step usually ends a solve at round-off; the
# dynamics' finite-difference Jacobian relies on that, and a chord step left at
# the tolerance would add noise to it. [-]
CHORD_ROUNDOFF_RTOL = 1e-13


# ----------------------------------------------------------- step pieces


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
def _change_below(m_new, m_old, bound):
    """Whether every flow moved by at most ``bound (|m_old| + floor)``."""
    for k in range(m_new.shape[0]):
        if not abs(m_new[k] - m_old[k]) <= bound * (
            abs(m_old[k]) + STEP_FLOW_FLOOR_KG_S
        ):
            return False
    return True


@njit(cache=True)
def _residuals_and_imbalances(arrays, point):
    """Residuals and imbalances of an evaluated point; their largest values."""
    max_r = link_residuals_Pa(
        point.loss_Pa,
        point.pressure_Pa,
        arrays.from_node,
        arrays.to_node,
        point.residual_Pa,
    )
    max_g = node_imbalance_kg_s(
        point.flow_kg_s, arrays.from_node, arrays.to_node, point.imbalance_kg_s
    )
    return max_r, max_g


# ------------------------------------------------------------ Newton steps


@njit(cache=True)
def _line_search(arrays, memory, cur, trial, step, phi0, settings):
    """Backtrack along (dm, dp) until the merit falls enough [2]_.

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
            trial.flow_kg_s, arrays.coef, memory, trial.loss_Pa, trial.slope_Pa_s_kg
        )
        max_r, max_g = _residuals_and_imbalances(arrays, trial)
        if bad < 0:
            if max_g <= settings.tol_kg_s and max_r <= settings.tol_Pa:
                return True, max_r, max_g, bad, attempt + 1
            phi = merit(trial.residual_Pa, step.weight, trial.imbalance_kg_s)
            if phi <= (1.0 - 2.0 * _ARMIJO * alpha) * phi0:
                return True, max_r, max_g, bad, attempt + 1
        alpha *= 0.5
    return False, max_r, max_g, bad, _MAX_HALVINGS


@njit(cache=True)
def _factor_and_step(arrays, cur, step, exact, slope_floor_Pa_s_kg):
    """Weights, Laplacian, factor and increments of one Newton step from ``cur``.

    Returns whether the factorization succeeded, whether the step is an exact
    Newton step (every weight ``1/(dF/dm)``), and the merit at ``cur`` with
    these weights (for the line search). [kg2/s2]
    """
    n_negative, n_inexact = newton_weights(
        cur.slope_Pa_s_kg, slope_floor_Pa_s_kg, exact, step.weight
    )
    assemble_laplacian(arrays, step)
    definite = n_negative == 0
    fraction = PIVOT_FRACTION_DEFINITE if definite else PIVOT_FRACTION_INDEFINITE
    if not band_ldlt(arrays.band, step.row_scale, fraction, definite):
        return False, False, np.inf
    phi0 = solve_increment(arrays, step, cur.residual_Pa, cur.imbalance_kg_s)
    return True, n_inexact == 0, phi0


@njit(cache=True)
def _step_is_final(mass_flow_kg_s, dm, slope, weight, chord, coef, tol_Pa):
    """Whether a Newton step is small enough to be the last one.

    Every flow increment must be below ``STEP_RTOL * (|m| + STEP_FLOW_FLOOR_KG_S)``
    and the residual it leaves, estimated per link, below ``tol_Pa``. The
    estimate is the second-order term ``|D| dm^2 / (|m| + floor)`` plus the
    control-corner curvature of a regulated pump and, for a chord step (weights
    ``W`` of an earlier factor, ``chord`` True), the first-order term
    ``|D - 1/W| |dm|`` that the stale weights leave. Returns
    ``(final, estimated largest residual [Pa])``.
    """
    estimate = 0.0
    for k in range(mass_flow_kg_s.shape[0]):
        step = abs(dm[k])
        scale = abs(mass_flow_kg_s[k]) + STEP_FLOW_FLOOR_KG_S
        if not step <= STEP_RTOL * scale:  # NaN fails too
            return False, np.inf
        r2 = abs(slope[k]) * step * step / scale
        if chord:
            w = weight[k]
            r2 += abs(slope[k] - 1.0 / w) * step if w != 0.0 else np.inf
        if coef[C_MODE, k] > PUMP_MODE_FIXED_SPEED:
            _, _, corner = pump_rise(k, mass_flow_kg_s[k], coef)
            r2 += corner * step * step
        estimate = max(estimate, r2)
    return estimate <= tol_Pa, estimate


@njit(cache=True)
def _apply_final_step(arrays, cur, step, in_place):
    """Write the last iterate ``cur + step`` into the solution arrays.

    ``in_place`` says that ``cur`` is the solution arrays. Returns
    ``(applied, largest imbalance [kg/s])``; the step is not applied (and an
    in-place one is undone) unless every pressure is finite and every node
    balances to ``BALANCE_RTOL`` of the largest flow.
    """
    out_m, out_p = arrays.flow_kg_s, arrays.pressure_Pa
    m, p = cur.flow_kg_s, cur.pressure_Pa
    dm, dp = step.dm_kg_s, step.dp_Pa
    imb = cur.imbalance_kg_s
    from_node, to_node = arrays.from_node, arrays.to_node
    finite = True
    for n in range(out_p.shape[0]):
        out_p[n] = p[n] + dp[n]
        finite = finite and math.isfinite(out_p[n])
        imb[n] = 0.0
    scale = 0.0
    for k in range(out_m.shape[0]):
        v = m[k] + dm[k]
        out_m[k] = v
        imb[from_node[k]] += v
        imb[to_node[k]] -= v
        scale = max(scale, abs(v))
    max_g = 0.0
    for n in range(imb.shape[0]):
        max_g = max(max_g, abs(imb[n]))
    if finite and max_g <= BALANCE_RTOL * scale:
        return True, max_g
    # round-off did not balance: undo and go on as usual
    if in_place:
        for k in range(m.shape[0]):
            m[k] -= dm[k]
        for n in range(p.shape[0]):
            p[n] -= dp[n]
    return False, node_imbalance_kg_s(m, from_node, to_node, imb)


@njit(cache=True)
def _try_final_step(arrays, cur, step, swapped, chord, tol_Pa, max_g):
    """Take the step just solved for as the last one, if it passes.

    The one place a solve ends on a step (an exact Newton step, or a chord step
    with an earlier factor): :func:`_step_is_final`, then
    :func:`_apply_final_step`. Returns ``(done, max_g, estimate)``: whether the
    solution arrays now hold the result, the largest imbalance [kg/s] (updated
    when the step was tried but not applied), and the residual estimate [Pa].
    """
    final, estimate = _step_is_final(
        cur.flow_kg_s,
        step.dm_kg_s,
        cur.slope_Pa_s_kg,
        step.weight,
        chord,
        arrays.coef,
        tol_Pa,
    )
    if not final:
        return False, max_g, estimate
    applied, max_g = _apply_final_step(arrays, cur, step, not swapped)
    return applied, max_g, estimate


@njit(cache=True)
def _project_onto_balance(arrays, cur, zeros, step):
    """Correct the flows of ``cur`` onto mass balance with the last factor.

    Solves with ``r = 0`` (``zeros``, a scratch row), so ``dm = W A^T dp`` and
    ``A dm = -g``; the correction is tiny, and so is its round-off.
    """
    zeros[:] = 0.0
    solve_increment(arrays, step, zeros, cur.imbalance_kg_s)
    m, dm = cur.flow_kg_s, step.dm_kg_s
    for k in range(m.shape[0]):
        m[k] += dm[k]


@njit(cache=True)
def _finish(arrays, cur, swapped, result):
    """Leave the current iterate in the solution arrays and return ``result``."""
    if swapped:
        arrays.flow_kg_s[:] = cur.flow_kg_s
        arrays.pressure_Pa[:] = cur.pressure_Pa
    return result


@njit(cache=True)
def _stopped(status, cur, iterations, max_g, max_r, evaluations):
    """The result of a solve that stopped without converging at ``cur``."""
    return SolveResult(
        status,
        iterations,
        max_g,
        max_r,
        _worst_index(cur.imbalance_kg_s),
        _worst_index(cur.residual_Pa),
        evaluations,
    )


# ---------------------------------------------------------------- driver


@njit(cache=True)
def solve_network(arrays, settings, start):
    """Link flows and node pressures of a closed network by Newton's method.

    Parameters
    ----------
    arrays : FlowArrays
        The solver's arrays. ``operating`` holds the operating point; on entry
        ``flow_kg_s`` holds the start flows (ignored on a cold start) and
        ``pressure_Pa`` the start pressures (``START_FLOWS_PRESSURES`` only); on
        exit they hold the solution, zero pressure at the reference node. The
        Colebrook-White rows of ``work_links`` keep warm starts between solves;
        every other workspace row is scratch.
    settings : SolveSettings
        Cold-start flow, slope floor, tolerances and iteration limit.
    start : int
        ``START_COLD``, ``START_FLOWS`` or ``START_FLOWS_PRESSURES``. [-]

    Returns
    -------
    SolveResult
        Status, iterations, largest imbalance and residual, where they are, and
        the number of evaluations of every link law.

    Notes
    -----
    Global gradient algorithm [1]_ in increment form: with ``r = F(m) - A^T p``
    and ``g = A m``, solve ``(A W A^T) dp = A W r - g`` with ``W = D^-1`` and set
    ``dm = W (A^T dp - r)``. The step is damped by backtracking on
    ``sum((r/|D|)^2) + sum(g^2)`` [2]_. A pump on a rising stretch of its curve
    gives ``D < 0``: the exact step is tried first, then the step with ``|D|``.
    The solve ends when both tolerances hold at an evaluated iterate, or when a
    last step passes :func:`_try_final_step`: an exact Newton step, or a chord
    step [3]_ with the factor of an earlier iterate of the same solve, held to a
    residual at the round-off of the pressures (``CHORD_ROUNDOFF_RTOL``) and
    tried first when the last step moved every flow by less than that bound
    over ``max_residual`` of itself. The step is then applied (``A dm = -g``
    makes every node balance to round-off) and ``max_residual_Pa`` is the
    estimate of the residual it leaves. Every node must balance to
    ``BALANCE_RTOL`` of the largest flow; after damped steps the flows are
    projected onto mass balance once with the last factor. The line search
    builds its trial point in a second set of workspace rows; an accepted trial
    swaps the two sets (nothing is copied).
    """
    prepare_links(arrays.data, arrays.operating, arrays.coef, arrays.prepared_for)
    cur = current_iterate(arrays)
    trial = trial_iterate(arrays)
    step = step_arrays(arrays)
    memory = colebrook_memory(arrays.work_links)
    tol_kg_s, tol_Pa = settings.tol_kg_s, settings.tol_Pa
    slope_floor = settings.slope_floor_Pa_s_kg

    iterations = 0
    evaluations = 0
    if start == START_COLD:
        cur.flow_kg_s[:] = 0.0
        cur.pressure_Pa[:] = 0.0
        memory.x[:] = 0.0
        iterations = LINEAR_START_PASSES
        evaluations = LINEAR_START_PASSES
        if not linear_start(arrays, cur, trial, step, memory, settings):
            return SolveResult(
                STATUS_NOT_POSITIVE_DEFINITE,
                iterations,
                np.inf,
                np.inf,
                0,
                0,
                evaluations,
            )
    elif start == START_FLOWS:
        cur.pressure_Pa[:] = 0.0

    bad = evaluate_links(
        cur.flow_kg_s, arrays.coef, memory, cur.loss_Pa, cur.slope_Pa_s_kg
    )
    evaluations += 1
    max_r = link_residuals_Pa(
        cur.loss_Pa, cur.pressure_Pa, arrays.from_node, arrays.to_node, cur.residual_Pa
    )
    if start == START_FLOWS_PRESSURES and bad < 0:
        max_r = hold_pressures(arrays, memory, cur, trial, tol_Pa)
    max_g = node_imbalance_kg_s(
        cur.flow_kg_s, arrays.from_node, arrays.to_node, cur.imbalance_kg_s
    )
    swapped = False  # cur is the trial rows, trial the solution arrays
    projected = False
    # band and step.weight hold a factor made at an earlier iterate of this
    # solve, and trial the iterate before cur
    have_factor = False
    while True:
        if bad >= 0 or not (math.isfinite(max_r) and math.isfinite(max_g)):
            worst = bad if bad >= 0 else _worst_index(cur.residual_Pa)
            result = SolveResult(
                STATUS_NOT_FINITE, iterations, max_g, max_r, 0, worst, evaluations
            )
            return _finish(arrays, cur, swapped, result)
        if max_g <= tol_kg_s and max_r <= tol_Pa:
            if projected or max_g <= BALANCE_RTOL * _max_abs(cur.flow_kg_s):
                break
            if not have_factor:
                iterations += 1
                have_factor, _, _ = _factor_and_step(
                    arrays, cur, step, False, slope_floor
                )
                if not have_factor:
                    result = _stopped(
                        STATUS_NOT_POSITIVE_DEFINITE,
                        cur,
                        iterations,
                        max_g,
                        max_r,
                        evaluations,
                    )
                    return _finish(arrays, cur, swapped, result)
            _project_onto_balance(arrays, cur, trial.residual_Pa, step)
            bad = evaluate_links(
                cur.flow_kg_s, arrays.coef, memory, cur.loss_Pa, cur.slope_Pa_s_kg
            )
            evaluations += 1
            max_r, max_g = _residuals_and_imbalances(arrays, cur)
            projected = True
            continue
        if iterations >= settings.max_iter:
            result = _stopped(
                STATUS_MAX_ITER, cur, iterations, max_g, max_r, evaluations
            )
            return _finish(arrays, cur, swapped, result)

        # A chord step as the last one: the factor of an earlier iterate, when
        # the last step was small enough that the weights it left stale likely
        # leave less than the round-off bound (relative change times max_r
        # estimates the first-order term of _step_is_final). A band solve, no
        # factorization, no evaluation.
        if have_factor:
            chord_tol = min(tol_Pa, CHORD_ROUNDOFF_RTOL * _max_abs(cur.pressure_Pa))
            bound = chord_tol / max_r if max_r > 0.0 else np.inf
            if _change_below(cur.flow_kg_s, trial.flow_kg_s, bound):
                solve_increment(arrays, step, cur.residual_Pa, cur.imbalance_kg_s)
                done, max_g, estimate = _try_final_step(
                    arrays, cur, step, swapped, True, chord_tol, max_g
                )
                if done:
                    return _converged_on_step(
                        cur, step, iterations, max_g, estimate, evaluations
                    )

        # Exact Newton step first when some pump slope is negative, then |D|.
        accepted = False
        for exact in (True, False):
            if exact and not _has_rising_pump(cur.slope_Pa_s_kg, slope_floor):
                continue
            iterations += 1
            have_factor, exact_step, phi0 = _factor_and_step(
                arrays, cur, step, exact, slope_floor
            )
            if not have_factor:
                if exact:
                    continue
                result = _stopped(
                    STATUS_NOT_POSITIVE_DEFINITE,
                    cur,
                    iterations,
                    max_g,
                    max_r,
                    evaluations,
                )
                return _finish(arrays, cur, swapped, result)
            if exact_step:
                done, max_g, estimate = _try_final_step(
                    arrays, cur, step, swapped, False, tol_Pa, max_g
                )
                if done:
                    return _converged_on_step(
                        cur, step, iterations, max_g, estimate, evaluations
                    )
            accepted, max_r, max_g, bad, trials = _line_search(
                arrays, memory, cur, trial, step, phi0, settings
            )
            evaluations += trials
            if accepted:
                break
        # Without an acceptable step the shortest trial is taken; max_iter then
        # ends a stalled solve.
        cur, trial = trial, cur
        swapped = not swapped
        projected = False

    result = SolveResult(
        STATUS_CONVERGED,
        iterations,
        max_g,
        max_r,
        _worst_index(cur.imbalance_kg_s),
        _worst_index(cur.residual_Pa),
        evaluations,
    )
    return _finish(arrays, cur, swapped, result)


@njit(cache=True)
def _converged_on_step(cur, step, iterations, max_g, estimate, evaluations):
    """The result of a solve that ended on a last step (see _try_final_step)."""
    return SolveResult(
        STATUS_CONVERGED,
        iterations,
        max_g,
        estimate,
        _worst_index(cur.imbalance_kg_s),
        _worst_index(step.dm_kg_s),
        evaluations,
    )
