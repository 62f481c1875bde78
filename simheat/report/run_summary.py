"""Run summary: one simulated morning as JSON-ready data and as text tables."""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from simheat.report.caution import CAUTION
from simheat.report.night import night_dict, night_text
from simheat.report.numbers import (
    J_PER_KWH,
    KG_S_TO_KG_H,
    NOT_REACHED,
    clock,
    minutes,
    minutes_cell,
    percent,
)
from simheat.runs.run import Run

__all__ = [
    "run_summary_dict",
    "run_summary_text",
    "runs_summary_dict",
    "scheme_comparison_text",
]


def _kWh(joules: float | None) -> float | None:
    return None if joules is None else round(joules / J_PER_KWH, 4)


def run_summary_dict(run: Run) -> dict:
    """The summary of a run as JSON-ready data in practical units.

    Parameters
    ----------
    run : Run
        A simulated run. [-]

    Returns
    -------
    dict
        Keys ``scenario``, ``scheme``, ``rooms``, ``rooms_not_reached``,
        ``emitters``, ``pump_stops``, ``hot_water_level_C``,
        ``peak_source_power_kW``, ``source_at_limit`` (share of the comfort
        period at the source's power limit, for a heat pump at its capacity of
        the moment; null for old run files), ``source_kind``, ``heat_pump``
        (null for a boiler: ``electric_kWh``, ``mean_cop``,
        ``capacity_kW`` min and max during comfort, ``below_min_flow``),
        ``return_temperature_C``, ``energy``, ``night``
        (:func:`simheat.report.night.night_dict`, null without one),
        ``solver`` and ``caution``; times in minutes from the start of comfort
        (``null`` when never reached), flows in kg/h, power in kW, energy in kWh.
        ``pump_stops`` lists each pump that stopped (``pump``: its link name,
        ``stop_at_h``: hours from the start of the run, ``clock``: ``HH:MM``);
        ``floor_pumps`` each floor pump of a ``_floor_pumps`` scheme (``pump``,
        ``on_time_h``, ``switches``), empty otherwise.

    Notes
    -----
    The operative temperature is the mean of the air and structure node
    temperatures (see :attr:`simheat.runs.run.Run.operative_temp_C`).
    """
    s = run.summary
    rooms = [
        {
            "id": r.id,
            "name": room.name,
            "setpoint_C": r.setpoint_C,
            "time_to_setpoint_min": minutes(r.time_to_setpoint_s),
            "time_to_setpoint_operative_min": minutes(r.time_to_setpoint_operative_s),
            "overshoot_K": round(r.overshoot_K, 3),
            "final_air_temperature_C": round(r.final_air_temp_C, 2),
            "final_operative_temperature_C": round(r.final_operative_temp_C, 2),
        }
        for r, room in zip(s.rooms, run.scenario.rooms, strict=True)
    ]
    emitters = [
        {
            "id": e.id,
            "room": e.room,
            "mean_flow_kg_per_h": round(e.mean_flow_kg_s * KG_S_TO_KG_H, 2),
            "design_flow_kg_per_h": round(e.design_flow_kg_s * KG_S_TO_KG_H, 2),
            # None for an emitter shut for good (no design flow)
            "flow_pct_of_design": percent(e.mean_flow_kg_s, e.design_flow_kg_s),
            "mean_output_W": round(e.mean_output_W, 1),
            "hot_water_arrival_min": minutes(e.hot_water_arrival_s),
        }
        for e in s.emitters
    ]
    books = s.energy
    energy = {
        "source_kWh": round(books.source_J / J_PER_KWH, 4),
        "room_gains_kWh": round(books.room_gains_J / J_PER_KWH, 4),
        "pipe_losses_kWh": round(books.pipe_losses_J / J_PER_KWH, 4),
        "pipe_to_rooms_kWh": _kWh(books.pipe_to_rooms_J),
        "pipe_to_unheated_kWh": _kWh(books.pipe_to_unheated_J),
        "stored_change_kWh": round(books.stored_change_J / J_PER_KWH, 4),
        "balance_error_pct": books.balance_error_pct,
    }
    comfort = run.time_s >= run.scenario.schedule.comfort_start_s
    heat_pump = None
    if run.scenario.source.heat_pump is not None:
        capacity = np.asarray(run.source_capacity_W)[comfort]
        cop = books.mean_cop
        heat_pump = {
            "electric_kWh": round(books.electric_J / J_PER_KWH, 4),
            "mean_cop": None if cop is None else round(cop, 3),
            "capacity_kW": {
                "min": round(float(capacity.min()) / 1e3, 3),
                "max": round(float(capacity.max()) / 1e3, 3),
            },
            "below_min_flow": (
                None
                if s.source_below_min_flow is None
                else round(s.source_below_min_flow, 4)
            ),
        }
    returns = run.return_temp_C[comfort]
    return {
        "scenario": run.scenario.name,
        "scheme": run.scheme,
        "rooms": rooms,
        "rooms_not_reached": list(s.rooms_not_reached),
        "emitters": emitters,
        "pump_stops": [
            {
                "pump": name,
                "stop_at_h": round(time_s / 3600.0, 4),
                "clock": clock(run.scenario.schedule.start_clock_s, time_s),
            }
            for name, time_s in run.pump_stop_times_s.items()
        ],
        "floor_pumps": [
            {
                "pump": name,
                "on_time_h": round(record["on_time_s"] / 3600.0, 4),
                "switches": int(record["switches"]),
            }
            for name, record in run.floor_pumps.items()
        ],
        "hot_water_level_C": round(s.hot_water_level_C, 2),
        "peak_source_power_kW": round(s.peak_source_power_W / 1e3, 3),
        "source_at_limit": (
            None if s.source_at_limit is None else round(s.source_at_limit, 4)
        ),
        "source_kind": run.scenario.source.kind,
        "heat_pump": heat_pump,
        "return_temperature_C": {
            "min": round(float(returns.min()), 2),
            "max": round(float(returns.max()), 2),
            "final": round(float(returns[-1]), 2),
        },
        "energy": energy,
        "night": night_dict(run),
        "solver": dict(run.solver),
        "caution": CAUTION,
    }


