from simheat.hydraulics.layouts import FLOOR_CIRCUITS, SCHEMES
from simheat.schemes import BASE_SCHEMES, FLOOR_PUMPS_SUFFIX, SCHEME_NAMES


def test_scheme_names_match_the_layout_builders_in_order():
    assert tuple(SCHEMES) == SCHEME_NAMES


def test_every_base_scheme_has_a_floor_circuit_and_no_other():
    assert tuple(FLOOR_CIRCUITS) == BASE_SCHEMES


def test_every_base_scheme_has_its_floor_pumps_variant():
    bases = [n for n in SCHEME_NAMES if not n.endswith(FLOOR_PUMPS_SUFFIX)]
    assert {b + FLOOR_PUMPS_SUFFIX for b in bases} == {
        n for n in SCHEME_NAMES if n.endswith(FLOOR_PUMPS_SUFFIX)
    }
