"""Compiled scalar kernels for water properties and hydraulic components.

Every kernel here is a small ``@njit(cache=True)`` function of float64 scalars that
returns float64 scalars (or a tuple of them). They are called from the Python
wrappers in this package and from compiled code of the network solver, so their
signatures (each kernel's Parameters and Returns) are a contract. Pressure
kernels return ``(value, slope)``: the pressure [Pa] and its derivative in mass
flow [Pa/(kg/s)]; the friction kernels return f [-] and d f / d Re [-].

Mass flow is signed. Pressure drops are odd in the flow and their slopes
d(dp)/d(mass_flow) are finite and strictly positive at every flow, zero included
(pipes with length > 0 or a local loss, valves with Kv > 0). The pump rise has a
strictly negative slope whenever ``a2 < 0``. Kernels never raise or warn; inputs
are validated by the Python wrappers.
"""

from __future__ import annotations

import math

from simheat._jit import njit
from simheat.physics._water_kernels import (  # noqa: F401 (re-exported)
    WATER_TEMP_MAX_C,
    WATER_TEMP_MIN_C,
    _clamp,
    water_cp_J_kg_K,
    water_density_kg_m3,
    water_viscosity_Pa_s,
)

# --- friction ----------------------------------------------------------------------
RE_LAMINAR_MAX = 2000.0  # upper end of the laminar law 64/Re [-]
RE_TURBULENT_MIN = 4000.0  # lower end of Colebrook-White [-]
RE_FLOOR = 1e-9  # Reynolds numbers below this are treated as this value [-]
# The Colebrook Newton loop stops after a step below this fraction of x = 1/sqrt(f).
# Newton's error after a step s is at most 0.434 s^2 / x^2 here (see
# colebrook_solve), so with x > 2 the x after such a step is exact to ~1e-17. [-]
_COLEBROOK_STEP_RTOL = 1e-8
_COLEBROOK_MAX_ITER = 20

# --- regularisation of quadratic laws at zero flow ---------------------------------
# v|v| is evaluated as v*sqrt(v^2 + v0^2): smooth, odd, slope > 0 at zero flow.
# The relative error is below v0^2 / (2 v^2), i.e. 5e-5 at 0.01 m/s.
ZETA_REGULARISATION_VELOCITY_M_S = 1e-4
# Same device for valves and pumps on mass flow: 1e-5 kg/s is 0.036 L/h, the flow
# that v0 above gives in a tube of about 11 mm bore.
REGULARISATION_MASS_FLOW_KG_S = 1e-5

# --- valves ------------------------------------------------------------------------
# Fraction of the fully open Kv that a closed valve still passes. An assumption of
# ours (not a standard value): thermostatic valves are not drop-tight, EN 215 tests
# closing rather than demanding zero flow (from memory). It keeps the network well
# posed when every valve in a branch is shut.
LEAKAGE_FRACTION = 0.005
# Kv definition: Q [m3/h] = Kv * sqrt(dp [bar] * 1000 / rho) (EN 60534-2-1,
# VDI 2173). Solved for dp with Q = 3600 m / rho: dp = KV_CONSTANT * m^2 / (rho Kv^2).
_KV_CONSTANT = 1e5 * 3600.0**2 / 1000.0  # = 1.296e9 [Pa kg/m3 (m3/h)^2 / (kg/s)^2]
KV_PRESSURE_CONSTANT = _KV_CONSTANT  # public name for the network kernels

# --- check valves -----------------------------------------------------------------
# A closed check valve meets reverse flow with a very large linear resistance: the
# leak through a closed seat is a thin-gap (laminar) flow, so proportional to the
# pressure difference. Our assumption, not a standard value: 1e11 Pa s/kg leaks
# 1e-6 kg/s (3.6 g/h) at 100 kPa reverse pressure. The resistance is blended in
# over CHECK_VALVE_BLEND_FLOW_KG_S so the link law stays continuously
# differentiable (slope 0 at zero flow, as forward flow sees none of it).
CHECK_VALVE_REVERSE_RESISTANCE_PA_S_KG = 1e11
CHECK_VALVE_BLEND_FLOW_KG_S = 1e-7

