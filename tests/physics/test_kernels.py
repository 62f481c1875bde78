"""Compiled kernels: agree with their pure-Python source, callable from njit code."""

import itertools
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from numba import njit

from simheat.physics import _kernels as k

TEMPS_C = [-10.0, 0.0, 7.5, 35.0, 60.0, 99.0, 100.0, 130.0]
FLOWS_KG_S = [-0.7, -0.03, -1e-6, 0.0, 1e-6, 2e-4, 0.03, 0.7]


def assert_same(compiled, python, rel=1e-12):
    compiled = np.atleast_1d(np.asarray(compiled, dtype=float))
    python = np.atleast_1d(np.asarray(python, dtype=float))
    assert compiled == pytest.approx(python, rel=rel, abs=0.0)


@pytest.mark.parametrize(
    "kernel", [k.water_density_kg_m3, k.water_viscosity_Pa_s, k.water_cp_J_kg_K]
)
@pytest.mark.parametrize("temp_C", TEMPS_C)
def test_water_kernels_match_python(kernel, temp_C):
    assert_same(kernel(temp_C), kernel.py_func(temp_C))


@pytest.mark.parametrize(
    "reynolds", [1e-12, 50.0, 1999.0, 2000.0, 2600.0, 3999.0, 4000.0, 7e4, 1e8]
)
@pytest.mark.parametrize("relative_roughness", [0.0, 1e-4, 0.05])
def test_friction_kernel_matches_python(reynolds, relative_roughness):
    assert_same(
        k.darcy_friction_factor(reynolds, relative_roughness),
        k.darcy_friction_factor.py_func(reynolds, relative_roughness),
    )


@pytest.mark.parametrize("mass_flow", FLOWS_KG_S)
@pytest.mark.parametrize(
    ("length_m", "zeta"), [(12.0, 0.0), (12.0, 2.5), (0.0, 2.5), (0.0, 0.0)]
)
def test_pipe_kernel_matches_python(mass_flow, length_m, zeta):
    args = (mass_flow, length_m, 0.016, 7e-6, zeta, 55.0)
    assert_same(k.pipe_pressure_drop_Pa(*args), k.pipe_pressure_drop_Pa.py_func(*args))


@pytest.mark.parametrize("mass_flow", FLOWS_KG_S)
@pytest.mark.parametrize("opening", [-0.2, 0.0, 0.4, 1.0, 1.3])
def test_valve_kernel_matches_python(mass_flow, opening):
    args = (mass_flow, 0.9, opening, 55.0)
    assert_same(
        k.valve_pressure_drop_Pa(*args), k.valve_pressure_drop_Pa.py_func(*args)
    )


@pytest.mark.parametrize("mass_flow", FLOWS_KG_S)
@pytest.mark.parametrize("speed_ratio", [-0.5, 0.0, 0.5, 1.0])
def test_pump_kernel_matches_python(mass_flow, speed_ratio):
    args = (mass_flow, 45e3, -4e6, -4e10, speed_ratio, 55.0)
    assert_same(k.pump_pressure_rise_Pa(*args), k.pump_pressure_rise_Pa.py_func(*args))


@pytest.mark.parametrize(
    ("sensor_C", "band_K"),
    list(itertools.product([18.0, 19.01, 19.5, 20.0, 20.97, 22.0], [0.0, 0.5, 2.0])),
)
def test_thermostatic_kernel_matches_python(sensor_C, band_K):
    assert_same(
        k.thermostatic_opening(sensor_C, 20.0, band_K),
        k.thermostatic_opening.py_func(sensor_C, 20.0, band_K),
    )


