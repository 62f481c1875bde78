"""Looped network flow splits against EPANET 2.2, run through the wntr package.

Reference: EPANET 2.2, the US EPA's public-domain network solver (L. A. Rossman
et al., "EPANET 2.2 User Manual", EPA/600/R-20/133, 2020), an independent
implementation of the global gradient algorithm. wntr (K. A. Klise et al., "A
software framework for assessing the resilience of drinking water systems to
disasters with an example earthquake case study", Environmental Modelling &
Software 95, 2017) bundles the EPANET 2.2 toolkit; only its ``EpanetSimulator``
(the EPANET engine) is used, as a test-only reference. wntr's own Python
simulator does not accept Darcy-Weisbach head loss, so it cannot serve here.

How a closed simheat network maps onto EPANET, part for part:

- the reference node becomes a reservoir at head 0 m; every other node is a
  junction with zero demand. Node flows sum to zero over the whole network, so
  when every junction balances the reservoir's net flow is zero as well: it
  only fixes the head datum, as simheat's reference node fixes the pressure
  datum. The topology is unchanged.
- a pipe becomes a Darcy-Weisbach pipe with the same length, bore, roughness
  (wntr takes metres; its input file carries mm) and minor loss coefficient
  zeta (EPANET: K v^2/(2 g), simheat: zeta rho v^2/2).
- a pure pump link (no pipe, a1 = 0) becomes a HEAD pump with a single-point
  curve (q0, h0). EPANET completes such a curve with a shut-off head of 4/3 h0
  and a zero head at 2 q0 and fits h = A - B q^C through the three points (EPANET
  2.2 manual, pump curves; from memory), which gives C = 2 exactly:
  h = 4/3 h0 - h0/(3 q0^2) q^2, simheat's a0 + a2 q^2 in head units.
- the water: EPANET's viscosity option is a ratio to 1.1e-5 ft^2/s
  (1.0219e-6 m^2/s, the value in EPANET's source as we remember it; the manual
  says "relative to water at 20 °C (1.0 centistoke)", which would be 2.2 %
  lower); EPANET works in feet with g = 32.2 ft/s^2. Both are measured below on
  single pipes before the network comparisons rely on them. The specific gravity
  rho/1000 only scales EPANET's pressure report.

The one modelling difference left is the turbulent friction factor: EPANET
evaluates Swamee-Jain's explicit approximation (P. K. Swamee, A. K. Jain,
"Explicit equations for pipe-flow problems", J. Hydraul. Div. ASCE 102(5),
1976), simheat iterates Colebrook-White to round-off. Every pipe here runs at
Re > 1e4, away from both laminar-turbulent blends (they differ: EPANET uses
Dunlop's interpolation, simheat a cubic Hermite in Re).
"""

from __future__ import annotations

import math
from types import SimpleNamespace

import fluids.friction
import numpy as np
import pytest

from simheat.hydraulics import _kernels
from simheat.hydraulics.network import LINK_PUMP
from simheat.hydraulics.solver import solve_flows
from simheat.physics._kernels import (
    pipe_pressure_drop_Pa,
    water_density_kg_m3,
    water_viscosity_Pa_s,
)
from simheat.physics.pipe_catalog import PIPE_CATALOG

try:
    import wntr
except ImportError as error:  # the test extra installs it; CI runs these tests
    pytest.skip(
        f"EPANET 2.2 reference unavailable: wntr cannot be imported ({error}); "
        'install the test extra: pip install -e ".[test]"',
        allow_module_level=True,
    )

FT_M = 0.3048  # international foot [m]
# EPANET's internal constants in SI (see module docstring; measured by the
# single-pipe tests below):
EPANET_GRAVITY_M_S2 = 32.2 * FT_M  # 32.2 ft/s2 = 9.81456 m/s2
EPANET_VISCOSITY_UNIT_M2_S = 1.1e-5 * FT_M**2  # 1.1e-5 ft2/s = 1.02193e-6 m2/s

