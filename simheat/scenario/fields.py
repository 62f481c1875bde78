"""Reading typed fields from a parsed TOML table with precise error paths.

Every message names the path of the field, the problem and the value found, for
example ``rooms[3].floor_area_m2: must be > 0, got -12.0``.
"""

from __future__ import annotations

import difflib
import math
import re
from typing import Any

from simheat.errors import ScenarioError

_MISSING = object()
# Similarity (difflib ratio, letter case ignored) above which a key present in the
# file is taken for a misspelling of a missing required key: "floor_area_m3" vs
# "floor_area_m2" scores 0.92, while distinct keys of one table such as
# "inner_diameter_mm" and "outer_diameter_mm" score 0.82. [-]
NEAR_MISS_RATIO = 0.85
# A key one edit away (a letter changed, added, dropped, or two swapped: "perset"
# for "preset", ratio 0.83) from a missing required key of at least this length is
# also taken for its misspelling; shorter keys would match too much. [-]
NEAR_MISS_MIN_LENGTH = 4
# Longest key shown as it is in a message; longer keys, and keys with characters
# outside letters, digits, "_" and "-", are shown quoted and cut. [characters]
SHOWN_KEY_LENGTH = 40
# Longest value shown in a message before it is cut. [characters]
SHOWN_VALUE_LENGTH = 60
# Keys shown as they are: printable, without spaces or quotes (bare TOML keys,
# list positions such as ``time_h[2]``, circuit names such as ``floor0:ahead``).
_PLAIN_KEY = re.compile(r"[^\s'\"\\]+")


def shown(value: Any, limit: int = SHOWN_VALUE_LENGTH) -> str:
    """A value as a message shows it: its repr on one line, cut to ``limit``.

    Parameters
    ----------
    value : object
        The value found in the file. [-]
    limit : int
        Longest text returned. [characters]

    Returns
    -------
    str
        ``repr(value)`` (newlines escaped), cut with ``...`` when longer.

    Examples
    --------
    >>> shown("a" * 100, 12)
    "'aaaaaaaa..."
    >>> shown(["x"] * 3)
    "['x', 'x', 'x']"
    """
    text = _short_repr(value, limit)
    return text if len(text) <= limit else text[: limit - 3] + "..."


def _short_repr(value: Any, limit: int) -> str:
    """Repr of ``value`` without building the repr of a huge string or list."""
    if isinstance(value, str) and len(value) > limit:
        return repr(value[:limit])
    if isinstance(value, list | tuple) and len(value) > limit:
        return repr(value[:limit])
    if isinstance(value, dict) and len(value) > limit:
        return repr(dict(list(value.items())[:limit]))
    return repr(value).replace("\n", "\\n")


def shown_key(key: str) -> str:
    """A key as a message path shows it: as it is, or quoted and cut.

    Parameters
    ----------
    key : str
        A key of the file (one part of a dotted path). [-]

    Returns
    -------
    str
        The key when it is a short bare key; otherwise its quoted repr (newlines
        escaped), cut to :data:`SHOWN_KEY_LENGTH`.

    Examples
    --------
    >>> shown_key("floor_area_m2")
    'floor_area_m2'
    >>> shown_key("bad key")
    "'bad key'"
    """
    if len(key) <= SHOWN_KEY_LENGTH and key.isprintable() and _PLAIN_KEY.fullmatch(key):
        return key
    return shown(key, SHOWN_KEY_LENGTH)


def _one_edit_apart(a: str, b: str) -> bool:
    """Whether ``b`` is ``a`` with one letter changed, added, dropped or swapped."""
    if a == b or abs(len(a) - len(b)) > 1:
        return False
    if len(a) == len(b):
        diff = [i for i, (x, y) in enumerate(zip(a, b, strict=True)) if x != y]
        return len(diff) == 1 or (
            len(diff) == 2
            and diff[1] == diff[0] + 1
            and a[diff[0]] == b[diff[1]]
            and a[diff[1]] == b[diff[0]]
        )
    short, long = (a, b) if len(a) < len(b) else (b, a)
    i = 0
    while i < len(short) and short[i] == long[i]:
        i += 1
    return short[i:] == long[i + 1 :]


