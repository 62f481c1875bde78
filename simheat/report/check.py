"""Check: heat loads, radiators, pipes, pump, source and starving radiators."""

from __future__ import annotations

from collections.abc import Sequence

from simheat.analysis.check import CheckResult, ShortRadiator
from simheat.analysis.check.fixes import Fix
from simheat.analysis.flows import STARVING_FRACTION
from simheat.report.caution import CAUTION
from simheat.report.numbers import KG_S_TO_KG_H, PA_PER_KPA, minutes

__all__ = ["check_dict", "check_text", "checks_dict"]

TOP_SEGMENTS = 3  # segments named in the text's cause line


def _w(value: float | None, digits: int = 1) -> float | None:
    return None if value is None else round(value, digits)


def _loads(result: CheckResult) -> list[dict]:
    out = []
    for r in result.loads:
        c = r.computed
        out.append(
            {
                "room": r.id,
                "name": r.name,
                "design_load_W": round(r.design_load_W, 1),
                "drives": r.drives,
                "given_W": _w(r.given_W),
                "computed_W": None if c is None else round(c.total_W, 1),
                "difference_W": _w(r.difference_W),
                "fabric_W": None if c is None else round(c.fabric_W, 1),
                "thermal_bridges_W": None
                if c is None
                else round(c.thermal_bridges_W, 1),
                "ventilation_W": None if c is None else round(c.ventilation_W, 1),
                "reheat_W": round(r.reheat_W, 1),
                "load_plus_reheat_W": round(r.with_reheat_W, 1),
                "elements": []
                if c is None
                else [
                    {"name": e.name, "beyond": e.beyond, "loss_W": round(e.loss_W, 1)}
                    for e in c.elements
                ],
            }
        )
    return out


def _emitters(result: CheckResult) -> list[dict]:
    return [
        {
            "id": r.id,
            "room": r.room,
            "nominal_W": round(r.nominal_W, 1),
            "share_of_load_W": round(r.share_W, 1),
            "design_flow_kg_per_h": round(r.design_flow_kg_s * KG_S_TO_KG_H, 2),
            "output_at_design_W": round(r.output_W, 1),
            "margin_pct": round(r.margin_pct, 1),
            "undersized": r.undersized,
            "nominal_for_load_W": _w(r.nominal_for_load_W, 0),
            "nominal_for_load_plus_reheat_W": _w(r.nominal_for_reheat_W, 0),
        }
        for r in result.radiators
    ]


def _pipes(result: CheckResult) -> list[dict]:
    return [
        {
            "link": p.link,
            "role": p.role,
            "pipe": p.pipe,
            "length_m": round(p.length_m, 3),
            "design_flow_kg_per_h": round(p.design_flow_kg_s * KG_S_TO_KG_H, 2),
            "design_velocity_m_per_s": round(p.design_velocity_m_s, 3),
            "design_gradient_Pa_per_m": round(p.design_gradient_Pa_m, 1),
            "flow_kg_per_h": round(p.flow_kg_s * KG_S_TO_KG_H, 2),
            "velocity_m_per_s": round(p.velocity_m_s, 3),
            "gradient_Pa_per_m": round(p.gradient_Pa_m, 1),
            "velocity_limit_m_per_s": p.velocity_limit_m_s,
            "gradient_limit_Pa_per_m": p.gradient_limit_Pa_m,
            "over_limit": list(p.over_limit),
        }
        for p in result.pipes
    ]


def _pump(result: CheckResult) -> list[dict]:
    return [
        {
            "pump": p.pump,
            "mode": p.mode,
            "operating_flow_m3_per_h": round(p.operating_flow_m3_h, 4),
            "operating_head_kPa": round(p.operating_head_Pa / PA_PER_KPA, 3),
            "design_flow_m3_per_h": round(p.design_flow_m3_h, 4),
            "index_emitter": p.index_emitter,
            "index_need_kPa": round(p.need_Pa / PA_PER_KPA, 3),
            "available_at_design_flow_kPa": round(p.available_Pa / PA_PER_KPA, 3),
            "margin_kPa": round(p.margin_Pa / PA_PER_KPA, 3),
            "can_deliver": p.can_deliver,
        }
        for p in result.pumps
    ]


