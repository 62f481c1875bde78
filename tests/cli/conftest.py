import pytest

# A two-room, two-radiator house, one hour: small enough for end-to-end CLI tests.
# Invented for tests.
TINY_HOUSE = """
name = "Tiny test house"
schemes = ["direct_return", "reverse_return"]

[design]
outdoor_temp_C = -5.0
supply_temp_C = 60.0
temperature_drop_K = 10.0

[source]
max_power_kW = 4.0
flow_temp_C = 60.0

[pump]
flow_m3_per_h = [0.0, 0.3, 0.6]
head_kPa = [20.0, 17.0, 9.0]

[simulation]
duration_h = 1.0
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
floor_area_m2 = 10.0
design_heat_load_W = 600
setpoint_C = 20.0

[[emitters]]
id = "front_rad"
room = "front"
nominal_power_kW = 1.4
kv_m3_per_h = 0.5

[[emitters]]
id = "back_rad"
room = "back"
nominal_power_kW = 1.2
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


@pytest.fixture
def tiny_house(tmp_path):
    """Path of the tiny test house scenario in a fresh directory."""
    path = tmp_path / "tiny.toml"
    path.write_text(TINY_HOUSE, encoding="utf-8")
    return path