# --- regulated pumps ---------------------------------------------------------------
PUMP_MODE_FIXED_SPEED = 0  # runs on its curve at the given speed
PUMP_MODE_CONSTANT_DP = 1  # varies its speed to hold the set head
PUMP_MODE_PROPORTIONAL_DP = 2  # set head at the control flow, half of it at zero
# The corner where a regulated pump's control line meets its maximum-speed curve
# is rounded (smooth minimum) over this fraction of the set head; away from the
# corner the head differs from the sharp minimum by delta^2 / (4 |line - curve|).
PUMP_CONTROL_CORNER_FRACTION = 1e-3
# Flow scale, as a fraction of the control flow, over which a proportional-dp
# pump's control line levels off for reverse flow (our modelling choice). [-]
PUMP_REVERSE_BLEND_FRACTION = 0.01

# --- thermostatic heads ------------------------------------------------------------
TRV_CORNER_FRACTION = 0.05  # width of each rounded corner, as a fraction of the band
TRV_BAND_FLOOR_K = 1e-9  # bands below this are treated as this value [K]

# --- emitters ----------------------------------------------------------------------
# EN 442-2 nominal (standard) conditions: supply 75 °C, return 65 °C, room 20 °C.
NOMINAL_SUPPLY_C = 75.0
NOMINAL_RETURN_C = 65.0
NOMINAL_ROOM_C = 20.0
# Log mean excess temperature at the nominal conditions (EN 442-2:2014, section 3):
# (75 - 65) / ln(55 / 45) = 49.83 K.
NOMINAL_EXCESS_K = (NOMINAL_SUPPLY_C - NOMINAL_RETURN_C) / math.log(
    (NOMINAL_SUPPLY_C - NOMINAL_ROOM_C) / (NOMINAL_RETURN_C - NOMINAL_ROOM_C)
)


@njit(cache=True)
def colebrook_solve(reynolds, relative_roughness, x_start):
    """Colebrook-White friction factor, its exact Re-derivative, and x = 1/sqrt(f).

    Solves g(x) = x + 2 log10(e/3.7 + 2.51 x / Re) = 0 by Newton's method from
    ``x_start`` (when > 0, e.g. the solution at a nearby Re) or else from the
    Swamee-Jain explicit value, then differentiates implicitly. Valid for
    Re >= ~2000.

    Parameters
    ----------
    reynolds, relative_roughness : float
        Reynolds number (> 0) and roughness over inner diameter e/D. [-]
    x_start : float
        Start for x = 1/sqrt(f); <= 0 (or NaN) starts from Swamee-Jain. [-]

    Returns
    -------
    (f, df_dRe, x) : tuple of float
        Friction factor [-], its derivative d f / d Re [-], and 1/sqrt(f) [-].

    Notes
    -----
    Colebrook (1939) equation, Swamee and Jain (1976) start. g is increasing
    and concave, so Newton's error obeys
    e' <= |g''| / (2 g') e^2 <= k / (2 x^2) e^2 with k = 2/ln 10 (using
    b / (a + b x) <= 1/x); the loop stops after a step below 1e-8 x, when the
    next error would be below 1e-17 relative.
    """
    a = relative_roughness / 3.7
    b = 2.51 / reynolds
    k = 2.0 / math.log(10.0)
    x = x_start
    if not x > 0.0:
        # Swamee-Jain (1976) start: f = 0.25 / log10(e/3.7 + 5.74 / Re^0.9)^2
        x = -2.0 * math.log10(a + 5.74 / reynolds**0.9)
    for _ in range(_COLEBROOK_MAX_ITER):
        inner = a + b * x
        if not inner > 0.0:  # a far-off start stepped out of the domain
            x = -2.0 * math.log10(a + 5.74 / reynolds**0.9)
            inner = a + b * x
        residual = x + 2.0 * math.log10(inner)
        d_residual_dx = 1.0 + k * b / inner
        step = residual / d_residual_dx
        x -= step
        if abs(step) <= _COLEBROOK_STEP_RTOL * abs(x):
            break
    inner = a + b * x
    d_residual_dx = 1.0 + k * b / inner
    d_residual_dre = -k * b * x / (reynolds * inner)  # d(b)/dRe = -b/Re
    dx_dre = -d_residual_dre / d_residual_dx
    f = 1.0 / (x * x)
    return f, -2.0 * dx_dre / (x * x * x), x


@njit(cache=True)
def _colebrook(reynolds, relative_roughness):
    """Colebrook-White friction factor and its exact Re-derivative, Re >= ~2000."""
    f, df, _ = colebrook_solve(reynolds, relative_roughness, 0.0)
    return f, df


