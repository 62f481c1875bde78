"""Names of the piping schemes simheat builds, with no heavy imports.

The CLI offers these names as choices and the scenario loader checks them without
importing the layout builders (:mod:`simheat.hydraulics.layouts`, which pull in
numba and scipy), so ``simheat --help`` stays fast and the package graph has no
cycle through the builders. :mod:`simheat.hydraulics.layouts` builds exactly
these schemes; a test checks that the two agree.
"""

from __future__ import annotations

FLOOR_PUMPS_SUFFIX = "_floor_pumps"
"""Suffix of a scheme with one pump per floor behind a low-loss header."""

BASE_SCHEMES: tuple[str, ...] = (
    "direct_return",
    "reverse_return",
    "split_direct_return",
    "home_run_manifold",
    "one_pipe_loop",
)
"""Floor circuits; each also comes with :data:`FLOOR_PUMPS_SUFFIX` appended."""

SCHEME_NAMES: tuple[str, ...] = tuple(
    name for base in BASE_SCHEMES for name in (base, base + FLOOR_PUMPS_SUFFIX)
)
"""Every scheme name, in the order the layouts module lists them."""
