"""Load a scenario file (TOML) into a validated :class:`Scenario` in SI units.

This is the one place where practical units in key names (``power_kW``, ``head_kPa``,
``volume_L``, ``flow_m3_per_h``, ``_min``, ``_h``) become SI.
"""

from __future__ import annotations

import re
import tomllib
from pathlib import Path

import numpy as np

from simheat.errors import ScenarioError
from simheat.physics import room as room_physics
from simheat.physics.pipe_catalog import PIPE_CATALOG
from simheat.physics.pump import fit_pump_curve
from simheat.physics.valve import kv_from_preset
from simheat.scenario.fields import Table
from simheat.scenario.model import (
    PUMP_MODES,
    Design,
    Emitter,
    FloorRoute,
    InternalWall,
    LayoutOptions,
    PipeSpec,
    Pump,
    Room,
    Route,
    Scenario,
    Schedule,
    Simulation,
    SizingLimits,
    Source,
    Tee,
    Weather,
)

# Typical steel panel radiator content and body mass per kW of nominal output
# (common trade figures, from memory of manufacturers' data sheets). [L/kW], [kg/kW]
DEFAULT_WATER_L_PER_KW = 3.5
DEFAULT_STEEL_KG_PER_KW = 15.0
STEEL_CP_J_KG_K = 480.0  # carbon steel near 20 °C, engineering handbooks
DEFAULT_EXPONENT = 1.3  # EN 442 exponent typical of panel radiators
DEFAULT_BAND_K = 2.0  # proportional band of thermostatic heads, EN 215 rating point
DEFAULT_CONVECTIVE_FRACTION = 0.7  # panel radiators, common modelling practice
DEFAULT_AIR_LOSS_FRACTION = 0.4  # ventilation and windows; our modelling default
# Time constant of a thermostatic head's sensor: liquid- and wax-filled heads answer
# a step of room temperature within tens of minutes (EN 215 rates a response time;
# 10 min is our modelling default, from memory of rated values). [min]
DEFAULT_SENSOR_TIME_CONSTANT_MIN = 10.0
MAX_SENSOR_TIME_CONSTANT_MIN = 120.0

# Plausibility limits for a house, far beyond any real case. They catch unit
# mistakes and keep conversions and curve fits clear of overflow; our own choice.
MAX_PUMP_FLOW_M3_H = 100.0  # [m3/h]
MAX_PUMP_HEAD_KPA = 1000.0  # [kPa]
MAX_ROOM_AREA_M2 = 1000.0  # [m2]
MAX_ROOM_HEIGHT_M = 20.0  # [m]
MAX_ROOM_LOSS_W_K = 1e4  # room heat loss coefficient [W/K]
MAX_ROOM_LOAD_W = 1e6  # room design heat load [W]
MAX_CAPACITY_KJ_K = 1e6  # room node heat capacity [kJ/K]
MAX_FLOOR = 100  # storey number [-]
MAX_EMITTER_POWER_KW = 50.0  # [kW]
MAX_SOURCE_POWER_KW = 1000.0  # [kW]
MAX_WATER_L = 1e4  # water content of an emitter or the source [L]
MAX_METAL_KG = 1e4  # emitter body mass [kg]
MAX_PIPE_LENGTH_M = 1000.0  # any one pipe run or water cell [m]
MAX_EMITTER_CELLS = 100  # water cells per radiator [-]
MAX_WEATHER_TIME_H = 8760.0  # one year either side of the start [h]
# Relative margin a regulated pump's set head must keep below the fitted shut-off
# head; far below any head a pump could be set to, far above fit round-off. [-]
SET_HEAD_MARGIN = 1e-6

_CLOCK = re.compile(r"^([01]?\d|2[0-3]):([0-5]\d)$")


def load_scenario(path: str | Path) -> Scenario:
    """Read and validate a scenario file.

    Parameters
    ----------
    path : str or Path
        Path of a TOML scenario file.

    Returns
    -------
    Scenario
        The validated scenario in SI units.

    Raises
    ------
    ScenarioError
        When the file cannot be read, is not valid TOML, or any field is missing or
        out of range; the message names the field.
    """
    path = Path(path)
    try:
        text = path.read_text(encoding="utf-8")
    except OSError as exc:
        raise ScenarioError(
            f"{path}: cannot read scenario file ({exc.strerror})"
        ) from None
    except UnicodeDecodeError:
        raise ScenarioError(f"{path}: not a UTF-8 text file") from None
    return parse_scenario(text, origin=str(path))


