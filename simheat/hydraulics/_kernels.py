"""Compiled kernels of the network flow solve (global gradient algorithm).

Unknowns are the signed mass flow of every link and the gauge pressure of every
node but the reference node. Each link obeys

    p_from - p_to = F(m) = pipe_dp(m) + valve_dp(m) + check_dp(m) - pump_rise(m)

and every node conserves mass. A Newton step linearises ``F`` with the diagonal
``D = dF/dm`` and eliminates the flow increments, leaving the weighted graph
Laplacian ``A D^-1 A^T`` (reference node removed) for the pressure increments.
With every ``D > 0`` that matrix is symmetric positive definite for a connected
network; after a reverse Cuthill-McKee ordering of the nodes it is banded with a
small half bandwidth, so a banded ``L D L^T`` factorization costs ``O(n b^2)``.

A pump working on a rising stretch of its curve (or a proportional-pressure pump,
whose head rises with flow) gives its link ``D < 0``. The exact Newton step is then
tried first (the matrix may be indefinite, so the factorization is ``L D L^T``
with a stricter pivot test); if that fails or the line search finds no decrease,
the step is retaken with ``|D|``, which keeps the matrix positive definite.

Speed comes from three things. The water properties and every per-link constant
are computed once per solve (:func:`prepare_links`), so an evaluation of all link
laws is a few multiplications per link plus, for turbulent pipes, a Colebrook-White
Newton loop started from the link's previous solution. A warm start from a
previous solution with its pressures first re-solves, at those pressures, the
few links whose own equation no longer holds (a valve that moved), which leaves
Newton a small, nearly linear correction. And convergence is also declared on an
exact Newton step that is already tiny: the step is applied and the solve ends
without another evaluation of all links (quadratic convergence makes the error
after it far below the step). When the last step was small, that final step is
first tried with the factor already made (a chord step [6]_: one band solve, no
factorization), and taken if its estimated residual, which counts the first-order
error the older factor leaves, is at the round-off of the pressures. The line
search builds its trial point in a second set of workspace rows that swaps with
the current one, so an accepted step copies nothing.

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
   Optimization and Nonlinear Equations, SIAM, 1996, sec. 6.3 (backtracking) and
   sec. 7.2 (stopping on the step).
.. [4] G. H. Golub, C. F. Van Loan, Matrix Computations, 4th ed., Johns Hopkins,
   2013, sec. 4.1 and 4.3 (L D L^T, band factorizations).
.. [5] P. K. Swamee, A. K. Jain, "Explicit equations for pipe-flow problems",
   J. Hydraul. Div. ASCE 102(5), 1976.
.. [6] C. T. Kelley, Iterative Methods for Linear and Nonlinear Equations, SIAM,
   1995, ch. 5 (the chord and Shamanskii methods).
"""

from __future__ import annotations

import math

import numpy as np

from simheat._jit import njit
from simheat.physics._kernels import (
    KV_PRESSURE_CONSTANT,
    LEAKAGE_FRACTION,
    PUMP_CONTROL_CORNER_FRACTION,
    PUMP_MODE_CONSTANT_DP,
    PUMP_MODE_FIXED_SPEED,
    PUMP_REVERSE_BLEND_FRACTION,
    RE_LAMINAR_MAX,
    RE_TURBULENT_MIN,
    REGULARISATION_MASS_FLOW_KG_S,
    WATER_TEMP_MAX_C,
    WATER_TEMP_MIN_C,
    ZETA_REGULARISATION_VELOCITY_M_S,
    check_valve_reverse_dp_Pa,
    colebrook_solve,
    pipe_pressure_drop_Pa,
    regulated_pump_rise_Pa,
    transitional_friction_factor,
    valve_pressure_drop_Pa,
    water_density_kg_m3,
    water_viscosity_Pa_s,
)

# Result codes of solve_network.
STATUS_CONVERGED = 0
STATUS_MAX_ITER = 1
STATUS_NOT_POSITIVE_DEFINITE = 2
STATUS_NOT_FINITE = 3

# How solve_network starts.
START_COLD = 0  # from rest, two linear-theory passes
START_FLOWS = 1  # from the given flows (pressures are recomputed by Newton)
START_FLOWS_PRESSURES = 2  # from given flows and pressures (a previous solution)

# Rows of the static per-link data, shape (N_DATA_ROWS, n_links).
D_LENGTH, D_DIAMETER, D_ROUGHNESS, D_ZETA, D_KV = 0, 1, 2, 3, 4
D_A0, D_A1, D_A2 = 5, 6, 7
D_CHECK, D_MODE, D_SETPOINT, D_CONTROL_FLOW = 8, 9, 10, 11
D_F_ONSET, D_DF_ONSET = 12, 13  # Colebrook-White f and df/dRe at Re 4000
N_DATA_ROWS = 14
# Rows of the operating point, shape (N_OP_ROWS, n_links).
OP_TEMP, OP_OPENING, OP_SPEED = 0, 1, 2
N_OP_ROWS = 3
# Valid range of each operating row (load_operating_point). [°C], [-], [-]
OP_LOWER = (WATER_TEMP_MIN_C, 0.0, 0.0)
OP_UPPER = (WATER_TEMP_MAX_C, 1.0, np.inf)
# load_operating_point's row code when every value is valid but no pump runs.
NO_RUNNING_PUMP = N_OP_ROWS
# load_start's result codes.
START_OK, START_FLOW_NOT_FINITE, START_PRESSURE_NOT_FINITE = 0, 1, 2
# Rows of the per-solve link coefficients, shape (N_COEF_ROWS, n_links).
C_RE = 0  # Reynolds number per kg/s of flow, 0 without pipe length [s/kg]
C_LAM = 1  # laminar friction: dp = C_LAM m [Pa s/kg]
C_TURB = 2  # turbulent friction: dp = C_TURB f m|m| [Pa s2/kg2]
C_RR = 3  # relative roughness [-]
C_F_ONSET, C_DF_ONSET = 4, 5  # Colebrook-White at Re 4000 [-]
C_ZETA = 6  # local losses: dp = C_ZETA m sqrt(m^2 + C_ZETA_M0^2) [Pa s2/kg2]
C_ZETA_M0 = 7  # zeta regularisation as a mass flow [kg/s]
C_VALVE = 8  # valve: dp = C_VALVE m sqrt(m^2 + m0^2) [Pa s2/kg2]
C_CHECK = 9  # 1 where a check valve sits [-]
C_P0, C_P1, C_P2 = 10, 11, 12  # pump curve in mass flow at the speed [Pa, ...]
C_MODE = 13  # pump mode, -1 without a pump [-]
C_SET = 14  # set head of a regulated pump [Pa]
C_GAIN = 15  # proportional-pressure line slope [Pa s/kg]
N_COEF_ROWS = 16

