"""How large a simulation is, estimated before anything large is allocated.

Two figures decide the memory a run takes (see the README, *Problem size*):

- **state count x output samples**: the states are sampled at every output time
  (``simulation.duration_h / simulation.output_step_min`` samples), 8 bytes
  each;
- **state count x thermostatic heads**: every head's sensor moves every flow, so
  the Jacobian the implicit integrator factorizes has a column per head that
  reaches every water cell; its storage, its factors and the finite-difference
  work grow with this product.

:func:`problem_size` counts the states from the built network exactly as the
thermal model cuts it into cells (:mod:`simheat.dynamics.model`), without
building the model; :func:`check_problem_size` refuses a problem above the
limits with the estimate and the keys that set it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from simheat.dynamics.model import N_ENERGY, SOURCE_CELLS
from simheat.errors import ScenarioError
from simheat.hydraulics import layouts
from simheat.hydraulics.network import LINK_EMITTER, LINK_PIPE, LINK_SOURCE
from simheat.scenario.model import Scenario

# Largest state count x output samples: the sampled states take 8 bytes each,
# so 5e7 is 400 MB for them, and the series derived from them less. [-]
MAX_STATE_SAMPLES = 50_000_000
# Largest state count x thermostatic heads (the Jacobian's dense columns). Near
# this size, with the samples limit approached too, a 24 h run peaked at 1.7 GB
# of memory (benchmarks/size_limit.py: 600 rooms, 9081 states). [-]
MAX_STATE_HEADS = 6_000_000
# Keys that set the state count and the samples, named in the refusal.
STATE_KEYS = (
    "simulation.pipe_cell_length_m",
    "simulation.emitter_cells",
    "the number of rooms and emitters",
)
SAMPLE_KEYS = ("simulation.duration_h", "simulation.output_step_min")
# Relative slack when a pipe length is an exact multiple of the cell length,
# as in the thermal model. [-]
_CELL_EDGE = 1e-9

__all__ = [
    "MAX_STATE_HEADS",
    "MAX_STATE_SAMPLES",
    "ProblemSize",
    "check_problem_size",
    "problem_size",
]


@dataclass(frozen=True)
class ProblemSize:
    """The size of one simulation.

    Attributes
    ----------
    states : int
        Water cells, two nodes per room, head sensors and energy counters. [-]
    samples : int
        Output times. [-]
    heads : int
        Thermostatic heads (sensor states). [-]
    """

    states: int
    samples: int
    heads: int

    @property
    def state_samples(self) -> int:
        """States x output samples. [-]."""
        return self.states * self.samples

    @property
    def state_heads(self) -> int:
        """States x thermostatic heads. [-]."""
        return self.states * self.heads


def problem_size(scenario: Scenario, scheme: str) -> ProblemSize:
    """Count the states and output samples of a run of ``scheme``.

    Parameters
    ----------
    scenario : Scenario
        The house and morning. [-]
    scheme : str
        Piping scheme. [-]

    Returns
    -------
    ProblemSize
        States, samples and heads.
    """
    sim = scenario.simulation
    network = layouts.build(scenario, scheme)
    kind = network.link_kind
    pipes = kind == LINK_PIPE
    pipe_cells = np.maximum(
        1, np.ceil(network.length_m[pipes] / sim.pipe_cell_length_m - _CELL_EDGE)
    )
    cells = (
        int(pipe_cells.sum())
        + int(np.count_nonzero(kind == LINK_EMITTER)) * (sim.emitter_cells + 2)
        + int(np.count_nonzero(kind == LINK_SOURCE)) * SOURCE_CELLS
        + int(np.count_nonzero(~np.isin(kind, (LINK_PIPE, LINK_EMITTER, LINK_SOURCE))))
    )
    heads = sum(1 for e in scenario.emitters if e.thermostatic)
    states = cells + 2 * len(scenario.rooms) + heads + N_ENERGY
    samples = math.floor(sim.duration_s / sim.output_step_s + 0.5) + 2
    return ProblemSize(states=states, samples=samples, heads=heads)


def check_problem_size(scenario: Scenario, scheme: str) -> ProblemSize:
    """Refuse a run too large to simulate in bounded memory, before it starts.

    Parameters
    ----------
    scenario : Scenario
        The house and morning. [-]
    scheme : str
        Piping scheme. [-]

    Returns
    -------
    ProblemSize
        The size, when within the limits.

    Raises
    ------
    ScenarioError
        When states x output samples exceeds :data:`MAX_STATE_SAMPLES` or
        states x thermostatic heads exceeds :data:`MAX_STATE_HEADS`; the message
        gives the estimate, the limit and the keys that set it.
    """
    size = problem_size(scenario, scheme)
    origin = scenario.source_path
    if size.state_samples > MAX_STATE_SAMPLES:
        raise ScenarioError(
            f"{' / '.join(SAMPLE_KEYS)}: the run would sample {size.states} states "
            f"at {size.samples} output times ({size.state_samples:.3g} values, "
            f"limit {MAX_STATE_SAMPLES:.3g}) under {scheme}; lengthen the output "
            f"step or shorten the run ({origin})"
        )
    if size.state_heads > MAX_STATE_HEADS:
        raise ScenarioError(
            f"{' / '.join(STATE_KEYS[:2])}: {size.states} states with "
            f"{size.heads} thermostatic heads ({size.state_heads:.3g}, limit "
            f"{MAX_STATE_HEADS:.3g}) under {scheme} is larger than simheat "
            f"simulates; lengthen the pipe cells, use fewer emitter cells, or "
            f"simulate a part of the building ({origin})"
        )
    return size