def parse_scenario(text: str, origin: str = "<text>") -> Scenario:
    """Validate scenario text (TOML) into a :class:`Scenario`.

    Parameters
    ----------
    text : str
        TOML text of the scenario.
    origin : str
        Name used in messages (usually the file path).

    Returns
    -------
    Scenario
        The validated scenario in SI units.

    Raises
    ------
    ScenarioError
        On malformed TOML or any invalid field.
    """
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise ScenarioError(f"{origin}: malformed TOML: {exc}") from None
    top = Table(data, "", origin)
    design = _design(top.table("design"))
    room_tables = top.tables("rooms", min_len=1)
    rooms = tuple(_room(t, design) for t in room_tables)
    room_ids = _unique_ids(room_tables, "rooms")
    walls = tuple(_wall(t, room_ids) for t in top.tables("internal_walls", []))
    valve_types = _valve_types(top.table("valve_types", {}))
    emitter_tables = top.tables("emitters", min_len=1)
    emitters = tuple(_emitter(t, room_ids, valve_types) for t in emitter_tables)
    emitter_ids = _unique_ids(emitter_tables, "emitters")
    route = _route(top.table("route"), emitter_ids)
    source = _source(top.table("source"))
    simulation = _simulation(top.table("simulation", {}))
    pump = _pump(top.table("pump"), simulation.duration_s)
    weather = _weather(top.table("weather", {}), design, simulation)
    schedule = _schedule(top.table("schedule", {}))
    schemes = _schemes(top)
    layout = _layout(top.table("layout", {}), route, simulation.duration_s)
    name = top.text("name")
    description = top.text("description", "")
    top.reject_unknown()

    flow_key = {
        "fixed": "source.flow_temp_C",
        "schedule": "source.flow_temp_schedule.flow_temp_C",
        "heating_curve": "source.heating_curve.flow_temp_C",
    }[source.flow_control]
    for i, e in enumerate(emitters):
        room = rooms[e.room]
        if source.lowest_flow_temp_C <= room.setpoint_C:
            raise ScenarioError(
                f"{flow_key}: must be above the setpoint "
                f"{room.setpoint_C:g} °C of room {room.id!r} (heated by "
                f"emitters[{i}]), got {source.lowest_flow_temp_C:g} ({origin})"
            )
    if schedule.comfort_start_s > simulation.duration_s:
        raise ScenarioError(
            f"schedule.comfort_from: comfort starts after the simulation ends "
            f"({schedule.comfort_start_s / 3600:g} h > "
            f"{simulation.duration_s / 3600:g} h) ({origin})"
        )
    return Scenario(
        name=name,
        description=description,
        source_path=origin,
        text=text,
        schemes=schemes,
        design=design,
        rooms=rooms,
        internal_walls=walls,
        emitters=emitters,
        route=route,
        source=source,
        pump=pump,
        weather=weather,
        schedule=schedule,
        simulation=simulation,
        layout=layout,
    )


def _unique_ids(tables: list[Table], what: str) -> dict[str, int]:
    ids: dict[str, int] = {}
    for i, t in enumerate(tables):
        ident = t.text("id")
        if not ident.strip():
            raise t.fail("id", "must not be empty")
        if ident in ids:
            raise t.fail("id", f"duplicate id {ident!r} (also {what}[{ids[ident]}])")
        ids[ident] = i
    return ids


def _design(t: Table) -> Design:
    design = Design(
        outdoor_temp_C=t.number("outdoor_temp_C", low=-50.0, high=20.0),
        supply_temp_C=t.number("supply_temp_C", low=25.0, high=95.0),
        temperature_drop_K=t.number("temperature_drop_K", positive=True, high=40.0),
    )
    t.reject_unknown()
    return design