# Rows of the per-link workspace, shape (N_LINK_ROWS, n_links). _X, _XR, _XD keep
# each turbulent pipe's last Colebrook-White solution x = 1/sqrt(f), the Reynolds
# number it was solved at and dx/dRe there (the next solve's first-order start);
# _OT, _OO, _OS the operating point the coefficients were last prepared for.
_F, _S, _R, _DM, _MT, _FT, _ST, _RT, _W = 0, 1, 2, 3, 4, 5, 6, 7, 8
_X, _XR, _XD, _OT, _OO, _OS = 9, 10, 11, 12, 13, 14
N_LINK_ROWS = 15
# Rows of the per-node workspace, shape (N_NODE_ROWS, n_nodes).
_G, _DP, _PT, _GT, _X2, _SC = 0, 1, 2, 3, 4, 5
N_NODE_ROWS = 6

# Armijo sufficient-decrease constant and the number of step halvings, [3] sec. 6.3.
_ARMIJO = 1e-4
_MAX_HALVINGS = 30
# A pivot smaller than this fraction of its row's absolute weight sum means a
# singular matrix: for the positive definite (|D|) matrix, and for the possibly
# indefinite exact matrix, where a fallback exists and we demand more. [-]
PIVOT_FRACTION_DEFINITE = 1e-14
PIVOT_FRACTION_INDEFINITE = 1e-8
# After a converged solve every node must balance to this fraction of the largest
# link flow; otherwise the flows are projected onto mass balance once. [-]
BALANCE_RTOL = 1e-13
# Convergence on the step [3] sec. 7.2: an exact Newton step whose every flow
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
# A warm start from flows and pressures re-solves, at those pressures, the links
# whose residual exceeds this fraction of their pressure drop. [-]
HOLD_PRESSURE_RTOL = 1e-2
# Linear-theory passes of a cold start (see _linear_start). [-]
LINEAR_START_PASSES = 4
_HOLD_MAX_ITER = 40

_KV_M0 = REGULARISATION_MASS_FLOW_KG_S
# Colebrook-White in the link evaluation: Halley's method on
# g(x) = x + 2 log10(a + b x), with g1 = 1 + k b / (a + b x) and
# g2 = -k b^2 / (a + b x)^2 its first two derivatives, k = 2 / ln 10. Its error
# obeys e_next ~ ((g2 / 2 g1)^2 - g3 / 6 g1) e^3, and with b / (a + b x) <= 1/x
# that factor is at most 0.39 / x^3 for x >= 2; taking 4 / x^3 for margin, a
# step s with |s|^3 <= _COLEBROOK_BOUND x^4 leaves an error below 1e-16 x.
_LOG10_K = 2.0 / math.log(10.0)
_COLEBROOK_BOUND = 1e-16 / 4.0
_COLEBROOK_MAX_ITER = 20


def new_link_workspace(n_links: int) -> np.ndarray:
    """Per-link workspace of :func:`solve_network`, ready for a first solve.

    Parameters
    ----------
    n_links : int
        Number of links. [-]

    Returns
    -------
    ndarray, shape (N_LINK_ROWS, n_links)
        Zeros, with the "prepared for" operating rows set to NaN (never). [-]
    """
    work = np.zeros((N_LINK_ROWS, n_links))
    work[_OT : _OS + 1] = np.nan
    return work


@njit(cache=True)
def any_running_pump(speed, pump_links, pump_a0):
    """Whether some pump link has a shut-off head > 0 and a speed > 0.

    Parameters
    ----------
    speed : ndarray
        Speed ratio per link. [-]
    pump_links : ndarray of int64
        Links with a pump curve. [-]
    pump_a0 : ndarray
        Their shut-off heads. [Pa]

    Returns
    -------
    bool
    """
    for i in range(pump_links.shape[0]):
        if pump_a0[i] > 0.0 and speed[pump_links[i]] > 0.0:
            return True
    return False


@njit(cache=True)
def _fill_operating_row(row, seen, values, value, lo, hi):
    """Write ``values`` (one per link), or ``value`` when ``values`` is empty.

    Returns the first index outside [lo, hi] or not finite (-1 if none; a
    single ``value`` is checked by the caller), and whether any entry differs
    from ``seen``, which is updated to the new values.
    """
    # branch-free loops (they vectorise); v - v == 0 fails for inf and NaN
    changed = False
    if values.shape[0] == 0:
        for k in range(row.shape[0]):
            changed |= seen[k] != value
            seen[k] = value
            row[k] = value
        return -1, changed
    valid = True
    for k in range(row.shape[0]):
        v = values[k]
        valid &= (v >= lo) & (v <= hi) & (v - v == 0.0)
        changed |= seen[k] != v
        seen[k] = v
        row[k] = v
    if valid:
        return -1, changed
    for k in range(row.shape[0]):
        v = values[k]
        if not (lo <= v <= hi and math.isfinite(v)):
            return k, changed
    return -1, changed  # not reached: some value failed above


@njit(cache=True)
def load_operating_point(
    operating,
    seen,
    temp_values,
    temp,
    opening_values,
    opening,
    speed_values,
    speed,
    pump_links,
    pump_a0,
):
    """Fill and check the operating point of a solve in one pass.

    Parameters
    ----------
    operating : ndarray, shape (N_OP_ROWS, n_links)
        Written: water temperature [°C], valve opening [-], pump speed [-].
    seen : ndarray, shape (N_OP_ROWS, n_links)
        The operating point of the caller's last load (NaN: none); compared
        with the new one and updated. [°C, -, -]
    temp_values, opening_values, speed_values : ndarray
        One value per link, or empty to use the single value beside it. [°C, -, -]
    temp, opening, speed : float
        The single values (checked by the caller). [°C, -, -]
    pump_links : ndarray of int64
        Links with a pump curve. [-]
    pump_a0 : ndarray
        Their shut-off heads. [Pa]

    Returns
    -------
    row : int
        -1 when all is well; the first row (``OP_*``) with a value outside
        ``OP_LOWER``-``OP_UPPER`` or not finite; ``NO_RUNNING_PUMP`` when no
        pump has a shut-off head > 0 and a speed > 0. [-]
    index : int
        The link of that value (-1 when none). [-]
    changed : bool
        Whether any value differs from ``seen``. [-]
    """
    bad, changed = _fill_operating_row(
        operating[OP_TEMP], seen[OP_TEMP], temp_values, temp, OP_LOWER[0], OP_UPPER[0]
    )
    if bad >= 0:
        return OP_TEMP, bad, True
    bad, changed_now = _fill_operating_row(
        operating[OP_OPENING],
        seen[OP_OPENING],
        opening_values,
        opening,
        OP_LOWER[1],
        OP_UPPER[1],
    )
    changed |= changed_now
    if bad >= 0:
        return OP_OPENING, bad, True
    bad, changed_now = _fill_operating_row(
        operating[OP_SPEED],
        seen[OP_SPEED],
        speed_values,
        speed,
        OP_LOWER[2],
        OP_UPPER[2],
    )
    changed |= changed_now
    if bad >= 0:
        return OP_SPEED, bad, True
    if not any_running_pump(operating[OP_SPEED], pump_links, pump_a0):
        return NO_RUNNING_PUMP, -1, changed
    return -1, -1, changed


