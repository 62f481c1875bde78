"""Heat pump runs: the capacity limit in time, electricity books, minimum flow.

The house (``heat_pump_house.py``) is two rooms on a heat pump small enough to
sit at its capacity while the rooms warm; runs are one hour.
"""

from __future__ import annotations

import numpy as np
import pytest
from heat_pump_house import CAPACITY_KW, COP, FLOW_C, OUTDOOR_C, house_text
from scipy.interpolate import RegularGridInterpolator

from simheat.dynamics.model import WATER_DENSITY_KG_M3
from simheat.dynamics.simulate import simulate
from simheat.dynamics.source import run_conditions, warn_outside_rating_of_run
from simheat.errors import RatingTableWarning
from simheat.runs.metrics import AT_LIMIT_FRACTION
from simheat.scenario import parse_scenario


def reference_rating(table_kW_or_cop, scale, outdoor_C, flow_C):
    """scipy's bilinear interpolation at clamped points (independent of ours)."""
    grid = RegularGridInterpolator((OUTDOOR_C, FLOW_C), np.array(table_kW_or_cop))
    points = np.column_stack(
        [
            np.clip(outdoor_C, OUTDOOR_C[0], OUTDOOR_C[-1]),
            np.clip(flow_C, FLOW_C[0], FLOW_C[-1]),
        ]
    )
    return scale * grid(points)


@pytest.fixture(scope="module")
def ramp_run():
    """Outdoor temperature ramping from -12 to +5 °C over the hour."""
    scenario = parse_scenario(house_text(outdoor_C=(-12.0, 5.0)), origin="ramp")
    return simulate(scenario)


def test_capacity_follows_the_table_as_outdoor_and_flow_change(ramp_run):
    run = ramp_run
    expected = reference_rating(CAPACITY_KW, 1e3, run.outdoor_temp_C, run.supply_temp_C)
    # Same bilinear formula, ours compiled and scipy's: round-off apart.
    np.testing.assert_allclose(run.source_capacity_W, expected, rtol=1e-10)
    # The ramp lifts the capacity: about 1.05 kW at -12 °C and 17 °C water
    # (the 35 °C column, held below the table), 1.52 kW at +5 °C and 44 °C.
    assert run.source_capacity_W[0] == pytest.approx(1043.75, rel=1e-9)
    assert run.source_capacity_W[-1] > 1.4 * run.source_capacity_W[0]


def test_a_source_at_its_capacity_gives_what_the_table_allows(ramp_run):
    run = ramp_run
    # Undersized on purpose: at its capacity the whole hour, the power rising
    # with the outdoor temperature as the table says.
    assert run.summary.source_at_limit == 1.0
    ratio = run.source_power_W / run.source_capacity_W
    # The smooth limit's corner (0.5 % of the largest capacity) leaves the power
    # a few watts below the capacity: within 1 % of it.
    assert np.all(ratio >= AT_LIMIT_FRACTION)
    assert np.all(ratio <= 1.0)
    assert np.all(np.diff(run.source_power_W) > 0.0)


def test_electricity_is_heat_over_cop_integrated(ramp_run):
    # Independent quadrature: heat at the output times over scipy's COP at the
    # outdoor and supply temperatures there, by the trapezoidal rule on the
    # 2-minute grid. The same rule on the heat itself gives its own error,
    # which bounds the grid's (both integrands are smooth and slowly varying:
    # the power at the capacity, the COP of the same table).
    run = ramp_run
    cop = reference_rating(COP, 1.0, run.outdoor_temp_C, run.supply_temp_C)
    electric_J = np.trapezoid(run.source_power_W / cop, run.time_s)
    heat_J = np.trapezoid(run.source_power_W, run.time_s)
    books = run.summary.energy
    grid_error = abs(heat_J / books.source_J - 1.0)
    assert grid_error < 1e-4
    assert electric_J == pytest.approx(books.electric_J, rel=2e-4)
    assert books.mean_cop == pytest.approx(books.source_J / books.electric_J)
    np.testing.assert_allclose(
        run.electric_power_W * cop, run.source_power_W, rtol=1e-10
    )


def test_heat_books_close_with_a_heat_pump_and_a_buffer():
    scenario = parse_scenario(house_text(buffer_L=30.0), origin="buffer")
    run = simulate(scenario)
    assert run.summary.energy.balance_error_pct < 0.05  # DESIGN.md's 0.5 %, tenfold
    # the buffer's water delays the supply: colder than without it early on
    plain = simulate(parse_scenario(house_text(), origin="plain"))
    early = run.time_s == 600.0
    assert run.supply_temp_C[early] < plain.supply_temp_C[early] - 0.5


def test_a_constant_cop_makes_electricity_exactly_heat_over_it():
    run = simulate(parse_scenario(house_text(cop=3.2), origin="cop"))
    books = run.summary.energy
    # Both counters integrate proportional integrands on the same steps.
    assert books.electric_J * 3.2 == pytest.approx(books.source_J, rel=1e-9)
    assert books.mean_cop == pytest.approx(3.2, rel=1e-9)


def test_below_its_minimum_flow_the_heat_pump_stops():
    # Minimum flow above what the pump gives through the house: the unit
    # never heats; the summary says how long the flow was too low.
    scenario = parse_scenario(house_text(min_flow_m3_per_h=0.5), origin="min")
    run = simulate(scenario)
    minimum_kg_s = 0.5 / 3600.0 * WATER_DENSITY_KG_M3
    assert np.all(run.source_flow_kg_s < 0.8 * minimum_kg_s)
    np.testing.assert_array_equal(run.source_power_W, 0.0)
    assert run.summary.source_below_min_flow == 1.0
    assert run.summary.source_at_limit == 0.0
    assert run.summary.energy.mean_cop is None


def test_run_conditions_and_the_warning_outside_the_table():
    scenario = parse_scenario(
        house_text(outdoor_C=(-20.0, 0.0), flow_temp_C=60.0), origin="outside"
    )
    assert run_conditions(scenario) == ((-20.0, 0.0), (60.0, 60.0))
    with pytest.warns(RatingTableWarning, match="down to -20 °C.*up to 60 °C"):
        assert warn_outside_rating_of_run(scenario)
