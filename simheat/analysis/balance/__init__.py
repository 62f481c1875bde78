"""Balancing: the presets, circuit valves and pump settings for every design flow.

:func:`balance_scheme` (:mod:`~.balance`) is the entry point; the steps are
:mod:`~.elements` (what can be set, pressure drops), :mod:`~.graph` (longest
paths over pressure bounds), :mod:`~.design` (index circuits, pump needs, each
valve's surplus), :mod:`~.pumps` (pump settings), :mod:`~.valves` (Kv to preset
or turns), :mod:`~.result` (result records) and :mod:`~.morning` (the morning
simulated before and after). Text and JSON are in :mod:`simheat.report.balance`.
"""

from simheat.analysis.balance.balance import balance_scheme
from simheat.analysis.balance.morning import morning_before_after
from simheat.analysis.balance.result import (
    VERIFY_TOLERANCE,
    CircuitResult,
    PumpResult,
    SchemeBalance,
    ValveResult,
)

__all__ = [
    "VERIFY_TOLERANCE",
    "CircuitResult",
    "PumpResult",
    "SchemeBalance",
    "ValveResult",
    "balance_scheme",
    "morning_before_after",
]
