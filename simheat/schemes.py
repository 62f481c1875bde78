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

HOUSE_SCHEMES: tuple[str, ...] = (
    "reverse_return_single_loop",
    "reverse_return_risers",
)
"""Schemes that join the floors in their own way (no floor circuits off a riser):

- ``reverse_return_single_loop``: one reverse-return loop through every floor.
  The supply rises to the top floor, serves its radiators in order, drops to
  the floor below and serves its radiators, and so on down; the return starts
  at the first radiator served and follows the same way.
- ``reverse_return_risers``: every floor in reverse return, and the floors
  joined in reverse return on the risers: the return riser starts at the
  lowest floor and climbs past the others before it drops to the plant.

They have no ``_floor_pumps`` variant: a single loop has no floor circuits to
give pumps, and floor circuits behind a low-loss header each have their own
pipes from the header, so there are no shared risers to run in reverse return
(that is ``reverse_return_floor_pumps``).
"""

SCHEME_NAMES: tuple[str, ...] = (
    *(name for base in BASE_SCHEMES for name in (base, base + FLOOR_PUMPS_SUFFIX)),
    *HOUSE_SCHEMES,
)
"""Every scheme name, in the order the layouts module lists them."""


def unknown_scheme(name: object) -> str:
    """The problem with a name that is not a scheme, for an error message.

    Parameters
    ----------
    name : object
        The name given. [-]

    Returns
    -------
    str
        ``"unknown scheme ...; known: ..."``, or why a house-wide scheme has no
        ``_floor_pumps`` variant.

    Examples
    --------
    >>> unknown_scheme("reverse_return_risers_floor_pumps").split(":")[0]
    "scheme 'reverse_return_risers_floor_pumps' does not exist"
    """
    if isinstance(name, str) and name.removesuffix(FLOOR_PUMPS_SUFFIX) in HOUSE_SCHEMES:
        base = name.removesuffix(FLOOR_PUMPS_SUFFIX)
        return (
            f"scheme {name!r} does not exist: {base!r} joins the floors in its own "
            "risers and has no floor circuits behind a low-loss header; use "
            f"{base!r}, or 'reverse_return{FLOOR_PUMPS_SUFFIX}' for one pump per "
            "floor"
        )
    return f"unknown scheme {name!r}; known: {', '.join(sorted(SCHEME_NAMES))}"
