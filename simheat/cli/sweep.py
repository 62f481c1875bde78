"""``simheat sweep``: many variants of one scenario, on every core or a cluster.

Only click is imported at module level; the library is imported inside the
command, so ``simheat --help`` does not pay for it.
"""

from __future__ import annotations

import json
import sys
import time
from pathlib import Path

import click

from simheat.cli.common import SimheatCommand, json_option, overwrite_option

# A progress line on a terminal is redrawn at most this often; in a log file
# (not a terminal) one line is written at most this often. [s]
TERMINAL_REDRAW_S = 0.2
LOG_LINE_S = 10.0
INTERRUPTED_EXIT_CODE = 130  # the shell's code for a command stopped by SIGINT


def _duration(seconds: float) -> str:
    seconds = int(round(seconds))
    hours, rest = divmod(seconds, 3600)
    return f"{hours}:{rest // 60:02d}:{rest % 60:02d}"


def progress_text(progress) -> str:
    """One progress line: done, failed, rate and time left.

    Parameters
    ----------
    progress : simheat.batch.Progress
        Where the sweep stands. [-]

    Returns
    -------
    str
        For example ``"sweep: 40/120 done (2 failed), 1.9 variants/s, ETA 0:00:42"``.
    """
    finished = progress.kept + progress.done
    text = f"sweep: {finished}/{progress.total} done"
    failed = progress.failed
    text += f" ({failed} failed)" if failed else ""
    if progress.kept:
        text += f", {progress.kept} kept from before"
    if progress.done and progress.elapsed_s > 0:
        text += f", {progress.done / progress.elapsed_s:.2g} variants/s"
    eta = progress.eta_s
    text += f", ETA {_duration(eta)}" if eta is not None else ""
    return text


class _ProgressBar:
    """Draws progress on stderr: redrawn in place on a terminal, else logged."""

    def __init__(self) -> None:
        self.terminal = sys.stderr.isatty()
        self.last = -float("inf")
        self.text = ""

    def __call__(self, progress) -> None:
        now = time.monotonic()
        final = progress.done == progress.to_run
        pause = TERMINAL_REDRAW_S if self.terminal else LOG_LINE_S
        if now - self.last < pause and not final:
            return
        self.last = now
        text = progress_text(progress)
        if self.terminal:
            width = max(len(self.text), len(text))
            click.echo("\r" + text.ljust(width), err=True, nl=False)
        else:
            click.echo(text, err=True)
        self.text = text

    def end(self) -> None:
        if self.terminal and self.text:
            click.echo("", err=True)


@click.command("sweep", cls=SimheatCommand)
@click.argument(
    "sweep_file", metavar="SWEEP.toml", type=click.Path(dir_okay=False, path_type=Path)
)
@click.option(
    "--workers",
    type=click.IntRange(min=1),
    help="Local worker processes (default: the CPU count).",
)
@click.option(
    "--scheduler",
    metavar="ADDRESS",
    help="Run on dask.distributed: tcp://HOST:PORT of a running scheduler, or "
    "local:N to start a local cluster of N workers (needs simheat[cluster]).",
)
@click.option(
    "--out",
    "out_path",
    type=click.Path(dir_okay=False, path_type=Path),
    help="Sweep file to write (default: simheat-out/<stem of SWEEP.toml>.h5).",
)
@click.option(
    "--resume", is_flag=True, help="Continue an interrupted sweep: run what is missing."
)
@click.option(
    "--keep-series",
    is_flag=True,
    help="Keep each variant's whole run (run-file layout) in the sweep file.",
)
@click.option(
    "--csv",
    "csv_path",
    type=click.Path(dir_okay=False, path_type=Path),
    help="Also write the summary table as CSV (practical units).",
)
@click.option(
    "--checkpoint-min",
    type=click.FloatRange(min=0.0),
    default=1.0,
    show_default=True,
    help="Bring the sweep file up to date at most this often while running [min].",
)
@json_option
@overwrite_option
def sweep_command(
    sweep_file: Path,
    workers: int | None,
    scheduler: str | None,
    out_path: Path | None,
    resume: bool,
    keep_series: bool,
    csv_path: Path | None,
    checkpoint_min: float,
    as_json: bool,
    overwrite: bool,
) -> None:
    """Run a parameter sweep of a scenario into one HDF5 sweep file."""
    from simheat.batch import load_sweep, run_sweep
    from simheat.batch.store import write_atomically
    from simheat.batch.table import csv_text
    from simheat.batch.text import sweep_dict, sweep_table_text
    from simheat.report import CAUTION

    if workers is not None and scheduler is not None:
        raise click.UsageError("give either --workers or --scheduler, not both")
    spec = load_sweep(sweep_file)
    out_path = out_path or Path("simheat-out") / f"{sweep_file.stem}.h5"
    if csv_path is not None and csv_path.exists() and not overwrite:
        raise FileExistsError(f"{csv_path} exists; pass --overwrite to replace it")
    bar = _ProgressBar()
    try:
        outcome = run_sweep(
            spec,
            out_path,
            workers=workers,
            scheduler=scheduler,
            keep_series=keep_series,
            resume=resume,
            overwrite=overwrite,
            checkpoint_interval_s=60.0 * checkpoint_min,
            progress=bar,
        )
    finally:
        bar.end()
    results = outcome.results
    if csv_path is not None:
        csv_path.parent.mkdir(parents=True, exist_ok=True)
        text = csv_text(results.rows, results.keys, results.room_ids, CAUTION)
        write_atomically(csv_path, text.encode("utf-8"))
    if as_json:
        extra = {
            "file": str(out_path),
            "csv": None if csv_path is None else str(csv_path),
            "executor": outcome.executor,
            "interrupted": outcome.interrupted,
            "kept_from_before": outcome.kept,
            "ran": outcome.ran,
        }
        click.echo(json.dumps(sweep_dict(results, extra, CAUTION), indent=2))
    else:
        click.echo(f"{results.name} -- {len(results.rows)} variants, {results.mode}")
        click.echo(sweep_table_text(results))
        click.echo("")
        click.echo(f"sweep file: {out_path}")
        if csv_path is not None:
            click.echo(f"csv:        {csv_path}")
        click.echo(CAUTION)
    if outcome.interrupted:
        finished = len(results.rows) - results.count("pending")
        click.echo(
            f"interrupted: {finished} of {len(results.rows)} variants are in "
            f"{out_path}; run the same command with --resume to finish",
            err=True,
        )
        click.get_current_context().exit(INTERRUPTED_EXIT_CODE)


