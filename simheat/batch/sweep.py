"""Run a sweep: expand, skip what is kept, run the rest on an executor, store.

The library entry point behind ``simheat sweep``, usable from a notebook::

    spec = load_sweep("scenarios/two_storey_pump_header_grid.toml")
    outcome = run_sweep(spec, "simheat-out/grid.h5", workers=2)
    outcome.results.rows[0]["all_rooms_at_setpoint_s"]

Ctrl-C (KeyboardInterrupt) stops the sweep cleanly: variants in flight are
abandoned, every finished one is written to the sweep file, and the outcome says
``interrupted``.
"""

from __future__ import annotations

import contextlib
import time
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

from simheat.batch.expand import assignments, expand
from simheat.batch.pool import ProcessPool, default_workers
from simheat.batch.spec import SweepSpec
from simheat.batch.store import SweepStore
from simheat.batch.sweepfile import SweepResults, read_sweep
from simheat.batch.table import DONE
from simheat.batch.variant import SweepContext, VariantTask

# Shortest pause between two consolidations, as a multiple of the time the last
# one took: keeps the rewriting of a large --keep-series file below ~10 % of the
# sweep's time. [-]
CHECKPOINT_COST_FACTOR = 10.0


@dataclass(frozen=True)
class Progress:
    """Where a running sweep stands.

    Attributes
    ----------
    total : int
        Variants in the sweep. [-]
    kept : int
        Variants finished before this run (resumed). [-]
    to_run : int
        Variants this run set out to run. [-]
    done, failed : int
        Variants this run finished, and how many of them failed. [-]
    elapsed_s : float
        Time since this run started. [s]
    """

    total: int
    kept: int
    to_run: int
    done: int
    failed: int
    elapsed_s: float

    @property
    def eta_s(self) -> float | None:
        """Estimated time to finish at the rate so far; None before the first. [s]."""
        if self.done == 0:
            return None
        return self.elapsed_s / self.done * (self.to_run - self.done)


@dataclass(frozen=True)
class SweepOutcome:
    """What a sweep run did.

    Attributes
    ----------
    results : SweepResults
        The sweep file as written at the end. [-]
    interrupted : bool
        Whether Ctrl-C stopped it before every variant ran. [-]
    kept : int
        Variants found finished from an earlier run. [-]
    ran : int
        Variants finished by this run. [-]
    executor : str
        Where the variants ran. [-]
    """

    results: SweepResults
    interrupted: bool
    kept: int
    ran: int
    executor: str


def make_executor(
    context: SweepContext, n_tasks: int, workers: int | None, scheduler: str | None
):
    """The executor asked for: local worker processes, or a dask cluster.

    Parameters
    ----------
    context : SweepContext
        What every variant shares. [-]
    n_tasks : int
        Variants in the sweep (no more workers than this). [-]
    workers : int or None
        Local worker processes; the CPU count when None. [-]
    scheduler : str or None
        ``local:N`` or a dask scheduler address; local processes when None. [-]

    Returns
    -------
    ProcessPool or DaskExecutor
        Not started yet (use it as a context manager).

    Raises
    ------
    ScenarioError
        On a malformed scheduler value, or a scheduler without dask.distributed
        installed.
    """
    if scheduler is not None:
        from simheat.batch.cluster import DaskExecutor

        return DaskExecutor(context, scheduler)
    count = default_workers() if workers is None else workers
    return ProcessPool(context, max(1, min(count, n_tasks)))


def run_sweep(
    spec: SweepSpec,
    out_path: str | Path,
    *,
    workers: int | None = None,
    scheduler: str | None = None,
    keep_series: bool = False,
    resume: bool = False,
    overwrite: bool = False,
    checkpoint_interval_s: float = 60.0,
    progress: Callable[[Progress], None] | None = None,
) -> SweepOutcome:
    """Run every variant of a sweep not yet finished and write the sweep file.

    Parameters
    ----------
    spec : SweepSpec
        The checked sweep (:func:`simheat.batch.load_sweep`). [-]
    out_path : str or Path
        The HDF5 sweep file. [-]
    workers : int, optional
        Local worker processes (default: the CPU count). [-]
    scheduler : str, optional
        ``local:N`` or the address of a dask scheduler instead of local workers. [-]
    keep_series : bool
        Keep each variant's run (run-file layout) in the sweep file. [-]
    resume : bool
        Continue an interrupted sweep; run only the missing variants. [-]
    overwrite : bool
        Start afresh over an existing sweep file. [-]
    checkpoint_interval_s : float
        Least time between two consolidations of the sweep file. [s]
    progress : callable, optional
        Called with a :class:`Progress` at the start and after each variant. [-]

    Returns
    -------
    SweepOutcome
        The file's contents and what this run did.

    Raises
    ------
    FileExistsError
        When the file exists and neither ``resume`` nor ``overwrite`` is set.
    ScenarioError
        When resuming a file of another sweep.
    SimheatError
        When the workers cannot run (a broken install, workers dying).
    """
    out_path = Path(out_path)
    variants = expand(spec)
    context = SweepContext(spec.base_text, spec.origin, keep_series)
    # Built (and dask's presence checked) before any file is touched.
    executor = make_executor(context, len(variants), workers, scheduler)
    store = SweepStore.open(
        out_path,
        spec,
        variants,
        keep_series=keep_series,
        resume=resume,
        overwrite=overwrite,
    )
    missing = [v for v in variants if v.id not in store.rows]
    interrupted = False
    ran = failed = 0
    started = time.perf_counter()

    def report() -> None:
        if progress is not None:
            progress(
                Progress(
                    total=len(variants),
                    kept=store.kept,
                    to_run=len(missing),
                    done=ran,
                    failed=failed,
                    elapsed_s=time.perf_counter() - started,
                )
            )

    tasks = (
        VariantTask(v.id, v.scheme, v.values, assignments(spec, v)) for v in missing
    )
    try:
        with contextlib.ExitStack() as running:
            if missing:  # start workers (or reach the cluster) before writing OUT
                running.enter_context(executor)
            store.consolidate()
            pause_s = checkpoint_interval_s
            last_checkpoint = time.perf_counter()
            report()
            try:
                for result in executor.run(tasks) if missing else ():
                    store.add(result)
                    ran += 1
                    failed += result.row["status"] != DONE
                    report()
                    if time.perf_counter() - last_checkpoint >= pause_s:
                        began = time.perf_counter()
                        store.consolidate()
                        last_checkpoint = time.perf_counter()
                        pause_s = max(
                            checkpoint_interval_s,
                            CHECKPOINT_COST_FACTOR * (last_checkpoint - began),
                        )
            except KeyboardInterrupt:
                interrupted = True
        store.finish()
    except BaseException:
        store.abandon()  # the sidecar stays if it holds anything a resume needs
        raise
    return SweepOutcome(
        results=read_sweep(out_path),
        interrupted=interrupted,
        kept=store.kept,
        ran=ran,
        executor=executor.description,
    )
