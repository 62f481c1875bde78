"""Friction factor and pipe pressure drop, checked against the fluids package."""

import math

import numpy as np
import pytest
from fluids.core import dP_from_K
from fluids.friction import Colebrook, friction_factor, one_phase_dP
from hypothesis import given, settings
from hypothesis import strategies as st

from simheat.errors import ScenarioError
from simheat.physics.friction import darcy_friction_factor, pipe_pressure_drop_Pa
from simheat.physics.water import density_kg_m3, viscosity_Pa_s

TURBULENT_RE = [4000.0, 1e4, 1e5, 1e6, 1e7]
RELATIVE_ROUGHNESS = [0.0, 1e-6, 1e-4, 1e-3, 1e-2, 0.05]  # smooth to very rough


@pytest.mark.parametrize("reynolds", [100.0, 500.0, 1000.0, 1999.0, 2000.0])
@pytest.mark.parametrize("relative_roughness", [0.0, 1e-2])
def test_laminar_friction_factor_is_64_over_re(reynolds, relative_roughness):
    # Hagen-Poiseuille: f = 64/Re, independent of roughness (any fluids textbook).
    f, df_dre = darcy_friction_factor(reynolds, relative_roughness)
    assert f == pytest.approx(64.0 / reynolds, rel=1e-14)
    assert df_dre == pytest.approx(-64.0 / reynolds**2, rel=1e-14)


@pytest.mark.parametrize("reynolds", TURBULENT_RE)
@pytest.mark.parametrize("relative_roughness", RELATIVE_ROUGHNESS)
def test_turbulent_friction_factor_matches_colebrook(reynolds, relative_roughness):
    # fluids.friction.Colebrook solves Colebrook-White exactly (Lambert W); our
    # Newton loop stops at a relative step of 1e-14, so 1e-11 is ample.
    f, _ = darcy_friction_factor(reynolds, relative_roughness)
    assert f == pytest.approx(Colebrook(reynolds, relative_roughness), rel=1e-11)


@pytest.mark.parametrize("reynolds", [100.0, 1500.0, 5e3, 1e5, 1e7])
@pytest.mark.parametrize("relative_roughness", [0.0, 1e-4, 1e-2])
def test_friction_factor_matches_fluids_default_outside_transition(
    reynolds, relative_roughness
):
    # fluids.friction.friction_factor (default Clamond solution of Colebrook-White,
    # 64/Re below Re 2040): outside 2000-4000 both follow the same laws.
    f, _ = darcy_friction_factor(reynolds, relative_roughness)
    assert f == pytest.approx(friction_factor(reynolds, relative_roughness), rel=1e-11)


@pytest.mark.parametrize(
    "reynolds", [300.0, 1999.0, 2001.0, 2500.0, 3000.0, 3999.0, 4001.0, 1e5, 5e6]
)
@pytest.mark.parametrize("relative_roughness", [0.0, 1e-3, 0.05])
def test_friction_factor_derivative_matches_finite_difference(
    reynolds, relative_roughness
):
    # Central difference with h = 1e-6 Re: truncation ~h^2 f''' and round-off
    # ~eps f / h are both below 1e-7 relative to df/dRe ~ f/Re.
    h = 1e-6 * reynolds
    f_plus, _ = darcy_friction_factor(reynolds + h, relative_roughness)
    f_minus, _ = darcy_friction_factor(reynolds - h, relative_roughness)
    _, df_dre = darcy_friction_factor(reynolds, relative_roughness)
    assert df_dre == pytest.approx((f_plus - f_minus) / (2 * h), rel=1e-6)


@pytest.mark.parametrize("reynolds_edge", [2000.0, 4000.0])
@pytest.mark.parametrize("relative_roughness", RELATIVE_ROUGHNESS)
def test_friction_factor_and_slope_continuous_at_blend_edges(
    reynolds_edge, relative_roughness
):
    # C1 blend: value and slope agree from both sides to within what a relative
    # step of 1e-10 in Re moves them.
    below = darcy_friction_factor(reynolds_edge * (1 - 1e-10), relative_roughness)
    above = darcy_friction_factor(reynolds_edge * (1 + 1e-10), relative_roughness)
    assert below[0] == pytest.approx(above[0], rel=1e-8)
    assert below[1] == pytest.approx(above[1], rel=1e-6)


