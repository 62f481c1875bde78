"""``simheat sweep``: many variants of one scenario, on every core or a cluster.

Only click is imported at module level; the library is imported inside the
command, so ``simheat --help`` does not pay for it.
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

import click

from simheat.cli.common import (
    FiniteRange,
    SimheatCommand,
    json_option,
    overwrite_option,
    refuse_to_overwrite,
)

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
@click.argument("sweep_file", metavar="SWEEP.toml", type=click.Path(path_type=Path))
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
    type=click.Path(path_type=Path),
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
    type=click.Path(path_type=Path),
    help="Also write the summary table as CSV (practical units).",
)
@click.option(
    "--checkpoint-min",
    type=FiniteRange(min=0.0),
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
    from simheat.errors import OutputError
    from simheat.files import output_folder
    from simheat.report import CAUTION, to_json
    from simheat.report.sweep import sweep_csv_text, sweep_dict, sweep_text

    if workers is not None and scheduler is not None:
        raise click.UsageError("give either --workers or --scheduler, not both")
    spec = load_sweep(sweep_file)
    out_path = out_path or Path("simheat-out") / f"{sweep_file.stem}.h5"
    if out_path.is_dir():
        raise OutputError(f"{out_path}: is a folder; give the sweep file's name")
    output_folder(out_path.parent)  # before any variant runs
    if csv_path is not None:
        if csv_path.is_dir():
            raise OutputError(f"{csv_path}: is a folder; give the CSV file's name")
        refuse_to_overwrite([csv_path], overwrite)
        output_folder(csv_path.parent)
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
        write_atomically(csv_path, sweep_csv_text(results).encode("utf-8"))
    if as_json:
        extra = {
            "file": str(out_path),
            "csv": None if csv_path is None else str(csv_path),
            "executor": outcome.executor,
            "interrupted": outcome.interrupted,
            "kept_from_before": outcome.kept,
            "ran": outcome.ran,
        }
        click.echo(to_json(sweep_dict(results, extra)))
    else:
        click.echo(sweep_text(results))
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
