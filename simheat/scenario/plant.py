"""Scenario sections ``[source]``, ``[pump]`` (and its kin) and ``[weather]``.

The heat source is a boiler (a fixed power limit) or a heat pump (capacity and
COP from a rating table, ``[source.heat_pump]``); its flow temperature is fixed,
scheduled, or a heating curve on the outdoor temperature. Pump tables give
head-curve points, a control mode and a stop time; the resolve step fits the
curve and checks the set head against it (:mod:`simheat.resolve.pumps`).
"""

from __future__ import annotations

import math

import numpy as np

from simheat.physics.heat_pump import carnot_cop
from simheat.scenario.common import (
    MAX_FLOW_TEMP_C,
    MAX_OUTDOOR_C,
    MAX_SCHEDULE_TIME_H,
    MAX_WATER_L,
    MIN_FLOW_TEMP_C,
    MIN_OUTDOOR_C,
)
from simheat.scenario.fields import Table, shown
from simheat.scenario.heat_pump import SOURCE_KINDS, HeatPump
from simheat.scenario.model import (
    PUMP_MODES,
    Design,
    Pump,
    Simulation,
    Source,
    Weather,
)

MAX_PUMP_FLOW_M3_H = 100.0  # [m3/h]
MAX_PUMP_HEAD_KPA = 1000.0  # [kPa]
# Shut-off head of a pump: the smallest circulators give about 10 kPa at zero
# flow; below 1 kPa a "pump" moves no water through a house. [kPa]
MIN_SHUT_OFF_HEAD_KPA = 1.0
# Points of a head curve closer in flow than this make the quadratic fit
# through them meaningless (a data sheet's points lie 0.1 m3/h apart or more). [m3/h]
MIN_PUMP_FLOW_STEP_M3_H = 0.01
# Source power: 0.1 kW is far below the smallest heat source (a source short of
# the load is a finding to report, not an input error); 1000 kW is a block's
# plant room. [kW]
MIN_SOURCE_POWER_KW = 0.1
MAX_SOURCE_POWER_KW = 1000.0
# Water content of the source: a plate exchanger holds about 0.1 L, a buffer
# store up to the upper bound; 10 mL is the floor (a near-empty source for
# idealised checks; less only stiffens the integration). [L]
MIN_SOURCE_WATER_L = 0.01
DEFAULT_SOURCE_WATER_L = 3.0  # a wall-hung source's own content, common [L]
# Range of a heat pump table's axes: outdoor air a unit can work in, and water
# temperatures from floor heating to the hottest a refrigerant circuit gives
# (our plausibility bounds). [°C]
HEAT_PUMP_OUTDOOR_RANGE_C = (-40.0, 40.0)
HEAT_PUMP_FLOW_RANGE_C = (20.0, 95.0)
# Lowest speed setting of a fixed-speed pump, as a fraction of its curve's speed.
# Our bound: the affinity laws that scale the curve overstate the head at low
# speed, and below about a fifth of full speed a small circulator no longer
# delivers a usable head at all (from memory of circulator data sheets). [-]
MIN_PUMP_SPEED = 0.2


