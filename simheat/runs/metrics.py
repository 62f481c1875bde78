"""Metrics of a run: times to setpoint, mean flows and outputs, energy books."""

from __future__ import annotations

from collections.abc import Callable

import numpy as np
from scipy.optimize import brentq

from simheat.runs.run import EmitterResult, EnergyBooks, RoomResult
from simheat.scenario.model import Scenario


def first_crossing_s(
    values_at: Callable[[float], float],
    time_s: np.ndarray,
    samples: np.ndarray,
    level: float,
) -> float | None:
    """First time a continuous series rises to ``level``, refined by root finding.

    Parameters
    ----------
    values_at : callable
        The continuous series (the integrator's dense output). [same unit as level]
    time_s : ndarray
        Times of the samples, increasing. [s]
    samples : ndarray
        The series at ``time_s``. [same unit as level]
    level : float
        Level to reach.

    Returns
    -------
    float or None
        Time of the first upward crossing, ``None`` if the level is never reached. [s]

    Notes
    -----
    The sample grid only brackets the crossing; Brent's method on the dense output
    finds it to 1e-3 s.
    """
    above = samples >= level
    if not above.any():
        return None
    i = int(np.argmax(above))
    if i == 0:
        return float(time_s[0])
    a, b = float(time_s[i - 1]), float(time_s[i])
    fa, fb = values_at(a) - level, values_at(b) - level
    if fa >= 0.0:
        return a
    if fb < 0.0:
        return b
    return float(brentq(lambda t: values_at(t) - level, a, b, xtol=1e-3))


def room_results(
    scenario: Scenario,
    time_s: np.ndarray,
    air_temp_C: np.ndarray,
    air_at: Callable[[float, int], float],
) -> tuple[RoomResult, ...]:
    """Time to setpoint and final temperature of each room.

    Parameters
    ----------
    scenario : Scenario
        The scenario (setpoints, tolerance, comfort start).
    time_s : ndarray
        Output times. [s]
    air_temp_C : ndarray, shape (n_times, n_rooms)
        Air temperatures at the output times. [°C]
    air_at : callable
        ``air_at(t, room)``: air temperature from the dense output. [°C]

    Returns
    -------
    tuple of RoomResult
        One per room; times count from the start of comfort.
    """
    start = scenario.schedule.comfort_start_s
    tol = scenario.simulation.reached_tolerance_K
    in_comfort = time_s >= start
    results = []
    for r, room in enumerate(scenario.rooms):
        crossing = first_crossing_s(
            lambda t, r=r: air_at(t, r),
            time_s[in_comfort],
            air_temp_C[in_comfort, r],
            room.setpoint_C - tol,
        )
        results.append(
            RoomResult(
                id=room.id,
                setpoint_C=room.setpoint_C,
                time_to_setpoint_s=None if crossing is None else crossing - start,
                final_air_temp_C=float(air_temp_C[-1, r]),
            )
        )
    return tuple(results)


def comfort_mean(time_s: np.ndarray, series: np.ndarray, start_s: float) -> np.ndarray:
    """Time mean of a series over ``time_s >= start_s`` (trapezoidal rule).

    Parameters
    ----------
    time_s : ndarray
        Times. [s]
    series : ndarray, shape (n_times, ...)
        Values at the times.
    start_s : float
        Start of the averaging window. [s]

    Returns
    -------
    ndarray
        Mean over the window per column (the value itself if the window is one point).
    """
    keep = time_s >= start_s
    t = time_s[keep]
    v = series[keep]
    if len(t) < 2:
        return v[-1]
    return np.trapezoid(v, t, axis=0) / (t[-1] - t[0])


def emitter_results(
    scenario: Scenario, time_s: np.ndarray, flow_kg_s: np.ndarray, output_W: np.ndarray
) -> tuple[EmitterResult, ...]:
    """Mean flow, design flow and mean output of each emitter during comfort.

    Parameters
    ----------
    scenario : Scenario
        The scenario.
    time_s : ndarray
        Output times. [s]
    flow_kg_s, output_W : ndarray, shape (n_times, n_emitters)
        Emitter mass flows [kg/s] and outputs [W].

    Returns
    -------
    tuple of EmitterResult
        One per emitter.
    """
    start = scenario.schedule.comfort_start_s
    mean_flow = comfort_mean(time_s, flow_kg_s, start)
    mean_out = comfort_mean(time_s, output_W, start)
    design = scenario.design_mass_flow_kg_s()
    return tuple(
        EmitterResult(
            id=e.id,
            room=scenario.rooms[e.room].id,
            mean_flow_kg_s=float(mean_flow[i]),
            design_flow_kg_s=float(design[i]),
            mean_output_W=float(mean_out[i]),
        )
        for i, e in enumerate(scenario.emitters)
    )


def energy_books(energy_J: np.ndarray, stored_heat_J: np.ndarray) -> EnergyBooks:
    """Energy books from the integrated counters and the stored heat series.

    Parameters
    ----------
    energy_J : ndarray, shape (n_times, 3)
        Cumulative source heat, heat emitted to rooms and pipe losses. [J]
    stored_heat_J : ndarray, shape (n_times,)
        Heat stored in water and radiator metal. [J]

    Returns
    -------
    EnergyBooks
        The books from the first to the last time.
    """
    delta = energy_J[-1] - energy_J[0]
    return EnergyBooks(
        source_J=float(delta[0]),
        room_gains_J=float(delta[1]),
        pipe_losses_J=float(delta[2]),
        stored_change_J=float(stored_heat_J[-1] - stored_heat_J[0]),
    )
