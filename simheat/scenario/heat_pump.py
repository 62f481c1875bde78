"""The record of ``[source.heat_pump]``: a heat pump's rating table, as given.

Read and checked by :mod:`simheat.scenario.plant`; kept beside
:class:`simheat.scenario.model.Source` (which holds one) in its own module.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

SOURCE_KINDS = ("boiler", "heat_pump")


@dataclass(frozen=True, eq=False)
class HeatPump:
    """A heat pump's rating table, minimum flow and buffer tank, as given.

    Attributes
    ----------
    outdoor_temp_C : ndarray, shape (n,)
        Outdoor (source air) temperatures of the table's rows, increasing. [°C]
    flow_temp_C : ndarray, shape (m,)
        Water flow (outlet) temperatures of its columns, increasing. [°C]
    capacity_W : ndarray, shape (n, m)
        Heating capacity at full load at each rating point. [W]
    cop : ndarray, shape (n, m)
        Coefficient of performance there: heat over electric power. [-]
    min_flow_m3_s : float
        Least water flow through the unit at which it heats; 0 for none. [m3/s]
    buffer_volume_m3 : float
        Water content of a buffer tank in series on the unit's return; 0 for
        none. [m3]
    """

    outdoor_temp_C: np.ndarray
    flow_temp_C: np.ndarray
    capacity_W: np.ndarray
    cop: np.ndarray
    min_flow_m3_s: float = 0.0
    buffer_volume_m3: float = 0.0
