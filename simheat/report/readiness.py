"""Low-temperature readiness (``simheat readiness``) as JSON-ready data and text."""

from __future__ import annotations

from simheat.analysis.readiness import (
    Readiness,
    ReadinessMorning,
    SchemeReadiness,
    TargetResult,
)
from simheat.report.caution import CAUTION
from simheat.report.numbers import (
    J_PER_KWH,
    KG_S_TO_KG_H,
    NOT_REACHED,
    clock,
    minutes,
)
from simheat.report.start_time import start_time_entry

__all__ = ["readiness_dict", "readiness_text"]


def _round(value: float | None, digits: int) -> float | None:
    return None if value is None else round(value, digits)


def _pct(value: float | None, share_W: float) -> float | None:
    return None if value is None else round(100.0 * value / share_W, 1)


def _basis_dict(result: Readiness) -> dict:
    basis = result.basis
    return {"kind": basis.kind, "drop_K": basis.drop_K, "return_C": basis.return_C}


def _morning_dict(morning: ReadinessMorning | None) -> dict | None:
    if morning is None:
        return None
    return {
        "flow_temp_C": morning.flow_temp_C,
        "rooms": [
            {
                "id": room,
                "time_to_setpoint_min": minutes(time),
                "final_air_temp_C": round(morning.final_air_C[room], 2),
            }
            for room, time in morning.time_to_setpoint_s.items()
        ],
        "all_rooms_at_setpoint_min": minutes(morning.all_rooms_s),
        "source_at_limit": _round(morning.source_at_limit, 4),
        "electric_kWh": (
            None
            if morning.electric_J is None
            else round(morning.electric_J / J_PER_KWH, 4)
        ),
        "mean_cop": _round(morning.mean_cop, 3),
        "start_time": (
            None if morning.start is None else start_time_entry(morning.start)
        ),
    }


def _short_replaced(target: TargetResult) -> list[str] | None:
    """Radiators still short as piped with the target's replacements; None if none."""
    if all(r.replaced_as_piped_W is None for r in target.radiators):
        return None
    return [r.id for r in target.radiators if not r.enough_replaced_as_piped]


def _target_dict(result: Readiness, target: TargetResult) -> dict:
    radiators = []
    for r in target.radiators:
        radiators.append(
            {
                "id": r.id,
                "share_W": round(r.share_W, 1),
                "output_W": _round(r.output_W, 1),
                "pct_of_share": _pct(r.output_W, r.share_W),
                "enough": r.enough,
                "nominal_needed_W": r.nominal_needed_W,
                "verified_output_W": _round(r.verified_output_W, 1),
                "flow_as_piped_kg_per_h": round(r.flow_as_piped_kg_s * KG_S_TO_KG_H, 2),
                "inlet_as_piped_C": round(r.inlet_as_piped_C, 2),
                "output_as_piped_W": round(r.output_as_piped_W, 1),
                "pct_of_share_as_piped": _pct(r.output_as_piped_W, r.share_W),
                "enough_as_piped": r.enough_as_piped,
                "replaced_as_piped_W": _round(r.replaced_as_piped_W, 1),
            }
        )
    return {
        "flow_temp_C": target.flow_temp_C,
        "return_C": round(result.basis.return_at(target.flow_temp_C), 2),
        "radiators": radiators,
        "short": [r.id for r in target.radiators if not r.enough],
        "short_as_piped": [r.id for r in target.radiators if not r.enough_as_piped],
        "short_replaced_as_piped": _short_replaced(target),
        "heat_pump": (
            None
            if target.capacity_W is None
            else {
                "capacity_kW": round(target.capacity_W / 1e3, 3),
                "cop": round(target.cop, 3),
                "outside_table": target.outside_table,
            }
        ),
        "morning": _morning_dict(target.morning),
        "morning_replaced": _morning_dict(target.morning_replaced),
    }