@njit(cache=True)
def load_start(
    start, flow_in, pressure_in, reference_node, mass_flow_kg_s, pressure_Pa
):
    """Check a warm start and copy it into the solver's arrays.

    Parameters
    ----------
    start : int
        ``START_COLD`` (nothing to copy), ``START_FLOWS`` or
        ``START_FLOWS_PRESSURES``. [-]
    flow_in : ndarray
        Start flows, one per link. [kg/s]
    pressure_in : ndarray
        Start pressures, one per node (``START_FLOWS_PRESSURES`` only). [Pa]
    reference_node : int
        The node whose pressure is zero. [-]
    mass_flow_kg_s, pressure_Pa : ndarray
        Written: the flows, and the pressures less the reference node's. [kg/s],
        [Pa]

    Returns
    -------
    int
        ``START_OK``, ``START_FLOW_NOT_FINITE`` or ``START_PRESSURE_NOT_FINITE``;
        nothing is written unless all is well. [-]
    """
    if start == START_COLD:
        return START_OK
    # branch-free checks (they vectorise): v - v == 0 fails for inf and NaN
    finite = True
    for k in range(flow_in.shape[0]):
        finite &= flow_in[k] - flow_in[k] == 0.0
    if not finite:
        return START_FLOW_NOT_FINITE
    if start == START_FLOWS_PRESSURES:
        for n in range(pressure_in.shape[0]):
            finite &= pressure_in[n] - pressure_in[n] == 0.0
        if not finite:
            return START_PRESSURE_NOT_FINITE
        reference = pressure_in[reference_node]
        for n in range(pressure_in.shape[0]):
            pressure_Pa[n] = pressure_in[n] - reference
    mass_flow_kg_s[:] = flow_in
    return START_OK


# --------------------------------------------------------------- link laws


