"""Pump curves fitted by the resolve step, and the checks that need the fit."""

from __future__ import annotations

import re
from pathlib import Path

import numpy as np
import pytest
from resolve_house import ORIGIN, house

from simheat.errors import ScenarioError
from simheat.physics.pump import fit_pump_curve
from simheat.resolve import resolve
from simheat.scenario import parse_scenario

SCENARIOS_DIR = Path(__file__).resolve().parents[2] / "scenarios"
BUNGALOW = (SCENARIOS_DIR / "bungalow.toml").read_text(encoding="utf-8")
PUMP_HEAD_LINE = "head_kPa = [45.0, 42.0, 35.0, 24.0, 10.0]\n"
# The demo's curve points; the shut-off head of the fitted quadratic. [kPa]
SHUT_OFF_KPA = (
    fit_pump_curve([0.0, 0.5, 1.0, 1.5, 2.0], [45.0, 42.0, 35.0, 24.0, 10.0])[0] / 1e3
)
LAYOUT_PUMP = "flow_m3_per_h = [0.0, 1.0]\nhead_kPa = [30.0, 20.0]\n"  # shut-off 30
PUMP_POINTS = "flow_m3_per_h = [0.0, 0.5, 1.0]\nhead_kPa = [30.0, 26.0, 16.0]"


def bungalow(pump_keys: str = "", tail: str = ""):
    """The demo bungalow with extra ``[pump]`` keys and tables appended."""
    assert PUMP_HEAD_LINE in BUNGALOW  # the demo still holds the line we extend
    text = BUNGALOW.replace(PUMP_HEAD_LINE, PUMP_HEAD_LINE + pump_keys, 1) + tail
    return parse_scenario(text, origin=ORIGIN)


def error_pattern(path: str, problem: str) -> str:
    """Regex for ``<path>: <problem>...(<origin>)``, path and problem escaped."""
    return "^" + re.escape(f"{path}: {problem}") + r".*\(" + re.escape(ORIGIN) + r"\)$"


def test_two_points_give_the_flat_topped_parabola_through_both():
    # (0, 30 kPa) and (1 m3/h, 20 kPa): a1 = 0, a0 = 30 kPa and
    # a2 = -10 kPa / (1/3600 m3/s)^2, exactly (closed form of the two-point fit)
    pump = resolve(house((PUMP_POINTS, LAYOUT_PUMP.strip()))).pump
    a0, a1, a2 = pump.coeffs
    assert (a0, a1) == (pytest.approx(30e3, rel=1e-12), 0.0)
    assert a2 == pytest.approx(-10e3 * 3600.0**2, rel=1e-12)
    assert pump.shut_off_head_Pa == a0


def test_points_on_a_falling_parabola_are_reproduced():
    # heads 30 - 4 q - 10 q^2 kPa at q = 0, 0.5, 1, 1.5 m3/h (a falling parabola)
    flows = [0.0, 0.5, 1.0, 1.5]
    heads = [30.0 - 4.0 * q - 10.0 * q * q for q in flows]
    points = f"flow_m3_per_h = {flows}\nhead_kPa = {heads}"
    a0, a1, a2 = resolve(house((PUMP_POINTS, points))).pump.coeffs
    q = np.array(flows) / 3600.0
    np.testing.assert_allclose(a0 + a1 * q + a2 * q * q, np.array(heads) * 1e3, 1e-9)


def test_pump_mode_set_head_and_check_valve_pass_through():
    pump = resolve(bungalow('mode = "constant_dp"\nsetpoint_kPa = 25.5\n')).pump
    assert (pump.where, pump.mode, pump.setpoint_Pa, pump.check_valve) == (
        "pump",
        "constant_dp",
        25.5e3,
        None,
    )


def test_floor_without_its_own_pump_takes_the_scenario_pump():
    tail = "\n[[layout.floor_pumps]]\nfloor = 0\n" + LAYOUT_PUMP
    resolved = resolve(bungalow(tail=tail))
    assert resolved.floor_pump(0).where == "layout.floor_pumps[0]"
    assert resolved.floor_pump(1) is resolved.pump
    assert resolved.plant_pump() is resolved.pump


def test_primary_pump_drives_the_plant_behind_a_low_loss_header():
    resolved = resolve(bungalow(tail="\n[layout.primary_pump]\n" + LAYOUT_PUMP))
    assert resolved.plant_pump().where == "layout.primary_pump"
    assert resolved.plant_pump().coeffs[0] == pytest.approx(30e3, rel=1e-12)


def test_pump_with_no_positive_head_at_zero_flow():
    # Refused when loading, before a curve is fitted: no head reaches 1 kPa.
    points = "flow_m3_per_h = [0.0, 0.5, 1.0]\nhead_kPa = [-5.0, -10.0, -20.0]"
    pattern = error_pattern(
        "pump.head_kPa",
        "the highest head must be at least 1 kPa (a pump that moves water), got "
        "[-5.0, -10.0, -20.0]",
    )
    with pytest.raises(ScenarioError, match=pattern):
        resolve(house((PUMP_POINTS, points)))


