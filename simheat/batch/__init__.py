"""Parameter sweeps: many variants of one scenario.

``load_sweep`` reads and checks a sweep file, ``expand`` lists its variants, and
``read_sweep`` reads a sweep file back.
"""

from simheat.batch.expand import Variant, expand
from simheat.batch.spec import SweepSpec, load_sweep, parse_sweep
from simheat.batch.sweepfile import SweepResults, is_sweep_file, read_sweep

__all__ = [
    "SweepResults",
    "SweepSpec",
    "Variant",
    "expand",
    "is_sweep_file",
    "load_sweep",
    "parse_sweep",
    "read_sweep",
]
