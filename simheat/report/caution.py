"""The safety caution for the report layer (defined in :mod:`simheat.caution`)."""

from __future__ import annotations

from simheat.caution import CAUTION

__all__ = ["CAUTION"]
