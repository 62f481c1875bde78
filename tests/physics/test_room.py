import pytest

from simheat.physics import room


@pytest.mark.parametrize(
    ("mass_class", "kappa_kJ_m2_K"),
    [
        ("very_light", 80),
        ("light", 110),
        ("medium", 165),
        ("heavy", 260),
        ("very_heavy", 370),
    ],
)
def test_structure_capacity_per_area_is_iso_13790_table_12(mass_class, kappa_kJ_m2_K):
    # ISO 13790:2008 Table 12 (values from memory of the standard)
    assert room.structure_capacity_J_K(10.0, mass_class) == pytest.approx(
        kappa_kJ_m2_K * 1e4, rel=1e-12
    )


def test_air_structure_coupling_is_series_of_iso_13790_coefficients():
    # ISO 13790:2008 eqs. (9), (64): H_is = 3.45 * 4.5 A_f, H_ms = 9.1 * A_m,
    # A_m = 3.0 A_f
    # for "heavy"; the two-node model merges them in series.
    area = 20.0
    h_is = 3.45 * 4.5 * area
    h_ms = 9.1 * 3.0 * area
    expected = h_is * h_ms / (h_is + h_ms)
    assert room.air_structure_conductance_W_K(area, "heavy") == pytest.approx(expected)


def test_air_capacity_counts_air_and_furnishings():
    # Air: 1.204 kg/m3 * 1006 J/(kg K) at 20 °C (engineering tables);
    # furnishings 10 kJ/(m2 K)
    area, height = 15.0, 2.4
    expected = 1.204 * 1006.0 * area * height + 10e3 * area
    assert room.air_capacity_J_K(area, height) == pytest.approx(expected)
