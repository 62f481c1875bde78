"""Settings written into a scenario's text, keeping its comments and layout.

Balancing ends in settings a user keeps in the scenario file: a preset, turns or
Kv per emitter, a preset per circuit valve, a speed or set head per pump.
:func:`settings_edits` turns them into edits of the scenario file and
:func:`with_settings` makes those in the scenario text
(:func:`simheat.scenario.edits.edited_text`, the one TOML writer: the user's
comments, key order and layout survive);
:func:`simheat.scenario.write.write_scenario_text` puts the text in a file.
Parsing the returned text (:func:`simheat.scenario.parse_scenario`) gives the
scenario the settings describe, so what is verified is what is written.
"""

from __future__ import annotations

import tomllib
from collections.abc import Mapping
from dataclasses import dataclass, field

from simheat.errors import ScenarioError
from simheat.scenario.edits import ScenarioEdit, edited_text

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


def settings_edits(text: str, settings: ScenarioSettings) -> list[ScenarioEdit]:
    """The settings as edits to the scenario file (:mod:`simheat.scenario.edits`).

    Parameters
    ----------
    text : str
        A scenario's TOML text (valid: it was loaded before). [-]
    settings : ScenarioSettings
        What to write. [-]

    Returns
    -------
    list of ScenarioEdit
        ``schemes`` (with the note as its comment), then each emitter's key,
        the circuit presets (``[layout.circuit_valves] presets``, made when
        missing) and each pump's key. A primary or floor pump without a table
        of its own gets one: ``[layout.primary_pump]``, or an entry appended
        to ``[[layout.floor_pumps]]``, with the curve and control keys of
        ``[pump]``.

    Raises
    ------
    ScenarioError
        When the text is not TOML or lacks a table the settings need (an
        emitter index beyond ``[[emitters]]``).
    """
    try:
        doc = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise ScenarioError(f"scenario text is not TOML: {exc}") from None
    edits = []
    if settings.scheme is not None:
        edits.append(
            ScenarioEdit(("schemes",), [settings.scheme], comment=settings.note)
        )
    emitters = doc.get("emitters", [])
    for index, (key, value) in sorted(settings.emitters.items()):
        if not 0 <= index < len(emitters):
            raise ScenarioError(f"emitters[{index}]: no such emitter to set {key}")
        edits.append(ScenarioEdit(("emitters", index, key), value))
    if settings.circuit_presets:
        path = ("layout", "circuit_valves", "presets")
        if "presets" not in doc.get("layout", {}).get("circuit_valves", {}):
            edits.append(ScenarioEdit(path, dict(settings.circuit_presets)))
        else:
            edits += [
                ScenarioEdit((*path, name), value)
                for name, value in settings.circuit_presets.items()
            ]
    for pump, (key, value) in settings.pumps.items():
        edits.append(_pump_edit(doc, pump, key, value))
    return edits


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
        The new TOML text (:func:`settings_edits` made by
        :func:`simheat.scenario.edits.edited_text`). Keys that exist keep their
        place; new keys are added at the end of their table; a pump table that
        did not exist is added at the end of ``[layout]``.

    Raises
    ------
    ScenarioError
        When the text is not TOML or lacks a table the settings need (an
        emitter index beyond ``[[emitters]]``).
    """
    return edited_text(text, settings_edits(text, settings))


def _pump_edit(doc: dict, pump: str | int, key: str, value: float) -> ScenarioEdit:
    """Set a pump's key; a pump without a table gets one copied from ``[pump]``."""
    if pump == PLANT_PUMP:
        return ScenarioEdit(("pump", key), value)
    layout = doc.get("layout", {})
    if pump == PRIMARY_PUMP:
        if "primary_pump" in layout:
            return ScenarioEdit(("layout", "primary_pump", key), value)
        return ScenarioEdit(
            ("layout", "primary_pump"), {**_copy_of_pump(doc), key: value}
        )
    for i, entry in enumerate(layout.get("floor_pumps", [])):
        if entry.get("floor") == pump:
            return ScenarioEdit(("layout", "floor_pumps", i, key), value)
    return ScenarioEdit(
        ("layout", "floor_pumps"),
        {"floor": pump, **_copy_of_pump(doc), key: value},
        append=True,
    )


def _copy_of_pump(doc: dict) -> dict:
    """The curve and control keys of ``[pump]``."""
    return {k: doc["pump"][k] for k in PUMP_CURVE_KEYS if k in doc["pump"]}
