"""Records of the route detail and of the floor controls, as the scenario states them.

The route as installed (:mod:`simheat.scenario.route`): fittings beyond the
table's counts on a tee or its header stretch, and the obstacles a floor's pipes
pass; and how a floor pump is switched (:mod:`simheat.scenario.floor_control`).
:mod:`simheat.scenario.model` holds the records that use them.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["OBSTACLE_PASSES", "ExtraFittings", "FloorControl", "Obstacle"]


@dataclass(frozen=True)
class ExtraFittings:
    """Fittings a pipe holds beyond the counts of the fitting table.

    Attributes
    ----------
    elbows : int
        Extra 90° elbows. [-]
    zeta : float
        Extra local loss coefficient, referred to the pipe's velocity. [-]
    named : tuple of str
        Fittings named by their kind in the fitting table (``ball_valve``,
        ``elbow_45``, ...); a name given twice counts twice. [-]
    """

    elbows: int = 0
    zeta: float = 0.0
    named: tuple[str, ...] = ()

    def counts(self) -> dict[str, int]:
        """Fitting counts by kind, elbows included. [-]."""
        counts: dict[str, int] = {}
        if self.elbows:
            counts["elbow"] = self.elbows
        for name in self.named:
            counts[name] = counts.get(name, 0) + 1
        return counts

    def __bool__(self) -> bool:
        """Whether any fitting or zeta is given."""
        return bool(self.elbows or self.zeta or self.named)


OBSTACLE_PASSES = ("over", "under", "around")
"""How pipes get past an obstacle on the run."""


@dataclass(frozen=True)
class Obstacle:
    """Something on a floor's run that every pipe along the run must get past.

    Attributes
    ----------
    name : str
        What it is (a door, a beam); for reports. [-]
    position_m : float
        Position along the run from the floor's start. [m]
    passed : str
        ``"over"`` (up, across, down: a high point), ``"under"`` (down, across,
        up: a low point) or ``"around"`` (sideways, level). [-]
    rise_m : float
        How far above (``over``) or below (``under``) the run the pipes go; 0
        for ``around``. [m]
    extra_length_m : float
        Pipe each passing pipe gains: twice ``rise_m`` over or under, the given
        length around. [m]
    elbows : int
        Elbows each passing pipe gains. [-]
    where : str
        Key path of its table in the file, for messages. [-]
    """

    name: str
    position_m: float
    passed: str
    rise_m: float
    extra_length_m: float
    elbows: int
    where: str = "route.floors.obstacles"


@dataclass(frozen=True)
class FloorControl:
    """How a floor's own pump is switched in the ``_floor_pumps`` schemes.

    Attributes
    ----------
    floor : int
        Storey number of the floor. [-]
    reference_room : int or None
        Index of the room whose air temperature the floor thermostat reads;
        None for no thermostat (the pump runs whenever the system does). [-]
    setpoint_C : float or None
        Thermostat setpoint; None for the reference room's setpoint (the
        setback setpoint before comfort). [°C]
    hysteresis_K : float
        Switching differential: the pump stops when the reference room's air
        reaches the setpoint plus half of it and starts again when it falls to
        the setpoint less half of it. [K]
    min_run_s, min_off_s : float
        Shortest time the pump runs once started, and stays off once
        stopped, before the thermostat may switch it again. [s]
    shut_off : tuple of (float, float)
        Clock periods (from, until; seconds after midnight, wrapping past
        midnight when until < from) when the floor is shut off: pump off, its
        check valve holding. [s]
    where : str
        Key path of the floor pump's table, for messages. [-]
    """

    floor: int
    reference_room: int | None = None
    setpoint_C: float | None = None
    hysteresis_K: float = 0.5
    min_run_s: float = 300.0
    min_off_s: float = 300.0
    shut_off: tuple[tuple[float, float], ...] = ()
    where: str = "layout.floor_pumps"

    @property
    def switched(self) -> bool:
        """Whether anything switches the pump (a thermostat or a shut-off). [-]."""
        return self.reference_room is not None or bool(self.shut_off)
