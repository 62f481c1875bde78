"""Parameter sweeps: many variants of one scenario, on every core or a cluster.

``load_sweep`` reads and checks a sweep file, ``expand`` lists its variants,
``run_sweep`` runs them (local long-lived worker processes, or dask.distributed)
into one kill-safe, resumable HDF5 sweep file, and ``read_sweep`` reads it back.
"""

from simheat.batch.expand import Variant, expand
from simheat.batch.spec import SweepSpec, load_sweep, parse_sweep
from simheat.batch.sweep import Progress, SweepOutcome, run_sweep
from simheat.batch.sweepfile import SweepResults, is_sweep_file, read_sweep

__all__ = [
    "Progress",
    "SweepOutcome",
    "SweepResults",
    "SweepSpec",
    "Variant",
    "expand",
    "is_sweep_file",
    "load_sweep",
    "parse_sweep",
    "read_sweep",
    "run_sweep",
]