def _room(t: Table, design: Design) -> Room:
    area = t.number("floor_area_m2", positive=True, high=MAX_ROOM_AREA_M2)
    height = t.number("height_m", 2.5, positive=True, high=MAX_ROOM_HEIGHT_M)
    setpoint = t.number("setpoint_C", low=5.0, high=30.0)
    if setpoint <= design.outdoor_temp_C:
        raise t.fail(
            "setpoint_C",
            f"must be above design.outdoor_temp_C ({design.outdoor_temp_C:g}), "
            f"got {setpoint:g}",
        )
    _exactly_one(t, "heat_loss_W_per_K", "design_heat_load_W")
    has_h = t.has("heat_loss_W_per_K")
    if has_h:
        h_W_K = t.number("heat_loss_W_per_K", positive=True, high=MAX_ROOM_LOSS_W_K)
    else:
        h_W_K = t.number("design_heat_load_W", positive=True, high=MAX_ROOM_LOAD_W) / (
            setpoint - design.outdoor_temp_C
        )
    classes = room_physics.MASS_CLASS_CAPACITY_J_M2_K
    mass_class = t.text("mass_class", "medium", choices=classes)
    if t.has("air_capacity_kJ_per_K") or t.has("structure_capacity_kJ_per_K"):
        c_air = 1e3 * t.number(
            "air_capacity_kJ_per_K", positive=True, high=MAX_CAPACITY_KJ_K
        )
        c_struct = 1e3 * t.number(
            "structure_capacity_kJ_per_K", positive=True, high=MAX_CAPACITY_KJ_K
        )
    else:
        c_air = room_physics.air_capacity_J_K(area, height)
        c_struct = room_physics.structure_capacity_J_K(area, mass_class)
    room = Room(
        id=t.text("id"),
        name=t.text("name", t.data.get("id", "")),
        floor=t.integer("floor", 0, low=-5, high=MAX_FLOOR),
        floor_area_m2=area,
        height_m=height,
        setpoint_C=setpoint,
        heat_loss_W_K=h_W_K,
        design_heat_load_W=h_W_K * (setpoint - design.outdoor_temp_C),
        air_loss_fraction=t.number(
            "air_loss_fraction", DEFAULT_AIR_LOSS_FRACTION, low=0.0, high=1.0
        ),
        air_capacity_J_K=c_air,
        structure_capacity_J_K=c_struct,
        air_structure_conductance_W_K=room_physics.air_structure_conductance_W_K(
            area, mass_class
        ),
        internal_gains_W=t.number("internal_gains_W", 0.0, non_negative=True),
    )
    t.reject_unknown()
    return room


def _exactly_one(t: Table, first: str, second: str) -> None:
    """Raise unless exactly one of the keys ``first`` and ``second`` is given."""
    if t.has(first) and t.has(second):
        raise t.fail(first, f"give only one of {first} or {second}, got both")
    if not (t.has(first) or t.has(second)):
        raise t.fail(first, f"give one of {first} or {second}, got neither")


def _wall(t: Table, room_ids: dict[str, int]) -> InternalWall:
    pair = t.raw("rooms")
    if (
        not isinstance(pair, list)
        or len(pair) != 2
        or not all(isinstance(name, str) for name in pair)
    ):
        raise t.fail("rooms", f"must name two rooms, got {pair!r}")
    for name in pair:
        if name not in room_ids:
            raise t.fail("rooms", f"unknown room {name!r}")
    if pair[0] == pair[1]:
        raise t.fail("rooms", f"a wall joins two different rooms, got {pair!r}")
    wall = InternalWall(
        room_ids[pair[0]],
        room_ids[pair[1]],
        t.number("conductance_W_per_K", positive=True),
    )
    t.reject_unknown()
    return wall


def _valve_types(t: Table) -> dict[str, tuple[list, list]]:
    types = {}
    for name in list(t.data):
        vt = t.table(name)
        presets = vt.numbers("presets", min_len=2)
        kvs = vt.numbers("kv_m3_per_h", min_len=2)
        if len(presets) != len(kvs):
            raise vt.fail("kv_m3_per_h", "must have one Kv per preset")
        if any(b <= a for a, b in zip(presets, presets[1:], strict=False)):
            raise vt.fail("presets", "must be strictly increasing")
        if any(k <= 0 for k in kvs):
            raise vt.fail("kv_m3_per_h", "every Kv must be > 0")
        vt.reject_unknown()
        types[name] = (presets, kvs)
    return types