@pytest.mark.parametrize("relative_roughness", RELATIVE_ROUGHNESS)
def test_blend_stays_between_laminar_and_turbulent_values(relative_roughness):
    # Sanity of the cubic: it should not overshoot far outside the two end values
    # (a wild cubic would give Newton a bumpy resistance curve).
    reynolds = np.linspace(2000.0, 4000.0, 201)
    f, _ = darcy_friction_factor(reynolds, relative_roughness)
    f_turb = Colebrook(4000.0, relative_roughness)
    low, high = min(0.032, f_turb), max(0.032, f_turb)
    assert np.all(f >= 0.9 * low)
    assert np.all(f <= 1.1 * high)


@pytest.mark.parametrize("mass_flow_kg_s", [0.003, 0.008, 0.1, 0.2, 0.5])
@pytest.mark.parametrize(
    ("inner_diameter_m", "roughness_m"),
    [(0.013, 1.5e-6), (0.020, 7e-6), (0.0273, 4.5e-5)],  # Cu 15x1, PE-X 25, DN25
)
@pytest.mark.parametrize("temp_C", [20.0, 70.0])
def test_pipe_friction_drop_matches_fluids(
    mass_flow_kg_s, inner_diameter_m, roughness_m, temp_C
):
    # fluids.friction.one_phase_dP (Darcy-Weisbach with Colebrook-White, laminar
    # 64/Re below Re 2040) fed with our water properties. Our blend differs in
    # 2000 < Re < 4000, so the flows are chosen outside that band.
    rho = density_kg_m3(temp_C)
    mu = viscosity_Pa_s(temp_C)
    reynolds = 4 * mass_flow_kg_s / (math.pi * inner_diameter_m * mu)
    assert not 2000 < reynolds < 4000  # guard on the test's own parameters
    dp, _ = pipe_pressure_drop_Pa(
        mass_flow_kg_s, 10.0, inner_diameter_m, roughness_m, 0.0, temp_C
    )
    expected = one_phase_dP(
        mass_flow_kg_s, rho, mu, inner_diameter_m, roughness_m, 10.0, "Colebrook"
    )
    assert dp == pytest.approx(expected, rel=1e-10)


@pytest.mark.parametrize("velocity_m_s", [0.05, 0.3, 1.5])
@pytest.mark.parametrize("zeta", [0.5, 4.0])
def test_local_loss_matches_k_method(velocity_m_s, zeta):
    # fluids.core.dP_from_K = K rho v^2 / 2; our regularised v sqrt(v^2 + v0^2)
    # differs by v0^2/(2 v^2) <= 2e-6 at 0.05 m/s.
    diameter_m, temp_C = 0.016, 50.0
    rho = density_kg_m3(temp_C)
    mass_flow = velocity_m_s * rho * math.pi * diameter_m**2 / 4
    dp, _ = pipe_pressure_drop_Pa(mass_flow, 0.0, diameter_m, 0.0, zeta, temp_C)
    assert dp == pytest.approx(dP_from_K(zeta, rho, velocity_m_s), rel=5e-6)


@pytest.mark.parametrize(
    "mass_flow_kg_s", [-0.3, -0.02, -1e-4, 0.0, 1e-6, 1e-4, 0.005, 0.02, 0.3]
)
@pytest.mark.parametrize(("length_m", "zeta"), [(8.0, 0.0), (8.0, 3.0), (0.0, 3.0)])
def test_pipe_slope_matches_finite_difference(mass_flow_kg_s, length_m, zeta):
    # Central difference; step small against the flow scale of each regime.
    h = max(1e-7 * abs(mass_flow_kg_s), 1e-10)
    args = (length_m, 0.013, 1.5e-6, zeta, 60.0)
    dp_plus, _ = pipe_pressure_drop_Pa(mass_flow_kg_s + h, *args)
    dp_minus, _ = pipe_pressure_drop_Pa(mass_flow_kg_s - h, *args)
    _, slope = pipe_pressure_drop_Pa(mass_flow_kg_s, *args)
    assert slope == pytest.approx((dp_plus - dp_minus) / (2 * h), rel=1e-5)


