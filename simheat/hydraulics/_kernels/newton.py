"""The Newton driver of the flow solve (global gradient algorithm).

:func:`solve_network` runs one whole solve in compiled code, with no Python per
iteration, so the dynamics can call it from its own compiled right-hand side.
The kernels beside it decide how a solve ends: on a small last step (an exact
Newton step, or a chord step with an earlier factor, :func:`_try_final_step`),
or stopped with the worst node and link named. The pieces of a step are in
:mod:`.steps`, the starting points in :mod:`.starts`.

The loop of :func:`solve_network` stays in one function (about 150 lines):
every call into a compiled helper that receives the iterate records
reference-counts their arrays, and with the loop's branches as helpers a
9-emitter network's solve took about 2 µs (10 %) longer. Its exits share
:func:`_finish`, :func:`_stopped` and :func:`_converged_on_step`.

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
from simheat.hydraulics._kernels.laplacian import solve_increment
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
    network_arrays,
    step_arrays,
    trial_iterate,
)
from simheat.hydraulics._kernels.starts import (
    LINEAR_START_PASSES,
    hold_pressures,
    linear_start,
)
from simheat.hydraulics._kernels.steps import (
    _factor_and_step,
    _has_rising_pump,
    _line_search,
    _max_abs,
    _project_onto_balance,
    _residuals_and_imbalances,
    _worst_index,
    link_residuals_Pa,
    node_imbalance_kg_s,
)
from simheat.physics._kernels import PUMP_MODE_FIXED_SPEED

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


@njit(cache=True)
def _change_below(m_new, m_old, bound):
    """Whether every flow moved by at most ``bound (|m_old| + floor)``."""
    for k in range(m_new.shape[0]):
        if not abs(m_new[k] - m_old[k]) <= bound * (
            abs(m_old[k]) + STEP_FLOW_FLOOR_KG_S
        ):
            return False
    return True


# ------------------------------------------------------------ Newton steps


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
def _apply_final_step(net, solution, cur, step, in_place):
    """Write the last iterate ``cur + step`` into the solution arrays.

    ``solution`` is the iterate of the solution arrays; ``in_place`` says that
    ``cur`` is it. Returns
    ``(applied, largest imbalance [kg/s])``; the step is not applied (and an
    in-place one is undone) unless every pressure is finite and every node
    balances to ``BALANCE_RTOL`` of the largest flow.
    """
    out_m, out_p = solution.flow_kg_s, solution.pressure_Pa
    m, p = cur.flow_kg_s, cur.pressure_Pa
    dm, dp = step.dm_kg_s, step.dp_Pa
    imb = cur.imbalance_kg_s
    from_node, to_node = net.from_node, net.to_node
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
def _try_final_step(net, solution, cur, step, swapped, chord, tol_Pa, max_g):
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
        net.coef,
        tol_Pa,
    )
    if not final:
        return False, max_g, estimate
    applied, max_g = _apply_final_step(net, solution, cur, step, not swapped)
    return applied, max_g, estimate


@njit(cache=True)
def _copy(source, target):
    """``target[:] = source`` for arrays of one length.

    Without the slice assignment's shape check, whose error message takes
    seconds to compile.
    """
    for k in range(source.shape[0]):
        target[k] = source[k]


@njit(cache=True)
def _finish(solution, cur, swapped, result):
    """Leave the current iterate in the solution arrays and return ``result``."""
    if swapped:
        _copy(cur.flow_kg_s, solution.flow_kg_s)
        _copy(cur.pressure_Pa, solution.pressure_Pa)
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
        every other workspace row is scratch. Units on the record's fields. [-]
    settings : SolveSettings
        Cold-start flow, slope floor, tolerances and iteration limit; units on
        the record's fields. [-]
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
    net = network_arrays(arrays)
    solution = cur = current_iterate(arrays)
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
        if not linear_start(net, cur, trial, step, memory, settings):
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
        cur.flow_kg_s, net.coef, memory, cur.loss_Pa, cur.slope_Pa_s_kg
    )
    evaluations += 1
    max_r = link_residuals_Pa(
        cur.loss_Pa, cur.pressure_Pa, net.from_node, net.to_node, cur.residual_Pa
    )
    if start == START_FLOWS_PRESSURES and bad < 0:
        max_r = hold_pressures(net, memory, cur, trial, tol_Pa)
    max_g = node_imbalance_kg_s(
        cur.flow_kg_s, net.from_node, net.to_node, cur.imbalance_kg_s
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
            return _finish(solution, cur, swapped, result)
        if max_g <= tol_kg_s and max_r <= tol_Pa:
            if projected or max_g <= BALANCE_RTOL * _max_abs(cur.flow_kg_s):
                break
            if not have_factor:
                iterations += 1
                have_factor, _, _ = _factor_and_step(net, cur, step, False, slope_floor)
                if not have_factor:
                    result = _stopped(
                        STATUS_NOT_POSITIVE_DEFINITE,
                        cur,
                        iterations,
                        max_g,
                        max_r,
                        evaluations,
                    )
                    return _finish(solution, cur, swapped, result)
            _project_onto_balance(net, cur, trial.residual_Pa, step)
            bad = evaluate_links(
                cur.flow_kg_s, net.coef, memory, cur.loss_Pa, cur.slope_Pa_s_kg
            )
            evaluations += 1
            max_r, max_g = _residuals_and_imbalances(net, cur)
            projected = True
            continue
        if iterations >= settings.max_iter:
            result = _stopped(
                STATUS_MAX_ITER, cur, iterations, max_g, max_r, evaluations
            )
            return _finish(solution, cur, swapped, result)

        # A chord step as the last one: the factor of an earlier iterate, when
        # the last step was small enough that the weights it left stale likely
        # leave less than the round-off bound (relative change times max_r
        # estimates the first-order term of _step_is_final). A band solve, no
        # factorization, no evaluation.
        if have_factor:
            chord_tol = min(tol_Pa, CHORD_ROUNDOFF_RTOL * _max_abs(cur.pressure_Pa))
            bound = chord_tol / max_r if max_r > 0.0 else np.inf
            if _change_below(cur.flow_kg_s, trial.flow_kg_s, bound):
                solve_increment(net, step, cur.residual_Pa, cur.imbalance_kg_s)
                done, max_g, estimate = _try_final_step(
                    net, solution, cur, step, swapped, True, chord_tol, max_g
                )
                if done:
                    return _converged_on_step(
                        cur, step, iterations, max_g, estimate, evaluations
                    )

        # Exact Newton step first when some pump slope is negative, then |D|.
        accepted = False
        searched = False  # a line search left its shortest trial in `trial`
        for exact in (True, False):
            if exact and not _has_rising_pump(cur.slope_Pa_s_kg, slope_floor):
                continue
            if not exact and iterations >= settings.max_iter:
                # the fallback factorization would pass max_iter: stop at the
                # exact step's shortest trial, or here when there was none
                if searched:
                    break
                result = _stopped(
                    STATUS_MAX_ITER, cur, iterations, max_g, max_r, evaluations
                )
                return _finish(solution, cur, swapped, result)
            iterations += 1
            have_factor, exact_step, phi0 = _factor_and_step(
                net, cur, step, exact, slope_floor
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
                return _finish(solution, cur, swapped, result)
            if exact_step:
                done, max_g, estimate = _try_final_step(
                    net, solution, cur, step, swapped, False, tol_Pa, max_g
                )
                if done:
                    return _converged_on_step(
                        cur, step, iterations, max_g, estimate, evaluations
                    )
            accepted, max_r, max_g, bad, trials = _line_search(
                net, memory, cur, trial, step, phi0, settings
            )
            evaluations += trials
            searched = True
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
    return _finish(solution, cur, swapped, result)


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
