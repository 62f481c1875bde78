"""Parameter sweeps: many variants of one scenario.

``load_sweep`` reads and checks a sweep file and ``expand`` lists its variants.
"""

from simheat.batch.expand import Variant, expand
from simheat.batch.spec import SweepSpec, load_sweep, parse_sweep

__all__ = ["SweepSpec", "Variant", "expand", "load_sweep", "parse_sweep"]
