"""Pipe sizing against the catalog and the limits; design figures of a layout."""

from __future__ import annotations

import math
from pathlib import Path

import fluids
import numpy as np
import pytest
from iapws import IAPWS95

from simheat.hydraulics import layouts
from simheat.hydraulics.sizing import (
    BRANCH_VELOCITY_MAX_M_S,
    GRADIENT_MAX_PA_M,
    HEADER_VELOCITY_MAX_M_S,
    choose_pipe,
    design_figures,
    friction_gradient_Pa_m,
    pipe_series,
    velocity_m_s,
)
from simheat.hydraulics.solver import solve_flows
from simheat.physics._kernels import pump_pressure_rise_Pa
from simheat.physics.pipe_catalog import PIPE_CATALOG
from simheat.physics.water import specific_heat_J_kg_K
from simheat.scenario import load_scenario, parse_scenario
from simheat.scenario.model import SizingLimits

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"
TINY = (Path(__file__).parent / "data_one_pipe_tiny.toml").read_text()
LIMITS = SizingLimits()

# An invented one-room, one-radiator house on a direct-return run.
ONE_EMITTER = """
name = "One radiator"
[design]
outdoor_temp_C = -5.0
supply_temp_C = 60.0
temperature_drop_K = 12.0
[source]
max_power_kW = 3.0
flow_temp_C = 60.0
[pump]
flow_m3_per_h = [0.0, 0.3, 0.6]
head_kPa = [25.0, 21.0, 10.0]
[[rooms]]
id = "a"
floor_area_m2 = 10.0
design_heat_load_W = 600
setpoint_C = 20.0
[[emitters]]
id = "rad_a"
room = "a"
nominal_power_kW = 1.0
kv_m3_per_h = 0.4
[route]
header_pipe = "cu_15x1"
branch_pipe = "cu_12x1"
feed_length_m = 2.0
[[route.floors]]
floor = 0
tees = [{ emitter = "rad_a", header_length_m = 5.0, branch_length_m = 0.5 }]
"""


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
    from simheat.scenario.model import PipeSpec

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
    from simheat.scenario.model import PipeSpec

    custom = PipeSpec("custom", 0.011, 1e-5, 0.013)
    assert choose_pipe(1.0, custom, "header", LIMITS, 60.0) is custom


@pytest.mark.parametrize("scheme", sorted(layouts.SCHEMES))
def test_auto_sizing_keeps_every_run_within_the_limits(scheme):
    text = (
        SCENARIOS / "bungalow.toml"
    ).read_text() + '\n[layout.sizing]\nmode = "auto"\n'
    built = layouts.describe(parse_scenario(text), scheme)
    figures = design_figures(built)
    assert figures.over_limit == ()
    for spec in built.links:
        if spec.pipe is not None and spec.sized and spec.length_m > 0:
            assert spec.pipe.name in PIPE_CATALOG


def test_given_sizes_flag_runs_over_the_limits():
    # The two-storey upper floor runs 15 mm copper headers: at its 184 kg/h
    # design flow the gradient is about 170 Pa/m, above 150 Pa/m.
    built = layouts.describe(
        load_scenario(SCENARIOS / "two_storey.toml"), "direct_return"
    )
    names = {name for name, _, _ in design_figures(built).over_limit}
    assert "header:supply:bath" in names


def test_index_need_equals_the_pump_rise_of_a_single_loop():
    # Kirchhoff's loop law: in a one-emitter house the pump's rise at its
    # operating point equals the loop's pressure drop at that flow. Set the
    # room's design load so the design flow is that operating flow; the index
    # circuit's need must then equal the pump rise (1e-6 relative).
    text = ONE_EMITTER
    scenario = parse_scenario(text)
    net = layouts.build(scenario, "direct_return")
    d = scenario.design
    temp = d.supply_temp_C - 0.5 * d.temperature_drop_K
    m = solve_flows(net, water_temp_C=temp).mass_flow_kg_s[net.emitter_links()[0]]
    load_W = m * float(specific_heat_J_kg_K(temp)) * d.temperature_drop_K
    scenario = parse_scenario(
        text.replace("design_heat_load_W = 600", f"design_heat_load_W = {load_W:.17g}")
    )
    figures = design_figures(layouts.describe(scenario, "direct_return"))
    rise, _ = pump_pressure_rise_Pa(m, *scenario.pump.coeffs, 1.0, temp)
    assert figures.index_pressure_drop_kPa * 1e3 == pytest.approx(rise, rel=1e-6)
    assert figures.pumps[0].head_kPa == pytest.approx(figures.index_pressure_drop_kPa)


@pytest.mark.parametrize("scheme", sorted(layouts.SCHEMES))
def test_index_emitter_has_the_largest_need(scheme):
    built = layouts.describe(load_scenario(SCENARIOS / "two_storey.toml"), scheme)
    figures = design_figures(built)
    needs = figures.emitter_need_kPa
    # Largest need, ties within round-off (1e-9 relative) allowed: on a one-pipe
    # loop every emitter's circuit is the whole loop.
    assert needs[figures.index_emitter] >= max(needs.values()) * (1 - 1e-9)
    assert max(p.head_kPa for p in figures.pumps) == pytest.approx(
        figures.index_pressure_drop_kPa
    )


@pytest.mark.parametrize("scheme", sorted(layouts.SCHEMES))
def test_water_volume_and_pipe_length_add_up(scheme):
    built = layouts.describe(load_scenario(SCENARIOS / "bungalow.toml"), scheme)
    figures = design_figures(built)
    net = built.network
    assert figures.water_volume_L == pytest.approx(1e3 * net.water_volume_m3.sum())
    piped = [s for s in built.links if s.pipe is not None and s.role != "source"]
    assert sum(figures.pipe_length_m.values()) == pytest.approx(
        sum(s.length_m for s in piped)
    )
