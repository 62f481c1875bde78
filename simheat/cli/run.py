"""``simheat run``: simulate a cold morning under one or every scheme."""

from __future__ import annotations

from pathlib import Path

import click

from simheat.cli.common import (
    SimheatCommand,
    check_ready,
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
@click.option(
    "--resume",
    is_flag=True,
    help="Keep each complete run file of the same scenario text; run the rest.",
)
def run_command(
    scenario: Path,
    scheme: str | None,
    all_schemes: bool,
    out_dir: Path,
    ready_by_s: float | None,
    ready_rooms_text: str | None,
    as_json: bool,
    overwrite: bool,
    resume: bool,
) -> None:
    """Simulate a cold morning: time for each room to reach its setpoint."""
    from simheat.analysis.start_time import latest_start
    from simheat.dynamics.controls import check_pump_stops
    from simheat.dynamics.simulate import simulate
    from simheat.dynamics.size import check_problem_size
    from simheat.files import output_folder
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
    from simheat.runs.resume import kept_run
    from simheat.runs.store import save_run
    from simheat.scenario import load_scenario

    if all_schemes and scheme:
        raise click.UsageError("give either --scheme or --all-schemes, not both")
    if ready_rooms_text is not None and ready_by_s is None:
        raise click.UsageError("--ready-rooms needs --ready-by")
    loaded = load_scenario(scenario)
    schemes = list(loaded.schemes) if all_schemes else [scheme or loaded.schemes[0]]
    check_pump_stops(loaded, schemes)  # before anything is simulated or written
    for name in schemes:
        check_problem_size(loaded, name)
    ready_rooms = name_list(ready_rooms_text)
    check_ready(loaded, ready_by_s, ready_rooms)
    targets = {
        name: (
            out_dir / f"{scenario.stem}_{name}.h5",
            out_dir / f"{scenario.stem}_{name}_warmup.png",
        )
        for name in schemes
    }
    # --resume keeps a complete run file of the same scenario text and scheme
    # (its figure drawn again when missing or older); any other existing file is
    # an output like any other, replaced only with --overwrite.
    kept = {}
    if resume:
        kept = {
            name: k
            for name, paths in targets.items()
            if (k := kept_run(*paths, loaded, name)) is not None
        }
    refuse_to_overwrite(
        (
            path
            for name, (run_path, figure_path) in targets.items()
            for path in ((figure_path,) if name in kept else (run_path, figure_path))
            if name not in kept or kept[name].redraw_figure
        ),
        overwrite,
        None if resume else "--resume to keep complete runs of this scenario",
    )
    output_folder(out_dir)
    runs, reports, starts = [], [], []
    for name in schemes:
        run_path, figure_path = targets[name]
        run = kept[name].run if name in kept else None
        if run is None:
            if not as_json:
                click.echo(f"simulating {loaded.name!r} under {name} ...", err=True)
            run = simulate(loaded, name)
        elif not as_json:
            click.echo(f"keeping {run_path} (complete, same scenario)", err=True)
        # the report before writing: no files for a run whose report fails
        report = run_summary_dict(run)
        text = run_summary_text(run)
        if ready_by_s is not None:
            if not as_json:
                click.echo(f"finding the latest start under {name} ...", err=True)
            starts.append(latest_start(loaded, name, ready_by_s, ready_rooms))
            report["start_time"] = start_time_entry(starts[-1])
        if name not in kept:
            save_run(run, run_path, overwrite=overwrite)
        if name not in kept or kept[name].redraw_figure:
            save_figure(plot_warmup(run), figure_path, overwrite=overwrite)
        report["files"] = {"run": str(run_path), "figure": str(figure_path)}
        runs.append(run)
        reports.append(report)
        if not as_json:
            click.echo(text)
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
