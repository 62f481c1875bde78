"""The ``[layout.fittings]`` table: local loss coefficients and fitting counts.

The zeta values are typical handbook figures for soldered or pressed copper and
threaded steel fittings in heating installations (I. E. Idelchik, Handbook of
Hydraulic Resistance, 3rd ed., 1994, chapters 6 and 7, for tees and bends; from
memory, rounded to the precision a design needs). Each is referred to the mean
velocity in the pipe it sits on. The fitting counts per run (elbows per header
segment, per emitter circuit, ...) are common trade practice, our own choice.

A scenario overrides any entry by name under ``[layout.fittings]``; the field
names of :class:`FittingTable` are the scenario keys, and its defaults are the
values below. The layout builders count fittings per link and sum their zeta
(:meth:`simheat.hydraulics.layouts.builder.Builder.zeta`).
"""

from __future__ import annotations

from dataclasses import dataclass, fields

ZETA_TEE_RUN = 0.5  # flow straight through a tee
ZETA_TEE_BRANCH = 1.5  # flow turning into or out of a tee branch
ZETA_ELBOW_90 = 1.0  # sharp 90° elbow (soldered or pressed)
# Outlet of a manifold bar with its isolating valve, taken as a tee branch
# (Idelchik ch. 7); from memory, common trade practice.
ZETA_MANIFOLD_CONNECTION = 1.5
ZETA_RADIATOR = 3.0  # panel radiator body, inlet to outlet
ZETA_HEAT_SOURCE = 8.0  # compact heat exchanger of a wall-hung source, inlet velocity
# Fittings a scenario may place by name on a tee or header stretch. Crane
# Technical Paper 410 (2009), A-27 to A-29: a 45° standard elbow K = 16 fT and a
# full-bore ball valve K = 3 fT, with the friction factor fT of fully turbulent
# flow of about 0.027 for 15 mm and 0.023 for 28 mm pipe: 0.43 to 0.37 for the
# elbow (taken as 0.4, mid-range) and 0.08 to 0.07 for the valve (rounded up).
ZETA_ELBOW_45 = 0.4
ZETA_BALL_VALVE = 0.1
ELBOWS_PER_HEADER_SEGMENT = 1  # typical of a header running around a room
ELBOWS_PER_EMITTER_CIRCUIT = 4  # two on the supply branch, two on the return branch
ELBOWS_PER_FEED = 4
ELBOWS_PER_RISER = 2
ELBOWS_PER_HOME_RUN = 4  # two bends on each leg of a home-run pair


@dataclass(frozen=True)
class FittingTable:
    """Zeta of each fitting kind and the fitting counts of each kind of run.

    Attributes
    ----------
    tee_run_zeta, tee_branch_zeta : float
        Flow straight through a tee, and turning into or out of its branch. [-]
    elbow_zeta : float
        A 90° elbow. [-]
    manifold_connection_zeta : float
        One outlet (or inlet) of a manifold bar. [-]
    radiator_zeta : float
        A radiator body, inlet to outlet. [-]
    heat_source_zeta : float
        The heat source's heat exchanger. [-]
    elbow_45_zeta, ball_valve_zeta : float
        A 45° elbow and a fully open full-bore ball valve, for fittings placed
        by name on a tee or a header stretch (``fittings``, ``header_fittings``
        in ``[[route.floors]] tees``). [-]
    elbows_per_header_segment, elbows_per_emitter_circuit : int
        Elbows on each header segment between tees, and on each emitter's
        supply and return branches together. [-]
    elbows_per_feed, elbows_per_riser, elbows_per_home_run : int
        Elbows on each leg of the feed, of a riser, and on each home-run pair. [-]
    """

    tee_run_zeta: float = ZETA_TEE_RUN
    tee_branch_zeta: float = ZETA_TEE_BRANCH
    elbow_zeta: float = ZETA_ELBOW_90
    manifold_connection_zeta: float = ZETA_MANIFOLD_CONNECTION
    radiator_zeta: float = ZETA_RADIATOR
    heat_source_zeta: float = ZETA_HEAT_SOURCE
    elbow_45_zeta: float = ZETA_ELBOW_45
    ball_valve_zeta: float = ZETA_BALL_VALVE
    elbows_per_header_segment: int = ELBOWS_PER_HEADER_SEGMENT
    elbows_per_emitter_circuit: int = ELBOWS_PER_EMITTER_CIRCUIT
    elbows_per_feed: int = ELBOWS_PER_FEED
    elbows_per_riser: int = ELBOWS_PER_RISER
    elbows_per_home_run: int = ELBOWS_PER_HOME_RUN


FITTING_KEYS: dict[str, bool] = {
    f.name: f.name.startswith("elbows_per_") for f in fields(FittingTable)
}
"""Keys of ``[layout.fittings]`` and whether each is a count (an integer)."""

NAMED_FITTINGS: tuple[str, ...] = tuple(
    f.name.removesuffix("_zeta")
    for f in fields(FittingTable)
    if f.name.endswith("_zeta")
)
"""Fitting kinds a scenario may name on a tee or header stretch (their zeta keys)."""
