"""Heat loss of pipes to their surroundings per metre of pipe."""

from __future__ import annotations

import math

# Combined convective and radiative coefficient at the outer surface of a pipe in
# still indoor air, about 30-50 K above the air (engineering handbooks give
# 8-12 W/(m2 K); common trade practice). [W/(m2 K)]
OUTER_SURFACE_W_M2_K = 10.0
# Thermal conductivity of common pipe insulation (flexible elastomeric or PE foam)
# at 40 °C mean (manufacturers' declared values, common trade practice). [W/(m K)]
INSULATION_W_M_K = 0.035
# Insulation thickness as a fraction of the pipe's outer diameter: "100 % insulation",
# a common regulatory minimum for heating pipes in unheated spaces (from memory).
INSULATION_THICKNESS_PER_DIAMETER = 1.0


def pipe_loss_W_per_m_K(outer_diameter_m: float, insulated: bool) -> float:
    """Heat loss of a pipe per metre and kelvin of excess over its surroundings.

    Parameters
    ----------
    outer_diameter_m : float
        Outer diameter of the pipe. [m]
    insulated : bool
        Whether the pipe carries insulation as thick as its diameter. [-]

    Returns
    -------
    float
        Linear heat loss coefficient. [W/(m K)]

    Notes
    -----
    Bare: ``U' = h * pi * D``. Insulated: the cylindrical wall resistance
    ``ln(D_ins / D) / (2 pi lambda)`` in series with the outer surface
    ``1 / (h pi D_ins)``, the method of ISO 12241:2008 (eq. for a single layer,
    neglecting the pipe wall and the inner film).

    Examples
    --------
    >>> round(pipe_loss_W_per_m_K(0.022, insulated=False), 3)
    0.691
    >>> round(pipe_loss_W_per_m_K(0.022, insulated=True), 3)
    0.183

    References
    ----------
    .. [1] ISO 12241:2008, Thermal insulation for building equipment and industrial
       installations - Calculation rules.
    """
    if not insulated:
        return OUTER_SURFACE_W_M2_K * math.pi * outer_diameter_m
    d_ins = outer_diameter_m * (1.0 + 2.0 * INSULATION_THICKNESS_PER_DIAMETER)
    r_wall = math.log(d_ins / outer_diameter_m) / (2.0 * math.pi * INSULATION_W_M_K)
    r_surface = 1.0 / (OUTER_SURFACE_W_M2_K * math.pi * d_ins)
    return 1.0 / (r_wall + r_surface)
