"""Load a scenario file (TOML) into a validated :class:`Scenario` in SI units.

This is the one place where practical units in key names (``power_kW``, ``head_kPa``,
``volume_L``, ``flow_m3_per_h``, ``_min``, ``_h``) become SI. Each section of the
file has its reader module (:mod:`~simheat.scenario.rooms`,
:mod:`~simheat.scenario.emitters`, :mod:`~simheat.scenario.route`,
:mod:`~simheat.scenario.plant`, :mod:`~simheat.scenario.schedule`,
:mod:`~simheat.scenario.layout`); this module reads the sections in order and
checks what spans several of them.

Loading validates everything that the file's values decide on their own. Checks
that need a derived quantity (a set head against the fitted pump curve, a
manifold position or split point against the run) are made by the resolve step
(:func:`simheat.resolve.resolve`), with messages of the same form.
"""

from __future__ import annotations

import dataclasses
import re
import tomllib
from pathlib import Path

from simheat.errors import ScenarioError
from simheat.scenario.common import unique_ids
from simheat.scenario.emitters import read_emitter, read_valve_types
from simheat.scenario.fields import Table, shown
from simheat.scenario.layout import read_layout, read_schemes
from simheat.scenario.model import Emitter, Room, Scenario, Schedule, Simulation, Source
from simheat.scenario.plant import read_pump, read_source, read_weather
from simheat.scenario.rooms import read_design, read_room, read_wall
from simheat.scenario.route import read_route
from simheat.scenario.schedule import (
    DEFAULT_OFF_FROM,
    DEFAULT_WATER_TEMP_C,
    OLDER_START_C,
    clock_seconds,
    read_schedule,
    read_simulation,
)

# Largest scenario text read: the largest building simheat supports (see the
# README, "Problem size") takes well under 1 MB of TOML. [bytes]
MAX_SCENARIO_BYTES = 16_000_000
# Deepest nesting of arrays and inline tables (a scenario needs 3). [-]
MAX_NESTING = 32
# Most parts of one dotted key or table header (a scenario needs 3). [-]
MAX_KEY_PARTS = 32


