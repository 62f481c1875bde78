"""``simheat check``: loads, radiators, pipes, pump, source, starving and fixes."""

from __future__ import annotations

from pathlib import Path

import click

from simheat.cli.common import (
    SimheatCommand,
    json_option,
    scenario_argument,
    scheme_option,
)


@click.command("check", cls=SimheatCommand)
@scenario_argument
@scheme_option
@click.option(
    "--all-schemes", is_flag=True, help="Check every scheme the scenario lists."
)
@click.option(
    "--simulate",
    is_flag=True,
    help="Also simulate the morning, and again with each best fix.",
)
@json_option
def check_command(
    scenario: Path,
    scheme: str | None,
    all_schemes: bool,
    simulate: bool,
    as_json: bool,
) -> None:
    """Check a design: loads, radiators, pipes, pump, source; fix starving radiators."""
    from simheat.analysis.check import check_scheme
    from simheat.report import CAUTION, to_json
    from simheat.report.check import check_dict, check_text, checks_dict
    from simheat.scenario import load_scenario

    if all_schemes and scheme:
        raise click.UsageError("give either --scheme or --all-schemes, not both")
    loaded = load_scenario(scenario)
    schemes = list(loaded.schemes) if all_schemes else [scheme or loaded.schemes[0]]
    results = []
    for name in schemes:
        if simulate and not as_json:
            click.echo(f"checking {loaded.name!r} under {name} ...", err=True)
        results.append(check_scheme(loaded, name, simulate=simulate))
    if as_json:
        data = check_dict(results[0]) if len(results) == 1 else checks_dict(results)
        click.echo(to_json(data))
        return
    for result in results:
        click.echo(check_text(result))
        click.echo("")
    click.echo(CAUTION)