def plot_sweep_file(
    sweep_path: Path, kind: str, out_dir: Path | None, file_format: str, overwrite: bool
) -> None:
    """Draw the figures of a sweep file for ``simheat plot`` and print their paths.

    Parameters
    ----------
    sweep_path : Path
        The sweep file. [-]
    kind : str
        ``metrics``, ``probability`` or ``all`` (probability only for a random
        sweep). [-]
    out_dir : Path or None
        Directory of the figures (default: the sweep file's). [-]
    file_format : str
        ``png`` or ``svg``. [-]
    overwrite : bool
        Replace existing figure files. [-]

    Raises
    ------
    RunFileError
        When the file is not a sweep file, ``kind`` is not a sweep figure,
        ``probability`` is asked of a sweep that is not random, or no variant
        finished.
    """
    import numpy as np

    from simheat.batch import read_sweep
    from simheat.batch.analysis import metric_points, setpoint_probability
    from simheat.batch.table import DONE
    from simheat.errors import RunFileError
    from simheat.plots import save_figure
    from simheat.plots.sweep import (
        SWEEP_PLOT_KINDS,
        plot_setpoint_probability,
        plot_sweep_metrics,
    )
    from simheat.scenario import parse_scenario

    results = read_sweep(sweep_path)
    if kind == "all":
        kinds = ["metrics", *(["probability"] if results.mode == "random" else [])]
    elif kind not in SWEEP_PLOT_KINDS:
        raise RunFileError(
            f"{sweep_path}: --kind {kind} draws a run file; a sweep file has kinds "
            f"{', '.join(SWEEP_PLOT_KINDS)}"
        )
    elif kind == "probability" and results.mode != "random":
        raise RunFileError(
            f"{sweep_path}: --kind probability needs a random sweep, this is a "
            f"{results.mode} sweep"
        )
    else:
        kinds = [kind]
    if results.count(DONE) == 0:
        raise RunFileError(f"{sweep_path}: no finished variant to draw")
    out_dir = sweep_path.parent if out_dir is None else out_dir
    targets = {k: out_dir / f"{sweep_path.stem}_{k}.{file_format}" for k in kinds}
    if not overwrite:
        for path in targets.values():
            if path.exists():
                raise FileExistsError(f"{path} exists; pass --overwrite to replace it")
    out_dir.mkdir(parents=True, exist_ok=True)
    for k, path in targets.items():
        if k == "metrics":
            figure = plot_sweep_metrics(metric_points(results))
        else:
            base = parse_scenario(results.base_text, origin=f"{sweep_path} (base)")
            horizon_s = base.simulation.duration_s - base.schedule.comfort_start_s
            time_min = np.linspace(0.0, horizon_s / 60.0, 361)
            clock_min = round(
                (base.schedule.start_clock_s + base.schedule.comfort_start_s) / 60.0
            )
            figure = plot_setpoint_probability(
                time_min,
                setpoint_probability(results, time_min),
                title=results.name,
                comfort_clock=f"{clock_min // 60 % 24:02d}:{clock_min % 60:02d}",
                n_variants={
                    s: sum(
                        r["status"] == DONE and r["scheme"] == s for r in results.rows
                    )
                    for s in results.schemes
                },
            )
        click.echo(save_figure(figure, path))
