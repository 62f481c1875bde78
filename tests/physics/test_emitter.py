import math

import numpy as np
import pytest
from scipy.optimize import brentq

from simheat.physics import _emitter_kernels
from simheat.physics.emitter import (
    NOMINAL_EXCESS_K,
    cell_chain_output_W,
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


def _log_mean_output_W(nominal_W, exponent, inlet_C, flow_kg_s, room_C):
    """EN 442-2 log-mean form solved for the outlet by Brent's method (reference).

    ``m cp (T_in - T_out) = Phi_n (dT_lm / dT_n)^n`` with the log mean excess of
    EN 442-2:2014, section 3, written out here independently of simheat.
    """
    a = inlet_C - room_C

    def balance(b: float) -> float:
        lm = (a - b) / math.log(a / b)
        return (
            flow_kg_s * CP * (a - b) - nominal_W * (lm / NOMINAL_EXCESS_K) ** exponent
        )

    low = 1e-12 * a
    if balance(low) <= 0.0:
        return flow_kg_s * CP * a
    b = brentq(balance, low, a * (1.0 - 1e-13), xtol=1e-14 * a, rtol=1e-15)
    return flow_kg_s * CP * (a - b)


# The range the transient radiator must hold to the EN 442 characteristic (issue
# 14): 0.05x to 10x the nominal flow (the flow of a 10 K drop at 75/65/20 °C),
# inlet 35-90 °C, room 10-24 °C, exponent 1.2-1.4.
FLOW_FACTORS = np.geomspace(0.05, 10.0, 13)
INLETS_C = (35.0, 50.0, 70.0, 90.0)
ROOMS_C = (10.0, 17.0, 24.0)


@pytest.mark.parametrize("exponent", [1.2, 1.3, 1.4])
@pytest.mark.parametrize("cells", [1, 4, 9])
def test_cell_chain_gives_the_log_mean_output_at_every_flow(exponent, cells):
    # Required: within 1 % of EN 442's log-mean form over the whole range. The
    # cell law makes the chain's steady outlet the log-mean outlet in closed form
    # (simheat.physics._emitter_kernels), so the two agree to the tolerances of
    # the root finding on both sides (Brent, 1e-13): 1e-9 is asserted.
    nominal = 1000.0
    worst = 0.0
    for factor in FLOW_FACTORS:
        flow = factor * nominal / (CP * 10.0)
        for inlet in INLETS_C:
            for room in ROOMS_C:
                exact = _log_mean_output_W(nominal, exponent, inlet, flow, room)
                chain = cell_chain_output_W(
                    nominal, exponent, inlet, flow, room, cells, CP
                )
                worst = max(worst, abs(chain / exact - 1.0))
    assert worst < 1e-9


@pytest.mark.parametrize("exponent", [1.0, 1.2, 1.3, 1.4, 2.0])
def test_steady_output_solves_the_log_mean_form(exponent):
    # The steady function behind throttle and check: the same reference, over
    # the range and beyond it in the exponent (EN 442 allows 1.0-2.0 here).
    worst = 0.0
    for factor in FLOW_FACTORS:
        flow = factor * 1000.0 / (CP * 10.0)
        for inlet in INLETS_C:
            for room in ROOMS_C:
                exact = _log_mean_output_W(1000.0, exponent, inlet, flow, room)
                steady = steady_output_W(1000.0, exponent, inlet, flow, room, CP)
                worst = max(worst, abs(steady / exact - 1.0))
    assert worst < 1e-9


def test_linear_characteristic_chain_is_the_exponential_exchanger():
    # n = 1: the log-mean form is the exchanger with constant UA, whose outlet
    # excess is a e^(-UA / (m cp)) (closed form), UA = Phi_n / dT_n.
    flow = 0.3 * 1000.0 / (CP * 10.0)
    ua = 1000.0 / NOMINAL_EXCESS_K
    expected = flow * CP * 50.0 * (1.0 - math.exp(-ua / (flow * CP)))
    assert cell_chain_output_W(1000.0, 1.0, 70.0, flow, 20.0, 4, CP) == (
        pytest.approx(expected, rel=1e-10)
    )


def test_standing_water_emits_by_its_own_temperature():
    # Without flow a cell is still water at its own temperature: the plain
    # characteristic, whatever the water next to it (EN 442 eq. 4).
    share = 250.0
    q = _emitter_kernels.emitter_cell_output_W(share, 1.3, 5.0, 40.0, 0.0, CP, 0.0)
    assert q == pytest.approx(emitter_output_W(share, 1.3, 40.0), rel=1e-15)


def test_a_cell_at_its_rest_point_gives_what_the_water_loses():
    # At the cell's steady outlet S the law gives m cp (a - S): the rest point of
    # the cell balance, exactly (the departure terms cancel).
    flow, inlet = 0.01, 45.0
    constant = _emitter_kernels.emitter_chain_constant(1000.0, 1.3, 4, inlet, flow, CP)
    rest = _emitter_kernels.emitter_cell_outlet_K(1.3, inlet, constant)
    q = _emitter_kernels.emitter_cell_output_W(
        250.0, 1.3, inlet, rest, flow, CP, constant
    )
    assert q == pytest.approx(flow * CP * (inlet - rest), rel=1e-13)


def test_a_trickle_through_the_chain_gives_all_its_heat():
    # Leakage flow (the ratio cap applies): the water leaves at room temperature.
    flow = 1e-7
    out = cell_chain_output_W(1000.0, 1.3, 70.0, flow, 20.0, 4, CP)
    assert out == pytest.approx(flow * CP * 50.0, rel=1e-6)


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


@pytest.mark.parametrize("inlet_K", [-20.0, 0.0, 1e-3, 30.0, 70.0])
@pytest.mark.parametrize("flow_kg_s", [0.0, 1e-7, 2e-3, 0.05])
def test_emitter_kernels_match_their_python_source(inlet_K, flow_kg_s):
    k = _emitter_kernels
    args = (1200.0, 1.33, 4, inlet_K, flow_kg_s, CP)
    constant = k.emitter_chain_constant(*args)
    assert constant == pytest.approx(
        k.emitter_chain_constant.py_func(*args), rel=1e-12, abs=0.0
    )
    cell = (300.0, 1.33, inlet_K, 0.8 * inlet_K + 3.0, flow_kg_s, CP, constant)
    assert k.emitter_cell_output_W(*cell) == pytest.approx(
        k.emitter_cell_output_W.py_func(*cell), rel=1e-12, abs=1e-12
    )
    steady = (1200.0, 1.33, inlet_K, flow_kg_s, CP)
    assert k.emitter_steady_output_W(*steady) == pytest.approx(
        k.emitter_steady_output_W.py_func(*steady), rel=1e-12, abs=0.0
    )
