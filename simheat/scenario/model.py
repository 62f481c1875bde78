"""Typed, validated scenario objects in SI units: what the file says, nothing more.

Everything here is produced by :func:`simheat.scenario.load.parse_scenario`, the one
place where the practical units of scenario files (kW, kPa, L, mm, m3/h, minutes,
hours) are converted to SI. Downstream code never sees a practical unit.

These objects hold the values the user gave (or the documented defaults of the
keys left out), validated; they compute nothing. Quantities derived from them
(heat loss coefficients from design loads, room capacities and couplings, Kv from
presets, fitted pump curves, design flows) come from the resolve step,
:func:`simheat.resolve.resolve`.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from simheat.scenario.details import (  # noqa: F401 (records of the model)
    OBSTACLE_PASSES,
    ExtraFittings,
    FloorControl,
    Obstacle,
)
from simheat.scenario.fittings import FittingTable
from simheat.scenario.heat_pump import HeatPump

SECONDS_PER_DAY = 86400.0


@dataclass(frozen=True)
class EnvelopeElement:
    """One element of a room's envelope (wall, window, floor, ceiling, door).

    Attributes
    ----------
    name : str
        Display name (``"element 2"`` when not given). [-]
    area_m2 : float
        Area through which heat flows. [m2]
    u_W_m2K : float
        Thermal transmittance. [W/(m2 K)]
    beyond : str
        What lies beyond it: ``"outdoors"``, ``"ground"``, ``"unheated"`` or
        ``"room"`` (another heated room of the scenario). [-]
    temperature_factor : float
        Temperature reduction factor of an unheated space or of the ground
        (``b_u``, ``f_g``): the share of the inside-outside difference that
        drives the loss; 1 for outdoors, unused for a room. [-]
    room : int
        Index of the room beyond (``beyond == "room"``), else -1. [-]
    """

    name: str
    area_m2: float
    u_W_m2K: float
    beyond: str
    temperature_factor: float = 1.0
    room: int = -1


@dataclass(frozen=True)
class Envelope:
    """A room described by its envelope, for the heat-load calculation.

    Attributes
    ----------
    elements : tuple of EnvelopeElement
        Walls, windows, floors, ceilings. [-]
    air_changes_per_h : float or None
        Air change rate of the room, when given. [1/h]
    ventilation_m3_s : float or None
        Outdoor air volume flow, when given instead. [m3/s]
    heat_recovery : float
        Efficiency of heat recovery on the ventilation air. [-]
    thermal_bridge_W_m2K : float
        Thermal-bridge allowance added to the U of every element that is not
        toward another heated room. [W/(m2 K)]
    reheat_W_m2 : float
        Reheat allowance per m2 of floor, reported beside the load. [W/m2]
    """

    elements: tuple[EnvelopeElement, ...]
    air_changes_per_h: float | None
    ventilation_m3_s: float | None
    heat_recovery: float
    thermal_bridge_W_m2K: float
    reheat_W_m2: float


@dataclass(frozen=True)
class Room:
    """One heated room as a two-node (air and structure) lumped RC model.

    Attributes
    ----------
    id, name : str
        Identifier used in files and the display name. [-]
    floor : int
        Storey number, 0 for the ground floor. [-]
    floor_area_m2, height_m : float
        Floor area [m2] and clear height [m].
    setpoint_C : float
        Comfort air temperature setpoint. [°C]
    heat_loss_W_K : float or None
        Total heat loss coefficient to outdoors (fabric plus ventilation), when
        given (``heat_loss_W_per_K``). [W/K]
    design_heat_load_W : float or None
        Heat loss at the design outdoor temperature and the setpoint, when given
        instead. [W] At most one of the two is given; the resolve step derives
        the other (:mod:`simheat.resolve.loads`), or both from the envelope
        when neither is given.
    mass_class : str
        Construction class of ISO 13790:2008 Table 12 (``very_light`` ...
        ``very_heavy``). [-]
    air_capacity_J_K, structure_capacity_J_K : float or None
        Heat capacities of the air node (air and furnishings) and of the structure
        node when given (both or neither); None to derive them from the floor
        area, height and mass class. [J/K]
    air_loss_fraction : float
        Share of the heat loss coefficient leaving from the air node (ventilation
        and light elements such as windows); the rest leaves from the structure
        node. [-]
    internal_gains_W : float
        Constant internal gains into the air node. [W]
    envelope : Envelope or None
        The room's envelope, when described; the resolve step computes the
        design load from it unless a load or loss coefficient is given too. [-]
    initial_air_temp_C, initial_structure_temp_C : float or None
        Air and structure temperature at the start of the run when the scenario
        gives the initial state (the room's own or ``[simulation]``'s); None
        when the night sets it. [°C]
    """

    id: str
    name: str
    floor: int
    floor_area_m2: float
    height_m: float
    setpoint_C: float
    heat_loss_W_K: float | None
    design_heat_load_W: float | None
    mass_class: str
    air_capacity_J_K: float | None
    structure_capacity_J_K: float | None
    air_loss_fraction: float
    internal_gains_W: float
    envelope: Envelope | None = None
    initial_air_temp_C: float | None = None
    initial_structure_temp_C: float | None = None


@dataclass(frozen=True)
class InternalWall:
    """A conductance between the air nodes of two rooms. [W/K].

    Attributes
    ----------
    room_a, room_b : int
        Indices of the two rooms. [-]
    conductance_W_K : float
        Conductance of the wall between their air nodes. [W/K]
    """

    room_a: int
    room_b: int
    conductance_W_K: float


@dataclass(frozen=True)
class Emitter:
    """A radiator with its valve.

    Attributes
    ----------
    id : str
        Identifier. [-]
    room : int
        Index of the room it heats. [-]
    nominal_power_W : float
        Output at the EN 442 nominal point 75/65/20 °C. [W]
    exponent : float
        EN 442 characteristic exponent n. [-]
    water_volume_m3 : float
        Water content. [m3]
    metal_mass_kg : float
        Mass of the (steel) radiator body. [kg]
    kv_m3_h : float or None
        Kv of the valve set in the emitter's circuit, fully open, when given as a
        Kv. [m3/h]
    preset : float or None
        The valve preset chosen, when given as a preset instead (the resolve step
        reads its Kv from ``valve_type``'s table). [-]
    valve_type : str or None
        Name of the valve type (a key of ``Scenario.valve_types``) of ``preset``. [-]
    thermostatic : bool
        Whether a thermostatic head controls the valve. [-]
    band_K : float
        Proportional band of the thermostatic head. [K]
    convective_fraction : float
        Share of the output going to the air node; the rest is radiant. [-]
    sensor_time_constant_s : float
        First-order time constant of the thermostatic head's sensor. [s]
    design_flow_kg_s : float or None
        Design mass flow when the scenario gives it (``design_flow_kg_per_h``);
        None for the share of the room's design load. [kg/s]
    lockshield_type : str or None
        Name of the valve type (a key of ``Scenario.valve_types``) whose table
        gives the lockshield's Kv per number of turns open; None for no
        lockshield with a table of its own. [-]
    lockshield_turns : float or None
        Turns the lockshield is open; set when ``lockshield_type`` is. [-]
    closed : bool
        Whether its valves are shut for good (``closed = true`` or a Kv of 0):
        no water flows through it at all, unlike a thermostatic head at its
        closed end, which still leaks. [-]
    """

    id: str
    room: int
    nominal_power_W: float
    exponent: float
    water_volume_m3: float
    metal_mass_kg: float
    kv_m3_h: float | None
    preset: float | None
    valve_type: str | None
    thermostatic: bool
    band_K: float
    convective_fraction: float
    sensor_time_constant_s: float = 600.0
    design_flow_kg_s: float | None = None
    lockshield_type: str | None = None
    lockshield_turns: float | None = None
    closed: bool = False


@dataclass(frozen=True)
class ValveType:
    """A valve's preset table: presets in increasing order and Kv at each.

    Attributes
    ----------
    presets : tuple of float
        Presets (settings), strictly increasing, in the maker's scale. [-]
    kv_m3_h : tuple of float
        Kv of the fully open valve at each preset, > 0. [m3/h]
    """

    presets: tuple[float, ...]
    kv_m3_h: tuple[float, ...]


@dataclass(frozen=True)
class PipeSpec:
    """A pipe type: catalog name or ``"custom"``, diameters [m], roughness [m].

    Attributes
    ----------
    name : str
        Catalog name, or the name given to a custom pipe (``"custom"`` by
        default). [-]
    inner_diameter_m : float
        Inner diameter. [m]
    roughness_m : float
        Absolute roughness of the pipe wall. [m]
    outer_diameter_m : float
        Outer diameter (for the pipe's heat loss). [m]
    """

    name: str
    inner_diameter_m: float
    roughness_m: float
    outer_diameter_m: float


@dataclass(frozen=True)
class Tee:
    """A tee point on a floor header where an emitter is connected.

    Attributes
    ----------
    emitter : int
        Index of the emitter. [-]
    header_length_m : float
        Header length from the previous tee (or the floor's start) to this tee. [m]
    branch_length_m : float
        Length of each of the supply and return branch pipes to the emitter. [m]
    header_pipe : PipeSpec or None
        Pipe of the header lines on the stretch of the run from the previous tee
        (or the floor's start) to this tee; None for the floor's header pipe. [-]
    return_header_pipe : PipeSpec or None
        Pipe of the return header on that stretch when it differs from
        ``header_pipe`` (reverse return, where the return grows as the supply
        shrinks); None for ``header_pipe``. [-]
    height_m : float or None
        Height of the header at this tee above the plant; None for the floor's
        height. [m]
    fittings : ExtraFittings
        Fittings on the emitter's circuit (branches, valve, radiator) beyond
        the table's counts. [-]
    header_fittings : ExtraFittings
        Fittings on each header pipe of the stretch leading to this tee, beyond
        the table's counts. [-]
    """

    emitter: int
    header_length_m: float
    branch_length_m: float
    header_pipe: PipeSpec | None = None
    return_header_pipe: PipeSpec | None = None
    height_m: float | None = None
    fittings: ExtraFittings = field(default_factory=ExtraFittings)
    header_fittings: ExtraFittings = field(default_factory=ExtraFittings)


@dataclass(frozen=True)
class FloorRoute:
    """The pipe run of one floor.

    Attributes
    ----------
    floor : int
        Storey number. [-]
    riser_length_m : float
        Riser length from the previous floor's start (or the feed's end). [m]
    header_pipe, branch_pipe : PipeSpec
        Pipe types of the header and of the branches. [-]
    tees : tuple of Tee
        Tee points in order along the run. [-]
    closing_length_m : float or None
        Pipe length from the last tee back round to the floor's start, which makes
        the run a ring; None for an open run. [m]
    manifold_position_m : float or None
        Position of the floor's manifold along the run from its start; None for
        the scheme's default. [m]
    split_after : int or None
        Index of the emitter after which split direct return divides the run;
        None to choose the split that shares the design load evenly. [-]
    height_m : float or None
        Height of the run at the floor's start above the plant; None for the
        default (the floor below plus this floor's riser, taken as vertical;
        see :func:`simheat.resolve.route.floor_heights_m`). [m]
    obstacles : tuple of Obstacle
        Obstacles on the run, in the file's order. [-]
    drop_length_m : float or None
        Pipe from this floor's last tee down to the start of the floor below's
        run, in the schemes that run one loop through the floors; None for back
        along this floor's run and down beside its riser. [m]
    where : str
        Key path of the floor's table in the file (``route.floors[2]``), which
        messages about the floor name. [-]
    """

    floor: int
    riser_length_m: float
    header_pipe: PipeSpec
    branch_pipe: PipeSpec
    tees: tuple[Tee, ...]
    closing_length_m: float | None = None
    manifold_position_m: float | None = None
    split_after: int | None = None
    height_m: float | None = None
    obstacles: tuple[Obstacle, ...] = ()
    drop_length_m: float | None = None
    where: str = "route.floors"


@dataclass(frozen=True)
class Route:
    """The pipe route of the whole house.

    Attributes
    ----------
    feed_length_m : float
        One-way length from the heat source to the foot of the riser. [m]
    feed_pipe : PipeSpec
        Pipe type of the feed and the risers. [-]
    floors : tuple of FloorRoute
        Floors in ascending order. [-]
    insulated : bool
        Whether the pipes are insulated. [-]
    unheated_space_temp_C : float
        Temperature around the feed pipe (plant room, basement). [°C]
    pipes_in_unheated_space : bool
        Whether the distribution pipes (headers, risers, manifold runs) run through
        unheated space (crawl space, loft) at ``unheated_space_temp_C`` rather than
        through the rooms they serve; radiator branches stay in their rooms. [-]
    """

    feed_length_m: float
    feed_pipe: PipeSpec
    floors: tuple[FloorRoute, ...]
    insulated: bool
    unheated_space_temp_C: float
    pipes_in_unheated_space: bool = False


@dataclass(frozen=True)
class Source:
    """Heat source: power limit, flow-temperature control and water content.

    Attributes
    ----------
    max_power_W : float
        Power limit; for a heat pump the largest capacity of its table (its
        limit at a moment follows the table). [W]
    flow_temp_C : float
        Fixed flow-temperature setpoint; with a schedule or a heating curve, the
        highest flow temperature it asks for. [°C]
    water_volume_m3 : float
        Water content. [m3]
    flow_schedule_time_s, flow_schedule_temp_C : tuple of float or None
        Scheduled flow temperature: times from the start [s] and setpoints [°C],
        linear between the points and held beyond them.
    curve_outdoor_temp_C, curve_flow_temp_C : tuple of float or None
        Heating curve: outdoor temperatures, increasing [°C], and the flow
        temperatures at them [°C], linear between the points and held beyond.
    kind : str
        ``"boiler"`` (a fixed power limit) or ``"heat_pump"``. [-]
    heat_pump : HeatPump or None
        The heat pump's table (``kind == "heat_pump"``). [-]
    """

    max_power_W: float
    flow_temp_C: float
    water_volume_m3: float
    flow_schedule_time_s: tuple[float, ...] | None = None
    flow_schedule_temp_C: tuple[float, ...] | None = None
    curve_outdoor_temp_C: tuple[float, ...] | None = None
    curve_flow_temp_C: tuple[float, ...] | None = None
    kind: str = "boiler"
    heat_pump: HeatPump | None = None

    @property
    def flow_control(self) -> str:
        """``"fixed"``, ``"schedule"`` or ``"heating_curve"``."""
        if self.curve_outdoor_temp_C is not None:
            return "heating_curve"
        if self.flow_schedule_time_s is not None:
            return "schedule"
        return "fixed"

    @property
    def lowest_flow_temp_C(self) -> float:
        """Lowest flow-temperature setpoint the control can ask for. [°C]."""
        if self.curve_flow_temp_C is not None:
            return min(self.curve_flow_temp_C)
        if self.flow_schedule_temp_C is not None:
            return min(self.flow_schedule_temp_C)
        return self.flow_temp_C

    @property
    def buffer_volume_m3(self) -> float:
        """Water content of a heat pump's buffer tank; 0 without one. [m3]."""
        return 0.0 if self.heat_pump is None else self.heat_pump.buffer_volume_m3


# Pump control modes a scenario may name, in the order of their network codes
# (simheat.hydraulics.network.PUMP_MODE_NAMES).
PUMP_MODES = ("fixed_speed", "constant_dp", "proportional_dp")


@dataclass(frozen=True)
class Pump:
    """Circulation pump: head curve points (volume flow [m3/s], head [Pa]) as given.

    The points are distinct in flow and the head falls with flow; the curve
    through them is fitted by the resolve step (:mod:`simheat.resolve.pumps`).

    Attributes
    ----------
    flow_m3_s : ndarray
        Volume flow of each curve point. [m3/s]
    head_Pa : ndarray
        Head of each curve point. [Pa]
    stop_s : float or None
        Time from the start when the pump stops for good (a failure case),
        ``None`` when it runs as scheduled. On ``Scenario.pump`` it stops every
        pump of the network (the whole system stops circulating); on
        ``LayoutOptions.primary_pump`` only the primary pump, and on an entry of
        ``LayoutOptions.floor_pumps`` only that floor's pump (see
        :func:`simheat.dynamics.controls.pump_stop_times_s`). [s]
    mode : str
        One of :data:`PUMP_MODES`: ``"fixed_speed"`` runs on the curve;
        ``"constant_dp"`` and ``"proportional_dp"`` vary the speed to hold
        ``setpoint_Pa``, the curve then being the one at maximum speed. [-]
    setpoint_Pa : float
        Set head of a regulated pump (> 0; the resolve step checks it lies below
        the fitted curve's shut-off head); 0 for a fixed-speed pump. [Pa]
    check_valve : bool or None
        True or False when the scenario says so, ``None`` to take the layout's
        default for the pump's place. [-]
    speed : float
        Speed setting of a fixed-speed pump as a fraction of the speed of its
        curve points (1 for a regulated pump). [-]
    speed_steps : tuple of float or None
        Speeds a fixed-speed pump can be set to, increasing; None for any. [-]
    setpoint_steps_Pa : tuple of float or None
        Set heads a regulated pump can be set to, increasing; None for any. [Pa]
    """

    flow_m3_s: np.ndarray
    head_Pa: np.ndarray
    stop_s: float | None = None
    mode: str = "fixed_speed"
    setpoint_Pa: float = 0.0
    check_valve: bool | None = None
    speed: float = 1.0
    speed_steps: tuple[float, ...] | None = None
    setpoint_steps_Pa: tuple[float, ...] | None = None


@dataclass(frozen=True)
class Weather:
    """Outdoor temperature series: times from the start [s] and values [°C].

    Attributes
    ----------
    time_s : ndarray
        Times from the start of the run, strictly increasing. [s]
    outdoor_temp_C : ndarray
        Outdoor temperature at each time. [°C]
    """

    time_s: np.ndarray
    outdoor_temp_C: np.ndarray


@dataclass(frozen=True)
class Schedule:
    """Heating schedule.

    Attributes
    ----------
    start_clock_s : float
        Clock time at the simulation start, seconds after midnight. [s]
    comfort_start_s : float
        Time after the simulation start when comfort begins. [s]
    before_comfort : str
        ``"off"`` (source and pump off) or ``"setback"`` (running at the setback
        setpoint). [-]
    setback_setpoint_C : float
        Setpoint of thermostatic heads before comfort. [°C]
    off_clock_s : float or None
        Clock time the heating went off the evening before, seconds after
        midnight: the run starts there, from the house's steady state at the
        comfort setpoints, and the house cools (heating and pumps off) until
        ``start_clock_s``. None when the scenario gives the initial state
        instead. [s]
    """

    start_clock_s: float
    comfort_start_s: float
    before_comfort: str
    setback_setpoint_C: float
    off_clock_s: float | None = None

    @property
    def night_s(self) -> float:
        """Length of the night before the start, 0 without one. [s]."""
        if self.off_clock_s is None:
            return 0.0
        return (self.start_clock_s - self.off_clock_s) % SECONDS_PER_DAY


@dataclass(frozen=True)
class Simulation:
    """Simulation settings.

    Attributes
    ----------
    duration_s, output_step_s : float
        Simulated time and output step. [s]
    initial_air_temp_C, initial_structure_temp_C : float or None
        Initial air and structure temperature of every room without its own,
        when the scenario gives the initial state; None otherwise. [°C]
    initial_water_temp_C : float or None
        Initial temperature of all water with a given initial state; None when
        the night sets it. [°C]
    reached_tolerance_K : float
        A room counts as at setpoint once its air is within this of the setpoint. [K]
    rtol : float
        Relative tolerance of the time integration. [-]
    pipe_cell_length_m : float
        Length of one water cell along pipes for transport delay. [m]
    emitter_cells : int
        Water cells in series per radiator. [-]
    """

    duration_s: float
    output_step_s: float
    initial_air_temp_C: float | None
    initial_structure_temp_C: float | None
    initial_water_temp_C: float | None
    reached_tolerance_K: float
    rtol: float
    pipe_cell_length_m: float
    emitter_cells: int


@dataclass(frozen=True)
class Design:
    """Design conditions: outdoor and supply temperatures [°C], drop [K].

    Attributes
    ----------
    outdoor_temp_C : float
        Design outdoor temperature. [°C]
    supply_temp_C : float
        Design supply (flow) temperature. [°C]
    temperature_drop_K : float
        Design drop from supply to return temperature across the emitters. [K]
    """

    outdoor_temp_C: float
    supply_temp_C: float
    temperature_drop_K: float


@dataclass(frozen=True)
class SizingLimits:
    """Pipe sizing rule: size from the route or chosen by the limits.

    Attributes
    ----------
    mode : str
        ``"given"`` (the route's pipe types) or ``"auto"`` (smallest catalog size
        of the same series within the limits). [-]
    header_velocity_max_m_s, branch_velocity_max_m_s : float
        Largest mean velocity in headers (feed, risers, headers, loops) and in
        branches (emitter branches, home-run pairs). [m/s]
    gradient_max_Pa_m : float
        Largest friction pressure gradient. [Pa/m]
    """

    mode: str = "given"
    header_velocity_max_m_s: float = 0.7
    branch_velocity_max_m_s: float = 0.5
    gradient_max_Pa_m: float = 150.0


@dataclass(frozen=True)
class CircuitValves:
    """Balancing valves on the circuits that share a manifold, header or riser.

    Attributes
    ----------
    valve_type : str
        Name of the valve type (a key of ``Scenario.valve_types``) whose table
        gives the valve's Kv per preset. [-]
    circuits : tuple of str or None
        Names of the circuits that get a valve (``primary``, ``floor1``,
        ``floor0:ahead``, ``floor0:kitchen`` ...); None for every circuit a
        scheme has. [-]
    presets : dict of str to float
        Preset of each circuit's valve by circuit name; a circuit not listed
        has its valve fully open (the table's largest preset). [-]
    """

    valve_type: str
    circuits: tuple[str, ...] | None = None
    presets: dict = field(default_factory=dict)


@dataclass(frozen=True)
class LayoutOptions:
    """Settings of the piping schemes beyond the route geometry.

    Attributes
    ----------
    one_pipe_emitter_share : float or None
        Share of a one-pipe loop's flow passing through each emitter at design;
        sets the bypass resistance of every diverter tee. [-]
    one_pipe_tee_zeta : float or None
        Zeta of the diverter tee's run (the bypass), referred to the loop pipe
        velocity; used instead of the fraction when given. [-]
    home_run_pipe : PipeSpec or None
        Pipe type of home-run pairs; None for each floor's branch pipe. [-]
    low_loss_header_pipe : PipeSpec or None
        Pipe type of the low-loss header; None to size it from the feed. [-]
    low_loss_header_length_m : float
        Length of the low-loss header between its primary connections. [m]
    primary_pump : Pump or None
        Primary pump behind a low-loss header; None for the scenario's pump. [-]
    floor_pumps : dict of int to Pump
        Each floor's own pump behind a low-loss header, by floor number; a floor
        not listed uses the scenario's pump. [-]
    fittings : FittingTable
        Zeta values and fitting counts: the defaults of
        :mod:`simheat.scenario.fittings` with the scenario's overrides. [-]
    sizing : SizingLimits
        Pipe sizing rule. [-]
    circuit_valves : CircuitValves or None
        Balancing valves on the circuits (``[layout.circuit_valves]``); None for
        none. [-]
    floor_controls : dict of int to FloorControl
        Floor thermostats and shut-off periods of the floor pumps, by floor
        number; floors without any are absent. [-]
    """

    one_pipe_emitter_share: float | None = None
    one_pipe_tee_zeta: float | None = None
    home_run_pipe: PipeSpec | None = None
    low_loss_header_pipe: PipeSpec | None = None
    low_loss_header_length_m: float = 0.5
    primary_pump: Pump | None = None
    floor_pumps: dict = field(default_factory=dict)
    fittings: FittingTable = field(default_factory=FittingTable)
    sizing: SizingLimits = field(default_factory=SizingLimits)
    circuit_valves: CircuitValves | None = None
    floor_controls: dict = field(default_factory=dict)


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
