"""The heat source as the compiled right-hand side sees it, and its rating checks.

:func:`source_params` gathers the source's record
(:class:`~simheat.dynamics._records.SourceParams`): a boiler's power limit, or a
heat pump's rating table, minimum flow and buffer tank. For a heat pump,
:func:`warn_outside_rating` warns (once per run) when the run's outdoor
temperatures or flow-temperature setpoints leave its table, where the table's
edge is used.

While the water warms from cold, the heat pump's flow temperature lies below
its setpoint, often below the table's lowest flow temperature; there the
table's lowest column is used without a warning (every cold start passes
through it).
"""

from __future__ import annotations

import numpy as np

from simheat.dynamics import _records, controls
from simheat.dynamics.model import WATER_CP_J_KG_K, WATER_DENSITY_KG_M3, ThermalModel
from simheat.physics.heat_pump import warn_outside_rating
from simheat.scenario.model import Scenario

__all__ = ["run_conditions", "source_params", "warn_outside_rating_of_run"]

# Placeholder rating table of a boiler's record (never read: a boiler's kind
# selects its fixed power limit). Two points per axis, as a real table has.
_NO_AXIS = np.array([0.0, 1.0])
_NO_TABLE = np.ones((2, 2))


def source_params(
    scenario: Scenario, model: ThermalModel, source_link: int
) -> _records.SourceParams:
    """The source's record for the compiled right-hand side.

    Parameters
    ----------
    scenario : Scenario
        The house and its source. [-]
    model : ThermalModel
        Its thermal model (the source's cells and buffer cell). [-]
    source_link : int
        The source's link in the network. [-]

    Returns
    -------
    SourceParams
        Power limit or rating table, control constants, minimum flow as mass
        flow (at :data:`~simheat.dynamics.model.WATER_DENSITY_KG_M3`, the
        density of the heat transport) and the cell feeding the heated cells.
    """
    src = scenario.source
    hp = src.heat_pump
    heated = np.ascontiguousarray(model.source_cells, dtype=np.int64)
    if hp is None:
        kind = _records.SOURCE_BOILER
        axes = (_NO_AXIS, _NO_AXIS)
        tables = (_NO_TABLE, _NO_TABLE)
        min_flow_kg_s = 0.0
    else:
        kind = _records.SOURCE_HEAT_PUMP
        axes = (hp.outdoor_temp_C, hp.flow_temp_C)
        tables = (hp.capacity_W, hp.cop)
        min_flow_kg_s = hp.min_flow_m3_s * WATER_DENSITY_KG_M3
    contiguous = np.ascontiguousarray
    return _records.SourceParams(
        link=int(source_link),
        cells=heated,
        capacity_J_K=float(model.cell_capacity_J_K[heated].sum()),
        max_power_W=float(src.max_power_W),
        control_time_s=controls.SOURCE_CONTROL_TIME_S,
        smoothing=controls.SOURCE_LIMIT_SMOOTHING,
        cp_J_kg_K=WATER_CP_J_KG_K,
        kind=kind,
        outdoor_axis_C=contiguous(axes[0], dtype=np.float64),
        flow_axis_C=contiguous(axes[1], dtype=np.float64),
        capacity_W=contiguous(tables[0], dtype=np.float64),
        cop=contiguous(tables[1], dtype=np.float64),
        min_flow_kg_s=float(min_flow_kg_s),
        inlet_cell=int(model.source_buffer_cell),
    )


def run_conditions(
    scenario: Scenario,
) -> tuple[tuple[float, float], tuple[float, float]]:
    """Outdoor temperatures and flow-temperature setpoints while the source heats.

    Parameters
    ----------
    scenario : Scenario
        The house, its weather, schedule and flow-temperature control. [-]

    Returns
    -------
    ((float, float), (float, float))
        Lowest and highest outdoor temperature, and lowest and highest
        flow-temperature setpoint, over the part of the run in which the
        source heats. [°C]

    Notes
    -----
    Weather, flow schedule and heating curve are linear between their points,
    so their extremes lie at the points inside the span or at its ends; the
    times checked are those and a one-minute grid.
    """
    end = scenario.simulation.duration_s
    start = 0.0 if controls.heating_on(scenario, 0.0) else None
    if start is None:
        start = min(scenario.schedule.comfort_start_s, end)
    times = set(np.linspace(start, end, max(2, int((end - start) / 60.0) + 1)))
    times.update(float(t) for t in scenario.weather.time_s if start <= t <= end)
    if scenario.source.flow_schedule_time_s is not None:
        times.update(
            t for t in scenario.source.flow_schedule_time_s if start <= t <= end
        )
    grid = sorted(times)
    outdoor = [controls.outdoor_temp_C(scenario, t) for t in grid]
    flow = [controls.flow_temp_setpoint_C(scenario, t) for t in grid]
    return (min(outdoor), max(outdoor)), (min(flow), max(flow))


def warn_outside_rating_of_run(scenario: Scenario) -> bool:
    """Warn when a heat pump's run leaves its rating table (nothing for a boiler).

    Parameters
    ----------
    scenario : Scenario
        The house and its source. [-]

    Returns
    -------
    bool
        Whether a :class:`~simheat.errors.RatingTableWarning` was issued.
    """
    hp = scenario.source.heat_pump
    if hp is None:
        return False
    outdoor, flow = run_conditions(scenario)
    return warn_outside_rating(hp.outdoor_temp_C, hp.flow_temp_C, outdoor, flow)