@njit(cache=True)
def link_loss_general_Pa(
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
    check_valve,
    pump_mode,
    pump_setpoint_Pa,
    pump_control_flow_m3_s,
):
    """Pressure loss of one link minus its pump rise, and its flow derivative.

    The reference implementation from the physics kernels, one part at a time;
    the solver's fast path (:func:`evaluate_link_range`) must agree with it.

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
        Pump speed relative to nominal (the maximum speed of a regulated
        pump). [-]
    temp_C : float
        Water temperature in the link. [°C]
    check_valve : bool
        The link holds a check valve. [-]
    pump_mode : int
        0 fixed speed, 1 constant dp, 2 proportional dp. [-]
    pump_setpoint_Pa : float
        Set head of a regulated pump. [Pa]
    pump_control_flow_m3_s : float
        Flow at which the nominal curve delivers the set head (mode 2). [m3/s]

    Returns
    -------
    loss_Pa : float
        ``pipe_dp + valve_dp + check_dp - pump_rise``, equal to
        ``p_from - p_to``. [Pa]
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
    if check_valve:
        dp, ds = check_valve_reverse_dp_Pa(mass_flow_kg_s)
        loss += dp
        slope += ds
    if pump_a0 != 0.0 or pump_a1 != 0.0 or pump_a2 != 0.0:
        rise, drise = regulated_pump_rise_Pa(
            mass_flow_kg_s,
            pump_a0,
            pump_a1,
            pump_a2,
            pump_speed,
            pump_mode,
            pump_setpoint_Pa,
            pump_control_flow_m3_s,
            temp_C,
        )
        loss -= rise
        slope -= drise
    return loss, slope


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
    """Loss minus pump rise of a link without check valve and fixed-speed pump.

    Parameters and returns as :func:`link_loss_general_Pa` (first twelve).
    """
    return link_loss_general_Pa(
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
        False,
        PUMP_MODE_FIXED_SPEED,
        0.0,
        0.0,
    )


@njit(cache=True)
def onset_friction(length_m, inner_diameter_m, roughness_m, f_out, df_out):
    """Colebrook-White friction factor and d f / d Re at Re 4000 for every pipe.

    Parameters
    ----------
    length_m, inner_diameter_m, roughness_m : ndarray
        Link pipe length, bore and roughness. [m]
    f_out : ndarray
        Written: friction factor at Re 4000, 0 where there is no pipe. [-]
    df_out : ndarray
        Written: its derivative in Re. [-]
    """
    for k in range(length_m.shape[0]):
        if length_m[k] > 0.0:
            f, df, _ = colebrook_solve(
                RE_TURBULENT_MIN, roughness_m[k] / inner_diameter_m[k], 0.0
            )
            f_out[k] = f
            df_out[k] = df
        else:
            f_out[k] = 0.0
            df_out[k] = 0.0


@njit(cache=True)
def prepare_links(data, operating, coef, prepared_for):
    """Per-link constants of the link laws at one operating point.

    Parameters
    ----------
    data : ndarray, shape (N_DATA_ROWS, n_links)
        Static link data (rows ``D_*``). [SI]
    operating : ndarray, shape (N_OP_ROWS, n_links)
        Water temperature [°C], valve opening [-] and pump speed [-] per link.
    coef : ndarray, shape (N_COEF_ROWS, n_links)
        Written: the coefficients (rows ``C_*``). [SI]
    prepared_for : ndarray, shape (N_OP_ROWS, n_links)
        The operating point ``coef`` was last prepared for (NaN: never); links
        whose point is unchanged are skipped. Updated. [°C, -, -]

    Notes
    -----
    The same formulas as the physics kernels, with the density, viscosity and
    areas folded into constants per link: ``v = m / (rho A)`` turns
    ``f L/D rho v|v|/2`` into ``C_TURB f m|m|`` and ``32 mu L v / D^2`` into
    ``C_LAM m``.
    """
    # one branch-free pass first: an unchanged operating point (the common
    # case of a re-solve) costs a comparison per entry
    unchanged = True
    for k in range(coef.shape[1]):
        unchanged &= (
            (operating[OP_TEMP, k] == prepared_for[OP_TEMP, k])
            & (operating[OP_OPENING, k] == prepared_for[OP_OPENING, k])
            & (operating[OP_SPEED, k] == prepared_for[OP_SPEED, k])
        )
    if unchanged:
        return
    for k in range(coef.shape[1]):
        temp = operating[OP_TEMP, k]
        opening = operating[OP_OPENING, k]
        speed = operating[OP_SPEED, k]
        if (
            temp == prepared_for[OP_TEMP, k]
            and opening == prepared_for[OP_OPENING, k]
            and speed == prepared_for[OP_SPEED, k]
        ):
            continue
        prepared_for[OP_TEMP, k] = temp
        prepared_for[OP_OPENING, k] = opening
        prepared_for[OP_SPEED, k] = speed
        rho = water_density_kg_m3(temp)
        length = data[D_LENGTH, k]
        d = data[D_DIAMETER, k]
        zeta = data[D_ZETA, k]
        area = 0.25 * math.pi * d * d
        if length > 0.0:
            mu = water_viscosity_Pa_s(temp)
            coef[C_RE, k] = d / (mu * area)
            coef[C_LAM, k] = 32.0 * mu * length / (d * d * rho * area)
            coef[C_TURB, k] = 0.5 * length / (d * rho * area * area)
            coef[C_RR, k] = data[D_ROUGHNESS, k] / d
            coef[C_F_ONSET, k] = data[D_F_ONSET, k]
            coef[C_DF_ONSET, k] = data[D_DF_ONSET, k]
        else:
            coef[C_RE, k] = 0.0
        if zeta > 0.0:
            coef[C_ZETA, k] = 0.5 * zeta / (rho * area * area)
            coef[C_ZETA_M0, k] = rho * area * ZETA_REGULARISATION_VELOCITY_M_S
        else:
            coef[C_ZETA, k] = 0.0
        kv = data[D_KV, k]
        if kv > 0.0:
            o = min(max(opening, 0.0), 1.0)
            kv_e = kv * (LEAKAGE_FRACTION + (1.0 - LEAKAGE_FRACTION) * o)
            coef[C_VALVE, k] = KV_PRESSURE_CONSTANT / (rho * kv_e * kv_e)
        else:
            coef[C_VALVE, k] = 0.0
        coef[C_CHECK, k] = data[D_CHECK, k]
        a0, a1, a2 = data[D_A0, k], data[D_A1, k], data[D_A2, k]
        if a0 != 0.0 or a1 != 0.0 or a2 != 0.0:
            s = max(speed, 0.0)
            coef[C_P0, k] = a0 * s * s
            coef[C_P1, k] = a1 * s / rho
            coef[C_P2, k] = a2 / (rho * rho)
            mode = data[D_MODE, k] if s > 0.0 else PUMP_MODE_FIXED_SPEED
            coef[C_MODE, k] = mode
            setpoint = data[D_SETPOINT, k]
            coef[C_SET, k] = setpoint
            if mode > PUMP_MODE_CONSTANT_DP:
                coef[C_GAIN, k] = 0.5 * setpoint / (data[D_CONTROL_FLOW, k] * rho)
            else:
                coef[C_GAIN, k] = 0.0
        else:
            coef[C_MODE, k] = -1.0


@njit(cache=True)
def pump_rise(k, m, coef):
    """Rise of link ``k``'s pump at flow ``m``, its slope, and corner curvature.

    Parameters
    ----------
    k : int
        Link index (a link with a pump). [-]
    m : float
        Signed mass flow. [kg/s]
    coef : ndarray
        Constants from :func:`prepare_links`. [SI]

    Returns
    -------
    (rise_Pa, slope, corner) : tuple of float
        Pressure rise [Pa], its derivative [Pa s/kg], and the part of its second
        derivative due to the rounded control corner of a regulated pump
        (0 at fixed speed). [Pa s2/kg2]
    """
    m0 = _KV_M0
    root = math.sqrt(m * m + m0 * m0)
    p1, p2 = coef[C_P1, k], coef[C_P2, k]
    curve = coef[C_P0, k] + p1 * m + p2 * m * root
    d_curve = p1 + p2 * (2.0 * m * m + m0 * m0) / root
    if coef[C_MODE, k] <= PUMP_MODE_FIXED_SPEED:
        return curve, d_curve, 0.0
    setpoint = coef[C_SET, k]
    gain = coef[C_GAIN, k]
    if coef[C_MODE, k] == PUMP_MODE_CONSTANT_DP:
        line = setpoint
        d_line = 0.0
    elif m >= 0.0:
        line = 0.5 * setpoint + gain * m
        d_line = gain
    else:
        # The same reverse-flow levelling as physics._kernels.regulated_pump_rise_Pa
        # (blend flow = fraction of the control mass flow 0.5 * setpoint / gain).
        blend = PUMP_REVERSE_BLEND_FRACTION * 0.5 * setpoint / gain
        t = math.tanh(m / blend)
        line = 0.5 * setpoint + gain * blend * t
        d_line = gain * (1.0 - t * t)
    delta = PUMP_CONTROL_CORNER_FRACTION * setpoint
    gap = line - curve
    r = math.sqrt(gap * gap + delta * delta)
    rise = 0.5 * (line + curve - r)
    slope = 0.5 * (d_line + d_curve - gap * (d_line - d_curve) / r)
    ds = d_line - d_curve
    corner = 0.5 * ds * ds * delta * delta / (r * r * r)
    return rise, slope, corner


@njit(cache=True)
def evaluate_link_range(
    mass_flow_kg_s,
    coef,
    colebrook_x,
    colebrook_re,
    colebrook_dx,
    loss_out_Pa,
    slope_out_Pa_s_kg,
    first,
    stop,
    exact=True,
):
    """Loss minus pump rise, and its slope, of links ``first`` to ``stop - 1``.

    Parameters
    ----------
    mass_flow_kg_s : ndarray
        Link mass flows (entries ``first:stop`` are read). [kg/s]
    coef : ndarray, shape (N_COEF_ROWS, n_links)
        Constants from :func:`prepare_links`. [SI]
    colebrook_x, colebrook_re, colebrook_dx : ndarray
        Per link, the last Colebrook-White solution ``x = 1/sqrt(f)`` (0: none),
        the Reynolds number it belongs to and ``dx/dRe`` there; read as the
        start ``x + dx/dRe (Re - Re_last)`` and updated. [-]
    loss_out_Pa : ndarray
        Written: ``p_from - p_to`` the link law asks for. [Pa]
    slope_out_Pa_s_kg : ndarray
        Written: its derivative with respect to the mass flow. [Pa s/kg]
    first, stop : int
        Range of links. [-]
    exact : bool
        True: Colebrook-White solved to round-off. False: an explicit
        approximation, enough for the secants of a linear-theory start: the
        last solution extrapolated in ln Re, or without one the Swamee-Jain
        formula (within about 1 % [5]_); it becomes the next start. [-]

    Returns
    -------
    int
        Index of the first link with a non-finite loss or slope, else -1. [-]

    Notes
    -----
    The hot loop of the solver, written out in one function (calls per link
    cost more than the arithmetic). Colebrook-White is solved for
    ``x = 1/sqrt(f)`` by Halley's method (one logarithm and one division per
    step) from the link's last solution extrapolated to the new Reynolds
    number, and stops once ``|s|^3 <= 2.5e-17 x^4``, which bounds the error
    left below 1e-16 x. Agrees with :func:`link_loss_general_Pa` to round-off.
    """
    bad = -1
    for k in range(first, stop):
        m = mass_flow_kg_s[k]
        loss = 0.0
        slope = 0.0
        re_per_flow = coef[C_RE, k]
        if re_per_flow > 0.0:
            am = abs(m)
            re = am * re_per_flow
            if re <= RE_LAMINAR_MAX:
                c = coef[C_LAM, k]
                loss += c * m
                slope += c
            else:
                if re >= RE_TURBULENT_MIN and not exact:
                    x = colebrook_x[k]
                    re_last = colebrook_re[k]
                    if x > 0.0:  # extrapolate the last solution in ln Re
                        dx_dlnre = colebrook_dx[k] * re_last
                        x += dx_dlnre * math.log(re / re_last)
                    if not x > 0.0:  # Swamee-Jain and its derivative
                        a = coef[C_RR, k] * (1.0 / 3.7)
                        t = 5.74 / re**0.9
                        x = -2.0 * math.log10(a + t)
                        dx_dlnre = _LOG10_K * 0.9 * t / (a + t)
                    f = 1.0 / (x * x)
                    df = -2.0 * dx_dlnre / (re * x * x * x)
                    colebrook_x[k] = x
                    colebrook_re[k] = re
                    colebrook_dx[k] = dx_dlnre / re
                elif re >= RE_TURBULENT_MIN:
                    a = coef[C_RR, k] * (1.0 / 3.7)
                    b = 2.51 / re
                    kb = _LOG10_K * b
                    x = colebrook_x[k]
                    re_last = colebrook_re[k]
                    if x > 0.0:
                        # first-order start from the last solution, in Re for a
                        # small change, in ln Re (where x is nearly linear) else
                        change = re - re_last
                        if abs(change) <= 0.01 * re_last:
                            x += colebrook_dx[k] * change
                        else:
                            x += colebrook_dx[k] * re_last * math.log(re / re_last)
                    if not (x > 0.0 and a + b * x > 0.0):
                        # Swamee-Jain (1976) explicit start
                        x = -2.0 * math.log10(a + 5.74 / re**0.9)
                    inner = a + b * x
                    for _ in range(_COLEBROOK_MAX_ITER):
                        g = x + 2.0 * math.log10(inner)
                        slope_g = inner + kb  # g' inner
                        step = (
                            2.0
                            * g
                            * slope_g
                            * inner
                            / (2.0 * slope_g * slope_g + g * _LOG10_K * b * b)
                        )
                        if inner - b * step <= 0.0:
                            # a far start overshot the domain: go halfway to its
                            # edge instead (g is concave, Newton then climbs back)
                            x -= 0.5 * inner / b
                            inner *= 0.5
                            continue
                        x -= step
                        inner -= b * step
                        if abs(step) ** 3 <= _COLEBROOK_BOUND * x**4:
                            break
                    inv_x = 1.0 / x
                    f = inv_x * inv_x
                    df = -2.0 * kb * f / (re * (inner + kb))
                    colebrook_x[k] = x
                    colebrook_re[k] = re
                    colebrook_dx[k] = -0.5 * df * x * x * x
                else:
                    f, df = transitional_friction_factor(
                        re, coef[C_F_ONSET, k], coef[C_DF_ONSET, k]
                    )
                c = coef[C_TURB, k]
                loss += c * f * m * am
                slope += c * am * (2.0 * f + re * df)
        cz = coef[C_ZETA, k]
        if cz > 0.0:
            m0 = coef[C_ZETA_M0, k]
            root = math.sqrt(m * m + m0 * m0)
            loss += cz * m * root
            slope += cz * (2.0 * m * m + m0 * m0) / root
        cv = coef[C_VALVE, k]
        if cv > 0.0:
            root = math.sqrt(m * m + _KV_M0 * _KV_M0)
            loss += cv * m * root
            slope += cv * (2.0 * m * m + _KV_M0 * _KV_M0) / root
        if m < 0.0 and coef[C_CHECK, k] != 0.0:
            dp, ds = check_valve_reverse_dp_Pa(m)
            loss += dp
            slope += ds
        if coef[C_MODE, k] >= 0.0:
            rise, drise, _ = pump_rise(k, m, coef)
            loss -= rise
            slope -= drise
        if bad < 0 and not (math.isfinite(loss) and math.isfinite(slope)):
            bad = k
        loss_out_Pa[k] = loss
        slope_out_Pa_s_kg[k] = slope
    return bad


@njit(cache=True)
def evaluate_links(mass_flow_kg_s, coef, work_links, loss_out_Pa, slope_out_Pa_s_kg):
    """Loss and slope of every link (:func:`evaluate_link_range` over all).

    Parameters
    ----------
    mass_flow_kg_s : ndarray
        Link mass flows. [kg/s]
    coef : ndarray, shape (N_COEF_ROWS, n_links)
        Constants from :func:`prepare_links`. [SI]
    work_links : ndarray, shape (N_LINK_ROWS, n_links)
        Solver workspace; its Colebrook-White rows are read and updated. [-]
    loss_out_Pa : ndarray
        Written: link loss minus pump rise. [Pa]
    slope_out_Pa_s_kg : ndarray
        Written: its signed derivative with respect to the mass flow. [Pa s/kg]

    Returns
    -------
    int
        Index of the first link with a non-finite loss or slope, else -1. [-]
    """
    return evaluate_link_range(
        mass_flow_kg_s,
        coef,
        work_links[_X],
        work_links[_XR],
        work_links[_XD],
        loss_out_Pa,
        slope_out_Pa_s_kg,
        0,
        mass_flow_kg_s.shape[0],
    )


# --------------------------------------------------------- network pieces


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
        the inverse pivot ``1 / D[i]`` and ``band[i, k]`` (k > 0) the unit lower
        factor ``L[i, i - k]``. [any]
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
    operations [4]_, carrying ``w_j = L[i, j] D[j]`` along the row so that each
    row costs one division. Without pivoting it is stable for positive definite
    matrices; for indefinite ones the pivot test guards against breakdown. A
    row's leading zeros (inside the band, outside the matrix's envelope) stay
    zero in the factor and are skipped.
    """
    n = band.shape[0]
    b = band.shape[1] - 1
    w = np.empty(b + 1)
    for i in range(n):
        j0 = max(0, i - b)
        while j0 < i and band[i, i - j0] == 0.0:
            j0 += 1
        d = band[i, 0]
        for j in range(j0, i):
            s = band[i, i - j]
            for k in range(j0, j):
                s -= w[k - j0] * band[j, j - k]
            w[j - j0] = s
            lower = s * band[j, 0]
            band[i, i - j] = lower
            d -= s * lower
        if not math.isfinite(d) or abs(d) <= pivot_fraction * row_scale[i]:
            return False
        if require_positive and d < 0.0:
            return False
        band[i, 0] = 1.0 / d
    return True


