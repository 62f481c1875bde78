"""Radiator output by the EN 442 characteristic equation."""

from __future__ import annotations

import numpy as np
from scipy.optimize import brentq

from simheat.physics import _emitter_kernels, _kernels

# EN 442-2 nominal (standard) conditions: supply 75 °C, return 65 °C, room 20 °C.
NOMINAL_SUPPLY_C = _kernels.NOMINAL_SUPPLY_C
NOMINAL_RETURN_C = _kernels.NOMINAL_RETURN_C
NOMINAL_ROOM_C = _kernels.NOMINAL_ROOM_C
# Their log mean excess temperature, 49.83 K (EN 442-2:2014, section 3). [K]
NOMINAL_EXCESS_K = _kernels.NOMINAL_EXCESS_K


def log_mean_excess_K(supply_C, return_C, room_C):
    """Logarithmic mean excess temperature of a radiator over its room.

    Parameters
    ----------
    supply_C : float or ndarray
        Water inlet temperature. [°C]
    return_C : float or ndarray
        Water outlet temperature. [°C]
    room_C : float or ndarray
        Room air temperature. [°C]

    Returns
    -------
    float or ndarray
        ``(T_s - T_r) / ln((T_s - T_room) / (T_r - T_room))``; the arithmetic mean
        when inlet and outlet excess are equal. [K]

    Notes
    -----
    EN 442-2:2014, section 3 (definition of the excess temperature). Valid for
    outlet above the room temperature.

    Examples
    --------
    >>> float(round(log_mean_excess_K(75.0, 65.0, 20.0), 2))
    49.83
    """
    a = np.asarray(supply_C, dtype=float) - room_C
    b = np.asarray(return_C, dtype=float) - room_C
    with np.errstate(divide="ignore", invalid="ignore"):
        lm = np.where(np.isclose(a, b), 0.5 * (a + b), (a - b) / np.log(a / b))
    return lm[()] if lm.ndim == 0 else lm


def emitter_output_W(nominal_power_W, exponent, excess_K):
    """Radiator heat output at an excess temperature by EN 442.

    Parameters
    ----------
    nominal_power_W : float or ndarray
        Output at 75/65/20 °C. [W]
    exponent : float or ndarray
        Characteristic exponent n. [-]
    excess_K : float or ndarray
        Log mean excess temperature over the room. [K]

    Returns
    -------
    float or ndarray
        ``Phi = Phi_n * (dT / dT_n) ** n``. [W]

    Notes
    -----
    EN 442-2:2014, eq. (4) (characteristic equation), with ``dT_n = 49.83 K``,
    continued as an odd function for a negative excess. The one implementation
    is the compiled :func:`simheat.physics._kernels.emitter_output_W`, which the
    transient model calls per water cell; this wrapper broadcasts it.

    Examples
    --------
    >>> float(round(emitter_output_W(1000.0, 1.3, NOMINAL_EXCESS_K), 6))
    1000.0
    """
    nominal, expo, excess = np.broadcast_arrays(
        np.asarray(nominal_power_W, dtype=np.float64),
        np.asarray(exponent, dtype=np.float64),
        np.asarray(excess_K, dtype=np.float64),
    )
    out = np.empty(nominal.shape)
    _kernels.emitter_outputs_W(
        np.ascontiguousarray(nominal).ravel(),
        np.ascontiguousarray(expo).ravel(),
        np.ascontiguousarray(excess).ravel(),
        out.reshape(-1),
    )
    return out[()] if out.ndim == 0 else out


