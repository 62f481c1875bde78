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
