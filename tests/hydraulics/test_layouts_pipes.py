"""Pipe sizes from the catalog within the velocity and gradient limits."""

from __future__ import annotations

import math

import fluids
import numpy as np
import pytest
from iapws import IAPWS95

from simheat.hydraulics.layouts.pipes import (
    BRANCH_VELOCITY_MAX_M_S,
    GRADIENT_MAX_PA_M,
    HEADER_VELOCITY_MAX_M_S,
    choose_pipe,
    friction_gradient_Pa_m,
    pipe_series,
    velocity_m_s,
)
from simheat.physics.pipe_catalog import PIPE_CATALOG
from simheat.scenario.model import PipeSpec, SizingLimits

LIMITS = SizingLimits()


def test_stated_limits_are_the_trade_figures():
    # Common trade practice for dwellings (from memory): 0.7 m/s headers,
    # 0.5 m/s branches, 150 Pa/m.
    assert (HEADER_VELOCITY_MAX_M_S, BRANCH_VELOCITY_MAX_M_S, GRADIENT_MAX_PA_M) == (
        0.7,
        0.5,
        150.0,
    )
    assert (
        LIMITS.header_velocity_max_m_s,
        LIMITS.branch_velocity_max_m_s,
        LIMITS.gradient_max_Pa_m,
    ) == (0.7, 0.5, 150.0)


def test_velocity_against_iapws_density():
    # v = m / (rho A) with rho from IAPWS-95 at 60 °C, 0.2 MPa; our density fit
    # agrees with IAPWS-95 within 0.01 %.
    rho = IAPWS95(T=333.15, P=0.2).rho
    expected = 0.1 / (rho * math.pi / 4 * 0.02**2)
    assert velocity_m_s(0.1, 0.02, 60.0) == pytest.approx(expected, rel=1e-4)


@pytest.mark.parametrize("flow_kg_h", [300.0, 900.0])
def test_gradient_against_fluids_colebrook(flow_kg_h):
    # Darcy-Weisbach with the Colebrook friction factor of the `fluids` package;
    # the water properties of the two differ by under 0.5 % (IAPWS-95 fit).
    d, eps, temp = 0.020, 1.5e-6, 60.0
    water = IAPWS95(T=temp + 273.15, P=0.2)
    m = flow_kg_h / 3600.0
    v = m / (water.rho * math.pi / 4 * d**2)
    re = water.rho * v * d / water.mu
    f = fluids.friction.Colebrook(re, eps / d)
    expected = f / d * water.rho * v**2 / 2
    assert friction_gradient_Pa_m(m, d, eps, temp) == pytest.approx(expected, rel=5e-3)


@pytest.mark.parametrize("series", ["cu_15x1", "pex_16x2", "mlc_16x2", "steel_dn15"])
def test_series_is_the_catalog_prefix_sorted_by_bore(series):
    sizes = pipe_series(series)
    prefix = series.split("_")[0] + "_"
    assert {p.name for p in sizes} == {k for k in PIPE_CATALOG if k.startswith(prefix)}
    assert np.all(np.diff([p.inner_diameter_m for p in sizes]) > 0)


@pytest.mark.parametrize("rule", ["header", "branch"])
@pytest.mark.parametrize("flow_kg_h", [50.0, 150.0, 400.0, 900.0])
@pytest.mark.parametrize("series", ["cu_15x1", "pex_16x2"])
def test_chosen_size_is_the_smallest_within_the_limits(series, flow_kg_h, rule):
    given = PIPE_CATALOG[series]
    spec = PipeSpec(
        given.name, given.inner_diameter_m, given.roughness_m, given.outer_diameter_m
    )
    m, temp = flow_kg_h / 3600.0, 60.0
    v_max = (
        LIMITS.branch_velocity_max_m_s
        if rule == "branch"
        else LIMITS.header_velocity_max_m_s
    )
    chosen = choose_pipe(m, spec, rule, LIMITS, temp)
    catalog = PIPE_CATALOG[chosen.name]
    # Catalog dimensions, unchanged.
    assert (chosen.inner_diameter_m, chosen.outer_diameter_m, chosen.roughness_m) == (
        catalog.inner_diameter_m,
        catalog.outer_diameter_m,
        catalog.roughness_m,
    )
    assert velocity_m_s(m, chosen.inner_diameter_m, temp) <= v_max
    assert (
        friction_gradient_Pa_m(m, chosen.inner_diameter_m, chosen.roughness_m, temp)
        <= 150.0
    )
    sizes = pipe_series(series)
    smaller = [p for p in sizes if p.inner_diameter_m < chosen.inner_diameter_m]
    if smaller:
        p = smaller[-1]
        assert (
            velocity_m_s(m, p.inner_diameter_m, temp) > v_max
            or friction_gradient_Pa_m(m, p.inner_diameter_m, p.roughness_m, temp)
            > 150.0
        )


def test_custom_pipe_is_kept():
    custom = PipeSpec("custom", 0.011, 1e-5, 0.013)
    assert choose_pipe(1.0, custom, "header", LIMITS, 60.0) is custom