def near_miss(key: str, candidates: Any) -> str | None:
    """The candidate that looks like a misspelling of ``key``, if any.

    Parameters
    ----------
    key : str
        The expected key. [-]
    candidates : iterable of str
        Keys found in the file. [-]

    Returns
    -------
    str or None
        The closest candidate when it differs only in letter case, is one edit
        away (:data:`NEAR_MISS_MIN_LENGTH`), or scores at least
        :data:`NEAR_MISS_RATIO`; None otherwise.

    Examples
    --------
    >>> near_miss("preset", ["perset", "room"])
    'perset'
    >>> near_miss("id", ["ID"])
    'ID'
    >>> near_miss("inner_diameter_mm", ["outer_diameter_mm"]) is None
    True
    """
    wanted = key.lower()
    keys = [c for c in candidates if isinstance(c, str)]
    for candidate in keys:
        lowered = candidate.lower()
        if lowered == wanted or (
            len(wanted) >= NEAR_MISS_MIN_LENGTH and _one_edit_apart(wanted, lowered)
        ):
            return candidate
    by_lower = {c.lower(): c for c in keys}
    close = difflib.get_close_matches(wanted, by_lower, n=1, cutoff=NEAR_MISS_RATIO)
    return by_lower[close[0]] if close else None


class Table:
    """A view of one TOML table that knows its path in the file.

    Parameters
    ----------
    data : dict
        The parsed table. [-]
    path : str
        Dotted path of the table in the file (empty for the top level). [-]
    origin : str
        File name, appended to messages. [-]
    """

    def __init__(self, data: dict[str, Any], path: str, origin: str) -> None:
        if not isinstance(data, dict):
            raise ScenarioError(
                f"{path or 'scenario'}: must be a table, got {shown(data)}"
            )
        self.data = data
        self.path = path
        self.origin = origin
        self._used: set[str] = set()

    def where(self, key: str) -> str:
        """Full path of ``key`` in this table.

        Parameters
        ----------
        key : str
            Key in this table. [-]
        """
        key = shown_key(key)
        return f"{self.path}.{key}" if self.path else key

    def fail(self, key: str, problem: str) -> ScenarioError:
        """Build the error for ``key`` (returned, so callers ``raise`` it).

        Parameters
        ----------
        key : str
            Key in this table. [-]
        problem : str
            What is wrong with the value. [-]
        """
        return ScenarioError(f"{self.where(key)}: {problem} ({self.origin})")

    def has(self, key: str) -> bool:
        """Whether the key is present.

        Parameters
        ----------
        key : str
            Key in this table. [-]
        """
        return key in self.data

    def raw(self, key: str, default: Any = _MISSING) -> Any:
        """Return the raw value or the default; a missing required key is an error.

        Parameters
        ----------
        key : str
            Key in this table. [-]
        default : object, optional
            Value when the key is absent; without it the key is required. [-]
        """
        self._used.add(key)
        if key in self.data:
            return self.data[key]
        if default is _MISSING:
            raise self.missing(key)
        return default

    def missing(
        self, key: str, problem: str = "required key is missing"
    ) -> ScenarioError:
        """The error of a missing required ``key``, naming a likely misspelling.

        Parameters
        ----------
        key : str
            The required key. [-]
        problem : str
            What is missing, when more than the key itself. [-]

        Returns
        -------
        ScenarioError
            ``problem``, followed by the unread key of the table that looks like
            a misspelling of ``key`` (see :func:`near_miss`), if there is one.
        """
        misspelt = self.near_unknown(key)
        if misspelt is not None:
            problem += (
                f"; unknown key {shown_key(misspelt)!r} may be a misspelling of "
                f"{key!r} (check the spelling and the unit)"
            )
        return self.fail(key, problem)

    def near_unknown(self, key: str) -> str | None:
        """Find a key of the table, not read yet, that looks like a misspelt ``key``.

        Parameters
        ----------
        key : str
            The expected key. [-]
        """
        return near_miss(key, [k for k in self.data if k not in self._used])

    def _as_float(self, key: str, value: Any) -> float:
        """Convert ``value`` to a finite float, or raise the error for ``key``."""
        if isinstance(value, bool) or not isinstance(value, int | float):
            raise self.fail(key, f"must be a number, got {shown(value)}")
        try:
            number = float(value)
        except OverflowError:
            raise self.fail(key, f"must be finite, got {value}") from None
        if not math.isfinite(number):
            raise self.fail(key, f"must be finite, got {number}")
        return number

    def number(
        self,
        key: str,
        default: Any = _MISSING,
        *,
        positive: bool = False,
        non_negative: bool = False,
        low: float | None = None,
        high: float | None = None,
    ) -> float:
        """Read a finite real number with optional bounds.

        Parameters
        ----------
        key : str
            Key in this table. [-]
        default : float or None, optional
            Value when the key is absent (None is returned as is); without it the
            key is required. [unit of the key]
        positive, non_negative : bool
            Require a value > 0, or >= 0. [-]
        low, high : float, optional
            Inclusive bounds. [unit of the key]
        """
        value = self.raw(key, default)
        if value is None:
            return value
        value = self._as_float(key, value)
        if positive and value <= 0:
            raise self.fail(key, f"must be > 0, got {value:g}")
        if non_negative and value < 0:
            raise self.fail(key, f"must be >= 0, got {value:g}")
        if low is not None and value < low:
            raise self.fail(key, f"must be >= {low:g}, got {value:g}")
        if high is not None and value > high:
            raise self.fail(key, f"must be <= {high:g}, got {value:g}")
        return value

    def integer(
        self,
        key: str,
        default: Any = _MISSING,
        *,
        low: int | None = None,
        high: int | None = None,
    ) -> int:
        """Read an integer with optional bounds.

        Parameters
        ----------
        key : str
            Key in this table. [-]
        default : int, optional
            Value when the key is absent; without it the key is required. [-]
        low, high : int, optional
            Inclusive bounds. [-]
        """
        value = self.raw(key, default)
        if isinstance(value, bool) or not isinstance(value, int):
            raise self.fail(key, f"must be an integer, got {shown(value)}")
        if low is not None and value < low:
            raise self.fail(key, f"must be >= {low}, got {value}")
        if high is not None and value > high:
            raise self.fail(key, f"must be <= {high}, got {value}")
        return value

    def text(self, key: str, default: Any = _MISSING, *, choices=None) -> str:
        """Read a string, optionally one of ``choices``.

        Parameters
        ----------
        key : str
            Key in this table. [-]
        default : str, optional
            Value when the key is absent; without it the key is required. [-]
        choices : collection of str, optional
            The allowed values. [-]
        """
        value = self.raw(key, default)
        if not isinstance(value, str):
            raise self.fail(key, f"must be a string, got {shown(value)}")
        if choices is not None and value not in choices:
            listed = ", ".join(sorted(choices))
            raise self.fail(key, f"must be one of {listed}, got {shown(value)}")
        return value

    def boolean(self, key: str, default: Any = _MISSING) -> bool:
        """Read a true/false value.

        Parameters
        ----------
        key : str
            Key in this table. [-]
        default : bool, optional
            Value when the key is absent; without it the key is required. [-]
        """
        value = self.raw(key, default)
        if not isinstance(value, bool):
            raise self.fail(key, f"must be true or false, got {shown(value)}")
        return value

    def numbers(self, key: str, default: Any = _MISSING, *, min_len: int = 1) -> list:
        """Read a list of finite numbers with at least ``min_len`` entries.

        Parameters
        ----------
        key : str
            Key in this table. [-]
        default : list of float, optional
            Value when the key is absent; without it the key is required.
            [unit of the key]
        min_len : int
            Least number of entries. [-]
        """
        value = self.raw(key, default)
        if not isinstance(value, list) or len(value) < min_len:
            raise self.fail(
                key, f"must be a list of at least {min_len} numbers, got {shown(value)}"
            )
        return [self._as_float(f"{key}[{i}]", v) for i, v in enumerate(value)]

    def table(self, key: str, default: Any = _MISSING) -> Table:
        """Read a sub-table.

        Parameters
        ----------
        key : str
            Key in this table. [-]
        default : dict, optional
            Value when the key is absent; without it the key is required. [-]
        """
        value = self.raw(key, default)
        if not isinstance(value, dict):
            raise self.fail(key, f"must be a table, got {shown(value)}")
        return Table(value, self.where(key), self.origin)

    def tables(self, key: str, default: Any = _MISSING, *, min_len: int = 0) -> list:
        """Read an array of tables.

        Parameters
        ----------
        key : str
            Key in this table. [-]
        default : list of dict, optional
            Value when the key is absent; without it the key is required. [-]
        min_len : int
            Least number of tables. [-]
        """
        value = self.raw(key, default)
        if not isinstance(value, list) or not all(isinstance(v, dict) for v in value):
            raise self.fail(key, f"must be an array of tables, got {shown(value)}")
        if len(value) < min_len:
            raise self.fail(key, f"needs at least {min_len} entries, got {len(value)}")
        return [
            Table(v, f"{self.where(key)}[{i}]", self.origin)
            for i, v in enumerate(value)
        ]

    def reject_unknown(self) -> None:
        """Raise on keys that were never read (catches typos in key names)."""
        unknown = sorted(set(self.data) - self._used)
        if unknown:
            problem = "unknown key (check the spelling and the unit)"
            close = []
            if len(unknown[0]) <= SHOWN_KEY_LENGTH:
                close = difflib.get_close_matches(unknown[0], sorted(self._used), n=1)
            if close:
                problem += f"; did you mean {close[0]!r}?"
            raise self.fail(unknown[0], problem)
