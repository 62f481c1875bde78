"""Circuits of a layout and the balancing valve on each circuit's return.

A circuit is a part of the layout that shares a manifold, a header or a riser
with others (names in :mod:`simheat.scenario.circuits`). Builders call
:func:`circuit_return` once per circuit, right after building it, with the node
its return water flows into. That records the circuit (its emitters, design
flow and the link that carries its flow alone, when there is one) and, when the
scenario declares a valve for it (``[layout.circuit_valves]``), puts a
balancing valve on its return: a new node takes the circuit's return links and
a valve-only link joins it to ``ret``. Without a declared valve the network is
unchanged.
"""

from __future__ import annotations

from collections.abc import Iterable

from simheat.hydraulics.layouts.builder import Builder
from simheat.hydraulics.layouts.records import Circuit, LinkSpec
from simheat.hydraulics.network import LINK_PIPE
from simheat.resolve.circuits import circuit_valve_kv_m3_h


def circuit_return(
    b: Builder, name: str, ret: int, first_link: int, emitters: Iterable[int]
) -> Circuit:
    """Record a circuit whose return flows into ``ret``; valve it when declared.

    Parameters
    ----------
    b : Builder
        The network under construction. [-]
    name : str
        Circuit name (:mod:`simheat.scenario.circuits`). [-]
    ret : int
        Node the circuit's return water flows into. [-]
    first_link : int
        Index of the circuit's first link: links from here on that end at
        ``ret`` are the circuit's returns. [-]
    emitters : iterable of int
        The emitters the circuit serves. [-]

    Returns
    -------
    Circuit
        The record added to ``b.circuits``: its ``link`` is the valve link when
        a valve was placed, else the one return link that carries the circuit's
        flow alone (None when several links return into ``ret``).
    """
    served = tuple(emitters)
    flow = b.flow(served)
    returns = [k for k in range(first_link, len(b.links)) if b.links[k].b == ret]
    scenario = b.scenario
    kv = circuit_valve_kv_m3_h(
        scenario.layout.circuit_valves, scenario.valve_types, name
    )
    link = returns[0] if len(returns) == 1 else None
    if kv is not None:
        _, line, distance, xy, height = b.nodes[ret]
        inlet = b.node(f"circuit_valve:{name}:in", line, distance, xy, height)
        for k in returns:
            b.links[k].b = inlet
        link = b.add(
            LinkSpec(
                f"circuit_valve:{name}",
                inlet,
                ret,
                LINK_PIPE,
                "circuit_valve",
                kv=kv,
                design_flow_kg_s=flow,
                sized=False,
            )
        )
    record = Circuit(name, link, served, flow, kv is not None)
    b.circuits.append(record)
    return record
