"""Compiled kernels of a radiator as a whole and as a chain of water cells.

Both rest on the EN 442 characteristic of :mod:`simheat.physics._kernels`
(``emitter_output_W``) and on one relation derived from it here, the log-mean
form of a whole radiator solved for its outlet (:func:`log_mean_outlet_u`):

- ``log_mean_outlet_u(ratio, exponent)``: ``u = ln(dT_in / dT_out)`` of a radiator
  whose water-side heat equals the EN 442 output at the log mean excess;
- ``emitter_steady_output_W(nominal_W, exponent, inlet_excess_K, mass_flow_kg_s,
  cp_J_kg_K)``: the steady output of a whole radiator from it;
- ``emitter_chain_constant(nominal_W, exponent, cells, inlet_excess_K,
  mass_flow_kg_s, cp_J_kg_K)`` and ``emitter_cell_output_W(share_W, exponent,
  inlet_excess_K, excess_K, mass_flow_kg_s, cp_J_kg_K, chain_constant)``: the
  transient model's cell law, whose steady chain gives exactly that output.

Excess temperatures are water minus room air [K]; flows are magnitudes [kg/s],
the inlet being the upstream side. Kernels never raise; the Python wrappers in
:mod:`simheat.physics.emitter` validate.

The cell law (our derivation). Along a radiator whose local output follows the
characteristic, ``m cp dθ/dx = -k θ^n`` integrates exactly over a cell as
``θ_out^(1-n) = θ_in^(1-n) + (n - 1) k``: the steady outlet of a cell is a closed
form, and cells in series compose exactly (the constants add). That local law
differs from the EN 442 log-mean form of the whole radiator by up to 2 % at low
flow (n = 1.4), so ``k`` carries a factor ``c`` chosen once per radiator and state
such that N cells in series give the log-mean outlet exactly: with
``R = Phi(θ_in) / (m cp θ_in)`` and ``u`` from the log-mean form,
``c = expm1((n - 1) u) / ((n - 1) R)`` (``c -> 1`` as ``R -> 0``). A cell whose
temperature θ is not yet its steady outlet ``S`` emits

    q = m cp (θ_in - S) + Phi_cell(θ) - Phi_cell(S),

the exact steady output of the cell for its inlet, corrected by its own
characteristic for the departure of its water from ``S``. The cell's balance
``C dθ/dt = m cp (θ_in - θ) - q = (m cp + ...) (S - θ)`` has its one rest point at
``θ = S``; at zero flow ``S`` and the first term vanish and standing water emits
``Phi_cell(θ)`` by its own temperature; at high flow ``S -> θ_in`` and the law
becomes the plain characteristic of a well-mixed cell.
"""

from __future__ import annotations

import math

from simheat._jit import njit
from simheat.physics._kernels import NOMINAL_EXCESS_K, emitter_output_W

# Newton iterations on the log-mean relation: it converges monotonically from the
# second iterate (the relation is convex in ln u); 1e-14 in ln u is reached in
# about five. [-]
LOG_MEAN_MAX_ITER = 60
LOG_MEAN_TOL = 1e-14
# Below this exponent - 1 the characteristic is taken as linear (n = 1), where the
# relations reduce to exponentials. [-]
LINEAR_EXPONENT_TOL = 1e-12
# Largest ratio R = Phi(dT_in) / (m cp dT_in) at which a cell chain's factor c is
# evaluated; beyond it c is held (c grows like exp((n - 1) R^(1/n)) / R). At R = 40
# the log-mean outlet is within 1e-6 of the inlet excess of the room for n <= 1.4
# and 2e-9 for n = 1.2, so the chain's output (all the heat the water carries,
# minus less than that) is unchanged to that share. [-]
CHAIN_RATIO_CAP = 40.0


@njit(cache=True)
def log_mean_outlet_u(ratio, exponent):
    """``u = ln(dT_in / dT_out)`` of a radiator by the EN 442 log-mean form.

    Parameters
    ----------
    ratio : float
        ``R = Phi(dT_in) / (m cp dT_in)``: the characteristic's output at the
        inlet excess over the heat the water carries above the room. [-]
    exponent : float
        EN 442 exponent n, 1 or more. [-]

    Returns
    -------
    float
        ``u >= 0``, 0 for ``R <= 0``. [-]

    Notes
    -----
    The log-mean form ``m cp (dT_in - dT_out) = Phi_n (dT_lm / dT_n)^n`` (EN
    442-2:2014, eq. 4 with the log mean excess of section 3) with
    ``dT_out = dT_in e^-u`` reduces to ``u^n (1 - e^-u)^(1 - n) = R``. Its left
    side is increasing and convex in ``ln u``; Newton's method from
    ``ln u = ln R`` (``R <= 1``) or ``ln R / n`` (above), both right of the root,
    converges monotonically.
    """
    if ratio <= 0.0:
        return 0.0
    n = exponent
    target = math.log(ratio)
    if n - 1.0 < LINEAR_EXPONENT_TOL:
        return ratio  # n = 1: dT_out = dT_in exp(-R)
    v = target if ratio <= 1.0 else target / n
    for _ in range(LOG_MEAN_MAX_ITER):
        u = math.exp(v)
        h = n * v + (1.0 - n) * math.log(-math.expm1(-u)) - target
        slope = n - (n - 1.0) * u / math.expm1(u)
        step = h / slope
        v -= step
        if abs(step) < LOG_MEAN_TOL:
            break
    return math.exp(v)


