"""Room capacities and the air-structure coupling against ISO 13790:2008."""

from __future__ import annotations

import pytest
from resolve_house import house

from simheat.resolve import resolve

# Volumetric heat capacity of air at 20 °C: 1.204 kg/m3 * 1006 J/(kg K)
# (engineering tables); furnishings 10 kJ/(m2 K) lumped with the air (common
# modelling practice, from memory of ISO 52016-1). [J/(m3 K)], [J/(m2 K)]
AIR_J_M3_K = 1.204 * 1006.0
FURNISHING_J_M2_K = 10e3


def series(a: float, b: float) -> float:
    return a * b / (a + b)


def test_medium_room_takes_iso_13790_table_12_values():
    # living: 20 m2, medium class, default 2.5 m height. ISO 13790:2008 Table 12
    # (from memory of the standard): kappa_m = 165 kJ/(m2 K), A_m = 2.5 A_f;
    # H_is = 3.45 * 4.5 A_f (eqs. 9-10), H_ms = 9.1 A_m (eq. 64), in series.
    living = resolve(house()).rooms[0]
    assert living.structure_capacity_J_K == pytest.approx(165e3 * 20.0, rel=1e-12)
    assert living.air_capacity_J_K == pytest.approx(
        AIR_J_M3_K * 20.0 * 2.5 + FURNISHING_J_M2_K * 20.0, rel=1e-12
    )
    assert living.air_structure_conductance_W_K == pytest.approx(
        series(3.45 * 4.5 * 20.0, 9.1 * 2.5 * 20.0), rel=1e-12
    )


def test_heavy_room_takes_its_own_class_and_height():
    # bed: 12 m2, heavy, 2.4 m. Table 12: 260 kJ/(m2 K), A_m = 3.0 A_f.
    bed = resolve(house()).rooms[1]
    assert bed.structure_capacity_J_K == pytest.approx(260e3 * 12.0, rel=1e-12)
    assert bed.air_capacity_J_K == pytest.approx(
        AIR_J_M3_K * 12.0 * 2.4 + FURNISHING_J_M2_K * 12.0, rel=1e-12
    )
    assert bed.air_structure_conductance_W_K == pytest.approx(
        series(3.45 * 4.5 * 12.0, 9.1 * 3.0 * 12.0), rel=1e-12
    )


def test_given_capacities_replace_the_derived_ones_but_not_the_coupling():
    scenario = house(
        (
            'mass_class = "heavy"',
            'mass_class = "heavy"\nair_capacity_kJ_per_K = 300.0\n'
            "structure_capacity_kJ_per_K = 4000.0",
        )
    )
    bed = resolve(scenario).rooms[1]
    assert (bed.air_capacity_J_K, bed.structure_capacity_J_K) == (3e5, 4e6)
    # the coupling still follows the floor area and the heavy class
    assert bed.air_structure_conductance_W_K == pytest.approx(
        series(3.45 * 4.5 * 12.0, 9.1 * 3.0 * 12.0), rel=1e-12
    )
