"""JSON text of a report, and the files a command wrote added to it.

Every JSON object simheat prints goes through :func:`to_json`: strict JSON (no
NaN or Infinity; a missing value is ``null``), indented by two spaces.
"""

from __future__ import annotations

import json
from collections.abc import Mapping
from typing import Any

JSON_INDENT = 2  # spaces per level of printed JSON


def to_json(data: Mapping[str, Any]) -> str:
    """Strict, indented JSON text of a report.

    Parameters
    ----------
    data : mapping
        JSON-ready data (str, int, float, bool, None, lists and mappings). [-]

    Returns
    -------
    str
        The JSON text.

    Raises
    ------
    ValueError
        When a value is NaN or infinite (a report must give None instead).

    Examples
    --------
    >>> print(to_json({"a": [1, None]}))
    {
      "a": [
        1,
        null
      ]
    }
    """
    return json.dumps(data, indent=JSON_INDENT, allow_nan=False)


def with_files(data: Mapping[str, Any], files: Mapping[str, Any]) -> dict:
    """A report with the ``files`` written added, keeping ``caution`` last.

    Parameters
    ----------
    data : mapping
        A JSON-ready report, usually ending with ``caution``. [-]
    files : mapping
        What was written where (paths as str). [-]

    Returns
    -------
    dict
        A new dict: the report's keys, then ``files``, then ``caution`` when the
        report had one.

    Examples
    --------
    >>> with_files({"x": 1, "caution": "c"}, {"figure": "f.png"})
    {'x': 1, 'files': {'figure': 'f.png'}, 'caution': 'c'}
    """
    result = {k: v for k, v in data.items() if k != "caution"}
    result["files"] = dict(files)
    if "caution" in data:
        result["caution"] = data["caution"]
    return result