def load_scenario(path: str | Path) -> Scenario:
    """Read and validate a scenario file.

    Parameters
    ----------
    path : str or Path
        Path of a TOML scenario file. [-]

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
    if path.is_dir():
        raise ScenarioError(f"{path}: is a directory; give a scenario file (.toml)")
    try:
        size = path.stat().st_size
        if size > MAX_SCENARIO_BYTES:
            raise ScenarioError(
                f"{path}: scenario file of {size / 1e6:.0f} MB is larger than "
                f"{MAX_SCENARIO_BYTES / 1e6:.0f} MB; a house's scenario is far smaller"
            )
        text = path.read_bytes().decode("utf-8-sig")
    except OSError as exc:
        raise ScenarioError(
            f"{path}: cannot read scenario file ({exc.strerror or exc})"
        ) from None
    except UnicodeDecodeError:
        raise ScenarioError(f"{path}: not a UTF-8 text file") from None
    return parse_scenario(text, origin=str(path))


def parse_scenario(
    text: str, origin: str = "<text>", *, without_night: bool = False
) -> Scenario:
    """Validate scenario text (TOML) into a :class:`Scenario`.

    Parameters
    ----------
    text : str
        TOML text of the scenario. [-]
    origin : str
        Name used in messages (usually the file path). [-]
    without_night : bool
        Read the text as simheat did before it simulated the night (run files
        of schema 2): a scenario that gives no initial state starts from 15 °C
        rooms and water instead of a night. [-]

    Returns
    -------
    Scenario
        The validated scenario in SI units.

    Raises
    ------
    ScenarioError
        On malformed TOML or any invalid field.
    """
    data = read_toml(text, origin)
    top = Table(data, "", origin)
    design = read_design(top.table("design"))
    room_tables = top.tables("rooms", min_len=1)
    room_ids = unique_ids(room_tables, "rooms")
    rooms = tuple(read_room(t, design, room_ids) for t in room_tables)
    walls = tuple(read_wall(t, room_ids) for t in top.tables("internal_walls", []))
    valve_types = read_valve_types(top.table("valve_types", {}))
    emitter_tables = top.tables("emitters", min_len=1)
    emitters = tuple(read_emitter(t, room_ids, valve_types) for t in emitter_tables)
    emitter_ids = unique_ids(emitter_tables, "emitters")
    route = read_route(top.table("route"), emitter_ids)
    source = read_source(top.table("source"))
    simulation = read_simulation(top.table("simulation", {}))
    pump = read_pump(top.table("pump"), simulation.duration_s)
    weather = read_weather(top.table("weather", {}), design, simulation)
    schedule = read_schedule(top.table("schedule", {}))
    schemes = read_schemes(top)
    layout = read_layout(
        top.table("layout", {}),
        route,
        simulation.duration_s,
        valve_types,
        tuple(emitter_ids),
        room_ids=room_ids,
        emitter_rooms=[e.room for e in emitters],
    )
    name = top.text("name")
    description = top.text("description", "")
    top.reject_unknown()
    _check_flow_above_setpoints(source, rooms, emitters, origin)
    _check_comfort_within_run(schedule, simulation, origin)
    if without_night and schedule.off_clock_s is None:
        simulation = _older_start(simulation, rooms)
    schedule, simulation, rooms = _initial_state(schedule, simulation, rooms, origin)
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
        valve_types=valve_types,
    )


def read_toml(text: str, origin: str = "<text>") -> dict:
    """Parse scenario text as TOML, refusing shapes no scenario has.

    A leading UTF-8 byte-order mark is dropped. Before the parser runs, a scan
    refuses arrays or inline tables nested deeper than :data:`MAX_NESTING` and
    dotted keys of more than :data:`MAX_KEY_PARTS` parts: the parser recurses
    per level and copies key prefixes per part, so a file of nested brackets or
    a 100,000-part key would exhaust the stack or the memory.

    Parameters
    ----------
    text : str
        TOML text. [-]
    origin : str
        Name used in messages (usually the file path). [-]

    Returns
    -------
    dict
        The parsed document.

    Raises
    ------
    ScenarioError
        On text larger than :data:`MAX_SCENARIO_BYTES`, too deep a nesting or
        too long a key, or malformed TOML (one line: the parser's message).
    """
    text = text.removeprefix("\ufeff")
    if len(text) > MAX_SCENARIO_BYTES:
        raise ScenarioError(
            f"{origin}: scenario text of {len(text) / 1e6:.0f} MB is larger than "
            f"{MAX_SCENARIO_BYTES / 1e6:.0f} MB; a house's scenario is far smaller"
        )
    _check_shape(text, origin)
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        message = " ".join(str(exc).split())
        raise ScenarioError(f"{origin}: malformed TOML: {message}") from None
    except RecursionError:
        raise ScenarioError(
            f"{origin}: malformed TOML: nested too deeply to read"
        ) from None


# What the shape scan stops at: quotes, comments, brackets, braces, dots and
# the characters that end a dotted key.
_SHAPE_MARKS = re.compile(r"[\"'#\[\]{}.=,\n]")


def _check_shape(text: str, origin: str) -> None:
    """Refuse deep nesting and long dotted keys before the TOML parser sees them.

    A small scan outside strings and comments: brackets and braces give the
    nesting depth; dots in a run of key text (no ``=``, comma, bracket, brace,
    newline or comment between them) count the parts of a dotted key (a number
    or a date has one dot at most). A string the scan cannot close is left to
    the parser to report.
    """
    depth = dots = 0
    line = 1
    i = 0
    while (mark := _SHAPE_MARKS.search(text, i)) is not None:
        i = mark.end()
        c = mark.group()
        if c in "\"'":
            quote = c * 3 if text.startswith(c * 3, mark.start()) else c
            end = text.find(quote, mark.start() + len(quote))
            while c == '"' and end > 0 and _escaped(text, end):
                end = text.find(quote, end + 1)
            if end < 0:
                return
            line += text.count("\n", i, end)
            i = end + len(quote)
        elif c == "#":
            end = text.find("\n", i)
            i = len(text) if end < 0 else end
        elif c in "[{":
            depth += 1
            dots = 0
            if depth > MAX_NESTING:
                raise ScenarioError(
                    f"{origin}: line {line}: arrays or tables nested more than "
                    f"{MAX_NESTING} deep; no scenario needs that"
                )
        elif c == ".":
            dots += 1
            if dots >= MAX_KEY_PARTS:
                raise ScenarioError(
                    f"{origin}: line {line}: a dotted key of more than "
                    f"{MAX_KEY_PARTS} parts; no scenario needs that"
                )
        else:  # "]", "}", "=", ",", newline
            dots = 0
            if c in "]}":
                depth = max(depth - 1, 0)
            elif c == "\n":
                line += 1


def _escaped(text: str, index: int) -> bool:
    """Whether the quote at ``index`` is escaped by an odd run of backslashes."""
    run = 0
    while index - 1 - run >= 0 and text[index - 1 - run] == "\\":
        run += 1
    return run % 2 == 1


def _check_flow_above_setpoints(
    source: Source, rooms: tuple[Room, ...], emitters: tuple[Emitter, ...], origin: str
) -> None:
    """The lowest flow temperature must lie above every heated room's setpoint."""
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
                f"{room.setpoint_C:g} °C of room {shown(room.id)} (heated by "
                f"emitters[{i}]), got {source.lowest_flow_temp_C:g} ({origin})"
            )


