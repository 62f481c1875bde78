"""``simheat throttle``: what turning one radiator down does to the others."""

from __future__ import annotations

from pathlib import Path

import click

from simheat.cli.common import (
    FiniteRange,
    SimheatCommand,
    json_option,
    out_dir_option,
    overwrite_option,
    refuse_to_overwrite,
    scenario_argument,
    scheme_option,
)
from simheat.errors import ScenarioError

ALL_EMITTERS = "all"


@click.command("throttle", cls=SimheatCommand)
@scenario_argument
@scheme_option
@click.option(
    "--emitter",
    "emitter_id",
    required=True,
    metavar="ID|all",
    help="Emitter whose valve is throttled, or 'all' for each in turn.",
)
@click.option(
    "--opening",
    type=FiniteRange(0.0, 1.0),
    required=True,
    metavar="FRACTION",
    help="Valve opening after the throttle, 0 (closed) to 1 (open).",
)
@click.option(
    "--at-min",
    "at_min",
    type=FiniteRange(min=0.0),
    metavar="T",
    help="Also simulate the morning with the throttle at T minutes after the start "
    "of the run, against the morning without it.",
)
@out_dir_option("Directory for the figure (--emitter all, or --at-min).")
@json_option
@overwrite_option
def throttle_command(
    scenario: Path,
    scheme: str | None,
    emitter_id: str,
    opening: float,
    at_min: float | None,
    out_dir: Path,
    as_json: bool,
    overwrite: bool,
) -> None:
    """Steady change of every other emitter's flow and output when one throttles."""
    from simheat.analysis.throttle import (
        check_opening,
        emitter_position,
        throttle_matrix,
        throttle_steady,
        throttle_transient,
    )
    from simheat.dynamics.size import check_problem_size
    from simheat.files import output_folder
    from simheat.plots import plot_interaction, plot_throttle_response, save_figure
    from simheat.report import (
        CAUTION,
        matrix_dict,
        matrix_text,
        throttle_dict,
        throttle_text,
        to_json,
        transient_text,
        with_files,
    )
    from simheat.scenario import load_scenario

    loaded = load_scenario(scenario)
    opening = check_opening(opening)
    scheme = scheme or loaded.schemes[0]
    if emitter_id == ALL_EMITTERS:
        if at_min is not None:
            raise click.UsageError("--at-min needs one emitter, not --emitter all")
        figure_path = out_dir / f"{scenario.stem}_{scheme}_throttle.png"
        refuse_to_overwrite([figure_path], overwrite)
        output_folder(out_dir)
        matrix = throttle_matrix(loaded, scheme, opening)
        save_figure(plot_interaction(matrix), figure_path, overwrite=overwrite)
        if as_json:
            files = {"figure": str(figure_path)}
            click.echo(to_json(with_files(matrix_dict(matrix), files)))
            return
        click.echo(matrix_text(matrix))
        click.echo(f"figure: {figure_path}")
        click.echo("")
        click.echo(CAUTION)
        return

    try:
        emitter_position(loaded, emitter_id)
    except ScenarioError as exc:  # the option, not the library's argument
        message = str(exc).removeprefix("emitter: ")
        raise click.BadParameter(message, param_hint="'--emitter'") from None
    if at_min is not None and 60.0 * at_min > loaded.simulation.duration_s:
        raise click.BadParameter(
            f"must lie within the run, 0 to "
            f"{loaded.simulation.duration_s / 60.0:g} min, got {at_min:g}",
            param_hint="'--at-min'",
        )
    figure_path = out_dir / f"{scenario.stem}_{scheme}_throttle_{emitter_id}.png"
    if at_min is not None:
        refuse_to_overwrite([figure_path], overwrite)
        check_problem_size(loaded, scheme)
        output_folder(out_dir)
    result = throttle_steady(loaded, scheme, emitter_id, opening)
    transient = None
    if at_min is not None:
        if not as_json:
            click.echo(f"simulating {loaded.name!r} under {scheme} ...", err=True)
        transient = throttle_transient(
            loaded, scheme, emitter_id, opening, 60.0 * at_min
        )
        save_figure(plot_throttle_response(transient), figure_path, overwrite=overwrite)
    if as_json:
        data = throttle_dict(result, transient)
        if transient is not None:
            data = with_files(data, {"figure": str(figure_path)})
        click.echo(to_json(data))
        return
    click.echo(throttle_text(result))
    if transient is not None:
        click.echo("")
        click.echo(transient_text(transient))
        click.echo(f"figure: {figure_path}")
    click.echo("")
    click.echo(CAUTION)