WATER_TEMP_C = 60.0
# EPANET converts L/s to its internal ft3/s with a rounded factor (28.317 L/ft3,
# 5e-6 relative; from memory of its source, and the size of the residual the
# laminar test below measures) and writes 4-byte floats (6e-8 relative): flows
# agree with an exact evaluation to this fraction. [-]
EPANET_FLOW_RTOL = 2e-5
# Hydraulic convergence of EPANET: sum of |flow changes| / sum of |flows|. [-]
EPANET_ACCURACY = 1e-10
TURBULENT_RE_MIN = 1e4

GRID_SIZE = 4
# Seed whose random grid is turbulent in every pipe (asserted in the tests).
GRID_SEED = 74
GRID_PIPES = (
    "cu_18x1",
    "cu_22x1",
    "cu_28x1",
    "cu_35x1.5",
    "steel_dn15",
    "steel_dn20",
    "steel_dn25",
    "pex_20x2",
    "pex_25x2.3",
    "mlc_26x3",
)


def _water(temp_C):
    """Density [kg/m3] and kinematic viscosity [m2/s] of simheat's water."""
    rho = water_density_kg_m3(temp_C)
    return rho, water_viscosity_Pa_s(temp_C) / rho


# ------------------------------------------------------------ building networks


def _pump(f, t, head_m, flow_m3_s, temp_C):
    """Pure pump link through EPANET's single-point curve (head_m at flow_m3_s).

    simheat's curve is EPANET's completed curve h = 4/3 h0 - h0/(3 q0^2) q^2,
    in Pa with EPANET's gravity.
    """
    rho_g = water_density_kg_m3(temp_C) * EPANET_GRAVITY_M_S2
    a0 = 4.0 / 3.0 * head_m * rho_g
    a2 = -head_m / (3.0 * flow_m3_s**2) * rho_g
    return dict(f=f, t=t, name="pump", kind=LINK_PUMP, pump=(a0, 0.0, a2))


def _pipe(f, t, length_m, catalog_name, zeta=0.0, name=None):
    tube = PIPE_CATALOG[catalog_name]
    return dict(
        f=f,
        t=t,
        name=name or f"pipe_{f}_{t}",
        L=length_m,
        d=tube.inner_diameter_m,
        eps=tube.roughness_m,
        zeta=zeta,
    )


def two_loop_network(nets):
    """Pump, two supply pipes, a cross link, two branches and a return: two loops.

    Nodes: 0 pump inlet (reference), 1 pump outlet, 2 and 3 supply side, 4 the
    return collector. Unequal copper and steel pipes, a cross link with fittings.
    """
    links = [
        _pump(0, 1, 3.0, 1.0e-3, WATER_TEMP_C),
        _pipe(1, 2, 12.0, "cu_28x1", name="supply_a"),
        _pipe(1, 3, 20.0, "cu_22x1", name="supply_b"),
        _pipe(2, 3, 6.0, "cu_18x1", zeta=1.5, name="cross"),
        _pipe(2, 4, 15.0, "steel_dn20", name="branch_a"),
        _pipe(3, 4, 8.0, "cu_28x1", name="branch_b"),
        _pipe(4, 0, 10.0, "steel_dn32", name="return"),
    ]
    return nets.make(links, n_nodes=5)


