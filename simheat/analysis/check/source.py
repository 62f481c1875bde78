"""The heat source's power against the design load, and its time at the limit.

A boiler's power is its limit; a heat pump's is its rated capacity at the
design outdoor temperature and the flow temperature its control asks for there
(its rating table, bilinear, held at the edges:
:func:`simheat.physics.heat_pump.rating_value`), since its capacity falls as it
gets colder and the flow hotter. The flow temperature is the source's, not the
design supply temperature the radiators were sized for: in a retrofit the two
differ, and a unit runs at what its control asks (a heating curve at the design
outdoor temperature, a fixed setpoint, or a schedule's highest).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from simheat.analysis.check.loads import RoomLoad
from simheat.physics.heat_pump import outside_rating, rating_value
from simheat.runs.run import Run
from simheat.scenario.model import Scenario


@dataclass(frozen=True)
class SourceCheck:
    """Design load of the house against the source's maximum power.

    Attributes
    ----------
    max_power_W : float
        The source's power limit; a heat pump's capacity at design conditions
        (``design_point_C``). [W]
    design_load_W : float
        Sum of the rooms' design loads (pipe losses not included). [W]
    design_load_with_reheat_W : float
        The same with the rooms' reheat allowances. [W]
    at_limit_fraction : float or None
        Share of the comfort period the source spent at its power limit in a
        simulated morning (:func:`simheat.runs.metrics.source_at_limit`);
        None when not simulated. [-]
    kind : str
        ``"boiler"`` or ``"heat_pump"``. [-]
    design_point_C : (float, float) or None
        A heat pump's outdoor and flow temperature its capacity is read at
        (:func:`design_flow_temp_C`); None for a boiler. [°C]
    outside_table : str or None
        Where that point leaves the heat pump's table (its capacity is held at
        the edge there), or None. [-]
    """

    max_power_W: float
    design_load_W: float
    design_load_with_reheat_W: float
    at_limit_fraction: float | None = None
    kind: str = "boiler"
    design_point_C: tuple[float, float] | None = None
    outside_table: str | None = None

    @property
    def margin_W(self) -> float:
        """Maximum power minus design load. [W]."""
        return self.max_power_W - self.design_load_W

    @property
    def enough(self) -> bool:
        """Whether the source covers the design load."""
        return bool(self.margin_W >= 0.0)


def design_flow_temp_C(scenario: Scenario) -> float:
    """The flow temperature the source's control asks at the design outdoor temperature.

    Parameters
    ----------
    scenario : Scenario
        The house (``[source]`` flow-temperature control, ``[design]``). [-]

    Returns
    -------
    float
        A heating curve at the design outdoor temperature (linear between its
        points, held beyond, as the dynamics apply it); a fixed setpoint; a
        schedule's highest. [°C]
    """
    src = scenario.source
    if src.curve_outdoor_temp_C is not None:
        return float(
            np.interp(
                scenario.design.outdoor_temp_C,
                src.curve_outdoor_temp_C,
                src.curve_flow_temp_C,
            )
        )
    return float(src.flow_temp_C)


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
        The comparison (a heat pump's capacity at the design outdoor
        temperature and the flow temperature its control asks there).
    """
    src = scenario.source
    power_W, point, outside = src.max_power_W, None, None
    if src.heat_pump is not None:
        hp = src.heat_pump
        point = (scenario.design.outdoor_temp_C, design_flow_temp_C(scenario))
        power_W = float(
            rating_value(hp.outdoor_temp_C, hp.flow_temp_C, hp.capacity_W, *point)
        )
        outside = outside_rating(
            hp.outdoor_temp_C, hp.flow_temp_C, (point[0],) * 2, (point[1],) * 2
        )
    return SourceCheck(
        max_power_W=power_W,
        design_load_W=sum(r.design_load_W for r in loads),
        design_load_with_reheat_W=sum(r.with_reheat_W for r in loads),
        at_limit_fraction=None if run is None else run.summary.source_at_limit,
        kind=src.kind,
        design_point_C=point,
        outside_table=outside,
    )
