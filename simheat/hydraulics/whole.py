"""An operating point of a whole network carried to its moving part and back.

With links shut for good the flow solver solves only the part of the network
that can carry water (:mod:`simheat.hydraulics.still`). :func:`moving_point`
takes an operating point given per link and node of the whole network to one
of the moving part; :func:`whole_flows` takes that part's converged split back
to the whole network: exactly zero flow in the still links, still nodes at the
pressure of the moving node they hang from, and the operating rows the whole
network's links were given.
"""

from __future__ import annotations

import numpy as np

from simheat.errors import ScenarioError
from simheat.hydraulics.flows import Flows
from simheat.hydraulics.still import MovingPart

__all__ = ["moving_point", "per_link", "whole_flows"]

# The operating quantities given per link, and the value of a still link's row
# when none is given (None: open valves, pumps at full speed).
OPERATING = ("water_temp_C", "valve_opening", "pump_speed")


def per_link(value, n_links: int, name: str, default: float | None) -> np.ndarray:
    """A number or one value per link as one value per link.

    Parameters
    ----------
    value : float, ndarray or None
        The value(s); None takes ``default``. [any]
    n_links : int
        Number of links. [-]
    name : str
        The quantity's name, for the error message. [-]
    default : float or None
        Value of every link when ``value`` is None. [any]

    Returns
    -------
    ndarray, shape (n_links,)
        Contiguous float64 values. [any]

    Raises
    ------
    ScenarioError
        When ``value`` has neither one value nor one per link.
    """
    if value is None:
        return np.full(n_links, default, dtype=np.float64)
    arr = np.asarray(value, dtype=np.float64)
    if arr.ndim == 0:
        return np.full(n_links, float(arr), dtype=np.float64)
    if arr.shape != (n_links,):
        raise ScenarioError(
            f"{name} must be a number or one value per link ({n_links}), "
            f"got shape {arr.shape}"
        )
    return np.ascontiguousarray(arr)


def moving_point(
    part: MovingPart,
    *,
    water_temp_C,
    valve_opening,
    pump_speed,
    initial_mass_flow_kg_s,
    initial_pressure_Pa,
) -> tuple[dict, dict]:
    """An operating point of ``part.whole`` as one of ``part.network``.

    Parameters
    ----------
    part : MovingPart
        The network and its moving part. [-]
    water_temp_C : float, ndarray or None
        Water temperature, one value or one per link of the whole. [°C]
    valve_opening, pump_speed : ndarray or None
        Opening and speed ratio per link of the whole. [-]
    initial_mass_flow_kg_s : ndarray or None
        Warm-start flows per link of the whole. [kg/s]
    initial_pressure_Pa : ndarray or None
        Node pressures of the whole that go with them. [Pa]

    Returns
    -------
    (dict, dict)
        The keyword arguments above for the moving part; and the operating
        values per link of the whole (or the single value, or None) by name,
        for :func:`whole_flows`. [°C, -, -, kg/s, Pa]
    """
    whole = part.whole
    given = dict(
        water_temp_C=water_temp_C, valve_opening=valve_opening, pump_speed=pump_speed
    )
    defaults = dict(water_temp_C=None, valve_opening=1.0, pump_speed=1.0)
    rows = {
        name: value
        if value is None or np.ndim(value) == 0
        else per_link(value, whole.n_links, name, defaults[name])
        for name, value in given.items()
    }
    point = {
        name: value if value is None or np.ndim(value) == 0 else value[part.links]
        for name, value in rows.items()
    }
    flow = initial_mass_flow_kg_s
    if flow is not None:
        flow = per_link(flow, whole.n_links, "initial_mass_flow_kg_s", 0.0)
        flow = flow[part.links]
    pressure = initial_pressure_Pa
    if pressure is not None:
        pressure = np.asarray(pressure, dtype=np.float64)
        if pressure.shape != (whole.n_nodes,):
            raise ScenarioError(
                f"initial_pressure_Pa must be {whole.n_nodes} finite node "
                f"pressures, got shape {pressure.shape}"
            )
        pressure = pressure[part.nodes]
    point["initial_mass_flow_kg_s"] = flow
    point["initial_pressure_Pa"] = pressure
    return point, rows


def whole_flows(part: MovingPart, moving: Flows, rows: dict) -> Flows:
    """The moving part's converged split as the whole network's.

    Parameters
    ----------
    part : MovingPart
        The network and its moving part. [-]
    moving : Flows
        The converged split of ``part.network``. [kg/s, Pa]
    rows : dict
        The operating values by name from :func:`moving_point`. [°C, -, -]

    Returns
    -------
    Flows
        Flows and pressures of every link and node of ``part.whole``, read-only.
    """
    whole = part.whole
    flow = part.flows(moving.mass_flow_kg_s)
    pressure = part.pressures(moving.pressure_Pa)
    operating = []
    for name in OPERATING:
        value = rows[name]
        row = np.empty(whole.n_links)
        row[:] = 1.0 if value is None else value  # None: open, full speed
        row[part.links] = getattr(moving, name)
        row.setflags(write=False)
        operating.append(row)
    for array in (flow, pressure):
        array.setflags(write=False)
    return Flows.of_solve(
        flow,
        pressure,
        moving.iterations,
        moving.max_imbalance_kg_s,
        moving.max_residual_Pa,
        *operating,
        whole.link_names,
        moving.link_evaluations,
    )
