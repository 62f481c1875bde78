"""Scenario files: schema, loading and validation, unit conversion."""

from simheat.scenario.load import load_scenario, parse_scenario
from simheat.scenario.model import Scenario

__all__ = ["Scenario", "load_scenario", "parse_scenario"]
