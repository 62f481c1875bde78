"""Pipe friction: Darcy friction factor and the pressure drop of a pipe run.

Thin array wrappers over :mod:`simheat.physics._kernels` that validate inputs
(raise on impossible values, warn outside a correlation's range).
"""

from __future__ import annotations

import warnings

import numpy as np
import numpy.typing as npt

from simheat.errors import ScenarioError
from simheat.physics import _kernels
from simheat.physics.water import FloatArray, _apply, _check_temperature

RE_LAMINAR_MAX = _kernels.RE_LAMINAR_MAX  # laminar law up to here [-]
RE_TURBULENT_MIN = _kernels.RE_TURBULENT_MIN  # Colebrook-White from here [-]
RE_COLEBROOK_MAX = 1e8  # upper end of the Colebrook-White data basis [-]
RELATIVE_ROUGHNESS_MAX = 0.05  # upper end of the Moody chart [-]


def _require(values: npt.ArrayLike, name: str, *, positive: bool) -> FloatArray:
    """Return ``values`` as an array; raise if NaN, negative, or zero when positive."""
    array = np.asarray(values, dtype=np.float64)
    if np.any(np.isnan(array)):
        raise ScenarioError(f"{name} must be a number, got NaN")
    bad = array <= 0.0 if positive else array < 0.0
    if np.any(bad):
        relation = "> 0" if positive else ">= 0"
        raise ScenarioError(f"{name} must be {relation}, got {array[bad].flat[0]!r}")
    return array


def _check_friction_range(reynolds: FloatArray, relative_roughness: FloatArray) -> None:
    """Warn when Re or e/D lie outside the data basis of Colebrook-White."""
    if np.any(reynolds > RE_COLEBROOK_MAX):
        warnings.warn(
            f"Reynolds number above {RE_COLEBROOK_MAX:g} (got {np.max(reynolds):g}); "
            "Colebrook-White is extrapolated",
            stacklevel=3,
        )
    if np.any(relative_roughness > RELATIVE_ROUGHNESS_MAX):
        warnings.warn(
            f"relative roughness above {RELATIVE_ROUGHNESS_MAX:g} "
            f"(got {np.max(relative_roughness):g}); Colebrook-White is extrapolated",
            stacklevel=3,
        )


def darcy_friction_factor(
    reynolds: npt.ArrayLike, relative_roughness: npt.ArrayLike
) -> tuple[float | FloatArray, float | FloatArray]:
    r"""Darcy friction factor of a full round pipe, with its derivative in Re.

    Parameters
    ----------
    reynolds : float or array_like
        Reynolds number :math:`Re = \rho v D / \mu`, > 0. [-]
    relative_roughness : float or array_like
        Relative roughness :math:`e/D`, >= 0. [-]

    Returns
    -------
    f : float or ndarray
        Darcy friction factor. [-]
    df_dRe : float or ndarray
        Exact derivative :math:`\mathrm{d}f/\mathrm{d}Re` of the returned ``f``. [-]

    Raises
    ------
    ScenarioError
        When ``reynolds`` <= 0 or ``relative_roughness`` < 0, or either is NaN.

    Warns
    -----
    UserWarning
        When Re > 1e8 or e/D > 0.05 (outside the Moody chart).

    Notes
    -----
    - Re <= 2000: laminar Hagen-Poiseuille law :math:`f = 64/Re`.
    - Re >= 4000: Colebrook-White [1]_,
      :math:`1/\sqrt f = -2\log_{10}(e/(3.7D) + 2.51/(Re\sqrt f))`, solved by
      Newton's method on :math:`1/\sqrt f` from the explicit Swamee-Jain value [2]_
      until the relative step is below 1e-14 (two to four steps).
      :math:`\mathrm{d}f/\mathrm{d}Re` follows by implicit differentiation.
    - 2000 < Re < 4000: a cubic in Re matching value and slope of the laminar law
      at 2000 and of Colebrook-White at 4000, so f and its derivative are
      continuous (C1). This is the transitional-zone interpolation of Dunlop [3]_
      as described in [4]_; where [3]_ matches the Swamee-Jain value at Re 4000 we
      match Colebrook-White itself, which differs by up to about 1 % and keeps the
      blend C1 with our turbulent branch.

    The physical flow is not defined by any formula between Re 2000 and 4000; the
    blend only keeps Newton's method free of kinks.

    References
    ----------
    .. [1] C. F. Colebrook, "Turbulent flow in pipes, with particular reference to
       the transition region between the smooth and rough pipe laws", J. Inst.
       Civil Eng. 11(4), 133-156, 1939.
    .. [2] P. K. Swamee, A. K. Jain, "Explicit equations for pipe-flow problems",
       J. Hydraul. Div. ASCE 102(5), 657-664, 1976.
    .. [3] E. J. Dunlop, "WADI users manual", Local Government Computer Services
       Board, Dublin, 1991 (report; cited from [4]).
    .. [4] L. A. Rossman, "EPANET 2 users manual", EPA/600/R-00/057, U.S.
       Environmental Protection Agency, Cincinnati, 2000, chapter 12.

    Examples
    --------
    >>> f, df_dRe = darcy_friction_factor(1000.0, 0.0)
    >>> round(f, 6)
    0.064
    >>> f, _ = darcy_friction_factor(1e5, 1e-4)
    >>> round(f, 5)
    0.01851
    """
    re = _require(reynolds, "reynolds", positive=True)
    rr = _require(relative_roughness, "relative_roughness", positive=False)
    _check_friction_range(re, rr)
    return _apply(_kernels.darcy_friction_factor, re, rr, n_out=2)


