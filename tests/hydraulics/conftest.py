"""Hand-built networks and the mass-balance check shared by the solver tests."""

from __future__ import annotations

from types import SimpleNamespace

import numpy as np
import pytest

from simheat.hydraulics.network import LINK_EMITTER, LINK_PIPE, LINK_PUMP, Network

# Pump curve used by most tests: 30 kPa shut-off head, zero rise at 2 m3/h
# (1/1800 m3/s), an invented but typical small circulator size. [Pa], [Pa s2/m6]
PUMP_A0_PA = 30e3
PUMP_A2_PA_S2_M6 = -PUMP_A0_PA / (1.0 / 1800.0) ** 2
COPPER_ROUGHNESS_M = 1.5e-6  # drawn copper tube, common trade value (from memory)


def make_network(links, n_nodes, reference_node=0, node_names=None):
    """Network from a list of link dicts; unused parts default to zero.

    Keys: ``f``, ``t`` (end nodes), ``name``, ``kind``, ``L`` [m], ``d`` [m],
    ``eps`` [m], ``zeta`` [-], ``kv`` [m3/h], ``pump`` (a0, a1, a2), ``check``
    (a check valve), ``mode`` (pump mode) and ``setpoint`` [Pa].
    """
    n_links = len(links)

    def column(key, default=0.0):
        return np.array([link.get(key, default) for link in links], dtype=np.float64)

    return Network(
        scheme="hand_built",
        node_names=tuple(node_names or (f"node_{i}" for i in range(n_nodes))),
        node_line=np.zeros(n_nodes, dtype=np.int8),
        node_distance_m=np.zeros(n_nodes),
        reference_node=reference_node,
        link_names=tuple(link.get("name", f"link_{i}") for i, link in enumerate(links)),
        link_kind=np.array([link.get("kind", LINK_PIPE) for link in links], np.int8),
        from_node=np.array([link["f"] for link in links], dtype=np.int64),
        to_node=np.array([link["t"] for link in links], dtype=np.int64),
        length_m=column("L"),
        inner_diameter_m=column("d"),
        roughness_m=column("eps"),
        zeta=column("zeta"),
        kv_m3_h=column("kv"),
        pump_coeffs=np.array(
            [link.get("pump", (0.0, 0.0, 0.0)) for link in links], dtype=np.float64
        ),
        emitter_index=np.full(n_links, -1, dtype=np.int64),
        emitter_ids=(),
        water_volume_m3=np.zeros(n_links),
        loss_W_per_m_K=np.zeros(n_links),
        surroundings_room=np.full(n_links, -1, dtype=np.int64),
        check_valve=np.array([bool(link.get("check", False)) for link in links]),
        pump_mode=np.array([link.get("mode", 0) for link in links], dtype=np.int8),
        pump_setpoint_Pa=column("setpoint"),
    )


def pump_link(f, t, **extra):
    """A pump with a short 26 mm connection pipe."""
    link = dict(
        f=f,
        t=t,
        name="pump",
        kind=LINK_PUMP,
        pump=(PUMP_A0_PA, 0.0, PUMP_A2_PA_S2_M6),
        L=0.5,
        d=0.026,
        eps=COPPER_ROUGHNESS_M,
    )
    link.update(extra)
    return link


def ladder_network(
    n_emitters,
    *,
    reverse_return=False,
    header_length_m=3.0,
    header_diameter_m=0.020,
    emitter_kv=(0.8,),
    emitter_length_m=6.0,
    emitter_diameter_m=0.012,
    emitter_zeta=4.0,
    cross_links=(),
):
    """Two-pipe ladder: pump, supply header, emitters, return header.

    Nodes: ``s0`` (pump outlet), ``s1..sN`` on the supply, ``r1..rN`` on the
    return and ``r0`` (pump inlet, the reference). Direct return runs the
    return header from ``rN`` back to ``r0`` beside the supply; reverse return
    collects from ``r1`` to ``rN`` and returns from ``rN`` to ``r0``.
    ``emitter_kv`` is cycled over the emitters. ``cross_links`` adds pipes
    between supply nodes ``(i, j)`` to make extra loops.
    """
    n = n_emitters
    names = ["s0", *(f"s{i}" for i in range(1, n + 1))]
    names += ["r0", *(f"r{i}" for i in range(1, n + 1))]
    s = list(range(n + 1))
    r = list(range(n + 1, 2 * n + 2))
    header = dict(L=header_length_m, d=header_diameter_m, eps=COPPER_ROUGHNESS_M)
    links = [pump_link(r[0], s[0])]
    for i in range(1, n + 1):
        links.append(dict(f=s[i - 1], t=s[i], name=f"supply_{i}", **header))
    for i in range(1, n + 1):
        links.append(
            dict(
                f=s[i],
                t=r[i],
                name=f"emitter_{i}",
                kind=LINK_EMITTER,
                L=emitter_length_m,
                d=emitter_diameter_m,
                eps=COPPER_ROUGHNESS_M,
                zeta=emitter_zeta,
                kv=emitter_kv[(i - 1) % len(emitter_kv)],
            )
        )
    for i in range(1, n + 1):
        if reverse_return:
            end = r[0] if i == n else r[i + 1]
            links.append(dict(f=r[i], t=end, name=f"return_{i}", **header))
        else:
            links.append(dict(f=r[i], t=r[i - 1], name=f"return_{i}", **header))
    for k, (i, j) in enumerate(cross_links):
        links.append(dict(f=s[i], t=s[j], name=f"cross_{k}", **header))
    return make_network(links, 2 * n + 2, reference_node=r[0], node_names=names)


def assert_mass_balance(network, flows):
    """Every node balances to round-off of summing its flows (1e-12 of the scale).

    Physical guarantee (continuity); the kernel projects its last flows onto the
    node equations, so only floating-point summation error may remain.
    """
    m = np.asarray(flows.mass_flow_kg_s)
    imbalance = np.zeros(network.n_nodes)
    np.add.at(imbalance, network.from_node, m)
    np.subtract.at(imbalance, network.to_node, m)
    scale = max(float(np.max(np.abs(m))), 1e-300)
    assert np.all(np.isfinite(m))
    assert np.max(np.abs(imbalance)) <= 1e-12 * scale
    assert flows.max_imbalance_kg_s <= 1e-12 * scale
    assert flows.pressure_Pa[network.reference_node] == 0.0


@pytest.fixture(scope="session")
def nets():
    """The hand-built network helpers and constants (session scope, so hypothesis
    tests may use them too)."""
    return SimpleNamespace(
        make=make_network,
        pump_link=pump_link,
        ladder=ladder_network,
        assert_mass_balance=assert_mass_balance,
        PUMP_A0_PA=PUMP_A0_PA,
        PUMP_A2_PA_S2_M6=PUMP_A2_PA_S2_M6,
        COPPER_ROUGHNESS_M=COPPER_ROUGHNESS_M,
    )