def _scheme_dict(result: Readiness, scheme: SchemeReadiness) -> dict:
    return {
        "scheme": scheme.scheme,
        "lowest_flow_temp_C": result.lowest_flow_temp_C,
        "limiting": list(result.limiting),
        "lowest_flow_temp_as_piped_C": scheme.lowest_flow_temp_as_piped_C,
        "limiting_as_piped": list(scheme.limiting_as_piped),
        "targets": [_target_dict(result, t) for t in scheme.targets],
    }


def readiness_dict(result: Readiness) -> dict:
    """Low-temperature readiness as JSON-ready data in practical units.

    Parameters
    ----------
    result : Readiness
        What :func:`simheat.analysis.readiness.readiness` found. [-]

    Returns
    -------
    dict
        ``scenario``, ``source_kind``, ``basis`` (``kind`` ``drop`` or
        ``return``, ``drop_K``, ``return_C``), ``lowest_flow_temp_C`` and
        ``limiting`` (null and the radiators that cannot when none is enough
        even at ``highest_flow_temp_C``), ``near_limit`` (radiators within
        0.5 K below the limit), ``radiators`` (``id``, ``room``,
        ``nominal_W``, ``exponent``, ``setpoint_C``, ``share_W``,
        ``lowest_flow_temp_C``, ``verified_output_W``), ``targets_C``,
        ``schemes`` (per scheme the limits, as piped too, and ``targets``: per
        target flow temperature its ``return_C`` on the basis, per radiator its
        output against its share, the replacement's nominal output and its
        verified output, the flow, inlet and output as piped and as piped with
        the replacements in; ``short``, ``short_as_piped``,
        ``short_replaced_as_piped`` (null when nothing is replaced), ``heat_pump``: a
        heat pump's ``capacity_kW`` and ``cop`` at the design outdoor
        temperature and the target, null for a boiler; ``morning`` and
        ``morning_replaced``, the latter with the target's replacements in
        place, null without ``--simulate`` or when none is needed),
        ``highest_flow_temp_C``, ``design_load_kW`` and ``caution``; outputs in
        W, flows in kg/h.
    """
    return {
        "scenario": result.scenario_name,
        "source_kind": result.source_kind,
        "basis": _basis_dict(result),
        "lowest_flow_temp_C": result.lowest_flow_temp_C,
        "limiting": list(result.limiting),
        "near_limit": list(result.near_limit),
        "radiators": [
            {
                "id": r.id,
                "room": r.room,
                "nominal_W": round(r.nominal_W, 1),
                "exponent": r.exponent,
                "setpoint_C": r.room_C,
                "share_W": round(r.share_W, 1),
                "lowest_flow_temp_C": r.lowest_flow_temp_C,
                "verified_output_W": _round(r.verified_output_W, 1),
            }
            for r in result.radiators
        ],
        "targets_C": list(result.targets_C),
        "schemes": [_scheme_dict(result, s) for s in result.schemes],
        "highest_flow_temp_C": result.highest_flow_C,
        "design_load_kW": round(result.design_load_W / 1e3, 3),
        "caution": CAUTION,
    }


def _temp(value: float | None, highest: float) -> str:
    return f"above {highest:g} °C" if value is None else f"{value:.1f} °C"


def _basis_text(result: Readiness) -> str:
    basis = result.basis
    if basis.drop_K is not None:
        return (
            f"design drop kept: return = flow - {basis.drop_K:g} K (each radiator's "
            "flow set to carry its share across it, as after balancing)"
        )
    return f"return temperature held at {basis.return_C:g} °C"


def _radiator_table(result: Readiness) -> list[str]:
    lines = [
        f"{'radiator':<12} {'room':<10} {'nominal':>8} {'share':>7} {'lowest flow':>12}"
    ]
    for r in result.radiators:
        lines.append(
            f"{r.id:<12} {r.room:<10} {r.nominal_W:>6.0f} W {r.share_W:>5.0f} W "
            f"{_temp(r.lowest_flow_temp_C, result.highest_flow_C):>12}"
        )
    return lines