def read_source(t: Table) -> Source:
    """The ``[source]`` table: kind, power or rating table, water, one flow control.

    Parameters
    ----------
    t : Table
        The ``[source]`` table.

    Returns
    -------
    Source
        Kind, power limit [W] (a boiler's ``max_power_kW``; a heat pump's largest
        rated capacity), water content [m3], the flow-temperature control: fixed,
        scheduled (times [s], temperatures [°C]) or a heating curve (outdoor and
        flow temperatures [°C]), and a heat pump's table
        (``[source.heat_pump]``).
    """
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
        flow_temp = t.number("flow_temp_C", low=MIN_FLOW_TEMP_C, high=MAX_FLOW_TEMP_C)
    elif t.has("flow_temp_schedule"):
        schedule_time, schedule_temp = _flow_schedule(t.table("flow_temp_schedule"))
        flow_temp = max(schedule_temp)
    else:
        curve_outdoor, curve_flow = _heating_curve(t.table("heating_curve"))
        flow_temp = max(curve_flow)
    kind = t.text("kind", "boiler", choices=set(SOURCE_KINDS))
    heat_pump = None
    if kind == "heat_pump":
        if t.has("max_power_kW"):
            raise t.fail(
                "max_power_kW",
                "not used with kind heat_pump: its capacity comes from "
                "[source.heat_pump] capacity_kW",
            )
        if not t.has("heat_pump"):
            raise t.fail("heat_pump", "required table is missing for kind heat_pump")
        heat_pump = _heat_pump(t.table("heat_pump"))
        max_power_W = float(np.max(heat_pump.capacity_W))
    else:
        if t.has("heat_pump"):
            raise t.fail(
                "heat_pump", f"applies only to kind heat_pump, but kind is {kind}"
            )
        max_power_W = 1e3 * t.number(
            "max_power_kW", low=MIN_SOURCE_POWER_KW, high=MAX_SOURCE_POWER_KW
        )
    source = Source(
        max_power_W=max_power_W,
        flow_temp_C=flow_temp,
        water_volume_m3=t.number(
            "water_volume_L",
            DEFAULT_SOURCE_WATER_L,
            low=MIN_SOURCE_WATER_L,
            high=MAX_WATER_L,
        )
        / 1e3,
        flow_schedule_time_s=schedule_time,
        flow_schedule_temp_C=schedule_temp,
        curve_outdoor_temp_C=curve_outdoor,
        curve_flow_temp_C=curve_flow,
        kind=kind,
        heat_pump=heat_pump,
    )
    t.reject_unknown()
    return source


def _heat_pump(ht: Table) -> HeatPump:
    """``[source.heat_pump]``: rating axes, capacity and COP tables, limits.

    Axes strictly increasing with at least two points each, within
    :data:`HEAT_PUMP_OUTDOOR_RANGE_C` and :data:`HEAT_PUMP_FLOW_RANGE_C`; one
    row of ``capacity_kW`` and of ``cop`` per outdoor temperature, one value per
    flow temperature; capacities > 0; COP > 0 and not above the Carnot COP of
    its point (no machine beats the second law).
    """
    outdoor = _axis(ht, "outdoor_temp_C", HEAT_PUMP_OUTDOOR_RANGE_C)
    flow = _axis(ht, "flow_temp_C", HEAT_PUMP_FLOW_RANGE_C)
    capacity_kW = _rows(ht, "capacity_kW", outdoor, flow, MAX_SOURCE_POWER_KW)
    cop = _rows(ht, "cop", outdoor, flow, None)
    for i, row in enumerate(cop):
        for j, value in enumerate(row):
            ideal = float(carnot_cop(flow[j], outdoor[i]))
            if value > ideal:
                raise ht.fail(
                    f"cop[{i}][{j}]",
                    f"{value:g} is above the Carnot COP {ideal:.3g} of outdoor "
                    f"{outdoor[i]:g} °C and flow {flow[j]:g} °C, which no heat "
                    "pump reaches (check the units and the row order)",
                )
    heat_pump = HeatPump(
        outdoor_temp_C=np.array(outdoor),
        flow_temp_C=np.array(flow),
        capacity_W=1e3 * np.array(capacity_kW),
        cop=np.array(cop),
        min_flow_m3_s=ht.number(
            "min_flow_m3_per_h", 0.0, non_negative=True, high=MAX_PUMP_FLOW_M3_H
        )
        / 3600.0,
        buffer_volume_m3=ht.number(
            "buffer_volume_L", 0.0, non_negative=True, high=MAX_WATER_L
        )
        / 1e3,
    )
    ht.reject_unknown()
    return heat_pump


def _axis(ht: Table, key: str, bounds: tuple[float, float]) -> list[float]:
    """A rating axis: at least two temperatures, strictly increasing, in bounds."""
    values = ht.numbers(key, min_len=2)
    if any(b <= a for a, b in zip(values, values[1:], strict=False)):
        raise ht.fail(key, f"must be strictly increasing, got {shown(values)}")
    low, high = bounds
    if any(not low <= x <= high for x in values):
        raise ht.fail(
            key, f"values must lie within {low:g} to {high:g}, got {shown(values)}"
        )
    return values