@njit
def _call_every_kernel_from_compiled_code(m, t):
    rho = k.water_density_kg_m3(t)
    mu = k.water_viscosity_Pa_s(t)
    cp = k.water_cp_J_kg_K(t)
    f, df = k.darcy_friction_factor(1e4, 1e-4)
    dp_pipe, s_pipe = k.pipe_pressure_drop_Pa(m, 10.0, 0.013, 1.5e-6, 1.0, t)
    dp_valve, s_valve = k.valve_pressure_drop_Pa(m, 1.0, 0.5, t)
    rise, s_pump = k.pump_pressure_rise_Pa(m, 4e4, -1e6, -4e10, 1.0, t)
    x = k.thermostatic_opening(20.3, 20.0, 2.0)
    return np.array(
        [rho, mu, cp, f, df, dp_pipe, s_pipe, dp_valve, s_valve, rise, s_pump, x]
    )


def test_kernels_are_callable_from_njit_code_with_contract_signatures():
    # The network solver calls these from its own compiled loops.
    m, t = 0.04, 60.0
    compiled = _call_every_kernel_from_compiled_code(m, t)
    expected = [
        k.water_density_kg_m3(t),
        k.water_viscosity_Pa_s(t),
        k.water_cp_J_kg_K(t),
        *k.darcy_friction_factor(1e4, 1e-4),
        *k.pipe_pressure_drop_Pa(m, 10.0, 0.013, 1.5e-6, 1.0, t),
        *k.valve_pressure_drop_Pa(m, 1.0, 0.5, t),
        *k.pump_pressure_rise_Pa(m, 4e4, -1e6, -4e10, 1.0, t),
        k.thermostatic_opening(20.3, 20.0, 2.0),
    ]
    assert compiled == pytest.approx(expected, rel=1e-14)


@settings(max_examples=300, deadline=None)
@given(
    mass_flow=st.floats(-3.0, 3.0),
    # 0 or a physical size: a denormal length or zeta underflows the slope to 0
    length=st.one_of(st.just(0.0), st.floats(1e-3, 60.0)),
    diameter=st.floats(0.006, 0.08),
    roughness=st.floats(0.0, 1e-4),
    zeta=st.one_of(st.just(0.0), st.floats(1e-3, 30.0)),
    temp=st.floats(0.0, 100.0),
)
def test_pipe_kernel_drop_increases_with_flow(
    mass_flow, length, diameter, roughness, zeta, temp
):
    # Strictly increasing dp(m) is what the positive slope promises; check it on a
    # finite step too, through the laminar-turbulent blend.
    if length == 0.0 and zeta == 0.0:
        return
    step = 1e-3 * max(abs(mass_flow), 1e-4)
    dp_low, slope = k.pipe_pressure_drop_Pa(
        mass_flow, length, diameter, roughness, zeta, temp
    )
    dp_high, _ = k.pipe_pressure_drop_Pa(
        mass_flow + step, length, diameter, roughness, zeta, temp
    )
    assert dp_high > dp_low
    assert math.isfinite(slope)
    assert slope > 0.0


@pytest.mark.parametrize("relative_roughness", [0.0, 1e-5, 1e-3, 0.05])
def test_pipe_slope_stays_positive_across_transition(relative_roughness):
    # Dense sweep of Re 1500-5000 for one pipe: the C1 blend must not bend the
    # friction law backwards (d(f Re^2)/dRe > 0, i.e. 2 f + Re f' > 0).
    reynolds = np.linspace(1500.0, 5000.0, 3501)
    for re in reynolds:
        f, df = k.darcy_friction_factor(re, relative_roughness)
        assert 2.0 * f + re * df > 0.0


@pytest.mark.parametrize("mass_flow", FLOWS_KG_S)
@pytest.mark.parametrize(("mode", "speed"), [(0, 1.0), (1, 1.0), (2, 0.9), (2, 0.0)])
def test_regulated_pump_kernel_matches_python(mass_flow, mode, speed):
    args = (mass_flow, 45e3, -4e6, -4e10, speed, mode, 20e3, 6e-4, 55.0)
    assert_same(
        k.regulated_pump_rise_Pa(*args), k.regulated_pump_rise_Pa.py_func(*args)
    )