def _target_lines(result: Readiness, target: TargetResult) -> list[str]:
    returns = result.basis.return_at(target.flow_temp_C)
    lines = [
        f"at {target.flow_temp_C:g} °C flow (return {returns:g} °C on the basis):",
        f"  {'radiator':<12} {'share':>7} {'output':>8} {'of share':>8} "
        f"{'replace by':>11} {'verified':>9} {'as piped':>9} {'of share':>8} "
        f"{'replaced':>9}",
    ]
    for r in target.radiators:
        output = "--" if r.output_W is None else f"{r.output_W:.0f} W"
        pct = "--" if r.output_W is None else f"{100 * r.output_W / r.share_W:.0f} %"
        if r.nominal_needed_W is not None:
            replace = f"{r.nominal_needed_W:.0f} W"
        elif r.output_W is None:
            replace = "none can"
        else:
            replace = "ok"
        verified = "" if r.verified_output_W is None else f"{r.verified_output_W:.0f} W"
        replaced = (
            "" if r.replaced_as_piped_W is None else f"{r.replaced_as_piped_W:.0f} W"
        )
        lines.append(
            f"  {r.id:<12} {r.share_W:>5.0f} W {output:>8} {pct:>8} {replace:>11} "
            f"{verified:>9} {r.output_as_piped_W:>7.0f} W "
            f"{100 * r.output_as_piped_W / r.share_W:>6.0f} % {replaced:>9}"
        )
    short = [r.id for r in target.radiators if not r.enough]
    if short:
        lines.append(f"  short on the basis: {', '.join(short)}")
    still = _short_replaced(target)
    if still is None:
        piped = [r.id for r in target.radiators if not r.enough_as_piped]
        if piped:
            lines.append(f"  short as piped: {', '.join(piped)}")
    elif still:
        lines.append(
            "  still short as piped with the replacements in place (the scheme's "
            f"flows or water temperatures limit these): {', '.join(still)}"
        )
    if target.capacity_W is not None:
        verdict = "covers" if target.capacity_W >= result.design_load_W else "is below"
        lines.append(
            f"  heat pump at the design outdoor temperature: capacity "
            f"{target.capacity_W / 1e3:.2f} kW ({verdict} the design load "
            f"{result.design_load_W / 1e3:.2f} kW), COP {target.cop:.2f}"
            + (
                ""
                if target.outside_table is None
                else f"; held at the table's edge: {target.outside_table}"
            )
        )
    if any(r.output_W is None for r in target.radiators):
        lines.append(
            "  'none can': the basis' return would not lie above the room; "
            "give a smaller --drop-K or a --return-temp-C"
        )
    return lines


def _cell(value: float | None, text: str, width: int = 10) -> str:
    """A table cell: ``text`` (already formatted), or ``--`` for a missing value."""
    return f"{NOT_REACHED if value is None else text:>{width}}"


def _morning_lines(title: str, mornings: list[ReadinessMorning]) -> list[str]:
    if not mornings:
        return []

    def row(label: str, cells: list[str]) -> str:
        return f"  {label:<12}" + "".join(cells)

    def clock_min(seconds: float | None) -> str:
        return _cell(seconds, "" if seconds is None else f"{seconds / 60:.0f}")

    def room_cell(m: ReadinessMorning, room: str) -> str:
        seconds = m.time_to_setpoint_s[room]
        if seconds is None:
            return f"{f'({m.final_air_C[room]:.1f} °C)':>10}"
        return clock_min(seconds)

    lines = [
        f"{title} (minutes to setpoint from the start of comfort; in brackets "
        "the air temperature at the end of a run that does not reach it):",
        row("room", [f"{f'{m.flow_temp_C:g} °C':>10}" for m in mornings]),
    ]
    for room in mornings[0].time_to_setpoint_s:
        lines.append(row(room, [room_cell(m, room) for m in mornings]))
    lines.append(row("all rooms", [clock_min(m.all_rooms_s) for m in mornings]))
    if mornings[0].electric_J is not None:
        lines.append(
            row(
                "electricity",
                [f"{f'{m.electric_J / J_PER_KWH:.2f} kWh':>10}" for m in mornings],
            )
        )
        lines.append(
            row(
                "mean COP",
                [
                    _cell(m.mean_cop, "" if m.mean_cop is None else f"{m.mean_cop:.2f}")
                    for m in mornings
                ],
            )
        )
    at_limit = [
        _cell(m.source_at_limit, f"{100 * (m.source_at_limit or 0.0):.0f} %")
        for m in mornings
    ]
    lines.append(row("at limit", at_limit))
    if mornings[0].start is not None:
        lines.append(row("latest start", [_start(m) for m in mornings]))
        lines.append(
            f"  latest start: the latest heating start with "
            f"{_ready_rooms(mornings[0])} at setpoint by {_ready_by(mornings[0])} "
            "(each simulated; 'cannot': not even heating from the run's earliest "
            "start)"
        )
    return lines


