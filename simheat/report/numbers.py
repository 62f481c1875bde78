"""Unit factors and number and time formatting shared by every report.

Reports print practical units (kg/h, kPa, kWh, minutes); the library computes in
SI. The factors and the small formatters here are the one place that converts
for output.
"""

from __future__ import annotations

import math

KG_S_TO_KG_H = 3600.0  # [kg/h per kg/s]
J_PER_KWH = 3.6e6  # [J/kWh]
PA_PER_KPA = 1000.0  # [Pa/kPa]
W_PER_KW = 1000.0  # [W/kW]
S_PER_MIN = 60.0  # [s/min]
S_PER_H = 3600.0  # [s/h]
NOT_REACHED = "--"  # table cell of a time that never came


def minutes(seconds: float | None) -> float | None:
    """A time in minutes rounded to 0.1 min, None kept (JSON ``null``).

    Parameters
    ----------
    seconds : float or None
        Time, None when it never came. [s]

    Returns
    -------
    float or None
        The time. [min]

    Examples
    --------
    >>> minutes(1234.0), minutes(None)
    (20.6, None)
    """
    return None if seconds is None else round(seconds / S_PER_MIN, 1)


def minutes_cell(seconds: float | None) -> str:
    """A time as a table cell in whole minutes, ``--`` when it never came.

    Parameters
    ----------
    seconds : float or None
        Time, None when it never came. [s]

    Returns
    -------
    str
        ``"21 min"`` or ``"--"``.

    Examples
    --------
    >>> minutes_cell(1234.0), minutes_cell(None)
    ('21 min', '--')
    """
    return NOT_REACHED if seconds is None else f"{seconds / S_PER_MIN:.0f} min"


def clock(start_clock_s: float, time_s: float) -> str:
    """Clock time ``HH:MM`` of a time from the start of a run (wraps at 24 h).

    Parameters
    ----------
    start_clock_s : float
        Clock time of the start of the run, since midnight. [s]
    time_s : float
        Time since the start of the run. [s]

    Returns
    -------
    str
        ``HH:MM``, rounded to the minute.

    Examples
    --------
    >>> clock(5 * 3600.0, 5400.0)
    '06:30'
    """
    total_min = int(round((start_clock_s + time_s) / S_PER_MIN))
    return f"{total_min // 60 % 24:02d}:{total_min % 60:02d}"


def finite_or_none(value: float, digits: int) -> float | None:
    """``value`` rounded to ``digits`` decimals, or None when it is not finite.

    Strict JSON has no NaN or Infinity; a missing value is ``null``.

    Parameters
    ----------
    value : float
        Any number. [-]
    digits : int
        Decimals kept. [-]

    Returns
    -------
    float or None
        The rounded value, or None for NaN and infinities.

    Examples
    --------
    >>> finite_or_none(1.23456, 2), finite_or_none(float("inf"), 2)
    (1.23, None)
    """
    return round(value, digits) if math.isfinite(value) else None


def percent(part: float, whole: float, digits: int = 1) -> float | None:
    """``100 part / whole`` rounded to ``digits``; None when it has no value.

    A ratio to a zero, negative or non-finite whole, or one that overflows, is
    not a number a report can print: it becomes ``null`` in JSON.

    Parameters
    ----------
    part, whole : float
        The numbers compared, in one unit. [any]
    digits : int
        Decimals kept. [-]

    Returns
    -------
    float or None
        The share. [%]

    Examples
    --------
    >>> percent(1.0, 4.0), percent(1.0, 0.0), percent(1.0, 1e-320)
    (25.0, None, None)
    """
    if not (math.isfinite(part) and math.isfinite(whole)) or whole <= 0.0:
        return None
    try:
        share = 100.0 * part / whole
    except (OverflowError, ZeroDivisionError):
        return None
    return finite_or_none(share, digits)


def cell(value: float | None, spec: str, missing: str = NOT_REACHED) -> str:
    """A number formatted for a table, ``--`` when it is missing.

    Parameters
    ----------
    value : float or None
        The number, None when missing. [any]
    spec : str
        Format specification of the number, e.g. ``">7.0f"``. [-]
    missing : str
        Text of a missing value (right-aligned like the number). [-]

    Returns
    -------
    str
        The cell.

    Examples
    --------
    >>> cell(12.345, ">6.1f"), cell(None, ">6.1f")
    ('  12.3', '    --')
    """
    if value is None:
        width = "".join(ch for ch in spec.split(".")[0] if ch.isdigit())
        return missing.rjust(int(width or 0))
    return format(value, spec)