def _emitter(t: Table, room_ids: dict[str, int], valve_types: dict) -> Emitter:
    room_name = t.text("room")
    if room_name not in room_ids:
        raise t.fail("room", f"unknown room {room_name!r}")
    power_W = 1e3 * t.number(
        "nominal_power_kW", positive=True, high=MAX_EMITTER_POWER_KW
    )
    preset = None
    _exactly_one(t, "kv_m3_per_h", "preset")
    if t.has("kv_m3_per_h"):
        kv = t.number("kv_m3_per_h", positive=True)
    else:
        preset = t.number("preset")
        valve_type = t.text("valve_type")
        if valve_type not in valve_types:
            known = ", ".join(sorted(valve_types)) or "none, add a [valve_types] table"
            raise t.fail(
                "valve_type", f"unknown valve type {valve_type!r}; known types: {known}"
            )
        presets, kvs = valve_types[valve_type]
        try:
            kv = float(kv_from_preset(preset, presets, kvs))
        except ScenarioError as exc:
            raise t.fail("preset", str(exc)) from None
    water_L = t.number(
        "water_volume_L",
        DEFAULT_WATER_L_PER_KW * power_W / 1e3,
        positive=True,
        high=MAX_WATER_L,
    )
    steel_kg = t.number(
        "metal_mass_kg",
        DEFAULT_STEEL_KG_PER_KW * power_W / 1e3,
        positive=True,
        high=MAX_METAL_KG,
    )
    emitter = Emitter(
        id=t.text("id"),
        room=room_ids[room_name],
        nominal_power_W=power_W,
        exponent=t.number("exponent", DEFAULT_EXPONENT, low=1.0, high=2.0),
        water_volume_m3=water_L / 1e3,
        metal_capacity_J_K=steel_kg * STEEL_CP_J_KG_K,
        kv_m3_h=kv,
        preset=preset,
        thermostatic=t.boolean("thermostatic_head", True),
        band_K=t.number(
            "proportional_band_K", DEFAULT_BAND_K, positive=True, high=10.0
        ),
        convective_fraction=t.number(
            "convective_fraction", DEFAULT_CONVECTIVE_FRACTION, low=0.0, high=1.0
        ),
        sensor_time_constant_s=60.0
        * t.number(
            "sensor_time_constant_min",
            DEFAULT_SENSOR_TIME_CONSTANT_MIN,
            positive=True,
            high=MAX_SENSOR_TIME_CONSTANT_MIN,
        ),
    )
    t.reject_unknown()
    return emitter


def _pipe(t: Table, key: str, default=None) -> PipeSpec:
    value = t.raw(key, default)
    if isinstance(value, str):
        if value not in PIPE_CATALOG:
            known = ", ".join(sorted(PIPE_CATALOG))
            raise t.fail(key, f"unknown pipe type {value!r}; known types: {known}")
        p = PIPE_CATALOG[value]
        return PipeSpec(value, p.inner_diameter_m, p.roughness_m, p.outer_diameter_m)
    if isinstance(value, dict):
        sub = Table(value, t.where(key), t.origin)
        d_m = sub.number("inner_diameter_mm", positive=True, high=200.0) / 1e3
        spec = PipeSpec(
            sub.text("name", "custom"),
            d_m,
            sub.number("roughness_mm", positive=True, high=5.0) / 1e3,
            sub.number("outer_diameter_mm", d_m * 1e3 * 1.15, positive=True) / 1e3,
        )
        sub.reject_unknown()
        if spec.outer_diameter_m <= spec.inner_diameter_m:
            raise sub.fail("outer_diameter_mm", "must exceed inner_diameter_mm")
        return spec
    raise t.fail(key, f"must be a pipe type name or a table, got {value!r}")


def _route(t: Table, emitter_ids: dict[str, int]) -> Route:
    # Validated here so errors name the route-level key; floors inherit them.
    _pipe(t, "header_pipe")
    _pipe(t, "branch_pipe")
    feed = _pipe(t, "feed_pipe", t.data.get("header_pipe"))
    seen: dict[str, str] = {}
    floors = []
    for ft in t.tables("floors", min_len=1):
        tees = []
        for tt in ft.tables("tees", min_len=1):
            name = tt.text("emitter")
            if name not in emitter_ids:
                raise tt.fail("emitter", f"unknown emitter {name!r}")
            if name in seen:
                raise tt.fail(
                    "emitter",
                    f"emitter {name!r} is already on the route at {seen[name]}",
                )
            seen[name] = tt.path
            tees.append(
                Tee(
                    emitter_ids[name],
                    tt.number(
                        "header_length_m", non_negative=True, high=MAX_PIPE_LENGTH_M
                    ),
                    tt.number("branch_length_m", positive=True, high=MAX_PIPE_LENGTH_M),
                )
            )
            tt.reject_unknown()
        floors.append(
            FloorRoute(
                floor=ft.integer("floor", low=-5, high=MAX_FLOOR),
                riser_length_m=ft.number(
                    "riser_length_m", 0.0, non_negative=True, high=MAX_PIPE_LENGTH_M
                ),
                header_pipe=_pipe(ft, "header_pipe", t.data["header_pipe"]),
                branch_pipe=_pipe(ft, "branch_pipe", t.data["branch_pipe"]),
                tees=tuple(tees),
                **_floor_layout(ft, tees, emitter_ids),
            )
        )
        ft.reject_unknown()
    missing = [name for name in emitter_ids if name not in seen]
    if missing:
        raise t.fail(
            "floors", f"the route does not visit emitter(s) {', '.join(missing)}"
        )
    numbers = [f.floor for f in floors]
    if len(set(numbers)) != len(numbers):
        raise t.fail("floors", f"each floor may appear once, got floors {numbers}")
    route = Route(
        feed_length_m=t.number("feed_length_m", positive=True, high=MAX_PIPE_LENGTH_M),
        feed_pipe=feed,
        floors=tuple(sorted(floors, key=lambda f: f.floor)),
        insulated=t.boolean("insulated", True),
        unheated_space_temp_C=t.number(
            "unheated_space_temp_C", 10.0, low=-30.0, high=40.0
        ),
        pipes_in_unheated_space=t.boolean("pipes_in_unheated_space", False),
    )
    t.reject_unknown()
    return route


