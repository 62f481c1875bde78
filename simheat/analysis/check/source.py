"""The heat source's power against the design load, and its time at the limit."""

from __future__ import annotations

from dataclasses import dataclass

from simheat.analysis.check.loads import RoomLoad
from simheat.runs.run import Run
from simheat.scenario.model import Scenario


@dataclass(frozen=True)
class SourceCheck:
    """Design load of the house against the source's maximum power.

    Attributes
    ----------
    max_power_W : float
        The source's power limit. [W]
    design_load_W : float
        Sum of the rooms' design loads (pipe losses not included). [W]
    design_load_with_reheat_W : float
        The same with the rooms' reheat allowances. [W]
    at_limit_fraction : float or None
        Share of the comfort period the source spent at its power limit in a
        simulated morning (:func:`simheat.runs.metrics.source_at_limit`);
        None when not simulated. [-]
    """

    max_power_W: float
    design_load_W: float
    design_load_with_reheat_W: float
    at_limit_fraction: float | None = None

    @property
    def margin_W(self) -> float:
        """Maximum power minus design load. [W]."""
        return self.max_power_W - self.design_load_W

    @property
    def enough(self) -> bool:
        """Whether the source covers the design load."""
        return bool(self.margin_W >= 0.0)


def source_check(
    scenario: Scenario, loads: tuple[RoomLoad, ...], run: Run | None = None
) -> SourceCheck:
    """The source's power against the design load; its time at the limit.

    Parameters
    ----------
    scenario : Scenario
        The house (``[source] max_power_kW``). [W]
    loads : tuple of RoomLoad
        Room design loads. [W]
    run : Run, optional
        A simulated morning; its summary gives the time at the limit. [-]

    Returns
    -------
    SourceCheck
        The comparison.
    """
    return SourceCheck(
        max_power_W=scenario.source.max_power_W,
        design_load_W=sum(r.design_load_W for r in loads),
        design_load_with_reheat_W=sum(r.with_reheat_W for r in loads),
        at_limit_fraction=None if run is None else run.summary.source_at_limit,
    )
