"""Key paths into a parsed scenario (TOML as nested dicts and lists).

A sweep names the value it changes by a dotted path, ``source.flow_temp_C`` or
``emitters.living_a.nominal_power_kW``. Inside an array of tables the segment after
the array's name selects entries by their identifying key (``id`` for rooms and
emitters, ``floor`` for ``route.floors``, ``emitter`` for the tees of a floor), or
every entry with ``*``. A path must end on a key that is present in the base
scenario: a sweep never adds keys, so a misspelt path is an error, not a silent
no-op.
"""

from __future__ import annotations

import copy
from collections.abc import Sequence
from typing import Any

# Keys that name the entries of the scenario's arrays of tables, tried in order.
IDENTITY_KEYS = ("id", "emitter", "floor")
WILDCARD = "*"
OPERATIONS = ("set", "scale", "offset")


class KeyPathError(ValueError):
    """A key path that does not lead to a value of the base scenario."""


def split_key(key: str) -> tuple[str, ...]:
    """Split a dotted key path into its segments.

    Parameters
    ----------
    key : str
        Dotted path such as ``"emitters.living_a.nominal_power_kW"``. [-]

    Returns
    -------
    tuple of str
        The segments.

    Raises
    ------
    KeyPathError
        When the path is empty, has an empty segment or a ``/`` (names in the
        sweep file's HDF5 table cannot hold one).

    Examples
    --------
    >>> split_key("route.floors.1.header_pipe")
    ('route', 'floors', '1', 'header_pipe')
    """
    if not isinstance(key, str) or not key.strip():
        raise KeyPathError("must be a dotted key path such as 'source.flow_temp_C'")
    if "/" in key:
        raise KeyPathError(f"{key!r}: a key path cannot contain '/'")
    segments = tuple(part.strip() for part in key.split("."))
    if any(not part for part in segments):
        raise KeyPathError(f"{key!r}: empty segment in the key path")
    return segments


def _identity_key(entries: list[dict]) -> str | None:
    """The key that every entry of an array of tables carries, from IDENTITY_KEYS."""
    for name in IDENTITY_KEYS:
        if all(name in entry for entry in entries):
            return name
    return None


def locate(data: dict, segments: Sequence[str]) -> list[tuple[dict, str]]:
    """Find the slots a key path names: ``(table, key)`` pairs holding the value.

    Parameters
    ----------
    data : dict
        Parsed scenario (``tomllib.loads``). [-]
    segments : sequence of str
        Key path segments, see :func:`split_key`. [-]

    Returns
    -------
    list of (dict, str)
        One pair per value named; several when a ``*`` selects every entry of an
        array of tables.

    Raises
    ------
    KeyPathError
        When a segment does not exist in ``data``; the message names the
        segment and what was there instead.
    """
    nodes: list[Any] = [data]
    where = ""
    for position, segment in enumerate(segments):
        last = position == len(segments) - 1
        found: list[Any] = []
        slots: list[tuple[dict, str]] = []
        for node in nodes:
            if isinstance(node, dict):
                if segment not in node:
                    known = ", ".join(sorted(node)) or "none"
                    raise KeyPathError(
                        f"no key {segment!r} in {where or 'the top level'} of the "
                        f"base scenario (keys there: {known})"
                    )
                slots.append((node, segment))
                found.append(node[segment])
            elif (
                isinstance(node, list)
                and node
                and all(isinstance(e, dict) for e in node)
            ):
                found.extend(_select_entries(node, segment, where))
            elif isinstance(node, list):
                raise KeyPathError(
                    f"{where} is a list of values, not of tables: name the whole "
                    "list (scale and offset change every element)"
                )
            else:
                raise KeyPathError(f"{where} is a value, not a table: {node!r}")
        if last:
            if not slots:
                raise KeyPathError(
                    f"{where}.{segment} names entries of an array of tables; add "
                    "the key to change inside them"
                )
            return slots
        nodes = found
        where = f"{where}.{segment}" if where else segment
    raise KeyPathError("empty key path")


def _select_entries(entries: list[dict], segment: str, where: str) -> list[dict]:
    """Entries of an array of tables named by ``segment`` (an identity or ``*``)."""
    if segment == WILDCARD:
        return list(entries)
    name = _identity_key(entries)
    if name is None:
        raise KeyPathError(
            f"{where}: its entries carry none of {', '.join(IDENTITY_KEYS)}, so "
            "they cannot be selected; use '*' for all of them"
        )
    chosen = [entry for entry in entries if str(entry[name]) == segment]
    if not chosen:
        known = ", ".join(str(entry[name]) for entry in entries)
        raise KeyPathError(
            f"{where}: no entry with {name} {segment!r} in the base scenario "
            f"({name}s: {known})"
        )
    return chosen


def _is_number(value: Any) -> bool:
    return isinstance(value, int | float) and not isinstance(value, bool)


def check_operation(data: dict, segments: Sequence[str], operation: str) -> None:
    """Check that ``operation`` applies to every value the path names.

    Parameters
    ----------
    data : dict
        Parsed base scenario. [-]
    segments : sequence of str
        Key path segments. [-]
    operation : str
        ``"set"``, ``"scale"`` or ``"offset"``. [-]

    Raises
    ------
    KeyPathError
        When the path does not exist, or when ``scale``/``offset`` meet a value
        that is neither a number nor a list of numbers.
    """
    for table, key in locate(data, segments):
        value = table[key]
        if operation == "set":
            continue
        if _is_number(value):
            continue
        if isinstance(value, list) and value and all(_is_number(v) for v in value):
            continue
        raise KeyPathError(
            f"{operation} needs a number or a list of numbers, the base scenario "
            f"has {value!r}"
        )


def apply(data: dict, segments: Sequence[str], operation: str, value: Any) -> None:
    """Change, in place, every value a key path names.

    Parameters
    ----------
    data : dict
        Parsed scenario, modified in place. [-]
    segments : sequence of str
        Key path segments. [-]
    operation : str
        ``"set"`` replaces the value; ``"scale"`` multiplies a number, or every
        number of a list, by ``value``; ``"offset"`` adds ``value`` to it. [-]
    value : object
        The new value, the factor or the offset (in the unit of the key). [-]

    Raises
    ------
    KeyPathError
        As :func:`check_operation`.

    Examples
    --------
    >>> scenario = {"pump": {"head_kPa": [40.0, 30.0]}}
    >>> apply(scenario, ("pump", "head_kPa"), "scale", 0.5)
    >>> scenario["pump"]["head_kPa"]
    [20.0, 15.0]
    """
    if operation not in OPERATIONS:
        raise KeyPathError(f"unknown operation {operation!r}")
    check_operation(data, segments, operation)
    for table, key in locate(data, segments):
        old = table[key]
        if operation == "set":
            table[key] = copy.deepcopy(value)
        elif isinstance(old, list):
            table[key] = [_combine(v, operation, value) for v in old]
        else:
            table[key] = _combine(old, operation, value)


def _combine(old: float, operation: str, value: float) -> float:
    return old * value if operation == "scale" else old + value
