"""The link law built from the physics kernels, one part at a time.

The reference the solver's fast path
(:func:`~simheat.hydraulics._kernels.links.evaluate_link_range`, which folds
the water properties and geometry into per-link constants) must agree with to
round-off; the tests compare the two, and take Jacobian slopes from here.
"""

from __future__ import annotations

from simheat._jit import njit
from simheat.physics._kernels import (
    PUMP_MODE_FIXED_SPEED,
    check_valve_reverse_dp_Pa,
    pipe_pressure_drop_Pa,
    regulated_pump_rise_Pa,
    valve_pressure_drop_Pa,
)


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

    :func:`link_loss_general_Pa` with no check valve and a fixed-speed pump;
    returns as there.

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
