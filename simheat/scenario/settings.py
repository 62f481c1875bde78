"""Settings written into a scenario's text, keeping its comments and layout.

Balancing ends in settings a user keeps in the scenario file: a preset, turns or
Kv per emitter, a preset per circuit valve, a speed or set head per pump.
:func:`with_settings` writes them into the scenario text with tomlkit, a
style-preserving TOML library, so the user's comments, key order and layout
survive; :func:`simheat.scenario.write.write_scenario_text` puts the text in a
file. Parsing the returned text (:func:`simheat.scenario.parse_scenario`) gives
the scenario the settings describe, so what is verified is what is written.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field

import tomlkit
from tomlkit.items import AoT, Table

from simheat.errors import ScenarioError

# Keys of [pump] copied when a pump of a "_floor_pumps" scheme that ran on the
# [pump] table gets a table of its own (stop_at_h stays with [pump], where it
# stops every pump).
PUMP_CURVE_KEYS = (
    "flow_m3_per_h",
    "head_kPa",
    "mode",
    "setpoint_kPa",
    "check_valve",
    "speed",
    "speed_steps",
    "setpoint_steps_kPa",
)
PLANT_PUMP = "pump"  # the [pump] table
PRIMARY_PUMP = "primary"  # [layout.primary_pump]


@dataclass(frozen=True)
class ScenarioSettings:
    """Settings to write into a scenario.

    Attributes
    ----------
    scheme : str or None
        Scheme the settings are for; it becomes the scenario's only scheme
        (settings of one scheme are wrong for another). None keeps the list. [-]
    emitters : dict of int to (str, float)
        Per emitter index, the key and value to set: ``("preset", x)`` [-],
        ``("lockshield_turns", x)`` [-] or ``("kv_m3_per_h", x)`` [m3/h].
    circuit_presets : dict of str to float
        Preset of each circuit valve by circuit name. [-]
    pumps : dict of (str or int) to (str, float)
        Per pump, the key and value to set (``("speed", x)`` [-] or
        ``("setpoint_kPa", x)`` [kPa]): ``"pump"`` for the ``[pump]`` table,
        ``"primary"`` for ``[layout.primary_pump]``, a floor number for that
        floor's ``[[layout.floor_pumps]]`` entry. A primary or floor pump
        without a table of its own gets one, copied from ``[pump]``.
    note : str
        Comment put beside ``schemes``; empty for none. [-]
    """

    scheme: str | None = None
    emitters: Mapping[int, tuple[str, float]] = field(default_factory=dict)
    circuit_presets: Mapping[str, float] = field(default_factory=dict)
    pumps: Mapping[str | int, tuple[str, float]] = field(default_factory=dict)
    note: str = ""


def with_settings(text: str, settings: ScenarioSettings) -> str:
    """The scenario text with the settings written in, comments and layout kept.

    Parameters
    ----------
    text : str
        A scenario's TOML text (valid: it was loaded before). [-]
    settings : ScenarioSettings
        What to write. [-]

    Returns
    -------
    str
        The new TOML text. Keys that exist keep their place; new keys are added
        at the end of their table; a pump table that did not exist is added at
        the end of ``[layout]``.

    Raises
    ------
    ScenarioError
        When the text is not TOML or lacks a table the settings need (an
        emitter index beyond ``[[emitters]]``).
    """
    try:
        doc = tomlkit.parse(text)
    except tomlkit.exceptions.TOMLKitError as exc:
        raise ScenarioError(f"scenario text is not TOML: {exc}") from None
    if settings.scheme is not None:
        doc["schemes"] = [settings.scheme]
        if settings.note:
            doc["schemes"].comment(settings.note)
    emitters = doc.get("emitters", [])
    for index, (key, value) in sorted(settings.emitters.items()):
        if not 0 <= index < len(emitters):
            raise ScenarioError(f"emitters[{index}]: no such emitter to set {key}")
        emitters[index][key] = value
    if settings.circuit_presets:
        valves = doc["layout"]["circuit_valves"]
        presets = valves.get("presets")
        if presets is None:
            presets = tomlkit.inline_table()
            valves["presets"] = presets
        for name, value in settings.circuit_presets.items():
            presets[name] = value
    for pump, (key, value) in settings.pumps.items():
        _pump_table(doc, pump)[key] = value
    return tomlkit.dumps(doc)


def _pump_table(doc, pump: str | int):
    """The table of a pump, made from a copy of ``[pump]`` when it has none."""
    if pump == PLANT_PUMP:
        return doc["pump"]
    layout = doc.get("layout")
    if layout is None:
        layout = tomlkit.table()
        doc["layout"] = layout
    if pump == PRIMARY_PUMP:
        table = layout.get("primary_pump")
        if table is None:
            table = _copy_of_pump(doc)
            layout["primary_pump"] = table
        return table
    entries = layout.get("floor_pumps")
    if entries is None:
        entries = AoT([])
        layout["floor_pumps"] = entries
    for entry in entries:
        if entry.get("floor") == pump:
            return entry
    table = tomlkit.table()
    table["floor"] = pump
    for key, value in _copy_of_pump(doc).items():
        table[key] = value
    entries.append(table)
    return entries[-1]


def _copy_of_pump(doc) -> Table:
    """A new table with the curve and control keys of ``[pump]``."""
    table = tomlkit.table()
    source = doc["pump"]
    for key in PUMP_CURVE_KEYS:
        if key in source:
            table[key] = (
                source[key].unwrap() if hasattr(source[key], "unwrap") else source[key]
            )
    return table
