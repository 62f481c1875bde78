"""Run variants on a dask.distributed cluster (the optional ``cluster`` extra).

``tcp://HOST:PORT`` connects to a running scheduler; ``local:N`` starts a
LocalCluster of N single-threaded worker processes on this machine. A dask worker
is a long-lived process too: it imports simheat on its first variant and keeps
the compiled kernels loaded for the rest. The sweep process keeps a bounded
number of variants submitted, so an interrupt or a lost connection leaves little
work in flight, and it alone writes results to disk.
"""

from __future__ import annotations

import contextlib
import logging
import secrets
import signal
import threading
from collections.abc import Iterable, Iterator

import simheat
from simheat.batch.table import FAILED, empty_row
from simheat.batch.variant import SweepContext, VariantResult, VariantTask, run_variant
from simheat.errors import ScenarioError

LOCAL_PREFIX = "local:"
# Variants kept submitted per worker thread: enough that no worker waits for the
# next one, few enough that an interrupt abandons little. [-]
IN_FLIGHT_PER_THREAD = 2
CONNECT_TIMEOUT_S = 10.0  # [s]


def parse_scheduler(address: str) -> tuple[str, int | None]:
    """Split a ``--scheduler`` value into a kind and a worker count.

    Parameters
    ----------
    address : str
        ``local:N`` or a scheduler address such as ``tcp://10.0.0.5:8786``. [-]

    Returns
    -------
    tuple
        ``("local", N)`` or ``(address, None)``.

    Raises
    ------
    ScenarioError
        On ``local:`` without a whole number >= 1, or an empty address.

    Examples
    --------
    >>> parse_scheduler("local:2")
    ('local', 2)
    """
    if address.startswith(LOCAL_PREFIX):
        count = address[len(LOCAL_PREFIX) :]
        if not count.isdigit() or int(count) < 1:
            raise ScenarioError(
                "--scheduler: local:N needs a whole number of workers >= 1, "
                f"got {address!r}"
            )
        return "local", int(count)
    if not address.strip():
        raise ScenarioError("--scheduler: empty address")
    return address, None


class DaskExecutor:
    """Run variants through dask.distributed.

    Parameters
    ----------
    context : SweepContext
        What every variant shares. [-]
    scheduler : str
        ``local:N`` or the address of a running dask scheduler. [-]

    Raises
    ------
    ScenarioError
        When dask.distributed is not installed (``pip install simheat[cluster]``)
        or the scheduler value is malformed.
    """

    def __init__(self, context: SweepContext, scheduler: str) -> None:
        self.context = context
        self.kind, self.local_workers = parse_scheduler(scheduler)
        try:
            import distributed  # noqa: F401 - checked before anything runs
        except ImportError:
            raise ScenarioError(
                "--scheduler needs dask.distributed, which is not installed: "
                "pip install 'simheat[cluster]'"
            ) from None
        self._cluster = None
        self._client = None
        self.description = scheduler

    def __enter__(self) -> DaskExecutor:
        from distributed import Client, LocalCluster

        if self.kind == "local":
            with _sigint_ignored_by_children():
                self._cluster = LocalCluster(
                    n_workers=self.local_workers,
                    threads_per_worker=1,
                    processes=True,
                    dashboard_address=None,
                    silence_logs=logging.ERROR,
                )
            self._client = Client(self._cluster)
            self.description = f"a local dask cluster of {self.local_workers} workers"
        else:
            try:
                self._client = Client(self.kind, timeout=CONNECT_TIMEOUT_S)
            except OSError as exc:
                raise ScenarioError(
                    f"--scheduler: cannot reach the dask scheduler at {self.kind} "
                    f"({exc})"
                ) from None
            self.description = f"the dask cluster at {self.kind}"
        return self

    def __exit__(self, *exc_info) -> None:
        self.close()

    def run(self, tasks: Iterable[VariantTask]) -> Iterator[VariantResult]:
        """Submit the tasks; yield each result as it arrives.

        Parameters
        ----------
        tasks : iterable of VariantTask
            Variants to run. [-]

        Yields
        ------
        VariantResult
            One per task; a task that dask gave up on (its workers died) is a
            ``failed`` row with dask's message, as is a worker running another
            simheat version.
        """
        from distributed import as_completed

        client = self._client
        threads = max(1, sum(client.nthreads().values()))
        window = IN_FLIGHT_PER_THREAD * threads
        queue = iter(tasks)
        owner: dict = {}
        token = secrets.token_hex(4)  # keys unique among sweeps sharing a cluster

        def submit(completed) -> None:
            task = next(queue, None)
            if task is None:
                return
            future = client.submit(
                run_variant,
                self.context,
                task,
                pure=False,
                key=f"simheat-{token}-{task.id}",
            )
            owner[future.key] = task
            completed.add(future)

        completed = as_completed()
        for _ in range(window):
            submit(completed)
        for future in completed:
            task = owner.pop(future.key)
            try:
                result = future.result()
            except Exception as exc:  # dask gave up on it: record and go on
                row = empty_row(task.id, task.scheme, task.values, FAILED)
                row["error"] = "dask: " + " ".join(
                    f"{type(exc).__name__}: {exc}".split()
                )
                result = VariantResult(row=row)
            finally:
                future.release()
            version = result.row.get("simheat_version")
            if version is not None and version != simheat.__version__:
                row = empty_row(task.id, task.scheme, task.values, FAILED)
                row["error"] = (
                    f"worker runs simheat {version}, this machine "
                    f"{simheat.__version__}: "
                    "install the same version on every worker"
                )
                result = VariantResult(row=row)
            submit(completed)
            yield result

    def close(self) -> None:
        """Cancel what is still submitted and disconnect (and stop a LocalCluster)."""
        if self._client is not None:
            try:
                self._client.close()
            except Exception as exc:  # closing a broken connection must not mask
                logging.getLogger(__name__).debug("dask client close: %s", exc)
            self._client = None
        if self._cluster is not None:
            self._cluster.close()
            self._cluster = None


@contextlib.contextmanager
def _sigint_ignored_by_children():
    """Start processes that ignore SIGINT, as the local worker pool's do.

    A terminal sends Ctrl-C to its whole process group. A LocalCluster's processes
    would each stop with a traceback; started while SIGINT is ignored, they inherit
    that (an ignored signal stays ignored across exec, and Python then installs no
    handler), so Ctrl-C reaches only the sweep process, which closes the cluster.
    Only the main thread may change signal handling; elsewhere this does nothing.
    """
    if threading.current_thread() is not threading.main_thread():
        yield
        return
    previous = signal.signal(signal.SIGINT, signal.SIG_IGN)
    try:
        yield
    finally:
        signal.signal(signal.SIGINT, previous)
