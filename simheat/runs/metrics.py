"""Metrics of a run: times to setpoint, overshoot, hot water arrival, peaks, books.

Times and extremes come from the integrator's dense output: the output grid only
brackets them, and root finding (Brent) or bounded maximisation refines them.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np
from scipy.optimize import brentq, minimize_scalar

from simheat.runs.run import EmitterResult, EnergyBooks, RoomResult
from simheat.scenario.model import Scenario

# Share of the way from the initial water temperature to the flow temperature at
# which water at an emitter's inlet counts as hot (issue 5's definition). [-]
HOT_WATER_FRACTION = 0.9
# Time resolution of refined crossings and maxima. [s]
TIME_XTOL_S = 1e-3
# The source counts as at its power limit while its output is at least this share
# of its maximum power; the limit is a smooth clip with corners 0.5 % of the
# limit wide (simheat.dynamics.controls.SOURCE_LIMIT_SMOOTHING), so a source held
# at the limit sits within that band. [-]
AT_LIMIT_FRACTION = 0.99


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
        Level to reach. [any]

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
    return float(brentq(lambda t: values_at(t) - level, a, b, xtol=TIME_XTOL_S))


def dense_maximum(
    values_at: Callable[[float], float], time_s: np.ndarray, samples: np.ndarray
) -> float:
    """Largest value of a continuous series, refined between the samples.

    Parameters
    ----------
    values_at : callable
        The continuous series (dense output). [any]
    time_s : ndarray
        Times of the samples, increasing, at least one. [s]
    samples : ndarray
        The series at ``time_s``. [any]

    Returns
    -------
    float
        The larger of the largest sample and the bounded maximum of ``values_at``
        over the two sample intervals around it.
    """
    i = int(np.argmax(samples))
    best = float(samples[i])
    a = float(time_s[max(i - 1, 0)])
    b = float(time_s[min(i + 1, len(time_s) - 1)])
    if b <= a:
        return best
    found = minimize_scalar(
        lambda t: -values_at(t),
        bounds=(a, b),
        method="bounded",
        options={"xatol": TIME_XTOL_S},
    )
    return max(best, -float(found.fun))


def overshoot_K(
    values_at: Callable[[float], float],
    time_s: np.ndarray,
    samples: np.ndarray,
    setpoint_C: float,
    reached_s: float | None,
) -> float:
    """Largest excess over the setpoint after the setpoint was reached. [K].

    Parameters
    ----------
    values_at : callable
        Air temperature from the dense output. [°C]
    time_s : ndarray
        Output times. [s]
    samples : ndarray
        Air temperature at ``time_s``. [°C]
    setpoint_C : float
        The setpoint. [°C]
    reached_s : float or None
        Time the setpoint was reached (run clock), ``None`` if never. [s]

    Returns
    -------
    float
        ``max(air - setpoint)`` over ``t >= reached_s``, at least 0; 0 when the
        setpoint was never reached.
    """
    if reached_s is None:
        return 0.0
    after = time_s >= reached_s
    t = np.concatenate([[reached_s], time_s[after]])
    v = np.concatenate([[values_at(reached_s)], samples[after]])
    return max(0.0, dense_maximum(values_at, t, v) - setpoint_C)


def room_results(
    scenario: Scenario,
    time_s: np.ndarray,
    air_temp_C: np.ndarray,
    operative_temp_C: np.ndarray,
    air_at: Callable[[float, int], float],
    operative_at: Callable[[float, int], float],
) -> tuple[RoomResult, ...]:
    """Times to setpoint, overshoot and final temperatures of each room.

    Parameters
    ----------
    scenario : Scenario
        The scenario (setpoints, tolerance, comfort start). [-]
    time_s : ndarray
        Output times. [s]
    air_temp_C, operative_temp_C : ndarray, shape (n_times, n_rooms)
        Air and operative temperatures at the output times. [°C]
    air_at, operative_at : callable
        ``f(t, room)``: air and operative temperature from the dense output. [°C]

    Returns
    -------
    tuple of RoomResult
        One per room; times count from the start of comfort.

    Notes
    -----
    A room reaches its setpoint when the temperature first rises to
    ``setpoint - reached_tolerance_K`` during comfort. The overshoot is measured
    from the air's crossing on, against the setpoint itself.
    """
    start = scenario.schedule.comfort_start_s
    tol = scenario.simulation.reached_tolerance_K
    in_comfort = time_s >= start
    t_comfort = time_s[in_comfort]
    results = []
    for r, room in enumerate(scenario.rooms):

        def air(t, r=r):
            return air_at(t, r)

        crossing = first_crossing_s(
            air, t_comfort, air_temp_C[in_comfort, r], room.setpoint_C - tol
        )
        operative_crossing = first_crossing_s(
            lambda t, r=r: operative_at(t, r),
            t_comfort,
            operative_temp_C[in_comfort, r],
            room.setpoint_C - tol,
        )
        results.append(
            RoomResult(
                id=room.id,
                setpoint_C=room.setpoint_C,
                time_to_setpoint_s=None if crossing is None else crossing - start,
                final_air_temp_C=float(air_temp_C[-1, r]),
                time_to_setpoint_operative_s=None
                if operative_crossing is None
                else operative_crossing - start,
                final_operative_temp_C=float(operative_temp_C[-1, r]),
                overshoot_K=overshoot_K(
                    air, t_comfort, air_temp_C[in_comfort, r], room.setpoint_C, crossing
                ),
            )
        )
    return tuple(results)


def hot_water_level_C(
    initial_water_temp_C: float,
    flow_temp_C: float,
    reached_supply_C: float | None = None,
) -> float:
    """Inlet temperature that counts as hot water. [°C].

    Parameters
    ----------
    initial_water_temp_C : float
        Temperature of all water at the start. [°C]
    flow_temp_C : float
        Flow-temperature setpoint of the source at the start of comfort. [°C]
    reached_supply_C : float, optional
        Highest supply temperature the source actually reached during comfort;
        a source held at its power limit may never reach its setpoint. [°C]

    Returns
    -------
    float
        ``T0 + 0.9 (T_ref - T0)`` with ``T_ref`` the flow setpoint, or the
        highest supply temperature reached when that is lower.

    Examples
    --------
    >>> round(hot_water_level_C(15.0, 70.0), 6)
    64.5
    >>> round(hot_water_level_C(15.0, 70.0, reached_supply_C=55.0), 6)
    51.0
    """
    reference = flow_temp_C
    if reached_supply_C is not None:
        reference = min(reference, reached_supply_C)
    return initial_water_temp_C + HOT_WATER_FRACTION * (
        reference - initial_water_temp_C
    )


def source_at_limit(
    time_s: np.ndarray,
    power_W: np.ndarray,
    max_power_W: float | np.ndarray,
    start_s: float,
) -> float:
    """Share of the comfort period the source spends at its power limit. [-].

    Parameters
    ----------
    time_s : ndarray
        Output times. [s]
    power_W : ndarray
        Source power at those times. [W]
    max_power_W : float or ndarray
        The source's power limit, or its capacity at each output time (a heat
        pump's, which follows its rating table). [W]
    start_s : float
        Start of comfort. [s]

    Returns
    -------
    float
        Time mean over ``time_s >= start_s`` (trapezoidal weights on the output
        grid) of the indicator ``power >= AT_LIMIT_FRACTION * max_power``; 0 to
        1.

    Examples
    --------
    >>> t = np.array([0.0, 60.0, 120.0, 180.0])
    >>> source_at_limit(t, np.array([10e3, 10e3, 9e3, 5e3]), 10e3, 0.0)
    0.5
    """
    at_limit = (power_W >= AT_LIMIT_FRACTION * max_power_W).astype(float)
    return float(comfort_mean(time_s, at_limit, start_s))


def arrival_times_s(
    scenario: Scenario,
    time_s: np.ndarray,
    inlet_temp_C: np.ndarray,
    inlet_at: Callable[[float, int], float],
    level_C: float,
) -> list[float | None]:
    """When hot water first reaches each emitter's inlet, from the comfort start.

    Parameters
    ----------
    scenario : Scenario
        The scenario (comfort start). [-]
    time_s : ndarray
        Output times. [s]
    inlet_temp_C : ndarray, shape (n_times, n_emitters)
        Inlet temperatures at the output times. [°C]
    inlet_at : callable
        ``inlet_at(t, emitter)`` from the dense output. [°C]
    level_C : float
        Hot water level (:func:`hot_water_level_C`). [°C]

    Returns
    -------
    list of float or None
        Per emitter, seconds from the start of comfort (0 when the inlet is already
        hot then), ``None`` when hot water never arrives.
    """
    start = scenario.schedule.comfort_start_s
    keep = time_s >= start
    out: list[float | None] = []
    for e in range(inlet_temp_C.shape[1]):
        crossing = first_crossing_s(
            lambda t, e=e: inlet_at(t, e), time_s[keep], inlet_temp_C[keep, e], level_C
        )
        out.append(None if crossing is None else crossing - start)
    return out


def comfort_mean(time_s: np.ndarray, series: np.ndarray, start_s: float) -> np.ndarray:
    """Time mean of a series over ``time_s >= start_s`` (trapezoidal rule).

    Parameters
    ----------
    time_s : ndarray
        Times. [s]
    series : ndarray, shape (n_times, ...)
        Values at the times. [any]
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
    scenario: Scenario,
    time_s: np.ndarray,
    flow_kg_s: np.ndarray,
    output_W: np.ndarray,
    arrival_s: list[float | None],
    design_flow_kg_s: np.ndarray,
) -> tuple[EmitterResult, ...]:
    """Mean flow, design flow, mean output and hot water arrival of each emitter.

    Parameters
    ----------
    scenario : Scenario
        The scenario. [-]
    time_s : ndarray
        Output times. [s]
    flow_kg_s, output_W : ndarray, shape (n_times, n_emitters)
        Emitter mass flows [kg/s] and outputs [W].
    arrival_s : list of float or None
        Hot water arrival per emitter (:func:`arrival_times_s`). [s]
    design_flow_kg_s : ndarray
        Design mass flow per emitter, from the layout. [kg/s]

    Returns
    -------
    tuple of EmitterResult
        One per emitter.
    """
    start = scenario.schedule.comfort_start_s
    mean_flow = comfort_mean(time_s, flow_kg_s, start)
    mean_out = comfort_mean(time_s, output_W, start)
    design = design_flow_kg_s
    return tuple(
        EmitterResult(
            id=e.id,
            room=scenario.rooms[e.room].id,
            mean_flow_kg_s=float(mean_flow[i]),
            design_flow_kg_s=float(design[i]),
            mean_output_W=float(mean_out[i]),
            hot_water_arrival_s=arrival_s[i],
        )
        for i, e in enumerate(scenario.emitters)
    )


