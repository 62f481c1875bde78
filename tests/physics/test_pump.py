"""Pump head curves: fit through data points, affinity laws, stopped pumps."""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from simheat.errors import ScenarioError
from simheat.physics.pump import curve_at_speed, fit_pump_curve, pump_pressure_rise_Pa
from simheat.physics.water import density_kg_m3

# An invented falling curve in SI units (Pa, m3/s): 45 kPa shut-off, about 0 at
# 3.3 m3/h; typical of a small circulator (trade practice, from memory).
A0, A1, A2 = 45e3, -4.0e6, -4.0e10


def curve_Pa(q_m3_s):
    return A0 + A1 * q_m3_s + A2 * q_m3_s**2


@pytest.mark.parametrize("flows_m3_h", [[0.0, 1.0, 2.0], [0.3, 1.1, 2.0, 2.9, 3.2]])
def test_fit_recovers_exact_quadratic(flows_m3_h):
    flows = np.array(flows_m3_h)
    heads_kPa = curve_Pa(flows / 3600.0) / 1e3
    a0, a1, a2 = fit_pump_curve(flows, heads_kPa)
    assert (a0, a1, a2) == pytest.approx((A0, A1, A2), rel=1e-9)


def test_fit_matches_unconstrained_least_squares_when_bounds_inactive():
    # numpy.polyfit is the plain least-squares quadratic; with scattered points on
    # a clearly falling curve the bounds a1 <= 0, a2 <= 0 are inactive.
    flows = np.array([0.0, 0.5, 1.0, 1.5, 2.0, 2.5, 3.0])
    scatter_kPa = np.array([0.4, -0.3, 0.2, -0.5, 0.1, 0.3, -0.2])
    heads_kPa = curve_Pa(flows / 3600.0) / 1e3 + scatter_kPa
    a2, a1, a0 = np.polyfit(flows / 3600.0, heads_kPa * 1e3, 2)
    assert fit_pump_curve(flows, heads_kPa) == pytest.approx((a0, a1, a2), rel=1e-8)


def test_fit_of_flat_topped_data_keeps_the_curve_falling():
    # Unconstrained least squares would give a1 > 0 (a hump near zero flow); the
    # bounded fit puts a1 on its bound 0, which makes it the plain least-squares
    # fit of a0 + a2 Q^2 (numpy.linalg.lstsq).
    flows = np.array([0.0, 1.0, 2.0, 3.0, 4.0])
    heads_kPa = np.array([40.0, 40.0, 39.0, 30.0, 10.0])
    assert np.polyfit(flows, heads_kPa, 2)[1] > 0  # the data really has a hump
    a0, a1, a2 = fit_pump_curve(flows, heads_kPa)
    q = flows / 3600.0
    (b0, b2), *_ = np.linalg.lstsq(
        np.column_stack([np.ones_like(q), q**2]), heads_kPa * 1e3, rcond=None
    )
    assert a1 == 0.0
    assert (a0, a2) == pytest.approx((b0, b2), rel=1e-9)


def test_two_points_give_flat_top_curve_through_both():
    a0, a1, a2 = fit_pump_curve([0.5, 2.5], [38.0, 14.0])
    assert a1 == 0.0
    for flow_m3_h, head_kPa in [(0.5, 38.0), (2.5, 14.0)]:
        q = flow_m3_h / 3600.0
        assert a0 + a2 * q**2 == pytest.approx(head_kPa * 1e3, rel=1e-12)


@pytest.mark.parametrize(
    ("flows", "heads", "message"),
    [
        ([1.0], [30.0], "at least 2 points"),
        ([0.0, 1.0, 2.0], [30.0, 32.0, 20.0], "must fall with flow"),
        ([0.0, 1.0], [30.0, 30.0], "must fall with flow"),
        ([0.0, 1.0, 1.0], [30.0, 25.0, 20.0], "must be distinct"),
        ([-1.0, 1.0], [30.0, 20.0], "must be >= 0"),
        ([0.0, 1.0], [30.0], "same length"),
        ([0.0, 1.0], [0.0, -5.0], "no positive head at zero flow"),
    ],
)
def test_fit_rejects_unusable_data(flows, heads, message):
    with pytest.raises(ScenarioError, match=message):
        fit_pump_curve(flows, heads)


@pytest.mark.parametrize("speed_ratio", [0.4, 0.7, 1.2])
@pytest.mark.parametrize("flow_m3_h", [0.5, 1.5, 2.5])
def test_rise_follows_affinity_laws(speed_ratio, flow_m3_h):
    # Affinity laws (pump handbook): at speed s the point (Q, dp) of the nominal
    # curve moves to (s Q, s^2 dp). The zero-flow regularisation changes Q|Q| by
    # Q0^2/(2 Q^2) < 1e-9 here.
    temp_C = 60.0
    rho = density_kg_m3(temp_C)
    m_nominal = flow_m3_h / 3600.0 * rho
    rise_nominal, _ = pump_pressure_rise_Pa(m_nominal, A0, A1, A2, 1.0, temp_C)
    rise_scaled, _ = pump_pressure_rise_Pa(
        speed_ratio * m_nominal, A0, A1, A2, speed_ratio, temp_C
    )
    assert rise_nominal == pytest.approx(curve_Pa(flow_m3_h / 3600.0), rel=1e-9)
    assert rise_scaled == pytest.approx(speed_ratio**2 * rise_nominal, rel=1e-9)