def test_pump_points_too_close_for_a_curve():
    # flows 1e-300 m3/h apart would overflow the least-squares fit's scaled
    # terms; they are refused when loading, before a curve is fitted
    points = "flow_m3_per_h = [0.0, 1e-300, 2e-300]\nhead_kPa = [30.0, 20.0, 10.0]"
    pattern = error_pattern(
        "pump.flow_m3_per_h",
        "flows must lie at least 0.01 m3/h apart (a curve through closer points is "
        "meaningless), got [0.0, 1e-300, 2e-300]",
    )
    with pytest.raises(ScenarioError, match=pattern):
        resolve(house((PUMP_POINTS, points)))


@pytest.mark.parametrize(
    ("pump_keys", "message"),
    [
        (
            'mode = "constant_dp"\nsetpoint_kPa = 60.0\n',
            f"pump.setpoint_kPa: must be below the pump curve's shut-off head "
            f"{SHUT_OFF_KPA:.6g} kPa (mode constant_dp), got 60 ({ORIGIN})",
        ),
        (
            f'mode = "proportional_dp"\nsetpoint_kPa = {SHUT_OFF_KPA!r}\n',
            "pump.setpoint_kPa: must be below the pump curve's shut-off head",
        ),
    ],
    ids=["above_shut_off", "at_shut_off"],
)
def test_set_head_not_below_the_shut_off_head(pump_keys, message):
    scenario = bungalow(pump_keys)  # the loader accepts it: it needs the fit
    with pytest.raises(ScenarioError, match=re.escape(message)):
        resolve(scenario)


@pytest.mark.parametrize(
    ("tail", "where"),
    [
        ("\n[layout.primary_pump]\n", "layout.primary_pump.setpoint_kPa"),
        ("\n[[layout.floor_pumps]]\nfloor = 0\n", "layout.floor_pumps[0].setpoint_kPa"),
    ],
    ids=["primary", "floor"],
)
def test_layout_pump_set_head_above_shut_off_names_its_table(tail, where):
    tail += LAYOUT_PUMP + 'mode = "constant_dp"\nsetpoint_kPa = 31.0\n'
    message = f"{where}: must be below the pump curve's shut-off head 30 kPa"
    with pytest.raises(ScenarioError, match=re.escape(message)):
        resolve(bungalow(tail=tail))


def test_second_floor_pump_names_its_own_table():
    tail = (
        "\n[[layout.floor_pumps]]\nfloor = 0\n" + LAYOUT_PUMP + "\n"
        "[[layout.floor_pumps]]\nfloor = 1\n" + LAYOUT_PUMP
    ).replace("floor = 1", "floor = 1\n" + 'mode = "constant_dp"\nsetpoint_kPa = 30.0')
    text = (SCENARIOS_DIR / "two_storey.toml").read_text(encoding="utf-8") + tail
    with pytest.raises(ScenarioError, match=r"^layout\.floor_pumps\[1\]\.setpoint_kPa"):
        resolve(parse_scenario(text, origin=ORIGIN))


def test_set_head_within_round_off_of_the_shut_off_head_counts_as_at_it():
    # points on an exact parabola: the fit's shut-off head lands a few ulps
    # above 20 kPa, and a set head of 20 kPa must still be refused
    tail = (
        "\n[layout.primary_pump]\nflow_m3_per_h = [0.0, 0.3, 0.6]\n"
        'head_kPa = [20.0, 17.0, 9.0]\nmode = "constant_dp"\nsetpoint_kPa = 20.0\n'
    )
    message = (
        "layout.primary_pump.setpoint_kPa: must be below the pump curve's shut-off "
        "head 20 kPa (mode constant_dp), got 20 "
    )
    with pytest.raises(ScenarioError, match=re.escape(message)):
        resolve(bungalow(tail=tail))


def test_set_head_just_below_the_shut_off_head_is_accepted():
    pump = resolve(bungalow('mode = "constant_dp"\nsetpoint_kPa = 45.0\n')).pump
    assert pump.setpoint_Pa == 45e3  # fitted shut-off head 45.09 kPa
    assert pump.shut_off_head_Pa > 45e3


def test_pump_curve_fitted_bending_upward_is_refused():
    # Found by the fuzz test: the demo bungalow's last point moved from 2 to
    # 4 m3/h. The least-squares quadratic through the points then bends upward
    # (a2 > 0), which no centrifugal pump does, and the flow solve found the
    # pump link without resistance ("link 'pump' has no flow resistance", no key).
    points = (
        "flow_m3_per_h = [0.0, 0.5, 1.0, 1.5, 4.0]\n"
        "head_kPa = [45.0, 42.0, 35.0, 24.0, 10.0]"
    )
    pattern = error_pattern(
        "pump.head_kPa",
        "the curve fitted through the points bends upward (a2 = ",
    )
    with pytest.raises(ScenarioError, match=pattern):
        resolve(house((PUMP_POINTS, points)))