@njit(cache=True)
def darcy_friction_factor(reynolds, relative_roughness):
    """Darcy friction factor and its derivative with respect to Re.

    Laminar 64/Re below Re 2000, Colebrook-White above 4000, and between them a
    cubic Hermite interpolation in Re that matches value and slope at both ends
    (the transitional-zone treatment of Dunlop, 1991). Re below 1e-9 is treated as
    1e-9.

    Parameters
    ----------
    reynolds, relative_roughness : float
        Reynolds number (>= 0) and roughness over inner diameter e/D. [-]

    Returns
    -------
    (f, df_dRe) : tuple of float
        Friction factor [-] and its derivative d f / d Re [-].
    """
    re = max(reynolds, RE_FLOOR)
    if re <= RE_LAMINAR_MAX:
        return 64.0 / re, -64.0 / (re * re)
    if re >= RE_TURBULENT_MIN:
        return _colebrook(re, relative_roughness)
    f1, df1 = _colebrook(RE_TURBULENT_MIN, relative_roughness)
    return transitional_friction_factor(re, f1, df1)


@njit(cache=True)
def transitional_friction_factor(reynolds, f_onset, df_onset):
    """Cubic Hermite friction factor between Re 2000 and 4000, and d f / d Re.

    Matches the laminar 64/Re (value and slope) at Re 2000 and the turbulent
    ``f_onset``, ``df_onset`` (Colebrook-White at Re 4000) at Re 4000.

    Parameters
    ----------
    reynolds : float
        Reynolds number, between 2000 and 4000. [-]
    f_onset, df_onset : float
        Colebrook-White f and d f / d Re at Re 4000. [-]

    Returns
    -------
    (f, df_dRe) : tuple of float
        Friction factor [-] and its derivative d f / d Re [-].
    """
    width = RE_TURBULENT_MIN - RE_LAMINAR_MAX
    f0 = 64.0 / RE_LAMINAR_MAX
    m0 = -64.0 / (RE_LAMINAR_MAX * RE_LAMINAR_MAX) * width
    f1 = f_onset
    m1 = df_onset * width
    s = (reynolds - RE_LAMINAR_MAX) / width
    s2 = s * s
    s3 = s2 * s
    f = (
        (2.0 * s3 - 3.0 * s2 + 1.0) * f0
        + (s3 - 2.0 * s2 + s) * m0
        + (-2.0 * s3 + 3.0 * s2) * f1
        + (s3 - s2) * m1
    )
    df_ds = (
        (6.0 * s2 - 6.0 * s) * f0
        + (3.0 * s2 - 4.0 * s + 1.0) * m0
        + (-6.0 * s2 + 6.0 * s) * f1
        + (3.0 * s2 - 2.0 * s) * m1
    )
    return f, df_ds / width


@njit(cache=True)
def pipe_pressure_drop_Pa(
    mass_flow_kg_s, length_m, inner_diameter_m, roughness_m, zeta, temp_C
):
    """Signed pressure drop of a pipe run [Pa] and its slope [Pa/(kg/s)].

    dp = f(Re) L/D rho v|v|/2 + zeta rho/2 v sqrt(v^2 + v0^2), with the laminar
    branch written as 32 mu L v / D^2 so it is linear through zero flow.

    Parameters
    ----------
    mass_flow_kg_s : float
        Signed mass flow through the run, positive from its start to its end. [kg/s]
    length_m : float
        Straight length of the run; 0 leaves only the local losses. [m]
    inner_diameter_m : float
        Bore of the tube, > 0. [m]
    roughness_m : float
        Absolute roughness of the tube wall. [m]
    zeta : float
        Sum of the local loss coefficients of the run's fittings, referred to the
        velocity in the tube. [-]
    temp_C : float
        Water temperature for density and viscosity. [°C]

    Returns
    -------
    (dp_Pa, slope) : tuple of float
        Pressure drop in the positive flow direction [Pa] and its derivative in mass
        flow [Pa/(kg/s)].

    Notes
    -----
    Darcy-Weisbach with the friction factor of :func:`darcy_friction_factor`
    (Hagen-Poiseuille in laminar flow); local losses as zeta times the dynamic
    pressure (Idelchik, Handbook of Hydraulic Resistance).
    """
    rho = water_density_kg_m3(temp_C)
    mu = water_viscosity_Pa_s(temp_C)
    area = 0.25 * math.pi * inner_diameter_m * inner_diameter_m
    v = mass_flow_kg_s / (rho * area)
    speed = abs(v)
    dp = 0.0
    slope_v = 0.0  # d(dp)/dv [Pa s/m]
    if length_m > 0.0:
        re = rho * speed * inner_diameter_m / mu
        if re <= RE_LAMINAR_MAX:
            k_lam = 32.0 * mu * length_m / (inner_diameter_m * inner_diameter_m)
            dp += k_lam * v
            slope_v += k_lam
        else:
            f, df_dre = darcy_friction_factor(re, roughness_m / inner_diameter_m)
            c = 0.5 * rho * length_m / inner_diameter_m
            dp += c * f * v * speed
            slope_v += c * speed * (2.0 * f + re * df_dre)
    if zeta > 0.0:
        v0 = ZETA_REGULARISATION_VELOCITY_M_S
        root = math.sqrt(v * v + v0 * v0)
        c = 0.5 * rho * zeta
        dp += c * v * root
        slope_v += c * (2.0 * v * v + v0 * v0) / root
    return dp, slope_v / (rho * area)