def _check_comfort_within_run(
    schedule: Schedule, simulation: Simulation, origin: str
) -> None:
    """Comfort must start before the simulation ends."""
    if schedule.comfort_start_s > simulation.duration_s:
        raise ScenarioError(
            f"schedule.comfort_from: comfort starts after the simulation ends "
            f"({schedule.comfort_start_s / 3600:g} h > "
            f"{simulation.duration_s / 3600:g} h) ({origin})"
        )


def _older_start(simulation: Simulation, rooms: tuple[Room, ...]) -> Simulation:
    """Rooms at 15 °C where nothing is given: the start before nights."""
    if simulation.initial_air_temp_C is not None or any(
        r.initial_air_temp_C is not None for r in rooms
    ):
        return simulation
    air = OLDER_START_C
    structure = simulation.initial_structure_temp_C
    return dataclasses.replace(
        simulation,
        initial_air_temp_C=air,
        initial_structure_temp_C=air if structure is None else structure,
    )


def _initial_state(
    schedule: Schedule, simulation: Simulation, rooms: tuple[Room, ...], origin: str
) -> tuple[Schedule, Simulation, tuple[Room, ...]]:
    """How the run starts: from the night (the default) or a given state.

    A given air or structure temperature (``[simulation]`` for every room, or a
    room's own) makes the state given: every room then has both (a room's own
    first, then ``[simulation]``'s, the structure falling back on the air), the
    water starts at ``initial_water_temp_C`` (default 15 °C) and there is no
    night. Otherwise the heating goes off at ``schedule.off_from`` (default
    22:00) and the water's temperature comes from the night.
    """
    given = (
        simulation.initial_air_temp_C is not None
        or simulation.initial_structure_temp_C is not None
        or any(
            r.initial_air_temp_C is not None or r.initial_structure_temp_C is not None
            for r in rooms
        )
    )
    if not given:
        if simulation.initial_water_temp_C is not None:
            raise ScenarioError(
                "simulation.initial_water_temp_C: sets the water of a given initial "
                "state; give the rooms' too (initial_air_temp_C), or remove it to "
                f"start from the night, which sets the water ({origin})"
            )
        if schedule.off_clock_s is None:
            schedule = dataclasses.replace(
                schedule, off_clock_s=clock_seconds(DEFAULT_OFF_FROM)
            )
        return schedule, simulation, rooms
    if schedule.off_clock_s is not None:
        raise ScenarioError(
            "schedule.off_from: a given initial state (initial_air_temp_C, "
            "initial_structure_temp_C or initial_room_temp_C) replaces the night; "
            f"give one or the other ({origin})"
        )
    started = []
    for i, room in enumerate(rooms):
        air = room.initial_air_temp_C
        if air is None:
            air = simulation.initial_air_temp_C
        if air is None:
            raise ScenarioError(
                f"rooms[{i}].initial_air_temp_C: required key is missing: a given "
                "initial state needs every room's air temperature (here, or "
                f"simulation.initial_air_temp_C for every room) ({origin})"
            )
        structure = room.initial_structure_temp_C
        if structure is None:
            structure = simulation.initial_structure_temp_C
        if structure is None:
            structure = air
        started.append(
            dataclasses.replace(
                room, initial_air_temp_C=air, initial_structure_temp_C=structure
            )
        )
    if simulation.initial_water_temp_C is None:
        simulation = dataclasses.replace(
            simulation, initial_water_temp_C=DEFAULT_WATER_TEMP_C
        )
    return schedule, simulation, tuple(started)
