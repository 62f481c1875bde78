"""Closed-form balance: every pressure drop at design flow, index circuits, valves.

With every link at its design flow (the emitters at their targets, the other
links as the layout's mass balance gives them) every pipe's pressure drop is
known. The pressure differences then follow as bounds on a graph
(:mod:`~simheat.analysis.balance.graph`): a link without an adjustable valve
fixes the difference across it, an adjustable valve may take its fully open
drop or more, a pump gives at most its rise.

1. Valves that would have to open beyond fully open for the design flows to
   hold (a one-pipe emitter whose bypass takes less than the emitter needs)
   show up as cycles of positive weight; each such valve is noted with its
   shortfall and counted fully open.
2. Each pump's need is the longest path from its outlet back to its inlet with
   every valve fully open: its index circuit.
3. With the pumps set (:mod:`~simheat.analysis.balance.pumps`), every node takes
   the highest pressure the bounds allow. Each valve's drop is then the
   difference across it less its pipe's drop: the index valve takes its fully
   open drop, every other valve its surplus, and a circuit valve on a return
   takes as much as leaves its own index circuit fully open (circuit valves
   before the emitter valves within them).

A surplus of a pump that no valve in series can take (a one-pipe loop or a
primary loop without a circuit valve) is reported; the flows there then run
above design, which the verification shows.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from simheat.analysis.balance.elements import (
    Element,
    circuit_element,
    emitter_element,
    fixed_drop_Pa,
    pipe_drop_Pa,
    valve_drop_Pa,
)
from simheat.analysis.balance.graph import Edges, PositiveCycle, longest_paths
from simheat.analysis.balance.pumps import PumpSetting, choose_setting
from simheat.errors import BalanceError, ScenarioError
from simheat.hydraulics.layouts import PLANT_PUMP_LINK, BuiltLayout, floor_pump_link
from simheat.resolve import ResolvedPump, ResolvedScenario
from simheat.scenario.model import Scenario
from simheat.scenario.settings import PLANT_PUMP, PRIMARY_PUMP
from simheat.schemes import FLOOR_PUMPS_SUFFIX

# Design flows must balance at every node to this fraction of the largest flow
# (round-off of the builders' sums). [-]
MASS_BALANCE_RTOL = 1e-9
# A pump shortfall below this is round-off, not a finding. [Pa]
PRESSURE_TOL_PA = 1e-3
# A pump surplus no valve takes is reported from this size on: a tenth of a kPa,
# below what a commissioning gauge reads (rounding a speed up to 0.001 leaves a
# few pascals). [Pa]
UNABSORBED_REPORT_PA = 100.0


@dataclass
class Adjustable:
    """A link with an adjustable valve at its design flow.

    Attributes
    ----------
    link : int
        Link index. [-]
    element : Element or None
        What can be set; None for a circuit without a declared valve whose
        design flows need one (a valve that is not there, counted so that the
        rest can be set; the verification shows what its absence does). [-]
    emitter : int or None
        Emitter index, None for a circuit valve. [-]
    circuit : str or None
        Circuit name of a circuit valve. [-]
    mass_flow_kg_s : float
        Design flow, > 0 from the link's from_node. [kg/s]
    pipe_Pa : float
        Drop of the link's pipe and local losses at that flow. [Pa]
    open_valve_Pa : float
        Drop of its valves with the element fully open. [Pa]
    shortfall_Pa : float
        How much more than fully open the valve would have to give (step 1). [Pa]
    valve_Pa : float
        Drop its valves must take (step 3). [Pa]
    """

    link: int
    element: Element | None
    emitter: int | None
    circuit: str | None
    mass_flow_kg_s: float
    pipe_Pa: float
    open_valve_Pa: float
    shortfall_Pa: float = 0.0
    valve_Pa: float = float("nan")


@dataclass(frozen=True)
class PumpNeed:
    """One pump: its table, design flow, need, index circuit and setting.

    Attributes
    ----------
    link : int
        Pump link index. [-]
    table : str or int
        ``"pump"``, ``"primary"`` or the floor number of its scenario table. [-]
    pump : ResolvedPump
        The pump as the scenario sets it. [-]
    mass_flow_kg_s : float
        Design flow. [kg/s]
    need_Pa : float
        Rise its index circuit needs at the design flow. [Pa]
    index_emitter : int or None
        Emitter of its index circuit (None for a primary pump). [-]
    setting : PumpSetting
        The chosen setting and its rise at the design flow. [-]
    unabsorbed_Pa : float
        Part of the rise no valve in series takes. [Pa]
    """

    link: int
    table: str | int
    pump: ResolvedPump
    mass_flow_kg_s: float
    need_Pa: float
    index_emitter: int | None
    setting: PumpSetting
    unabsorbed_Pa: float = 0.0


@dataclass
class Design:
    """The closed-form balance of one scheme at one water temperature.

    Attributes
    ----------
    temp_C : float
        Water temperature of every drop. [°C]
    adjustables : list of Adjustable
        Emitter valves (scenario order), then circuit valves. [-]
    pumps : list of PumpNeed
        Every pump, in link order. [-]
    must_lose_Pa : dict of str to float or None
        Per circuit without a valve: the drop a valve on it could take with its
        index circuit fully open; None when no single pipe carries its flow.
        [Pa]
    pressure_Pa : ndarray
        Node pressures at design flow. [Pa]
    """

    temp_C: float
    adjustables: list[Adjustable]
    pumps: list[PumpNeed]
    must_lose_Pa: dict = field(default_factory=dict)
    pressure_Pa: np.ndarray | None = None


def _check_mass_balance(built: BuiltLayout, flows: np.ndarray) -> None:
    net = built.network
    out = np.bincount(net.from_node, weights=flows, minlength=net.n_nodes)
    out -= np.bincount(net.to_node, weights=flows, minlength=net.n_nodes)
    worst = int(np.argmax(np.abs(out)))
    if abs(out[worst]) > MASS_BALANCE_RTOL * float(np.max(np.abs(flows))):
        raise BalanceError(
            f"design flows of scheme {net.scheme!r} do not balance at node "
            f"{net.node_names[worst]!r} ({out[worst] * 3600:.3g} kg/h): cannot "
            "balance this layout in closed form"
        )


def _pump_table(scheme: str, name: str, floors: list[int]) -> str | int:
    if name == PLANT_PUMP_LINK:
        return PRIMARY_PUMP if scheme.endswith(FLOOR_PUMPS_SUFFIX) else PLANT_PUMP
    return next(f for f in floors if floor_pump_link(f) == name)


def _resolved_pump(resolved: ResolvedScenario, table: str | int) -> ResolvedPump:
    if table == PLANT_PUMP:
        return resolved.pump
    if table == PRIMARY_PUMP:
        return resolved.plant_pump()
    return resolved.floor_pump(table)


def adjustables(
    scenario: Scenario, resolved: ResolvedScenario, built: BuiltLayout, temp_C: float
) -> list[Adjustable]:
    """Every adjustable valve of a built layout at its design flow.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    resolved : ResolvedScenario
        Its derived quantities. [-]
    built : BuiltLayout
        The scheme, with design flows per link. [-]
    temp_C : float
        Water temperature. [°C]

    Returns
    -------
    list of Adjustable
        Each emitter's element (scenario order), then each circuit valve.
    """
    net = built.network
    flows = built.design_flow_kg_s
    found = []
    emitter_links = net.emitter_links()
    shut = np.flatnonzero(net.closed[emitter_links])
    if shut.size:
        i = int(shut[0])
        raise ScenarioError(
            f"emitters[{i}].closed: emitter {scenario.emitters[i].id!r} is shut for "
            "good; balance finds presets for open emitters only: balance the house "
            "without it (take it out of the scenario), then shut it"
        )
    items = [
        (int(link), emitter_element(scenario, resolved, i), i, None)
        for i, link in enumerate(emitter_links)
    ]
    items += [
        (c.link, circuit_element(scenario, c.name), None, c.name)
        for c in built.circuits
        if c.has_valve
    ]
    for link, element, emitter, circuit in items:
        m = float(flows[link])
        if not m > 0.0:
            what = net.link_names[link]
            raise BalanceError(f"{what}: a design flow of {m:g} kg/s cannot be set")
        found.append(
            Adjustable(
                link,
                element,
                emitter,
                circuit,
                m,
                pipe_drop_Pa(net, link, m, temp_C),
                valve_drop_Pa(m, element.link_kv_m3_h(element.max_kv_m3_h), temp_C),
            )
        )
    return found


def _edges(built, flows, adjusted, temp_C, one_way=(), pumps=()) -> Edges:
    """Bounds of every link: equalities, adjustable valves one way, pumps."""
    net = built.network
    by_link = {a.link: a for a in adjusted}
    pump_links = set(int(k) for k in net.pump_links())
    src, dst, weight, link = [], [], [], []
    for k in range(net.n_links):
        if k in pump_links:
            continue
        a, b = int(net.from_node[k]), int(net.to_node[k])
        if k in by_link:
            adj = by_link[k]
            src.append(a)
            dst.append(b)
            weight.append(adj.pipe_Pa + adj.open_valve_Pa - adj.shortfall_Pa)
            link.append(k)
            continue
        d = fixed_drop_Pa(net, k, float(flows[k]), temp_C)
        if k in one_way:
            a, b, d = (a, b, d) if flows[k] >= 0.0 else (b, a, -d)
            src.append(a)
            dst.append(b)
            weight.append(d)
            link.append(k)
            continue
        src += [a, b]
        dst += [b, a]
        weight += [d, -d]
        link += [k, k]
    for k, rise in pumps:
        src.append(int(net.from_node[k]))
        dst.append(int(net.to_node[k]))
        weight.append(-rise)
        link.append(k)
    return Edges(
        np.array(src, dtype=np.int64),
        np.array(dst, dtype=np.int64),
        np.array(weight, dtype=float),
        np.array(link, dtype=np.int64),
    )


def _relax_impossible_valves(built, flows, adjusted, temp_C) -> None:
    """Step 1: count valves fully open where the bounds contradict each other.

    A contradiction around a loop without an adjustable valve (parallel one-pipe
    loops without circuit valves) takes a missing valve on a circuit of that
    loop (:class:`Adjustable` with no element).
    """
    net = built.network
    circuits = {c.link: c for c in built.circuits if c.link is not None}
    for _ in range(len(adjusted) + len(circuits) + 1):
        by_link = {a.link: a for a in adjusted}
        edges = _edges(built, flows, adjusted, temp_C)
        try:
            longest_paths(net.n_nodes, edges, None)
            return
        except PositiveCycle as cycle:
            on_cycle = [int(edges.link[e]) for e in cycle.edges]
            valves = [by_link[k] for k in on_cycle if k in by_link]
            if valves:
                valves[0].shortfall_Pa += cycle.weight_Pa * (1.0 + 1e-9)
                continue
            # a circuit link the cycle runs against its flow: a valve there
            # (a one-way bound) breaks the contradiction
            against = [
                k
                for k, e in zip(on_cycle, cycle.edges, strict=True)
                if k in circuits and edges.src[e] == net.to_node[k]
            ]
            if not against:
                raise BalanceError(
                    f"the design flows of scheme {net.scheme!r} contradict the "
                    "pressure drops around a loop with no valve to set"
                ) from None
            k = against[0]
            m = float(flows[k])
            adjusted.append(
                Adjustable(
                    k,
                    None,
                    None,
                    circuits[k].name,
                    m,
                    fixed_drop_Pa(net, k, m, temp_C),
                    0.0,
                )
            )
    raise BalanceError("could not resolve the valves that cannot open far enough")


def _downstream(built, flows, outlet) -> set[int]:
    """Nodes the design flow carries water to from a pump's outlet (no pumps)."""
    net = built.network
    pumps = set(int(k) for k in net.pump_links())
    nxt: list[list[int]] = [[] for _ in range(net.n_nodes)]
    for k in range(net.n_links):
        if k in pumps:
            continue
        a, b = int(net.from_node[k]), int(net.to_node[k])
        if flows[k] >= 0.0:
            nxt[a].append(b)
        if flows[k] <= 0.0:
            nxt[b].append(a)
    seen, stack = {outlet}, [outlet]
    while stack:
        for n in nxt[stack.pop()]:
            if n not in seen:
                seen.add(n)
                stack.append(n)
    return seen


