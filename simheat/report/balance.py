"""Balance: the commissioning table per scheme, as JSON-ready data and text."""

from __future__ import annotations

from collections.abc import Sequence

from simheat.analysis.balance.elements import KIND_KV, KIND_LOCKSHIELD
from simheat.analysis.balance.result import SchemeBalance
from simheat.analysis.compare import SchemeOutcome
from simheat.report.caution import CAUTION
from simheat.report.numbers import (
    KG_S_TO_KG_H,
    PA_PER_KPA,
    cell,
    minutes,
    minutes_cell,
    percent,
)

__all__ = ["balance_dict", "balance_text"]

HEAD_CONVENTION = (
    "thermostatic heads fully open (room half a proportional band below setpoint)"
)


def _kPa(value_Pa: float | None, digits: int = 3) -> float | None:
    return None if value_Pa is None else round(value_Pa / PA_PER_KPA, digits)


def _setting_dict(p) -> dict:
    if p.key == "speed":
        return {
            "mode": p.mode,
            "speed": round(p.setting, 4),
            "scenario_speed": round(p.scenario_setting, 4),
        }
    return {
        "mode": p.mode,
        "setpoint_kPa": _kPa(p.setting, 3),
        "scenario_setpoint_kPa": _kPa(p.scenario_setting, 3),
    }


def _pump_dict(p) -> dict:
    return {
        "pump": p.link,
        "table": p.table,
        "flow_m3_per_h": round(p.flow_m3_h, 4),
        "head_kPa": _kPa(p.head_Pa),
        "setting": _setting_dict(p),
        "need_kPa": _kPa(p.need_Pa),
        "design_flow_m3_per_h": round(p.design_flow_m3_h, 4),
        "scenario_head_at_design_flow_kPa": _kPa(p.scenario_rise_Pa),
        "index_emitter": p.index_emitter,
        "unabsorbed_kPa": _kPa(p.unabsorbed_Pa),
    }


def _outcome_dict(o: SchemeOutcome) -> dict:
    return {
        "rooms": [
            {"id": r, "time_to_setpoint_min": minutes(t)}
            for r, t in zip(o.room_ids, o.times_s, strict=True)
        ],
        "all_rooms_at_setpoint_min": minutes(o.all_rooms_s),
        "spread_min": minutes(o.spread_s),
    }


def scheme_balance_dict(
    b: SchemeBalance, morning: tuple[SchemeOutcome, SchemeOutcome] | None = None
) -> dict:
    """One scheme's balance as JSON-ready data in practical units.

    Parameters
    ----------
    b : SchemeBalance
        The verified balance. [-]
    morning : (SchemeOutcome, SchemeOutcome), optional
        The morning before and after, when simulated. [-]

    Returns
    -------
    dict
        ``name``, ``index_emitter``, ``pump`` (the plant or primary pump:
        ``flow_m3_per_h``, ``head_kPa`` of the verified duty point, ``setting``),
        ``pumps`` (every pump), ``valves``, ``circuit_valves``,
        ``worst_deviation_pct`` and, when simulated, ``simulation``.
    """
    valves = []
    for v in b.valves:
        valves.append(
            {
                "emitter": v.emitter,
                "room": v.room,
                "target_flow_kg_per_h": round(v.target_kg_s * KG_S_TO_KG_H, 2),
                "element": v.element.kind,
                "preset": None if v.element.kind == KIND_KV else round(v.setting, 3),
                "kv_m3_per_h": round(v.kv_m3_h, 5),
                "dp_valve_kPa": _kPa(v.dp_valve_Pa),
                "verified_flow_pct_of_target": percent(
                    v.verified_kg_s, v.target_kg_s, 2
                ),
                "limit": v.limit,
                "shortfall_kPa": _kPa(v.shortfall_Pa) if v.limit else None,
            }
        )
    circuits = [
        {
            "circuit": c.name,
            "design_flow_kg_per_h": round(c.design_flow_kg_s * KG_S_TO_KG_H, 2),
            "valve_type": None if c.element is None else c.element.valve_type,
            "preset": None if c.setting is None else round(c.setting, 3),
            "kv_m3_per_h": None if c.kv_m3_h is None else round(c.kv_m3_h, 5),
            "dp_valve_kPa": _kPa(c.dp_valve_Pa),
            "must_lose_kPa": _kPa(c.must_lose_Pa),
            "missing_valve": c.missing_valve,
            "limit": c.limit,
            "shortfall_kPa": _kPa(c.shortfall_Pa) if c.limit else None,
        }
        for c in b.circuits
    ]
    main = _pump_dict(b.pumps[0])
    data = {
        "name": b.scheme,
        "water_temperature_C": b.water_temp_C,
        "discrete": b.discrete,
        "keep_pump": b.keep_pump,
        "index_emitter": b.index_emitter,
        "pump": {
            "flow_m3_per_h": main["flow_m3_per_h"],
            "head_kPa": main["head_kPa"],
            "setting": main["setting"],
        },
        "pumps": [_pump_dict(p) for p in b.pumps],
        "valves": valves,
        "circuit_valves": circuits,
        "worst_deviation_pct": round(b.worst_deviation_pct, 3),
        "worst_emitter": b.worst.emitter,
    }
    if morning is not None:
        data["simulation"] = {
            "before": _outcome_dict(morning[0]),
            "after": _outcome_dict(morning[1]),
        }
    return data