def _source(t: Table) -> Source:
    controls = [
        k for k in ("flow_temp_C", "flow_temp_schedule", "heating_curve") if t.has(k)
    ]
    if len(controls) != 1:
        raise t.fail(
            "flow_temp_C",
            "give exactly one flow-temperature control: flow_temp_C, "
            f"[source.flow_temp_schedule] or [source.heating_curve], got {controls}",
        )
    schedule_time = schedule_temp = curve_outdoor = curve_flow = None
    if t.has("flow_temp_C"):
        flow_temp = t.number("flow_temp_C", low=25.0, high=95.0)
    elif t.has("flow_temp_schedule"):
        st = t.table("flow_temp_schedule")
        times = st.numbers("time_h", min_len=1)
        temps = st.numbers("flow_temp_C", min_len=1)
        if len(times) != len(temps):
            raise st.fail("flow_temp_C", "must have one value per entry of time_h")
        if any(b <= a for a, b in zip(times, times[1:], strict=False)):
            raise st.fail(
                "time_h", f"times must be strictly increasing (in order), got {times}"
            )
        if any(not 0.0 <= x <= MAX_WEATHER_TIME_H for x in times):
            raise st.fail(
                "time_h",
                f"times must lie within 0 to {MAX_WEATHER_TIME_H:g} h, got {times}",
            )
        if any(not 25.0 <= x <= 95.0 for x in temps):
            raise st.fail(
                "flow_temp_C", f"values must lie within 25 to 95, got {temps}"
            )
        st.reject_unknown()
        schedule_time = tuple(3600.0 * x for x in times)
        schedule_temp = tuple(float(x) for x in temps)
        flow_temp = max(schedule_temp)
    else:
        ct = t.table("heating_curve")
        outdoor = ct.numbers("outdoor_temp_C", min_len=2)
        flow = ct.numbers("flow_temp_C", min_len=2)
        if len(outdoor) != len(flow):
            raise ct.fail(
                "flow_temp_C", "must have one value per entry of outdoor_temp_C"
            )
        if any(b <= a for a, b in zip(outdoor, outdoor[1:], strict=False)):
            raise ct.fail(
                "outdoor_temp_C", f"must be strictly increasing, got {outdoor}"
            )
        if any(not -50.0 <= x <= 40.0 for x in outdoor):
            raise ct.fail(
                "outdoor_temp_C", f"values must lie within -50 to 40, got {outdoor}"
            )
        if any(not 25.0 <= x <= 95.0 for x in flow):
            raise ct.fail("flow_temp_C", f"values must lie within 25 to 95, got {flow}")
        if any(b > a for a, b in zip(flow, flow[1:], strict=False)):
            raise ct.fail(
                "flow_temp_C",
                "must not rise as the outdoor temperature rises (a heating curve "
                f"falls), got {flow}",
            )
        ct.reject_unknown()
        curve_outdoor = tuple(float(x) for x in outdoor)
        curve_flow = tuple(float(x) for x in flow)
        flow_temp = max(curve_flow)
    source = Source(
        max_power_W=1e3
        * t.number("max_power_kW", positive=True, high=MAX_SOURCE_POWER_KW),
        flow_temp_C=flow_temp,
        water_volume_m3=t.number("water_volume_L", 3.0, positive=True, high=MAX_WATER_L)
        / 1e3,
        flow_schedule_time_s=schedule_time,
        flow_schedule_temp_C=schedule_temp,
        curve_outdoor_temp_C=curve_outdoor,
        curve_flow_temp_C=curve_flow,
    )
    t.reject_unknown()
    return source