def grid_network(nets, seed=GRID_SEED, n=GRID_SIZE):
    """n x n grid of random catalog pipes, pumped from the last corner to the first.

    Node ``i*n + j`` sits at row i, column j; pipes join row and column
    neighbours ((n-1)^2 loops among the pipes), with random tube sizes from
    copper, steel, PE-X and multilayer tube, lengths 3-25 m and a few with local
    losses. The pump inlet (last node) is the reference.
    """
    rng = np.random.default_rng(seed)
    last = n * n - 1
    links = [_pump(last, 0, 4.5, 2.0e-3, WATER_TEMP_C)]
    for i in range(n):
        for j in range(n):
            for di, dj in ((0, 1), (1, 0)):
                if i + di < n and j + dj < n:
                    tube = str(rng.choice(GRID_PIPES))
                    length_m = round(float(rng.uniform(3.0, 25.0)), 1)
                    zeta = float(rng.choice([0.0, 0.0, 1.0, 3.0]))
                    links.append(
                        _pipe(i * n + j, (i + di) * n + j + dj, length_m, tube, zeta)
                    )
    return nets.make(links, n_nodes=n * n, reference_node=last)


# ------------------------------------------------------------ running EPANET


def _epanet_model(network, temp_C):
    """wntr model of a closed simheat network (module docstring: the mapping)."""
    rho, nu = _water(temp_C)
    wn = wntr.network.WaterNetworkModel()
    wn.options.hydraulic = wntr.network.options.HydraulicOptions(
        headloss="D-W",
        viscosity=nu / EPANET_VISCOSITY_UNIT_M2_S,
        specific_gravity=rho / 1000.0,
        accuracy=EPANET_ACCURACY,
        trials=500,
        inpfile_units="LPS",
    )
    wn.options.time.duration = 0
    for i, name in enumerate(network.node_names):
        if i == network.reference_node:
            wn.add_reservoir(name, base_head=0.0)
        else:
            wn.add_junction(name, base_demand=0.0, elevation=0.0)
    for k, name in enumerate(network.link_names):
        start = network.node_names[network.from_node[k]]
        end = network.node_names[network.to_node[k]]
        a0, a1, a2 = (float(x) for x in network.pump_coeffs[k])
        if a0 != 0.0:
            # EPANET's single-point curve is a pure quadratic pump without a pipe
            assert a1 == 0.0
            assert network.length_m[k] == 0.0
            rho_g = rho * EPANET_GRAVITY_M_S2
            design = (math.sqrt(a0 / (-4.0 * a2)), 0.75 * a0 / rho_g)  # (q0, h0)
            wn.add_curve(f"curve_{name}", "HEAD", [design])
            wn.add_pump(
                name, start, end, pump_type="HEAD", pump_parameter=f"curve_{name}"
            )
        else:
            wn.add_pipe(
                name,
                start,
                end,
                length=float(network.length_m[k]),
                diameter=float(network.inner_diameter_m[k]),
                roughness=float(network.roughness_m[k]),
                minor_loss=float(network.zeta[k]),
            )
    return wn


def _run_epanet(wn, directory):
    """Solve with the EPANET 2.2 engine: link flow [m3/s], node head [m], head loss.

    wntr reports a pipe's head loss per unit length [m/m], a pump's in metres
    (negative for a head rise) [m].
    """
    results = wntr.sim.EpanetSimulator(wn).run_sim(
        file_prefix=str(directory / "network"), version=2.2, convergence_error=True
    )
    flow = results.link["flowrate"].iloc[0]
    head = results.node["head"].iloc[0]
    head_loss = results.link["headloss"].iloc[0]
    return flow, head, head_loss


# ------------------------------------------- EPANET's pipe law, measured alone


def _single_pipe_model(head_m, length_m, diameter_m, roughness_m, temp_C):
    """Two reservoirs joined by one pipe (split at a junction EPANET requires)."""
    rho, nu = _water(temp_C)
    wn = wntr.network.WaterNetworkModel()
    wn.options.hydraulic = wntr.network.options.HydraulicOptions(
        headloss="D-W",
        viscosity=nu / EPANET_VISCOSITY_UNIT_M2_S,
        specific_gravity=rho / 1000.0,
        accuracy=EPANET_ACCURACY,
        trials=500,
        inpfile_units="LPS",
    )
    wn.options.time.duration = 0
    wn.add_reservoir("upstream", base_head=head_m)
    wn.add_reservoir("downstream", base_head=0.0)
    wn.add_junction("middle", base_demand=0.0, elevation=0.0)
    for name, start, end in (
        ("a", "upstream", "middle"),
        ("b", "middle", "downstream"),
    ):
        wn.add_pipe(
            name,
            start,
            end,
            length=length_m / 2.0,
            diameter=diameter_m,
            roughness=roughness_m,
            minor_loss=0.0,
        )
    return wn


