"""The house's steady state with the heating on: the evening before the night.

The run starts when the heating goes off (``[schedule] off_from``) from the state
the house settles into with the heating holding the comfort setpoints: rooms,
structure, every water cell, the heads' sensors. That state is solved for, not
integrated to: pseudo-transient continuation (implicit Euler steps whose length
grows as the residual falls, switched evolution relaxation) on the model's own
right-hand side, with its compiled sparse Jacobian, ends in Newton's method on
``dy/dt = 0``, after a short integration that lets the water settle.
"""

from __future__ import annotations

import numpy as np
import scipy.sparse
from scipy.integrate import solve_ivp
from scipy.sparse.linalg import splu

from simheat.dynamics import controls
from simheat.errors import ConvergenceError

__all__ = ["steady_guess", "steady_state"]

# The water settles first: the model is integrated this long (pseudo-time at the
# held outdoor and flow temperatures) from the guess, with a loose tolerance; the
# water's own time scales are minutes, the rooms' tens of hours. [s], [-]
SETTLE_S = 1800.0
SETTLE_RTOL = 1e-3
# A settled start that does not converge settles this many times longer. [-]
SETTLE_MORE = 4.0
SETTLE_ATTEMPTS = 3
# First pseudo-time step of the continuation, and its largest growth per step. [s]
FIRST_STEP_S = 1e6
STEP_GROWTH_MAX = 10.0
LONGEST_STEP_S = 1e12
# The LU of (I/dt - J) is reused while a full step cuts the residual at least
# this much; otherwise the Jacobian is evaluated afresh. [-]
CHORD_RATIO = 0.25
# Steps are halved (at most this often) until the residual norm falls. [-]
MAX_HALVINGS = 10
# Converged when every water cell and room node misses its heat balance by less
# than this (a room with a 100 W/K loss is then within 1e-4 K of its steady
# temperature, a radiator cell with 40 W/K of flow within 3e-4 K) [W] and every
# head's sensor is within SENSOR_TOL_K of its room's air. [K]
HEAT_TOL_W = 1e-2
SENSOR_TOL_K = 1e-5
MAX_ITERATIONS = 40


def steady_guess(wm, time_s: float) -> np.ndarray:
    """A start for the steady-state solve: rooms at their setpoints, water hot.

    Parameters
    ----------
    wm : WarmUpModel
        The model. [-]
    time_s : float
        Time the state is for (outdoor and flow temperatures). [s]

    Returns
    -------
    ndarray
        Air at the comfort setpoints, each structure node where its two
        conductances put it between the air and outdoors, every water cell at
        the flow-temperature setpoint less half the design drop, sensors at the
        air. [°C, J]
    """
    scenario = wm.scenario
    m = wm.model
    s = wm.slices
    outdoor = controls.outdoor_temp_C(scenario, time_s)
    air = np.array([room.setpoint_C for room in scenario.rooms])
    coupling = m.room_air_structure_W_K
    loss = m.room_structure_loss_W_K
    y = np.zeros(m.n_states)
    y[s["air"]] = air
    y[s["structure"]] = (coupling * air + loss * outdoor) / (coupling + loss)
    y[s["sensors"]] = air[m.sensor_room]
    y[s["cells"]] = (
        controls.flow_temp_setpoint_C(scenario, time_s)
        - 0.5 * scenario.design.temperature_drop_K
    )
    return y