@njit(cache=True)
def valve_pressure_drop_Pa(mass_flow_kg_s, kv_m3_h, opening, temp_C):
    """Signed pressure drop of a Kv-rated valve [Pa] and its slope [Pa/(kg/s)].

    Effective Kv = kv_m3_h * (LEAKAGE_FRACTION + (1 - LEAKAGE_FRACTION) * opening),
    opening clamped to [0, 1]; dp = 1.296e9 m sqrt(m^2 + m0^2) / (rho Kv^2).

    Parameters
    ----------
    mass_flow_kg_s : float
        Signed mass flow through the valve. [kg/s]
    kv_m3_h : float
        Flow coefficient of the fully open valve, > 0. [m3/h]
    opening : float
        Opening of the valve, 0 shut (leakage only) to 1 fully open; clamped. [-]
    temp_C : float
        Water temperature for the density. [°C]

    Returns
    -------
    (dp_Pa, slope) : tuple of float
        Pressure drop in the positive flow direction [Pa] and its derivative in mass
        flow [Pa/(kg/s)].

    Notes
    -----
    Kv definition of EN 60534-2-1 (Q = Kv sqrt(dp / 1 bar * 1000 / rho)).
    """
    rho = water_density_kg_m3(temp_C)
    o = _clamp(opening, 0.0, 1.0)
    kv = kv_m3_h * (LEAKAGE_FRACTION + (1.0 - LEAKAGE_FRACTION) * o)
    c = _KV_CONSTANT / (rho * kv * kv)
    m = mass_flow_kg_s
    m0 = REGULARISATION_MASS_FLOW_KG_S
    root = math.sqrt(m * m + m0 * m0)
    return c * m * root, c * (2.0 * m * m + m0 * m0) / root


@njit(cache=True)
def pump_pressure_rise_Pa(mass_flow_kg_s, a0, a1, a2, speed_ratio, temp_C):
    """Pressure rise of a pump [Pa] and its slope d(rise)/d(mass flow) [Pa/(kg/s)].

    rise = a0 s^2 + a1 s Q + a2 Q sqrt(Q^2 + Q0^2) with Q = m / rho [m3/s] and s the
    speed ratio clamped to >= 0 (affinity laws). At s = 0 only the a2 term acts,
    as a resistance when a2 < 0.

    Parameters
    ----------
    mass_flow_kg_s : float
        Signed mass flow through the pump, positive in its pumping direction. [kg/s]
    a0, a1, a2 : float
        Full-speed curve in volume flow Q: shut-off head, linear and quadratic
        coefficients (a2 < 0 for a falling curve). [Pa, Pa s/m3, Pa s2/m6]
    speed_ratio : float
        Speed over full speed; clamped to >= 0 (0 is a stopped pump). [-]
    temp_C : float
        Water temperature for the density. [°C]

    Returns
    -------
    (rise_Pa, slope) : tuple of float
        Pressure rise [Pa] and its derivative in mass flow [Pa/(kg/s)].

    Notes
    -----
    Quadratic pump curve scaled by the pump affinity laws (head ~ speed^2 and
    flow ~ speed at similar operating points; any pump handbook, e.g. Gülich,
    Centrifugal Pumps).
    """
    rho = water_density_kg_m3(temp_C)
    s = max(speed_ratio, 0.0)
    q = mass_flow_kg_s / rho
    q0 = REGULARISATION_MASS_FLOW_KG_S / rho
    root = math.sqrt(q * q + q0 * q0)
    rise = a0 * s * s + a1 * s * q + a2 * q * root
    d_rise_dq = a1 * s + a2 * (2.0 * q * q + q0 * q0) / root
    return rise, d_rise_dq / rho