def _rows(
    ht: Table,
    key: str,
    outdoor: list[float],
    flow: list[float],
    high: float | None,
) -> list[list[float]]:
    """A rating table: one row per outdoor temperature, one value per flow, > 0."""
    rows = ht.raw(key)
    if not isinstance(rows, list) or not all(isinstance(r, list) for r in rows):
        raise ht.fail(
            key,
            "must be a list of rows (one per outdoor temperature), each a list of "
            f"numbers (one per flow temperature), got {shown(rows)}",
        )
    if len(rows) != len(outdoor):
        raise ht.fail(
            key,
            f"must have one row per outdoor temperature ({len(outdoor)}), "
            f"got {len(rows)}",
        )
    out = []
    for i, row in enumerate(rows):
        if len(row) != len(flow):
            raise ht.fail(
                f"{key}[{i}]",
                f"must have one value per flow temperature ({len(flow)}), "
                f"got {len(row)}",
            )
        values = []
        for j, value in enumerate(row):
            where = f"{key}[{i}][{j}]"
            if isinstance(value, bool) or not isinstance(value, int | float):
                raise ht.fail(where, f"must be a number, got {shown(value)}")
            if not math.isfinite(value) or value <= 0.0:
                raise ht.fail(where, f"must be > 0, got {shown(value)}")
            if high is not None and value > high:
                raise ht.fail(where, f"must be <= {high:g}, got {value:g}")
            values.append(float(value))
        out.append(values)
    return out


def _flow_schedule(st: Table) -> tuple[tuple[float, ...], tuple[float, ...]]:
    """``[source.flow_temp_schedule]``: times [s] and flow temperatures [°C]."""
    times = st.numbers("time_h", min_len=1)
    temps = st.numbers("flow_temp_C", min_len=1)
    if len(times) != len(temps):
        raise st.fail("flow_temp_C", "must have one value per entry of time_h")
    if any(b <= a for a, b in zip(times, times[1:], strict=False)):
        raise st.fail(
            "time_h",
            f"times must be strictly increasing (in order), got {shown(times)}",
        )
    if any(not 0.0 <= x <= MAX_SCHEDULE_TIME_H for x in times):
        raise st.fail(
            "time_h",
            f"times must lie within 0 to {MAX_SCHEDULE_TIME_H:g} h, got {shown(times)}",
        )
    if any(not MIN_FLOW_TEMP_C <= x <= MAX_FLOW_TEMP_C for x in temps):
        raise st.fail(
            "flow_temp_C",
            f"values must lie within {MIN_FLOW_TEMP_C:g} to {MAX_FLOW_TEMP_C:g}, "
            f"got {shown(temps)}",
        )
    st.reject_unknown()
    return tuple(3600.0 * x for x in times), tuple(float(x) for x in temps)


def _heating_curve(ct: Table) -> tuple[tuple[float, ...], tuple[float, ...]]:
    """``[source.heating_curve]``: outdoor [°C] and flow temperatures [°C]."""
    outdoor = ct.numbers("outdoor_temp_C", min_len=2)
    flow = ct.numbers("flow_temp_C", min_len=2)
    if len(outdoor) != len(flow):
        raise ct.fail("flow_temp_C", "must have one value per entry of outdoor_temp_C")
    if any(b <= a for a, b in zip(outdoor, outdoor[1:], strict=False)):
        raise ct.fail(
            "outdoor_temp_C", f"must be strictly increasing, got {shown(outdoor)}"
        )
    if any(not MIN_OUTDOOR_C <= x <= MAX_OUTDOOR_C for x in outdoor):
        raise ct.fail(
            "outdoor_temp_C",
            f"values must lie within {MIN_OUTDOOR_C:g} to {MAX_OUTDOOR_C:g}, "
            f"got {shown(outdoor)}",
        )
    if any(not MIN_FLOW_TEMP_C <= x <= MAX_FLOW_TEMP_C for x in flow):
        raise ct.fail(
            "flow_temp_C",
            f"values must lie within {MIN_FLOW_TEMP_C:g} to {MAX_FLOW_TEMP_C:g}, "
            f"got {shown(flow)}",
        )
    if any(b > a for a, b in zip(flow, flow[1:], strict=False)):
        raise ct.fail(
            "flow_temp_C",
            "must not rise as the outdoor temperature rises (a heating curve "
            f"falls), got {shown(flow)}",
        )
    ct.reject_unknown()
    return tuple(float(x) for x in outdoor), tuple(float(x) for x in flow)