def run_summary_text(run: Run) -> str:
    """The summary of a run as aligned plain-text tables.

    Parameters
    ----------
    run : Run
        A simulated run. [-]

    Returns
    -------
    str
        Room table, emitter table and energy books (no caution; callers add it once).
    """
    data = run_summary_dict(run)
    lines = [f"{data['scenario']} -- scheme: {data['scheme']}", ""]
    if run.night is not None:
        lines += [night_text(run), ""]
    lines.append(
        f"{'room':<12} {'setpoint':>8}  {'time to setpoint':<28} "
        f"{'operative':>10} {'overshoot':>9}"
    )
    for r in data["rooms"]:
        if r["time_to_setpoint_min"] is None:
            reached = f"not reached (final {r['final_air_temperature_C']:.1f} °C)"
        else:
            reached = f"{r['time_to_setpoint_min']:.0f} min"
        operative = r["time_to_setpoint_operative_min"]
        operative = NOT_REACHED if operative is None else f"{operative:.0f} min"
        lines.append(
            f"{r['id']:<12} {r['setpoint_C']:>6.1f} °C  {reached:<28} "
            f"{operative:>10} {r['overshoot_K']:>7.1f} K"
        )
    lines.append(
        "operative = mean of air and structure temperature ('--': not reached); "
        "overshoot = highest air above setpoint"
    )
    if data["rooms_not_reached"]:
        lines.append(
            "never at setpoint in this run: " + ", ".join(data["rooms_not_reached"])
        )
    lines.append("")
    lines.append(
        f"{'emitter':<12} {'room':<10} {'mean flow':>10} {'design':>9} "
        f"{'of design':>9} {'mean output':>11} {'hot water at':>12}"
    )
    for e in data["emitters"]:
        arrival = e["hot_water_arrival_min"]
        arrival = "never" if arrival is None else f"{arrival:.1f} min"
        pct = e["flow_pct_of_design"]
        pct = "closed" if pct is None else f"{pct:.0f} %"
        lines.append(
            f"{e['id']:<12} {e['room']:<10} {e['mean_flow_kg_per_h']:>6.1f} kg/h "
            f"{e['design_flow_kg_per_h']:>4.0f} kg/h {pct:>9} "
            f"{e['mean_output_W']:>9.0f} W {arrival:>12}"
        )
    en = data["energy"]
    if data["pump_stops"]:
        lines.append("")
        lines.append(
            "pumps stopped: "
            + ", ".join(
                f"{p['pump']} at {p['clock']} ({p['stop_at_h']:g} h into the run)"
                for p in data["pump_stops"]
            )
        )
    if data["floor_pumps"]:
        lines.append("")
        lines.append(
            "floor pumps: "
            + "; ".join(
                f"{p['pump']} ran {p['on_time_h']:.2f} h, {p['switches']} switch"
                + ("" if p["switches"] == 1 else "es")
                for p in data["floor_pumps"]
            )
        )
    lines.append("")
    lines.append(
        f"hot water = inlet at {data['hot_water_level_C']:.1f} °C; "
        f"peak source power {data['peak_source_power_kW']:.2f} kW; return "
        f"{data['return_temperature_C']['min']:.1f}-"
        f"{data['return_temperature_C']['max']:.1f} °C during comfort"
    )
    at_limit = data["source_at_limit"]
    hp = data["heat_pump"]
    if at_limit is not None and at_limit > 0.0 and hp is None:
        lines.append(
            f"WARNING: the heat source was at its power limit for "
            f"{100.0 * at_limit:.0f} % of the comfort period "
            f"({run.scenario.source.max_power_W / 1e3:g} kW)"
        )
    if hp is not None:
        lines.extend(_heat_pump_lines(hp, at_limit, run.scenario.source.heat_pump))
    if en["pipe_to_unheated_kWh"] is None:
        pipes = f"pipe losses {en['pipe_losses_kWh']:.2f}"
    else:
        pipes = (
            f"pipes to rooms {en['pipe_to_rooms_kWh']:.2f} + pipes to unheated "
            f"space {en['pipe_to_unheated_kWh']:.2f}"
        )
    lines.append(
        f"energy: source {en['source_kWh']:.2f} kWh = radiators to rooms "
        f"{en['room_gains_kWh']:.2f} + {pipes} "
        f"+ stored {en['stored_change_kWh']:.2f} kWh "
        f"(closure error {en['balance_error_pct']:.2e} %)"
    )
    return "\n".join(lines)


