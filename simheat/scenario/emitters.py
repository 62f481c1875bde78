"""Scenario sections ``[valve_types]`` and ``[[emitters]]``.

An emitter's valve is given either by its Kv or by a preset of a valve type's
table; a lockshield with a table of its own (turns -> Kv, a ``[valve_types]``
entry too) may sit in series with it. The resolve step reads the Kv of presets
and turns from the tables and combines them (:mod:`simheat.resolve.emitters`).
An emitter may state its design flow instead of taking its share of the room's
design load. Body mass and water content default to
typical figures per kW of nominal output. An emitter shut for good
(``closed = true``, or a Kv of 0) passes no water at all.
"""

from __future__ import annotations

from simheat.scenario.common import (
    MAX_KV_M3_H,
    MAX_PRESET,
    MIN_KV_M3_H,
    exactly_one,
)
from simheat.scenario.fields import Table, shown
from simheat.scenario.model import Emitter, ValveType

# Typical steel panel radiator content and body mass per kW of nominal output
# (common trade figures, from memory of manufacturers' data sheets). [L/kW], [kg/kW]
DEFAULT_WATER_L_PER_KW = 3.5
DEFAULT_STEEL_KG_PER_KW = 15.0
DEFAULT_EXPONENT = 1.3  # EN 442 exponent typical of panel radiators
DEFAULT_BAND_K = 2.0  # proportional band of thermostatic heads, EN 215 rating point
DEFAULT_CONVECTIVE_FRACTION = 0.7  # panel radiators, common modelling practice
# Time constant of a thermostatic head's sensor: liquid- and wax-filled heads answer
# a step of room temperature within tens of minutes (EN 215 rates a response time;
# 10 min is our modelling default, from memory of rated values). [min]
DEFAULT_SENSOR_TIME_CONSTANT_MIN = 10.0
# A head's sensor answers within a minute at the quickest and two hours at the
# slowest (a remote sensor in a heavy room). [min]
MIN_SENSOR_TIME_CONSTANT_MIN = 1.0
MAX_SENSOR_TIME_CONSTANT_MIN = 120.0
# Nominal output: a small towel rail gives about 100 W, so 50 W is the least an
# emitter gives; 50 kW is a large fan convector. [kW]
MIN_EMITTER_POWER_KW = 0.05
MAX_EMITTER_POWER_KW = 50.0
# Water content and body mass per kW of nominal output: fan convectors hold
# about 0.3 L/kW and 3 kg/kW, old cast-iron columns about 10 L/kW and 40 kg/kW
# (from memory of manufacturers' data); the bounds leave room either side.
# The lower ends, 1 mL and 1 g, admit the near-massless emitters of idealised
# checks (a closed form that ignores the emitter's heat); below them a water
# cell's time constant at house flows falls far under a millisecond, which only
# stiffens the integration. [L/kW], [kg/kW], [L], [kg]
MAX_WATER_L_PER_KW = 50.0
MAX_METAL_KG_PER_KW = 100.0
MIN_WATER_L = 0.001
MIN_METAL_KG = 0.001
# Design flow an emitter may be given: 1 kg/h is a 50 W towel rail at a 40 K
# drop; a 50 kW emitter (the power limit above) at a 10 K drop carries about
# 4300 kg/h. The upper bound catches unit mistakes (kg/s or L/min written as
# kg/h is 60-3600 times off). [kg/h]
MIN_DESIGN_FLOW_KG_PER_H = 1.0
MAX_DESIGN_FLOW_KG_PER_H = 1e4
# Proportional band of a thermostatic head: EN 215 rates heads at 2 K; below
# 0.5 K a head is an on-off switch the integration cannot follow smoothly. [K]
MIN_BAND_K = 0.5
MAX_BAND_K = 10.0


def read_valve_types(t: Table) -> dict[str, ValveType]:
    """The ``[valve_types]`` table: per name, increasing presets and a Kv each.

    Parameters
    ----------
    t : Table
        The ``[valve_types]`` table (empty when absent).

    Returns
    -------
    dict of str to ValveType
        Preset tables by name: presets [-] and Kv [m3/h].
    """
    types = {}
    for name in list(t.data):
        vt = t.table(name)
        presets = vt.numbers("presets", min_len=2)
        kvs = vt.numbers("kv_m3_per_h", min_len=2)
        if len(presets) != len(kvs):
            raise vt.fail("kv_m3_per_h", "must have one Kv per preset")
        if any(b <= a for a, b in zip(presets, presets[1:], strict=False)):
            raise vt.fail("presets", "must be strictly increasing")
        if any(abs(p) > MAX_PRESET for p in presets):
            raise vt.fail(
                "presets", f"presets must lie within -{MAX_PRESET:g} to {MAX_PRESET:g}"
            )
        if any(k <= 0 for k in kvs):
            raise vt.fail("kv_m3_per_h", "every Kv must be > 0")
        if any(not MIN_KV_M3_H <= k <= MAX_KV_M3_H for k in kvs):
            raise vt.fail(
                "kv_m3_per_h",
                f"every Kv must lie within {MIN_KV_M3_H:g} to {MAX_KV_M3_H:g} m3/h "
                "(a radiator valve's smallest preset to a large valve), got "
                f"{shown(kvs)}",
            )
        vt.reject_unknown()
        types[name] = ValveType(tuple(presets), tuple(kvs))
    return types