def balance_dict(
    balances: Sequence[SchemeBalance],
    mornings: Sequence[tuple[SchemeOutcome, SchemeOutcome] | None] | None = None,
) -> dict:
    """Balances of one or more schemes as JSON-ready data.

    Parameters
    ----------
    balances : sequence of SchemeBalance
        One per scheme. [-]
    mornings : sequence of (SchemeOutcome, SchemeOutcome) or None, optional
        The morning before and after per scheme, when simulated. [-]

    Returns
    -------
    dict
        ``schemes`` (see :func:`scheme_balance_dict`), ``convention`` (the
        head position of the presets) and ``caution``.
    """
    mornings = mornings or [None] * len(balances)
    return {
        "schemes": [
            scheme_balance_dict(b, m) for b, m in zip(balances, mornings, strict=True)
        ],
        "convention": HEAD_CONVENTION,
        "caution": CAUTION,
    }


def _setting_cell(v) -> str:
    if v.element.kind == KIND_KV:
        return "Kv (no table)"
    word = "turns" if v.element.kind == KIND_LOCKSHIELD else "preset"
    return f"{word} {v.setting:g}"


def _pump_line(p) -> str:
    if p.key == "speed":
        chosen = f"speed {p.setting:.4f} (scenario: {p.scenario_setting:.4f})"
    else:
        chosen = (
            f"{p.mode} set head {p.setting / PA_PER_KPA:.3f} kPa "
            f"(scenario: {p.scenario_setting / PA_PER_KPA:.3f} kPa)"
        )
    index = f", index circuit {p.index_emitter}" if p.index_emitter else ""
    lines = [
        f"pump {p.link} [{p.table}]: {chosen}",
        f"  needs {p.need_Pa / PA_PER_KPA:.2f} kPa at {p.design_flow_m3_h:.3f} m3/h"
        f"{index}; the scenario's setting gives "
        f"{p.scenario_rise_Pa / PA_PER_KPA:.2f} kPa there",
        f"  verified duty point: {p.flow_m3_h:.3f} m3/h at "
        f"{p.head_Pa / PA_PER_KPA:.2f} kPa",
    ]
    if p.unabsorbed_Pa > 0.0:
        lines.append(
            f"  {p.unabsorbed_Pa / PA_PER_KPA:.2f} kPa of its head has no valve to "
            "take it: declare circuit valves ([layout.circuit_valves])"
        )
    return "\n".join(lines)


def _circuit_line(c) -> str:
    flow = f"{c.design_flow_kg_s * KG_S_TO_KG_H:>6.0f} kg/h"
    if c.element is not None:
        text = (
            f"{c.element.valve_type} preset {c.setting:g}, Kv {c.kv_m3_h:.3f} m3/h, "
            f"takes {c.dp_valve_Pa / PA_PER_KPA:.2f} kPa"
        )
        if c.limit:
            text += f" -- {c.limit}, {c.shortfall_Pa / PA_PER_KPA:.2f} kPa unbalanced"
    elif c.must_lose_Pa is None:
        text = "no valve; no pipe of its own to take one"
    elif c.missing_valve:
        text = (
            f"NEEDS A VALVE to lose {c.must_lose_Pa / PA_PER_KPA:.2f} kPa; "
            "without one its flows run off target"
        )
    else:
        text = f"no valve; a valve could take {c.must_lose_Pa / PA_PER_KPA:.2f} kPa"
    return f"  {c.name:<20}{flow}  {text}"


