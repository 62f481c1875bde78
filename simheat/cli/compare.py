"""``simheat compare``: every scheme on the same house and morning, side by side."""

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
    scheme_list,
    schemes_option,
)


@click.command("compare", cls=SimheatCommand)
@scenario_argument
@schemes_option
@out_dir_option("Directory for the run files and the figure.")
@ready_by_option
@ready_rooms_option
@json_option
@overwrite_option
def compare_command(
    scenario: Path,
    schemes_text: str | None,
    out_dir: Path,
    ready_by_s: float | None,
    ready_rooms_text: str | None,
    as_json: bool,
    overwrite: bool,
) -> None:
    """Compare piping schemes: times to setpoint per room, side by side, ranked.

    With --ready-by, also each scheme's latest heating start, and the ranking
    is by it.
    """
    from simheat.analysis.compare import check_schemes, compare_schemes
    from simheat.dynamics.size import check_problem_size
    from simheat.files import output_folder
    from simheat.plots import plot_scheme_comparison, save_figure
    from simheat.report import (
        CAUTION,
        comparison_dict,
        comparison_text,
        to_json,
        with_files,
    )
    from simheat.runs.store import save_run
    from simheat.scenario import load_scenario

    if ready_rooms_text is not None and ready_by_s is None:
        raise click.UsageError("--ready-rooms needs --ready-by")
    loaded = load_scenario(scenario)
    requested = scheme_list(schemes_text)
    schemes = check_schemes(loaded.schemes if requested is None else requested)
    check_ready(loaded, ready_by_s, name_list(ready_rooms_text))
    run_paths = {name: out_dir / f"{scenario.stem}_{name}.h5" for name in schemes}
    figure_path = out_dir / f"{scenario.stem}_compare.png"
    refuse_to_overwrite([*run_paths.values(), figure_path], overwrite)
    for name in schemes:
        check_problem_size(loaded, name)
    output_folder(out_dir)

    def progress(name: str) -> None:
        if not as_json:
            click.echo(f"simulating {loaded.name!r} under {name} ...", err=True)

    comparison = compare_schemes(
        loaded,
        schemes,
        on_scheme=progress,
        ready_by_clock_s=ready_by_s,
        ready_rooms=name_list(ready_rooms_text),
    )
    data = comparison_dict(comparison)  # before writing: no files for a bad run
    for run in comparison.runs:
        save_run(run, run_paths[run.scheme], overwrite=overwrite)
    save_figure(
        plot_scheme_comparison(comparison.runs), figure_path, overwrite=overwrite
    )
    files = {
        "runs": {name: str(path) for name, path in run_paths.items()},
        "figure": str(figure_path),
    }
    if as_json:
        click.echo(to_json(with_files(data, files)))
        return
    click.echo(comparison_text(comparison))
    click.echo("")
    for name, path in run_paths.items():
        click.echo(f"run file ({name}): {path}")
    click.echo(f"figure: {figure_path}")
    click.echo("")
    click.echo(CAUTION)
