"""``simheat layouts``: every piping scheme's pipe, fittings, index circuit and pump."""

from __future__ import annotations

from pathlib import Path

import click

from simheat.cli.common import (
    SimheatCommand,
    json_option,
    refuse_to_overwrite,
    scenario_argument,
    scheme_option,
)


@click.command("layouts", cls=SimheatCommand)
@scenario_argument
@scheme_option
@json_option
@click.option(
    "--figure",
    "figure_dir",
    type=click.Path(path_type=Path),
    help="Directory for one schematic (PNG) per scheme.",
)
@click.option("--overwrite", is_flag=True, help="Replace existing figures.")
def layouts_command(
    scenario: Path,
    scheme: str | None,
    as_json: bool,
    figure_dir: Path | None,
    overwrite: bool,
) -> None:
    """Compare every piping scheme: pipe, fittings, index circuit, pump, water.

    Without --scheme every scheme simheat knows is built from the scenario's one
    description of rooms, radiators and route.
    """
    from simheat.analysis.layouts import design_layouts
    from simheat.report import CAUTION, layouts_dict, layouts_text, to_json
    from simheat.scenario import load_scenario

    loaded = load_scenario(scenario)
    layouts = design_layouts(loaded, [scheme] if scheme else None)
    paths = {}
    if figure_dir is not None:
        from simheat.files import output_folder
        from simheat.plots import plot_schematic, save_figure

        paths = {
            d.scheme: figure_dir / f"{scenario.stem}_{d.scheme}_schematic.png"
            for d in layouts.designs
        }
        refuse_to_overwrite(paths.values(), overwrite)
        output_folder(figure_dir)
        for d in layouts.designs:
            title = f"{loaded.name}\n{d.scheme.replace('_', ' ')}"
            figure = plot_schematic(d.built, title=title)
            save_figure(figure, paths[d.scheme], overwrite=overwrite)
    if as_json:
        click.echo(to_json(layouts_dict(layouts, paths)))
        return
    click.echo(layouts_text(layouts, paths))
    click.echo(CAUTION)
