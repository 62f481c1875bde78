"""Compiled kernels for the properties of liquid water at heating-system pressure.

Part of :mod:`simheat.physics._kernels` (which re-exports every name here): small
``@njit(cache=True)`` functions of a float64 temperature [°C], clamped to the
0-100 °C range of their fits. The fits and their verification are documented beside
each constant.
"""

from __future__ import annotations

import math

from simheat._jit import njit

# --- water -------------------------------------------------------------------------
WATER_TEMP_MIN_C = 0.0  # lower end of the water-property fits [°C]
WATER_TEMP_MAX_C = 100.0  # upper end of the water-property fits [°C]

# Kell (1975), density of air-free water at 101.325 kPa, IPTS-68, 0-150 °C, rational
# form; coefficients as published (from memory, verified in the tests against
# IAPWS-95 at 0.2 MPa: max deviation 0.0054 % over 0-100 °C).
_KELL_NUM = (
    999.83952,
    16.945176,
    -7.9870401e-3,
    -46.170461e-6,
    105.56302e-9,
    -280.54253e-12,
)
_KELL_DEN = 16.879850e-3

# Vogel-type form ln(mu / 1 mPa s) = A + B / (t + C) + D t, t in °C. Coefficients
# fitted by us (least squares in ln mu) to IAPWS 2008 viscosity along the 0.2 MPa
# isobar, 201 points over 0-100 °C; max deviation 0.20 %.
_VISC_A = -2.5034106737
_VISC_B = 304.59510232  # [K]
_VISC_C = 98.751459960  # [K]
_VISC_D = -2.9775426102e-3  # [1/K]

# Degree-5 polynomial in t [°C] for the isobaric specific heat [J/(kg K)], fitted by
# us (least squares) to IAPWS-95 along the 0.2 MPa isobar, 201 points over
# 0-100 °C; max deviation 0.012 %.
_CP_COEF = (
    4.2184548271e03,
    -3.1811594786e00,
    9.6173023034e-02,
    -1.4148120977e-03,
    1.0959480664e-05,
    -3.2802741902e-08,
)


@njit(cache=True)
def _clamp(x, lo, hi):
    return min(max(x, lo), hi)


@njit(cache=True)
def water_density_kg_m3(temp_C):
    """Density of liquid water [kg/m3] at ``temp_C`` [°C], clamped to 0-100 °C.

    Parameters
    ----------
    temp_C : float
        Water temperature; values outside 0-100 °C are clamped to that range. [°C]

    Notes
    -----
    Kell (1975) rational form; within 0.006 % of IAPWS-95 at 0.2 MPa.
    """
    t = _clamp(temp_C, WATER_TEMP_MIN_C, WATER_TEMP_MAX_C)
    c = _KELL_NUM
    num = c[0] + t * (c[1] + t * (c[2] + t * (c[3] + t * (c[4] + t * c[5]))))
    return num / (1.0 + _KELL_DEN * t)


@njit(cache=True)
def water_viscosity_Pa_s(temp_C):
    """Dynamic viscosity of liquid water [Pa s] at ``temp_C`` [°C], clamped to 0-100 °C.

    Parameters
    ----------
    temp_C : float
        Water temperature; values outside 0-100 °C are clamped to that range. [°C]

    Notes
    -----
    Vogel-type fit to IAPWS 2008 at 0.2 MPa; within 0.2 %.
    """
    t = _clamp(temp_C, WATER_TEMP_MIN_C, WATER_TEMP_MAX_C)
    return 1e-3 * math.exp(_VISC_A + _VISC_B / (t + _VISC_C) + _VISC_D * t)


@njit(cache=True)
def water_cp_J_kg_K(temp_C):
    """Isobaric specific heat of liquid water [J/(kg K)], clamped to 0-100 °C.

    Parameters
    ----------
    temp_C : float
        Water temperature; values outside 0-100 °C are clamped to that range. [°C]

    Notes
    -----
    Degree-5 polynomial fit to IAPWS-95 at 0.2 MPa; within 0.012 %.
    """
    t = _clamp(temp_C, WATER_TEMP_MIN_C, WATER_TEMP_MAX_C)
    c = _CP_COEF
    return c[0] + t * (c[1] + t * (c[2] + t * (c[3] + t * (c[4] + t * c[5]))))
