"""``simheat report``: one self-contained HTML page to hand over a design."""

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
    scheme_list,
    schemes_option,
)


@click.command("report", cls=SimheatCommand)
@scenario_argument
@schemes_option
@out_dir_option("Directory for the page, DIR/<scenario>_report.html.")
@json_option
@overwrite_option
def report_command(
    scenario: Path,
    schemes_text: str | None,
    out_dir: Path,
    as_json: bool,
    overwrite: bool,
) -> None:
    """Write the hand-over report: house, schemes compared, schedules, cautions."""
    from simheat.analysis.compare import check_schemes
    from simheat.analysis.handover import build_handover
    from simheat.dynamics.size import check_problem_size
    from simheat.files import output_folder
    from simheat.report import CAUTION, to_json
    from simheat.report.html import handover_html, write_html
    from simheat.scenario import load_scenario

    loaded = load_scenario(scenario)
    requested = scheme_list(schemes_text)
    schemes = check_schemes(loaded.schemes if requested is None else requested)
    page_path = out_dir / f"{scenario.stem}_report.html"
    refuse_to_overwrite([page_path], overwrite)
    for name in schemes:
        check_problem_size(loaded, name)
    output_folder(out_dir)  # before the schemes are simulated

    def progress(text: str) -> None:
        if not as_json:
            click.echo(f"{text} ...", err=True)

    handover = build_handover(loaded, schemes, on_step=progress)
    progress("writing the page")
    write_html(handover_html(handover), page_path, overwrite=overwrite)
    if as_json:
        data = {
            "scenario": loaded.name,
            "schemes": list(schemes),
            "ranking": list(handover.comparison.ranking),
            "sections": ["house", "compared", *(f"scheme:{s}" for s in schemes)],
            "analyses": list(handover.analyses),
            "files": {"report": str(page_path)},
            "caution": CAUTION,
        }
        click.echo(to_json(data))
        return
    click.echo(f"report: {page_path}")
    click.echo("")
    click.echo(CAUTION)
