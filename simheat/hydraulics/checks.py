"""Checks of a network before the flow solver takes it: shapes, values, topology.

A closed heating network is solvable when it is connected, every link has a
flow resistance and lies on a closed loop, and every pump curve falls with
flow. These checks run once per network (:class:`~simheat.hydraulics.solver.
FlowSolver` calls :func:`validate_network`) and name the node or link at
fault.
"""

from __future__ import annotations

import numpy as np
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components

from simheat.errors import ScenarioError
from simheat.hydraulics.network import PUMP_MODE_NAMES, Network
from simheat.hydraulics.still import bridges
from simheat.physics._kernels import PUMP_MODE_FIXED_SPEED

__all__ = ["validate_network"]


def check_link_arrays(network: Network) -> None:
    """Every per-link array of a network must have one entry per link.

    Parameters
    ----------
    network : Network
        The network. [-]

    Raises
    ------
    ScenarioError
        Naming the first array of the wrong shape.
    """
    n_links = network.n_links
    for field in (
        "from_node",
        "to_node",
        "length_m",
        "inner_diameter_m",
        "roughness_m",
        "zeta",
        "kv_m3_h",
        "check_valve",
        "pump_mode",
        "pump_setpoint_Pa",
        "closed",
    ):
        if np.shape(getattr(network, field)) != (n_links,):
            raise ScenarioError(
                f"network.{field} must have one entry per link ({n_links}), "
                f"got shape {np.shape(getattr(network, field))}"
            )
    if np.shape(network.pump_coeffs) != (n_links, 3):
        raise ScenarioError(
            f"network.pump_coeffs must have shape ({n_links}, 3), "
            f"got {np.shape(network.pump_coeffs)}"
        )


def _validate_pumps(network: Network) -> None:
    """Pump curves must fall with flow; regulated pumps need a reachable set head."""
    names = network.link_names
    coeffs = np.asarray(network.pump_coeffs, dtype=np.float64)
    if not np.all(np.isfinite(coeffs)):
        k = int(np.flatnonzero(~np.all(np.isfinite(coeffs), axis=1))[0])
        raise ScenarioError(f"pump curve of link {names[k]!r} is not finite")
    modes = np.asarray(network.pump_mode)
    setpoints = np.asarray(network.pump_setpoint_Pa, dtype=np.float64)
    for k in range(network.n_links):
        a0, a1, a2 = coeffs[k]
        mode = int(modes[k])
        if mode not in PUMP_MODE_NAMES:
            raise ScenarioError(
                f"pump_mode of link {names[k]!r} must be one of "
                f"{sorted(PUMP_MODE_NAMES)} ({', '.join(PUMP_MODE_NAMES.values())}), "
                f"got {mode}"
            )
        if not (a0 != 0.0 or a1 != 0.0 or a2 != 0.0):
            if mode != PUMP_MODE_FIXED_SPEED:
                raise ScenarioError(
                    f"link {names[k]!r} has pump_mode {PUMP_MODE_NAMES[mode]!r} "
                    "but no pump curve"
                )
            continue
        if a0 < 0.0:
            raise ScenarioError(
                f"pump curve of link {names[k]!r} has a negative shut-off head "
                f"({a0 / 1e3:g} kPa)"
            )
        if not (a2 < 0.0 or (a2 == 0.0 and a1 < 0.0)):
            raise ScenarioError(
                f"pump curve of link {names[k]!r} does not fall with flow "
                f"(a1 = {a1:g} Pa s/m3, a2 = {a2:g} Pa s2/m6): its head must drop "
                "as the flow rises"
            )
        if mode != PUMP_MODE_FIXED_SPEED:
            setpoint = float(setpoints[k])
            if not (np.isfinite(setpoint) and 0.0 < setpoint < a0):
                raise ScenarioError(
                    f"pump_setpoint_Pa of link {names[k]!r} "
                    f"({PUMP_MODE_NAMES[mode]}) must lie between 0 and the pump's "
                    f"shut-off head {a0 / 1e3:g} kPa, got {setpoint / 1e3:g} kPa"
                )


def _dead_end_links(network: Network) -> list[int]:
    """Links on no closed loop (bridges of the multigraph, :func:`bridges`).

    A bridge carries no flow in any steady state: every unit of water that
    crossed it would have to come back the same way.
    """
    ends = [
        (int(f), int(t))
        for f, t in zip(network.from_node, network.to_node, strict=True)
    ]
    return bridges(network.n_nodes, ends)