@pytest.mark.parametrize("speed_ratio", [0.0, 0.5, 1.0])
def test_rise_at_zero_flow_is_shut_off_head_times_speed_squared(speed_ratio):
    rise, _ = pump_pressure_rise_Pa(0.0, A0, A1, A2, speed_ratio, 60.0)
    assert rise == pytest.approx(A0 * speed_ratio**2, rel=1e-15)


@pytest.mark.parametrize("mass_flow_kg_s", [0.05, 0.3])
def test_stopped_pump_is_a_quadratic_resistance(mass_flow_kg_s):
    # s = 0 leaves a2 Q|Q|: a loss in either flow direction. The regularised
    # Q sqrt(Q^2 + Q0^2) differs by Q0^2 / (2 Q^2) = 2e-8 at 0.05 kg/s.
    rho = density_kg_m3(60.0)
    q = mass_flow_kg_s / rho
    forward, _ = pump_pressure_rise_Pa(mass_flow_kg_s, A0, A1, A2, 0.0, 60.0)
    backward, _ = pump_pressure_rise_Pa(-mass_flow_kg_s, A0, A1, A2, 0.0, 60.0)
    assert forward == pytest.approx(A2 * q * q, rel=1e-7)
    assert backward == -forward
    assert forward < 0.0


@pytest.mark.parametrize("mass_flow_kg_s", [-0.2, -1e-5, 0.0, 1e-5, 0.1, 0.9])
@pytest.mark.parametrize("speed_ratio", [0.0, 0.6, 1.0])
def test_rise_slope_matches_finite_difference(mass_flow_kg_s, speed_ratio):
    h = max(1e-7 * abs(mass_flow_kg_s), 1e-9)
    args = (A0, A1, A2, speed_ratio, 60.0)
    up, _ = pump_pressure_rise_Pa(mass_flow_kg_s + h, *args)
    down, _ = pump_pressure_rise_Pa(mass_flow_kg_s - h, *args)
    _, slope = pump_pressure_rise_Pa(mass_flow_kg_s, *args)
    assert slope == pytest.approx((up - down) / (2 * h), rel=1e-6)


@settings(max_examples=200, deadline=None)
@given(
    mass_flow=st.floats(-2.0, 2.0),
    speed=st.floats(0.0, 1.5),
    a1=st.floats(-1e8, 0.0),
    a2=st.floats(-1e12, -1e8),
    temp=st.floats(0.0, 100.0),
)
def test_rise_slope_is_negative_and_finite_for_falling_curves(
    mass_flow, speed, a1, a2, temp
):
    _, slope = pump_pressure_rise_Pa(mass_flow, 4e4, a1, a2, speed, temp)
    assert math.isfinite(slope)
    assert slope < 0.0


def test_stopped_pump_without_quadratic_term_warns():
    with pytest.warns(UserWarning, match="offers no resistance"):
        pump_pressure_rise_Pa(0.1, A0, A1, 0.0, 0.0, 60.0)


@pytest.mark.parametrize(
    ("kwargs", "message"),
    [
        ({"speed_ratio": -0.1}, "speed_ratio must be >= 0"),
        ({"a0": -1.0}, "a0 must"),
        ({"mass_flow_kg_s": float("nan")}, "mass_flow_kg_s must be a number"),
        ({"temp_C": float("nan")}, "temp_C must be a number"),
    ],
)
def test_rise_rejects_impossible_inputs(kwargs, message):
    arguments = {
        "mass_flow_kg_s": 0.1,
        "a0": A0,
        "a1": A1,
        "a2": A2,
        "speed_ratio": 1.0,
        "temp_C": 60.0,
    }
    arguments.update(kwargs)
    with pytest.raises(ScenarioError, match=message):
        pump_pressure_rise_Pa(**arguments)


@pytest.mark.parametrize("speed", [0.3, 0.75, 1.0])
def test_curve_at_speed_matches_the_affinity_laws_of_the_rise(speed):
    # the coefficients at speed s, run at speed 1, give the rise of the full-speed
    # curve run at speed s (the same affinity law, two statements of it)
    flows = np.linspace(-0.05, 0.4, 7)
    at_speed = curve_at_speed(A0, A1, A2, speed)
    rise_scaled, _ = pump_pressure_rise_Pa(flows, *at_speed, 1.0, 60.0)
    rise_direct, _ = pump_pressure_rise_Pa(flows, A0, A1, A2, speed, 60.0)
    np.testing.assert_allclose(rise_scaled, rise_direct, rtol=1e-12, atol=1e-9)
