"""``simheat run``: simulate a cold morning under one or every scheme."""

from __future__ import annotations

from pathlib import Path

import click

from simheat.cli.common import (
    SimheatCommand,
    json_option,
    name_list,
    out_dir_option,
    overwrite_option,
    ready_by_option,
    ready_rooms_option,
    refuse_to_overwrite,
    scenario_argument,
    scheme_option,
)


@click.command("run", cls=SimheatCommand)
@scenario_argument
@scheme_option
@click.option(
    "--all-schemes", is_flag=True, help="Run every scheme the scenario lists, in turn."
)
@out_dir_option("Directory for the run files and figures.")
@ready_by_option
@ready_rooms_option
@json_option
@overwrite_option
def run_command(
    scenario: Path,
    scheme: str | None,
    all_schemes: bool,
    out_dir: Path,
    ready_by_s: float | None,
    ready_rooms_text: str | None,
    as_json: bool,
    overwrite: bool,
) -> None:
    """Simulate a cold morning: time for each room to reach its setpoint."""
    from simheat.analysis.start_time import latest_start, ready_by_time_s, room_indices
    from simheat.dynamics.controls import check_pump_stops
    from simheat.dynamics.simulate import simulate
    from simheat.plots import save_figure
    from simheat.plots.warmup import plot_warmup
    from simheat.report import (
        CAUTION,
        run_summary_dict,
        run_summary_text,
        runs_summary_dict,
        scheme_comparison_text,
        start_time_entry,
        start_times_text,
        to_json,
    )
    from simheat.runs.store import save_run
    from simheat.scenario import load_scenario

    if all_schemes and scheme:
        raise click.UsageError("give either --scheme or --all-schemes, not both")
    if ready_rooms_text is not None and ready_by_s is None:
        raise click.UsageError("--ready-rooms needs --ready-by")
    loaded = load_scenario(scenario)
    schemes = list(loaded.schemes) if all_schemes else [scheme or loaded.schemes[0]]
    check_pump_stops(loaded, schemes)  # before anything is simulated or written
    ready_rooms = name_list(ready_rooms_text)
    if ready_by_s is not None:
        ready_by_time_s(loaded, ready_by_s)
        room_indices(loaded, ready_rooms)
    targets = {
        name: (
            out_dir / f"{scenario.stem}_{name}.h5",
            out_dir / f"{scenario.stem}_{name}_warmup.png",
        )
        for name in schemes
    }
    refuse_to_overwrite((p for paths in targets.values() for p in paths), overwrite)
    out_dir.mkdir(parents=True, exist_ok=True)
    runs, reports, starts = [], [], []
    for name in schemes:
        if not as_json:
            click.echo(f"simulating {loaded.name!r} under {name} ...", err=True)
        run = simulate(loaded, name)
        run_path, figure_path = targets[name]
        save_run(run, run_path, overwrite=overwrite)
        save_figure(plot_warmup(run), figure_path, overwrite=overwrite)
        report = run_summary_dict(run)
        if ready_by_s is not None:
            if not as_json:
                click.echo(f"finding the latest start under {name} ...", err=True)
            starts.append(latest_start(loaded, name, ready_by_s, ready_rooms))
            report["start_time"] = start_time_entry(starts[-1])
        report["files"] = {"run": str(run_path), "figure": str(figure_path)}
        runs.append(run)
        reports.append(report)
        if not as_json:
            click.echo(run_summary_text(run))
            click.echo(f"run file: {run_path}\nfigure:   {figure_path}\n")
    if as_json:
        data = reports[0] if len(reports) == 1 else runs_summary_dict(reports)
        click.echo(to_json(data))
        return
    if len(runs) > 1:
        click.echo("time to setpoint by scheme (from the start of comfort):")
        click.echo(scheme_comparison_text(runs))
        click.echo("")
    if starts:
        click.echo(start_times_text(starts, loaded.simulation.reached_tolerance_K))
        click.echo("")
    click.echo(CAUTION)
