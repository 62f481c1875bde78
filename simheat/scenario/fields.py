"""Reading typed fields from a parsed TOML table with precise error paths.

Every message names the path of the field, the problem and the value found, for
example ``rooms[3].floor_area_m2: must be > 0, got -12.0``.
"""

from __future__ import annotations

import difflib
import math
from typing import Any

from simheat.errors import ScenarioError

_MISSING = object()
# Similarity (difflib ratio) above which a key present in the file is taken for a
# misspelling of a missing required key: "floor_area_m3" vs "floor_area_m2" scores
# 0.92, while distinct keys of one table such as "inner_diameter_mm" and
# "outer_diameter_mm" score 0.82. [-]
NEAR_MISS_RATIO = 0.85


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
            raise ScenarioError(f"{path or 'scenario'}: must be a table, got {data!r}")
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
            misspelt = self._near_unknown(key)
            if misspelt is not None:
                raise self.fail(
                    key,
                    f"required key is missing; unknown key {misspelt!r} may be a "
                    "misspelling of it (check the spelling and the unit)",
                )
            raise self.fail(key, "required key is missing")
        return default

    def _near_unknown(self, key: str) -> str | None:
        """Find a key of the table, not read yet, that looks like a misspelt ``key``."""
        unread = [k for k in self.data if k not in self._used]
        close = difflib.get_close_matches(key, unread, n=1, cutoff=NEAR_MISS_RATIO)
        return close[0] if close else None

    def _as_float(self, key: str, value: Any) -> float:
        """Convert ``value`` to a finite float, or raise the error for ``key``."""
        if isinstance(value, bool) or not isinstance(value, int | float):
            raise self.fail(key, f"must be a number, got {value!r}")
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
            raise self.fail(key, f"must be an integer, got {value!r}")
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
            raise self.fail(key, f"must be a string, got {value!r}")
        if choices is not None and value not in choices:
            listed = ", ".join(sorted(choices))
            raise self.fail(key, f"must be one of {listed}, got {value!r}")
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
            raise self.fail(key, f"must be true or false, got {value!r}")
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
                key, f"must be a list of at least {min_len} numbers, got {value!r}"
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
            raise self.fail(key, f"must be a table, got {value!r}")
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
            raise self.fail(key, f"must be an array of tables, got {value!r}")
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
            close = difflib.get_close_matches(unknown[0], sorted(self._used), n=1)
            if close:
                problem += f"; did you mean {close[0]!r}?"
            raise self.fail(unknown[0], problem)
