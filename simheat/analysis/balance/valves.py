"""From the drop a valve must take to its setting: Kv, then preset or turns.

Continuous settings interpolate the element's table (the inverse of
:func:`simheat.physics.valve.kv_from_preset`, the table's Kv rising with its
setting) and are rounded to :data:`SETTING_DECIMALS`; discrete settings take the
table's step whose Kv is nearest on a log scale (the flow through a valve that
takes most of its circuit's drop changes by about the same ratio as its Kv). A
valve that cannot reach its Kv is left at the end of its table, with the reason
and the pressure it leaves unbalanced.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from simheat.analysis.balance.elements import Element, kv_for_drop_m3_h, valve_drop_Pa

# Continuous presets and turns are given to two decimals (finer than any dial),
# a Kv without a table to four significant digits. [-]
SETTING_DECIMALS = 2
KV_DIGITS = 4
# Relative tolerance of the fully open and smallest-setting checks (round-off
# of the drops, far below a setting's resolution). [-]
LIMIT_RTOL = 1e-9

ABOVE_FULLY_OPEN = "above fully open"
BELOW_SMALLEST = "below the smallest preset"


@dataclass(frozen=True)
class ValveSetting:
    """The setting of one adjustable valve.

    Attributes
    ----------
    setting : float
        Preset or turns [-]; the Kv for an element without a table. [m3/h]
    kv_m3_h : float
        The element's Kv at that setting. [m3/h]
    required_kv_m3_h : float
        The Kv it would need (``inf`` when beyond any valve). [m3/h]
    limit : str or None
        Why the Kv is not reached: :data:`ABOVE_FULLY_OPEN` or
        :data:`BELOW_SMALLEST`; None when it is (to the rounding). [-]
    shortfall_Pa : float
        Above fully open: the drop missing to reach the design flow; below the
        smallest preset: the drop left over that the valve cannot take. [Pa]
    """

    setting: float
    kv_m3_h: float
    required_kv_m3_h: float
    limit: str | None = None
    shortfall_Pa: float = 0.0


def round_setting(element: Element, value: float) -> float:
    """A continuous setting rounded for the user (within the table's range).

    Parameters
    ----------
    element : Element
        The adjustable valve. [-]
    value : float
        Preset or turns [-]; Kv for an element without a table. [m3/h]

    Returns
    -------
    float
        Preset or turns [-] rounded to :data:`SETTING_DECIMALS`; a Kv [m3/h]
        rounded to :data:`KV_DIGITS` significant digits.
    """
    if not element.has_table:
        return float(f"{value:.{KV_DIGITS}g}")
    rounded = round(value, SETTING_DECIMALS)
    return float(min(max(rounded, element.presets[0]), element.presets[-1]))


def kv_at(element: Element, setting: float) -> float:
    """Kv of the element at a setting, linear between table rows.

    Parameters
    ----------
    element : Element
        The adjustable valve. [-]
    setting : float
        Preset or turns [-]; Kv for an element without a table. [m3/h]

    Returns
    -------
    float
        Kv. [m3/h]
    """
    if not element.has_table:
        return setting
    return float(np.interp(setting, element.presets, element.kv_m3_h))


def nearest_step(element: Element, kv_m3_h: float) -> float:
    """The table's setting whose Kv is nearest ``kv_m3_h`` on a log scale.

    Parameters
    ----------
    element : Element
        The adjustable valve. [-]
    kv_m3_h : float
        The Kv wanted. [m3/h]

    Returns
    -------
    float
        A preset or turns of the table [-]; the Kv itself without a table.
        [m3/h]
    """
    if not element.has_table:
        return kv_m3_h
    ratios = np.abs(np.log(np.asarray(element.kv_m3_h) / kv_m3_h))
    return float(element.presets[int(np.argmin(ratios))])


def valve_setting(
    element: Element,
    mass_flow_kg_s: float,
    valve_Pa: float,
    temp_C: float,
    *,
    discrete: bool = False,
    rounded: bool = True,
) -> ValveSetting:
    """The setting that makes a valve take ``valve_Pa`` at its design flow.

    Parameters
    ----------
    element : Element
        The adjustable valve and the valves in series with it. [-]
    mass_flow_kg_s : float
        Design flow through it, > 0. [kg/s]
    valve_Pa : float
        Drop its valves must take together. [Pa]
    temp_C : float
        Water temperature (density). [°C]
    discrete : bool
        Take the nearest table step instead of interpolating. [-]
    rounded : bool
        Round a continuous setting for the user (:func:`round_setting`). [-]

    Returns
    -------
    ValveSetting
        Setting, Kv and any limit with its shortfall.
    """
    required_link = kv_for_drop_m3_h(mass_flow_kg_s, valve_Pa, temp_C)
    required = (
        math.inf
        if math.isinf(required_link)
        else element.element_kv_m3_h(required_link)
    )
    top = element.presets[-1] if element.has_table else element.max_kv_m3_h
    if required > element.max_kv_m3_h * (1.0 + LIMIT_RTOL):
        open_Pa = valve_drop_Pa(
            mass_flow_kg_s, element.link_kv_m3_h(element.max_kv_m3_h), temp_C
        )
        return ValveSetting(
            top, element.max_kv_m3_h, required, ABOVE_FULLY_OPEN, open_Pa - valve_Pa
        )
    low = element.min_kv_m3_h
    if low is not None and required < low * (1.0 - LIMIT_RTOL):
        low_Pa = valve_drop_Pa(mass_flow_kg_s, element.link_kv_m3_h(low), temp_C)
        return ValveSetting(
            element.presets[0], low, required, BELOW_SMALLEST, valve_Pa - low_Pa
        )
    kv = min(required, element.max_kv_m3_h)
    if discrete:
        setting = nearest_step(element, kv)
    else:
        setting = element.setting_of(kv)
        if rounded:
            setting = round_setting(element, setting)
    return ValveSetting(setting, kv_at(element, setting), required)
