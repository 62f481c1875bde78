"""Scenario files: schema, loading and validation, unit conversion. Data only.

:func:`load_scenario` and :func:`parse_scenario` return a validated
:class:`Scenario` in SI units. Quantities derived from it (fitted pump curves,
room capacities, Kv from presets, design flows) come from the resolve step,
:func:`simheat.resolve.resolve`.
"""

from simheat.scenario.load import load_scenario, parse_scenario
from simheat.scenario.model import Scenario

__all__ = ["Scenario", "load_scenario", "parse_scenario"]
