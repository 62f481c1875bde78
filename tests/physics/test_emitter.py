import math

import numpy as np
import pytest

from simheat.physics.emitter import (
    NOMINAL_EXCESS_K,
    cell_chain_output_W,
    cell_rating_factor,
    emitter_output_W,
    log_mean_excess_K,
    steady_output_W,
)

CP = 4190.0


def test_nominal_excess_is_the_en442_log_mean_of_75_65_20():
    # EN 442-2: dT_n = (75 - 65) / ln(55 / 45) = 49.83 K (closed form)
    assert NOMINAL_EXCESS_K == pytest.approx(10.0 / math.log(55.0 / 45.0), rel=1e-12)
    assert NOMINAL_EXCESS_K == pytest.approx(49.83, abs=0.005)


@pytest.mark.parametrize(
    ("excess_K", "exponent"), [(30.0, 1.3), (50.0, 1.25), (15.0, 1.33)]
)
def test_characteristic_equation_matches_en442_form(excess_K, exponent):
    # EN 442-2 eq. (4): Phi = Phi_n (dT / dT_n)^n, exact
    expected = 1500.0 * (excess_K / NOMINAL_EXCESS_K) ** exponent
    assert emitter_output_W(1500.0, exponent, excess_K) == pytest.approx(
        expected, rel=1e-12
    )


def test_output_at_55_45_20_follows_the_log_mean_excess():
    # EN 442-2: dT = (55 - 45) / ln(35 / 25) = 29.72 K;
    # Phi / Phi_n = (29.72 / 49.83)^1.3
    expected = (10.0 / math.log(35.0 / 25.0) / NOMINAL_EXCESS_K) ** 1.3
    ratio = emitter_output_W(1.0, 1.3, log_mean_excess_K(55.0, 45.0, 20.0))
    assert ratio == pytest.approx(expected, rel=1e-12)
    assert ratio == pytest.approx(0.511, abs=0.001)


def test_steady_output_at_nominal_flow_recovers_the_rating():
    # By definition of the rating point: 75 °C in, 65 °C out, 20 °C room.
    flow = 1000.0 / (CP * 10.0)
    assert steady_output_W(1000.0, 1.3, 75.0, flow, 20.0, CP) == pytest.approx(
        1000.0, rel=1e-9
    )


@pytest.mark.parametrize("inlet_C", [35.0, 50.0, 70.0, 90.0])
def test_four_cell_radiator_matches_log_mean_output_within_2_percent(inlet_C):
    # The dynamics cut each radiator into 4 calibrated cells; at rated mass flow their
    # steady output must follow the EN 442 log-mean form within 2 %, 35-90 °C flow.
    flow = 1000.0 / (CP * 10.0)
    exact = steady_output_W(1000.0, 1.3, inlet_C, flow, 20.0, CP)
    factor = cell_rating_factor(1.3, 4, CP)
    cells = cell_chain_output_W(1000.0, 1.3, inlet_C, flow, 20.0, 4, factor, CP)
    assert cells == pytest.approx(exact, rel=0.02)


@pytest.mark.parametrize("inlet_C", [35.0, 90.0])
@pytest.mark.parametrize("drop_at_rating_K", [5.0, 20.0])
def test_six_cells_stay_within_2_percent_from_half_to_double_rated_flow(
    inlet_C, drop_at_rating_K
):
    flow = 1000.0 / (CP * drop_at_rating_K)
    exact = steady_output_W(1000.0, 1.3, inlet_C, flow, 20.0, CP)
    factor = cell_rating_factor(1.3, 6, CP)
    cells = cell_chain_output_W(1000.0, 1.3, inlet_C, flow, 20.0, 6, factor, CP)
    assert cells == pytest.approx(exact, rel=0.02)


def test_calibrated_chain_meets_the_rating_exactly():
    flow = 1.0 / (CP * 10.0)
    factor = cell_rating_factor(1.25, 3, CP)
    assert cell_chain_output_W(
        1.0, 1.25, 75.0, flow, 20.0, 3, factor, CP
    ) == pytest.approx(1.0, rel=1e-9)


def test_output_is_odd_in_excess_temperature():
    # A radiator colder than the room takes heat from it by the same law.
    values = np.array([-10.0, 10.0])
    out = emitter_output_W(800.0, 1.3, values)
    assert out[0] == pytest.approx(-out[1], rel=1e-12)


def test_a_trickle_leaves_at_room_temperature():
    # Energy balance limit: with a leakage-size flow the water gives up all its heat,
    # m cp (T_in - T_room), and no more.
    flow = 1e-6
    out = steady_output_W(1000.0, 1.3, 70.0, flow, 20.0, CP)
    assert out == pytest.approx(flow * CP * 50.0, rel=1e-6)


@pytest.mark.parametrize(
    ("inlet_C", "outlet_C"),
    [(75.0, 65.0), (45.0, 20.5), (35.0, 34.9999999), (60.0, 60.0)],
)
def test_scalar_log_mean_excess_is_the_array_rule(inlet_C, outlet_C):
    # the root-finding shortcut of steady_output_W against the public rule
    from simheat.physics.emitter import _log_mean_excess_scalar_K

    expected = float(log_mean_excess_K(inlet_C, outlet_C, 20.0))
    got = _log_mean_excess_scalar_K(inlet_C - 20.0, outlet_C - 20.0)
    assert got == pytest.approx(expected, rel=1e-14)
