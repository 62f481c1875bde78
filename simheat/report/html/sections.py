"""Sections of the optional analyses on the hand-over page: check and balance.

Each function turns an analysis result (or its refusal) into a section the
template lays out: a title, notes (sentences) and tables of text cells. The
numbers come from the analyses' own JSON-ready forms
(:func:`simheat.report.check.check_dict`,
:func:`simheat.report.balance.scheme_balance_dict`), so the page says exactly
what ``simheat check`` and ``simheat balance`` print.
"""

from __future__ import annotations

from simheat.analysis.handover import Refused

__all__ = ["EXTRA_SECTIONS", "balance_section", "check_section"]


def _pct(value: float | None) -> str:
    return "--" if value is None else f"{value:.1f} %"


def _cause_text(cause: dict | None) -> str:
    if cause is None:
        return "--"
    if cause.get("kind") == "output":
        return cause["summary"]
    parts = [f"{cause['dp_available_kPa']:.2f} kPa across its tees"]
    segments = cause.get("segments") or []
    if segments:
        top = ", ".join(f"{s['link']} {s['dp_kPa']:.2f} kPa" for s in segments[:2])
        parts.append(f"largest pipe drops: {top}")
    if cause.get("mid_run"):
        mid = cause["mid_run"]
        parts.append(f"mid-run low point at {mid['emitter']} ({mid['dp_kPa']:.2f} kPa)")
    return "; ".join(parts)


def check_section(result: object) -> dict:
    """The findings of ``simheat check`` for one scheme, with their fixes.

    Parameters
    ----------
    result : CheckResult or Refused
        The check of the scheme. [-]

    Returns
    -------
    dict
        ``title``, ``notes`` and ``tables`` (one row per fix of every radiator
        starving or short at design conditions; its best fix marked).
    """
    from simheat.report.check import check_dict

    title = "Findings and fixes (check)"
    if isinstance(result, Refused):
        return {"title": title, "notes": [result.message], "tables": []}
    data = check_dict(result)
    source = data["source"]
    at = source.get("capacity_at")
    where = (
        ""
        if at is None
        else f" (heat pump at {at['outdoor_C']:g} °C outdoor and {at['flow_C']:g} °C "
        "flow, its rating table)"
    )
    notes = [
        f"Source: {source['max_power_kW']:.1f} kW{where} against a design load of "
        f"{source['design_load_kW']:.1f} kW "
        + ("(enough)." if source["enough"] else "(NOT enough)."),
        "Check judges each radiator's output at its design flow (the radiator "
        "schedule above gives it at the flow the network actually delivers).",
    ]
    rows = []
    for short in data["starving"]:
        fixes = short["fixes"] or [None]
        for n, fix in enumerate(fixes):
            rows.append(
                [
                    short["id"] if n == 0 else "",
                    short["reason"] if n == 0 else "",
                    _pct(short["flow_pct_of_design"]) if n == 0 else "",
                    _cause_text(short["cause"]) if n == 0 else "",
                    "--" if fix is None else fix["change"],
                    "--" if fix is None else _pct(fix["verified_flow_pct_of_design"]),
                    "--" if fix is None else _pct(fix["largest_other_change_pct"]),
                    ""
                    if fix is None
                    else (
                        "best"
                        if short["best_fix"] == n
                        else ("ok" if fix["ok"] else "no")
                    ),
                ]
            )
    if not rows:
        notes.append(
            "No radiator starves or falls short of its load at design conditions."
        )
        return {"title": title, "notes": notes, "tables": []}
    table = {
        "caption": (
            "Radiators starving or short of their load at design conditions, and "
            "each fix verified by re-solving the changed scenario: the radiator's "
            "flow after, and the largest change it causes to any other radiator."
        ),
        "head": [
            "Radiator", "Reason", "Flow now", "Cause", "Fix", "Flow after",
            "Largest other change", "Verdict",
        ],
        "rows": rows,
    }  # fmt: skip
    return {"title": title, "notes": notes, "tables": [table]}