def read_emitter(
    t: Table, room_ids: dict[str, int], valve_types: dict[str, ValveType]
) -> Emitter:
    """One ``[[emitters]]`` table; a preset must lie within its valve's table.

    Parameters
    ----------
    t : Table
        The emitter's table. [-]
    room_ids : dict of str to int
        Index of each room id. [-]
    valve_types : dict of str to ValveType
        The scenario's preset tables. [-]

    Returns
    -------
    Emitter
        The emitter in SI units, with its Kv [m3/h] or its preset [-] and valve
        type, and its body mass. [kg]
    """
    room_name = t.text("room")
    if room_name not in room_ids:
        raise t.fail("room", f"unknown room {shown(room_name)}")
    power_W = 1e3 * t.number(
        "nominal_power_kW", low=MIN_EMITTER_POWER_KW, high=MAX_EMITTER_POWER_KW
    )
    kv = preset = valve_type = None
    exactly_one(t, "kv_m3_per_h", "preset")
    if t.has("kv_m3_per_h"):
        # Kv 0 is a valve shut for good (see `closed`), not a leak.
        kv = t.number("kv_m3_per_h", non_negative=True, high=MAX_KV_M3_H)
        if 0.0 < kv < MIN_KV_M3_H:
            raise t.fail(
                "kv_m3_per_h",
                f"must be 0 (shut for good) or >= {MIN_KV_M3_H:g}, got {kv:g}",
            )
    else:
        valve_type = _valve_type(t, "valve_type", valve_types)
        preset = _setting(t, "preset", valve_types[valve_type])
    lockshield_type = lockshield_turns = None
    if t.has("lockshield_type"):
        lockshield_type = _valve_type(t, "lockshield_type", valve_types)
        table = valve_types[lockshield_type]
        lockshield_turns = _setting(t, "lockshield_turns", table, table.presets[-1])
    elif t.has("lockshield_turns"):
        raise t.fail(
            "lockshield_turns", "needs lockshield_type naming the lockshield's table"
        )
    design_flow_kg_s = None
    if t.has("design_flow_kg_per_h"):
        design_flow_kg_s = (
            t.number(
                "design_flow_kg_per_h",
                low=MIN_DESIGN_FLOW_KG_PER_H,
                high=MAX_DESIGN_FLOW_KG_PER_H,
            )
            / 3600.0
        )
    water_L = t.number(
        "water_volume_L",
        DEFAULT_WATER_L_PER_KW * power_W / 1e3,
        low=MIN_WATER_L,
        high=max(MIN_WATER_L, MAX_WATER_L_PER_KW * power_W / 1e3),
    )
    steel_kg = t.number(
        "metal_mass_kg",
        DEFAULT_STEEL_KG_PER_KW * power_W / 1e3,
        low=MIN_METAL_KG,
        high=max(MIN_METAL_KG, MAX_METAL_KG_PER_KW * power_W / 1e3),
    )
    emitter = Emitter(
        id=t.text("id"),
        room=room_ids[room_name],
        nominal_power_W=power_W,
        exponent=t.number("exponent", DEFAULT_EXPONENT, low=1.0, high=2.0),
        water_volume_m3=water_L / 1e3,
        metal_mass_kg=steel_kg,
        kv_m3_h=kv,
        preset=preset,
        valve_type=valve_type,
        thermostatic=t.boolean("thermostatic_head", True),
        band_K=t.number(
            "proportional_band_K", DEFAULT_BAND_K, low=MIN_BAND_K, high=MAX_BAND_K
        ),
        convective_fraction=t.number(
            "convective_fraction", DEFAULT_CONVECTIVE_FRACTION, low=0.0, high=1.0
        ),
        sensor_time_constant_s=60.0
        * t.number(
            "sensor_time_constant_min",
            DEFAULT_SENSOR_TIME_CONSTANT_MIN,
            low=MIN_SENSOR_TIME_CONSTANT_MIN,
            high=MAX_SENSOR_TIME_CONSTANT_MIN,
        ),
        design_flow_kg_s=design_flow_kg_s,
        lockshield_type=lockshield_type,
        lockshield_turns=lockshield_turns,
        closed=t.boolean("closed", False) or kv == 0.0,
    )
    t.reject_unknown()
    return emitter


def _valve_type(t: Table, key: str, valve_types: dict[str, ValveType]) -> str:
    """The name under ``key``, which must be a ``[valve_types]`` table."""
    name = t.text(key)
    if name not in valve_types:
        known = ", ".join(sorted(valve_types)) or "none, add a [valve_types] table"
        raise t.fail(key, f"unknown valve type {shown(name)}; known types: {known}")
    return name


def _setting(t: Table, key: str, table: ValveType, default=None) -> float:
    """A preset (or turns) under ``key``, within ``table``'s range."""
    value = t.number(key) if default is None else t.number(key, default)
    presets = table.presets
    if not presets[0] <= value <= presets[-1]:
        raise t.fail(
            key,
            f"{key.replace('_', ' ')} must be within the table's {presets[0]:g} to "
            f"{presets[-1]:g}, got {value:g}",
        )
    return value