def _index_emitter(built, flows, edges, adjusted, outlet, inlet) -> int | None:
    """The emitter a pump serves whose circuit needs the most, valves open."""
    net = built.network
    out = longest_paths(net.n_nodes, edges, outlet)
    back = longest_paths(net.n_nodes, edges, inlet, reverse=True)
    served = _downstream(built, flows, outlet)
    best, best_need, best_far = None, -np.inf, -np.inf
    for a in adjusted:
        if a.emitter is None or int(net.from_node[a.link]) not in served:
            continue
        s, r = int(net.from_node[a.link]), int(net.to_node[a.link])
        need = out[s] + a.pipe_Pa + a.open_valve_Pa - a.shortfall_Pa + back[r]
        if not np.isfinite(need):
            continue
        far = float(net.node_distance_m[s])
        if need > best_need * (1 + 1e-9) + 1e-9 or (
            need >= best_need * (1 - 1e-9) and far > best_far
        ):
            best, best_need, best_far = a.emitter, need, far
    return best


def closed_form_design(
    scenario: Scenario,
    resolved: ResolvedScenario,
    built: BuiltLayout,
    temp_C: float,
    keep_pump: bool = False,
) -> Design:
    """Pump settings and the drop every adjustable valve must take.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    resolved : ResolvedScenario
        Its derived quantities. [-]
    built : BuiltLayout
        The scheme with its design flows (emitter links at their targets). [-]
    temp_C : float
        Water temperature of every drop. [°C]
    keep_pump : bool
        Keep each pump's scenario setting instead of the lowest that serves its
        index circuit. [-]

    Returns
    -------
    Design
        Valve drops, pump needs and settings, circuit surpluses.

    Raises
    ------
    BalanceError
        When the design flows do not balance, contradict a loop without a
        valve, or a pump (kept, at its largest step or at full speed) gives
        less than its index circuit needs; the message names the pump, the
        index emitter and the shortfall in kPa.
    """
    net = built.network
    flows = built.design_flow_kg_s
    _check_mass_balance(built, flows)
    adjusted = adjustables(scenario, resolved, built, temp_C)
    _relax_impossible_valves(built, flows, adjusted, temp_C)
    base = _edges(built, flows, adjusted, temp_C)
    floors = [f.floor for f in scenario.route.floors]
    pumps = []
    for k in (int(x) for x in net.pump_links()):
        inlet, outlet = int(net.from_node[k]), int(net.to_node[k])
        need = longest_paths(net.n_nodes, base, outlet)[inlet]
        if not np.isfinite(need):
            raise BalanceError(f"pump {net.link_names[k]!r} drives no closed circuit")
        table = _pump_table(net.scheme, net.link_names[k], floors)
        pump = _resolved_pump(resolved, table)
        m = float(flows[k])
        setting, short = choose_setting(pump, need, m, temp_C, keep_pump)
        index = _index_emitter(built, flows, base, adjusted, outlet, inlet)
        if short > PRESSURE_TOL_PA + 1e-9 * need:
            circuit = (
                f"the index circuit (emitter {scenario.emitters[index].id!r})"
                if index is not None
                else "its circuit"
            )
            how = "as set" if keep_pump else "at its highest setting"
            raise BalanceError(
                f"pump {net.link_names[k]!r} ({pump.where}) gives "
                f"{setting.rise_Pa / 1e3:.2f} kPa {how} at the design flow "
                f"{m * 3600:.0f} kg/h; {circuit} needs {need / 1e3:.2f} kPa: "
                f"{short / 1e3:.2f} kPa short"
            )
        pumps.append(PumpNeed(k, table, pump, m, float(need), index, setting))
    design = Design(temp_C, adjusted, pumps)
    pressure = _pressures(built, flows, adjusted, temp_C, pumps)
    design.pressure_Pa = pressure
    for a in adjusted:
        s, r = int(net.from_node[a.link]), int(net.to_node[a.link])
        a.valve_Pa = float(pressure[s] - pressure[r] - a.pipe_Pa)
    for i, p in enumerate(pumps):
        given = pressure[net.to_node[p.link]] - pressure[net.from_node[p.link]]
        surplus = p.setting.rise_Pa - float(given)
        if surplus > UNABSORBED_REPORT_PA:
            pumps[i] = PumpNeed(**{**p.__dict__, "unabsorbed_Pa": surplus})
    design.must_lose_Pa = _circuit_surpluses(built, flows, adjusted, temp_C, pumps)
    return design


