"""Plausibility limits and small checks that several scenario sections share.

The limits lie far beyond any real house. They catch unit mistakes and keep
conversions and later curve fits clear of overflow; our own choice.
"""

from __future__ import annotations

from simheat.scenario.fields import Table

MAX_FLOOR = 100  # storey number [-]
MAX_WATER_L = 1e4  # water content of an emitter or the source [L]
MAX_PIPE_LENGTH_M = 1000.0  # any one pipe run or water cell [m]
MAX_SCHEDULE_TIME_H = 8760.0  # one year either side of the start [h]
# Bounds of a given initial room temperature (air or structure): a house standing
# unheated in a hard frost to an overheated one. [°C]
MIN_ROOM_C = -20.0
MAX_ROOM_C = 40.0


def unique_ids(tables: list[Table], what: str) -> dict[str, int]:
    """Map each table's ``id`` to its index; ids must be non-empty and distinct.

    Parameters
    ----------
    tables : list of Table
        The entries of an array of tables (``[[rooms]]``, ``[[emitters]]``).
    what : str
        Name of the array, for messages. [-]

    Returns
    -------
    dict of str to int
        Index of each id, in file order.
    """
    ids: dict[str, int] = {}
    for i, t in enumerate(tables):
        ident = t.text("id")
        if not ident.strip():
            raise t.fail("id", "must not be empty")
        if ident in ids:
            raise t.fail("id", f"duplicate id {ident!r} (also {what}[{ids[ident]}])")
        ids[ident] = i
    return ids


def exactly_one(t: Table, first: str, second: str) -> None:
    """Raise unless exactly one of the keys ``first`` and ``second`` is given.

    Parameters
    ----------
    t : Table
        The table holding the keys. [-]
    first, second : str
        The two keys; the message names ``first``. [-]

    Raises
    ------
    ScenarioError
        When both or neither are given.
    """
    if t.has(first) and t.has(second):
        raise t.fail(first, f"give only one of {first} or {second}, got both")
    if not (t.has(first) or t.has(second)):
        raise t.fail(first, f"give one of {first} or {second}, got neither")
