"""A pool of long-lived worker processes on this machine.

Each worker is started once as ``python -m simheat.batch.worker`` (a fresh
interpreter: nothing of the sweep process is copied or re-imported), imports
simheat, loads the compiled kernels on its first variant and then runs variant
after variant read from its pipe. The sweep process hands a worker its next
variant as soon as it reports the last one, so a worker waits only for a pipe
round trip between variants.

Workers run in their own session, so a terminal's Ctrl-C reaches only the sweep
process, which decides what an interrupt stops and terminates them. A worker that
dies mid-variant (killed, out of memory) fails that variant and is replaced; one
whose sweep process died finds its pipe closed and exits after its variant.
"""

from __future__ import annotations

import collections
import os
import subprocess
import sys
from collections.abc import Iterable, Iterator
from dataclasses import dataclass
from multiprocessing.connection import wait
from pathlib import Path

import simheat
from simheat.batch.channel import receive, send
from simheat.batch.table import FAILED, empty_row
from simheat.batch.variant import SweepContext, VariantResult, VariantTask
from simheat.errors import SimheatError

# Seconds a worker gets to exit after being told to stop, before it is killed. [s]
STOP_TIMEOUT_S = 5.0


def default_workers() -> int:
    """Number of workers when none is asked for: the CPUs this process may use.

    Returns
    -------
    int
        ``len(os.sched_getaffinity(0))`` where available, else ``os.cpu_count()``,
        at least 1. [-]
    """
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # not on every platform
        return max(1, os.cpu_count() or 1)


@dataclass
class _Worker:
    process: subprocess.Popen
    task: VariantTask | None = None

    def send(self, message) -> None:
        send(self.process.stdin, message)


class ProcessPool:
    """Run variants on long-lived local worker processes.

    Parameters
    ----------
    context : SweepContext
        What every variant shares; sent to each worker once, at its start. [-]
    workers : int
        Number of worker processes. [-]

    Examples
    --------
    ``with ProcessPool(context, 2) as pool: rows = [r.row for r in pool.run(tasks)]``
    """

    def __init__(self, context: SweepContext, workers: int) -> None:
        if workers < 1:
            raise ValueError(f"workers must be >= 1, got {workers}")
        self.context = context
        self.workers = workers
        self._started: list[_Worker] = []
        self.description = f"{workers} local worker process{'es' * (workers > 1)}"

    def __enter__(self) -> ProcessPool:
        return self

    def __exit__(self, *exc_info) -> None:
        self.close()

    @property
    def pids(self) -> list[int]:
        """Process ids of the workers running now (for diagnostics). [-]."""
        return [w.process.pid for w in self._started if w.process.poll() is None]

    def _start_worker(self) -> _Worker:
        env = dict(os.environ)
        # The worker imports this very simheat, wherever the sweep process found it.
        package_root = str(Path(simheat.__file__).resolve().parents[1])
        env["PYTHONPATH"] = os.pathsep.join(
            p for p in (package_root, env.get("PYTHONPATH")) if p
        )
        process = subprocess.Popen(
            [sys.executable, "-m", "simheat.batch.worker"],
            stdin=subprocess.PIPE,
            stdout=subprocess.PIPE,
            env=env,
            start_new_session=True,
        )
        worker = _Worker(process=process)
        self._started.append(worker)
        try:
            worker.send(self.context)
        except OSError:  # died at once; found dead by the caller
            pass
        return worker

    def run(self, tasks: Iterable[VariantTask]) -> Iterator[VariantResult]:
        """Run the tasks; yield each result as it arrives (in completion order).

        Parameters
        ----------
        tasks : iterable of VariantTask
            Variants to run; drawn one at a time as workers free up. [-]

        Yields
        ------
        VariantResult
            One per task. A variant whose worker died is a ``failed`` row.

        Raises
        ------
        SimheatError
            When a worker cannot start (simheat fails to import there), or
            workers keep dying without finishing a variant.
        """
        queue = iter(tasks)
        backlog: collections.deque[VariantTask] = collections.deque()
        busy: list[_Worker] = []
        deaths_in_a_row = 0

        def next_task() -> VariantTask | None:
            return backlog.popleft() if backlog else next(queue, None)

        def give(worker: _Worker, task: VariantTask | None = None) -> bool:
            task = next_task() if task is None else task
            worker.task = task
            if task is None:
                self._retire(worker)
                return False
            try:
                worker.send(task)
            except OSError:  # the worker died between variants: run it elsewhere
                backlog.appendleft(task)
                worker.task = None
            return True

        for _ in range(self.workers):
            first = next_task()
            if first is None:
                break
            worker = self._start_worker()
            give(worker, first)
            busy.append(worker)
        while busy:
            ready = set(wait([w.process.stdout for w in busy]))
            for worker in [w for w in busy if w.process.stdout in ready]:
                message = _receive(worker)
                if message is not None and message[0] == "error":
                    raise SimheatError(f"a sweep worker could not start: {message[1]}")
                if message is not None:
                    deaths_in_a_row = 0
                    if not give(worker):
                        busy.remove(worker)
                    yield message[1]
                    continue
                busy.remove(worker)
                self._started.remove(worker)
                lost = worker.task
                code = _stop(worker.process, terminate=False)
                if lost is not None:
                    deaths_in_a_row += 1
                    row = empty_row(lost.id, lost.scheme, lost.values, FAILED)
                    row["error"] = (
                        f"worker process ended unexpectedly (exit code {code}) while "
                        "running this variant"
                    )
                    yield VariantResult(row=row)
                if deaths_in_a_row > 2 * self.workers:
                    raise SimheatError(
                        f"sweep workers keep dying (last exit code {code}); "
                        "see the failed variants' messages"
                    )
                task = next_task()
                if task is not None:
                    replacement = self._start_worker()
                    give(replacement, task)
                    busy.append(replacement)

    def _retire(self, worker: _Worker) -> None:
        try:
            worker.send(None)
        except (OSError, ValueError):  # gone already, or its pipe closed
            pass

    def close(self) -> None:
        """Stop every worker: idle ones exit, busy ones are terminated."""
        for worker in self._started:
            busy = worker.process.poll() is None and worker.task is not None
            if not busy:
                self._retire(worker)
            _stop(worker.process, terminate=busy)  # busy: abandon its variant
        self._started.clear()


def _stop(process: subprocess.Popen, terminate: bool) -> int | None:
    """End a worker process and close its pipes; return its exit code."""
    if terminate and process.poll() is None:
        process.terminate()
    try:
        code = process.wait(STOP_TIMEOUT_S)
    except subprocess.TimeoutExpired:
        process.kill()
        code = process.wait()
    for pipe in (process.stdin, process.stdout):
        try:
            pipe.close()
        except OSError:
            pass
    return code


def _receive(worker: _Worker) -> tuple | None:
    """The worker's next message, or None when it has died."""
    try:
        return receive(worker.process.stdout)
    except (EOFError, OSError):
        return None