def _setting_cell(valve: dict) -> str:
    if valve["preset"] is None:
        return "Kv (no table)"
    word = "turns" if valve["element"] == "lockshield" else "preset"
    return f"{word} {valve['preset']:g}"


def _number(value: float | None, spec: str) -> str:
    return "--" if value is None else format(value, spec)


def _circuit_row(c: dict) -> list[str]:
    return [
        c["circuit"],
        f"{c['design_flow_kg_per_h']:.1f}",
        c["valve_type"] or "none declared",
        _number(c["preset"], "g"),
        _number(c["kv_m3_per_h"], ".3f"),
        _number(c["must_lose_kPa"], ".2f"),
    ]


def balance_section(result: object) -> dict:
    """The commissioning table of ``simheat balance`` for one scheme.

    Parameters
    ----------
    result : SchemeBalance or Refused
        The balance of the scheme. [-]

    Returns
    -------
    dict
        ``title``, ``notes`` and ``tables``: valve settings per radiator, circuit
        valves (when any), pump settings; every flow verified by re-solving the
        balanced scenario.
    """
    from simheat.report.balance import HEAD_CONVENTION, scheme_balance_dict

    title = "Commissioning table (balance)"
    if isinstance(result, Refused):
        return {
            "title": title,
            "notes": [f"Not balanced: {result.message}"],
            "tables": [],
        }
    data = scheme_balance_dict(result)
    notes = [
        f"Presets apply with the {HEAD_CONVENTION}. Worst verified deviation from "
        f"target: {data['worst_deviation_pct']:.2f} % ({data['worst_emitter']}); "
        f"index circuit {data['index_emitter']}."
    ]
    valves = {
        "caption": "Radiator valves: the setting to make and the flow it gives.",
        "head": [
            "Radiator", "Room", "Target flow [kg/h]", "Setting", "Kv [m³/h]",
            "Valve drop [kPa]", "Verified flow", "Limit",
        ],
        "rows": [
            [
                v["emitter"], v["room"], f"{v['target_flow_kg_per_h']:.1f}",
                _setting_cell(v), f"{v['kv_m3_per_h']:.3f}",
                "--" if v["dp_valve_kPa"] is None else f"{v['dp_valve_kPa']:.2f}",
                _pct(v["verified_flow_pct_of_target"]),
                v["limit"] or "",
            ]
            for v in data["valves"]
        ],
    }  # fmt: skip
    pumps = {
        "caption": "Pump settings and the verified duty point.",
        "head": [
            "Pump",
            "Mode",
            "Setting",
            "Scenario's setting",
            "Flow [m³/h]",
            "Head [kPa]",
        ],
        "rows": [],
    }
    for p in data["pumps"]:
        setting = p["setting"]
        if "speed" in setting:
            now = f"speed {setting['speed']:.3f}"
            given = f"speed {setting['scenario_speed']:.3f}"
        else:
            now = f"{setting['setpoint_kPa']:.2f} kPa"
            given = f"{setting['scenario_setpoint_kPa']:.2f} kPa"
        pumps["rows"].append(
            [
                p["pump"], setting["mode"].replace("_", " "), now, given,
                f"{p['flow_m3_per_h']:.3f}",
                "--" if p["head_kPa"] is None else f"{p['head_kPa']:.2f}",
            ]
        )  # fmt: skip
    tables = [valves]
    if data["circuit_valves"]:
        tables.append(
            {
                "caption": "Circuit balancing valves: what each circuit must lose.",
                "head": [
                    "Circuit", "Design flow [kg/h]", "Valve", "Setting",
                    "Kv [m³/h]", "Must lose [kPa]",
                ],
                "rows": [_circuit_row(c) for c in data["circuit_valves"]],
            }
        )  # fmt: skip
    tables.append(pumps)
    return {"title": title, "notes": notes, "tables": tables}


EXTRA_SECTIONS = {"check": check_section, "balance": balance_section}
"""Optional analysis name -> its section (see simheat.analysis.handover)."""
