"""The one network representation that the flow solver and the dynamics consume.

A network is a closed graph of nodes joined by links. Every link is a series of
optional parts carrying one mass flow: a pipe (Darcy-Weisbach friction plus local
losses as a sum of zeta values), a valve (Kv, scaled by an opening), a pump (head
curve) and, for the dynamics, water volume that may exchange heat with a room (an
emitter), with surroundings (a pipe) or receive heat (the heat source).

Positive flow runs from ``from_node`` to ``to_node``. Pressures are gauge pressures
relative to ``reference_node`` (where the expansion vessel sits), whose pressure is
held at zero.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from simheat.physics._kernels import (
    PUMP_MODE_CONSTANT_DP,
    PUMP_MODE_FIXED_SPEED,
    PUMP_MODE_PROPORTIONAL_DP,
)

# Link kinds: what the link stands for in the plan (all links share the same parts).
LINK_PIPE = 0  # header, riser or feed pipe
LINK_EMITTER = 1  # branch supply pipe + valve + radiator + branch return pipe
LINK_PUMP = 2  # circulation pump (with its short pipe)
LINK_SOURCE = 3  # heat source (boiler or heat-pump heat exchanger)

# Pump control modes (``pump_mode``), see simheat.physics._kernels.
PUMP_MODE_NAMES = {
    PUMP_MODE_FIXED_SPEED: "fixed_speed",
    PUMP_MODE_CONSTANT_DP: "constant_dp",
    PUMP_MODE_PROPORTIONAL_DP: "proportional_dp",
}

# Lines, used to draw pressure along supply and return.
LINE_SUPPLY = 0
LINE_RETURN = 1
LINE_OTHER = 2


@dataclass(frozen=True, eq=False)
class Network:
    """A closed pipe network as flat arrays (SI units).

    Attributes
    ----------
    scheme : str
        Name of the piping scheme that built it. [-]
    node_names : tuple of str
        One name per node. [-]
    node_line : ndarray of int8
        ``LINE_SUPPLY``, ``LINE_RETURN`` or ``LINE_OTHER`` per node. [-]
    node_distance_m : ndarray of float
        Pipe distance of the node from the heat source along its line. [m]
    reference_node : int
        Node whose gauge pressure is held at zero. [-]
    link_names : tuple of str
        One name per link. [-]
    link_kind : ndarray of int8
        ``LINK_PIPE``, ``LINK_EMITTER``, ``LINK_PUMP`` or ``LINK_SOURCE``. [-]
    from_node, to_node : ndarray of int64
        End nodes; positive flow runs from ``from_node`` to ``to_node``. [-]
    length_m : ndarray of float
        Pipe length of the link (zero for none). [m]
    inner_diameter_m : ndarray of float
        Inner diameter of the link's pipe; also the reference for ``zeta``. [m]
    roughness_m : ndarray of float
        Absolute roughness of the pipe wall. [m]
    zeta : ndarray of float
        Sum of local loss coefficients, referred to the pipe velocity. [-]
    kv_m3_h : ndarray of float
        Fully open valve Kv; ``0`` means the link has no valve. [m3/h at 1 bar]
    pump_coeffs : ndarray of float, shape (n_links, 3)
        Head rise ``a0 + a1*Q + a2*Q**2`` in Pa with Q in m3/s at nominal speed;
        zeros for links without a pump. [Pa, Pa s/m3, Pa s2/m6]
    emitter_index : ndarray of int64
        Index into ``emitter_ids`` for emitter links, -1 otherwise. [-]
    emitter_ids : tuple of str
        Emitter ids, in the order of the scenario. [-]
    water_volume_m3 : ndarray of float
        Water held by the link (pipe volume plus radiator or source content). [m3]
    loss_W_per_m_K : ndarray of float
        Heat loss of the link's pipe per metre and kelvin of excess temperature
        over its surroundings. [W/(m K)]
    surroundings_room : ndarray of int64
        Index of the room the pipe runs through, or -1 for unheated space. [-]
    check_valve : ndarray of bool, optional
        True where the link holds a check valve (reverse flow blocked but for a
        tiny leak); default none. [-]
    pump_mode : ndarray of int8, optional
        Pump control per link: ``PUMP_MODE_FIXED_SPEED`` (0, the default),
        ``PUMP_MODE_CONSTANT_DP`` (1) or ``PUMP_MODE_PROPORTIONAL_DP`` (2). [-]
    pump_setpoint_Pa : ndarray of float, optional
        Set head of a regulated pump (modes 1 and 2); 0 otherwise. [Pa]
    closed : ndarray of bool, optional
        True where the link is shut for good (an emitter with ``closed`` set):
        it carries no water at all, not even a leak; default none. The flow
        solver takes it, and the links it leaves on no closed loop, out of the
        solve (:mod:`simheat.hydraulics.still`). [-]
    """

    scheme: str
    node_names: tuple[str, ...]
    node_line: np.ndarray
    node_distance_m: np.ndarray
    reference_node: int
    link_names: tuple[str, ...]
    link_kind: np.ndarray
    from_node: np.ndarray
    to_node: np.ndarray
    length_m: np.ndarray
    inner_diameter_m: np.ndarray
    roughness_m: np.ndarray
    zeta: np.ndarray
    kv_m3_h: np.ndarray
    pump_coeffs: np.ndarray
    emitter_index: np.ndarray
    emitter_ids: tuple[str, ...]
    water_volume_m3: np.ndarray
    loss_W_per_m_K: np.ndarray
    surroundings_room: np.ndarray
    check_valve: np.ndarray | None = None
    pump_mode: np.ndarray | None = None
    pump_setpoint_Pa: np.ndarray | None = None
    closed: np.ndarray | None = None

    def __post_init__(self) -> None:
        """Fill the optional per-link arrays with their defaults."""
        n_links = len(self.link_names)
        defaults = {
            "check_valve": np.zeros(n_links, dtype=bool),
            "pump_mode": np.zeros(n_links, dtype=np.int8),
            "pump_setpoint_Pa": np.zeros(n_links),
            "closed": np.zeros(n_links, dtype=bool),
        }
        for name, default in defaults.items():
            if getattr(self, name) is None:
                object.__setattr__(self, name, default)

    @property
    def n_nodes(self) -> int:
        """Number of nodes."""
        return len(self.node_names)

    @property
    def n_links(self) -> int:
        """Number of links."""
        return len(self.link_names)

    def emitter_links(self) -> np.ndarray:
        """Link index of each emitter, in the order of ``emitter_ids``."""
        links = np.full(len(self.emitter_ids), -1, dtype=np.int64)
        for link, emitter in enumerate(self.emitter_index):
            if emitter >= 0:
                links[emitter] = link
        return links

    def pump_links(self) -> np.ndarray:
        """Indices of the pump links."""
        return np.flatnonzero(self.link_kind == LINK_PUMP)

    def source_links(self) -> np.ndarray:
        """Indices of the heat-source links."""
        return np.flatnonzero(self.link_kind == LINK_SOURCE)

    def incidence(self) -> np.ndarray:
        """Dense node-link incidence: +1 where a link leaves, -1 where it enters."""
        a = np.zeros((self.n_nodes, self.n_links))
        a[self.from_node, np.arange(self.n_links)] += 1.0
        a[self.to_node, np.arange(self.n_links)] -= 1.0
        return a