def test_epanet_laminar_pipe_measures_its_viscosity_unit(tmp_path):
    """Hagen-Poiseuille, h = 32 nu L v / (g D^2), exact for laminar flow.

    With the viscosity option nu / 1.1e-5 ft^2/s EPANET's laminar flow equals the
    exact one; a unit of 1.0e-6 m^2/s (the manual's wording) would put it 2.2 %
    off, and g = 9.80665 m/s^2 instead of 32.2 ft/s^2 0.08 % off.
    """
    head_m, length_m, diameter_m = 0.01, 10.0, 0.010
    _, nu = _water(WATER_TEMP_C)
    wn = _single_pipe_model(head_m, length_m, diameter_m, 1.5e-6, WATER_TEMP_C)
    flow, _, _ = _run_epanet(wn, tmp_path)
    area = math.pi * diameter_m**2 / 4.0
    velocity = head_m * EPANET_GRAVITY_M_S2 * diameter_m**2 / (32.0 * nu * length_m)
    assert velocity * diameter_m / nu < 2000.0  # laminar
    assert flow["a"] == pytest.approx(velocity * area, rel=EPANET_FLOW_RTOL)


@pytest.mark.parametrize("catalog_name", ["cu_22x1", "steel_dn20"])
def test_epanet_turbulent_pipe_follows_swamee_jain(tmp_path, catalog_name):
    """EPANET's turbulent D-W pipe: h = f L/D v^2/(2 g) with Swamee-Jain's f.

    f from the ``fluids`` package (``Swamee_Jain_1976``) at EPANET's flow; the
    head then matches the imposed head to twice the flow tolerance (h ~ q^2).
    Colebrook-White in its place misses by 0.5 % (copper) and 1 % (steel).
    """
    tube = PIPE_CATALOG[catalog_name]
    d, eps = tube.inner_diameter_m, tube.roughness_m
    head_m, length_m = 2.0, 20.0
    _, nu = _water(WATER_TEMP_C)
    wn = _single_pipe_model(head_m, length_m, d, eps, WATER_TEMP_C)
    flow, _, _ = _run_epanet(wn, tmp_path)
    velocity = flow["a"] / (math.pi * d * d / 4.0)
    reynolds = velocity * d / nu
    assert reynolds > TURBULENT_RE_MIN
    f = fluids.friction.Swamee_Jain_1976(reynolds, eps / d)
    head = f * length_m / d * velocity**2 / (2.0 * EPANET_GRAVITY_M_S2)
    assert head == pytest.approx(head_m, rel=2.0 * EPANET_FLOW_RTOL)


# ------------------------------------------------ the looped network comparison


NETWORKS = {"two_loop": two_loop_network, "grid_4x4": grid_network}


@pytest.fixture(scope="module")
def solved(nets, tmp_path_factory):
    """simheat's and EPANET's solutions of each network, solved once per module."""
    rho, _ = _water(WATER_TEMP_C)
    cases = {}
    for key, build in NETWORKS.items():
        network = build(nets)
        flows = solve_flows(network, water_temp_C=WATER_TEMP_C)
        nets.assert_mass_balance(network, flows)
        flow, head, head_loss = _run_epanet(
            _epanet_model(network, WATER_TEMP_C), tmp_path_factory.mktemp(key)
        )
        names = list(network.link_names)
        cases[key] = SimpleNamespace(
            network=network,
            mass_flow_kg_s=np.asarray(flows.mass_flow_kg_s),
            pressure_Pa=np.asarray(flows.pressure_Pa),
            epanet_mass_flow_kg_s=flow[names].to_numpy(dtype=float) * rho,
            epanet_head_m=head[list(network.node_names)].to_numpy(dtype=float),
            epanet_head_loss=head_loss[names].to_numpy(dtype=float),
        )
    return cases