@pytest.mark.parametrize("mass_flow", FLOWS_KG_S)
def test_check_valve_kernel_matches_python(mass_flow):
    assert_same(
        k.check_valve_reverse_dp_Pa(mass_flow),
        k.check_valve_reverse_dp_Pa.py_func(mass_flow),
    )


@pytest.mark.parametrize("mass_flow", [-0.3, -1e-4, -3e-7, -1e-8, 1e-8, 0.02])
def test_check_valve_slope_matches_finite_difference(mass_flow):
    h = 1e-4 * abs(mass_flow)
    _, slope = k.check_valve_reverse_dp_Pa(mass_flow)
    up, _ = k.check_valve_reverse_dp_Pa(mass_flow + h)
    down, _ = k.check_valve_reverse_dp_Pa(mass_flow - h)
    # central difference of a smooth function on either side of zero: the step
    # never crosses zero; truncation O(h^2) ~ 1e-8 relative, tolerance 1e-6
    assert slope == pytest.approx((up - down) / (2.0 * h), rel=1e-6, abs=1e-6)


def test_check_valve_law_has_no_kink_at_zero_flow():
    # C1 at zero: the slope tends to 0 from the reverse side (forward it is 0),
    # and far into reverse flow it is the full reverse resistance.
    _, near = k.check_valve_reverse_dp_Pa(-1e-12)
    _, far = k.check_valve_reverse_dp_Pa(-1e-3)
    r = k.CHECK_VALVE_REVERSE_RESISTANCE_PA_S_KG
    assert near <= r * 1e-12 / k.CHECK_VALVE_BLEND_FLOW_KG_S
    assert far == pytest.approx(r, rel=1e-3)  # u / (m_b + u) with u = 1e4 m_b


@pytest.mark.parametrize("mode", [1, 2])
@pytest.mark.parametrize("mass_flow", [0.05, 0.2, 0.35, 0.5])
def test_regulated_pump_slope_matches_finite_difference(mode, mass_flow):
    args = (45e3, -4e6, -4e10, 1.0, mode, 20e3, 6e-4, 55.0)
    h = 1e-6 * mass_flow
    _, slope = k.regulated_pump_rise_Pa(mass_flow, *args)
    up, _ = k.regulated_pump_rise_Pa(mass_flow + h, *args)
    down, _ = k.regulated_pump_rise_Pa(mass_flow - h, *args)
    # smooth (the corner is rounded); central difference, tolerance 1e-5 abs
    # against slopes of order 1e4 Pa s/kg (round-off ~1e-16 * 4e4 / h)
    assert slope == pytest.approx((up - down) / (2.0 * h), rel=1e-5, abs=1e-2)


@pytest.mark.parametrize("reynolds", [4e3, 3e4, 2e5, 1e7])
@pytest.mark.parametrize("relative_roughness", [0.0, 1e-4, 0.02])
@pytest.mark.parametrize("start", [0.0, 2.0, 6.0, 40.0])
def test_colebrook_solve_reaches_the_same_root_from_any_start(
    reynolds, relative_roughness, start
):
    # The root of g(x) = x + 2 log10(e/3.7 + 2.51 x / Re) is unique (g increasing);
    # from the Swamee-Jain start (0) or any positive start Newton ends on it to
    # round-off, and it satisfies the Colebrook-White equation itself.
    f, df, x = k.colebrook_solve(reynolds, relative_roughness, start)
    f_ref, df_ref, x_ref = k.colebrook_solve(reynolds, relative_roughness, 0.0)
    assert x == pytest.approx(x_ref, rel=1e-14)
    assert df == pytest.approx(df_ref, rel=1e-10)
    residual = x + 2.0 * math.log10(relative_roughness / 3.7 + 2.51 * x / reynolds)
    assert abs(residual) <= 1e-13 * x
    assert f == pytest.approx(1.0 / x**2, rel=1e-15)
