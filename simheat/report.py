"""Plain-text and JSON-ready reports of runs, with the safety caution."""

from __future__ import annotations

from simheat.runs.run import Run

CAUTION = (
    "Caution: these are planning estimates only. Hot water can scald and heating "
    "systems work under pressure and on mains power: the installation must follow "
    "local codes and be commissioned by a qualified installer."
)
J_PER_KWH = 3.6e6
KG_S_TO_KG_H = 3600.0


def _minutes(seconds: float | None) -> float | None:
    return None if seconds is None else round(seconds / 60.0, 1)


def _clock(run: Run, time_s: float) -> str:
    """Clock time ``HH:MM`` of a time from the start of the run (wraps at 24 h)."""
    minutes = int(round((run.scenario.schedule.start_clock_s + time_s) / 60.0))
    return f"{minutes // 60 % 24:02d}:{minutes % 60:02d}"


def run_summary_dict(run: Run) -> dict:
    """The summary of a run as JSON-ready data in practical units.

    Parameters
    ----------
    run : Run
        A simulated run.

    Returns
    -------
    dict
        Keys ``scenario``, ``scheme``, ``rooms``, ``rooms_not_reached``,
        ``emitters``, ``pump_stops``, ``hot_water_level_C``,
        ``peak_source_power_kW``, ``return_temperature_C``, ``energy``,
        ``solver`` and ``caution``; times in minutes from the start of comfort
        (``null`` when never reached), flows in kg/h, power in kW, energy in kWh.
        ``pump_stops`` lists each pump that stopped (``pump``: its link name,
        ``stop_at_h``: hours from the start of the run, ``clock``: ``HH:MM``).

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
            "time_to_setpoint_min": _minutes(r.time_to_setpoint_s),
            "time_to_setpoint_operative_min": _minutes(r.time_to_setpoint_operative_s),
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
            "flow_pct_of_design": round(
                100.0 * e.mean_flow_kg_s / e.design_flow_kg_s, 1
            ),
            "mean_output_W": round(e.mean_output_W, 1),
            "hot_water_arrival_min": _minutes(e.hot_water_arrival_s),
        }
        for e in s.emitters
    ]
    books = s.energy
    energy = {
        "source_kWh": round(books.source_J / J_PER_KWH, 4),
        "room_gains_kWh": round(books.room_gains_J / J_PER_KWH, 4),
        "pipe_losses_kWh": round(books.pipe_losses_J / J_PER_KWH, 4),
        "stored_change_kWh": round(books.stored_change_J / J_PER_KWH, 4),
        "balance_error_pct": books.balance_error_pct,
    }
    comfort = run.time_s >= run.scenario.schedule.comfort_start_s
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
                "clock": _clock(run, time_s),
            }
            for name, time_s in run.pump_stop_times_s.items()
        ],
        "hot_water_level_C": round(s.hot_water_level_C, 2),
        "peak_source_power_kW": round(s.peak_source_power_W / 1e3, 3),
        "return_temperature_C": {
            "min": round(float(returns.min()), 2),
            "max": round(float(returns.max()), 2),
            "final": round(float(returns[-1]), 2),
        },
        "energy": energy,
        "solver": dict(run.solver),
        "caution": CAUTION,
    }


def run_summary_text(run: Run) -> str:
    """The summary of a run as aligned plain-text tables.

    Parameters
    ----------
    run : Run
        A simulated run.

    Returns
    -------
    str
        Room table, emitter table and energy books (no caution; callers add it once).
    """
    data = run_summary_dict(run)
    lines = [f"{data['scenario']} -- scheme: {data['scheme']}", ""]
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
        operative = "--" if operative is None else f"{operative:.0f} min"
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
        lines.append(
            f"{e['id']:<12} {e['room']:<10} {e['mean_flow_kg_per_h']:>6.1f} kg/h "
            f"{e['design_flow_kg_per_h']:>4.0f} kg/h {e['flow_pct_of_design']:>7.0f} % "
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
    lines.append("")
    lines.append(
        f"hot water = inlet at {data['hot_water_level_C']:.1f} °C; "
        f"peak source power {data['peak_source_power_kW']:.2f} kW; return "
        f"{data['return_temperature_C']['min']:.1f}-"
        f"{data['return_temperature_C']['max']:.1f} °C during comfort"
    )
    lines.append(
        f"energy: source {en['source_kWh']:.2f} kWh = rooms "
        f"{en['room_gains_kWh']:.2f} + pipe losses {en['pipe_losses_kWh']:.2f} "
        f"+ stored {en['stored_change_kWh']:.2f} kWh "
        f"(closure error {en['balance_error_pct']:.2e} %)"
    )
    return "\n".join(lines)


def scheme_comparison_text(runs: list[Run]) -> str:
    """Times to setpoint of every room under several schemes, side by side.

    Parameters
    ----------
    runs : list of Run
        Runs of the same scenario under different schemes.

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
        cells = []
        for run in runs:
            t = run.summary.rooms[i].time_to_setpoint_s
            cells.append(f"{'--' if t is None else f'{t / 60:.0f} min':>{width}}")
        lines.append(f"{room.id:<12}" + "".join(cells))
    last = []
    for run in runs:
        times = [r.time_to_setpoint_s for r in run.summary.rooms]
        value = "--" if any(t is None for t in times) else f"{max(times) / 60:.0f} min"
        last.append(f"{value:>{width}}")
    lines.append(f"{'all rooms':<12}" + "".join(last))
    return "\n".join(lines)


