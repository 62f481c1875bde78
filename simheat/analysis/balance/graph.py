"""Longest paths over pressure-difference bounds (Bellman-Ford), and their cycles.

An edge ``a -> b`` of weight ``w`` states ``p_a - p_b >= w``. A link with a known
pressure drop ``d`` at its design flow gives two edges (``d`` one way, ``-d`` the
other: an equality); a link with an adjustable valve only its forward edge (the
valve may take more than its fully open drop, never less); a pump at rise ``H``
the edge ``inlet -> outlet`` of weight ``-H`` (it gives at most ``H``). The
longest path from a node ``s`` to a node ``n`` is then the least ``p_s - p_n``
every bound allows. A cycle of positive weight means the bounds contradict each
other (a valve that would have to open beyond fully open).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

# Relaxation threshold, relative to the largest edge weight: well above the
# round-off of summing a few hundred pressure drops, far below any pressure a
# valve or a pump setting cares about. [-]
RELAX_RTOL = 1e-9


@dataclass(frozen=True)
class Edges:
    """Edges of pressure-difference bounds: ``p[src] - p[dst] >= weight``.

    Attributes
    ----------
    src, dst : ndarray of int64
        Tail and head node of each edge. [-]
    weight : ndarray
        Lower bound of the pressure difference. [Pa]
    link : ndarray of int64
        Link each edge comes from (-1 for none). [-]
    """

    src: np.ndarray
    dst: np.ndarray
    weight: np.ndarray
    link: np.ndarray


class PositiveCycle(Exception):
    """The bounds contradict each other around a cycle of edges.

    Parameters
    ----------
    edges : list of int
        Indices of the cycle's edges, in order. [-]
    weight_Pa : float
        Sum of their weights, > 0. [Pa]
    """

    def __init__(self, edges: list[int], weight_Pa: float) -> None:
        super().__init__(f"positive cycle of {weight_Pa:.6g} Pa")
        self.edges = edges
        self.weight_Pa = weight_Pa


def longest_paths(
    n_nodes: int, edges: Edges, start: int | None, *, reverse: bool = False
) -> np.ndarray:
    """Longest path weight from ``start`` to every node (to it when ``reverse``).

    Parameters
    ----------
    n_nodes : int
        Number of nodes. [-]
    edges : Edges
        The bounds. [Pa]
    start : int or None
        Start node; None starts from every node at once (weight 0), which finds
        cycles anywhere. [-]
    reverse : bool
        Follow the edges backwards: the longest path from every node to
        ``start``. [-]

    Returns
    -------
    ndarray
        Longest path weight per node, ``-inf`` where no path leads. [Pa]

    Raises
    ------
    PositiveCycle
        When a cycle of positive weight is reachable.

    Notes
    -----
    Bellman-Ford label correcting [1]_ with the sign turned round (longest
    instead of shortest paths), one vectorised sweep over every edge per round;
    at most ``n_nodes`` rounds, a further improvement means a positive cycle,
    found by walking the predecessor edges.

    References
    ----------
    .. [1] R. Bellman, "On a routing problem", Quart. Appl. Math. 16, 1958,
       pp. 87-90.
    """
    src, dst = (edges.dst, edges.src) if reverse else (edges.src, edges.dst)
    w = edges.weight
    tol = RELAX_RTOL * (1.0 + float(np.max(np.abs(w), initial=0.0)))
    dist = np.zeros(n_nodes) if start is None else np.full(n_nodes, -np.inf)
    if start is not None:
        dist[start] = 0.0
    pred = np.full(n_nodes, -1, dtype=np.int64)
    for _ in range(n_nodes + 1):
        cand = dist[src] + w
        improve = np.isfinite(cand) & (cand > dist[dst] + tol)
        if not np.any(improve):
            return dist
        new = dist.copy()
        np.maximum.at(new, dst[improve], cand[improve])
        winners = np.flatnonzero(improve & (cand == new[dst]))
        pred[dst[winners]] = winners
        dist = new
    raise _cycle(pred, src, dst, w, int(dst[winners[0]]), n_nodes)


def _cycle(pred, src, dst, w, node, n_nodes) -> PositiveCycle:
    """The cycle the predecessor edges lead into from ``node``."""
    for _ in range(n_nodes):
        node = int(src[pred[node]])
    cycle, start = [], node
    while True:
        e = int(pred[node])
        cycle.append(e)
        node = int(src[e])
        if node == start or len(cycle) > n_nodes:
            break
    cycle.reverse()
    return PositiveCycle(cycle, float(np.sum(w[cycle])))
