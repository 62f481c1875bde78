"""Kv-rated valves, preset tables and thermostatic heads."""

import math
from functools import cache

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from iapws import IAPWS95

from simheat.errors import ScenarioError
from simheat.physics.valve import (
    LEAKAGE_FRACTION,
    TRV_CORNER_FRACTION,
    kv_from_preset,
    series_kv_m3_h,
    thermostatic_opening,
    valve_pressure_drop_Pa,
)


@cache
def iapws_density_kg_m3(temp_C):
    return IAPWS95(T=temp_C + 273.15, P=0.2).rho


@pytest.mark.parametrize("kv_m3_h", [0.1, 1.0, 4.5])
@pytest.mark.parametrize("dp_bar", [0.01, 0.1, 1.0])
@pytest.mark.parametrize("temp_C", [10.0, 50.0, 80.0])
def test_fully_open_valve_follows_kv_definition(kv_m3_h, dp_bar, temp_C):
    # Kv definition (EN 60534-2-1, VDI/VDE 2173): Q [m3/h] = Kv sqrt(dp [bar] *
    # 1000 / rho), rho from IAPWS-95. Tolerance: our density is within 5e-5 of
    # IAPWS-95, and the zero-flow regularisation adds < 1e-5 at these flows.
    rho = iapws_density_kg_m3(temp_C)
    flow_m3_h = kv_m3_h * math.sqrt(dp_bar * 1000.0 / rho)
    mass_flow_kg_s = flow_m3_h * rho / 3600.0
    dp, _ = valve_pressure_drop_Pa(mass_flow_kg_s, kv_m3_h, 1.0, temp_C)
    assert dp == pytest.approx(dp_bar * 1e5, rel=2e-4)


def test_closed_valve_passes_leakage_fraction_of_kv():
    # Documented assumption: closed Kv = LEAKAGE_FRACTION * Kv, so at equal flow
    # the drop grows by 1 / LEAKAGE_FRACTION^2 (dp ~ 1/Kv^2 by the Kv definition).
    open_dp, _ = valve_pressure_drop_Pa(0.02, 0.8, 1.0, 60.0)
    closed_dp, _ = valve_pressure_drop_Pa(0.02, 0.8, 0.0, 60.0)
    assert closed_dp / open_dp == pytest.approx(LEAKAGE_FRACTION**-2, rel=1e-12)
    assert math.isfinite(closed_dp)


@pytest.mark.parametrize("opening", [0.1, 0.5, 0.9])
def test_effective_kv_is_linear_in_opening(opening):
    # Documented form Kv_e = Kv (leak + (1 - leak) x); dp ~ 1/Kv_e^2 at equal flow.
    open_dp, _ = valve_pressure_drop_Pa(0.02, 0.8, 1.0, 60.0)
    part_dp, _ = valve_pressure_drop_Pa(0.02, 0.8, opening, 60.0)
    kv_ratio = LEAKAGE_FRACTION + (1 - LEAKAGE_FRACTION) * opening
    assert part_dp == pytest.approx(open_dp / kv_ratio**2, rel=1e-12)


@pytest.mark.parametrize("mass_flow_kg_s", [-0.1, -1e-3, -1e-5, 0.0, 1e-5, 0.02])
@pytest.mark.parametrize("opening", [0.0, 0.3, 1.0])
def test_valve_slope_matches_finite_difference(mass_flow_kg_s, opening):
    h = max(1e-7 * abs(mass_flow_kg_s), 1e-9)
    dp_plus, _ = valve_pressure_drop_Pa(mass_flow_kg_s + h, 0.5, opening, 55.0)
    dp_minus, _ = valve_pressure_drop_Pa(mass_flow_kg_s - h, 0.5, opening, 55.0)
    _, slope = valve_pressure_drop_Pa(mass_flow_kg_s, 0.5, opening, 55.0)
    assert slope == pytest.approx((dp_plus - dp_minus) / (2 * h), rel=1e-6)


