"""Properties of liquid water in a heating circuit (about 1.5-3 bar, 0-100 °C).

Thin array wrappers over the compiled kernels in :mod:`simheat.physics._kernels`;
they validate the temperature and warn outside 0-100 °C, where the kernels clamp.
"""

from __future__ import annotations

import warnings
from collections.abc import Callable

import numpy as np
import numpy.typing as npt

from simheat.errors import ScenarioError
from simheat.physics import _kernels

FloatArray = npt.NDArray[np.float64]

WATER_TEMP_MIN_C = _kernels.WATER_TEMP_MIN_C  # lower end of the fits [°C]
WATER_TEMP_MAX_C = _kernels.WATER_TEMP_MAX_C  # upper end of the fits [°C]


def _scalar_or_array(values: npt.ArrayLike) -> float | FloatArray:
    """Return a Python float for 0-d results, a float64 array otherwise."""
    array = np.asarray(values, dtype=np.float64)
    return float(array) if array.ndim == 0 else array


def _apply(
    kernel: Callable[..., object], *args: npt.ArrayLike, n_out: int = 1
) -> float | FloatArray | tuple[float | FloatArray, ...]:
    """Broadcast a scalar kernel over array arguments (``np.vectorize``)."""
    arrays = [np.asarray(a, dtype=np.float64) for a in args]
    vectorized = np.vectorize(kernel, otypes=[np.float64] * n_out)
    result = vectorized(*arrays)
    if n_out == 1:
        return _scalar_or_array(result)
    return tuple(_scalar_or_array(r) for r in result)


def _check_temperature(temp_C: npt.ArrayLike, name: str = "temp_C") -> None:
    """Raise ScenarioError on NaN, warn outside the 0-100 °C range of the fits."""
    t = np.asarray(temp_C, dtype=np.float64)
    if np.any(np.isnan(t)):
        raise ScenarioError(f"{name} must be a number, got NaN")
    if np.any(t < WATER_TEMP_MIN_C) or np.any(t > WATER_TEMP_MAX_C):
        warnings.warn(
            f"{name} outside {WATER_TEMP_MIN_C:g}-{WATER_TEMP_MAX_C:g} °C "
            f"(got {np.min(t):g} to {np.max(t):g}); water properties are clamped "
            "to the range ends",
            stacklevel=3,
        )


def density_kg_m3(temp_C: npt.ArrayLike) -> float | FloatArray:
    r"""Density of liquid water.

    Parameters
    ----------
    temp_C : float or array_like
        Water temperature. [°C]

    Returns
    -------
    float or ndarray
        Density. [kg/m3]

    Warns
    -----
    UserWarning
        When a temperature lies outside 0-100 °C; the value at the nearer end of
        the range is returned.

    Raises
    ------
    ScenarioError
        When a temperature is NaN.

    Notes
    -----
    Kell's rational form for air-free water at 101.325 kPa [1]_,

    .. math:: \rho = \frac{\sum_{i=0}^{5} c_i t^i}{1 + b t},

    valid 0-150 °C. The pressure in a house heating circuit (1.5-3 bar) changes the
    density by less than 0.01 %. Checked against IAPWS-95 [2]_ at 0.2 MPa: largest
    deviation 0.0054 % over 0-100 °C.

    References
    ----------
    .. [1] G. S. Kell, "Density, thermal expansivity, and compressibility of liquid
       water from 0 to 150 °C", J. Chem. Eng. Data 20(1), 97-105, 1975.
    .. [2] IAPWS R6-95(2018), "Revised Release on the IAPWS Formulation 1995 for the
       Thermodynamic Properties of Ordinary Water Substance for General and
       Scientific Use".

    Examples
    --------
    >>> round(density_kg_m3(20.0), 1)
    998.2
    """
    _check_temperature(temp_C)
    return _apply(_kernels.water_density_kg_m3, temp_C)


def viscosity_Pa_s(temp_C: npt.ArrayLike) -> float | FloatArray:
    r"""Dynamic viscosity of liquid water.

    Parameters
    ----------
    temp_C : float or array_like
        Water temperature. [°C]

    Returns
    -------
    float or ndarray
        Dynamic viscosity. [Pa s]

    Warns
    -----
    UserWarning
        When a temperature lies outside 0-100 °C; the value at the nearer end of
        the range is returned.

    Raises
    ------
    ScenarioError
        When a temperature is NaN.

    Notes
    -----
    Vogel-type form with one extra linear term,

    .. math:: \ln(\mu / 1\,\mathrm{mPa\,s}) = A + \frac{B}{t + C} + D t,

    with coefficients fitted by least squares in :math:`\ln\mu` to the IAPWS 2008
    viscosity formulation [1]_ along the 0.2 MPa isobar (201 points, 0-100 °C).
    Largest deviation from [1]_: 0.20 %. Valid 0-100 °C.

    References
    ----------
    .. [1] IAPWS R12-08, "Release on the IAPWS Formulation 2008 for the Viscosity
       of Ordinary Water Substance", 2008.
    .. [2] H. Vogel, "Das Temperaturabhängigkeitsgesetz der Viskosität von
       Flüssigkeiten", Physikalische Zeitschrift 22, 645-646, 1921.

    Examples
    --------
    >>> round(viscosity_Pa_s(20.0) * 1e3, 3)
    1.002
    """
    _check_temperature(temp_C)
    return _apply(_kernels.water_viscosity_Pa_s, temp_C)


def specific_heat_J_kg_K(temp_C: npt.ArrayLike) -> float | FloatArray:
    """Isobaric specific heat capacity of liquid water.

    Parameters
    ----------
    temp_C : float or array_like
        Water temperature. [°C]

    Returns
    -------
    float or ndarray
        Specific heat capacity at constant pressure. [J/(kg K)]

    Warns
    -----
    UserWarning
        When a temperature lies outside 0-100 °C; the value at the nearer end of
        the range is returned.

    Raises
    ------
    ScenarioError
        When a temperature is NaN.

    Notes
    -----
    Degree-5 polynomial in temperature, fitted by least squares to IAPWS-95 [1]_
    along the 0.2 MPa isobar (201 points, 0-100 °C). Largest deviation from [1]_:
    0.012 %. Valid 0-100 °C.

    References
    ----------
    .. [1] IAPWS R6-95(2018), "Revised Release on the IAPWS Formulation 1995 for the
       Thermodynamic Properties of Ordinary Water Substance for General and
       Scientific Use".

    Examples
    --------
    >>> round(specific_heat_J_kg_K(20.0))
    4184
    """
    _check_temperature(temp_C)
    return _apply(_kernels.water_cp_J_kg_K, temp_C)
