"""The part of a network where water can move, and the links that stand still.

A link whose valves are shut for good (``Network.closed``) passes no water: not a
leak, exactly none. Closing links can leave others on no closed loop (a header
leading only to a closed radiator, a return stub), and a link on no closed loop
carries no flow in a steady state either: all water that crossed it would have
to come back the same way. Neither kind can be handed to Newton's method as a
link of huge resistance without making its matrix ill-conditioned, so they are
taken out: :func:`moving_part` returns the network of the links that can carry
water, which the flow solver solves, and the maps back to the whole network.
Still links get exactly zero flow; still nodes the pressure of the moving node
they hang from through still open links (at zero flow a pipe or a valve drops
nothing), or, across a shut valve only, the pressure on its other side.

References
----------
.. [1] R. E. Tarjan, "A note on finding the bridges of a graph", Information
   Processing Letters 2(6), 1974 (links on no closed loop).
"""

from __future__ import annotations

from collections import deque
from dataclasses import dataclass, replace

import numpy as np

from simheat.errors import ScenarioError
from simheat.hydraulics.network import Network

__all__ = ["MovingPart", "bridges", "moving_part"]


def bridges(n_nodes: int, ends: list[tuple[int, int]]) -> list[int]:
    """Links on no closed loop (bridges of the multigraph), by Tarjan's method.

    Parameters
    ----------
    n_nodes : int
        Number of nodes. [-]
    ends : list of (int, int)
        End nodes of each link. [-]

    Returns
    -------
    list of int
        Indices of the links that are bridges, increasing. [-]

    Examples
    --------
    A loop 0-1-2 with a stub 2-3:

    >>> bridges(4, [(0, 1), (1, 2), (2, 0), (2, 3)])
    [3]
    """
    adjacency: list[list[tuple[int, int]]] = [[] for _ in range(n_nodes)]
    for k, (f, t) in enumerate(ends):
        adjacency[f].append((t, k))
        adjacency[t].append((f, k))
    order = [-1] * n_nodes
    low = [0] * n_nodes
    found: list[int] = []
    counter = 0
    for root in range(n_nodes):
        if order[root] >= 0:
            continue
        order[root] = low[root] = counter
        counter += 1
        stack = [(root, -1, iter(adjacency[root]))]
        while stack:
            node, via, neighbours = stack[-1]
            for other, link in neighbours:
                if link == via:
                    continue
                if order[other] < 0:
                    order[other] = low[other] = counter
                    counter += 1
                    stack.append((other, link, iter(adjacency[other])))
                    break
                low[node] = min(low[node], order[other])
            else:
                stack.pop()
                if stack:
                    parent = stack[-1][0]
                    low[parent] = min(low[parent], low[node])
                    if low[node] > order[parent]:
                        found.append(via)
    return sorted(found)


@dataclass(frozen=True, eq=False)
class MovingPart:
    """The links of a network that can carry water, and the maps back.

    Attributes
    ----------
    whole : Network
        The network as built. [-]
    network : Network
        The moving links and the nodes they join, renumbered; ``whole`` itself
        when nothing stands still. [-]
    links : ndarray of int64
        Index in ``whole`` of each link of ``network``. [-]
    nodes : ndarray of int64
        Index in ``whole`` of each node of ``network``. [-]
    pressure_from : ndarray of int64
        For each node of ``whole``, the node of ``network`` whose pressure it
        takes. [-]
    """

    whole: Network
    network: Network
    links: np.ndarray
    nodes: np.ndarray
    pressure_from: np.ndarray

    @property
    def is_whole(self) -> bool:
        """Whether every link can carry water (nothing was taken out). [-]."""
        return self.network is self.whole

    @property
    def still_links(self) -> np.ndarray:
        """Indices in ``whole`` of the links that carry no water. [-]."""
        moving = np.zeros(self.whole.n_links, dtype=bool)
        moving[self.links] = True
        return np.flatnonzero(~moving)

    @property
    def link_index(self) -> np.ndarray:
        """Each link of ``whole``: its index in ``network``, -1 when still. [-]."""
        index = np.full(self.whole.n_links, -1, dtype=np.int64)
        index[self.links] = np.arange(len(self.links), dtype=np.int64)
        return index

    def link_values(self, values: np.ndarray) -> np.ndarray:
        """Per-link values of ``whole`` restricted to the moving links.

        Parameters
        ----------
        values : ndarray
            One value per link of ``whole``. [any]

        Returns
        -------
        ndarray
            One value per link of ``network``. [any]
        """
        return values if self.is_whole else values[self.links]

    def flows(self, moving_kg_s: np.ndarray) -> np.ndarray:
        """Flows of every link of ``whole``: exactly zero on the still ones.

        Parameters
        ----------
        moving_kg_s : ndarray
            Flow of each link of ``network``. [kg/s]

        Returns
        -------
        ndarray
            Flow of each link of ``whole``. [kg/s]
        """
        if self.is_whole:
            return moving_kg_s
        out = np.zeros(self.whole.n_links)
        out[self.links] = moving_kg_s
        return out

    def pressures(self, moving_Pa: np.ndarray) -> np.ndarray:
        """Pressures of every node of ``whole`` from those of ``network``.

        Parameters
        ----------
        moving_Pa : ndarray
            Pressure of each node of ``network``. [Pa]

        Returns
        -------
        ndarray
            Pressure of each node of ``whole``. [Pa]
        """
        return moving_Pa if self.is_whole else moving_Pa[self.pressure_from]


