"""Balance a scheme: closed-form settings, written into the scenario, re-solved.

:func:`balance_scheme` computes the settings (:mod:`~.design`, :mod:`~.valves`),
writes them into the scenario's text (:mod:`simheat.scenario.settings`), parses
that text and re-solves the scheme's network with the full model at the design
supply temperature, every thermostatic head fully open (opening 1, the room one
band-half below its setpoint). The verified flows are what the result reports,
and the balanced text is exactly what ``--write-scenario`` writes.

Where the network's flows do not follow from the targets alone (loops the
closed form cannot see exactly), continuous presets are refined by re-solves:
each emitter's valve Kv is scaled by ``(target / flow)^(dp_link / dp_valve)``,
the local sensitivity of its flow to its Kv, until every emitter is within
:data:`REFINE_TOLERANCE`.
"""

from __future__ import annotations

import numpy as np

from simheat.analysis.balance.design import closed_form_design
from simheat.analysis.balance.elements import (
    KIND_CIRCUIT,
    SETTING_KEYS,
    valve_drop_Pa,
)
from simheat.analysis.balance.pumps import SETTING_SETPOINT, rise_Pa, scenario_setting
from simheat.analysis.balance.result import (
    CircuitResult,
    PumpResult,
    SchemeBalance,
    ValveResult,
)
from simheat.analysis.balance.valves import (
    ValveSetting,
    kv_at,
    round_setting,
    valve_setting,
)
from simheat.errors import BalanceError
from simheat.hydraulics.layouts import describe
from simheat.hydraulics.solver import FlowSolver, pump_duty_points
from simheat.physics.water import density_kg_m3
from simheat.resolve import resolve
from simheat.scenario import parse_scenario
from simheat.scenario.model import Scenario
from simheat.scenario.settings import (
    PLANT_PUMP,
    PRIMARY_PUMP,
    ScenarioSettings,
    with_settings,
)

# Refinement stops once every emitter is within this of its target (a tenth of
# the rounding a two-decimal preset causes), or after MAX_REFINEMENTS re-solves. [-]
REFINE_TOLERANCE = 1e-3
MAX_REFINEMENTS = 20
# Largest exponent of the refinement step: a valve taking under a tenth of its
# circuit's drop barely moves its flow, and bigger steps would overshoot. [-]
MAX_SENSITIVITY_EXPONENT = 10.0


def _table_name(table) -> str:
    if table == PLANT_PUMP:
        return "pump"
    if table == PRIMARY_PUMP:
        return "layout.primary_pump"
    return f"layout.floor_pumps (floor {table})"


def _settings(scheme, design, valves, note) -> ScenarioSettings:
    emitters, circuits = {}, {}
    for a, v in zip(design.adjustables, valves, strict=True):
        if a.element is None:
            continue
        if a.element.kind == KIND_CIRCUIT:
            circuits[a.circuit] = v.setting
        else:
            emitters[a.emitter] = (SETTING_KEYS[a.element.kind], v.setting)
    pumps = {}
    for p in design.pumps:
        value = p.setting.value
        if p.setting.key == SETTING_SETPOINT:
            value = round(value / 1e3, 6)
        pumps[p.table] = (p.setting.key, value)
    return ScenarioSettings(scheme, emitters, circuits, pumps, note)


def _verify(scenario: Scenario, scheme: str, settings: ScenarioSettings, temp_C):
    text = with_settings(scenario.text, settings)
    balanced = parse_scenario(text, origin=scenario.source_path)
    built = describe(balanced, scheme)
    flows = FlowSolver(built.network).solve(water_temp_C=temp_C)
    return text, balanced, built, flows