def _friction_difference(network, mass_flow_kg_s, temp_C):
    """What Swamee-Jain changes in each link law at simheat's solution.

    Returns
    -------
    relative : ndarray
        eps_k = f_SJ / f_CW - 1 at the pipe's Reynolds number, both friction
        factors from ``fluids``; zero for the pump. [-]
    friction_Pa : ndarray
        Friction part of each link's loss (local losses excluded): EPANET's link
        law at the same flow is simheat's plus eps_k times this. [Pa]
    slope : ndarray
        d(loss - rise)/d(mass flow) of each simheat link, > 0. [Pa s/kg]
    """
    rho, nu = _water(temp_C)
    relative = np.zeros(network.n_links)
    friction_Pa = np.zeros(network.n_links)
    slope = np.zeros(network.n_links)
    for k in range(network.n_links):
        m = float(mass_flow_kg_s[k])
        a0, a1, a2 = (float(x) for x in network.pump_coeffs[k])
        length, d = float(network.length_m[k]), float(network.inner_diameter_m[k])
        eps, zeta = float(network.roughness_m[k]), float(network.zeta[k])
        _, slope[k] = _kernels.link_loss_Pa(
            m, length, d, eps, zeta, 0.0, 1.0, a0, a1, a2, 1.0, temp_C
        )
        if length > 0.0:
            reynolds = abs(m) / rho * 4.0 / (math.pi * d * nu)
            # both friction laws turbulent, away from the laminar-turbulent blends
            assert reynolds > TURBULENT_RE_MIN, network.link_names[k]
            f_sj = fluids.friction.Swamee_Jain_1976(reynolds, eps / d)
            f_cw = fluids.friction.Colebrook(reynolds, eps / d)
            relative[k] = f_sj / f_cw - 1.0
            friction_Pa[k], _ = pipe_pressure_drop_Pa(m, length, d, eps, 0.0, temp_C)
    assert np.all(slope > 0.0)
    return relative, friction_Pa, slope


def _linear_response(network, slope, change_Pa):
    """Flow and pressure change of the linearised network for a link-law change.

    Newton's equations about the solution: D dm + b = A^T dp (links) and
    A dm = 0 (nodes but the reference), with D = diag(slope) and b the change of
    each link law at fixed flows; eliminating dm gives
    (A D^-1 A^T) dp = A D^-1 b, dm = D^-1 (A^T dp - b).
    """
    keep = np.arange(network.n_nodes) != network.reference_node
    a = network.incidence()[keep]
    inv = 1.0 / slope
    dp = np.linalg.solve((a * inv) @ a.T, a @ (inv * change_Pa))
    dm = inv * (a.T @ dp - change_Pa)
    pressure = np.zeros(network.n_nodes)
    pressure[keep] = dp
    return dm, pressure


@pytest.mark.parametrize("key", NETWORKS)
def test_epanet_pump_runs_on_the_simheat_curve(solved, key):
    """At EPANET's duty flow its pump head equals simheat's curve (in metres).

    Checks the single-point curve mapping; the curve is written with 7
    significant digits and read back in 4-byte floats.
    """
    case = solved[key]
    rho, _ = _water(WATER_TEMP_C)
    (k,) = case.network.pump_links()
    a0, _, a2 = case.network.pump_coeffs[k]
    flow_m3_s = case.epanet_mass_flow_kg_s[k] / rho
    curve_m = (a0 + a2 * flow_m3_s**2) / (rho * EPANET_GRAVITY_M_S2)
    assert -case.epanet_head_loss[k] == pytest.approx(curve_m, rel=EPANET_FLOW_RTOL)


