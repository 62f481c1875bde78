"""A small invented test house for the dynamics tests, built from TOML text."""

from __future__ import annotations

import importlib.util
import sys
from pathlib import Path

import pytest

from simheat.scenario import parse_scenario

# Two rooms, two radiators on one copper run. Invented for tests. The [source] and
# [pump] tables and the emitters' extra keys are filled in by ``small_house``.
_HOUSE = """
name = "Small test house"
schemes = ["direct_return"]

[design]
outdoor_temp_C = -5.0
supply_temp_C = 60.0
temperature_drop_K = 10.0

[source]
max_power_kW = {power_kW}
{source}

[pump]
flow_m3_per_h = [0.0, 0.3, 0.6]
head_kPa = [20.0, 17.0, 9.0]
{pump}

[weather]
{weather}

[simulation]
duration_h = {hours}
output_step_min = 5.0
initial_room_temp_C = 16.0
initial_water_temp_C = 16.0

[[rooms]]
id = "front"
floor_area_m2 = 12.0
design_heat_load_W = 700
setpoint_C = {front_setpoint_C}

[[rooms]]
id = "back"
floor_area_m2 = 10.0
design_heat_load_W = 600
setpoint_C = 20.0

[[emitters]]
id = "front_rad"
room = "front"
nominal_power_kW = 1.4
kv_m3_per_h = 0.5
{emitter}

[[emitters]]
id = "back_rad"
room = "back"
nominal_power_kW = 1.2
kv_m3_per_h = 0.5
{emitter}

[route]
header_pipe = "cu_15x1"
branch_pipe = "cu_10x1"
feed_length_m = 2.0
{route}

[[route.floors]]
floor = 0
tees = [
  {{ emitter = "front_rad", header_length_m = 3.0, branch_length_m = 0.5 }},
  {{ emitter = "back_rad", header_length_m = 6.0, branch_length_m = 0.5 }},
]
"""


def small_house_text(
    *,
    source: str = "flow_temp_C = 60.0",
    pump: str = "",
    weather: str = "outdoor_temp_C = -5.0",
    emitter: str = "",
    hours: float = 1.0,
    power_kW: float = 4.0,
    front_setpoint_C: float = 20.0,
    route: str = "",
) -> str:
    """TOML text of the small test house with the given table contents."""
    return _HOUSE.format(
        source=source,
        pump=pump,
        weather=weather,
        emitter=emitter,
        hours=hours,
        power_kW=power_kW,
        front_setpoint_C=front_setpoint_C,
        route=route,
    )


@pytest.fixture
def small_house():
    """Factory: ``small_house(**parts)`` returns the parsed small test house."""

    def make(**parts):
        return parse_scenario(small_house_text(**parts), origin="small.toml")

    return make


BASELINE_DYNAMICS = (
    Path(__file__).resolve().parents[2] / "benchmarks" / "baseline_dynamics.py"
)


@pytest.fixture(scope="session")
def numpy_reference():
    """benchmarks/baseline_dynamics.py: the warm-up right-hand side in numpy.

    An independent reference for the compiled right-hand side: its own link
    laws and flow solve (numpy, scipy.sparse), head law, emitter law, mixing,
    transport and room balances; it shares only the model's arrays and the
    schedule segments of a WarmUpModel.
    """
    name = "baseline_dynamics"
    if name not in sys.modules:
        spec = importlib.util.spec_from_file_location(name, BASELINE_DYNAMICS)
        module = importlib.util.module_from_spec(spec)
        sys.modules[name] = module  # dataclasses look their module up there
        spec.loader.exec_module(module)
    return sys.modules[name]