@njit(cache=True)
def band_solve(band, rhs):
    """Solve ``L D L^T x = rhs`` in place with a factor from :func:`band_ldlt`.

    Parameters
    ----------
    band : ndarray, shape (n, b + 1)
        Factor in lower band storage, inverse pivots on the diagonal. [any]
    rhs : ndarray, shape (n,)
        Right-hand side on entry, solution on exit. [any]

    Notes
    -----
    Forward substitution by rows, back substitution by columns of ``L``; both
    skip each row's leading zeros (the factor has none below a row's first
    nonzero, see :func:`band_ldlt`).
    """
    n = band.shape[0]
    b = band.shape[1] - 1
    for i in range(n):
        j0 = max(0, i - b)
        while j0 < i and band[i, i - j0] == 0.0:
            j0 += 1
        s = rhs[i]
        for k in range(j0, i):
            s -= band[i, i - k] * rhs[k]
        rhs[i] = s
    for i in range(n):
        rhs[i] *= band[i, 0]
    # rhs now holds D^-1 L^-1 rhs; solve L^T x = that, column by column
    for i in range(n - 1, -1, -1):
        x = rhs[i]
        j0 = max(0, i - b)
        while j0 < i and band[i, i - j0] == 0.0:
            j0 += 1
        for k in range(j0, i):
            rhs[k] -= band[i, i - k] * x


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

    Returns
    -------
    float
        The line-search merit of ``r`` and ``g`` with these weights (as
        :func:`merit`), a by-product of assembling the right-hand side.
        [kg2/s2]
    """
    n_red = band.shape[0]
    rhs = reduced[:n_red]
    node_sum = 0.0
    for n in range(node_position.shape[0]):
        g = imbalance_kg_s[n]
        node_sum += g * g
        i = node_position[n]
        if i >= 0:
            rhs[i] = -g
    link_sum = 0.0
    for k in range(weight.shape[0]):
        q = weight[k] * residual_Pa[k]
        link_sum += q * q
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
    return link_sum + node_sum


@njit(cache=True)
def _worst_index(values):
    worst = 0
    for k in range(values.shape[0]):
        if abs(values[k]) > abs(values[worst]):
            worst = k
    return worst


# ------------------------------------------------------------------ starts


@njit(cache=True)
def _linear_start(
    from_node,
    to_node,
    coef,
    node_position,
    band,
    mass_flow_kg_s,
    pressure_Pa,
    work_links,
    work_nodes,
    start_flow_kg_s,
    slope_floor_Pa_s_kg,
):
    """Linear-theory passes from rest: each link replaced by a secant resistance.

    Pass 1 takes every link's secant between zero flow and ``start_flow_kg_s``;
    pass 2 the secant at the pass-1 flow (a Picard step); the later passes the
    secant at the geometric mean of the previous reference flow and the flow it
    gave, which is exact for a purely quadratic loss law at fixed pressure
    difference [2]_. Flows too small to take a secant at are held at 1e-3 of
    ``start_flow_kg_s``. ``LINEAR_START_PASSES`` passes are made.

    Returns
    -------
    bool
        False when a Laplacian could not be factored.
    """
    loss0 = work_links[_F]
    weight = work_links[_W]
    m_ref = work_links[_MT]
    loss_ref = work_links[_FT]
    n_links = mass_flow_kg_s.shape[0]
    m_small = 1e-3 * start_flow_kg_s
    for k in range(n_links):  # only a pump has a loss at zero flow
        loss0[k] = -pump_rise(k, 0.0, coef)[0] if coef[C_MODE, k] >= 0.0 else 0.0
    for sweep in range(LINEAR_START_PASSES):
        for k in range(n_links):
            m = mass_flow_kg_s[k]
            if sweep == 0:
                m_ref[k] = start_flow_kg_s
            elif sweep == 1:
                m_ref[k] = math.copysign(max(abs(m), m_small), m)
            else:
                m_abs = max(abs(m), m_small)
                m_ref[k] = math.copysign(math.sqrt(abs(m_ref[k]) * m_abs), m)
        evaluate_link_range(
            m_ref,
            coef,
            work_links[_X],
            work_links[_XR],
            work_links[_XD],
            loss_ref,
            work_links[_ST],
            0,
            n_links,
            False,
        )
        for k in range(n_links):
            secant = (loss_ref[k] - loss0[k]) / m_ref[k]
            weight[k] = 1.0 / max(abs(secant), slope_floor_Pa_s_kg)
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
            work_nodes[_X2],
            pressure_Pa,
            mass_flow_kg_s,
        )
    return True


@njit(cache=True)
def solve_link_for_dp(k, dp_Pa, m_start, coef, work_links):
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
    work_links : ndarray, shape (N_LINK_ROWS, n_links)
        Solver workspace; its Colebrook-White rows are read and updated and
        entry ``k`` of the trial rows is overwritten. [-]

    Returns
    -------
    (mass_flow_kg_s, converged, loss_Pa, slope_Pa_s_kg) : tuple
        The flow [kg/s], whether it meets ``dp_Pa`` to 1e-10 relative, and the
        link's loss [Pa] and slope [Pa s/kg] at that flow.
    """
    flow = work_links[_MT]
    colebrook_x = work_links[_X]
    colebrook_re = work_links[_XR]
    colebrook_dx = work_links[_XD]
    loss_out = work_links[_FT]
    slope_out = work_links[_ST]
    lo = -np.inf
    hi = np.inf
    m = m_start
    loss = np.nan
    slope = np.nan
    for _ in range(_HOLD_MAX_ITER):
        flow[k] = m
        evaluate_link_range(
            flow,
            coef,
            colebrook_x,
            colebrook_re,
            colebrook_dx,
            loss_out,
            slope_out,
            k,
            k + 1,
        )
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