def pipe_pressure_drop_Pa(
    mass_flow_kg_s: npt.ArrayLike,
    length_m: npt.ArrayLike,
    inner_diameter_m: npt.ArrayLike,
    roughness_m: npt.ArrayLike,
    zeta: npt.ArrayLike,
    temp_C: npt.ArrayLike,
) -> tuple[float | FloatArray, float | FloatArray]:
    r"""Signed pressure drop of a pipe run with local losses, and its slope.

    Parameters
    ----------
    mass_flow_kg_s : float or array_like
        Mass flow, signed in the pipe's direction. [kg/s]
    length_m : float or array_like
        Pipe length, >= 0. [m]
    inner_diameter_m : float or array_like
        Inner (bore) diameter, > 0. [m]
    roughness_m : float or array_like
        Absolute wall roughness, >= 0. [m]
    zeta : float or array_like
        Sum of local loss coefficients (bends, tees, fittings), >= 0. [-]
    temp_C : float or array_like
        Water temperature, for density and viscosity. [°C]

    Returns
    -------
    dp_Pa : float or ndarray
        Pressure drop in the flow direction, same sign as the flow. [Pa]
    slope_Pa_s_per_kg : float or ndarray
        Exact derivative :math:`\mathrm{d}(\Delta p)/\mathrm{d}\dot m`, > 0
        whenever ``length_m`` > 0 or ``zeta`` > 0. [Pa s/kg]

    Raises
    ------
    ScenarioError
        When a length, roughness or zeta is negative, a diameter is not positive,
        or any input is NaN.

    Warns
    -----
    UserWarning
        Outside 0-100 °C, Re > 1e8 or e/D > 0.05.

    Notes
    -----
    Darcy-Weisbach friction plus local losses,

    .. math:: \Delta p = f(Re)\,\frac{L}{D}\,\frac{\rho v|v|}{2}
              + \zeta\,\frac{\rho}{2}\,v\sqrt{v^2 + v_0^2},

    with :math:`v = \dot m/(\rho\pi D^2/4)` and ``f`` from
    :func:`darcy_friction_factor`. In the laminar range the friction term is written
    as the Hagen-Poiseuille law :math:`32\mu L v/D^2`, linear through zero flow.
    The local-loss term replaces :math:`v|v|` by :math:`v\sqrt{v^2+v_0^2}` with
    :math:`v_0` = 1e-4 m/s so that its slope is positive at zero flow (needed when
    ``length_m`` is 0); the relative change is below :math:`v_0^2/(2v^2)`, 5e-5 at
    0.01 m/s. Length 0 and zeta 0 give (0, 0). Water properties follow
    :mod:`simheat.physics.water`.

    References
    ----------
    .. [1] F. M. White, "Fluid mechanics", 7th ed., McGraw-Hill, 2011, chapter 6
       (Darcy-Weisbach, laminar pipe flow, minor losses).
    .. [2] I. E. Idelchik, "Handbook of hydraulic resistance", 3rd ed., Begell
       House, 1996 (local loss coefficients).

    Examples
    --------
    >>> dp, slope = pipe_pressure_drop_Pa(0.0, 10.0, 0.013, 1.5e-6, 0.0, 60.0)
    >>> dp, slope > 0
    (0.0, True)
    """
    _check_temperature(temp_C)
    m = np.asarray(mass_flow_kg_s, dtype=np.float64)
    if np.any(np.isnan(m)):
        raise ScenarioError("mass_flow_kg_s must be a number, got NaN")
    length = _require(length_m, "length_m", positive=False)
    diameter = _require(inner_diameter_m, "inner_diameter_m", positive=True)
    roughness = _require(roughness_m, "roughness_m", positive=False)
    zeta_array = _require(zeta, "zeta", positive=False)
    mu = np.vectorize(_kernels.water_viscosity_Pa_s, otypes=[np.float64])(temp_C)
    reynolds = 4.0 * np.abs(m) / (np.pi * diameter * mu)
    _check_friction_range(reynolds * (length > 0), roughness / diameter)
    return _apply(
        _kernels.pipe_pressure_drop_Pa,
        m,
        length,
        diameter,
        roughness,
        zeta_array,
        temp_C,
        n_out=2,
    )