def _pump(t: Table, duration_s: float) -> Pump:
    """A pump table: head curve, control mode, check valve and stop time.

    ``stop_at_h`` must lie within the run (0 to ``duration_s``). The same keys
    are read in ``[pump]``, ``[layout.primary_pump]`` and each
    ``[[layout.floor_pumps]]``; which pumps a stop time stops is decided by the
    table it sits in (see :func:`simheat.dynamics.controls.pump_stop_times_s`).
    """
    flow_m3_h = t.numbers("flow_m3_per_h", min_len=2)
    head_kPa = t.numbers("head_kPa", min_len=2)
    if len(flow_m3_h) != len(head_kPa):
        raise t.fail(
            "head_kPa",
            f"must have one head per flow point ({len(flow_m3_h)}), "
            f"got {len(head_kPa)}",
        )
    if any(not 0.0 <= q <= MAX_PUMP_FLOW_M3_H for q in flow_m3_h):
        raise t.fail(
            "flow_m3_per_h",
            f"flows must lie within 0 to {MAX_PUMP_FLOW_M3_H:g} m3/h, got {flow_m3_h}",
        )
    if len(set(flow_m3_h)) != len(flow_m3_h):
        raise t.fail("flow_m3_per_h", f"flows must be distinct, got {flow_m3_h}")
    if any(abs(h) > MAX_PUMP_HEAD_KPA for h in head_kPa):
        raise t.fail(
            "head_kPa",
            f"heads must lie within -{MAX_PUMP_HEAD_KPA:g} to {MAX_PUMP_HEAD_KPA:g} "
            f"kPa, got {head_kPa}",
        )
    try:
        with np.errstate(all="ignore"):
            coeffs = fit_pump_curve(np.array(flow_m3_h), np.array(head_kPa))
    except ScenarioError as exc:
        raise t.fail("head_kPa", str(exc)) from None
    a0, a1, a2 = coeffs
    if not (np.all(np.isfinite(coeffs)) and (a1 < 0.0 or a2 < 0.0)):
        raise t.fail(
            "head_kPa",
            f"the points give no usable falling head curve, got {head_kPa} at "
            f"flows {flow_m3_h} m3/h",
        )
    stop_s = None
    if t.has("stop_at_h"):
        stop_h = t.number("stop_at_h", non_negative=True)
        if stop_h * 3600.0 > duration_s:
            raise t.fail(
                "stop_at_h",
                f"must not be after the end of the simulation "
                f"({duration_s / 3600:g} h), got {stop_h:g}",
            )
        stop_s = 3600.0 * stop_h
    mode = t.text("mode", "fixed_speed", choices=set(PUMP_MODES))
    setpoint_Pa = _pump_setpoint_Pa(t, mode, a0)
    check_valve = t.boolean("check_valve") if t.has("check_valve") else None
    t.reject_unknown()
    return Pump(
        flow_m3_s=np.array(flow_m3_h) / 3600.0,
        head_Pa=np.array(head_kPa) * 1e3,
        coeffs=tuple(float(c) for c in coeffs),
        stop_s=stop_s,
        mode=mode,
        setpoint_Pa=setpoint_Pa,
        check_valve=check_valve,
    )


def _pump_setpoint_Pa(t: Table, mode: str, shut_off_Pa: float) -> float:
    """Set head of a regulated pump [Pa]: required, > 0, below the shut-off head.

    The curve points are the maximum-speed curve; a set head at or above its
    shut-off head (``shut_off_Pa``, the fitted rise at zero flow) could never be
    held. Within ``SET_HEAD_MARGIN`` of it counts as at it: points on an exact
    parabola fit to a shut-off head a few ulps above the first point's head.
    A fixed-speed pump takes no set head (0).
    """
    if mode == "fixed_speed":
        if t.has("setpoint_kPa"):
            raise t.fail(
                "setpoint_kPa",
                "applies only to mode constant_dp or proportional_dp, "
                "but mode is fixed_speed",
            )
        return 0.0
    if not t.has("setpoint_kPa"):
        raise t.fail("setpoint_kPa", f"required key is missing for mode {mode}")
    setpoint_kPa = t.number("setpoint_kPa", positive=True)
    shut_off_kPa = shut_off_Pa / 1e3
    if not setpoint_kPa < shut_off_kPa * (1.0 - SET_HEAD_MARGIN):
        raise t.fail(
            "setpoint_kPa",
            f"must be below the pump curve's shut-off head {shut_off_kPa:.6g} kPa "
            f"(mode {mode}), got {setpoint_kPa:.10g}",
        )
    return setpoint_kPa * 1e3