def balance_scheme(
    scenario: Scenario,
    scheme: str,
    *,
    keep_pump: bool = False,
    discrete: bool = False,
) -> SchemeBalance:
    """Presets, circuit valves and pump settings that give every emitter its target.

    Parameters
    ----------
    scenario : Scenario
        The house. Targets are the layout's design flows (an emitter's share
        of its room's design load at the design temperature drop, or its
        ``design_flow_kg_per_h``; in a one-pipe loop its share of the loop
        flow). [-]
    scheme : str
        Piping scheme. [-]
    keep_pump : bool
        Keep every pump as the scenario sets it; its surplus goes into the
        valves. [-]
    discrete : bool
        Round presets and turns to their tables' steps. [-]

    Returns
    -------
    SchemeBalance
        Settings, circuit valves, pump settings, and every emitter's flow as
        the re-solve of the balanced scenario gives it.

    Raises
    ------
    BalanceError
        When a pump cannot give its index circuit's need at the design flow
        (names the shortfall in kPa), the design flows contradict the network,
        or continuous presets fail the verification (an emitter off target by
        more than 5 % with no limit to explain it).
    ScenarioError
        For a valve table whose Kv does not rise with its setting.
    """
    resolved = resolve(scenario)
    temp_C = scenario.design.supply_temp_C
    built0 = describe(scenario, scheme)
    targets = built0.emitter_design_flow_kg_s
    design = closed_form_design(scenario, resolved, built0, temp_C, keep_pump)
    note = (
        f"balanced for {scheme} by simheat balance"
        + (" (presets on table steps)" if discrete else "")
        + (", pumps as given" if keep_pump else "")
    )

    def settings_for(rounded: bool) -> list[ValveSetting | None]:
        return [
            None
            if a.element is None
            else valve_setting(
                a.element,
                a.mass_flow_kg_s,
                a.valve_Pa,
                temp_C,
                discrete=discrete,
                rounded=rounded,
            )
            for a in design.adjustables
        ]

    valves = settings_for(rounded=False)
    refinements = 0
    if not discrete:
        for _ in range(MAX_REFINEMENTS):
            _, _, built, flows = _verify(
                scenario, scheme, _settings(scheme, design, valves, note), temp_C
            )
            ratio = flows.mass_flow_kg_s[built.network.emitter_links()] / targets
            if np.max(np.abs(ratio - 1.0)) <= REFINE_TOLERANCE:
                break
            valves = _refined(design, valves, built, flows, targets, temp_C)
            refinements += 1
        valves = [
            None if v is None or a.element is None else _rounded(a.element, v)
            for a, v in zip(design.adjustables, valves, strict=True)
        ]
    settings = _settings(scheme, design, valves, note)
    text, balanced, built, flows = _verify(scenario, scheme, settings, temp_C)
    result = _result(
        scenario, scheme, design, valves, built0, built, flows, targets, temp_C
    )
    result = SchemeBalance(
        scheme=scheme,
        water_temp_C=temp_C,
        discrete=discrete,
        keep_pump=keep_pump,
        refinements=refinements,
        settings=settings,
        text=text,
        balanced=balanced,
        **result,
    )
    if not discrete and not result.within_tolerance and not result.explained:
        w = result.worst
        raise BalanceError(
            f"verification failed for {scheme}: emitter {w.emitter!r} gets "
            f"{100 * w.verified_kg_s / w.target_kg_s:.1f} % of its target flow "
            "with the computed presets"
        )
    return result


def _rounded(element, v: ValveSetting) -> ValveSetting:
    if v.limit is not None:
        return v
    setting = round_setting(element, v.setting)
    return ValveSetting(setting, kv_at(element, setting), v.required_kv_m3_h)


def _refined(design, valves, built, flows, targets, temp_C):
    """Scale each emitter valve's Kv by its flow's shortfall (see module notes)."""
    net = built.network
    links = net.emitter_links()
    new = list(valves)
    for j, (a, v) in enumerate(zip(design.adjustables, valves, strict=True)):
        if a.emitter is None or v is None or v.limit is not None:
            continue
        link = int(links[a.emitter])
        m = float(flows.mass_flow_kg_s[link])
        if not m > 0.0:
            continue
        p = flows.pressure_Pa
        dp_link = float(p[net.from_node[link]] - p[net.to_node[link]])
        link_kv = a.element.link_kv_m3_h(v.kv_m3_h)
        dp_valve = valve_drop_Pa(m, link_kv, temp_C)
        exponent = min(dp_link / dp_valve, MAX_SENSITIVITY_EXPONENT)
        wanted_link = link_kv * (targets[a.emitter] / m) ** exponent
        kv = a.element.element_kv_m3_h(wanted_link)
        drop = (
            valve_drop_Pa(a.mass_flow_kg_s, a.element.link_kv_m3_h(kv), temp_C)
            if np.isfinite(kv)
            else 0.0
        )
        new[j] = valve_setting(a.element, a.mass_flow_kg_s, drop, temp_C, rounded=False)
    return new


