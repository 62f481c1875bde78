"""Link laws of the flow solve: loss minus pump rise of every link, and its slope.

A link is a pipe (Darcy-Weisbach, Colebrook-White, local losses), a valve (Kv
law with leakage), a check valve and a pump (fixed speed or differential-pressure
regulated), in any combination. :func:`prepare_links` folds the water properties
and geometry into per-link constants once per operating point, so an evaluation
of every link (:func:`evaluate_link_range`, the solver's hot loop) is a few
multiplications per link plus, for turbulent pipes, a Colebrook-White loop
started from the link's previous solution. It must agree with
:func:`~simheat.hydraulics._kernels.reference.link_loss_general_Pa`, the link
law built from the physics kernels one part at a time.

References
----------
.. [1] P. K. Swamee, A. K. Jain, "Explicit equations for pipe-flow problems",
   J. Hydraul. Div. ASCE 102(5), 1976.
"""

from __future__ import annotations

import math

from simheat._jit import njit
from simheat.hydraulics._kernels.records import (
    C_CHECK,
    C_DF_ONSET,
    C_F_ONSET,
    C_GAIN,
    C_LAM,
    C_MODE,
    C_P0,
    C_P1,
    C_P2,
    C_RE,
    C_RR,
    C_SET,
    C_TURB,
    C_VALVE,
    C_ZETA,
    C_ZETA_M0,
    D_A0,
    D_A1,
    D_A2,
    D_CHECK,
    D_CONTROL_FLOW,
    D_DF_ONSET,
    D_DIAMETER,
    D_F_ONSET,
    D_KV,
    D_LENGTH,
    D_MODE,
    D_ROUGHNESS,
    D_SETPOINT,
    D_ZETA,
    OP_OPENING,
    OP_SPEED,
    OP_TEMP,
)
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
    ZETA_REGULARISATION_VELOCITY_M_S,
    check_valve_reverse_dp_Pa,
    colebrook_solve,
    transitional_friction_factor,
    water_density_kg_m3,
    water_viscosity_Pa_s,
)

KV_M0_KG_S = REGULARISATION_MASS_FLOW_KG_S
# Colebrook-White in the link evaluation: Halley's method on
# g(x) = x + 2 log10(a + b x) = x + k ln(a + b x), k = 2 / ln 10 (the natural
# logarithm is the faster of the two), with g1 = 1 + k b / (a + b x) and
# g2 = -k b^2 / (a + b x)^2 its first two derivatives. Its error
# obeys e_next ~ ((g2 / 2 g1)^2 - g3 / 6 g1) e^3, and with b / (a + b x) <= 1/x
# that factor is at most 0.39 / x^3 for x >= 2; taking 4 / x^3 for margin, a
# step s with |s|^3 <= _COLEBROOK_BOUND x^4 leaves an error below 1e-16 x.
_LOG10_K = 2.0 / math.log(10.0)
_COLEBROOK_BOUND = 1e-16 / 4.0
_COLEBROOK_MAX_ITER = 20


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
    m0 = KV_M0_KG_S
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
    mass_flow_kg_s, coef, memory, loss_out_Pa, slope_out_Pa_s_kg, first, stop, exact
):
    """Loss minus pump rise, and its slope, of links ``first`` to ``stop - 1``.

    Parameters
    ----------
    mass_flow_kg_s : ndarray
        Link mass flows (entries ``first:stop`` are read). [kg/s]
    coef : ndarray, shape (N_COEF_ROWS, n_links)
        Constants from :func:`prepare_links`. [SI]
    memory : ColebrookMemory
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
        formula (within about 1 % [5]_, reused from the previous pipe with the
        same Reynolds number and relative roughness); it becomes the next
        start. [-]

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
    left below 1e-16 x. Agrees with
    :func:`~simheat.hydraulics._kernels.reference.link_loss_general_Pa` to round-off.
    """
    colebrook_x = memory.x
    colebrook_re = memory.reynolds
    colebrook_dx = memory.dx_dre
    # The last Swamee-Jain result: from rest every link has the same start flow,
    # and runs of pipes of one bore and temperature share it.
    sj_re = sj_rr = sj_x = sj_dx = 0.0
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
                        rr = coef[C_RR, k]
                        if re == sj_re and rr == sj_rr:
                            x, dx_dlnre = sj_x, sj_dx  # as the last pipe's
                        else:
                            a = rr * (1.0 / 3.7)
                            t = 5.74 / re**0.9
                            x = -2.0 * math.log10(a + t)
                            dx_dlnre = _LOG10_K * 0.9 * t / (a + t)
                            sj_re, sj_rr, sj_x, sj_dx = re, rr, x, dx_dlnre
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
                        # small change, in ln Re (where x is nearly linear) else;
                        # ln(1 + u) by five terms of its series up to |u| = 0.1
                        change = re - re_last
                        u = change / re_last
                        if abs(change) <= 0.01 * re_last:
                            x += colebrook_dx[k] * change
                        elif abs(u) <= 0.1:
                            u *= 1.0 - u * (0.5 - u * (1 / 3 - u * (0.25 - 0.2 * u)))
                            x += colebrook_dx[k] * re_last * u
                        else:
                            x += colebrook_dx[k] * re_last * math.log(re / re_last)
                    if not (x > 0.0 and a + b * x > 0.0):
                        # Swamee-Jain (1976) explicit start
                        x = -2.0 * math.log10(a + 5.74 / re**0.9)
                    inner = a + b * x
                    for _ in range(_COLEBROOK_MAX_ITER):
                        g = x + _LOG10_K * math.log(inner)
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
            root = math.sqrt(m * m + KV_M0_KG_S * KV_M0_KG_S)
            loss += cv * m * root
            slope += cv * (2.0 * m * m + KV_M0_KG_S * KV_M0_KG_S) / root
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
def evaluate_links(mass_flow_kg_s, coef, memory, loss_out_Pa, slope_out_Pa_s_kg):
    """Loss and slope of every link (:func:`evaluate_link_range` over all).

    Parameters
    ----------
    mass_flow_kg_s : ndarray
        Link mass flows. [kg/s]
    coef : ndarray, shape (N_COEF_ROWS, n_links)
        Constants from :func:`prepare_links`. [SI]
    memory : ColebrookMemory
        The Colebrook-White warm starts; read and updated. [-]
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
        memory,
        loss_out_Pa,
        slope_out_Pa_s_kg,
        0,
        mass_flow_kg_s.shape[0],
        True,
    )