@njit(cache=True)
def _hold_pressures(
    from_node,
    to_node,
    coef,
    mass_flow_kg_s,
    pressure_Pa,
    work_links,
    loss,
    slope,
    resid,
    tol_Pa,
):
    """Re-solve the links whose equation fails at the given pressures.

    A warm start from a previous solution after a change at a few links (a valve
    moved) leaves those links' equations badly off while the rest still hold.
    Each such link without a pump gets the flow its new law passes at the held
    pressure difference, so that Newton starts with only a mass imbalance to
    spread, which it does in a nearly linear step. Links with a pump keep their
    flow (their law need not be monotone). ``loss``, ``slope`` and ``resid``
    hold every link's law and residual at entry and are updated for the links
    changed. Returns the largest residual after. [Pa]
    """
    worst = 0.0
    for k in range(mass_flow_kg_s.shape[0]):
        r = resid[k]
        if coef[C_MODE, k] < 0.0:
            # resid = loss - (p_from - p_to)
            held = loss[k] - r
            if abs(r) > HOLD_PRESSURE_RTOL * (abs(loss[k]) + abs(held)) + tol_Pa:
                dp = pressure_Pa[from_node[k]] - pressure_Pa[to_node[k]]
                m, ok, f, s = solve_link_for_dp(
                    k, dp, mass_flow_kg_s[k], coef, work_links
                )
                if ok:
                    mass_flow_kg_s[k] = m
                    loss[k] = f
                    slope[k] = s
                    r = f - dp
                    resid[k] = r
        worst = max(worst, abs(r))
    return worst


# ------------------------------------------------------------ Newton steps


@njit(cache=True)
def _line_search(
    from_node,
    to_node,
    coef,
    work_links,
    mass_flow_kg_s,
    pressure_Pa,
    dm,
    dp,
    weight,
    phi0,
    m_trial,
    p_trial,
    loss_trial,
    slope_trial,
    resid_trial,
    imb_trial,
    tol_kg_s,
    tol_Pa,
):
    """Backtrack along (dm, dp) until the merit falls enough [3]_.

    Fills the trial rows; ``weight`` are the step's Newton weights, which
    scale the merit, and ``phi0`` the merit at the base point. Returns whether
    a step was accepted, the trial's largest residual [Pa] and imbalance
    [kg/s], the first non-finite link (-1 if none), and the number of trials
    evaluated.
    """
    alpha = 1.0
    max_r = np.inf
    max_g = np.inf
    bad = -1
    for trial in range(_MAX_HALVINGS):
        for k in range(m_trial.shape[0]):
            m_trial[k] = mass_flow_kg_s[k] + alpha * dm[k]
        for n in range(p_trial.shape[0]):
            p_trial[n] = pressure_Pa[n] + alpha * dp[n]
        bad = evaluate_links(m_trial, coef, work_links, loss_trial, slope_trial)
        max_r = link_residuals_Pa(loss_trial, p_trial, from_node, to_node, resid_trial)
        max_g = node_imbalance_kg_s(m_trial, from_node, to_node, imb_trial)
        if bad < 0:
            if max_g <= tol_kg_s and max_r <= tol_Pa:
                return True, max_r, max_g, bad, trial + 1
            phi = merit(resid_trial, weight, imb_trial)
            if phi <= (1.0 - 2.0 * _ARMIJO * alpha) * phi0:
                return True, max_r, max_g, bad, trial + 1
        alpha *= 0.5
    return False, max_r, max_g, bad, _MAX_HALVINGS


