"""Heat pump rating tables: bilinear interpolation, clamping, minimum flow, Carnot."""

import warnings

import numpy as np
import pytest

from simheat.errors import RatingTableWarning, ScenarioError
from simheat.physics import _heat_pump_kernels
from simheat.physics.heat_pump import (
    carnot_cop,
    min_flow_share,
    outside_rating,
    rating_value,
    warn_outside_rating,
)

OUTDOOR_C = [-10.0, 0.0, 10.0]
FLOW_C = [35.0, 45.0, 55.0]
# Rows: outdoor temperature; columns: flow temperature. [kW]
CAPACITY_KW = [[6.0, 5.6, 5.0], [8.0, 7.4, 6.6], [10.0, 9.0, 8.0]]


@pytest.mark.parametrize(("i", "j"), [(0, 0), (0, 2), (1, 1), (2, 0), (2, 2), (1, 2)])
def test_table_points_are_returned_exactly(i, j):
    value = rating_value(OUTDOOR_C, FLOW_C, CAPACITY_KW, OUTDOOR_C[i], FLOW_C[j])
    assert value == CAPACITY_KW[i][j]


def test_value_inside_a_cell_matches_the_hand_calculation():
    # Outdoor -5 °C is halfway between -10 and 0 (u = 0.5); flow 38 °C is 0.3 of
    # the way from 35 to 45 (v = 0.3). By hand:
    # (1-u)(1-v) 6.0 + (1-u) v 5.6 + u (1-v) 8.0 + u v 7.4
    # = 0.35*6.0 + 0.15*5.6 + 0.35*8.0 + 0.15*7.4 = 2.1 + 0.84 + 2.8 + 1.11 = 6.85
    value = rating_value(OUTDOOR_C, FLOW_C, CAPACITY_KW, -5.0, 38.0)
    assert value == pytest.approx(6.85, rel=1e-14)  # float arithmetic only


def test_value_on_a_grid_line_is_linear_along_it():
    # On the 0 °C row between 45 and 55 °C at 52.5 °C: 7.4 + 0.75 (6.6 - 7.4) = 6.8
    value = rating_value(OUTDOOR_C, FLOW_C, CAPACITY_KW, 0.0, 52.5)
    assert value == pytest.approx(6.8, rel=1e-14)


def test_a_bilinear_function_is_reproduced_exactly():
    # f = a + b x + c y + d x y is bilinear: the interpolation of its grid values
    # is f itself anywhere inside the table (to round-off).
    def f(x, y):
        return 3.0 + 0.2 * x - 0.05 * y + 0.003 * x * y

    x_axis = np.array([-15.0, -7.0, 2.0, 7.0, 12.0])
    y_axis = np.array([30.0, 40.0, 50.0, 60.0])
    table = f(x_axis[:, None], y_axis[None, :])
    rng = np.random.default_rng(5)
    x = rng.uniform(-15.0, 12.0, 200)
    y = rng.uniform(30.0, 60.0, 200)
    np.testing.assert_allclose(
        rating_value(x_axis, y_axis, table, x, y), f(x, y), rtol=1e-12
    )


@pytest.mark.parametrize(
    ("outdoor", "flow", "held_outdoor", "held_flow"),
    [
        (-25.0, 40.0, -10.0, 40.0),  # colder than the table: the -10 °C row
        (20.0, 40.0, 10.0, 40.0),  # warmer: the 10 °C row
        (5.0, 25.0, 5.0, 35.0),  # flow below the table: the 35 °C column
        (5.0, 70.0, 5.0, 55.0),  # flow above: the 55 °C column
        (-30.0, 80.0, -10.0, 55.0),  # a corner
    ],
)
def test_outside_the_table_the_edge_holds(outdoor, flow, held_outdoor, held_flow):
    assert rating_value(OUTDOOR_C, FLOW_C, CAPACITY_KW, outdoor, flow) == (
        pytest.approx(
            rating_value(OUTDOOR_C, FLOW_C, CAPACITY_KW, held_outdoor, held_flow),
            rel=1e-15,
        )
    )