def steady_output_W(
    nominal_power_W, exponent, supply_C, mass_flow_kg_s, room_C, cp_J_kg_K=4190.0
):
    """Steady radiator output for a given inlet temperature and mass flow.

    Parameters
    ----------
    nominal_power_W : float
        Output at 75/65/20 °C. [W]
    exponent : float
        Characteristic exponent n. [-]
    supply_C : float
        Water inlet temperature. [°C]
    mass_flow_kg_s : float
        Water mass flow. [kg/s]
    room_C : float
        Room air temperature. [°C]
    cp_J_kg_K : float
        Specific heat of the water. [J/(kg K)]

    Returns
    -------
    float
        Output where the water-side heat ``m cp (T_in - T_out)`` equals the EN 442
        output at the log mean excess temperature; 0 when the inlet is not above
        the room or there is no flow. [W]

    Notes
    -----
    EN 442-2:2014, eq. (4) with the log mean excess of section 3. With
    ``u = ln((T_in - T_room) / (T_out - T_room))`` the balance reduces to
    ``u^n (1 - e^-u)^(1-n) = Phi(T_in - T_room) / (m cp (T_in - T_room))``, one
    increasing relation solved by Newton's method in compiled code
    (:func:`simheat.physics._emitter_kernels.log_mean_outlet_u`); the transient
    model's cell chain is built on the same relation (:func:`cell_chain_output_W`).
    A trickle (a closed valve's leakage) leaves at room temperature: the radiator
    gives all the heat the water carries.

    Examples
    --------
    >>> round(steady_output_W(1000.0, 1.3, 75.0, 1000.0 / (4190.0 * 10.0), 20.0), 1)
    1000.0
    """
    if supply_C <= room_C or mass_flow_kg_s <= 0.0:
        return 0.0
    return float(
        _emitter_kernels.emitter_steady_output_W(
            float(nominal_power_W),
            float(exponent),
            float(supply_C - room_C),
            float(mass_flow_kg_s),
            float(cp_J_kg_K),
        )
    )


def cell_chain_output_W(
    nominal_power_W,
    exponent,
    supply_C,
    mass_flow_kg_s,
    room_C,
    cells,
    cp_J_kg_K=4190.0,
):
    """Steady output of the transient model's radiator: water cells in series.

    Parameters
    ----------
    nominal_power_W : float
        Output at 75/65/20 °C. [W]
    exponent : float
        Characteristic exponent n. [-]
    supply_C : float
        Water inlet temperature. [°C]
    mass_flow_kg_s : float
        Water mass flow. [kg/s]
    room_C : float
        Room air temperature. [°C]
    cells : int
        Number of cells in series. [-]
    cp_J_kg_K : float
        Specific heat of the water. [J/(kg K)]

    Returns
    -------
    float
        ``m cp (T_in - T_N)`` with each cell's temperature ``T_k`` the rest point
        of its balance ``m cp (T_{k-1} - T_k) = q_k``, ``q_k`` the cell law the
        dynamics use (:func:`simheat.physics._emitter_kernels.emitter_cell_output_W`
        with the radiator's chain constant at the inlet). [W]

    Notes
    -----
    Each rest point is found by Brent's method on the cell's balance, not taken
    from the law's closed form, so this checks the law as the integrator sees it.
    By construction the chain gives the EN 442 log-mean output of
    :func:`steady_output_W` at every flow (see the notes of
    :mod:`simheat.physics._emitter_kernels`).

    Examples
    --------
    >>> flow = 1000.0 / (4190.0 * 10.0)
    >>> round(cell_chain_output_W(1000.0, 1.3, 75.0, flow, 20.0, 4), 6)
    1000.0
    """
    if supply_C <= room_C or mass_flow_kg_s <= 0.0:
        return 0.0
    kernels = _emitter_kernels
    m, cp = float(mass_flow_kg_s), float(cp_J_kg_K)
    inlet = float(supply_C - room_C)
    share = float(nominal_power_W) / cells
    constant = kernels.emitter_chain_constant(
        float(nominal_power_W), float(exponent), float(cells), inlet, m, cp
    )
    upstream = inlet
    for _ in range(cells):

        def balance(t: float, upstream: float = upstream) -> float:
            q = kernels.emitter_cell_output_W(
                share, float(exponent), upstream, t, m, cp, constant
            )
            return m * cp * (upstream - t) - q

        upstream = brentq(balance, 0.0, upstream, xtol=1e-13 * inlet, rtol=1e-15)
    return m * cp * (inlet - upstream)