@njit(cache=True)
def _factor_and_step(
    exact,
    from_node,
    to_node,
    node_position,
    band,
    slope,
    resid,
    imb,
    weight,
    work_nodes,
    dp,
    dm,
    slope_floor_Pa_s_kg,
):
    """Weights, Laplacian, factor and increments of one Newton step.

    Returns whether the factorization succeeded, whether the step is an exact
    Newton step (every weight ``1/(dF/dm)``), and the merit at the base point
    with these weights (for the line search). [kg2/s2]
    """
    n_negative, n_inexact = newton_weights(slope, slope_floor_Pa_s_kg, exact, weight)
    assemble_laplacian(weight, from_node, to_node, node_position, band, work_nodes[_SC])
    definite = n_negative == 0
    fraction = PIVOT_FRACTION_DEFINITE if definite else PIVOT_FRACTION_INDEFINITE
    if not band_ldlt(band, work_nodes[_SC], fraction, definite):
        return False, False, np.inf
    phi0 = solve_increment(
        weight,
        resid,
        imb,
        from_node,
        to_node,
        node_position,
        band,
        work_nodes[_X2],
        dp,
        dm,
    )
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
def _has_rising_pump(slope_Pa_s_kg, slope_floor_Pa_s_kg):
    for k in range(slope_Pa_s_kg.shape[0]):
        if slope_Pa_s_kg[k] <= -slope_floor_Pa_s_kg:
            return True
    return False


@njit(cache=True)
def _max_abs(values):
    scale = 0.0
    for k in range(values.shape[0]):
        scale = max(scale, abs(values[k]))
    return scale


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
def _apply_final_step(out_m, out_p, m, p, dm, dp, from_node, to_node, imb, in_place):
    """Write the last iterate ``m + dm``, ``p + dp`` into ``out_m``, ``out_p``.

    ``in_place`` says that ``out_m``, ``out_p`` are ``m``, ``p``. Returns
    ``(applied, largest imbalance [kg/s])``; the step is not applied (and an
    in-place one is undone) unless every pressure is finite and every node
    balances to ``BALANCE_RTOL`` of the largest flow.
    """
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
def _store(mass_flow_kg_s, pressure_Pa, m, p, swapped):
    """Copy the current iterate into the caller's arrays when it lives elsewhere."""
    if swapped:
        mass_flow_kg_s[:] = m
        pressure_Pa[:] = p


