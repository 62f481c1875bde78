"""An invented two-room, three-radiator house shared by the resolve tests."""

from __future__ import annotations

from simheat.scenario import parse_scenario

ORIGIN = "house.toml"

TEXT = """
name = "Two-room test house"
[design]
outdoor_temp_C = -10.0
supply_temp_C = 70.0
temperature_drop_K = 15.0
[source]
max_power_kW = 6.0
flow_temp_C = 70.0
[pump]
flow_m3_per_h = [0.0, 0.5, 1.0]
head_kPa = [30.0, 26.0, 16.0]
[valve_types.trv]
presets = [1, 2, 3]
kv_m3_per_h = [0.1, 0.2, 0.4]
[[rooms]]
id = "living"
floor_area_m2 = 20.0
setpoint_C = 21.0
design_heat_load_W = 1550.0
[[rooms]]
id = "bed"
floor_area_m2 = 12.0
height_m = 2.4
setpoint_C = 18.0
heat_loss_W_per_K = 30.0
mass_class = "heavy"
[[emitters]]
id = "rad_living_a"
room = "living"
nominal_power_kW = 1.2
preset = 2.5
valve_type = "trv"
[[emitters]]
id = "rad_living_b"
room = "living"
nominal_power_kW = 0.8
kv_m3_per_h = 0.3
metal_mass_kg = 20.0
[[emitters]]
id = "rad_bed"
room = "bed"
nominal_power_kW = 0.8
preset = 3
valve_type = "trv"
[route]
header_pipe = "cu_22x1"
branch_pipe = "cu_15x1"
feed_length_m = 3.0
[[route.floors]]
floor = 0
tees = [
  { emitter = "rad_living_a", header_length_m = 2.0, branch_length_m = 1.0 },
  { emitter = "rad_living_b", header_length_m = 3.0, branch_length_m = 1.0 },
  { emitter = "rad_bed", header_length_m = 4.0, branch_length_m = 0.5 },
]
"""


def house(*replacements: tuple[str, str], tail: str = ""):
    """The house with text replacements (each must match once) and tables added."""
    text = TEXT
    for old, new in replacements:
        assert text.count(old) == 1, old
        text = text.replace(old, new)
    return parse_scenario(text + tail, origin=ORIGIN)
