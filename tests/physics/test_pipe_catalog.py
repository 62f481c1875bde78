"""Pipe catalog: consistent dimensions and the published sizes it lists."""

import re

import pytest

from simheat.errors import ScenarioError
from simheat.physics.pipe_catalog import PIPE_CATALOG, PipeType, pipe_type


@pytest.mark.parametrize("name", sorted(PIPE_CATALOG))
def test_bore_is_outer_diameter_minus_two_walls(name):
    p = PIPE_CATALOG[name]
    assert p.inner_diameter_m == pytest.approx(
        p.outer_diameter_m - 2 * p.wall_m, abs=1e-12
    )


@pytest.mark.parametrize(
    "name", [n for n in sorted(PIPE_CATALOG) if not n.startswith("steel_")]
)
def test_name_states_outer_diameter_and_wall(name):
    # Naming rule <material>_<outer mm>x<wall mm> for tube sold by outer size.
    outer_mm, wall_mm = map(
        float, re.fullmatch(r"[a-z]+_([\d.]+)x([\d.]+)", name).groups()
    )
    p = PIPE_CATALOG[name]
    assert p.outer_diameter_m == pytest.approx(outer_mm * 1e-3, abs=1e-12)
    assert p.wall_m == pytest.approx(wall_mm * 1e-3, abs=1e-12)


@pytest.mark.parametrize(
    ("name", "outer_mm", "wall_mm"),
    [
        # EN 10255 medium series (from memory of the standard's table).
        ("steel_dn15", 21.3, 2.6),
        ("steel_dn20", 26.9, 2.6),
        ("steel_dn25", 33.7, 3.2),
        ("steel_dn32", 42.4, 3.2),
    ],
)
def test_steel_tube_has_en10255_medium_series_size(name, outer_mm, wall_mm):
    p = PIPE_CATALOG[name]
    assert p.outer_diameter_m == pytest.approx(outer_mm * 1e-3, abs=1e-12)
    assert p.wall_m == pytest.approx(wall_mm * 1e-3, abs=1e-12)
    assert p.standard.startswith("EN 10255")


@pytest.mark.parametrize(
    ("name", "bore_mm"),
    [
        ("cu_15x1", 13.0),  # EN 1057 (from memory)
        ("cu_22x1", 20.0),  # EN 1057 (from memory)
        ("cu_35x1.2", 32.6),  # EN 1057 (from memory)
        ("pex_16x2", 12.0),  # EN ISO 15875-2 (from memory)
        ("pex_25x2.3", 20.4),  # EN ISO 15875-2 (from memory)
        ("mlc_26x3", 20.0),  # common multilayer series (from memory)
        ("steel_dn20", 21.7),  # EN 10255 medium (from memory)
    ],
)
def test_listed_bores(name, bore_mm):
    assert pipe_type(name).inner_diameter_m == pytest.approx(bore_mm * 1e-3, abs=1e-12)


@pytest.mark.parametrize(
    ("prefix", "roughness_mm"),
    [
        ("cu_", 0.0015),  # drawn tubing, Moody (1944) (from memory)
        ("pex_", 0.007),  # plastic tube, trade practice (from memory)
        ("mlc_", 0.007),  # plastic bore, trade practice (from memory)
        ("steel_", 0.045),  # commercial steel, Moody (1944) (from memory)
    ],
)
def test_roughness_by_material(prefix, roughness_mm):
    entries = [p for n, p in PIPE_CATALOG.items() if n.startswith(prefix)]
    assert entries
    for p in entries:
        assert p.roughness_m == pytest.approx(roughness_mm * 1e-3, abs=1e-15)


@pytest.mark.parametrize(
    "name",
    [
        "cu_15x1", "cu_18x1", "cu_22x1", "cu_28x1", "cu_35x1.2",
        "pex_16x2", "pex_20x2", "pex_25x2.3",
        "mlc_16x2", "mlc_20x2", "mlc_26x3", "mlc_32x3",
        "steel_dn15", "steel_dn20", "steel_dn25", "steel_dn32",
    ],
)  # fmt: skip
def test_catalog_holds_the_common_heating_sizes(name):
    p = pipe_type(name)
    assert isinstance(p, PipeType)
    assert p.name == name


def test_unknown_pipe_type_raises_and_lists_known_names():
    with pytest.raises(ScenarioError, match=r"unknown pipe type 'cu_16x1'.*cu_15x1"):
        pipe_type("cu_16x1")


def test_pipe_types_are_immutable():
    with pytest.raises(AttributeError):
        pipe_type("cu_15x1").wall_m = 0.002
