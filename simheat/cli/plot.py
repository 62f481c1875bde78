"""``simheat plot``: figures of a stored run, written as files."""

from __future__ import annotations

from pathlib import Path

import click

from simheat.cli.common import SimheatCommand, refuse_to_overwrite
from simheat.plots import PLOT_KIND_NAMES, SWEEP_PLOT_KIND_NAMES

ALL_KINDS = "all"


@click.command("plot", cls=SimheatCommand)
@click.argument("run_file", metavar="RUN.h5", type=click.Path(path_type=Path))
@click.option(
    "--kind",
    type=click.Choice([*PLOT_KIND_NAMES, *SWEEP_PLOT_KIND_NAMES, ALL_KINDS]),
    default=ALL_KINDS,
    show_default=True,
    help="Figure to draw, or all of them.",
)
@click.option(
    "--out",
    "out_dir",
    type=click.Path(path_type=Path),
    help="Directory for the figures (default: the run file's directory).",
)
@click.option(
    "--format",
    "file_format",
    type=click.Choice(["png", "svg"]),
    default="png",
    show_default=True,
    help="Figure file format.",
)
@click.option("--overwrite", is_flag=True, help="Replace existing figure files.")
def plot_command(
    run_file: Path, kind: str, out_dir: Path | None, file_format: str, overwrite: bool
) -> None:
    """Draw figures of a run file; print the path of each file written.

    A sweep file (``simheat sweep``) gets the sweep figures instead.
    """
    from simheat.batch.sweepfile import is_sweep_file
    from simheat.files import output_folder
    from simheat.plots import save_figure
    from simheat.report.figures import plot_sweep_file, run_figure
    from simheat.runs.store import load_run

    if kind in SWEEP_PLOT_KIND_NAMES or is_sweep_file(run_file):
        for path in plot_sweep_file(run_file, kind, out_dir, file_format, overwrite):
            click.echo(path)
        return
    run = load_run(run_file)
    kinds = list(PLOT_KIND_NAMES) if kind == ALL_KINDS else [kind]
    out_dir = run_file.parent if out_dir is None else out_dir
    targets = {k: out_dir / f"{run_file.stem}_{k}.{file_format}" for k in kinds}
    refuse_to_overwrite(targets.values(), overwrite)
    output_folder(out_dir)
    for k, path in targets.items():
        click.echo(save_figure(run_figure(run, k), path, overwrite=overwrite))
