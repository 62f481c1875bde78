"""What every fix shares: its record, its verification, the search for its size.

Every candidate is a list of :class:`~simheat.scenario.edits.ScenarioEdit` (a
change a user can make to the file). It is verified by loading the changed file
and solving its flow split at design conditions with the normal solver
(:func:`simheat.analysis.flows.steady_flow_split`, what ``simheat flows`` does);
the figures reported are those of that solve. Where a fix has a size (a pump
speed, metres of pipe), the smallest size that lifts the radiator to the
starving fraction is found by :func:`smallest_size` (bracketing and Brent's
method, a re-solve per trial), then rounded up to a step an installer can set
(:func:`round_up`) and verified again.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass

from scipy.optimize import brentq

from simheat.analysis.check.edits import ScenarioEdit, apply_edits, read_document
from simheat.analysis.check.starving import DesignPoint, emitter_floor
from simheat.analysis.flows import STARVING_FRACTION, FlowSplit, steady_flow_split
from simheat.errors import ScenarioError
from simheat.scenario.model import Scenario

# Effort rank of each fix kind: settings before re-piping, re-piping before
# new radiators (our ordering). Lower ranks first.
EFFORT = {
    "balance_presets": 0,
    "pump_setpoint": 1,
    "pump_speed": 2,
    "tee_position": 3,
    "branch_length": 3,
    "pipe_size": 4,
    "radiator": 5,
}
# Trial points scanned across a size range before root finding. [-]
SCAN_POINTS = 8
# Size tolerance of the root finding, well below the rounding steps. [-]
ROOT_XTOL = 1e-4


@dataclass(frozen=True)
class Verified:
    """The flow split of a changed scenario against the split before.

    Attributes
    ----------
    fraction : float
        The starving emitter's flow over its design flow after the change. [-]
    largest_other_change : float
        The largest relative change of flow of any other emitter, signed. [-]
    largest_other_emitter : str or None
        Which emitter that is. [-]
    new_starving : tuple of str
        Other emitters below the starving fraction after the change that were
        not before. [-]
    split : FlowSplit
        The verifying solve (flows in kg/s). [-]
    """

    fraction: float
    largest_other_change: float
    largest_other_emitter: str | None
    new_starving: tuple[str, ...]
    split: FlowSplit


@dataclass(frozen=True)
class Fix:
    """One candidate fix for a starving (or undersized) radiator.

    Attributes
    ----------
    kind : str
        One of :data:`EFFORT`. [-]
    change : str
        What to change, in words. [-]
    edits : tuple of ScenarioEdit
        The change to the scenario file. [-]
    verified : Verified
        The re-solved split of the changed scenario. [-]
    lifts : bool
        Whether it lifts the radiator to the starving fraction (for a radiator
        fix: whether its output at design meets its share). [-]
    output_W : float or None
        For a radiator fix, its output at design after the change. [W]
    """

    kind: str
    change: str
    edits: tuple[ScenarioEdit, ...]
    verified: Verified
    lifts: bool
    output_W: float | None = None

    @property
    def ok(self) -> bool:
        """Whether it lifts the radiator and starves no other."""
        return self.lifts and not self.verified.new_starving

    def rank_key(self) -> tuple:
        """Sort key: working fixes first, by effort, then least disturbance."""
        return (
            not self.ok,
            EFFORT[self.kind] if self.ok else 0,
            abs(self.verified.largest_other_change) if self.ok else 0.0,
            -self.verified.fraction,
        )


def verify(
    scenario: Scenario,
    scheme: str,
    edits: Sequence[ScenarioEdit],
    emitter: int,
    before: FlowSplit,
) -> Verified:
    """Load the changed scenario and solve its flow split at design conditions.

    Parameters
    ----------
    scenario : Scenario
        The scenario before the change. [-]
    scheme : str
        Piping scheme. [-]
    edits : sequence of ScenarioEdit
        The change. [-]
    emitter : int
        Index of the emitter the fix is for. [-]
    before : FlowSplit
        The split before the change (flows in kg/s). [-]

    Returns
    -------
    Verified
        Its figures after the change.
    """
    after = steady_flow_split(apply_edits(scenario, edits), scheme)
    largest, who, new = 0.0, None, []
    for i, (b, a) in enumerate(zip(before.emitters, after.emitters, strict=True)):
        if i == emitter or b.closed:
            continue  # itself, or an emitter shut for good (no flow either way)
        change = a.flow_kg_s / b.flow_kg_s - 1.0
        if abs(change) > abs(largest):
            largest, who = change, a.id
        if a.starving and not b.starving:
            new.append(a.id)
    e = after.emitters[emitter]
    return Verified(e.flow_kg_s / e.design_flow_kg_s, largest, who, tuple(new), after)


def round_up(value: float, step: float) -> float:
    """``value`` rounded up to a multiple of ``step``.

    Parameters
    ----------
    value : float
        A fix's size (speed ratio [-], set head [kPa], length [m], output [W]).
        [any]
    step : float
        The step an installer can set, in the same unit. [any]

    Returns
    -------
    float
        The smallest multiple of ``step`` not below ``value`` (less 1e-9 of a
        step, so round-off does not add a step).

    Examples
    --------
    >>> round_up(7.42, 0.1), round_up(1.0 + 1e-13, 0.01)
    (7.5, 1.0)
    """
    return round(math.ceil(value / step - 1e-9) * step, 10)


def smallest_size(
    trial: Callable[[float], float], low: float, high: float, points: int
) -> float | None:
    """Smallest size in ``[low, high]`` where ``trial`` reaches 0, or None.

    Scans ``points`` sizes, then finds the first crossing by Brent's method.

    Parameters
    ----------
    trial : callable
        Size -> flow fraction less the target, one re-solve per call. [-]
    low, high : float
        The range of sizes, in the size's unit. [any]
    points : int
        Sizes scanned before root finding. [-]

    Returns
    -------
    float or None
        The size, to :data:`ROOT_XTOL`; ``low`` when it already reaches 0;
        None when no scanned size does.
    """
    previous = low
    for k in range(1, points + 1):
        size = low + (high - low) * k / points
        if trial(size) >= 0.0:
            if k == 1 and trial(low) >= 0.0:
                return low
            return float(brentq(trial, previous, size, xtol=ROOT_XTOL))
        previous = size
    return None


def file_index(where: str) -> int:
    """Index of an array entry from its key path.

    Parameters
    ----------
    where : str
        Key path ending in an index. [-]

    Returns
    -------
    int
        The index.

    Examples
    --------
    >>> file_index("route.floors[2]")
    2
    """
    return int(where.rsplit("[", 1)[1].rstrip("]"))


class FixFinder:
    """One starving emitter of one solved scheme: where its fixes start from.

    Holds what every kind of fix reads (the scenario's document, the emitter's
    floor) and verifies a change against the scheme's split.

    Parameters
    ----------
    point : DesignPoint
        The scheme at design conditions. [-]
    emitter : int
        Emitter index. [-]
    """

    def __init__(self, point: DesignPoint, emitter: int) -> None:
        self.point = point
        self.scenario = point.scenario
        self.emitter = emitter
        self.document = read_document(point.scenario)
        self.floor_index = emitter_floor(point.scenario, emitter)
        self.floor = point.scenario.route.floors[self.floor_index]
        self.floor_path = ("route", "floors", file_index(self.floor.where))

    def verify(self, edits: Sequence[ScenarioEdit]) -> Verified:
        """Verify a change against this point (:func:`verify`).

        Parameters
        ----------
        edits : sequence of ScenarioEdit
            The change to the scenario file. [-]

        Returns
        -------
        Verified
            The changed scenario's split against this point's.
        """
        return verify(
            self.scenario, self.point.scheme, edits, self.emitter, self.point.split
        )

    def shortfall(self, edits: Sequence[ScenarioEdit]) -> float:
        """Flow fraction after a change minus the starving fraction.

        Parameters
        ----------
        edits : sequence of ScenarioEdit
            The change to the scenario file. [-]

        Returns
        -------
        float
            ``fraction - STARVING_FRACTION``; -1 when the loader refuses the
            changed file. [-]
        """
        try:
            return self.verify(edits).fraction - STARVING_FRACTION
        except ScenarioError:
            return -1.0  # a change the loader refuses lifts nothing

    def fix(self, kind: str, change: str, edits: Sequence[ScenarioEdit]) -> Fix:
        """A verified fix.

        Parameters
        ----------
        kind : str
            One of :data:`EFFORT`. [-]
        change : str
            The change in words. [-]
        edits : sequence of ScenarioEdit
            The change to the scenario file. [-]

        Returns
        -------
        Fix
            The fix with its verifying solve.
        """
        edits = tuple(edits)
        verified = self.verify(edits)
        return Fix(
            kind, change, edits, verified, verified.fraction >= STARVING_FRACTION
        )
