"""A run that leaves the model's valid range stops, naming what and when."""

from __future__ import annotations

import re

import numpy as np
import pytest
from click.testing import CliRunner

from simheat.cli import main
from simheat.dynamics import ranges
from simheat.dynamics.model import build_model
from simheat.errors import ModelRangeError
from simheat.hydraulics import layouts
from simheat.scenario import parse_scenario

# Invented for this test: a 4 m2 box of 10 W/m2 in light construction, heated
# by a 3 kW radiator without a thermostatic head from 95 °C water. Every input
# is within its bound, but the box passes 60 °C within two hours.
OVERHEATED = """
name = "Overheated box"
schemes = ["direct_return"]

[design]
outdoor_temp_C = -5.0
supply_temp_C = 95.0
temperature_drop_K = 10.0

[source]
max_power_kW = 4.0
flow_temp_C = 95.0

[pump]
flow_m3_per_h = [0.0, 0.3, 0.6]
head_kPa = [20.0, 17.0, 9.0]

[simulation]
duration_h = 3.0
output_step_min = 5.0
initial_room_temp_C = 16.0
initial_water_temp_C = 16.0

[[rooms]]
id = "front"
floor_area_m2 = 12.0
design_heat_load_W = 700
setpoint_C = 20.0

[[rooms]]
id = "back"
floor_area_m2 = 4.0
design_heat_load_W = 40
setpoint_C = 20.0
mass_class = "very_light"

[[emitters]]
id = "front_rad"
room = "front"
nominal_power_kW = 1.4
kv_m3_per_h = 0.5

[[emitters]]
id = "back_rad"
room = "back"
thermostatic_head = false
nominal_power_kW = 3.0
kv_m3_per_h = 0.5

[route]
header_pipe = "cu_15x1"
branch_pipe = "cu_10x1"
feed_length_m = 2.0

[[route.floors]]
floor = 0
tees = [
  { emitter = "front_rad", header_length_m = 3.0, branch_length_m = 0.5 },
  { emitter = "back_rad", header_length_m = 6.0, branch_length_m = 0.5 },
]
"""


def test_overheated_room_stops_the_run_with_what_and_when(tmp_path):
    path = tmp_path / "hot.toml"
    path.write_text(OVERHEATED)
    result = CliRunner().invoke(
        main, ["run", str(path), "--out", str(tmp_path / "o"), "--json"]
    )
    assert result.exit_code == 1, result.output
    assert result.stderr.count("\n") == 1
    assert re.match(
        r"^error: room air of rooms\[1\] \(back\) reached 60\.0 °C \(above 60 °C\) "
        r"at 1\.\d\d h \(0[67]:\d\d\): outside the range the model holds",
        result.stderr,
    ), result.stderr
    assert list((tmp_path / "o").iterdir()) == []  # no files for a failed run


def test_range_events_measure_the_margin_to_each_limit():
    scenario = parse_scenario(OVERHEATED)
    model = build_model(scenario, layouts.build(scenario, "direct_return"))
    slices = model.slices()
    y = np.full(model.n_states, 20.0)
    water, air, structure = ranges.range_events(slices)
    assert water(0.0, y) == pytest.approx(20.0)  # 20 °C is 20 K above freezing
    y[slices["cells"].start] = 97.0
    assert water(0.0, y) == pytest.approx(3.0)  # 3 K below boiling
    y[slices["air"].start + 1] = 61.0
    assert air(0.0, y) == pytest.approx(-1.0)  # past the 60 °C limit
    assert structure(0.0, y) == pytest.approx(40.0)
    assert all(e.terminal and e.direction == -1.0 for e in (water, air, structure))
    error = ranges.out_of_range_error(
        1,
        5400.0,
        y,
        slices,
        {"air": ["rooms[0] (front)", "rooms[1] (back)"]},
        5 * 3600.0,
    )
    assert isinstance(error, ModelRangeError)
    assert str(error).startswith(
        "room air of rooms[1] (back) reached 61.0 °C (above 60 °C) at 1.50 h (06:30)"
    )
