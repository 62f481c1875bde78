"""``simheat flows``: the steady flow split with every valve open."""

from __future__ import annotations

from pathlib import Path

import click

from simheat.cli.common import (
    FiniteRange,
    SimheatCommand,
    json_option,
    scenario_argument,
    scheme_option,
)


@click.command("flows", cls=SimheatCommand)
@scenario_argument
@scheme_option
@click.option(
    "--water-temperature-C",
    "water_temp_C",
    type=FiniteRange(0.0, 100.0),
    help="Uniform water temperature [°C] (default: the design supply temperature).",
)
@json_option
def flows_command(
    scenario: Path, scheme: str | None, water_temp_C: float | None, as_json: bool
) -> None:
    """Steady flow split with every valve open: which emitters starve."""
    from simheat.analysis.flows import steady_flow_split
    from simheat.report import CAUTION, flow_split_dict, flow_split_text, to_json
    from simheat.scenario import load_scenario

    split = steady_flow_split(load_scenario(scenario), scheme, water_temp_C)
    if as_json:
        click.echo(to_json(flow_split_dict(split)))
        return
    click.echo(flow_split_text(split))
    click.echo("")
    click.echo(CAUTION)
