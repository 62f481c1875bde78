"""Design figures of a layout: index circuit, pump duty, runs over the limits."""

from __future__ import annotations

from pathlib import Path

import pytest

from simheat.hydraulics import layouts
from simheat.hydraulics.sizing import design_figures
from simheat.hydraulics.solver import solve_flows
from simheat.physics._kernels import pump_pressure_rise_Pa
from simheat.physics.pipe_catalog import PIPE_CATALOG
from simheat.physics.water import specific_heat_J_kg_K
from simheat.resolve import resolve
from simheat.scenario import load_scenario, parse_scenario

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"
TINY = (Path(__file__).parent / "data_one_pipe_tiny.toml").read_text()

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
    rise, _ = pump_pressure_rise_Pa(m, *resolve(scenario).pump.coeffs, 1.0, temp)
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
