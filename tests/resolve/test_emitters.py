"""Emitter Kv from presets, body capacity and design flows, checked by hand."""

from __future__ import annotations

import pytest
from iapws import IAPWS95
from resolve_house import house

from simheat.resolve import resolve
from simheat.resolve.emitters import STEEL_CP_J_KG_K
from simheat.scenario.emitters import DEFAULT_STEEL_KG_PER_KW


def test_preset_between_table_rows_interpolates_the_kv():
    # preset 2.5 lies halfway between Kv 0.2 (preset 2) and 0.4 (preset 3)
    assert resolve(house()).emitters[0].kv_m3_h == pytest.approx(0.3, rel=1e-12)


def test_preset_on_a_table_row_takes_its_kv():
    assert resolve(house()).emitters[2].kv_m3_h == 0.4


def test_kv_given_directly_is_kept():
    assert resolve(house()).emitters[1].kv_m3_h == 0.3


def test_steel_specific_heat_is_the_handbook_value():
    # carbon steel near 20 °C: 0.48 kJ/(kg K) (engineering handbooks)
    assert STEEL_CP_J_KG_K == 480.0


def test_metal_capacity_is_mass_times_steel_specific_heat():
    emitters = resolve(house()).emitters
    assert emitters[1].metal_capacity_J_K == pytest.approx(20.0 * 480.0, rel=1e-12)
    # default body mass: 15 kg per kW of nominal output (trade figure), 1.2 kW
    assert DEFAULT_STEEL_KG_PER_KW == 15.0
    assert emitters[0].metal_capacity_J_K == pytest.approx(
        15.0 * 1.2 * 480.0, rel=1e-12
    )


def test_design_flows_carry_each_rooms_load_at_the_design_drop():
    # living 1550 W shared 1.2 : 0.8 kW -> 930 W and 620 W; bed 30 W/K * 28 K
    # = 840 W. m = Q / (cp dT) with cp of water at the mean design temperature
    # 70 - 15/2 = 62.5 °C from IAPWS-95 (0.2 MPa); our fit agrees within 2e-4.
    resolved = resolve(house())
    assert resolved.design_water_temp_C == 62.5
    cp = IAPWS95(T=62.5 + 273.15, P=0.2).cp * 1e3
    expected = [load / (cp * 15.0) for load in (930.0, 620.0, 840.0)]
    assert resolved.design_mass_flow_kg_s == pytest.approx(expected, rel=2e-4)


def test_design_flow_array_follows_the_emitter_records():
    resolved = resolve(house())
    assert resolved.design_mass_flow_kg_s.tolist() == [
        e.design_mass_flow_kg_s for e in resolved.emitters
    ]