def _simulation(t: Table) -> Simulation:
    sim = Simulation(
        duration_s=3600.0 * t.number("duration_h", 6.0, positive=True, high=24.0 * 14),
        output_step_s=60.0 * t.number("output_step_min", 1.0, positive=True),
        initial_room_temp_C=t.number("initial_room_temp_C", 15.0, low=-20.0, high=40.0),
        initial_water_temp_C=t.number(
            "initial_water_temp_C", 15.0, low=0.0, high=100.0
        ),
        reached_tolerance_K=t.number(
            "reached_tolerance_K", 0.5, non_negative=True, high=3.0
        ),
        rtol=t.number("rtol", 1e-5, positive=True, high=1e-2),
        pipe_cell_length_m=t.number(
            "pipe_cell_length_m", 1.0, positive=True, high=MAX_PIPE_LENGTH_M
        ),
        emitter_cells=t.integer("emitter_cells", 4, low=1, high=MAX_EMITTER_CELLS),
    )
    if sim.output_step_s > sim.duration_s:
        raise t.fail("output_step_min", "must not exceed the duration")
    t.reject_unknown()
    return sim


def _weather(t: Table, design: Design, sim: Simulation) -> Weather:
    if t.has("time_h"):
        times = t.numbers("time_h", min_len=2)
        if any(abs(time) > MAX_WEATHER_TIME_H for time in times):
            raise t.fail(
                "time_h",
                f"times must lie within -{MAX_WEATHER_TIME_H:g} to "
                f"{MAX_WEATHER_TIME_H:g} h, got {times}",
            )
        temps = t.numbers("outdoor_temp_C", min_len=2)
        if len(times) != len(temps):
            raise t.fail("outdoor_temp_C", "must have one value per entry of time_h")
        if any(b <= a for a, b in zip(times, times[1:], strict=False)):
            raise t.fail("time_h", "times must be strictly increasing")
        weather = Weather(np.array(times) * 3600.0, np.array(temps))
    else:
        temp = t.number("outdoor_temp_C", design.outdoor_temp_C, low=-50.0, high=40.0)
        weather = Weather(np.array([0.0, sim.duration_s]), np.array([temp, temp]))
    if np.any(weather.outdoor_temp_C < -50.0) or np.any(weather.outdoor_temp_C > 40.0):
        raise t.fail(
            "outdoor_temp_C",
            "values must lie within -50 to 40 °C, got "
            f"{weather.outdoor_temp_C.tolist()}",
        )
    t.reject_unknown()
    return weather


def _clock_s(t: Table, key: str, default: str) -> float:
    value = t.text(key, default)
    match = _CLOCK.match(value)
    if not match:
        raise t.fail(key, f"must be a clock time HH:MM, got {value!r}")
    return 3600.0 * int(match.group(1)) + 60.0 * int(match.group(2))


def _schedule(t: Table) -> Schedule:
    start = _clock_s(t, "start_clock", "05:00")
    comfort = _clock_s(t, "comfort_from", t.data.get("start_clock", "05:00"))
    if comfort < start:
        raise t.fail(
            "comfort_from", "must not be before start_clock (times out of order)"
        )
    schedule = Schedule(
        start_clock_s=start,
        comfort_start_s=comfort - start,
        before_comfort=t.text("before_comfort", "off", choices={"off", "setback"}),
        setback_setpoint_C=t.number("setback_setpoint_C", 15.0, low=5.0, high=30.0),
    )
    t.reject_unknown()
    return schedule


def _schemes(t: Table) -> tuple[str, ...]:
    from simheat.hydraulics.layouts import SCHEMES

    names = t.raw("schemes", ["direct_return", "reverse_return"])
    if not isinstance(names, list) or not names:
        raise t.fail("schemes", "must be a non-empty list of scheme names")
    for i, name in enumerate(names):
        if not isinstance(name, str) or name not in SCHEMES:
            known = ", ".join(sorted(SCHEMES))
            raise t.fail(f"schemes[{i}]", f"unknown scheme {name!r}; known: {known}")
    return tuple(names)


