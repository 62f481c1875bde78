"""The resolve step: from a validated scenario to what the solvers need.

``resolve(scenario)`` returns a :class:`ResolvedScenario`: per room the heat loss
coefficient, design load, capacities and air-structure coupling
(:mod:`~simheat.resolve.rooms`, :mod:`~simheat.resolve.loads`); per emitter the
Kv of its valve, its body's heat capacity and its design flow
(:mod:`~simheat.resolve.emitters`); every pump's fitted head curve
(:mod:`~simheat.resolve.pumps`). Route geometry (positions along a run, the split
of a run in two) lives in :mod:`~simheat.resolve.route`.

It sits between :mod:`simheat.scenario` (data and validation) and the solvers
(:mod:`simheat.hydraulics`, :mod:`simheat.dynamics`), and imports only the
scenario model and :mod:`simheat.physics`. The result is cached per scenario
object, so every consumer may call :func:`resolve` freely.
"""

from simheat.resolve.emitters import ResolvedEmitter
from simheat.resolve.pumps import ResolvedPump
from simheat.resolve.resolved import ResolvedScenario, resolve
from simheat.resolve.rooms import ResolvedRoom

__all__ = [
    "ResolvedEmitter",
    "ResolvedPump",
    "ResolvedRoom",
    "ResolvedScenario",
    "resolve",
]
