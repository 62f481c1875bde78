"""``simheat balance``: presets, circuit valves and pump settings, verified."""

from __future__ import annotations

from pathlib import Path

import click

from simheat.cli.common import (
    SimheatCommand,
    json_option,
    out_dir_option,
    overwrite_option,
    refuse_to_overwrite,
    scenario_argument,
    scheme_option,
)


@click.command("balance", cls=SimheatCommand)
@scenario_argument
@scheme_option
@click.option(
    "--all-schemes", is_flag=True, help="Balance every scheme of the scenario."
)
@click.option(
    "--keep-pump",
    is_flag=True,
    help="Keep every pump as the scenario sets it; its surplus goes into the valves.",
)
@click.option(
    "--discrete", is_flag=True, help="Round presets and turns to their tables' steps."
)
@click.option(
    "--write-scenario",
    "write_path",
    type=click.Path(path_type=Path),
    help="Write the balanced scenario (one scheme) to this file.",
)
@click.option(
    "--simulate", is_flag=True, help="Also simulate the morning before and after."
)
@out_dir_option("Directory for the run files of --simulate.")
@json_option
@overwrite_option
def balance_command(
    scenario: Path,
    scheme: str | None,
    all_schemes: bool,
    keep_pump: bool,
    discrete: bool,
    write_path: Path | None,
    simulate: bool,
    out_dir: Path,
    as_json: bool,
    overwrite: bool,
) -> None:
    """Presets, circuit valves and pump settings for every design flow.

    Each radiator's valve preset (or lockshield turns), each circuit valve and
    each pump's setting, verified by re-solving the balanced network.
    """
    if scheme and all_schemes:
        raise click.UsageError("give --scheme or --all-schemes, not both")
    from simheat.analysis.balance import balance_scheme, morning_before_after
    from simheat.dynamics.size import check_problem_size
    from simheat.files import output_folder
    from simheat.report import CAUTION, to_json, with_files
    from simheat.report.balance import balance_dict, balance_text
    from simheat.scenario import load_scenario

    loaded = load_scenario(scenario)
    schemes = list(loaded.schemes) if all_schemes else [scheme or loaded.schemes[0]]
    if write_path is not None and len(schemes) > 1:
        raise click.UsageError(
            "--write-scenario writes the settings of one scheme; give --scheme"
        )
    run_paths = {}
    if simulate:
        for name in schemes:
            for when in ("unbalanced", "balanced"):
                run_paths[name, when] = out_dir / f"{scenario.stem}_{name}_{when}.h5"
    refuse_to_overwrite(
        [*run_paths.values(), *([write_path] if write_path else [])], overwrite
    )
    if simulate:
        for name in schemes:
            check_problem_size(loaded, name)
        output_folder(out_dir)
    if write_path is not None:
        output_folder(write_path.parent)
    balances = [
        balance_scheme(loaded, name, keep_pump=keep_pump, discrete=discrete)
        for name in schemes
    ]
    files: dict[str, str] = {}
    mornings = None
    if simulate:
        from simheat.runs.store import save_run

        mornings = []
        for b in balances:
            before, after = morning_before_after(loaded, b.balanced, b.scheme)
            for when, outcome in (("unbalanced", before), ("balanced", after)):
                path = run_paths[b.scheme, when]
                save_run(outcome.run, path, overwrite=overwrite)
                files[f"{b.scheme}_{when}_run"] = str(path)
            mornings.append((before, after))
    if write_path is not None:
        from simheat.scenario.write import write_scenario_text

        write_scenario_text(balances[0].text, write_path, overwrite=overwrite)
        files["scenario"] = str(write_path)
    if as_json:
        data = balance_dict(balances, mornings)
        click.echo(to_json(with_files(data, files) if files else data))
        return
    click.echo(balance_text(balances, mornings))
    for what, path in files.items():
        click.echo(f"wrote {what.replace('_', ' ')}: {path}")
    click.echo("")
    click.echo(CAUTION)