@settings(max_examples=200, deadline=None)
@given(
    mass_flow=st.floats(-2.0, 2.0),
    kv=st.floats(0.01, 40.0),
    opening=st.floats(0.0, 1.0),
    temp=st.floats(0.0, 100.0),
)
def test_valve_drop_is_odd_with_positive_finite_slope(mass_flow, kv, opening, temp):
    forward = valve_pressure_drop_Pa(mass_flow, kv, opening, temp)
    backward = valve_pressure_drop_Pa(-mass_flow, kv, opening, temp)
    assert backward[0] == -forward[0]
    assert backward[1] == forward[1]
    assert math.isfinite(forward[1])
    assert forward[1] > 0.0


@pytest.mark.parametrize(
    ("kwargs", "message"),
    [
        ({"kv_m3_h": 0.0}, "kv_m3_h must be > 0"),
        ({"opening": 1.2}, r"opening must be within \[0, 1\]"),
        ({"opening": -0.1}, r"opening must be within \[0, 1\]"),
        ({"mass_flow_kg_s": float("nan")}, "mass_flow_kg_s must be a number"),
        ({"temp_C": float("nan")}, "temp_C must be a number"),
    ],
)
def test_valve_rejects_impossible_inputs(kwargs, message):
    arguments = {"mass_flow_kg_s": 0.02, "kv_m3_h": 1.0, "opening": 1.0, "temp_C": 60}
    arguments.update(kwargs)
    with pytest.raises(ScenarioError, match=message):
        valve_pressure_drop_Pa(**arguments)


# --- preset tables ---------------------------------------------------------------
PRESETS = [1.0, 2.0, 3.0, 4.0, 5.0, 6.0]
KV_VALUES = [0.05, 0.11, 0.19, 0.3, 0.45, 0.65]  # an invented table


@pytest.mark.parametrize(("preset", "kv"), list(zip(PRESETS, KV_VALUES, strict=True)))
def test_preset_on_a_table_row_returns_its_kv(preset, kv):
    assert kv_from_preset(preset, PRESETS, KV_VALUES) == kv


def test_preset_between_rows_interpolates_linearly():
    # Linear interpolation: a quarter of the way from preset 3 to 4.
    expected = 0.19 + 0.25 * (0.3 - 0.19)
    assert kv_from_preset(3.25, PRESETS, KV_VALUES) == pytest.approx(expected, 1e-15)


def test_unsorted_table_gives_same_kv_as_sorted():
    order = [3, 0, 5, 1, 4, 2]
    shuffled_presets = [PRESETS[i] for i in order]
    shuffled_kv = [KV_VALUES[i] for i in order]
    assert kv_from_preset(4.6, shuffled_presets, shuffled_kv) == kv_from_preset(
        4.6, PRESETS, KV_VALUES
    )


def test_array_of_presets_gives_array():
    kv = kv_from_preset(np.array([1.5, 5.5]), PRESETS, KV_VALUES)
    assert kv == pytest.approx([0.08, 0.55], rel=1e-12)


@pytest.mark.parametrize("preset", [0.5, 6.01])
def test_preset_outside_table_raises(preset):
    with pytest.raises(ScenarioError, match="preset must be within the table's 1 to 6"):
        kv_from_preset(preset, PRESETS, KV_VALUES)


@pytest.mark.parametrize(
    ("presets", "kv_values", "message"),
    [
        ([1.0, 2.0], [0.1], "same length"),
        ([], [], "at least one preset"),
        ([1.0, 1.0, 2.0], [0.1, 0.2, 0.3], "presets must be distinct"),
        ([1.0, 2.0], [0.1, 0.0], "kv_values must be > 0"),
    ],
)
def test_bad_preset_table_raises(presets, kv_values, message):
    with pytest.raises(ScenarioError, match=message):
        kv_from_preset(1.0, presets, kv_values)


# --- thermostatic heads ----------------------------------------------------------
SETPOINT_C, BAND_K = 20.0, 2.0


@pytest.mark.parametrize("sensor_temp_C", [10.0, 18.9, 19.0])
def test_head_fully_open_at_or_below_lower_band_edge(sensor_temp_C):
    # EN 215 proportional band: fully open at setpoint - band/2 and below.
    assert thermostatic_opening(sensor_temp_C, SETPOINT_C, BAND_K) == 1.0