def read_pump(t: Table, duration_s: float) -> Pump:
    """A pump table: head-curve points, control mode, check valve and stop time.

    The points must be distinct in flow and the head must fall with flow (after
    sorting by flow each head no higher than the one before, the last below the
    first). ``stop_at_h`` must lie within the run (0 to ``duration_s``). The
    same keys are read in ``[pump]``, ``[layout.primary_pump]`` and each
    ``[[layout.floor_pumps]]``; which pumps a stop time stops is decided by the
    table it sits in (see :func:`simheat.dynamics.controls.pump_stop_times_s`).

    Parameters
    ----------
    t : Table
        The pump's table. [-]
    duration_s : float
        Simulated time, the latest stop time. [s]

    Returns
    -------
    Pump
        Points (volume flow [m3/s], head [Pa]), stop time [s], control mode,
        set head [Pa] and check valve.
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
            f"flows must lie within 0 to {MAX_PUMP_FLOW_M3_H:g} m3/h, "
            f"got {shown(flow_m3_h)}",
        )
    if len(set(flow_m3_h)) != len(flow_m3_h):
        raise t.fail("flow_m3_per_h", f"flows must be distinct, got {shown(flow_m3_h)}")
    ordered = sorted(flow_m3_h)
    if any(
        b - a < MIN_PUMP_FLOW_STEP_M3_H
        for a, b in zip(ordered, ordered[1:], strict=False)
    ):
        raise t.fail(
            "flow_m3_per_h",
            f"flows must lie at least {MIN_PUMP_FLOW_STEP_M3_H:g} m3/h apart "
            f"(a curve through closer points is meaningless), got {shown(flow_m3_h)}",
        )
    if any(abs(h) > MAX_PUMP_HEAD_KPA for h in head_kPa):
        raise t.fail(
            "head_kPa",
            f"heads must lie within -{MAX_PUMP_HEAD_KPA:g} to {MAX_PUMP_HEAD_KPA:g} "
            f"kPa, got {shown(head_kPa)}",
        )
    by_flow = sorted(zip(flow_m3_h, head_kPa, strict=True))
    heads = [h for _, h in by_flow]
    if max(heads) < MIN_SHUT_OFF_HEAD_KPA:
        raise t.fail(
            "head_kPa",
            f"the highest head must be at least {MIN_SHUT_OFF_HEAD_KPA:g} kPa (a "
            f"pump that moves water), got {shown(head_kPa)}",
        )
    if any(b > a for a, b in zip(heads, heads[1:], strict=False)) or not (
        heads[-1] < heads[0]
    ):
        raise t.fail(
            "head_kPa",
            f"head_kPa must fall with flow, got {shown(heads)} at flows "
            f"{[q for q, _ in by_flow]} m3/h",
        )
    stop_s = None
    if t.has("stop_at_h"):
        stop_h = t.number("stop_at_h", non_negative=True, high=MAX_SCHEDULE_TIME_H)
        if stop_h * 3600.0 > duration_s:
            raise t.fail(
                "stop_at_h",
                f"must not be after the end of the simulation "
                f"({duration_s / 3600:g} h), got {stop_h:g}",
            )
        stop_s = 3600.0 * stop_h
    mode = t.text("mode", "fixed_speed", choices=set(PUMP_MODES))
    setpoint_Pa = _pump_setpoint_Pa(t, mode)
    check_valve = t.boolean("check_valve") if t.has("check_valve") else None
    speed, speed_steps, setpoint_steps_Pa = _pump_settings(t, mode)
    t.reject_unknown()
    return Pump(
        flow_m3_s=np.array(flow_m3_h) / 3600.0,
        head_Pa=np.array(head_kPa) * 1e3,
        stop_s=stop_s,
        mode=mode,
        setpoint_Pa=setpoint_Pa,
        check_valve=check_valve,
        speed=speed,
        speed_steps=speed_steps,
        setpoint_steps_Pa=setpoint_steps_Pa,
    )


def _pump_settings(t: Table, mode: str):
    """Speed setting [-] and the available speeds [-] or set heads [Pa].

    ``speed`` and ``speed_steps`` belong to a fixed-speed pump (a regulated
    pump sets its own speed); ``setpoint_steps_kPa`` to a regulated one. Steps
    must be strictly increasing; whether set heads lie below the curve's
    shut-off head is checked by the resolve step, which fits the curve.
    """
    regulated = mode != "fixed_speed"
    for key in ("speed", "speed_steps") if regulated else ("setpoint_steps_kPa",):
        if t.has(key):
            other = "fixed_speed" if regulated else "constant_dp or proportional_dp"
            raise t.fail(key, f"applies only to mode {other}, but mode is {mode}")
    speed = t.number("speed", 1.0, low=MIN_PUMP_SPEED, high=1.0)
    speed_steps = setpoint_steps = None
    if t.has("speed_steps"):
        speed_steps = tuple(t.numbers("speed_steps"))
        if any(not MIN_PUMP_SPEED <= x <= 1.0 for x in speed_steps):
            raise t.fail(
                "speed_steps",
                f"speeds must lie within {MIN_PUMP_SPEED:g} to 1, got "
                f"{list(speed_steps)}",
            )
        _increasing(t, "speed_steps", speed_steps)
    if t.has("setpoint_steps_kPa"):
        steps_kPa = t.numbers("setpoint_steps_kPa")
        if any(not 0.0 < x <= MAX_PUMP_HEAD_KPA for x in steps_kPa):
            raise t.fail(
                "setpoint_steps_kPa",
                f"every step must be > 0 and at most {MAX_PUMP_HEAD_KPA:g} kPa, "
                f"got {shown(steps_kPa)}",
            )
        _increasing(t, "setpoint_steps_kPa", steps_kPa)
        setpoint_steps = tuple(1e3 * x for x in steps_kPa)
    return speed, speed_steps, setpoint_steps


def _increasing(t: Table, key: str, values) -> None:
    if any(b <= a for a, b in zip(values, values[1:], strict=False)):
        raise t.fail(key, f"must be strictly increasing, got {list(values)}")


def _pump_setpoint_Pa(t: Table, mode: str) -> float:
    """Set head of a regulated pump [Pa]: required and > 0; 0 at fixed speed.

    Whether it lies below the fitted curve's shut-off head is checked by the
    resolve step, which fits the curve.
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
    return t.number("setpoint_kPa", positive=True, high=MAX_PUMP_HEAD_KPA) * 1e3