@pytest.mark.parametrize(
    ("outdoor", "flow"), [(-30.0, 20.0), (-10.0, 35.0), (-3.3, 47.1), (4.0, 55.0)]
)
def test_compiled_lookup_matches_its_python_function(outdoor, flow):
    args = (
        np.array(OUTDOOR_C),
        np.array(FLOW_C),
        np.array(CAPACITY_KW),
        outdoor,
        flow,
    )
    assert _heat_pump_kernels.table_lookup(*args) == pytest.approx(
        _heat_pump_kernels.table_lookup.py_func(*args), rel=1e-12
    )


@pytest.mark.parametrize(
    ("axes", "table", "match"),
    [
        (([0.0], FLOW_C), [[1.0, 1.0, 1.0]], "outdoor_axis_C"),
        ((OUTDOOR_C, [35.0, 35.0, 55.0]), CAPACITY_KW, "flow_axis_C"),
        ((OUTDOOR_C, FLOW_C), [[1.0, 2.0], [3.0, 4.0]], r"shape \(3, 3\)"),
    ],
)
def test_bad_tables_are_refused(axes, table, match):
    with pytest.raises(ScenarioError, match=match):
        rating_value(*axes, table, 0.0, 40.0)


def test_min_flow_share_hand_values():
    # Ramp from 0.8 to 1.0 of the minimum: s = (m - 0.8 m_min) / (0.2 m_min),
    # share = 3 s^2 - 2 s^3; at m = 0.9 m_min, s = 0.5 and the share is 0.5.
    m_min = 0.2
    shares = min_flow_share([0.0, 0.16, 0.18, 0.2, 0.5], m_min)
    np.testing.assert_allclose(shares, [0.0, 0.0, 0.5, 1.0, 1.0], atol=1e-12)
    assert min_flow_share(1e-6, 0.0) == 1.0  # no minimum given: always full


def test_min_flow_share_is_smooth_at_both_ends():
    # C1: the slope vanishes at both ends of the ramp (one-sided differences).
    # The one-sided slope of 3 s^2 at distance h is 6 h / w^2 = 4e-4 per kg/s for
    # h = 1e-7 kg/s and w = 0.04 kg/s, against 37.5 per kg/s mid-ramp.
    m_min, h = 0.2, 1e-7
    for end in (0.16, 0.2):
        left = (min_flow_share(end, m_min) - min_flow_share(end - h, m_min)) / h
        right = (min_flow_share(end + h, m_min) - min_flow_share(end, m_min)) / h
        assert abs(left) < 1e-3
        assert abs(right) < 1e-3
    mid = (min_flow_share(0.18 + h, m_min) - min_flow_share(0.18 - h, m_min)) / (2 * h)
    assert mid == pytest.approx(1.5 / 0.04, rel=1e-6)  # d/dm (3s^2-2s^3) at s=0.5


def test_carnot_cop_hand_value():
    # 35 °C flow from 7 °C air: 308.15 K / 28 K = 11.005 (second law)
    assert carnot_cop(35.0, 7.0) == pytest.approx(308.15 / 28.0, rel=1e-12)
    assert carnot_cop(20.0, 25.0) == np.inf


def test_outside_rating_names_each_temperature():
    text = outside_rating([-7.0, 7.0], [35.0, 55.0], (-12.0, 10.0), (40.0, 60.0))
    assert "outdoor temperature down to -12 °C" in text
    assert "outdoor temperature up to 10 °C" in text
    assert "flow temperature up to 60 °C" in text
    assert outside_rating([-7.0, 7.0], [35.0, 55.0], (-7.0, 7.0), (35.0, 55.0)) is None


def test_a_run_outside_the_table_warns_once_in_one_line():
    with pytest.warns(RatingTableWarning, match="flow temperature up to 60 °C") as rec:
        assert warn_outside_rating([-7.0, 7.0], [35.0, 55.0], (0.0, 0.0), (60.0, 60.0))
    assert len(rec) == 1
    assert "\n" not in str(rec[0].message)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        assert not warn_outside_rating([-7.0, 7.0], [35.0, 55.0], (0, 0), (40, 50))