def validate_network(network: Network) -> None:
    """Refuse a network the flow solver cannot solve, naming the part at fault.

    Parameters
    ----------
    network : Network
        The closed network. [-]

    Raises
    ------
    ScenarioError
        When the network is not connected, has a link on no closed loop (a dead
        end), a link joining a node to itself, a link without flow resistance, a
        pipe without a positive diameter, a negative length, roughness, zeta or
        Kv, a pump curve that does not fall with flow, or a regulated pump whose
        set head its curve cannot deliver; or when its arrays have the wrong
        shapes.
    """
    n_nodes, n_links = network.n_nodes, network.n_links
    names, nodes = network.link_names, network.node_names
    if n_nodes < 2 or n_links < 1:
        raise ScenarioError(
            f"network {network.scheme!r} needs at least 2 nodes and 1 link, "
            f"got {n_nodes} nodes and {n_links} links"
        )
    if not 0 <= network.reference_node < n_nodes:
        raise ScenarioError(
            f"reference_node must be in 0..{n_nodes - 1}, got {network.reference_node}"
        )
    check_link_arrays(network)
    for k in range(n_links):
        f, t = int(network.from_node[k]), int(network.to_node[k])
        if not (0 <= f < n_nodes and 0 <= t < n_nodes):
            raise ScenarioError(
                f"link {names[k]!r} joins nodes {f} and {t}; nodes are 0..{n_nodes - 1}"
            )
        if f == t:
            raise ScenarioError(f"link {names[k]!r} joins node {nodes[f]!r} to itself")
    for field, unit in (
        ("length_m", "m"),
        ("roughness_m", "m"),
        ("zeta", "-"),
        ("kv_m3_h", "m3/h"),
    ):
        values = np.asarray(getattr(network, field), dtype=np.float64)
        bad = ~(np.isfinite(values) & (values >= 0.0))
        if np.any(bad):
            k = int(np.flatnonzero(bad)[0])
            raise ScenarioError(
                f"{field} of link {names[k]!r} must be >= 0 [{unit}], got {values[k]!r}"
            )
    _validate_pumps(network)
    for k in range(n_links):
        length, zeta = network.length_m[k], network.zeta[k]
        d = network.inner_diameter_m[k]
        if (length > 0.0 or zeta > 0.0) and not (np.isfinite(d) and d > 0.0):
            raise ScenarioError(
                f"inner_diameter_m of link {names[k]!r} must be > 0 [m] where the "
                f"link has a pipe or local losses, got {d!r}"
            )
        a2 = network.pump_coeffs[k, 2]
        has_pipe_or_valve = length > 0.0 or zeta > 0.0 or network.kv_m3_h[k] > 0.0
        if not has_pipe_or_valve and not (a2 < 0.0):
            raise ScenarioError(
                f"link {names[k]!r} has no flow resistance (length 0, zeta 0, no valve"
                + (
                    ", pump curve without a falling a2 term"
                    if np.any(network.pump_coeffs[k] != 0.0)
                    else ", no pump"
                )
                + "): give it a pipe length, a zeta or a valve Kv"
            )
    graph = coo_matrix(
        (np.ones(n_links), (network.from_node, network.to_node)),
        shape=(n_nodes, n_nodes),
    )
    n_parts, label = connected_components(graph, directed=False)
    if n_parts > 1:
        cut_off = [
            nodes[n]
            for n in range(n_nodes)
            if label[n] != label[network.reference_node]
        ]
        shown = ", ".join(repr(x) for x in cut_off[:5])
        more = f" and {len(cut_off) - 5} more" if len(cut_off) > 5 else ""
        raise ScenarioError(
            f"network {network.scheme!r} is not connected: node(s) {shown}{more} "
            f"cannot be reached from the reference node "
            f"{nodes[network.reference_node]!r}"
        )
    dead = _dead_end_links(network)
    if dead:
        shown = ", ".join(repr(names[k]) for k in dead[:5])
        more = f" and {len(dead) - 5} more" if len(dead) > 5 else ""
        raise ScenarioError(
            f"network {network.scheme!r} has link(s) {shown}{more} on no closed "
            "loop: water that goes through cannot come back another way, so no "
            "flow can circulate there; close the loop or remove the branch"
        )
