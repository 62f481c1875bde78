"""Changes to a scenario file, so that every fix ``check`` offers is a scenario.

A fix is a list of :class:`ScenarioEdit`: a key path into the scenario's TOML
(tables by key, arrays by index, as the loader's messages name them:
``route.floors[1].header_pipe``) and the new value, or an entry appended to an
array of tables. :func:`apply_edits` writes the changed document back to TOML
text and validates it with the loader, so a fix is verified on exactly the
scenario a user gets by making the same change to the file.
"""

from __future__ import annotations

import copy
import tomllib
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import tomli_w

from simheat.scenario import Scenario, parse_scenario

KeyPath = tuple[str | int, ...]


@dataclass(frozen=True)
class ScenarioEdit:
    """One change to a scenario file.

    Attributes
    ----------
    path : tuple of str and int
        Keys of tables and indices of arrays down to the value. [-]
    value : object
        The new value (TOML-ready: numbers, strings, lists, tables). [-]
    append : bool
        Append ``value`` (a table) to the array of tables at ``path`` instead of
        setting it; the array is created when missing. [-]
    """

    path: KeyPath
    value: Any
    append: bool = False

    @property
    def key(self) -> str:
        """The path as the loader's messages write it, ``route.floors[1].x``."""
        return key_text(self.path)

    def text(self) -> str:
        """The change as one line: ``key = value`` or ``key += {...}``."""
        rendered = _value_text(self.value)
        return (
            f"{self.key} += {rendered}" if self.append else f"{self.key} = {rendered}"
        )


def key_text(path: KeyPath) -> str:
    """A key path as text, indices in brackets.

    Parameters
    ----------
    path : tuple of str and int
        The key path. [-]

    Returns
    -------
    str
        ``"route.floors[1].tees[2].header_length_m"``.

    Examples
    --------
    >>> key_text(("route", "floors", 1, "tees", 2, "header_length_m"))
    'route.floors[1].tees[2].header_length_m'
    """
    out = ""
    for step in path:
        if isinstance(step, int):
            out += f"[{step}]"
        else:
            out += f".{step}" if out else step
    return out


def _value_text(value: Any) -> str:
    """A value in TOML's inline syntax."""
    if isinstance(value, dict):
        return (
            "{ " + ", ".join(f"{k} = {_value_text(v)}" for k, v in value.items()) + " }"
        )
    if isinstance(value, list):
        return "[" + ", ".join(_value_text(v) for v in value) + "]"
    if isinstance(value, float):
        return f"{value:.6g}" if value != int(value) else f"{value:.1f}"
    return tomli_w.dumps({"v": value}).split("=", 1)[1].strip()


def read_document(scenario: Scenario) -> dict:
    """The scenario's TOML document as nested dicts and lists.

    Parameters
    ----------
    scenario : Scenario
        A loaded scenario (its ``text``). [-]

    Returns
    -------
    dict
        The parsed document, a fresh copy.
    """
    return tomllib.loads(scenario.text)


def edit_document(document: dict, edits: Sequence[ScenarioEdit]) -> dict:
    """A copy of a TOML document with the edits applied.

    Parameters
    ----------
    document : dict
        Parsed scenario. [-]
    edits : sequence of ScenarioEdit
        Changes, applied in order. [-]

    Returns
    -------
    dict
        The changed copy.

    Raises
    ------
    KeyError, IndexError
        When a path does not lead into the document (a bug in the caller: every
        path is built from the scenario itself).

    Examples
    --------
    >>> doc = {"route": {"floors": [{"floor": 0, "header_pipe": "cu_15x1"}]}}
    >>> edit = ScenarioEdit(("route", "floors", 0, "header_pipe"), "cu_22x1")
    >>> edit_document(doc, [edit])["route"]["floors"][0]["header_pipe"]
    'cu_22x1'
    """
    changed = copy.deepcopy(document)
    for edit in edits:
        parent: Any = changed
        for step in edit.path[:-1]:
            parent = (
                parent[step] if isinstance(step, int) else parent.setdefault(step, {})
            )
        last = edit.path[-1]
        if edit.append:
            parent.setdefault(last, []).append(copy.deepcopy(edit.value))
        else:
            parent[last] = copy.deepcopy(edit.value)
    return changed


def apply_edits(scenario: Scenario, edits: Sequence[ScenarioEdit]) -> Scenario:
    """The scenario with the edits made to its file, loaded and validated again.

    Parameters
    ----------
    scenario : Scenario
        The scenario as loaded. [-]
    edits : sequence of ScenarioEdit
        Changes to its file. [-]

    Returns
    -------
    Scenario
        The changed scenario; its ``text`` is the changed file.

    Raises
    ------
    ScenarioError
        When the changed file does not validate.
    """
    return parse_scenario(
        scenario_text(scenario, edits), origin=f"{scenario.source_path} (changed)"
    )


def scenario_text(scenario: Scenario, edits: Sequence[ScenarioEdit]) -> str:
    """TOML text of the scenario with the edits made.

    Parameters
    ----------
    scenario : Scenario
        The scenario as loaded. [-]
    edits : sequence of ScenarioEdit
        Changes to its file. [-]

    Returns
    -------
    str
        The changed file (comments of the original are not kept).
    """
    return tomli_w.dumps(edit_document(read_document(scenario), edits))