# --- piping layout keys ([[route.floors]] geometry and [layout]) -----------------
def _floor_layout(ft: Table, tees: list[Tee], emitter_ids: dict[str, int]) -> dict:
    """A floor's optional ring closing, manifold position and split point."""
    from simheat.hydraulics.layouts.geometry import run_extent_m, split_run

    keys: dict = {}
    if ft.has("closing_length_m"):
        keys["closing_length_m"] = ft.number(
            "closing_length_m", positive=True, high=MAX_PIPE_LENGTH_M
        )
    if ft.has("manifold_position_m"):
        keys["manifold_position_m"] = ft.number(
            "manifold_position_m", non_negative=True, high=MAX_PIPE_LENGTH_M
        )
    if ft.has("split_after_emitter"):
        name = ft.text("split_after_emitter")
        on_floor = {emitter_ids.get(name)} & {t.emitter for t in tees}
        if not on_floor:
            raise ft.fail(
                "split_after_emitter", f"emitter {name!r} is not on this floor's run"
            )
        keys["split_after"] = emitter_ids[name]
    if not keys:
        return keys
    floor = FloorRoute(0, 0.0, None, None, tuple(tees), **keys)
    extent = run_extent_m(floor)
    if keys.get("manifold_position_m", 0.0) > extent:
        raise ft.fail(
            "manifold_position_m",
            f"must lie on the run, 0 to {extent:g} m "
            f"({'round the ring' if floor.closing_length_m else 'to the last tee'}), "
            f"got {keys['manifold_position_m']:g}",
        )
    if "split_after" in keys:
        split_run(floor, np.ones(max(emitter_ids.values()) + 1), ft.path)
    return keys


def _primary_pump(t: Table, duration_s: float) -> Pump | None:
    if not t.has("primary_pump"):
        return None
    return _pump(t.table("primary_pump"), duration_s)


def _layout(t: Table, route: Route, duration_s: float) -> LayoutOptions:
    """The ``[layout]`` table: one-pipe tees, pipes, pumps, fittings, sizing."""
    from simheat.hydraulics.fittings import FITTING_KEYS

    if t.has("one_pipe_emitter_share") and t.has("one_pipe_tee_zeta"):
        raise t.fail(
            "one_pipe_emitter_share",
            "give only one of one_pipe_emitter_share or one_pipe_tee_zeta, got both",
        )
    share = None
    if t.has("one_pipe_emitter_share"):
        share = t.number("one_pipe_emitter_share")
        if share <= 0.0:
            raise t.fail(
                "one_pipe_emitter_share",
                f"must be > 0 (at 0 the diverter tees pass no water to the "
                f"emitters), got {share:g}",
            )
        if share >= 1.0:
            raise t.fail(
                "one_pipe_emitter_share",
                f"must be < 1 (at 1 the bypass is shut), got {share:g}",
            )
    tee_zeta = None
    if t.has("one_pipe_tee_zeta"):
        tee_zeta = t.number("one_pipe_tee_zeta", non_negative=True, high=1e4)
    floors = {f.floor for f in route.floors}
    floor_pumps = {}
    for pt in t.tables("floor_pumps", []):
        number = pt.integer("floor", low=-5, high=MAX_FLOOR)
        if number not in floors:
            raise pt.fail("floor", f"no floor {number} on the route")
        if number in floor_pumps:
            raise pt.fail("floor", f"floor {number} already has a pump")
        floor_pumps[number] = _pump(pt, duration_s)
    fittings = {}
    ft = t.table("fittings", {})
    for key, is_count in FITTING_KEYS.items():
        if ft.has(key):
            if is_count:
                fittings[key] = ft.integer(key, low=0, high=100)
            else:
                fittings[key] = ft.number(key, non_negative=True, high=1e4)
    ft.reject_unknown()
    st = t.table("sizing", {})
    sizing = SizingLimits(
        mode=st.text("mode", "given", choices={"given", "auto"}),
        header_velocity_max_m_s=st.number(
            "header_velocity_max_m_per_s", 0.7, positive=True, high=10.0
        ),
        branch_velocity_max_m_s=st.number(
            "branch_velocity_max_m_per_s", 0.5, positive=True, high=10.0
        ),
        gradient_max_Pa_m=st.number(
            "gradient_max_Pa_per_m", 150.0, positive=True, high=1e5
        ),
    )
    st.reject_unknown()
    layout = LayoutOptions(
        one_pipe_emitter_share=share,
        one_pipe_tee_zeta=tee_zeta,
        home_run_pipe=_pipe(t, "home_run_pipe") if t.has("home_run_pipe") else None,
        low_loss_header_pipe=(
            _pipe(t, "low_loss_header_pipe") if t.has("low_loss_header_pipe") else None
        ),
        low_loss_header_length_m=t.number(
            "low_loss_header_length_m", 0.5, positive=True, high=MAX_PIPE_LENGTH_M
        ),
        primary_pump=_primary_pump(t, duration_s),
        floor_pumps=floor_pumps,
        fittings=fittings,
        sizing=sizing,
    )
    t.reject_unknown()
    return layout