def steady_state(wm, time_s: float, atol: np.ndarray) -> np.ndarray:
    """The state the house settles into with the heating on at its setpoints.

    Parameters
    ----------
    wm : WarmUpModel
        The model (its Jacobian prepared, :meth:`WarmUpModel.prepare_jacobian`). [-]
    time_s : float
        Time of the state: outdoor and flow temperatures are held at their values
        then. [s]
    atol : ndarray
        Absolute tolerances of the states (the Jacobian's difference steps). [K, J]

    Returns
    -------
    ndarray
        The steady state: every water cell and room node within HEAT_TOL_W of
        its heat balance, every sensor at its room's air; energy counters 0.
        [°C, J]

    Raises
    ------
    ConvergenceError
        When no steady state is found after SETTLE_ATTEMPTS settled starts, or
        a flow solve fails.

    Notes
    -----
    From :func:`steady_guess` the model is integrated for SETTLE_S (its BDF,
    loose tolerance, outdoor and flow temperatures held) so that the water and
    the heads settle; the rooms, tens of hours slow, hardly move. Then
    pseudo-transient continuation: each iteration solves
    ``(I / dt - J) d = f(y)`` (an implicit Euler step of length ``dt``; the
    compiled finite-difference Jacobian on the fixed pattern, energy counters
    left out since nothing depends on them) and takes the largest of
    ``d, d/2, d/4, ...`` that lowers the residual norm. ``dt`` starts at
    FIRST_STEP_S, grows by the ratio of the last two residual norms after a
    full step (at most tenfold) and halves after a shortened one; as it grows
    the step becomes Newton's. The pattern leaves out how water temperatures
    move the flows through viscosity, so the iteration converges linearly (a
    factor of about five per step); the LU is kept while it does
    (CHORD_RATIO). Should the continuation stall, the model settles SETTLE_MORE
    times longer from where it got to and the continuation starts again.

    References
    ----------
    .. [1] C. T. Kelley, D. E. Keyes, "Convergence analysis of pseudo-transient
       continuation", SIAM J. Numer. Anal. 35(2), 1998.
    """
    seg = wm.steady_segment(time_s)
    y = steady_guess(wm, time_s)
    settle = SETTLE_S
    for _ in range(SETTLE_ATTEMPTS):
        y = _settle(wm, seg, time_s, y, settle)
        found, y = _continuation(wm, seg, time_s, y)
        if found:
            return y
        settle *= SETTLE_MORE
    raise ConvergenceError(
        f"steady state before the night not found after {SETTLE_ATTEMPTS} tries "
        f"(settling up to {settle / SETTLE_MORE / 3600:g} h)",
        iterations=SETTLE_ATTEMPTS * MAX_ITERATIONS,
    )


def _settle(wm, seg, time_s: float, y: np.ndarray, span_s: float) -> np.ndarray:
    """Integrate ``span_s`` of pseudo-time at ``time_s``'s conditions."""
    options = wm.solver_options("BDF")
    jac = options["jac"]
    options["jac"] = lambda t, state, segment: jac(time_s, state, segment)
    atol = np.full(len(y), 10.0 * SETTLE_RTOL)
    atol[wm.slices["energy"]] = np.inf  # counters: no error control
    result = solve_ivp(
        lambda t, state, segment: wm.rhs(time_s, state, segment),
        (0.0, span_s),
        y,
        rtol=SETTLE_RTOL,
        atol=atol,
        args=(seg,),
        **options,
    )
    if not result.success:
        raise ConvergenceError(
            f"steady state before the night: settling failed ({result.message})",
            iterations=int(result.nfev),
        )
    settled = result.y[:, -1].copy()
    settled[wm.slices["energy"]] = 0.0
    return settled


def _continuation(wm, seg, time_s: float, y: np.ndarray):
    """Pseudo-transient continuation from ``y``: (found, last state)."""
    m = wm.model
    physical = np.arange(wm.slices["energy"].start)
    # heat capacities turn rates [K/s] into heat-balance misses [W]; a sensor's
    # time constant turns its rate into its distance from the air [K], weighted
    # so that SENSOR_TOL_K weighs as HEAT_TOL_W
    weight = np.concatenate(
        [
            m.cell_capacity_J_K,
            m.room_air_capacity_J_K,
            m.room_structure_capacity_J_K,
            m.sensor_time_constant_s * (HEAT_TOL_W / SENSOR_TOL_K),
        ]
    )
    identity = scipy.sparse.identity(len(physical), format="csc")
    rate = wm.rhs(time_s, y, seg)[physical]
    norm = float(np.linalg.norm(weight * rate))
    dt = FIRST_STEP_S
    lu = None
    for _ in range(MAX_ITERATIONS):
        if np.max(np.abs(weight * rate)) < HEAT_TOL_W:
            return True, y
        if lu is None:
            jac = wm.jacobian(time_s, y, seg)[physical][:, physical]
            lu = splu((identity / dt - jac).tocsc())
        step = lu.solve(rate)
        share = 1.0
        for _ in range(MAX_HALVINGS):
            trial = y.copy()
            trial[physical] += share * step
            try:
                trial_rate = wm.rhs(time_s, trial, seg)[physical]
            except ConvergenceError:
                trial_rate = np.full(len(physical), np.nan)
            trial_norm = float(np.linalg.norm(weight * trial_rate))
            if np.isfinite(trial_norm) and trial_norm < (1.0 - 1e-4 * share) * norm:
                break
            share *= 0.5
        else:
            return False, y
        y, rate = trial, trial_rate
        if share == 1.0:
            growth = norm / trial_norm if trial_norm > 0.0 else STEP_GROWTH_MAX
            dt = min(dt * min(max(growth, 1.0), STEP_GROWTH_MAX), LONGEST_STEP_S)
            if trial_norm > CHORD_RATIO * norm:
                lu = None
        else:
            dt *= 0.5
            lu = None
        norm = trial_norm
    return bool(np.max(np.abs(weight * rate)) < HEAT_TOL_W), y