def test_pipe_drop_is_linear_hagen_poiseuille_near_zero_flow():
    # Laminar limit dp = 32 mu L v / D^2 (Hagen-Poiseuille), so slope at zero flow
    # is 32 mu L / (rho A D^2).
    d, length, temp_C = 0.013, 12.0, 45.0
    rho, mu = density_kg_m3(temp_C), viscosity_Pa_s(temp_C)
    area = math.pi * d**2 / 4
    dp, slope = pipe_pressure_drop_Pa(0.0, length, d, 1.5e-6, 0.0, temp_C)
    assert dp == 0.0
    assert slope == pytest.approx(32 * mu * length / (rho * area * d**2), rel=1e-13)


def test_local_loss_alone_has_positive_slope_at_zero_flow():
    # Regularised zeta term: slope at zero is zeta rho v0 / 2 / (rho A) > 0.
    _, slope = pipe_pressure_drop_Pa(0.0, 0.0, 0.013, 0.0, 2.0, 60.0)
    area = math.pi * 0.013**2 / 4
    assert slope == pytest.approx(2.0 * 1e-4 / 2 / area, rel=1e-12)


def test_pipe_without_length_or_local_loss_gives_zero_drop_and_slope():
    assert pipe_pressure_drop_Pa(0.1, 0.0, 0.02, 1e-6, 0.0, 60.0) == (0.0, 0.0)


@settings(max_examples=200, deadline=None)
@given(
    mass_flow=st.floats(-3.0, 3.0),
    # 0 or a physical size: a denormal length or zeta underflows the slope to 0
    length=st.one_of(st.just(0.0), st.floats(1e-3, 60.0)),
    diameter=st.floats(0.006, 0.08),
    roughness=st.floats(0.0, 1e-4),
    zeta=st.one_of(st.just(0.0), st.floats(1e-3, 30.0)),
    temp=st.floats(0.0, 100.0),
)
def test_pipe_drop_is_odd_with_positive_finite_slope(
    mass_flow, length, diameter, roughness, zeta, temp
):
    if length == 0.0 and zeta == 0.0:
        return
    forward = pipe_pressure_drop_Pa(mass_flow, length, diameter, roughness, zeta, temp)
    backward = pipe_pressure_drop_Pa(
        -mass_flow, length, diameter, roughness, zeta, temp
    )
    assert backward[0] == -forward[0]
    assert backward[1] == forward[1]
    assert math.isfinite(forward[1])
    assert forward[1] > 0.0


def test_array_inputs_broadcast():
    dp, slope = pipe_pressure_drop_Pa(
        np.array([-0.05, 0.0, 0.05]), 10.0, 0.013, 1.5e-6, 1.0, 60.0
    )
    assert dp.shape == slope.shape == (3,)
    assert dp[0] == -dp[2]


@pytest.mark.parametrize(
    ("kwargs", "message"),
    [
        ({"length_m": -1.0}, "length_m must be >= 0"),
        ({"inner_diameter_m": 0.0}, "inner_diameter_m must be > 0"),
        ({"roughness_m": -1e-6}, "roughness_m must be >= 0"),
        ({"zeta": -0.5}, "zeta must be >= 0"),
        ({"mass_flow_kg_s": float("nan")}, "mass_flow_kg_s must be a number"),
        ({"temp_C": float("nan")}, "temp_C must be a number"),
    ],
)
def test_pipe_rejects_impossible_inputs(kwargs, message):
    arguments = {
        "mass_flow_kg_s": 0.05,
        "length_m": 10.0,
        "inner_diameter_m": 0.013,
        "roughness_m": 1.5e-6,
        "zeta": 1.0,
        "temp_C": 60.0,
    }
    arguments.update(kwargs)
    with pytest.raises(ScenarioError, match=message):
        pipe_pressure_drop_Pa(**arguments)


def test_friction_factor_rejects_non_positive_reynolds():
    with pytest.raises(ScenarioError, match="reynolds must be > 0"):
        darcy_friction_factor(0.0, 1e-4)


def test_friction_factor_warns_beyond_moody_chart():
    with pytest.warns(UserWarning, match="relative roughness above 0.05"):
        darcy_friction_factor(1e5, 0.08)
    with pytest.warns(UserWarning, match="Reynolds number above 1e"):
        darcy_friction_factor(2e8, 1e-4)
