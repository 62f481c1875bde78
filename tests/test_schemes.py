import pytest

from simheat.errors import ScenarioError
from simheat.hydraulics.layouts import FLOOR_CIRCUITS, HOUSE_LAYOUTS, SCHEMES, describe
from simheat.schemes import (
    BASE_SCHEMES,
    FLOOR_PUMPS_SUFFIX,
    HOUSE_SCHEMES,
    SCHEME_NAMES,
)


def test_scheme_names_match_the_layout_builders_in_order():
    assert tuple(SCHEMES) == SCHEME_NAMES


def test_every_base_scheme_has_a_floor_circuit_and_no_other():
    assert tuple(FLOOR_CIRCUITS) == BASE_SCHEMES


def test_every_house_scheme_has_a_builder_and_no_other():
    assert tuple(HOUSE_LAYOUTS) == HOUSE_SCHEMES


def test_every_base_scheme_has_its_floor_pumps_variant():
    bases = [n for n in SCHEME_NAMES if n in BASE_SCHEMES]
    assert {b + FLOOR_PUMPS_SUFFIX for b in bases} == {
        n for n in SCHEME_NAMES if n.endswith(FLOOR_PUMPS_SUFFIX)
    }


@pytest.mark.parametrize("name", HOUSE_SCHEMES)
def test_house_schemes_have_no_floor_pumps_variant(name):
    assert name + FLOOR_PUMPS_SUFFIX not in SCHEME_NAMES
    with pytest.raises(
        ScenarioError,
        match=f"^scheme: scheme '{name}{FLOOR_PUMPS_SUFFIX}' does not exist: "
        f"'{name}' joins the floors in its own risers",
    ):
        describe(None, name + FLOOR_PUMPS_SUFFIX)
