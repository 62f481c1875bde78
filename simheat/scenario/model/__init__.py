"""Typed, validated scenario objects in SI units: what the file says, nothing more.

Everything here is produced by :func:`simheat.scenario.load.parse_scenario`, the one
place where the practical units of scenario files (kW, kPa, L, mm, m3/h, minutes,
hours) are converted to SI. Downstream code never sees a practical unit.

These objects hold the values the user gave (or the documented defaults of the
keys left out), validated; they compute nothing. Quantities derived from them
(heat loss coefficients from design loads, room capacities and couplings, Kv from
presets, fitted pump curves, design flows) come from the resolve step,
:func:`simheat.resolve.resolve`.

The records live in one module per part of the file (``building``: rooms and
walls; ``piping``: radiators, valves, pipes, route; ``plant``: source and pump;
``conditions``: weather, schedule, simulation, design; ``layout``: layout options)
and are all importable from here; :class:`Scenario` ties them together.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from simheat.scenario.details import (  # noqa: F401 (records of the model)
    OBSTACLE_PASSES,
    ExtraFittings,
    FloorControl,
    Obstacle,
)
from simheat.scenario.fittings import FittingTable  # noqa: F401
from simheat.scenario.heat_pump import HeatPump  # noqa: F401
from simheat.scenario.model.building import (  # noqa: F401
    Envelope,
    EnvelopeElement,
    InternalWall,
    Room,
)
from simheat.scenario.model.conditions import (  # noqa: F401
    SECONDS_PER_DAY,
    Design,
    Schedule,
    Simulation,
    Weather,
)
from simheat.scenario.model.layout import (  # noqa: F401
    CircuitValves,
    LayoutOptions,
    SizingLimits,
)
from simheat.scenario.model.piping import (  # noqa: F401
    Emitter,
    FloorRoute,
    PipeSpec,
    Route,
    Tee,
    ValveType,
)
from simheat.scenario.model.plant import PUMP_MODES, Pump, Source  # noqa: F401


@dataclass(frozen=True, eq=False)
class Scenario:
    """A whole validated scenario in SI units.

    Compared and hashed by identity (a scenario is one loaded document), so the
    resolve step can keep its result per scenario object.

    Attributes
    ----------
    name, description : str
        Title and free text of the scenario. [-]
    source_path : str
        Where the text came from (file path or the ``origin`` given); messages
        end with it. [-]
    text : str
        The scenario text as read. [-]
    schemes : tuple of str
        Piping schemes to compare, names of :data:`simheat.schemes.SCHEME_NAMES`. [-]
    design : Design
        Design conditions. [-]
    rooms, internal_walls, emitters : tuple
        Rooms, walls between them and radiators, in file order. [-]
    valve_types : dict of str to ValveType
        Preset tables by name. [-]
    route, source, pump, weather, schedule, simulation, layout
        The other sections of the file. [-]
    """

    name: str
    description: str
    source_path: str
    text: str
    schemes: tuple[str, ...]
    design: Design
    rooms: tuple[Room, ...]
    internal_walls: tuple[InternalWall, ...]
    emitters: tuple[Emitter, ...]
    route: Route
    source: Source
    pump: Pump
    weather: Weather
    schedule: Schedule
    simulation: Simulation
    layout: LayoutOptions = field(default_factory=LayoutOptions)
    valve_types: dict[str, ValveType] = field(default_factory=dict)

    def room_index(self, room_id: str) -> int:
        """Index of the room with id ``room_id``.

        Parameters
        ----------
        room_id : str
            Id of a room of the scenario. [-]
        """
        return next(i for i, r in enumerate(self.rooms) if r.id == room_id)

    def emitter_index(self, emitter_id: str) -> int:
        """Index of the emitter with id ``emitter_id``.

        Parameters
        ----------
        emitter_id : str
            Id of an emitter of the scenario. [-]
        """
        return next(i for i, e in enumerate(self.emitters) if e.id == emitter_id)
