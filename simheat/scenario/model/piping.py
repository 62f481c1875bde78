"""Radiators, valve types, pipes and the route the headers take.

Part of :mod:`simheat.scenario.model` (values as given, SI units, validated;
nothing computed).
"""

from __future__ import annotations

from dataclasses import dataclass, field

from simheat.scenario.details import ExtraFittings, Obstacle


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