@njit(cache=True)
def emitter_steady_output_W(
    nominal_W, exponent, inlet_excess_K, mass_flow_kg_s, cp_J_kg_K
):
    """Steady output of a whole radiator by the EN 442 log-mean form.

    Parameters
    ----------
    nominal_W : float
        Output at 75/65/20 °C. [W]
    exponent : float
        EN 442 exponent n. [-]
    inlet_excess_K : float
        Inlet water temperature minus room air temperature. [K]
    mass_flow_kg_s : float
        Water mass flow (magnitude). [kg/s]
    cp_J_kg_K : float
        Specific heat of the water. [J/(kg K)]

    Returns
    -------
    float
        ``m cp dT_in (1 - e^-u)`` with ``u`` from :func:`log_mean_outlet_u`: the
        water-side heat equals the characteristic at the log mean excess. Odd in
        the inlet excess; 0 without flow; a trickle gives all the heat it
        carries. [W]
    """
    if mass_flow_kg_s <= 0.0 or inlet_excess_K == 0.0:
        return 0.0
    a = abs(inlet_excess_K)
    carried = mass_flow_kg_s * cp_J_kg_K * a
    u = log_mean_outlet_u(emitter_output_W(nominal_W, exponent, a) / carried, exponent)
    return math.copysign(-carried * math.expm1(-u), inlet_excess_K)


@njit(cache=True)
def emitter_chain_constant(
    nominal_W, exponent, cells, inlet_excess_K, mass_flow_kg_s, cp_J_kg_K
):
    """Constant of a radiator's cell law at its inlet and flow.

    Parameters
    ----------
    nominal_W : float
        Output of the whole radiator at 75/65/20 °C. [W]
    exponent : float
        EN 442 exponent n. [-]
    cells : int
        Number of the radiator's cells. [-]
    inlet_excess_K : float
        Excess of the water flowing into the radiator over the room air. [K]
    mass_flow_kg_s : float
        Water mass flow (magnitude). [kg/s]
    cp_J_kg_K : float
        Specific heat of the water. [J/(kg K)]

    Returns
    -------
    float
        ``C = c k`` with ``k = Phi_n / (cells m cp dT_n^n)``: each cell integrates
        ``m cp dθ/dx = -c k θ^n`` exactly, and ``c`` makes the chain's steady
        outlet the EN 442 log-mean outlet of the whole radiator (module notes).
        0 without flow (cells then emit by their own temperature). [K^(1-n)]
    """
    if mass_flow_kg_s <= 0.0:
        return 0.0
    n = exponent
    k_cell = nominal_W / (cells * mass_flow_kg_s * cp_J_kg_K * NOMINAL_EXCESS_K**n)
    a = abs(inlet_excess_K)
    if a == 0.0:
        return k_cell
    ratio = min(cells * k_cell * a ** (n - 1.0), CHAIN_RATIO_CAP)
    u = log_mean_outlet_u(ratio, n)
    if n - 1.0 < LINEAR_EXPONENT_TOL:
        return k_cell * u / ratio
    return k_cell * math.expm1((n - 1.0) * u) / ((n - 1.0) * ratio)


@njit(cache=True)
def emitter_cell_outlet_K(exponent, inlet_excess_K, chain_constant):
    """Steady outlet excess of one cell: ``S^(1-n) = θ_in^(1-n) + (n - 1) C``.

    Parameters
    ----------
    exponent : float
        EN 442 exponent n. [-]
    inlet_excess_K : float
        Excess of the water flowing into the cell over the room air. [K]
    chain_constant : float
        ``C`` from :func:`emitter_chain_constant`. [K^(1-n)]

    Returns
    -------
    float
        ``S = θ_in exp(-log1p((n - 1) C |θ_in|^(n-1)) / (n - 1))``: exact also
        as n tends to 1 (``S = θ_in e^-C``); odd in the inlet excess. [K]
    """
    a = abs(inlet_excess_K)
    if a == 0.0:
        return 0.0
    n = exponent
    y = chain_constant * a ** (n - 1.0)
    if n - 1.0 < LINEAR_EXPONENT_TOL:
        decay = y
    else:
        decay = math.log1p((n - 1.0) * y) / (n - 1.0)
    return inlet_excess_K * math.exp(-decay)


@njit(cache=True)
def emitter_cell_output_W(
    share_W,
    exponent,
    inlet_excess_K,
    excess_K,
    mass_flow_kg_s,
    cp_J_kg_K,
    chain_constant,
):
    """Heat output of one radiator cell: ``m cp (θ_in - S) + Phi(θ) - Phi(S)``.

    Parameters
    ----------
    share_W : float
        The cell's share of the radiator's nominal output. [W]
    exponent : float
        EN 442 exponent n. [-]
    inlet_excess_K : float
        Excess of the water flowing into the cell over the room air. [K]
    excess_K : float
        Excess of the cell's water over the room air. [K]
    mass_flow_kg_s : float
        Water mass flow (magnitude). [kg/s]
    cp_J_kg_K : float
        Specific heat of the water. [J/(kg K)]
    chain_constant : float
        ``C`` from :func:`emitter_chain_constant`. [K^(1-n)]

    Returns
    -------
    float
        The exact steady output of the cell for its inlet, corrected by the
        characteristic for the departure of its water from its steady outlet
        ``S`` (:func:`emitter_cell_outlet_K`); without flow, the characteristic
        at the cell's own excess. [W]
    """
    own = emitter_output_W(share_W, exponent, excess_K)
    if mass_flow_kg_s <= 0.0:
        return own
    s = emitter_cell_outlet_K(exponent, inlet_excess_K, chain_constant)
    carried = mass_flow_kg_s * cp_J_kg_K * (inlet_excess_K - s)
    return carried + own - emitter_output_W(share_W, exponent, s)
