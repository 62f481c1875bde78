"""What the sweep figures show, computed from a sweep file's table.

:func:`metric_points` gathers each summary metric against each swept parameter;
:func:`setpoint_probability` is the empirical probability, over the variants of a
random sweep, that a room is at its setpoint by a given time. The figures in
:mod:`simheat.plots.sweep` only draw these.
"""

from __future__ import annotations

import json
from dataclasses import dataclass

import numpy as np

from simheat.batch.sweepfile import SweepResults
from simheat.batch.table import DONE, FAILED

J_PER_KWH = 3.6e6  # [J/kWh]
S_PER_MIN = 60.0  # [s/min]
W_PER_KW = 1e3  # [W/kW]

# Metrics drawn against the parameters: (row key, axis label, SI -> plotted factor).
PLOTTED_METRICS = (
    ("all_rooms_at_setpoint_s", "All rooms at setpoint [min]", 1 / S_PER_MIN),
    ("rooms_not_reached", "Rooms never at setpoint [-]", 1.0),
    ("lowest_flow_pct_of_design", "Lowest emitter flow [% of design]", 1.0),
    ("peak_source_power_W", "Peak source power [kW]", 1 / W_PER_KW),
    ("source_energy_J", "Source energy [kWh]", 1 / J_PER_KWH),
)
ALL_ROOMS = "all rooms"
OPERATION_LABELS = {"set": "", "scale": " (factor)", "offset": " (offset)"}


@dataclass(frozen=True)
class ParameterAxis:
    """Positions of the finished variants along one swept parameter.

    Attributes
    ----------
    key : str
        Key path. [-]
    label : str
        Axis label (the key, and ``(factor)`` or ``(offset)``). [-]
    x : ndarray
        One position per finished variant: the value, or the category index.
        [the key's unit, or - for a category index]
    categories : tuple of str or None
        Tick labels when the values are not numbers. [-]
    """

    key: str
    label: str
    x: np.ndarray
    categories: tuple[str, ...] | None


@dataclass(frozen=True)
class MetricPoints:
    """The finished (``done``) variants' metrics against each parameter.

    Attributes
    ----------
    name : str
        Sweep title. [-]
    mode : str
        ``grid``, ``zip`` or ``random``. [-]
    parameters : tuple of ParameterAxis
        One per swept parameter. [-]
    schemes : ndarray of str
        Scheme of each finished variant. [-]
    scheme_names : tuple of str
        The sweep's schemes, in order. [-]
    metrics : tuple of (key, label, ndarray)
        Each plotted metric, NaN where missing (a room never at setpoint).
        [the metric's unit: min, %, kW, kWh]
    n_failed : int
        Variants that failed (not drawn). [-]
    """

    name: str
    mode: str
    parameters: tuple[ParameterAxis, ...]
    schemes: np.ndarray
    scheme_names: tuple[str, ...]
    metrics: tuple[tuple[str, str, np.ndarray], ...]
    n_failed: int


def _is_number(value) -> bool:
    return isinstance(value, int | float) and not isinstance(value, bool)


def metric_points(results: SweepResults) -> MetricPoints:
    """Each summary metric of the finished variants against each parameter.

    Parameters
    ----------
    results : SweepResults
        A sweep file read back. [-]

    Returns
    -------
    MetricPoints
        Positions and metric values, in the figure's units (min, %, kW, kWh).
    """
    rows = [row for row in results.rows if row["status"] == DONE]
    axes = []
    for j, (key, operation) in enumerate(
        zip(results.keys, results.operations, strict=True)
    ):
        values = [row["values"][j] for row in rows]
        label = key + OPERATION_LABELS.get(operation, "")
        if all(_is_number(v) for v in values):
            axes.append(ParameterAxis(key, label, np.array(values, float), None))
            continue
        texts = [
            v if isinstance(v, str) else json.dumps(v, allow_nan=False) for v in values
        ]
        every = [row["values"][j] for row in results.rows]
        order = list(
            dict.fromkeys(
                v if isinstance(v, str) else json.dumps(v, allow_nan=False)
                for v in every
            )
        )
        x = np.array([order.index(t) for t in texts], dtype=float)
        axes.append(ParameterAxis(key, label, x, tuple(order)))
    metrics = []
    for name, label, factor in PLOTTED_METRICS:
        if name == "rooms_not_reached":
            y = np.array([len(row[name]) for row in rows], dtype=float)
        else:
            y = np.array(
                [np.nan if row[name] is None else row[name] * factor for row in rows],
                dtype=float,
            )
        metrics.append((name, label, y))
    return MetricPoints(
        name=results.name,
        mode=results.mode,
        parameters=tuple(axes),
        schemes=np.array([row["scheme"] for row in rows], dtype=object),
        scheme_names=results.schemes,
        metrics=tuple(metrics),
        n_failed=sum(row["status"] == FAILED for row in results.rows),
    )


def setpoint_probability(
    results: SweepResults, time_min: np.ndarray
) -> dict[str, dict[str, np.ndarray]]:
    """Share of the finished variants in which each room is at setpoint by a time.

    Parameters
    ----------
    results : SweepResults
        A sweep file read back (a random sweep, for a probability). [-]
    time_min : ndarray
        Times after the start of comfort to evaluate at. [min]

    Returns
    -------
    dict
        Scheme -> {room id -> probability at each time, ``"all rooms"`` -> the
        probability that every room is there}. [-]

    Notes
    -----
    The empirical distribution function of the times to setpoint over the
    finished variants: with the inputs drawn from their distributions, the share
    of draws with ``t <= T`` estimates ``P(t <= T)``; a room that never reached its
    setpoint counts as not there at any ``T``. Its standard error is
    ``sqrt(p (1 - p) / n)`` for ``n`` independent draws (a Latin hypercube's is no
    larger for monotone responses, McKay et al. 1979). Failed variants are left
    out.
    """
    time_min = np.asarray(time_min, dtype=float)
    out: dict[str, dict[str, np.ndarray]] = {}
    for scheme in results.schemes:
        rows = [
            r for r in results.rows if r["status"] == DONE and r["scheme"] == scheme
        ]
        if not rows:
            continue
        curves = {}
        for room in (*results.room_ids, ALL_ROOMS):
            if room == ALL_ROOMS:
                times = [r["all_rooms_at_setpoint_s"] for r in rows]
            else:
                times = [r["time_to_setpoint_s"].get(room) for r in rows]
            minutes = np.array(
                [np.inf if t is None else t / S_PER_MIN for t in times], dtype=float
            )
            curves[room] = (minutes[None, :] <= time_min[:, None]).mean(axis=1)
        out[scheme] = curves
    return out