@njit(cache=True)
def regulated_pump_rise_Pa(
    mass_flow_kg_s,
    a0,
    a1,
    a2,
    max_speed_ratio,
    mode,
    setpoint_Pa,
    control_flow_m3_s,
    temp_C,
):
    """Pressure rise of a fixed-speed or differential-pressure regulated pump.

    Mode 0: the curve at ``max_speed_ratio`` (:func:`pump_pressure_rise_Pa`).
    Mode 1 (constant dp): ``setpoint_Pa`` at every flow. Mode 2 (proportional dp):
    ``setpoint_Pa * (1/2 + Q / (2 control_flow_m3_s))``, half the set head at zero
    flow rising to the set head at the control flow; for reverse flow the line
    levels off smoothly just below half the set head (within
    PUMP_REVERSE_BLEND_FRACTION of it) instead of falling further. In modes 1
    and 2 the rise is
    capped by the curve at ``max_speed_ratio`` through a smooth minimum,
    ``(l + c - sqrt((l - c)^2 + delta^2)) / 2`` with
    ``delta = PUMP_CONTROL_CORNER_FRACTION * setpoint_Pa``. A stopped pump
    (speed 0) is the curve's a2 resistance whatever the mode.

    Parameters
    ----------
    mass_flow_kg_s : float
        Signed mass flow through the pump, positive in its pumping direction. [kg/s]
    a0, a1, a2 : float
        Full-speed curve, as for :func:`pump_pressure_rise_Pa`.
        [Pa, Pa s/m3, Pa s2/m6]
    max_speed_ratio : float
        Speed of a fixed-speed pump, or the highest speed a regulated pump can
        reach, over full speed; <= 0 is a stopped pump. [-]
    mode : int
        ``PUMP_MODE_*``: 0 fixed speed, 1 constant dp, 2 proportional dp. [-]
    setpoint_Pa : float
        Set head of a regulated pump, as a pressure (unused in mode 0). [Pa]
    control_flow_m3_s : float
        Volume flow at which a proportional-dp pump gives its full set head
        (used in mode 2 only; > 0 there). [m3/s]
    temp_C : float
        Water temperature for the density. [°C]

    Returns
    -------
    (rise_Pa, slope) : tuple of float
        Pressure rise [Pa] and its derivative in mass flow [Pa/(kg/s)].
    """
    curve, d_curve = pump_pressure_rise_Pa(
        mass_flow_kg_s, a0, a1, a2, max_speed_ratio, temp_C
    )
    if mode == PUMP_MODE_FIXED_SPEED or not max_speed_ratio > 0.0:
        return curve, d_curve
    if mode == PUMP_MODE_CONSTANT_DP:
        line = setpoint_Pa
        d_line = 0.0
    else:
        rho = water_density_kg_m3(temp_C)
        gain = 0.5 * setpoint_Pa / (control_flow_m3_s * rho)  # [Pa/(kg/s)]
        if mass_flow_kg_s >= 0.0:
            line = 0.5 * setpoint_Pa + gain * mass_flow_kg_s
            d_line = gain
        else:
            # Reverse flow: the controller holds about half the set head instead of
            # continuing the line below zero (where the head would turn negative and
            # a second, backwards solution would appear). tanh keeps value and slope
            # continuous at zero flow.
            blend = PUMP_REVERSE_BLEND_FRACTION * control_flow_m3_s * rho
            t = math.tanh(mass_flow_kg_s / blend)
            line = 0.5 * setpoint_Pa + gain * blend * t
            d_line = gain * (1.0 - t * t)
    delta = PUMP_CONTROL_CORNER_FRACTION * setpoint_Pa
    gap = line - curve
    root = math.sqrt(gap * gap + delta * delta)
    rise = 0.5 * (line + curve - root)
    slope = 0.5 * (d_line + d_curve - gap * (d_line - d_curve) / root)
    return rise, slope


