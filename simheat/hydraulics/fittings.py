"""Local loss coefficients (zeta) of fittings, referred to the velocity in the pipe.

Values are typical handbook figures for soldered or pressed copper and threaded
steel fittings in heating installations (I. E. Idelchik, Handbook of Hydraulic
Resistance, 3rd ed., 1994, chapters 6 and 7, for tees and bends; from memory,
rounded to the precision a design needs). They are common trade practice; a scenario
may override them later.
"""

from __future__ import annotations

ZETA_TEE_RUN = 0.5  # flow straight through a tee
ZETA_TEE_BRANCH = 1.5  # flow turning into or out of a tee branch
ZETA_ELBOW_90 = 1.0  # sharp 90° elbow (soldered or pressed)
ZETA_RADIATOR = 3.0  # panel radiator body, inlet to outlet
ZETA_HEAT_SOURCE = (
    8.0  # compact heat exchanger of a wall-hung source, per inlet velocity
)
ELBOWS_PER_HEADER_SEGMENT = 1  # typical of a header running around a room
ELBOWS_PER_EMITTER_CIRCUIT = 4  # two on the supply branch, two on the return branch
ELBOWS_PER_FEED = 4
ELBOWS_PER_RISER = 2


def emitter_circuit_zeta() -> float:
    """Zeta of one emitter circuit: two tee branches, elbows and the radiator body.

    Returns
    -------
    float
        Sum of local loss coefficients referred to the branch pipe velocity. [-]

    Examples
    --------
    >>> emitter_circuit_zeta()
    10.0
    """
    return (
        2 * ZETA_TEE_BRANCH + ELBOWS_PER_EMITTER_CIRCUIT * ZETA_ELBOW_90 + ZETA_RADIATOR
    )


def header_segment_zeta() -> float:
    """Zeta of a header segment: the run through the tee at its end and its elbows.

    Returns
    -------
    float
        Sum of local loss coefficients referred to the header velocity. [-]

    Examples
    --------
    >>> header_segment_zeta()
    1.5
    """
    return ZETA_TEE_RUN + ELBOWS_PER_HEADER_SEGMENT * ZETA_ELBOW_90