@njit(cache=True)
def solve_network(
    from_node,
    to_node,
    node_position,
    data,
    operating,
    coef,
    band,
    mass_flow_kg_s,
    pressure_Pa,
    work_links,
    work_nodes,
    start,
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
    node_position : ndarray of int64
        Row of each node in the reverse Cuthill-McKee ordered reduced Laplacian;
        -1 for the reference node. [-]
    data : ndarray, shape (N_DATA_ROWS, n_links)
        Static link data (rows ``D_*``). [SI]
    operating : ndarray, shape (N_OP_ROWS, n_links)
        Water temperature [°C], valve opening [-], pump speed [-] per link.
    coef : ndarray, shape (N_COEF_ROWS, n_links)
        Workspace for the per-solve link constants. [SI]
    band : ndarray, shape (n_nodes - 1, half_bandwidth + 1)
        Workspace for the banded Laplacian and its factor. [kg/(Pa s)]
    mass_flow_kg_s : ndarray
        Start flows on entry (ignored on a cold start); solution on exit. [kg/s]
    pressure_Pa : ndarray
        Start pressures on entry (used by ``START_FLOWS_PRESSURES`` only);
        solution on exit, zero at the reference node. [Pa]
    work_links : ndarray, shape (N_LINK_ROWS, n_links)
        Workspace; row ``_X`` keeps Colebrook-White start values between warm
        solves. [-]
    work_nodes : ndarray, shape (N_NODE_ROWS, n_nodes)
        Workspace. [-]
    start : int
        ``START_COLD``, ``START_FLOWS`` or ``START_FLOWS_PRESSURES``. [-]
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
        Largest link equation residual at exit (estimated, see Notes, when the
        solve ended on the step). [Pa]
    worst_node : int
        Node with the largest imbalance. [-]
    worst_link : int
        Link with the largest residual (the first non-finite link for
        ``STATUS_NOT_FINITE``). [-]
    evaluations : int
        Evaluations of all link laws (the dominant cost). [-]

    Notes
    -----
    Global gradient algorithm [1]_ in increment form: with ``r = F(m) - A^T p``
    and ``g = A m``, solve ``(A W A^T) dp = A W r - g`` with ``W = D^-1`` and set
    ``dm = W (A^T dp - r)``. The step is damped by backtracking on
    ``sum((r/|D|)^2) + sum(g^2)`` [3]_. The solve ends when both tolerances hold
    at an evaluated iterate, or when a last step passes :func:`_step_is_final`:
    an exact Newton step, or a chord step [6]_ with the factor of an earlier
    iterate of the same solve, held to a residual at the round-off of the
    pressures (``CHORD_ROUNDOFF_RTOL``) and tried first when the last step
    moved every flow by less than that bound over ``max_residual`` of itself.
    The step is then
    applied (``A dm = -g`` makes every node balance to round-off) and
    ``max_residual_Pa`` is the estimate of the residual it leaves. Every node
    must balance to ``BALANCE_RTOL`` of the largest flow; after damped steps the
    flows are projected onto mass balance once with the last factor.
    """
    n_links = mass_flow_kg_s.shape[0]
    prepare_links(data, operating, coef, work_links[_OT : _OS + 1])
    # The current iterate (m, p) with its link losses, slopes, residuals and node
    # imbalances, and a second set of rows where the line search builds its
    # trial point; an accepted trial swaps the two sets (nothing is copied).
    m = mass_flow_kg_s
    p = pressure_Pa
    loss = work_links[_F]
    slope = work_links[_S]
    resid = work_links[_R]
    imb = work_nodes[_G]
    m_t = work_links[_MT]
    p_t = work_nodes[_PT]
    loss_t = work_links[_FT]
    slope_t = work_links[_ST]
    resid_t = work_links[_RT]
    imb_t = work_nodes[_GT]
    weight = work_links[_W]
    dm = work_links[_DM]
    dp = work_nodes[_DP]
    swapped = False

    iterations = 0
    evaluations = 0
    if start == START_COLD:
        m[:] = 0.0
        p[:] = 0.0
        work_links[_X, :] = 0.0
        iterations = LINEAR_START_PASSES
        evaluations = LINEAR_START_PASSES
        if not _linear_start(
            from_node,
            to_node,
            coef,
            node_position,
            band,
            m,
            p,
            work_links,
            work_nodes,
            start_flow_kg_s,
            slope_floor_Pa_s_kg,
        ):
            return (
                STATUS_NOT_POSITIVE_DEFINITE,
                iterations,
                np.inf,
                np.inf,
                0,
                0,
                evaluations,
            )

    elif start == START_FLOWS:
        p[:] = 0.0

    bad = evaluate_links(m, coef, work_links, loss, slope)
    evaluations += 1
    max_r = link_residuals_Pa(loss, p, from_node, to_node, resid)
    if start == START_FLOWS_PRESSURES and bad < 0:
        max_r = _hold_pressures(
            from_node, to_node, coef, m, p, work_links, loss, slope, resid, tol_Pa
        )
    max_g = node_imbalance_kg_s(m, from_node, to_node, imb)
    projected = False
    # band and weight hold a factor made at an earlier iterate of this solve,
    # and m_t the iterate before m
    have_factor = False
    while True:
        if bad >= 0 or not (math.isfinite(max_r) and math.isfinite(max_g)):
            worst = bad if bad >= 0 else _worst_index(resid)
            _store(mass_flow_kg_s, pressure_Pa, m, p, swapped)
            return STATUS_NOT_FINITE, iterations, max_g, max_r, 0, worst, evaluations
        if max_g <= tol_kg_s and max_r <= tol_Pa:
            if projected or max_g <= BALANCE_RTOL * _max_abs(m):
                break
            # Project onto mass balance with a factor: solve with r = 0, so
            # dm = W A^T dp and A dm = -g. The correction is tiny, and so is
            # its round-off.
            if not have_factor:
                iterations += 1
                have_factor, _, _ = _factor_and_step(
                    False,
                    from_node,
                    to_node,
                    node_position,
                    band,
                    slope,
                    resid,
                    imb,
                    weight,
                    work_nodes,
                    dp,
                    dm,
                    slope_floor_Pa_s_kg,
                )
                if not have_factor:
                    _store(mass_flow_kg_s, pressure_Pa, m, p, swapped)
                    return (
                        STATUS_NOT_POSITIVE_DEFINITE,
                        iterations,
                        max_g,
                        max_r,
                        _worst_index(imb),
                        _worst_index(resid),
                        evaluations,
                    )
            resid_t[:] = 0.0
            solve_increment(
                weight,
                resid_t,
                imb,
                from_node,
                to_node,
                node_position,
                band,
                work_nodes[_X2],
                dp,
                dm,
            )
            for k in range(n_links):
                m[k] += dm[k]
            bad = evaluate_links(m, coef, work_links, loss, slope)
            evaluations += 1
            max_r = link_residuals_Pa(loss, p, from_node, to_node, resid)
            max_g = node_imbalance_kg_s(m, from_node, to_node, imb)
            projected = True
            continue
        if iterations >= max_iter:
            _store(mass_flow_kg_s, pressure_Pa, m, p, swapped)
            return (
                STATUS_MAX_ITER,
                iterations,
                max_g,
                max_r,
                _worst_index(imb),
                _worst_index(resid),
                evaluations,
            )

        # A chord step as the last one: the factor of an earlier iterate, when
        # the last step was small enough that the weights it left stale likely
        # leave less than the round-off bound (relative change times max_r
        # estimates the first-order term of _step_is_final). A band solve, no
        # factorization, no evaluation.
        chord_tol = (
            min(tol_Pa, CHORD_ROUNDOFF_RTOL * _max_abs(p)) if have_factor else 0.0
        )
        if have_factor and _change_below(
            m, m_t, chord_tol / max_r if max_r > 0.0 else np.inf
        ):
            solve_increment(
                weight,
                resid,
                imb,
                from_node,
                to_node,
                node_position,
                band,
                work_nodes[_X2],
                dp,
                dm,
            )
            final, estimate = _step_is_final(
                m, dm, slope, weight, True, coef, chord_tol
            )
            if final:
                applied, max_g = _apply_final_step(
                    mass_flow_kg_s,
                    pressure_Pa,
                    m,
                    p,
                    dm,
                    dp,
                    from_node,
                    to_node,
                    imb,
                    not swapped,
                )
                if applied:
                    return (
                        STATUS_CONVERGED,
                        iterations,
                        max_g,
                        estimate,
                        _worst_index(imb),
                        _worst_index(dm),
                        evaluations,
                    )

        # Exact Newton step first when some pump slope is negative, then |D|.
        accepted = False
        for exact in (True, False):
            if exact and not _has_rising_pump(slope, slope_floor_Pa_s_kg):
                continue
            iterations += 1
            have_factor, exact_step, phi0 = _factor_and_step(
                exact,
                from_node,
                to_node,
                node_position,
                band,
                slope,
                resid,
                imb,
                weight,
                work_nodes,
                dp,
                dm,
                slope_floor_Pa_s_kg,
            )
            if not have_factor:
                if exact:
                    continue
                _store(mass_flow_kg_s, pressure_Pa, m, p, swapped)
                return (
                    STATUS_NOT_POSITIVE_DEFINITE,
                    iterations,
                    max_g,
                    max_r,
                    _worst_index(imb),
                    _worst_index(resid),
                    evaluations,
                )
            if exact_step:
                final, estimate = _step_is_final(
                    m, dm, slope, weight, False, coef, tol_Pa
                )
                if final:
                    applied, max_g = _apply_final_step(
                        mass_flow_kg_s,
                        pressure_Pa,
                        m,
                        p,
                        dm,
                        dp,
                        from_node,
                        to_node,
                        imb,
                        not swapped,
                    )
                    if applied:
                        return (
                            STATUS_CONVERGED,
                            iterations,
                            max_g,
                            estimate,
                            _worst_index(imb),
                            _worst_index(dm),
                            evaluations,
                        )
            accepted, max_r, max_g, bad, trials = _line_search(
                from_node,
                to_node,
                coef,
                work_links,
                m,
                p,
                dm,
                dp,
                weight,
                phi0,
                m_t,
                p_t,
                loss_t,
                slope_t,
                resid_t,
                imb_t,
                tol_kg_s,
                tol_Pa,
            )
            evaluations += trials
            if accepted:
                break
        # Without an acceptable step the shortest trial is taken; max_iter then
        # ends a stalled solve.
        m, m_t = m_t, m
        p, p_t = p_t, p
        loss, loss_t = loss_t, loss
        slope, slope_t = slope_t, slope
        resid, resid_t = resid_t, resid
        imb, imb_t = imb_t, imb
        swapped = not swapped
        projected = False

    _store(mass_flow_kg_s, pressure_Pa, m, p, swapped)
    return (
        STATUS_CONVERGED,
        iterations,
        max_g,
        max_r,
        _worst_index(imb),
        _worst_index(resid),
        evaluations,
    )
