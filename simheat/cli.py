"""The ``simheat`` command: parse, call the library, report. No physics here."""

from __future__ import annotations

import json
from pathlib import Path

import click

from simheat import __version__
from simheat.errors import ConvergenceError, RunFileError, ScenarioError, SimheatError
from simheat.hydraulics.layouts import SCHEMES
from simheat.report import (
    CAUTION,
    flow_split_dict,
    flow_split_text,
    run_summary_dict,
    run_summary_text,
    scheme_comparison_text,
)


class _Command(click.Command):
    """Turn simheat's own errors into one line and the documented exit code."""

    def invoke(self, ctx: click.Context):
        try:
            return super().invoke(ctx)
        except (ScenarioError, RunFileError, FileExistsError) as exc:
            click.echo(f"error: {exc}", err=True)
            ctx.exit(2)
        except ConvergenceError as exc:
            click.echo(f"computation failed: {exc}", err=True)
            ctx.exit(1)
        except SimheatError as exc:
            click.echo(f"error: {exc}", err=True)
            ctx.exit(1)


scenario_argument = click.argument(
    "scenario", type=click.Path(dir_okay=False, path_type=Path)
)
scheme_option = click.option(
    "--scheme",
    type=click.Choice(sorted(SCHEMES)),
    help="Piping scheme (default: the scenario's first scheme).",
)


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="simheat")
def main() -> None:
    """Warm-up and flow-split simulation of radiator heating layouts."""


@main.command("run", cls=_Command)
@scenario_argument
@scheme_option
@click.option(
    "--all-schemes", is_flag=True, help="Run every scheme the scenario lists, in turn."
)
@click.option(
    "--out",
    "out_dir",
    type=click.Path(file_okay=False, path_type=Path),
    default=Path("simheat-out"),
    show_default=True,
    help="Directory for the run files and figures.",
)
@click.option(
    "--json", "as_json", is_flag=True, help="Print one JSON object instead of tables."
)
@click.option("--overwrite", is_flag=True, help="Replace existing output files.")
def run_command(
    scenario: Path,
    scheme: str | None,
    all_schemes: bool,
    out_dir: Path,
    as_json: bool,
    overwrite: bool,
) -> None:
    """Simulate a cold morning: time for each room to reach its setpoint."""
    from simheat.dynamics.simulate import simulate
    from simheat.plots import save_figure
    from simheat.plots.warmup import plot_warmup
    from simheat.runs.store import save_run
    from simheat.scenario import load_scenario

    if all_schemes and scheme:
        raise click.UsageError("give either --scheme or --all-schemes, not both")
    loaded = load_scenario(scenario)
    schemes = list(loaded.schemes) if all_schemes else [scheme or loaded.schemes[0]]
    targets = {
        name: (
            out_dir / f"{scenario.stem}_{name}.h5",
            out_dir / f"{scenario.stem}_{name}_warmup.png",
        )
        for name in schemes
    }
    if not overwrite:
        for paths in targets.values():
            for path in paths:
                if path.exists():
                    raise FileExistsError(
                        f"{path} exists; pass --overwrite to replace it"
                    )
    out_dir.mkdir(parents=True, exist_ok=True)
    runs, reports = [], []
    for name in schemes:
        if not as_json:
            click.echo(f"simulating {loaded.name!r} under {name} ...", err=True)
        run = simulate(loaded, name)
        run_path, figure_path = targets[name]
        save_run(run, run_path, overwrite=overwrite)
        save_figure(plot_warmup(run), figure_path)
        report = run_summary_dict(run)
        report["files"] = {"run": str(run_path), "figure": str(figure_path)}
        runs.append(run)
        reports.append(report)
        if not as_json:
            click.echo(run_summary_text(run))
            click.echo(f"run file: {run_path}\nfigure:   {figure_path}\n")
    if as_json:
        data = (
            reports[0] if len(reports) == 1 else {"runs": reports, "caution": CAUTION}
        )
        click.echo(json.dumps(data, indent=2))
        return
    if len(runs) > 1:
        click.echo("time to setpoint by scheme (from the start of comfort):")
        click.echo(scheme_comparison_text(runs))
        click.echo("")
    click.echo(CAUTION)


@main.command("flows", cls=_Command)
@scenario_argument
@scheme_option
@click.option(
    "--water-temperature-C",
    "water_temp_C",
    type=click.FloatRange(0.0, 100.0),
    help="Uniform water temperature [°C] (default: the design supply temperature).",
)
@click.option(
    "--json", "as_json", is_flag=True, help="Print one JSON object instead of a table."
)
def flows_command(
    scenario: Path, scheme: str | None, water_temp_C: float | None, as_json: bool
) -> None:
    """Steady flow split with every valve open: which emitters starve."""
    from simheat.analysis.flows import steady_flow_split
    from simheat.scenario import load_scenario

    split = steady_flow_split(load_scenario(scenario), scheme, water_temp_C)
    if as_json:
        click.echo(json.dumps(flow_split_dict(split), indent=2))
        return
    click.echo(flow_split_text(split))
    click.echo("")
    click.echo(CAUTION)