def flow_split_dict(split) -> dict:
    """A steady flow split as JSON-ready data in practical units.

    Parameters
    ----------
    split : simheat.analysis.flows.FlowSplit
        The steady flow split.

    Returns
    -------
    dict
        Keys ``scheme``, ``water_temperature_C``, ``emitters``, ``pump``, ``limits``
        and ``caution``; flows in kg/h, pressures in kPa, velocities in m/s.
    """
    from simheat.analysis.flows import BRANCH_NOISE_LIMIT_M_S, STARVING_FRACTION

    return {
        "scheme": split.scheme,
        "water_temperature_C": split.water_temp_C,
        "emitters": [
            {
                "id": e.id,
                "flow_kg_per_h": round(e.flow_kg_s * KG_S_TO_KG_H, 2),
                "design_flow_kg_per_h": round(e.design_flow_kg_s * KG_S_TO_KG_H, 2),
                "flow_pct_of_design": round(
                    100.0 * e.flow_kg_s / e.design_flow_kg_s, 1
                ),
                "dp_available_kPa": round(e.dp_available_Pa / 1e3, 3),
                "branch_velocity_m_per_s": round(e.branch_velocity_m_s, 3),
                "starving": e.starving,
                "noisy": e.noisy,
            }
            for e in split.emitters
        ],
        "pump": {
            "flow_m3_per_h": round(split.pump_flow_m3_h, 4),
            "head_kPa": round(split.pump_head_Pa / 1e3, 3),
        },
        "pumps": [
            {"name": name, "flow_m3_per_h": round(q, 4), "head_kPa": round(h / 1e3, 3)}
            for name, q, h in split.pumps
        ],
        "limits": {
            "starving_below_pct_of_design": 100.0 * STARVING_FRACTION,
            "branch_noise_velocity_m_per_s": BRANCH_NOISE_LIMIT_M_S,
        },
        "caution": CAUTION,
    }


def flow_split_text(split) -> str:
    """A steady flow split as a plain-text table with flags.

    Parameters
    ----------
    split : simheat.analysis.flows.FlowSplit
        The steady flow split.

    Returns
    -------
    str
        One row per emitter, the pump duty point and the meaning of the flags.
    """
    data = flow_split_dict(split)
    limits = data["limits"]
    lines = [
        f"steady flow split -- scheme: {data['scheme']}, all valves open, water at "
        f"{data['water_temperature_C']:g} °C",
        "",
        f"{'emitter':<14}{'flow':>10}{'design':>10}{'of design':>11}{'dp at tees':>12}"
        f"{'branch v':>11}  flags",
    ]
    for e in data["emitters"]:
        flags = []
        if e["starving"]:
            flags.append("STARVING")
        if e["noisy"]:
            flags.append("NOISE")
        lines.append(
            f"{e['id']:<14}{e['flow_kg_per_h']:>5.0f} kg/h"
            f"{e['design_flow_kg_per_h']:>5.0f} kg/h"
            f"{e['flow_pct_of_design']:>9.0f} %{e['dp_available_kPa']:>8.2f} kPa"
            f"{e['branch_velocity_m_per_s']:>7.2f} m/s  {' '.join(flags)}"
        )
    lines += [
        "",
        *(
            f"pump duty point, {p['name']}: {p['flow_m3_per_h']:.3f} m3/h "
            f"at {p['head_kPa']:.1f} kPa"
            for p in data["pumps"]
        ),
        f"flags: STARVING below {limits['starving_below_pct_of_design']:.0f} % "
        f"of design flow; NOISE above {limits['branch_noise_velocity_m_per_s']:g} m/s "
        "in the branch (common trade limit)",
    ]
    return "\n".join(lines)