def read_weather(t: Table, design: Design, sim: Simulation) -> Weather:
    """The ``[weather]`` table: an outdoor series, or one held temperature.

    Parameters
    ----------
    t : Table
        The ``[weather]`` table (empty when absent).
    design : Design
        Design conditions: the held outdoor temperature by default. [°C]
    sim : Simulation
        Simulation settings: the held temperature spans the run. [s]

    Returns
    -------
    Weather
        Times from the start [s] and outdoor temperatures. [°C]
    """
    if t.has("time_h"):
        times = t.numbers("time_h", min_len=2)
        if any(abs(time) > MAX_SCHEDULE_TIME_H for time in times):
            raise t.fail(
                "time_h",
                f"times must lie within -{MAX_SCHEDULE_TIME_H:g} to "
                f"{MAX_SCHEDULE_TIME_H:g} h, got {shown(times)}",
            )
        temps = t.numbers("outdoor_temp_C", min_len=2)
        if len(times) != len(temps):
            raise t.fail("outdoor_temp_C", "must have one value per entry of time_h")
        if any(b <= a for a, b in zip(times, times[1:], strict=False)):
            raise t.fail("time_h", "times must be strictly increasing")
        weather = Weather(np.array(times) * 3600.0, np.array(temps))
    else:
        temp = t.number(
            "outdoor_temp_C",
            design.outdoor_temp_C,
            low=MIN_OUTDOOR_C,
            high=MAX_OUTDOOR_C,
        )
        weather = Weather(np.array([0.0, sim.duration_s]), np.array([temp, temp]))
    if np.any(weather.outdoor_temp_C < MIN_OUTDOOR_C) or np.any(
        weather.outdoor_temp_C > MAX_OUTDOOR_C
    ):
        raise t.fail(
            "outdoor_temp_C",
            f"values must lie within {MIN_OUTDOOR_C:g} to {MAX_OUTDOOR_C:g} °C, got "
            f"{shown(weather.outdoor_temp_C.tolist())}",
        )
    t.reject_unknown()
    return weather