def _ready_rooms(morning: ReadinessMorning) -> str:
    """Which rooms the start-time search asked for, in words."""
    ids = [room.id for room in morning.start.rooms]
    if ids == list(morning.time_to_setpoint_s):
        return "every room"
    return ", ".join(ids)


def _ready_by(morning: ReadinessMorning) -> str:
    """The ready time of a morning's start-time search, ``HH:MM``."""
    start = morning.start
    return clock(start.start_clock_s, start.ready_by_s)


def _start(morning: ReadinessMorning) -> str:
    """A table cell: the latest start ``HH:MM``, or ``cannot``."""
    start = morning.start
    if start.latest_start_s is None:
        return f"{'cannot':>10}"
    return f"{clock(start.start_clock_s, start.latest_start_s):>10}"


def readiness_text(result: Readiness) -> str:
    """Low-temperature readiness as aligned text (no caution; the caller adds it).

    Parameters
    ----------
    result : Readiness
        What :func:`simheat.analysis.readiness.readiness` found. [-]

    Returns
    -------
    str
        The basis, every radiator's lowest flow temperature and the house's,
        then per scheme the limit as piped and a table per target.
    """
    highest = result.highest_flow_C
    lines = [
        f"Low-temperature readiness -- {result.scenario_name}",
        f"basis: {_basis_text(result)}; rooms at setpoint with their design loads, "
        "each radiator its share by nominal output (EN 442)",
        "",
        *_radiator_table(result),
        "",
    ]
    if result.lowest_flow_temp_C is None:
        lines.append(
            f"lowest flow temperature: above {highest:g} °C; these radiators cannot "
            f"meet their share: {', '.join(result.limiting)}"
        )
    else:
        lines.append(
            f"lowest flow temperature: {result.lowest_flow_temp_C:.1f} °C, set by "
            f"{', '.join(result.limiting)}"
            + (
                f"; within 0.5 K below it: {', '.join(result.near_limit)}"
                if result.near_limit
                else ""
            )
        )
    for scheme in result.schemes:
        lines.append("")
        lines.append(
            f"scheme {scheme.scheme}, as piped (valves at their presets, heads "
            "open, the scheme's own flows and steady water temperatures): lowest "
            f"flow temperature {_temp(scheme.lowest_flow_temp_as_piped_C, highest)}"
            + (
                f", set by {', '.join(scheme.limiting_as_piped)}"
                if scheme.limiting_as_piped
                else ""
            )
        )
        for target in scheme.targets:
            lines.extend(_target_lines(result, target))
        lines.extend(
            _morning_lines(
                "morning with the flow temperature fixed at each target",
                [t.morning for t in scheme.targets if t.morning is not None],
            )
        )
        lines.extend(
            _morning_lines(
                "the same morning with the replacements of each target in place",
                [m for t in scheme.targets if (m := t.morning_replaced) is not None],
            )
        )
    lines.append("")
    lines.append(
        "replace by: the nominal output (75/65/20 °C, same exponent) that meets the "
        "share at the target on the basis; verified: that radiator's output "
        "recomputed by the steady energy balance; replaced: its output as piped "
        "with every replacement of the target in place, solved again"
    )
    return "\n".join(lines)
