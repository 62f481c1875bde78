"""Schedule segments of a run and the controls the right-hand side sees in them.

A run is integrated segment by segment (:func:`simheat.dynamics.controls.
segment_edges_s`); within one segment the source is on or off, every pump
runs or stands, and every manual valve keeps its opening. :func:`schedule_segment`
resolves those settings once per segment; :func:`controls_at` adds what varies
with time inside it (flow-temperature setpoint, outdoor temperature) as the
compiled right-hand side's :class:`~simheat.dynamics._records.Controls` record.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np

from simheat.dynamics import controls
from simheat.dynamics._records import Controls
from simheat.hydraulics.network import Network
from simheat.scenario.model import Scenario

__all__ = ["Segment", "controls_at", "schedule_segment", "steady_segment"]


@dataclass
class Segment:
    """Settings that hold over one schedule segment.

    Attributes
    ----------
    start_s, end_s : float
        Its time span from the start of the run. [s]
    heating : bool
        The source is on. [-]
    circulating : bool
        Some pump runs; otherwise the flows are zero without a solve. [-]
    setpoints_C : ndarray
        Setpoint of each thermostatic head. [°C]
    link_opening : ndarray
        Manual valve opening per link (1 unless a valve event). [-]
    pump_speed : ndarray
        Per link: 1 running pump, 0 stopped pump or no pump. [-]
    """

    start_s: float
    end_s: float
    heating: bool
    circulating: bool
    setpoints_C: np.ndarray
    link_opening: np.ndarray
    pump_speed: np.ndarray


def schedule_segment(
    scenario: Scenario,
    network: Network,
    sensor_emitter: np.ndarray,
    valve_events: tuple,
    pump_stop_times_s: Mapping[int, float],
    start_s: float,
    end_s: float,
) -> Segment:
    """Schedule settings valid from ``start_s`` to ``end_s``.

    Parameters
    ----------
    scenario : Scenario
        The house and morning; units on its fields. [-]
    network : Network
        The scheme's network. [-]
    sensor_emitter : ndarray of int64
        Emitter of each thermostatic head. [-]
    valve_events : tuple of (time_s, emitter_index, opening)
        Checked manual valve settings. [s, -, -]
    pump_stop_times_s : mapping of int to float
        Stop time of each pump link that stops. [s]
    start_s, end_s : float
        The segment (no control switches inside it). [s]

    Returns
    -------
    Segment
        The settings at the segment's middle.
    """
    mid = 0.5 * (start_s + end_s)
    link_opening = np.ones(network.n_links)
    manual = controls.valve_openings(len(scenario.emitters), valve_events, mid)
    link_opening[network.emitter_links()] = manual
    pumps = network.pump_links()
    speed = controls.pump_speeds(network.n_links, pumps, pump_stop_times_s, mid)
    heating = controls.heating_on(scenario, mid)
    # With every pump stopped nothing drives the water: the flow split is
    # zero without a solve (the solver refuses a network with no running pump).
    return Segment(
        start_s,
        end_s,
        heating,
        heating and bool(np.any(speed[pumps] > 0.0)),
        np.ascontiguousarray(
            controls.emitter_setpoints_C(scenario, mid, sensor_emitter),
            dtype=np.float64,
        ),
        link_opening,
        np.ascontiguousarray(speed, dtype=np.float64),
    )


def steady_segment(
    scenario: Scenario, network: Network, sensor_emitter: np.ndarray, time_s: float
) -> Segment:
    """The evening's settings: heating on at the comfort setpoints, pumps running.

    The house's steady state before the night (:mod:`simheat.dynamics.steady`)
    holds under these: the source on, every pump running, every valve as set
    (no manual valve events), every head aiming at its room's comfort setpoint.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    network : Network
        The scheme's network. [-]
    sensor_emitter : ndarray of int64
        Emitter of each thermostatic head. [-]
    time_s : float
        The time the settings are for (a zero-length segment there). [s]

    Returns
    -------
    Segment
        The settings.
    """
    pumps = network.pump_links()
    speed = np.zeros(network.n_links)
    speed[pumps] = 1.0
    setpoints = [
        scenario.rooms[scenario.emitters[i].room].setpoint_C for i in sensor_emitter
    ]
    return Segment(
        time_s,
        time_s,
        True,
        bool(len(pumps)),
        np.ascontiguousarray(setpoints, dtype=np.float64),
        np.ones(network.n_links),
        speed,
    )


def controls_at(
    scenario: Scenario, seg: Segment, time_s: float, warm_start: bool
) -> Controls:
    """The compiled right-hand side's controls at ``time_s`` of segment ``seg``.

    Parameters
    ----------
    scenario : Scenario
        The house and morning; units on its fields. [-]
    seg : Segment
        The segment ``time_s`` lies in; units on its fields. [-]
    time_s : float
        Time from the start of the run. [s]
    warm_start : bool
        The flow solver holds a converged flow split to start from. [-]

    Returns
    -------
    Controls
        Setpoints, outdoor temperature and the segment's settings.
    """
    return Controls(
        controls.flow_temp_setpoint_C(scenario, time_s),
        controls.outdoor_temp_C(scenario, time_s),
        seg.heating,
        seg.circulating,
        warm_start,
        seg.setpoints_C,
        seg.link_opening,
        seg.pump_speed,
    )