def scheme_balance_text(
    b: SchemeBalance, morning: tuple[SchemeOutcome, SchemeOutcome] | None = None
) -> str:
    """One scheme's commissioning table, circuit valves, pumps and check.

    Parameters
    ----------
    b : SchemeBalance
        The verified balance. [-]
    morning : (SchemeOutcome, SchemeOutcome), optional
        The morning before and after, when simulated. [-]

    Returns
    -------
    str
        The text, without the caution.
    """
    lines = [
        f"balance -- scheme: {b.scheme}, water at {b.water_temp_C:g} °C, "
        f"{HEAD_CONVENTION}",
        "",
        f"{'emitter':<14}{'room':<10}{'target':>9}  {'setting':<15}{'Kv':>12}"
        f"{'dp valve':>11}{'verified':>10}",
    ]
    notes = []
    for v in b.valves:
        pct = cell(percent(v.verified_kg_s, v.target_kg_s), ">8.1f")
        lines.append(
            f"{v.emitter:<14}{v.room:<10}{v.target_kg_s * KG_S_TO_KG_H:>4.0f} kg/h  "
            f"{_setting_cell(v):<15}{v.kv_m3_h:>7.3f} m3/h"
            f"{v.dp_valve_Pa / PA_PER_KPA:>7.2f} kPa{pct} %"
        )
        if v.limit:
            notes.append(
                f"  {v.emitter}: the Kv it needs lies {v.limit} "
                f"({v.shortfall_Pa / PA_PER_KPA:.2f} kPa unbalanced); "
                "the verified flow is shown"
            )
    lines += ["", "circuit valves:", *(_circuit_line(c) for c in b.circuits)]
    lines += ["", f"index circuit: {b.index_emitter}"]
    lines += [_pump_line(p) for p in b.pumps]
    w = b.worst
    lines += [
        "",
        f"verified by re-solving the balanced network: worst deviation "
        f"{b.worst_deviation_pct:+.2f} % ({w.emitter})"
        + (" -- settings on table steps" if b.discrete else ""),
    ]
    if notes:
        lines += ["valves that cannot reach their Kv:", *notes]
    if morning is not None:
        lines += ["", _morning_text(*morning)]
    return "\n".join(lines)


def _morning_text(before: SchemeOutcome, after: SchemeOutcome) -> str:
    lines = [f"morning simulated: {'room':<12}{'before':>10}{'after':>10}"]
    for room, t0, t1 in zip(
        before.room_ids, before.times_s, after.times_s, strict=True
    ):
        lines.append(f"{'':<19}{room:<12}{minutes_cell(t0):>10}{minutes_cell(t1):>10}")
    lines.append(
        f"{'':<19}{'all rooms':<12}{minutes_cell(before.all_rooms_s):>10}"
        f"{minutes_cell(after.all_rooms_s):>10}"
    )
    lines.append(
        f"{'':<19}{'spread':<12}{minutes_cell(before.spread_s):>10}"
        f"{minutes_cell(after.spread_s):>10}"
    )
    return "\n".join(lines)


def balance_text(
    balances: Sequence[SchemeBalance],
    mornings: Sequence[tuple[SchemeOutcome, SchemeOutcome] | None] | None = None,
) -> str:
    """Every scheme's balance as text, without the caution.

    Parameters
    ----------
    balances : sequence of SchemeBalance
        One per scheme. [-]
    mornings : sequence of (SchemeOutcome, SchemeOutcome) or None, optional
        The morning before and after per scheme, when simulated. [-]

    Returns
    -------
    str
        One block per scheme.
    """
    mornings = mornings or [None] * len(balances)
    return "\n\n".join(
        scheme_balance_text(b, m) for b, m in zip(balances, mornings, strict=True)
    )
