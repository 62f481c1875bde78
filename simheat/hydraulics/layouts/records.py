"""What a built layout knows beyond the network arrays: link records and names.

:class:`LinkSpec` records keep, per link, what the arrays of
:class:`~simheat.hydraulics.network.Network` do not: the pipe type, the fitting
counts, the role in the plan and the design flow. :class:`BuiltLayout` bundles
the frozen network with them, the fitting counts of the whole layout and the
drawing positions.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from simheat.hydraulics.network import Network
from simheat.scenario.fittings import FittingTable
from simheat.scenario.model import Obstacle, PipeSpec, SizingLimits

# Link name of the pump at the heat source: the only pump of a shared-pump scheme,
# the primary pump of a "_floor_pumps" scheme.
PLANT_PUMP_LINK = "pump"

# Link roles: which sizing rule applies and how the report groups pipe.
HEADER_ROLES = frozenset({"feed", "riser", "header", "loop", "bypass", "manifold_feed"})
BRANCH_ROLES = frozenset({"emitter", "home_run"})


def floor_pump_link(floor: int) -> str:
    """Link name of a floor's own pump in the ``_floor_pumps`` schemes.

    Parameters
    ----------
    floor : int
        Storey number of the floor (``[[route.floors]] floor``). [-]

    Returns
    -------
    str
        The pump link's name.

    Examples
    --------
    >>> floor_pump_link(1)
    'pump:floor1'
    """
    return f"pump:floor{floor}"


def sizing_rule(role: str) -> str:
    """Which velocity limit a link role sizes by: ``"branch"`` or ``"header"``.

    Parameters
    ----------
    role : str
        The link's role in the plan (``feed``, ``header``, ``emitter``, ...). [-]

    Returns
    -------
    str
        ``"branch"`` for emitter branches and home-run pairs, else ``"header"``.
    """
    return "branch" if role in BRANCH_ROLES else "header"


@dataclass(frozen=True)
class Along:
    """Where a pipe runs along a floor's run, from its ``a`` end to its ``b`` end.

    Attributes
    ----------
    floor : int
        Route index of the floor (its place in ``route.floors``). [-]
    from_m, to_m : float
        Positions along the run of the link's ``a`` end (``from_node``) and
        ``b`` end (``to_node``). [m]
    forward : bool or None
        Whether the pipe goes from ``from_m`` to ``to_m`` with the run
        (increasing position, wrapping past a ring's start) or against it;
        None for ``to_m >= from_m`` (enough on an open run). [-]
    """

    floor: int
    from_m: float
    to_m: float
    forward: bool | None = None

    @property
    def goes_forward(self) -> bool:
        """Whether the pipe runs with the run from its ``a`` end. [-]."""
        return self.to_m >= self.from_m if self.forward is None else self.forward


@dataclass(frozen=True)
class Detour:
    """An obstacle a pipe passes, and the pipe's height at the detour's top or foot.

    Attributes
    ----------
    obstacle : Obstacle
        The obstacle (how it is passed, extra pipe and elbows per pipe). [-]
    height_m : float
        Height above the plant of the pipe over the obstacle (``over``), under
        it (``under``) or beside it (``around``, the run's height). [m]
    """

    obstacle: Obstacle
    height_m: float


@dataclass(frozen=True)
class DrawingMark:
    """A label of the schematic drawing that belongs to no single link.

    Attributes
    ----------
    kind : str
        ``"floor"`` (a floor's name, at the start of its band) or ``"split"`` (where
        the two circuits of a split direct return meet). [-]
    label : str
        Text drawn. [-]
    xy : (float, float)
        Drawing position. [drawing units]
    """

    kind: str
    label: str
    xy: tuple[float, float]


@dataclass
class LinkSpec:
    """One link while the network is being built (see :class:`Network`).

    ``along`` says where a pipe runs along a floor's run (None elsewhere): the
    route-detail pass gives it its stretch's header pipe and fittings and the
    detours of the obstacles it passes, which it lists in ``detours`` in order
    from the link's ``a`` end to its ``b`` end. ``pipes`` is the number of
    pipes the link stands for side by side (2 for a home-run pair's legs, which
    both pass every obstacle between the manifold and the emitter).

    Attributes
    ----------
    name : str
        Link name. [-]
    a, b : int
        Start and end node; positive flow runs from ``a`` to ``b``. [-]
    kind : int
        ``LINK_PIPE``, ``LINK_EMITTER``, ``LINK_PUMP`` or ``LINK_SOURCE``. [-]
    role : str
        Role in the plan (``feed``, ``header``, ``emitter``, ``pump``, ...); picks
        the sizing rule and the report grouping. [-]
    length_m : float
        Pipe length (zero for none). [m]
    pipe : PipeSpec or None
        Pipe type; None for a link without pipe. [-]
    fittings : dict of str to float
        Number of each fitting kind (see :meth:`Builder.zeta`). [-]
    extra_zeta : float
        Local loss coefficient added to that of the fittings. [-]
    kv : float
        Fully open valve Kv; 0 for a link without valve. [m3/h]
    pump : tuple of float
        Pump head curve ``a0 + a1 Q + a2 Q^2`` at full speed, Q in m3/s; zeros
        for a link without pump. [Pa], [Pa s/m3], [Pa s2/m6]
    pump_mode : int
        Pump control code, a key of ``network.PUMP_MODE_NAMES``. [-]
    pump_setpoint_Pa : float
        Set head of a regulated pump; 0 otherwise. [Pa]
    check_valve : bool
        Whether the link holds a check valve. [-]
    emitter : int
        Emitter index of an emitter link, -1 otherwise. [-]
    extra_volume_m3 : float
        Water held beyond the pipe's own volume (radiator, source, pump casing). [m3]
    room : int
        Room the link runs through, -1 for unheated space. [-]
    design_flow_kg_s : float
        Design mass flow, used for sizing. [kg/s]
    sized : bool
        Whether automatic sizing may change the pipe. [-]
    along : Along or None
        Where the pipe runs along a floor's run. [-]
    detours : list of Detour
        Obstacles it passes with its height there, from ``a`` to ``b``. [-]
    pipes : int
        Pipes the link stands for side by side. [-]
    """

    name: str
    a: int
    b: int
    kind: int
    role: str
    length_m: float = 0.0
    pipe: PipeSpec | None = None
    fittings: dict[str, float] = field(default_factory=dict)
    extra_zeta: float = 0.0
    kv: float = 0.0
    pump: tuple[float, float, float] = (0.0, 0.0, 0.0)
    pump_mode: int = 0  # network code, see PUMP_MODE_NAMES
    pump_setpoint_Pa: float = 0.0
    check_valve: bool = False
    emitter: int = -1
    extra_volume_m3: float = 0.0
    room: int = -1
    design_flow_kg_s: float = 0.0
    sized: bool = True  # whether automatic sizing may change the pipe
    along: Along | None = None
    detours: list[Detour] = field(default_factory=list)
    pipes: int = 1


@dataclass(frozen=True)
class Circuit:
    """A circuit sharing a manifold, header or riser with others.

    Attributes
    ----------
    name : str
        Circuit name (:mod:`simheat.scenario.circuits`). [-]
    link : int or None
        Link carrying the circuit's flow alone on its return: the balancing
        valve's link when it has one; None when no single link does. [-]
    emitters : tuple of int
        Emitters the circuit serves. [-]
    design_flow_kg_s : float
        Design flow of the circuit. [kg/s]
    has_valve : bool
        Whether a balancing valve sits on ``link``. [-]
    """

    name: str
    link: int | None
    emitters: tuple[int, ...]
    design_flow_kg_s: float
    has_valve: bool = False


@dataclass(frozen=True, eq=False)
class BuiltLayout:
    """A built network with what the plan knows beyond the arrays.

    Attributes
    ----------
    network : Network
        The network the solver and the dynamics consume. [-]
    links : tuple of LinkSpec
        Per link: pipe type, fitting counts, role and design flow. [-]
    fitting_count : dict of str to int
        Fittings of the whole layout by kind: ``tee``, ``elbow``,
        ``manifold_connection``, ``diverter_tee``, ``low_loss_header``. [-]
    node_xy : ndarray, shape (n_nodes, 2)
        Schematic drawing position of each node. [drawing units]
    node_height_m : ndarray, shape (n_nodes,)
        Height of each node above the plant. [m]
    emitter_xy : dict of int to (float, float)
        Schematic position of each emitter's box, by emitter index. [drawing units]
    fittings : FittingTable
        The fitting table used. [-]
    design_temp_C : float
        Mean design water temperature of the design flows. [°C]
    limits : SizingLimits
        Sizing limits of the scenario. [-]
    obstacles : tuple of Obstacle
        Every obstacle of the route, floor by floor in the file's order. [-]
    circuits : tuple of Circuit
        The circuits that share a manifold, header or riser, in build order. [-]
    link_via : dict of int to tuple of (float, float)
        Drawing waypoints of links not drawn as one straight segment between
        their nodes, by link index (the path runs from the from-node through the
        waypoints to the to-node). [drawing units]
    marks : tuple of DrawingMark
        Labels the drawing places that belong to no link: floor names, split
        points. [-]
    """

    network: Network
    links: tuple[LinkSpec, ...]
    fitting_count: dict[str, int]
    node_xy: np.ndarray
    node_height_m: np.ndarray
    emitter_xy: dict[int, tuple[float, float]]
    fittings: FittingTable
    design_temp_C: float
    limits: SizingLimits
    obstacles: tuple[Obstacle, ...] = ()
    circuits: tuple[Circuit, ...] = ()
    link_via: dict[int, tuple[tuple[float, float], ...]] = field(default_factory=dict)
    marks: tuple[DrawingMark, ...] = ()

    def link_path_xy(self, link: int) -> np.ndarray:
        """Drawing polyline of a link: from-node, waypoints, to-node.

        Parameters
        ----------
        link : int
            Link index. [-]

        Returns
        -------
        ndarray, shape (n_points, 2)
            The points in drawing units.
        """
        net = self.network
        points = [
            self.node_xy[net.from_node[link]],
            *self.link_via.get(link, ()),
            self.node_xy[net.to_node[link]],
        ]
        return np.array(points, dtype=float).reshape(-1, 2)

    @property
    def design_flow_kg_s(self) -> np.ndarray:
        """Design mass flow per link, positive from ``from_node``. [kg/s]."""
        return np.array([k.design_flow_kg_s for k in self.links])

    @property
    def emitter_design_flow_kg_s(self) -> np.ndarray:
        """Design mass flow through each emitter, in scenario order. [kg/s].

        In two-pipe schemes this is the emitter's share of its room's design load at
        the design temperature drop; in a one-pipe loop it is the emitter's share of
        the loop's design flow.
        """
        return self.design_flow_kg_s[self.network.emitter_links()]