def _source(result: CheckResult) -> dict:
    s = result.source
    return {
        "max_power_kW": round(s.max_power_W / 1e3, 3),
        "design_load_kW": round(s.design_load_W / 1e3, 3),
        "design_load_plus_reheat_kW": round(s.design_load_with_reheat_W / 1e3, 3),
        "margin_kW": round(s.margin_W / 1e3, 3),
        "enough": s.enough,
        "at_limit_share": _w(s.at_limit_fraction, 4),
        "kind": s.kind,
        "capacity_at": (
            None
            if s.design_point_C is None
            else {
                "outdoor_C": s.design_point_C[0],
                "flow_C": s.design_point_C[1],
                "outside_table": s.outside_table,
            }
        ),
    }


def _fix(fix: Fix) -> dict:
    v = fix.verified
    return {
        "kind": fix.kind,
        "change": fix.change,
        "scenario_edits": [e.text() for e in fix.edits],
        "verified_flow_pct_of_design": round(100.0 * v.fraction, 1),
        "largest_other_change_pct": round(100.0 * v.largest_other_change, 1),
        "largest_other_emitter": v.largest_other_emitter,
        "newly_starving": list(v.new_starving),
        "lifts_to_target": fix.lifts,
        "ok": fix.ok,
        "output_after_W": _w(fix.output_W),
    }


def _cause(short: ShortRadiator) -> dict | None:
    c = short.cause
    if c is None:
        return {
            "kind": "output",
            "summary": "radiator too small for its share of the load",
        }
    mid = c.mid_run
    return {
        "kind": c.largest,
        "pump": c.pump,
        "pump_head_kPa": round(c.pump_head_Pa / PA_PER_KPA, 3),
        "need_at_design_kPa": round(c.need_at_design_Pa / PA_PER_KPA, 3),
        "dp_available_kPa": round(c.dp_available_Pa / PA_PER_KPA, 3),
        "own_valve_kPa": round(c.valve_Pa / PA_PER_KPA, 3),
        "own_circuit_kPa": round(c.circuit_Pa / PA_PER_KPA, 3),
        "heat_source_kPa": round(c.source_Pa / PA_PER_KPA, 3),
        "pipes_kPa": round(c.pipes_Pa / PA_PER_KPA, 3),
        "segments": [
            {
                "link": s.link,
                "role": s.role,
                "pipe": s.pipe,
                "side": s.side,
                "dp_kPa": round(s.dp_Pa / PA_PER_KPA, 3),
            }
            for s in c.segments
        ],
        "mid_run": None
        if mid is None
        else {
            "floor": mid.floor,
            "emitter": mid.emitter,
            "position_m": round(mid.position_m, 2),
            "dp_kPa": round(mid.dp_Pa / PA_PER_KPA, 4),
        },
    }


def _mornings(result: CheckResult) -> list[dict]:
    return [
        {
            "fix": _fix(m.fix),
            "for_emitters": list(m.for_emitters),
            "rooms": [
                {
                    "id": room,
                    "time_to_setpoint_before_min": minutes(before),
                    "time_to_setpoint_after_min": minutes(m.after_s[room]),
                }
                for room, before in m.before_s.items()
            ],
        }
        for m in result.mornings
    ]


def check_dict(result: CheckResult) -> dict:
    """A check of one scheme as JSON-ready data in practical units.

    Parameters
    ----------
    result : CheckResult
        The check. [-]

    Returns
    -------
    dict
        ``scenario``, ``scheme``, ``loads``, ``emitters``, ``pipes``, ``pump``,
        ``source``, ``starving`` (each ``id``, ``reason``,
        ``flow_pct_of_design``, ``cause``, ``fixes`` with ``kind``, ``change``,
        ``verified_flow_pct_of_design``, ``largest_other_change_pct`` and
        more, ``best_fix``), ``mornings`` (with ``--simulate``),
        ``not_offered``, ``limits`` and ``caution``.
    """
    return {
        "scenario": result.scenario_name,
        "scheme": result.scheme,
        "water_temperature_C": result.water_temp_C,
        "loads": _loads(result),
        "emitters": _emitters(result),
        "pipes": _pipes(result),
        "pump": _pump(result),
        "source": _source(result),
        "starving": [
            {
                "id": s.id,
                "reason": s.reason,
                "flow_pct_of_design": round(100.0 * s.flow_fraction, 1),
                "cause": _cause(s),
                "fixes": [_fix(f) for f in s.fixes],
                "best_fix": None if s.best is None else s.fixes.index(s.best),
            }
            for s in result.starving
        ],
        "mornings": _mornings(result),
        "not_offered": dict(result.not_offered),
        "limits": {"starving_below_pct_of_design": 100.0 * STARVING_FRACTION},
        "caution": CAUTION,
    }