def energy_books(energy_J: np.ndarray, stored_heat_J: np.ndarray) -> EnergyBooks:
    """Energy books from the integrated counters and the stored heat series.

    Parameters
    ----------
    energy_J : ndarray, shape (n_times, 3 to 5)
        Cumulative source heat, heat emitted to rooms, pipe losses, the part
        of them lost to unheated space (absent in older run files) and a heat
        pump's electricity (absent in older run files: none). [J]
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
        pipe_to_unheated_J=float(delta[3]) if len(delta) > 3 else None,
        electric_J=float(delta[4]) if len(delta) > 4 else 0.0,
    )


def below_min_flow(
    time_s: np.ndarray, flow_kg_s: np.ndarray, min_flow_kg_s: float, start_s: float
) -> float:
    """Share of the comfort period a heat pump's flow lies below its minimum. [-].

    Parameters
    ----------
    time_s : ndarray
        Output times. [s]
    flow_kg_s : ndarray
        Water flow through the heat pump at those times. [kg/s]
    min_flow_kg_s : float
        Its minimum flow. [kg/s]
    start_s : float
        Start of comfort. [s]

    Returns
    -------
    float
        Time mean over ``time_s >= start_s`` (trapezoidal weights) of the
        indicator ``flow < min_flow``; 0 to 1.

    Examples
    --------
    >>> t = np.array([0.0, 60.0, 120.0, 180.0])
    >>> below_min_flow(t, np.array([0.2, 0.2, 0.05, 0.05]), 0.1, 0.0)
    0.5
    """
    below = (np.asarray(flow_kg_s) < min_flow_kg_s).astype(float)
    return float(comfort_mean(time_s, below, start_s))