@njit(cache=True)
def check_valve_reverse_dp_Pa(mass_flow_kg_s):
    """Extra pressure drop of a check valve [Pa] and its slope [Pa/(kg/s)].

    Zero for forward flow. For reverse flow u = -m > 0 it is
    ``-R (u - m_b ln(1 + u / m_b))``: slope ``R u / (m_b + u)``, zero at zero
    flow and R (CHECK_VALVE_REVERSE_RESISTANCE_PA_S_KG) once u >> m_b
    (CHECK_VALVE_BLEND_FLOW_KG_S), so the law is continuously differentiable.

    Parameters
    ----------
    mass_flow_kg_s : float
        Signed mass flow through the valve, positive in its open direction. [kg/s]

    Returns
    -------
    (dp_Pa, slope) : tuple of float
        Pressure drop in the positive flow direction (<= 0 for reverse flow, so
        it opposes that flow) [Pa] and its derivative in mass flow [Pa/(kg/s)].
    """
    if mass_flow_kg_s >= 0.0:
        return 0.0, 0.0
    r = CHECK_VALVE_REVERSE_RESISTANCE_PA_S_KG
    mb = CHECK_VALVE_BLEND_FLOW_KG_S
    u = -mass_flow_kg_s
    return -r * (u - mb * math.log1p(u / mb)), r * u / (mb + u)


@njit(cache=True)
def thermostatic_opening(sensor_temp_C, setpoint_C, band_K):
    """Return the opening [-] of a proportional thermostatic head, in [0, 1].

    1 at or below setpoint - band/2, 0 at or above setpoint + band/2, linear in
    between with both corners rounded (quadratic, C1) over 5 % of the band.

    Parameters
    ----------
    sensor_temp_C : float
        Temperature the head's sensor reads. [°C]
    setpoint_C : float
        Temperature at the middle of the proportional band (half open). [°C]
    band_K : float
        Proportional band: the rise in sensor temperature from fully open to
        closed; below 1e-9 K taken as 1e-9 K. [K]

    Notes
    -----
    A proportional controller: opening linear in the sensor temperature over the
    proportional band, the way EN 215 characterises thermostatic radiator valves
    (from memory); the rounded corners are our smoothing for the integrator.
    """
    band = max(band_K, TRV_BAND_FLOOR_K)
    u = (setpoint_C + 0.5 * band - sensor_temp_C) / band  # 0 closed ... 1 open
    w = TRV_CORNER_FRACTION
    span = 1.0 - w  # the straight middle part has slope 1 / span
    if u <= 0.0:
        return 0.0
    if u >= 1.0:
        return 1.0
    if u < w:
        return 0.5 * u * u / (w * span)
    if u > span:
        r = 1.0 - u
        return 1.0 - 0.5 * r * r / (w * span)
    return (u - 0.5 * w) / span


@njit(cache=True)
def emitter_output_W(nominal_W, exponent, excess_K):
    """Heat output [W] of a radiator by the EN 442 characteristic equation.

    ``Phi = Phi_n (dT / dT_n)^n`` (EN 442-2:2014, eq. 4) with ``dT_n`` =
    NOMINAL_EXCESS_K, continued as an odd function for a negative excess (water
    colder than the room takes heat in), so the law is smooth for the integrator.

    Parameters
    ----------
    nominal_W : float
        Output at the EN 442 nominal conditions 75/65/20 °C. [W]
    exponent : float
        Radiator exponent n of the characteristic equation. [-]
    excess_K : float
        Excess temperature of the water over the room (signed). [K]
    """
    r = excess_K / NOMINAL_EXCESS_K
    if r >= 0.0:
        return nominal_W * r**exponent
    return -nominal_W * (-r) ** exponent


@njit(cache=True)
def emitter_outputs_W(nominal_W, exponent, excess_K, out_W):
    """:func:`emitter_output_W` over 1-D arrays of equal length, into ``out_W``.

    Parameters
    ----------
    nominal_W, exponent, excess_K : ndarray
        Per emitter, as for :func:`emitter_output_W`. [W, -, K]
    out_W : ndarray
        Written: heat output of each emitter. [W]
    """
    for k in range(out_W.shape[0]):
        out_W[k] = emitter_output_W(nominal_W[k], exponent[k], excess_K[k])
