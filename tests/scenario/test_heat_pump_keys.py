"""``[source] kind = "heat_pump"`` and ``[source.heat_pump]``: reading and errors."""

from __future__ import annotations

import numpy as np
import pytest
from test_load import _DELETE, error_pattern, parse

HEAT_PUMP = {
    "outdoor_temp_C": [-10.0, 2.0, 7.0],
    "flow_temp_C": [35.0, 55.0],
    "capacity_kW": [[5.0, 4.4], [6.5, 6.0], [7.5, 7.0]],
    "cop": [[2.6, 1.9], [3.5, 2.5], [4.3, 3.0]],
    "min_flow_m3_per_h": 0.5,
    "buffer_volume_L": 40.0,
}


def heat_pump_edits(**changes):
    table = dict(HEAT_PUMP)
    for key, value in changes.items():
        if value is _DELETE:
            del table[key]
        else:
            table[key] = value
    return (
        (("source", "kind"), "heat_pump"),
        (("source", "max_power_kW"), _DELETE),
        (("source", "heat_pump"), table),
    )


def test_heat_pump_is_read_in_si():
    source = parse(*heat_pump_edits()).source
    hp = source.heat_pump
    assert source.kind == "heat_pump"
    np.testing.assert_array_equal(hp.capacity_W[1], [6500.0, 6000.0])
    np.testing.assert_array_equal(hp.cop[:, 0], [2.6, 3.5, 4.3])
    assert hp.min_flow_m3_s == pytest.approx(0.5 / 3600.0, rel=1e-15)
    assert hp.buffer_volume_m3 == pytest.approx(0.04, rel=1e-15)
    assert source.buffer_volume_m3 == hp.buffer_volume_m3
    assert source.max_power_W == 7500.0  # the table's largest capacity


def test_the_boiler_stays_the_default():
    source = parse().source
    assert source.kind == "boiler"
    assert source.heat_pump is None
    assert source.buffer_volume_m3 == 0.0


def test_optional_keys_default_to_none():
    hp = parse(
        *heat_pump_edits(min_flow_m3_per_h=_DELETE, buffer_volume_L=_DELETE)
    ).source.heat_pump
    assert hp.min_flow_m3_s == 0.0
    assert hp.buffer_volume_m3 == 0.0


@pytest.mark.parametrize(
    ("changes", "path", "problem"),
    [
        (
            {"cop": [[2.6, 1.9], [3.5, 0.0], [4.3, 3.0]]},
            "source.heat_pump.cop[1][1]",
            "must be > 0, got 0",
        ),
        (
            {"cop": [[2.6, 1.9], [3.5, -2.5], [4.3, 3.0]]},
            "source.heat_pump.cop[1][1]",
            "must be > 0, got -2.5",
        ),
        (
            {"outdoor_temp_C": [-10.0, 7.0, 2.0]},
            "source.heat_pump.outdoor_temp_C",
            "must be strictly increasing",
        ),
        (
            {"flow_temp_C": [55.0, 55.0]},
            "source.heat_pump.flow_temp_C",
            "must be strictly increasing",
        ),
        (
            {"flow_temp_C": [45.0]},
            "source.heat_pump.flow_temp_C",
            "must be a list of at least 2 numbers",
        ),
        (
            {"capacity_kW": [[5.0, 4.4], [6.5, 6.0]]},
            "source.heat_pump.capacity_kW",
            "must have one row per outdoor temperature (3), got 2",
        ),
        (
            {"cop": [[2.6, 1.9], [3.5], [4.3, 3.0]]},
            "source.heat_pump.cop[1]",
            "must have one value per flow temperature (2), got 1",
        ),
        (
            {"capacity_kW": [5.0, 6.5, 7.5]},
            "source.heat_pump.capacity_kW",
            "must be a list of rows",
        ),
        (
            {"capacity_kW": [[5.0, 4.4], [6.5, "6"], [7.5, 7.0]]},
            "source.heat_pump.capacity_kW[1][1]",
            "must be a number, got '6'",
        ),
        (
            {"cop": [[2.6, 1.9], [3.5, 2.5], [12.0, 3.0]]},
            "source.heat_pump.cop[2][0]",
            "12 is above the Carnot COP 11 of outdoor 7 °C and flow 35 °C",
        ),
        (
            {"min_flow_m3_per_h": -0.1},
            "source.heat_pump.min_flow_m3_per_h",
            "must be >= 0, got -0.1",
        ),
        (
            {"flow_temp_C": [35.0, 120.0]},
            "source.heat_pump.flow_temp_C",
            "values must lie within 20 to 95",
        ),
        ({"capacity_kW": _DELETE}, "source.heat_pump.capacity_kW", "required key"),
        ({"defrost": True}, "source.heat_pump.defrost", "unknown key"),
    ],
)
def test_bad_tables_name_the_field(changes, path, problem):
    with pytest.raises(ValueError, match=error_pattern(path, problem)):
        parse(*heat_pump_edits(**changes))


def test_a_heat_pump_takes_no_power_limit():
    edits = heat_pump_edits()[:1] + heat_pump_edits()[2:]  # keep max_power_kW
    with pytest.raises(
        ValueError, match=error_pattern("source.max_power_kW", "not used with kind")
    ):
        parse(*edits)


def test_a_heat_pump_needs_its_table():
    edits = heat_pump_edits()[:2]
    with pytest.raises(
        ValueError, match=error_pattern("source.heat_pump", "required table")
    ):
        parse(*edits)


def test_a_boiler_takes_no_heat_pump_table():
    with pytest.raises(
        ValueError, match=error_pattern("source.heat_pump", "applies only to kind")
    ):
        parse((("source", "heat_pump"), HEAT_PUMP))


def test_an_unknown_kind_is_refused():
    with pytest.raises(
        ValueError, match=error_pattern("source.kind", "must be one of boiler")
    ):
        parse((("source", "kind"), "stove"))
