"""Edits to a scenario's TOML text at key paths, comments and layout kept.

simheat's one writer of changes to a user's scenario text (the only other TOML
simheat writes is a sweep's generated variant text, written from a plain dict
by tomli-w in :func:`simheat.batch.variant.variant_text`, where no comment or
layout needs keeping). A change to a scenario file is a list of
:class:`ScenarioEdit`: a key path (tables by key, arrays by index, as the
loader's messages name them: ``route.floors[1].header_pipe``) and the new
value, or a table appended to an array of tables. :func:`edited_text` makes the
edits in the text with tomlkit, a style-preserving TOML library: comments, key
order and the layout of everything not edited stay as the user wrote them, and
a new value takes the form of the one it replaces (an inline array of inline
tables stays one, on one line per table if it was so written). Parsing the
returned text (:func:`simheat.scenario.parse_scenario`) gives the changed
scenario, so what is verified is what a user gets by making the same change.

Text in, text out: writing a file is :func:`simheat.scenario.write.write_scenario_text`.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any

import tomlkit
from tomlkit.items import AoT, Array, InlineTable, Table

from simheat.errors import ScenarioError

KeyPath = tuple[str | int, ...]


@dataclass(frozen=True)
class ScenarioEdit:
    """One change to a scenario file.

    Attributes
    ----------
    path : tuple of str and int
        Keys of tables and indices of arrays down to the value. [-]
    value : object
        The new value (TOML-ready: numbers, strings, lists, tables as dicts). [-]
    append : bool
        Append ``value`` (a table) to the array of tables at ``path`` instead of
        setting it; the array is created when missing. [-]
    comment : str
        Comment written beside the value; empty for none. [-]
    """

    path: KeyPath
    value: Any
    append: bool = False
    comment: str = ""

    @property
    def key(self) -> str:
        """The path as the loader's messages write it, ``route.floors[1].x``."""
        return key_text(self.path)

    def text(self) -> str:
        """The change as one line: ``key = value`` or ``key += {...}``."""
        rendered = value_text(self.value)
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


def value_text(value: Any) -> str:
    """A value in TOML's inline syntax, floats to six significant digits.

    Parameters
    ----------
    value : object
        A TOML-ready value. [-]

    Returns
    -------
    str
        The value as it reads in a file (tables inline).

    Examples
    --------
    >>> value_text({"emitter": "rad_c", "header_length_m": 4.25, "on": True})
    '{ emitter = "rad_c", header_length_m = 4.25, on = true }'
    >>> value_text([1.0, 0.333333333])
    '[1.0, 0.333333]'
    """
    if isinstance(value, Mapping):
        return (
            "{ " + ", ".join(f"{k} = {value_text(v)}" for k, v in value.items()) + " }"
        )
    if isinstance(value, list | tuple):
        return "[" + ", ".join(value_text(v) for v in value) + "]"
    if isinstance(value, float) and not isinstance(value, bool):
        return f"{value:.6g}" if value != int(value) else f"{value:.1f}"
    return tomlkit.item(value).as_string()


def parse_document(text: str, origin: str = "<text>") -> tomlkit.TOMLDocument:
    """A scenario's text as a style-preserving TOML document.

    The document behaves as nested dicts and lists (tomlkit's tables and arrays
    subclass them), so code that walks parsed TOML can edit it in place;
    :func:`document_text` gives the text back with everything not edited as
    written.

    Parameters
    ----------
    text : str
        TOML text. [-]
    origin : str
        Name used in messages (usually the file path). [-]

    Returns
    -------
    tomlkit.TOMLDocument
        The parsed document.

    Raises
    ------
    ScenarioError
        When the text is not TOML.
    """
    try:
        return tomlkit.parse(text)
    except tomlkit.exceptions.TOMLKitError as exc:
        raise ScenarioError(f"{origin}: malformed TOML: {exc}") from None


def document_text(document: tomlkit.TOMLDocument) -> str:
    """The TOML text of a document from :func:`parse_document`.

    Parameters
    ----------
    document : tomlkit.TOMLDocument
        The (edited) document. [-]

    Returns
    -------
    str
        Its text.
    """
    return tomlkit.dumps(document)


def edit_document(
    document: tomlkit.TOMLDocument, edits: Sequence[ScenarioEdit]
) -> None:
    """Make the edits in a document, in order, in place.

    Missing tables on a path are created; an index must exist.

    Parameters
    ----------
    document : tomlkit.TOMLDocument
        From :func:`parse_document`. [-]
    edits : sequence of ScenarioEdit
        The changes. [-]

    Raises
    ------
    ScenarioError
        When a path runs through a value that is not a table or an array, or an
        index lies beyond its array (the message names the key path).
    """
    for edit in edits:
        parent: Any = document
        for depth, step in enumerate(edit.path[:-1]):
            parent = _step(parent, step, edit.path[: depth + 1])
        last = edit.path[-1]
        if edit.append:
            _append(parent, last, edit.value)
        else:
            _set(parent, last, edit.value, edit.path)
        if edit.comment:
            parent[last].comment(edit.comment)


