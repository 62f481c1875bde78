"""Room parameters for the two-node (air and structure) lumped RC room model.

The structure node holds the effective internal heat capacity of the building
fabric; the air node holds the room air and its furnishings. Values per floor area
follow the simple method of ISO 13790:2008.
"""

from __future__ import annotations

# Effective internal heat capacity per floor area by construction class and the
# ratio of effective mass area to floor area, ISO 13790:2008 Table 12 (values from
# memory of the standard). [J/(m2 K)], [-]
MASS_CLASS_CAPACITY_J_M2_K = {
    "very_light": 80e3,
    "light": 110e3,
    "medium": 165e3,
    "heavy": 260e3,
    "very_heavy": 370e3,
}
MASS_CLASS_AREA_RATIO = {
    "very_light": 2.5,
    "light": 2.5,
    "medium": 2.5,
    "heavy": 3.0,
    "very_heavy": 3.5,
}
# Heat transfer coefficient between the mass node and the internal surface node,
# ISO 13790:2008 eq. (64). [W/(m2 K)]
H_MASS_SURFACE_W_M2_K = 9.1
# Heat transfer coefficient between internal surfaces and the air node,
# ISO 13790:2008 eq. (9), with the surface area 4.5 times the floor area (eq. 10).
H_SURFACE_AIR_W_M2_K = 3.45
SURFACE_AREA_RATIO = 4.5
# Volumetric heat capacity of air near 20 °C: 1.204 kg/m3 * 1006 J/(kg K)
# (engineering tables). [J/(m3 K)]
AIR_VOLUMETRIC_CAPACITY_J_M3_K = 1.204 * 1006.0
# Heat capacity of furnishings lumped with the room air, per floor area. Common
# modelling practice (order of 10 kJ/(m2 K), from memory of ISO 52016-1). [J/(m2 K)]
FURNISHING_CAPACITY_J_M2_K = 10e3


def structure_capacity_J_K(floor_area_m2: float, mass_class: str) -> float:
    """Effective internal heat capacity of a room's structure.

    Parameters
    ----------
    floor_area_m2 : float
        Floor area of the room. [m2]
    mass_class : str
        Construction class: very_light, light, medium, heavy or very_heavy. [-]

    Returns
    -------
    float
        Heat capacity of the structure node. [J/K]

    Notes
    -----
    ``C_m = kappa * A_f`` with ``kappa`` from ISO 13790:2008 Table 12.

    Examples
    --------
    >>> structure_capacity_J_K(20.0, "medium")
    3300000.0

    References
    ----------
    .. [1] ISO 13790:2008, Energy performance of buildings - Calculation of energy
       use for space heating and cooling, Table 12.
    """
    return MASS_CLASS_CAPACITY_J_M2_K[mass_class] * floor_area_m2


def air_capacity_J_K(floor_area_m2: float, height_m: float) -> float:
    """Heat capacity of the air node: room air plus furnishings.

    Parameters
    ----------
    floor_area_m2 : float
        Floor area. [m2]
    height_m : float
        Clear room height. [m]

    Returns
    -------
    float
        Heat capacity of the air node. [J/K]

    Examples
    --------
    >>> round(air_capacity_J_K(20.0, 2.5))
    260561
    """
    air = AIR_VOLUMETRIC_CAPACITY_J_M3_K * floor_area_m2 * height_m
    return air + FURNISHING_CAPACITY_J_M2_K * floor_area_m2


def air_structure_conductance_W_K(floor_area_m2: float, mass_class: str) -> float:
    """Conductance between the air node and the structure node.

    Parameters
    ----------
    floor_area_m2 : float
        Floor area. [m2]
    mass_class : str
        Construction class (sets the effective mass area). [-]

    Returns
    -------
    float
        Series conductance surface-to-air and mass-to-surface. [W/K]

    Notes
    -----
    ISO 13790:2008 eqs. (9) and (64) give ``H_is = 3.45 * 4.5 * A_f`` and
    ``H_ms = 9.1 * A_m`` with ``A_m`` from Table 12; the two-node model here merges
    the surface node, so the coupling is their series value.

    Examples
    --------
    >>> round(air_structure_conductance_W_K(20.0, "medium"), 1)
    184.6
    """
    h_is = H_SURFACE_AIR_W_M2_K * SURFACE_AREA_RATIO * floor_area_m2
    h_ms = H_MASS_SURFACE_W_M2_K * MASS_CLASS_AREA_RATIO[mass_class] * floor_area_m2
    return 1.0 / (1.0 / h_is + 1.0 / h_ms)