@pytest.mark.parametrize("key", NETWORKS)
def test_link_flows_agree_with_epanet_within_the_friction_law_bound(solved, key):
    """Every link flow within the bound that the friction-law difference allows.

    EPANET's network differs from simheat's only by the factor 1 + eps_k on each
    pipe's friction loss, |eps_k| <= delta (Swamee-Jain against Colebrook-White,
    about 1 % over these pipes). To first order the flow change is
    dm = -D^-1/2 Q D^-1/2 b with b_k = eps_k F_k, D the link slopes and Q an
    orthogonal projector (see _linear_response), so by Cauchy-Schwarz
    |dm_k| <= delta sqrt(sum_j F_j^2 / D_j) / sqrt(D_k). The bound gets 10 % for
    second-order terms, of relative size delta (kept below 3 %), and EPANET's
    flow tolerance on top.
    """
    case = solved[key]
    m = case.mass_flow_kg_s
    relative, friction_Pa, slope = _friction_difference(case.network, m, WATER_TEMP_C)
    delta = float(np.max(np.abs(relative)))
    assert delta < 0.03  # second-order terms stay well inside the 10 % allowance
    bound = delta * math.sqrt(np.sum(friction_Pa**2 / slope)) / np.sqrt(slope)
    difference = np.abs(case.epanet_mass_flow_kg_s - m)
    assert np.all(difference <= 1.1 * bound + EPANET_FLOW_RTOL * np.abs(m))


@pytest.mark.parametrize("key", NETWORKS)
def test_flow_directions_agree_with_epanet(solved, key):
    """Every link carries its flow the same way in both solutions.

    The friction-law bound above already implies it here (every link's flow is
    several times its bound); this states it on its own.
    """
    case = solved[key]
    assert np.all(np.sign(case.epanet_mass_flow_kg_s) == np.sign(case.mass_flow_kg_s))


def _first_order_prediction(case):
    """simheat's flows and pressures plus their linear response to eps_k F_k."""
    m = case.mass_flow_kg_s
    relative, friction_Pa, slope = _friction_difference(case.network, m, WATER_TEMP_C)
    dm, dp = _linear_response(case.network, slope, relative * friction_Pa)
    delta = float(np.max(np.abs(relative)))
    return m + dm, case.pressure_Pa + dp, delta


@pytest.mark.parametrize("key", NETWORKS)
def test_flow_difference_from_epanet_is_the_first_order_swamee_jain_effect(solved, key):
    """simheat plus the linear response to eps_k F_k reproduces EPANET's flows.

    What is left is second order in eps (taken as delta^2 of the largest flow,
    1e-4 to 2e-4 here) plus EPANET's flow tolerance; it would show any other
    difference between the two solvers (a wrong slope, unit, node or pump law)
    at that level, far below the raw 0.4-1 % friction-law difference.
    """
    case = solved[key]
    predicted, _, delta = _first_order_prediction(case)
    scale = float(np.max(np.abs(case.mass_flow_kg_s)))
    tolerance = delta**2 * scale + EPANET_FLOW_RTOL * np.abs(predicted)
    assert np.all(np.abs(case.epanet_mass_flow_kg_s - predicted) <= tolerance)


@pytest.mark.parametrize("key", NETWORKS)
def test_pressure_difference_from_epanet_is_the_first_order_swamee_jain_effect(
    solved, key
):
    """Node pressures (EPANET heads times rho g) likewise, to delta^2 of the pump rise.

    EPANET reports heads as 4-byte floats (6e-8 relative), well inside.
    """
    case = solved[key]
    _, predicted, delta = _first_order_prediction(case)
    rho, _ = _water(WATER_TEMP_C)
    epanet_Pa = case.epanet_head_m * rho * EPANET_GRAVITY_M_S2
    scale = float(np.max(np.abs(case.pressure_Pa)))
    assert np.max(np.abs(epanet_Pa - predicted)) <= delta**2 * scale