def checks_dict(results: Sequence[CheckResult]) -> dict:
    """Checks of several schemes: ``{"schemes": [...], "caution": ...}``.

    Parameters
    ----------
    results : sequence of CheckResult
        One per scheme. [-]

    Returns
    -------
    dict
        Each scheme's :func:`check_dict` without its caution, and one caution.
    """
    schemes = []
    for r in results:
        data = check_dict(r)
        data.pop("caution")
        schemes.append(data)
    return {"schemes": schemes, "caution": CAUTION}


def _loads_text(data: dict) -> list[str]:
    lines = [
        "heat loads (EN 12831 simplified where a room describes its envelope)",
        f"{'room':<12}{'design':>9}{'given':>9}{'computed':>10}{'diff':>8}"
        f"{'+reheat':>9}  drives",
    ]
    for r in data["loads"]:

        def cell(v, width):
            return f"{'--':>{width}}" if v is None else f"{v:>{width - 2}.0f} W"

        lines.append(
            f"{r['room']:<12}{r['design_load_W']:>7.0f} W{cell(r['given_W'], 9)}"
            f"{cell(r['computed_W'], 10)}{cell(r['difference_W'], 8)}"
            f"{r['load_plus_reheat_W']:>7.0f} W  {r['drives']}"
        )
    return lines


def _emitters_text(data: dict) -> list[str]:
    lines = [
        "radiators at the design supply temperature, design flow, room at setpoint",
        f"{'emitter':<13}{'share':>8}{'output':>9}{'margin':>9}{'nominal':>9}"
        f"{'for load':>10}{'+reheat':>9}",
    ]
    for e in data["emitters"]:
        need = e["nominal_for_load_W"]
        need_r = e["nominal_for_load_plus_reheat_W"]
        lines.append(
            f"{e['id']:<13}{e['share_of_load_W']:>6.0f} W"
            f"{e['output_at_design_W']:>7.0f} W"
            f"{e['margin_pct']:>7.0f} %{e['nominal_W']:>7.0f} W"
            f"{'--' if need is None else f'{need:.0f} W':>10}"
            f"{'--' if need_r is None else f'{need_r:.0f} W':>9}"
            + ("  UNDERSIZED" if e["undersized"] else "")
        )
    return lines


def _pipes_text(data: dict) -> list[str]:
    lines = [
        "pipes: velocity and gradient at design flow / with every valve open",
        f"{'link':<28}{'role':<10}{'pipe':<11}{'length':>8}{'velocity m/s':>16}"
        f"{'Pa/m':>14}  flags",
    ]
    for p in data["pipes"]:
        flags = " ".join(f.upper() for f in p["over_limit"])
        lines.append(
            f"{p['link']:<28}{p['role']:<10}{p['pipe']:<11}{p['length_m']:>6.1f} m"
            f"{p['design_velocity_m_per_s']:>8.2f} /{p['velocity_m_per_s']:>5.2f}"
            f"{p['design_gradient_Pa_per_m']:>7.0f} /{p['gradient_Pa_per_m']:>5.0f}"
            f"  {flags}"
        )
    over = [p for p in data["pipes"] if p["over_limit"]]
    lines.append(
        f"{len(over)} of {len(data['pipes'])} pipes over the sizing limits"
        if over
        else "every pipe within the sizing limits"
    )
    return lines


def _pump_text(data: dict) -> list[str]:
    lines = []
    for p in data["pump"]:
        verdict = "can" if p["can_deliver"] else "CANNOT"
        lines.append(
            f"pump {p['pump']} ({p['mode']}): runs at "
            f"{p['operating_flow_m3_per_h']:.3f} m3/h, "
            f"{p['operating_head_kPa']:.1f} kPa with every valve open; at the "
            f"design flow {p['design_flow_m3_per_h']:.3f} m3/h it gives "
            f"{p['available_at_design_flow_kPa']:.1f} kPa against the index circuit's "
            f"{p['index_need_kPa']:.1f} kPa ({p['index_emitter']}): {verdict} deliver, "
            f"margin {p['margin_kPa']:+.1f} kPa"
        )
    return lines


