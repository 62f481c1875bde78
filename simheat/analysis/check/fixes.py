"""Fixes for a starving radiator, each a change to the scenario, each verified.

Every candidate is a list of :class:`~simheat.analysis.check.edits.ScenarioEdit`
(a change a user can make to the file). It is verified by loading the changed
file and solving its flow split at design conditions with the normal solver
(:func:`simheat.analysis.flows.steady_flow_split`, what ``simheat flows`` does);
the figures reported are those of that solve. Where a fix has a size (a pump
speed, metres of pipe), the smallest size that lifts the radiator to the
starving fraction is found by bracketing and Brent's method, a re-solve per
trial, then rounded up to a step an installer can set and verified again.

Fix kinds, in the order of effort they are ranked by (among fixes that lift
the radiator without starving another): ``balance_presets`` (not offered yet,
see :data:`NOT_OFFERED`), ``pump_setpoint``, ``pump_speed``, ``tee_position``,
``branch_length``, ``pipe_size``, ``radiator``.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass

from scipy.optimize import brentq

from simheat.analysis.check.edits import (
    ScenarioEdit,
    apply_edits,
    key_text,
    read_document,
)
from simheat.analysis.check.starving import (
    Cause,
    DesignPoint,
    driving_pump,
    emitter_floor,
)
from simheat.analysis.flows import STARVING_FRACTION, FlowSplit, steady_flow_split
from simheat.errors import ScenarioError
from simheat.hydraulics.layouts.pipes import pipe_series
from simheat.resolve.route import tee_positions_m
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
# Fix kinds the analysis does not offer yet, with the reason.
NOT_OFFERED = {
    "balance_presets": "presets from simheat balance: not available in this version"
}
# Largest pump speed tried, as a ratio of the curve's speed (heads up to four
# times the curve's, by the affinity laws). [-]
MAX_SPEED_RATIO = 2.0
# A regulated pump's set head is raised up to this share of its curve's
# shut-off head (the loader requires it below the shut-off head). [-]
MAX_SETPOINT_SHARE = 0.98
# Steps a fix's size is rounded up to: pump speed 1 %, set head 0.5 kPa, pipe
# length 0.1 m, radiator nominal output 10 W.
SPEED_STEP = 0.01
SETPOINT_STEP_KPA = 0.5
LENGTH_STEP_M = 0.1
RADIATOR_STEP_W = 10.0
# Trial points scanned across a length range before root finding. [-]
SCAN_POINTS = 8
# Size tolerance of the root finding, well below the rounding steps. [-]
ROOT_XTOL = 1e-4
# Pipe-size fixes: the pipe groups taking the most pressure that are tried. [-]
PIPE_GROUPS_TRIED = 2


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
        The verifying solve. [-]
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
        The split before the change. [kg/s]

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
        A fix's size (speed ratio, kPa, m, W). [any]
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


def _smallest_size(
    trial: Callable[[float], float], low: float, high: float, points: int
) -> float | None:
    """Smallest size in ``(low, high]`` where ``trial`` reaches 0, or None.

    Scans ``points`` sizes, then finds the first crossing by Brent's method.
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