def _subnetwork(net: Network, links: np.ndarray, nodes: np.ndarray) -> Network:
    """The network of some links and the nodes they join, renumbered."""
    renumber = np.full(net.n_nodes, -1, dtype=np.int64)
    renumber[nodes] = np.arange(len(nodes))
    per_link = (
        "link_kind length_m inner_diameter_m roughness_m zeta kv_m3_h pump_coeffs "
        "emitter_index water_volume_m3 loss_W_per_m_K surroundings_room "
        "check_valve pump_mode pump_setpoint_Pa"
    ).split()
    return replace(
        net,
        node_names=tuple(net.node_names[i] for i in nodes),
        node_line=net.node_line[nodes],
        node_distance_m=net.node_distance_m[nodes],
        reference_node=int(renumber[net.reference_node]),
        link_names=tuple(net.link_names[k] for k in links),
        from_node=renumber[net.from_node[links]],
        to_node=renumber[net.to_node[links]],
        closed=None,
        **{name: np.asarray(getattr(net, name))[links] for name in per_link},
    )


def moving_part(network: Network) -> MovingPart:
    """Take the links that cannot carry water out of a network.

    Parameters
    ----------
    network : Network
        The network as built, with its shut links in ``closed``. [-]

    Returns
    -------
    MovingPart
        The part that moves (the network itself when nothing stands still)
        and the maps back to it.

    Raises
    ------
    ScenarioError
        When a pump is left without a closed loop to drive (every emitter it
        serves shut), or nothing can move at all.

    Notes
    -----
    Still: the shut links; then, repeatedly, the bridges of the open links
    (Tarjan [1]_); then every link outside the connected part of the rest that
    holds the pressure reference (a loop of pipes cut off by still links has
    no pump to drive it: our networks have no buoyancy).
    """
    n = network.n_links
    closed = np.asarray(network.closed, dtype=bool)
    if not closed.any():
        every = np.arange(n, dtype=np.int64)
        nodes = np.arange(network.n_nodes, dtype=np.int64)
        return MovingPart(network, network, every, nodes, nodes)
    moving = ~closed
    candidates = np.flatnonzero(moving)
    ends = [(int(network.from_node[k]), int(network.to_node[k])) for k in candidates]
    for k in bridges(network.n_nodes, ends):
        moving[candidates[k]] = False
    # the connected part of the remaining links that holds the reference node
    reach = np.zeros(network.n_nodes, dtype=bool)
    reach[network.reference_node] = True
    touching: list[list[int]] = [[] for _ in range(network.n_nodes)]
    for k in np.flatnonzero(moving):
        touching[network.from_node[k]].append(int(k))
        touching[network.to_node[k]].append(int(k))
    queue = deque([network.reference_node])
    while queue:
        node = queue.popleft()
        for k in touching[node]:
            for other in (network.from_node[k], network.to_node[k]):
                if not reach[other]:
                    reach[other] = True
                    queue.append(int(other))
    moving &= reach[network.from_node] & reach[network.to_node]
    links = np.flatnonzero(moving).astype(np.int64)
    _check_pumps(network, moving)
    if links.size == 0:
        raise ScenarioError(
            f"network {network.scheme!r}: every emitter is closed; no water can "
            "circulate"
        )
    nodes = np.flatnonzero(reach & _touched(network, links)).astype(np.int64)
    return MovingPart(
        network,
        _subnetwork(network, links, nodes),
        links,
        nodes,
        _pressure_sources(network, closed, nodes),
    )


def _touched(network: Network, links: np.ndarray) -> np.ndarray:
    touched = np.zeros(network.n_nodes, dtype=bool)
    touched[network.from_node[links]] = True
    touched[network.to_node[links]] = True
    return touched


def _check_pumps(network: Network, moving: np.ndarray) -> None:
    """A pump that stands still has every emitter it serves shut."""
    for k in network.pump_links():
        if not moving[k]:
            raise ScenarioError(
                f"network {network.scheme!r}: pump {network.link_names[k]!r} has "
                "no open circuit to drive: every emitter it serves is closed"
            )


def _pressure_sources(
    network: Network, closed: np.ndarray, nodes: np.ndarray
) -> np.ndarray:
    """For each node, the moving node whose pressure it takes (see the module)."""
    source = np.full(network.n_nodes, -1, dtype=np.int64)
    source[nodes] = np.arange(len(nodes))
    touching: list[list[tuple[int, bool]]] = [[] for _ in range(network.n_nodes)]
    for k in range(network.n_links):
        a, b = int(network.from_node[k]), int(network.to_node[k])
        touching[a].append((b, bool(closed[k])))
        touching[b].append((a, bool(closed[k])))
    for across_closed in (False, True):
        queue = deque(int(i) for i in np.flatnonzero(source >= 0))
        while queue:
            node = queue.popleft()
            for other, shut in touching[node]:
                if source[other] < 0 and (across_closed or not shut):
                    source[other] = source[node]
                    queue.append(other)
    return source
