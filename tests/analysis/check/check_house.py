"""An invented one-floor house with a header too small for its flow (check tests).

Six radiators of 1.2 kW on one run at 70/55 °C; the header pipe and the pump
curve are filled in by :func:`house`. Invented for tests only.
"""

from __future__ import annotations

from simheat.scenario import parse_scenario

TEXT = """
name = "Undersized header test house"
schemes = ["direct_return", "reverse_return"]
[design]
outdoor_temp_C = -10.0
supply_temp_C = 70.0
temperature_drop_K = 15.0
[source]
max_power_kW = 12.0
flow_temp_C = 70.0
[pump]
flow_m3_per_h = [0.0, 0.3, 0.6, 0.9]
head_kPa = {heads}
[simulation]
duration_h = 2.0
output_step_min = 5.0
{rooms}
{emitters}
[route]
header_pipe = "{header}"
branch_pipe = "cu_15x1"
feed_length_m = 3.0
[[route.floors]]
floor = 0
tees = [
{tees}
]
"""
ROOMS = ("a", "b", "c", "d", "e", "f")


def house_text(header: str = "cu_15x1", heads=(30.0, 28.0, 22.0, 12.0)) -> str:
    """TOML text of the house with a header pipe and pump heads (kPa)."""
    rooms = "\n".join(
        f'[[rooms]]\nid = "{r}"\nfloor_area_m2 = 12.0\nsetpoint_C = 20.0\n'
        f"design_heat_load_W = 1000.0"
        for r in ROOMS
    )
    emitters = "\n".join(
        f'[[emitters]]\nid = "rad_{r}"\nroom = "{r}"\nnominal_power_kW = 1.4\n'
        f"kv_m3_per_h = 0.3"
        for r in ROOMS
    )
    tees = "\n".join(
        f'  {{ emitter = "rad_{r}", header_length_m = 4.0, branch_length_m = 1.0 }},'
        for r in ROOMS
    )
    return TEXT.format(
        heads=list(heads), rooms=rooms, emitters=emitters, header=header, tees=tees
    )


def house(**kwargs):
    """The parsed house (see :func:`house_text`)."""
    return parse_scenario(house_text(**kwargs), origin="undersized.toml")