def _heat_pump_lines(hp: dict, at_limit: float | None, table) -> list[str]:
    """The heat pump's electricity, mean COP, and warnings at its limits."""
    cop = "--" if hp["mean_cop"] is None else f"{hp['mean_cop']:.2f}"
    span = hp["capacity_kW"]
    share = "--" if at_limit is None else f"{100.0 * at_limit:.0f} %"
    lines = [
        f"heat pump: electricity {hp['electric_kWh']:.2f} kWh, mean COP {cop} "
        f"(heat over electricity); capacity {span['min']:.2f}-{span['max']:.2f} kW "
        "during comfort (its rating table at the outdoor and flow temperatures), "
        f"at it for {share} of comfort"
    ]
    if at_limit is not None and at_limit > 0.0:
        lines.append(
            f"WARNING: the heat pump was at its capacity for {100.0 * at_limit:.0f} % "
            "of the comfort period"
        )
    below = hp["below_min_flow"]
    if below is not None and below > 0.0:
        lines.append(
            f"WARNING: the flow through the heat pump was below its minimum "
            f"({table.min_flow_m3_s * 3600.0:g} m3/h) for {100.0 * below:.0f} % of "
            "the comfort period: it heated less, or not at all"
        )
    return lines


def runs_summary_dict(summaries: Sequence[dict]) -> dict:
    """Several run summaries as one JSON-ready object.

    Parameters
    ----------
    summaries : sequence of dict
        Results of :func:`run_summary_dict` (each may carry its ``files``). [-]

    Returns
    -------
    dict
        ``{"runs": [...], "caution": CAUTION}``.
    """
    return {"runs": list(summaries), "caution": CAUTION}


def scheme_comparison_text(runs: Sequence[Run]) -> str:
    """Times to setpoint of every room under several schemes, side by side.

    Parameters
    ----------
    runs : sequence of Run
        Runs of the same scenario under different schemes. [-]

    Returns
    -------
    str
        A table, rooms by schemes, in minutes ("--" where not reached), with the
        time until the last room is at setpoint.
    """
    names = [r.scheme for r in runs]
    width = max(14, *(len(n) + 2 for n in names))
    lines = [f"{'room':<12}" + "".join(f"{n:>{width}}" for n in names)]
    for i, room in enumerate(runs[0].summary.rooms):
        cells = [
            f"{minutes_cell(run.summary.rooms[i].time_to_setpoint_s):>{width}}"
            for run in runs
        ]
        lines.append(f"{room.id:<12}" + "".join(cells))
    last = []
    for run in runs:
        times = [r.time_to_setpoint_s for r in run.summary.rooms]
        value = NOT_REACHED if None in times else minutes_cell(max(times))
        last.append(f"{value:>{width}}")
    lines.append(f"{'all rooms':<12}" + "".join(last))
    return "\n".join(lines)