@pytest.mark.parametrize("sensor_temp_C", [21.0, 21.1, 30.0])
def test_head_closed_at_or_above_upper_band_edge(sensor_temp_C):
    assert thermostatic_opening(sensor_temp_C, SETPOINT_C, BAND_K) == 0.0


def test_head_half_open_at_setpoint():
    assert thermostatic_opening(SETPOINT_C, SETPOINT_C, BAND_K) == pytest.approx(
        0.5, abs=1e-15
    )


@pytest.mark.parametrize("offset_K", [0.02, 0.3, 0.7, 0.97])
def test_head_opening_is_point_symmetric_about_setpoint(offset_K):
    above = thermostatic_opening(SETPOINT_C + offset_K, SETPOINT_C, BAND_K)
    below = thermostatic_opening(SETPOINT_C - offset_K, SETPOINT_C, BAND_K)
    assert above + below == pytest.approx(1.0, abs=1e-14)


def test_head_middle_part_is_linear_with_steepened_slope():
    # Straight part spans (1 - 2w) of the band and carries the opening from w/2/(1-w)
    # to 1 - w/2/(1-w): slope -1 / (band (1 - w)).
    t = np.linspace(19.2, 20.8, 9)
    opening = thermostatic_opening(t, SETPOINT_C, BAND_K)
    slopes = np.diff(opening) / np.diff(t)
    expected = -1.0 / (BAND_K * (1 - TRV_CORNER_FRACTION))
    assert slopes == pytest.approx(np.full(8, expected), rel=1e-9)


@pytest.mark.parametrize("u_joint", [0.0, TRV_CORNER_FRACTION, 0.95, 1.0])
def test_head_opening_has_continuous_slope_at_every_joint(u_joint):
    # C1: one-sided difference quotients agree at each joint of the pieces, to the
    # O(h) error of a one-sided quotient of a parabola (curvature 1/(w(1-w)) per
    # band^2, so |error| <= h * 10.6 / band^2 = 5e-6 K^-1 at h = 1e-6 K).
    sensor_C = SETPOINT_C + BAND_K / 2 - u_joint * BAND_K
    h = 1e-6

    def opening(t):
        return thermostatic_opening(t, SETPOINT_C, BAND_K)

    left = (opening(sensor_C) - opening(sensor_C - h)) / h
    right = (opening(sensor_C + h) - opening(sensor_C)) / h
    assert left == pytest.approx(right, abs=1e-5)


@settings(max_examples=200, deadline=None)
@given(
    sensor=st.floats(0.0, 40.0),
    step=st.floats(0.0, 5.0),
    setpoint=st.floats(5.0, 30.0),
    band=st.floats(0.2, 6.0),
)
def test_head_opening_falls_with_temperature_and_stays_in_unit_range(
    sensor, step, setpoint, band
):
    low = thermostatic_opening(sensor, setpoint, band)
    high = thermostatic_opening(sensor + step, setpoint, band)
    assert 0.0 <= high <= low <= 1.0


def test_head_rejects_non_positive_band():
    with pytest.raises(ScenarioError, match="band_K must be > 0"):
        thermostatic_opening(20.0, 20.0, 0.0)


def test_series_kv_gives_the_summed_pressure_drop():
    # two valves in series carry one flow: their drops add (Kv definition)
    m, temp = 0.02, 60.0
    dp_a, _ = valve_pressure_drop_Pa(m, 0.3, 1.0, temp)
    dp_b, _ = valve_pressure_drop_Pa(m, 0.45, 1.0, temp)
    dp, _ = valve_pressure_drop_Pa(m, series_kv_m3_h(0.3, 0.45), 1.0, temp)
    assert dp == pytest.approx(dp_a + dp_b, rel=1e-12)


def test_series_kv_rejects_non_positive_kv():
    with pytest.raises(ScenarioError, match="every Kv must be > 0"):
        series_kv_m3_h(0.3, 0.0)