def _result(scenario, scheme, design, valves, built0, built, flows, targets, temp_C):
    net = built.network
    m = flows.mass_flow_kg_s
    links = net.emitter_links()
    rows = []
    by_emitter = {
        a.emitter: (a, v)
        for a, v in zip(design.adjustables, valves, strict=True)
        if a.emitter is not None
    }
    for i, e in enumerate(scenario.emitters):
        a, v = by_emitter[i]
        link = int(links[i])
        link_kv = float(net.kv_m3_h[link])
        rows.append(
            ValveResult(
                emitter=e.id,
                room=scenario.rooms[e.room].id,
                element=a.element,
                setting=v.setting,
                kv_m3_h=v.kv_m3_h,
                link_kv_m3_h=link_kv,
                target_kg_s=float(targets[i]),
                verified_kg_s=float(m[link]),
                dp_valve_Pa=valve_drop_Pa(float(m[link]), link_kv, temp_C),
                limit=v.limit,
                shortfall_Pa=v.shortfall_Pa,
            )
        )
    by_circuit = {
        a.circuit: (a, v)
        for a, v in zip(design.adjustables, valves, strict=True)
        if a.circuit is not None
    }
    circuits = []
    for c in built.circuits:
        a, v = by_circuit.get(c.name, (None, None))
        if a is not None and a.element is not None:
            flow = float(m[c.link])
            circuits.append(
                CircuitResult(
                    c.name,
                    c.design_flow_kg_s,
                    a.element,
                    v.setting,
                    v.kv_m3_h,
                    valve_drop_Pa(flow, float(net.kv_m3_h[c.link]), temp_C),
                    a.valve_Pa,
                    v.limit,
                    v.shortfall_Pa,
                )
            )
        else:
            circuits.append(
                CircuitResult(
                    c.name,
                    c.design_flow_kg_s,
                    None,
                    None,
                    None,
                    None,
                    design.must_lose_Pa.get(
                        c.name, a.valve_Pa if a is not None else None
                    ),
                    missing_valve=a is not None,
                )
            )
    duty = {k: (q, h) for k, q, h in pump_duty_points(net, flows)}
    rho = float(density_kg_m3(temp_C))
    pumps = []
    for need in design.pumps:
        k = net.link_names.index(net0_name := built0.network.link_names[need.link])
        q, h = duty[k]
        pump = need.pump
        own = scenario_setting(pump)
        pumps.append(
            PumpResult(
                link=net0_name,
                table=_table_name(need.table),
                mode=pump.mode,
                key=need.setting.key,
                setting=need.setting.value,
                scenario_setting=own,
                need_Pa=need.need_Pa,
                rise_Pa=need.setting.rise_Pa,
                scenario_rise_Pa=rise_Pa(pump, own, need.mass_flow_kg_s, temp_C),
                design_flow_m3_h=need.mass_flow_kg_s / rho * 3600.0,
                flow_m3_h=float(q),
                head_Pa=float(h) * 1e3,
                index_emitter=None
                if need.index_emitter is None
                else scenario.emitters[need.index_emitter].id,
                unabsorbed_Pa=need.unabsorbed_Pa,
            )
        )
    pumps.sort(key=lambda r: r.link != "pump")
    index = max(
        (r for r in pumps if r.index_emitter is not None),
        key=lambda r: r.need_Pa,
    ).index_emitter
    return {
        "valves": tuple(rows),
        "circuits": tuple(circuits),
        "pumps": tuple(pumps),
        "index_emitter": index,
    }