class FixFinder:
    """Finds and verifies the fixes for one emitter of one solved scheme.

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
        self.floor_path = ("route", "floors", _file_index(self.floor.where))

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

    # -- pipe sizes ------------------------------------------------------------
    def pipe_key(self, role: str) -> tuple | None:
        """Scenario key setting the pipe type of a segment role on this path.

        Parameters
        ----------
        role : str
            The segment's role (``feed``, ``riser``, ``header`` ...). [-]

        Returns
        -------
        tuple or None
            Key path (``route.feed_pipe``, the floor's ``header_pipe``,
            ``layout.home_run_pipe``); None for a role no key sets.
        """
        if role in ("feed", "riser"):
            return ("route", "feed_pipe")
        if role in ("header", "loop", "bypass", "manifold_feed"):
            return (*self.floor_path, "header_pipe")
        if role == "home_run":
            return ("layout", "home_run_pipe")
        return None

    def current_pipe(self, key: tuple) -> str:
        """Pipe type name the scenario sets at ``key``.

        Parameters
        ----------
        key : tuple
            A key path from :meth:`pipe_key`. [-]

        Returns
        -------
        str
            The catalog name in force there.
        """
        route = self.scenario.route
        if key == ("route", "feed_pipe"):
            return route.feed_pipe.name
        if key[-1] == "header_pipe":
            return self.floor.header_pipe.name
        home = self.scenario.layout.home_run_pipe
        return (home or self.floor.branch_pipe).name

    def pipe_fixes(self, cause: Cause) -> list[Fix]:
        """Next size up on the pipe groups taking the most pressure.

        Parameters
        ----------
        cause : Cause
            Where the emitter's pressure goes (its segments' drops). [Pa]

        Returns
        -------
        list of Fix
            One fix per group of the :data:`PIPE_GROUPS_TRIED` groups taking
            the most pressure (a group: the pipes one scenario key sets), and
            both together when neither alone lifts the radiator; none when the
            scenario sizes pipes automatically.
        """
        if self.scenario.layout.sizing.mode == "auto":
            return []
        taken: dict[tuple, float] = {}
        for seg in cause.segments:
            key = self.pipe_key(seg.role)
            if key is not None:
                taken[key] = taken.get(key, 0.0) + seg.dp_Pa
        groups = sorted(taken, key=lambda k: -taken[k])[:PIPE_GROUPS_TRIED]
        edits = []
        for key in groups:
            name = self.current_pipe(key)
            series = [p.name for p in pipe_series(name)]
            if name in series and series.index(name) + 1 < len(series):
                edits.append(ScenarioEdit(key, series[series.index(name) + 1]))
        fixes = [
            self.fix(
                "pipe_size",
                f"next size up: {e.text()} (takes "
                f"{taken[e.path] / 1e3:.1f} kPa of this circuit's pressure)",
                [e],
            )
            for e in edits
        ]
        if len(edits) > 1 and not any(f.lifts for f in fixes):
            fixes.append(
                self.fix(
                    "pipe_size",
                    "next size up on both: " + "; ".join(e.text() for e in edits),
                    edits,
                )
            )
        return fixes

    # -- pump ------------------------------------------------------------------
    def pump_table(self) -> tuple[tuple, dict | None]:
        """Key path of the driving pump's table, and its document table.

        A floor pump without its own table runs on ``[pump]``; its fix adds a
        ``[[layout.floor_pumps]]`` entry (document table None).
        """
        name = self.point.built.network.link_names[
            driving_pump(self.point, self.emitter)
        ]
        if name == "pump":
            return ("pump",), self.document["pump"]
        entries = self.document.get("layout", {}).get("floor_pumps", [])
        for i, entry in enumerate(entries):
            if entry.get("floor") == self.floor.floor:
                return ("layout", "floor_pumps", i), entry
        return ("layout", "floor_pumps"), None

    def pump_fixes(self) -> list[Fix]:
        """Raise the pump's set head, or its speed, by the least that lifts it."""
        path, table = self.pump_table()
        base = table if table is not None else self.document["pump"]
        mode = base.get("mode", "fixed_speed")
        if mode != "fixed_speed":
            return self._setpoint_fix(path, table, base)
        return self._speed_fix(path, table, base)

    def _pump_edits(self, path, table, base, changes: dict) -> list[ScenarioEdit]:
        if table is not None:
            return [ScenarioEdit((*path, k), v) for k, v in changes.items()]
        entry = {"floor": self.floor.floor, **base, **changes}
        entry.pop("stop_at_h", None)
        return [ScenarioEdit(path, entry, append=True)]

    def _pump_words(self, path: tuple, table: dict | None) -> str:
        """How the text names the pump a fix changes."""
        if table is None:
            return (
                f"a pump of its own for floor {self.floor.floor} "
                "(a new [[layout.floor_pumps]] entry, [pump] scaled)"
            )
        return f"the pump [{key_text(path)}]"

    def _speed_fix(self, path, table, base) -> list[Fix]:
        flows = [float(q) for q in base["flow_m3_per_h"]]
        heads = [float(h) for h in base["head_kPa"]]

        def edits(speed: float) -> list[ScenarioEdit]:
            return self._pump_edits(
                path,
                table,
                base,
                {
                    "flow_m3_per_h": [round(q * speed, 6) for q in flows],
                    "head_kPa": [round(h * speed**2, 6) for h in heads],
                },
            )

        found = _smallest_size(
            lambda s: self.shortfall(edits(s)), 1.0, MAX_SPEED_RATIO, SCAN_POINTS
        )
        speed = MAX_SPEED_RATIO if found is None else round_up(found, SPEED_STEP)
        change = edits(speed)
        words = (
            f"{self._pump_words(path, table)} at {100 * speed:.0f} % of its "
            "curve's speed: shut-off "
            f"head {heads[0] * speed**2:.1f} kPa (affinity laws; a higher speed "
            "step or a larger pump)"
        )
        if found is None:
            words = f"not enough even at {100 * speed:.0f} % speed: " + words
        return [self.fix("pump_speed", words, change)]

    def _setpoint_fix(self, path, table, base) -> list[Fix]:
        current = float(base["setpoint_kPa"])
        pump = self.point.built.network
        link = driving_pump(self.point, self.emitter)
        shut_off_kPa = float(pump.pump_coeffs[link][0]) / 1e3
        high = MAX_SETPOINT_SHARE * shut_off_kPa
        if high <= current:
            return []

        def edits(kPa: float) -> list[ScenarioEdit]:
            return self._pump_edits(path, table, base, {"setpoint_kPa": round(kPa, 6)})

        found = _smallest_size(
            lambda h: self.shortfall(edits(h)), current, high, SCAN_POINTS
        )
        if found is None:
            value = high
        else:
            value = min(round_up(found, SETPOINT_STEP_KPA), high)
        words = (
            f"{self._pump_words(path, table)} set head {value:.1f} kPa "
            f"(was {current:g} kPa)"
        )
        if found is None:
            words = "not enough even near the curve's shut-off head: " + words
        return [self.fix("pump_setpoint", words, edits(value))]

    # -- the tee along a reverse-return run -------------------------------------
    def tee_fixes(self) -> list[Fix]:
        """Move the tee along the run, with or without lengthening its branch."""
        if not self.point.scheme.startswith("reverse_return"):
            return []
        tees = self.floor.tees
        j = next(i for i, t in enumerate(tees) if t.emitter == self.emitter)
        fixes = []
        for kind, lengthen in (("tee_position", False), ("branch_length", True)):
            best = None
            for toward_start in (True, False):
                result = self._tee_move(j, toward_start, lengthen)
                if result is not None and (best is None or result[0] < best[0]):
                    best = result
            if best is not None:
                distance, edits, words = best
                fixes.append(self.fix(kind, words, edits))
        return fixes

    def tee_move_edits(
        self, j: int, toward_start: bool, lengthen: bool, d: float
    ) -> list[ScenarioEdit]:
        """The floor's tees with tee ``j`` moved ``d`` metres along the run.

        The tee may pass other tees (the floor's ``tees`` list is written in the
        new order, the moved tee after any tee it meets); with ``lengthen`` its
        branch pipes get ``d`` metres longer each, so the radiator stays.

        Parameters
        ----------
        j : int
            Index of the tee in its floor's ``tees``. [-]
        toward_start : bool
            Move towards the run's start, else towards its end. [-]
        lengthen : bool
            Lengthen the branch pipes by the distance moved. [-]
        d : float
            Distance moved along the run. [m]

        Returns
        -------
        list of ScenarioEdit
            One edit: the floor's ``tees`` rewritten.
        """
        tees = self.floor.tees
        positions = [float(x) for x in tee_positions_m(self.floor)]
        entries = self.document["route"]["floors"][self.floor_path[2]]["tees"]
        moved = list(positions)
        moved[j] = positions[j] + (-d if toward_start else d)
        order = sorted(range(len(tees)), key=lambda i: (moved[i], i == j))
        new, last = [], 0.0
        for i in order:
            entry = dict(entries[i])
            entry["header_length_m"] = round(moved[i] - last, 6)
            if lengthen and i == j:
                entry["branch_length_m"] = round(tees[j].branch_length_m + d, 6)
            last = moved[i]
            new.append(entry)
        return [ScenarioEdit((*self.floor_path, "tees"), new)]

    def _tee_move(self, j: int, toward_start: bool, lengthen: bool):
        """Smallest move of tee ``j`` that lifts its emitter: (d, edits, words).

        The tee stays between the run's start and its last tee; None when no
        move in that range lifts it.
        """
        positions = [float(x) for x in tee_positions_m(self.floor)]
        room = positions[j] if toward_start else positions[-1] - positions[j]
        if room <= 0.0:
            return None

        def edits(d: float) -> list[ScenarioEdit]:
            return self.tee_move_edits(j, toward_start, lengthen, d)

        found = _smallest_size(
            lambda d: self.shortfall(edits(d)), 0.0, room, SCAN_POINTS
        )
        if found is None:
            return None
        d = min(round_up(found, LENGTH_STEP_M), room)
        direction = "towards the start" if toward_start else "towards the end"
        to_m = positions[j] + (-d if toward_start else d)
        e_id = self.scenario.emitters[self.emitter].id
        words = (
            f"move the tee of {e_id} {d:.1f} m {direction} of the run "
            f"(to {to_m:.1f} m from the floor's start)"
        )
        if lengthen:
            words += f", its branch pipes {d:.1f} m longer each (the radiator stays)"
        else:
            words += ", branch pipes as they are"
        return d, edits(d), words


def _file_index(where: str) -> int:
    """Index of an array entry from its key path, ``route.floors[2]`` -> 2."""
    return int(where.rsplit("[", 1)[1].rstrip("]"))


def starving_fixes(point: DesignPoint, emitter: int, cause: Cause) -> list[Fix]:
    """Every fix for a starving radiator, verified and ranked.

    Parameters
    ----------
    point : DesignPoint
        The scheme at design conditions. [-]
    emitter : int
        Index of the starving emitter. [-]
    cause : Cause
        Where its pressure goes
        (:func:`simheat.analysis.check.starving.locate_cause`). [-]

    Returns
    -------
    list of Fix
        Pump, tee and pipe fixes, ranked by :meth:`Fix.rank_key`.
    """
    finder = FixFinder(point, emitter)
    fixes = [*finder.pump_fixes(), *finder.tee_fixes(), *finder.pipe_fixes(cause)]
    return sorted(fixes, key=Fix.rank_key)
