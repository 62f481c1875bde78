"""``check``'s source section with a heat pump: its capacity at design conditions."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parents[2] / "dynamics"))
from heat_pump_house import house_text  # noqa: E402

from simheat.analysis.check.loads import room_loads  # noqa: E402
from simheat.analysis.check.source import source_check  # noqa: E402
from simheat.report.check import _source_text  # noqa: E402
from simheat.resolve import resolve  # noqa: E402
from simheat.scenario import parse_scenario  # noqa: E402


def test_heat_pump_capacity_is_read_at_design_conditions():
    # Design -5 °C outdoor, 50 °C supply. By hand from the test table: outdoor
    # -5 lies 2/9 of the way from -7 to 2 °C, flow 50 halfway from 45 to 55 °C:
    # at -7 °C (1.12 + 1.02) / 2 = 1.07 kW, at 2 °C (1.40 + 1.28) / 2 = 1.34 kW,
    # so 1.07 + 2/9 * 0.27 = 1.13 kW, against a design load of 1.3 kW.
    scenario = parse_scenario(house_text(), origin="hp")
    resolved = resolve(scenario)
    check = source_check(scenario, room_loads(scenario, resolved))
    assert check.max_power_W == pytest.approx(1130.0, rel=1e-12)
    assert check.design_point_C == (-5.0, 50.0)
    assert check.kind == "heat_pump"
    assert not check.enough
    data = {
        "source": {
            "max_power_kW": 1.13,
            "design_load_kW": 1.3,
            "design_load_plus_reheat_kW": 1.3,
            "margin_kW": -0.17,
            "enough": False,
            "at_limit_share": None,
            "capacity_at": {"outdoor_C": -5.0, "flow_C": 50.0},
        }
    }
    (line,) = _source_text(data)
    assert line.startswith("heat pump (capacity at -5 °C outdoor and 50 °C flow")
    assert "DOES NOT cover" in line


def test_capacity_is_read_at_the_flow_its_control_asks_not_the_design_supply():
    # The bundled retrofit: radiators sized for 75 °C (design supply), the heat
    # pump on a heating curve through 55 °C at the design -7 °C. Its table has
    # a point there: 6.9 kW. At 75 °C (beyond the table's 65 °C, held) it would
    # read 6.4 kW, a figure the unit never runs at.
    from simheat.scenario import load_scenario

    root = Path(__file__).resolve().parents[3]
    scenario = load_scenario(root / "scenarios" / "retrofit_heat_pump.toml")
    assert scenario.design.supply_temp_C == 75.0
    check = source_check(scenario, room_loads(scenario, resolve(scenario)))
    assert check.design_point_C == (-7.0, 55.0)
    assert check.max_power_W == pytest.approx(6900.0, rel=1e-12)
    assert check.outside_table is None


def test_a_flow_above_the_table_is_said_to_be_held_at_its_edge():
    # Fixed 60 °C flow against a table up to 55 °C: the 55 °C column is used,
    # at -5 °C by hand 1.02 + 2/9 * (1.28 - 1.02) = 1.0778 kW.
    scenario = parse_scenario(house_text(flow_temp_C=60.0), origin="hp")
    check = source_check(scenario, room_loads(scenario, resolve(scenario)))
    assert check.design_point_C == (-5.0, 60.0)
    assert check.max_power_W == pytest.approx(1020.0 + 2.0 / 9.0 * 260.0, rel=1e-12)
    assert check.outside_table == (
        "flow temperature up to 60 °C, above the table (35 to 55 °C)"
    )
