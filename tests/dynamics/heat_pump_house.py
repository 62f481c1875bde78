"""A two-room house on a small heat pump, for tests (invented; not a real unit).

``house_text(...)`` returns the scenario text with the given changes: the
weather (held or a ramp), the flow temperature, the minimum flow, a buffer
tank, a constant COP, the run's length and output step. The rating table is
invented for tests with the shape of an air-to-water unit (capacity and COP
rising with the outdoor temperature, falling with the flow temperature); it is
small against the house so the unit sits at its capacity during the warm-up.
"""

from __future__ import annotations

OUTDOOR_C = [-15.0, -7.0, 2.0, 7.0]
FLOW_C = [35.0, 45.0, 55.0]
CAPACITY_KW = [
    [0.95, 0.88, 0.80],
    [1.20, 1.12, 1.02],
    [1.50, 1.40, 1.28],
    [1.70, 1.58, 1.45],
]
COP = [
    [2.3, 1.9, 1.6],
    [2.8, 2.3, 1.9],
    [3.6, 2.9, 2.4],
    [4.3, 3.4, 2.8],
]


def _rows(table) -> str:
    return (
        "[" + ", ".join("[" + ", ".join(f"{v:g}" for v in r) + "]" for r in table) + "]"
    )


def house_text(
    *,
    outdoor_C: float | tuple[float, float] = -5.0,
    flow_temp_C: float = 50.0,
    min_flow_m3_per_h: float = 0.0,
    buffer_L: float = 0.0,
    cop: float | None = None,
    duration_h: float = 1.0,
    output_step_min: float = 2.0,
) -> str:
    """The heat pump house as scenario text.

    Parameters
    ----------
    outdoor_C : float or (float, float)
        Held outdoor temperature, or a ramp from the first to the second over
        the run. [°C]
    flow_temp_C : float
        Fixed flow-temperature setpoint. [°C]
    min_flow_m3_per_h : float
        The heat pump's minimum flow. [m3/h]
    buffer_L : float
        Its buffer tank. [L]
    cop : float, optional
        A COP for every rating point instead of the table's. [-]
    duration_h, output_step_min : float
        Length of the run [h] and its output step [min].
    """
    if isinstance(outdoor_C, tuple):
        weather = (
            f"time_h = [0.0, {duration_h}]\n"
            f"outdoor_temp_C = [{outdoor_C[0]}, {outdoor_C[1]}]"
        )
    else:
        weather = f"outdoor_temp_C = {outdoor_C}"
    cops = COP if cop is None else [[cop] * len(FLOW_C) for _ in OUTDOOR_C]
    return f"""
name = "Heat pump test house"
schemes = ["direct_return"]

[design]
outdoor_temp_C = -5.0
supply_temp_C = 50.0
temperature_drop_K = 8.0

[source]
kind = "heat_pump"
flow_temp_C = {flow_temp_C}
water_volume_L = 2.0

[source.heat_pump]
outdoor_temp_C = {OUTDOOR_C}
flow_temp_C = {FLOW_C}
capacity_kW = {_rows(CAPACITY_KW)}
cop = {_rows(cops)}
min_flow_m3_per_h = {min_flow_m3_per_h}
buffer_volume_L = {buffer_L}

[pump]
flow_m3_per_h = [0.0, 0.3, 0.6]
head_kPa = [20.0, 17.0, 9.0]

[weather]
{weather}

[simulation]
duration_h = {duration_h}
output_step_min = {output_step_min}
initial_room_temp_C = 17.0
initial_water_temp_C = 17.0

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
nominal_power_kW = 1.6
kv_m3_per_h = 0.5

[[emitters]]
id = "back_rad"
room = "back"
nominal_power_kW = 1.4
kv_m3_per_h = 0.5

[route]
header_pipe = "cu_15x1"
branch_pipe = "cu_10x1"
feed_length_m = 2.0

[[route.floors]]
floor = 0
tees = [
  {{ emitter = "front_rad", header_length_m = 3.0, branch_length_m = 0.5 }},
  {{ emitter = "back_rad", header_length_m = 6.0, branch_length_m = 0.5 }},
]
"""