def _pressures(built, flows, adjusted, temp_C, pumps, one_way=()) -> np.ndarray:
    """Step 3: the highest node pressures the bounds allow. [Pa]."""
    net = built.network
    edges = _edges(
        built,
        flows,
        adjusted,
        temp_C,
        one_way=one_way,
        pumps=[(p.link, p.setting.rise_Pa) for p in pumps],
    )
    dist = longest_paths(net.n_nodes, edges, net.reference_node)
    if not np.all(np.isfinite(dist)):
        lost = net.node_names[int(np.flatnonzero(~np.isfinite(dist))[0])]
        raise BalanceError(f"node {lost!r} is reached by no pump at design flow")
    return -dist


def _circuit_surpluses(built, flows, adjusted, temp_C, pumps) -> dict:
    """Per circuit without a valve: the drop a valve on its return could take."""
    net = built.network
    by_link = {a.link: a for a in adjusted}
    surplus: dict[str, float | None] = {}
    for c in built.circuits:
        if c.has_valve:
            continue
        if c.link is None:
            surplus[c.name] = None
        elif c.link in by_link:
            a = by_link[c.link]
            surplus[c.name] = a.valve_Pa - a.open_valve_Pa - a.shortfall_Pa
        else:
            pressure = _pressures(
                built, flows, adjusted, temp_C, pumps, one_way=(c.link,)
            )
            a, b = int(net.from_node[c.link]), int(net.to_node[c.link])
            m = float(flows[c.link])
            drop = fixed_drop_Pa(net, c.link, m, temp_C)
            surplus[c.name] = float(pressure[a] - pressure[b] - drop) * np.sign(m)
    return surplus
