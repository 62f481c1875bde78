"""``simheat readiness``: are the radiators ready for low flow temperatures."""

from __future__ import annotations

from pathlib import Path

import click

from simheat.cli.common import (
    SimheatCommand,
    clock_time_s,
    json_option,
    name_list,
    overwrite_option,
    ready_rooms_option,
    refuse_to_overwrite,
    scenario_argument,
    scheme_option,
)

DEFAULT_TARGETS = "55,50,45,35"


def parse_targets(text: str) -> list[float]:
    """Target flow temperatures from ``"55,50,45"``.

    Parameters
    ----------
    text : str
        Comma-separated temperatures. [°C]

    Returns
    -------
    list of float
        The temperatures. [°C]

    Raises
    ------
    click.BadParameter
        When an entry is not a number (exit 2).

    Examples
    --------
    >>> parse_targets("55, 45,35.5")
    [55.0, 45.0, 35.5]
    """
    values = []
    for part in text.split(","):
        try:
            values.append(float(part))
        except ValueError:
            raise click.BadParameter(
                f"must be numbers separated by commas, got {part.strip()!r}",
                param_hint="--targets",
            ) from None
    return values


@click.command("readiness", cls=SimheatCommand)
@scenario_argument
@scheme_option
@click.option(
    "--all-schemes", is_flag=True, help="Cover every scheme the scenario lists."
)
@click.option(
    "--targets",
    default=DEFAULT_TARGETS,
    show_default=True,
    help="Target flow temperatures [°C], comma-separated.",
)
@click.option(
    "--drop-K",
    "drop_K",
    type=float,
    help="Supply-return difference kept at every flow temperature [K] "
    "(default: the design drop).",
)
@click.option(
    "--return-temp-C",
    "return_C",
    type=float,
    help="Hold the return at this temperature [°C] instead of keeping a drop.",
)
@click.option(
    "--simulate",
    is_flag=True,
    help="Also simulate the morning with the flow temperature fixed at each target.",
)
@click.option(
    "--figure",
    "figure_dir",
    type=click.Path(file_okay=False, path_type=Path),
    help="Directory for the figure: radiator output as % of load against flow "
    "temperature.",
)
@click.option(
    "--ready-by",
    "ready_by_s",
    metavar="HH:MM",
    callback=clock_time_s,
    help="With --simulate: in each morning also find the latest heating start "
    "that has every room at setpoint by this clock time (bisection, simulated).",
)
@ready_rooms_option
@json_option
@overwrite_option
def readiness_command(
    scenario: Path,
    scheme: str | None,
    all_schemes: bool,
    targets: str,
    drop_K: float | None,
    return_C: float | None,
    simulate: bool,
    figure_dir: Path | None,
    ready_by_s: float | None,
    ready_rooms_text: str | None,
    as_json: bool,
    overwrite: bool,
) -> None:
    """Low-temperature readiness: lowest flow temperature, radiators to upgrade."""
    from simheat.analysis.readiness import readiness
    from simheat.report import CAUTION, to_json, with_files
    from simheat.report.readiness import readiness_dict, readiness_text
    from simheat.scenario import load_scenario

    if all_schemes and scheme:
        raise click.UsageError("give either --scheme or --all-schemes, not both")
    if drop_K is not None and return_C is not None:
        raise click.UsageError("give either --drop-K or --return-temp-C, not both")
    if ready_by_s is not None and not simulate:
        raise click.UsageError("--ready-by needs --simulate")
    if ready_rooms_text is not None and ready_by_s is None:
        raise click.UsageError("--ready-rooms needs --ready-by")
    target_list = parse_targets(targets)
    loaded = load_scenario(scenario)
    schemes = list(loaded.schemes) if all_schemes else [scheme or loaded.schemes[0]]
    figure_path = None
    if figure_dir is not None:
        figure_path = figure_dir / f"{scenario.stem}_readiness.png"
        refuse_to_overwrite([figure_path], overwrite)
    if simulate and not as_json:
        click.echo(f"simulating {loaded.name!r} at each target ...", err=True)
    result = readiness(
        loaded,
        schemes,
        targets_C=target_list,
        drop_K=drop_K,
        return_C=return_C,
        simulate=simulate,
        ready_by_clock_s=ready_by_s,
        ready_rooms=name_list(ready_rooms_text),
    )
    files = {}
    if figure_path is not None:
        from simheat.plots import save_figure
        from simheat.plots.readiness import plot_readiness

        figure_dir.mkdir(parents=True, exist_ok=True)
        save_figure(plot_readiness(result), figure_path, overwrite=overwrite)
        files["figure"] = str(figure_path)
    if as_json:
        data = readiness_dict(result)
        click.echo(to_json(with_files(data, files) if files else data))
        return
    click.echo(readiness_text(result))
    if files:
        click.echo(f"figure: {files['figure']}")
    click.echo("")
    click.echo(CAUTION)
