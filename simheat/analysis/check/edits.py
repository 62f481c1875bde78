"""Changes to a scenario file, so that every fix ``check`` offers is a scenario.

A fix is a list of :class:`~simheat.scenario.edits.ScenarioEdit` (a key path
into the scenario's TOML and the new value, or a table appended to an array of
tables). :func:`apply_edits` makes them in the scenario's text with the one
TOML writer, :func:`simheat.scenario.edits.edited_text` (the user's comments
and layout kept), and validates the result with the loader, so a fix is
verified on exactly the scenario a user gets by making the same change to the
file. Everything here works on text in memory; writing a file belongs to
:mod:`simheat.scenario.write`.
"""

from __future__ import annotations

import tomllib
from collections.abc import Sequence

from simheat.scenario import Scenario, parse_scenario
from simheat.scenario.edits import KeyPath, ScenarioEdit, edited_text, key_text

__all__ = [
    "KeyPath",
    "ScenarioEdit",
    "apply_edits",
    "key_text",
    "read_document",
    "scenario_text",
]


def read_document(scenario: Scenario) -> dict:
    """The scenario's TOML document as plain nested dicts and lists.

    Parameters
    ----------
    scenario : Scenario
        A loaded scenario (its ``text``). [-]

    Returns
    -------
    dict
        The parsed document, a fresh copy (for reading values a fix starts
        from; the edits themselves go through :func:`scenario_text`).
    """
    return tomllib.loads(scenario.text)


def scenario_text(scenario: Scenario, edits: Sequence[ScenarioEdit]) -> str:
    """TOML text of the scenario with the edits made, comments and layout kept.

    Parameters
    ----------
    scenario : Scenario
        The scenario as loaded. [-]
    edits : sequence of ScenarioEdit
        Changes to its file. [-]

    Returns
    -------
    str
        The changed file.
    """
    return edited_text(scenario.text, edits, origin=str(scenario.source_path))


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