def edited_text(
    text: str, edits: Sequence[ScenarioEdit], origin: str = "<text>"
) -> str:
    r"""The scenario text with the edits made, comments and layout kept.

    Parameters
    ----------
    text : str
        A scenario's TOML text. [-]
    edits : sequence of ScenarioEdit
        Changes, made in order. [-]
    origin : str
        Name used in messages (usually the file path). [-]

    Returns
    -------
    str
        The changed text: keys that exist keep their place and their comments;
        new keys go at the end of their table, new tables at the end of theirs.

    Raises
    ------
    ScenarioError
        When the text is not TOML or a path does not lead into it.

    Examples
    --------
    >>> text = '[pump]  # the plant pump\nspeed = 1.0  # as delivered\n'
    >>> print(edited_text(text, [ScenarioEdit(("pump", "speed"), 0.85)]), end="")
    [pump]  # the plant pump
    speed = 0.85  # as delivered
    """
    document = parse_document(text, origin)
    edit_document(document, edits)
    return document_text(document)


def _step(parent: Any, step: str | int, path: KeyPath) -> Any:
    """The table or array one step down a path (a missing table is created)."""
    if isinstance(step, int):
        if not isinstance(parent, list) or not 0 <= step < len(parent):
            raise ScenarioError(f"{key_text(path)}: no such entry to change")
        return parent[step]
    if not isinstance(parent, Mapping):
        raise ScenarioError(f"{key_text(path)}: not inside a table")
    if step not in parent:
        parent[step] = tomlkit.table()
    return parent[step]


def _set(parent: Any, key: str | int, value: Any, path: KeyPath) -> None:
    """Set ``parent[key]``, the new value in the form of the one it replaces."""
    if isinstance(key, int):
        if not isinstance(parent, list) or not 0 <= key < len(parent):
            raise ScenarioError(f"{key_text(path)}: no such entry to change")
        parent[key] = _like(parent[key], value, inside_array=True)
        return
    if not isinstance(parent, Mapping):
        raise ScenarioError(f"{key_text(path)}: not inside a table")
    parent[key] = _like(parent.get(key), value, inside_array=False)


def _append(parent: Any, key: str | int, value: Mapping) -> None:
    """Append a table to the array of tables ``parent[key]`` (made when missing)."""
    if key not in parent:
        parent[key] = AoT([])
    entries = parent[key]
    if isinstance(entries, AoT):
        entries.append(_table(value))
    else:
        entries.append(_inline(value))


def _like(old: Any, value: Any, inside_array: bool) -> Any:
    """``value`` as a tomlkit item shaped as ``old`` was (or as new values are).

    Tables inside arrays are inline; a list of tables replacing an array of
    tables (``[[...]]``) stays one, any other list of tables is an inline array
    on one line per table when the list it replaces was so written (or when new
    and holding more than one table); a new table of plain values is inline, a
    new table holding lists or tables is a ``[table]``.
    """
    if isinstance(value, Mapping):
        if inside_array or isinstance(old, InlineTable):
            return _inline(value)
        if isinstance(old, Table) or any(
            isinstance(v, Mapping | list | tuple) for v in value.values()
        ):
            return _table(value)
        return _inline(value)
    if isinstance(value, list | tuple):
        tables = any(isinstance(v, Mapping) for v in value)
        if tables and isinstance(old, AoT) and not inside_array:
            return AoT([_table(v) for v in value])
        array = tomlkit.array()
        for v in value:
            array.append(_inline(v) if isinstance(v, Mapping) else _item(v))
        if isinstance(old, Array):
            multiline = "\n" in old.as_string()
        else:
            multiline = tables and len(value) > 1
        if multiline:
            array.multiline(True)
        return array
    return _item(value)


def _item(value: Any) -> Any:
    if isinstance(value, list | tuple | Mapping):
        return _like(None, value, inside_array=True)
    return tomlkit.item(value)


def _inline(value: Mapping) -> InlineTable:
    table = tomlkit.inline_table()
    for k, v in value.items():
        table[k] = _item(v)
    return table


def _table(value: Mapping) -> Table:
    table = tomlkit.table()
    for k, v in value.items():
        table[k] = _like(None, v, inside_array=False)
    return table
