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


def run_summary_dict(run: Run) -> dict:
    """The summary of a run as JSON-ready data in practical units.

    Parameters
    ----------
    run : Run
        A simulated run.

    Returns
    -------
    dict
        Keys ``scenario``, ``scheme``, ``rooms``, ``emitters``, ``energy``, ``solver``
        and ``caution``; times in minutes, flows in kg/h, energy in kWh.
    """
    s = run.summary
    rooms = [
        {
            "id": r.id,
            "name": room.name,
            "setpoint_C": r.setpoint_C,
            "time_to_setpoint_min": _minutes(r.time_to_setpoint_s),
            "final_air_temperature_C": round(r.final_air_temp_C, 2),
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
    return {
        "scenario": run.scenario.name,
        "scheme": run.scheme,
        "rooms": rooms,
        "emitters": emitters,
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
    lines.append(f"{'room':<12} {'setpoint':>8}  {'time to setpoint':<28}")
    for r in data["rooms"]:
        if r["time_to_setpoint_min"] is None:
            reached = f"not reached (final {r['final_air_temperature_C']:.1f} °C)"
        else:
            reached = f"{r['time_to_setpoint_min']:.0f} min"
        lines.append(f"{r['id']:<12} {r['setpoint_C']:>6.1f} °C  {reached:<28}")
    lines.append("")
    lines.append(
        f"{'emitter':<12} {'room':<10} {'mean flow':>10} {'design':>9} {'of design':>9} "
        f"{'mean output':>11}"
    )
    for e in data["emitters"]:
        lines.append(
            f"{e['id']:<12} {e['room']:<10} {e['mean_flow_kg_per_h']:>6.1f} kg/h "
            f"{e['design_flow_kg_per_h']:>4.0f} kg/h {e['flow_pct_of_design']:>7.0f} % "
            f"{e['mean_output_W']:>9.0f} W"
        )
    en = data["energy"]
    lines.append("")
    lines.append(
        f"energy: source {en['source_kWh']:.2f} kWh = rooms {en['room_gains_kWh']:.2f} "
        f"+ pipe losses {en['pipe_losses_kWh']:.2f} + stored {en['stored_change_kWh']:.2f} "
        f"kWh (closure error {en['balance_error_pct']:.2e} %)"
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
