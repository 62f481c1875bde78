"""Houses for the readiness tests (invented): one room, and a one-pipe loop.

``one_room(...)``: one room of 500 W design load at 20 °C with one radiator of
1000 W nominal output and exponent 1.3, design 70/60 °C, so its lowest flow
temperature follows by hand from the EN 442 characteristic.
"""

from __future__ import annotations


def one_room(
    *,
    nominal_kW: float = 1.0,
    load_W: float = 500.0,
    drop_K: float = 10.0,
    heating_curve: bool = False,
    schemes: str = '["direct_return"]',
) -> str:
    """The one-room house as scenario text.

    Parameters
    ----------
    nominal_kW : float
        The radiator's nominal output. [kW]
    load_W : float
        The room's design load. [W]
    drop_K : float
        Design temperature drop. [K]
    heating_curve : bool
        Give the source a heating curve instead of a fixed flow temperature. [-]
    schemes : str
        The TOML list of schemes. [-]
    """
    control = (
        "[source.heating_curve]\noutdoor_temp_C = [-10.0, 15.0]\n"
        "flow_temp_C = [70.0, 35.0]"
        if heating_curve
        else "flow_temp_C = 70.0"
    )
    return f"""
name = "One-room readiness house"
schemes = {schemes}

[design]
outdoor_temp_C = -10.0
supply_temp_C = 70.0
temperature_drop_K = {drop_K}

[source]
max_power_kW = 3.0
{control}

[pump]
flow_m3_per_h = [0.0, 0.3, 0.6]
head_kPa = [20.0, 17.0, 9.0]

[simulation]
duration_h = 0.5
output_step_min = 5.0

[[rooms]]
id = "room"
floor_area_m2 = 10.0
design_heat_load_W = {load_W}
setpoint_C = 20.0

[[emitters]]
id = "rad"
room = "room"
nominal_power_kW = {nominal_kW}
exponent = 1.3
kv_m3_per_h = 0.5

[route]
header_pipe = "cu_15x1"
branch_pipe = "cu_10x1"
feed_length_m = 2.0

[[route.floors]]
floor = 0
tees = [{{ emitter = "rad", header_length_m = 3.0, branch_length_m = 0.5 }}]
"""
