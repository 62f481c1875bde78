"""Derived quantities of the balancing keys: series Kv, design flows, pump speed."""

from __future__ import annotations

import numpy as np
import pytest
from resolve_house import ORIGIN, TEXT

from simheat.errors import ScenarioError
from simheat.physics.pump import pump_pressure_rise_Pa
from simheat.resolve import resolve
from simheat.scenario import parse_scenario

LOCKSHIELD = """
[valve_types.ls]
presets = [0.5, 1, 2, 4]
kv_m3_per_h = [0.1, 0.25, 0.6, 1.2]
"""


def house(replace: tuple[str, str] = ("", ""), tail: str = ""):
    old, new = replace
    assert old in TEXT
    return parse_scenario(TEXT.replace(old, new, 1) + tail, origin=ORIGIN)


def test_lockshield_and_valve_act_in_series():
    # rad_living_a: preset 2.5 of trv (Kv 0.3, linear between 0.2 and 0.4) and a
    # lockshield at 1.5 turns (Kv 0.425, between 0.25 and 0.6): 1/Kv^2 adds
    scenario = house(
        (
            'preset = 2.5\nvalve_type = "trv"\n',
            'preset = 2.5\nvalve_type = "trv"\nlockshield_type = "ls"\n'
            "lockshield_turns = 1.5\n",
        ),
        LOCKSHIELD,
    )
    e = resolve(scenario).emitters[0]
    assert (e.valve_kv_m3_h, e.lockshield_kv_m3_h) == (
        pytest.approx(0.3, rel=1e-12),
        pytest.approx(0.425, rel=1e-12),
    )
    assert e.kv_m3_h == pytest.approx((0.3**-2 + 0.425**-2) ** -0.5, rel=1e-12)


def test_given_design_flow_overrides_the_room_share():
    base = resolve(house()).design_mass_flow_kg_s
    scenario = house(
        ("kv_m3_per_h = 0.3\n", "kv_m3_per_h = 0.3\ndesign_flow_kg_per_h = 50.0\n")
    )
    flows = resolve(scenario).design_mass_flow_kg_s
    assert flows[1] == pytest.approx(50.0 / 3600.0, rel=1e-15)
    # the other emitters keep their share of their room's load
    np.testing.assert_array_equal(flows[[0, 2]], base[[0, 2]])


def test_speed_setting_runs_the_pump_on_its_affinity_curve():
    full = resolve(house()).pump
    slowed = resolve(
        house(
            (
                "head_kPa = [30.0, 26.0, 16.0]\n",
                "head_kPa = [30.0, 26.0, 16.0]\nspeed = 0.7\n",
            )
        )
    ).pump
    assert slowed.full_speed_coeffs == full.coeffs
    m = np.linspace(0.0, 0.2, 5)
    at_speed, _ = pump_pressure_rise_Pa(m, *slowed.coeffs, 1.0, 60.0)
    reference, _ = pump_pressure_rise_Pa(m, *full.coeffs, 0.7, 60.0)
    np.testing.assert_allclose(at_speed, reference, rtol=1e-12)


def test_set_head_steps_must_lie_below_the_shut_off_head():
    regulated = (
        "head_kPa = [30.0, 26.0, 16.0]\n",
        'head_kPa = [30.0, 26.0, 16.0]\nmode = "constant_dp"\nsetpoint_kPa = 20.0\n'
        "setpoint_steps_kPa = [10.0, 31.0]\n",
    )
    with pytest.raises(ScenarioError, match=r"^pump\.setpoint_steps_kPa: every step"):
        resolve(house(regulated))