def _source_text(data: dict) -> list[str]:
    s = data["source"]
    verdict = "covers" if s["enough"] else "DOES NOT cover"
    what = "source"
    if s["capacity_at"] is not None:
        at = s["capacity_at"]
        what = (
            f"heat pump (capacity at {at['outdoor_C']:g} °C outdoor and "
            f"{at['flow_C']:g} °C flow, the flow temperature its control asks there; "
            "its rating table"
            + (
                ""
                if at.get("outside_table") is None
                else f", held at its edge: {at['outside_table']}"
            )
            + ")"
        )
    lines = [
        f"{what}: {s['max_power_kW']:g} kW {verdict} the design load "
        f"{s['design_load_kW']:.2f} kW (with reheat "
        f"{s['design_load_plus_reheat_kW']:.2f} kW), margin {s['margin_kW']:+.2f} kW"
    ]
    if s["at_limit_share"] is not None:
        lines.append(
            f"simulated morning: at its {'capacity' if s['capacity_at'] else 'power'} "
            "limit for "
            f"{100 * s['at_limit_share']:.0f} % of the comfort period"
        )
    return lines


def _starving_text(data: dict) -> list[str]:
    if not data["starving"]:
        return [
            "no radiator below "
            f"{data['limits']['starving_below_pct_of_design']:.0f} % of its design "
            "flow at design conditions, none undersized"
        ]
    lines = ["radiators short of heat at design conditions (every head open)"]
    for s in data["starving"]:
        c = s["cause"]
        if s["reason"] == "flow":
            lines.append(f"{s['id']}: {s['flow_pct_of_design']:.0f} % of design flow")
            top = ", ".join(
                f"{g['link']} {g['dp_kPa']:.1f} kPa"
                for g in c["segments"][:TOP_SEGMENTS]
            )
            lines.append(
                f"  cause ({c['kind']}): pump {c['pump_head_kPa']:.1f} kPa against a "
                f"need of {c['need_at_design_kPa']:.1f} kPa at design; pipes take "
                f"{c['pipes_kPa']:.1f} kPa (most: {top}); its valve "
                f"{c['own_valve_kPa']:.2f} kPa; {c['dp_available_kPa']:.2f} kPa "
                "left across its tees"
            )
            if c["mid_run"] is not None:
                m = c["mid_run"]
                lines.append(
                    f"  supply and return meet mid-run at {m['emitter']}, "
                    f"{m['position_m']:.1f} m along floor {m['floor']} "
                    f"({m['dp_kPa'] * 1e3:.0f} Pa between them)"
                )
        else:
            lines.append(f"{s['id']}: flow enough, radiator too small for its share")
        for i, f in enumerate(s["fixes"]):
            mark = "best" if i == s["best_fix"] else ("ok" if f["ok"] else "no")
            lines.append(
                f"  [{mark:>4}] {f['change']}: "
                f"{f['verified_flow_pct_of_design']:.0f} % of design after (verified); "
                "largest change elsewhere "
                f"{f['largest_other_change_pct']:+.0f} %"
                + (
                    f" ({f['largest_other_emitter']})"
                    if f["largest_other_emitter"]
                    else ""
                )
                + (
                    f"; starves {', '.join(f['newly_starving'])}"
                    if f["newly_starving"]
                    else ""
                )
            )
        if not s["fixes"]:
            lines.append("  no fix found")
    return lines


def _mornings_text(data: dict) -> list[str]:
    lines = []
    for m in data["mornings"]:
        lines.append(
            f"morning with the best fix for {', '.join(m['for_emitters'])}: "
            f"{m['fix']['change']}"
        )
        for r in m["rooms"]:
            before = r["time_to_setpoint_before_min"]
            after = r["time_to_setpoint_after_min"]
            lines.append(
                f"  {r['id']:<12}{'--' if before is None else f'{before:.0f} min':>10}"
                f" -> {'--' if after is None else f'{after:.0f} min':>8}"
            )
    return lines


def check_text(result: CheckResult) -> str:
    """A check of one scheme as plain text (no caution; the caller adds it).

    Parameters
    ----------
    result : CheckResult
        The check. [-]

    Returns
    -------
    str
        Loads, radiators, pipes, pump, source, starving radiators with their
        causes and verified fixes, and the simulated mornings.
    """
    data = check_dict(result)
    sections = [
        [f"{data['scenario']} -- check, scheme: {data['scheme']}"],
        _loads_text(data),
        _emitters_text(data),
        _pipes_text(data),
        _pump_text(data),
        _source_text(data),
        _starving_text(data),
        _mornings_text(data),
        [f"not offered: {v}" for v in data["not_offered"].values()],
    ]
    return "\n\n".join("\n".join(s) for s in sections if s)
