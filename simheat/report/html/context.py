"""What the hand-over page shows, as plain rows of text: the template only lays out.

Every number is formatted here, in the units the trade reads (kg/h, kPa, kW,
m/s, minutes, clock time); the template receives strings, lists and the figures
as inline SVG, and escapes every string it prints.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path
from typing import TYPE_CHECKING

from simheat.analysis.flows import STARVING_FRACTION
from simheat.plots.comparison import plot_scheme_comparison
from simheat.plots.flows import share_text
from simheat.plots.pressure import plot_pressure
from simheat.plots.schematic import plot_schematic
from simheat.plots.warmup import plot_warmup
from simheat.report.caution import CAUTION
from simheat.report.compare import shortfall_cell
from simheat.report.html.installation import installation_section
from simheat.report.html.sections import EXTRA_SECTIONS as SECTIONS
from simheat.report.html.svg import figure_svg
from simheat.report.numbers import KG_S_TO_KG_H, clock, minutes_cell

if TYPE_CHECKING:
    from simheat.analysis.handover import Handover, SchemeHandover

W_PER_KW = 1000.0  # [W/kW]
# Sections of optional analyses (see simheat.analysis.handover.OPTIONAL_ANALYSES):
# name -> f(result) -> {"title": str, "notes": [str], "tables": [{"caption",
# "head", "rows"}]}, in the order they appear on the page.
EXTRA_SECTIONS: dict[str, Callable[[object], dict]] = dict(SECTIONS)
UNDERSIZED_SHARE = 1.0  # output below this share of its load is flagged [-]

__all__ = ["page_context"]


def _scheme_title(name: str) -> str:
    return name.replace("_", " ")


def _c(value: float) -> str:
    return f"{value:.1f} °C".replace("-", "\u2212")


def _night_fact(s) -> str:
    """How the simulated morning starts: after the night, or from given rooms.

    Parameters
    ----------
    s : Scenario
        The house and its schedule. [-]
    """
    schedule = s.schedule
    if schedule.off_clock_s is None:
        return "rooms and water from the temperatures the scenario gives"
    return (
        f"heating off from {clock(schedule.off_clock_s, 0.0)}: the house cools "
        f"from its steady state at the comfort setpoints until "
        f"{clock(schedule.start_clock_s, 0.0)}"
    )


def house_facts(handover: Handover) -> list[tuple[str, str]]:
    """Design conditions and plant as (label, value) pairs.

    Parameters
    ----------
    handover : Handover
        The report's content. [-]

    Returns
    -------
    list of (str, str)
        Label and formatted value.
    """
    s = handover.scenario
    source = s.source
    control = {
        "fixed": f"fixed at {_c(source.flow_temp_C)}",
        "schedule": f"scheduled, up to {_c(source.flow_temp_C)}",
        "heating_curve": f"heating curve, up to {_c(source.flow_temp_C)}",
    }[source.flow_control]
    schedule = s.schedule
    before = (
        "heating off"
        if schedule.before_comfort == "off"
        else f"setback at {_c(schedule.setback_setpoint_C)}"
    )
    total_load = sum(handover.room_loads_W)
    return [
        ("Design outdoor temperature", _c(s.design.outdoor_temp_C)),
        ("Design supply temperature", _c(s.design.supply_temp_C)),
        ("Design temperature drop", f"{s.design.temperature_drop_K:.1f} K"),
        ("Design heat load, all rooms", f"{total_load / W_PER_KW:.2f} kW"),
        (
            "Heat source",
            f"{source.max_power_W / W_PER_KW:.1f} kW maximum"
            if source.heat_pump is None
            else f"heat pump, up to {source.max_power_W / W_PER_KW:.1f} kW "
            "(its capacity follows its rating table)",
        ),
        ("Flow temperature", control),
        (
            "Morning simulated",
            f"from {clock(schedule.start_clock_s, 0.0)}, comfort from "
            f"{clock(schedule.start_clock_s, schedule.comfort_start_s)} "
            f"({before} before), {s.simulation.duration_s / 3600.0:.1f} h",
        ),
        ("Before the morning", _night_fact(s)),
        (
            "Outdoor temperature",
            _c(float(s.weather.outdoor_temp_C[0]))
            if len(set(s.weather.outdoor_temp_C.tolist())) == 1
            else "varies over the morning (weather series)",
        ),
    ]


def room_rows(handover: Handover) -> list[list[str]]:
    """One row per room: name, floor, area, setpoint, design load, radiators.

    Parameters
    ----------
    handover : Handover
        The report's content. [-]

    Returns
    -------
    list of list of str
        Cells per room.
    """
    s = handover.scenario
    radiators: dict[int, list[str]] = {}
    for e in s.emitters:
        radiators.setdefault(e.room, []).append(e.id)
    return [
        [
            room.name,
            str(room.floor),
            f"{room.floor_area_m2:.1f}",
            f"{room.setpoint_C:.1f}",
            f"{load:.0f}",
            ", ".join(radiators.get(r, [])),
        ]
        for r, (room, load) in enumerate(
            zip(s.rooms, handover.room_loads_W, strict=True)
        )
    ]


def comparison_context(handover: Handover) -> dict:
    """The schemes compared: table rows, ranking with reasons, small multiples.

    Parameters
    ----------
    handover : Handover
        The report's content. [-]

    Returns
    -------
    dict
        ``columns`` (scheme titles), ``rows`` (room name, then minutes per
        scheme), ``totals`` (all rooms, spread, shortfall rows), ``ranking``
        (title and reason per place) and ``figure`` (SVG).
    """
    comparison = handover.comparison
    outcomes = comparison.outcomes
    names = [room.name for room in handover.scenario.rooms]
    rows = [
        [name] + [minutes_cell(o.times_s[i]) for o in outcomes]
        for i, name in enumerate(names)
    ]
    totals = [
        ["All rooms at setpoint"] + [minutes_cell(o.all_rooms_s) for o in outcomes],
        ["Spread, first to last room"] + [minutes_cell(o.spread_s) for o in outcomes],
        ["Comfort shortfall"] + [shortfall_cell(o.shortfall_Kh) for o in outcomes],
    ]
    by_name = {o.name: o for o in outcomes}
    ranking = []
    for name in comparison.ranking:
        o = by_name[name]
        if o.all_rooms_s is not None:
            reason = f"every room at setpoint after {minutes_cell(o.all_rooms_s)}"
        else:
            reason = f"{o.n_reached} of {len(o.times_s)} rooms reach setpoint"
        reason += f"; shortfall {shortfall_cell(o.shortfall_Kh)}"
        ranking.append({"scheme": _scheme_title(name), "reason": reason})
    return {
        "columns": [_scheme_title(o.name) for o in outcomes],
        "rows": rows,
        "totals": totals,
        "ranking": ranking,
        "figure": figure_svg(plot_scheme_comparison(comparison.runs), "compare"),
    }


def radiator_rows(item: SchemeHandover) -> list[dict]:
    """The radiator schedule of a scheme, one row per radiator in route order.

    Parameters
    ----------
    item : SchemeHandover
        One scheme's content. [-]

    Returns
    -------
    list of dict
        ``cells`` (emitter, room, design flow kg/h, setting, Kv, verified flow
        kg/h and % of design, output W, load W, output % of load) and flags
        ``starving``, ``short``.
    """
    order = [t.emitter for f in item.run.scenario.route.floors for t in f.tees]
    rows = []
    for i in order:
        r = item.radiators[i]
        closed = r.design_flow_kg_s <= 0.0  # shut for good: no design flow
        share = 0.0 if closed else r.verified_flow_kg_s / r.design_flow_kg_s
        output_share = r.output_W / r.load_W if r.load_W > 0.0 else float("inf")
        rows.append(
            {
                "cells": [
                    r.id,
                    r.room_name,
                    f"{r.design_flow_kg_s * KG_S_TO_KG_H:.1f}",
                    r.setting,
                    f"{r.kv_m3_h:.3f}",
                    f"{r.verified_flow_kg_s * KG_S_TO_KG_H:.1f}",
                    "closed" if closed else share_text(share),
                    f"{r.output_W:.0f}",
                    f"{r.load_W:.0f}",
                    share_text(output_share, mark=UNDERSIZED_SHARE)
                    if r.load_W > 0.0
                    else "--",
                ],
                "starving": r.starving,
                "short": output_share < UNDERSIZED_SHARE,
            }
        )
    return rows


def pipe_rows(item: SchemeHandover) -> list[dict]:
    """The pipe schedule of a scheme: every pipe with a length.

    Parameters
    ----------
    item : SchemeHandover
        One scheme's content. [-]

    Returns
    -------
    list of dict
        ``cells`` (pipe, role, size, length m, design flow kg/h, velocity m/s,
        gradient Pa/m, verified flow kg/h, its velocity m/s) and ``over_limit``.
    """
    return [
        {
            "cells": [
                p.name,
                p.role.replace("_", " "),
                p.size,
                f"{p.length_m:.1f}",
                f"{p.design_flow_kg_s * KG_S_TO_KG_H:.0f}",
                f"{p.design_velocity_m_s:.2f}",
                f"{p.design_gradient_Pa_m:.0f}",
                f"{p.verified_flow_kg_s * KG_S_TO_KG_H:.0f}",
                f"{p.verified_velocity_m_s:.2f}",
            ],
            "over_limit": p.over_limit,
        }
        for p in item.pipes
    ]


def pump_rows(item: SchemeHandover) -> list[list[str]]:
    """Each pump's setting, what the design needs, and its verified duty point.

    Parameters
    ----------
    item : SchemeHandover
        One scheme's content. [-]

    Returns
    -------
    list of list of str
        Pump, setting, needed flow m3/h and head kPa, index circuit, duty flow
        m3/h and head kPa.
    """
    rows = []
    for p in item.pumps:
        setting = (
            "fixed speed, on its curve"
            if p.setpoint_kPa is None
            else f"{p.mode.replace('_', ' ')} at {p.setpoint_kPa:.1f} kPa"
        )
        rows.append(
            [
                p.name,
                setting,
                f"{p.needed_flow_m3_h:.3f}",
                f"{p.needed_head_kPa:.1f}",
                p.index_emitter or "--",
                f"{p.duty_flow_m3_h:.3f}",
                f"{p.duty_head_kPa:.1f}",
            ]
        )
    return rows


def scheme_cautions(item: SchemeHandover) -> list[str]:
    """What a designer must not miss about a scheme, as sentences.

    Parameters
    ----------
    item : SchemeHandover
        One scheme's content. [-]

    Returns
    -------
    list of str
        Starving and short radiators at design conditions, pipes over the
        sizing limits, time at the source's power limit, rooms never at
        setpoint; empty when none applies.
    """
    title = _scheme_title(item.scheme)
    notes = []
    pct = f"{100.0 * STARVING_FRACTION:.0f} %"
    starving = [r.id for r in item.radiators if r.starving]
    if starving:
        notes.append(
            f"{title}: {', '.join(starving)} get less than {pct} of their design "
            "flow at design conditions (heads open)."
        )
    short = [r.id for r in item.radiators if r.load_W > 0.0 and r.output_W < r.load_W]
    if short:
        notes.append(
            f"{title}: {', '.join(short)} give less than their share of the room "
            "load at design conditions."
        )
    over = [p.name for p in item.pipes if p.over_limit]
    if over:
        notes.append(
            f"{title}: {len(over)} pipe(s) over the sizing limits at design flow: "
            f"{', '.join(over)}."
        )
    if item.power_limit.intervals_s:
        notes.append(
            f"{title}: the heat source sits at its power limit for "
            f"{item.power_limit.total_s / 60.0:.0f} min "
            f"({100.0 * item.power_limit.share:.0f} % of the morning)."
        )
    cold = item.run.summary.rooms_not_reached
    if cold:
        names = {room.id: room.name for room in item.run.scenario.rooms}
        notes.append(
            f"{title}: never at setpoint in the morning simulated: "
            f"{', '.join(names[c] for c in cold)}."
        )
    return notes


def scheme_context(item: SchemeHandover, place: int) -> dict:
    """Everything the page shows for one scheme.

    Parameters
    ----------
    item : SchemeHandover
        One scheme's content. [-]
    place : int
        Its place in the ranking, from 1. [-]

    Returns
    -------
    dict
        Title, anchor, place, summary, figures (SVG), the three schedules,
        the scheme's cautions and its further sections (filling, venting and
        draining first, then the optional analyses').
    """
    anchor = f"scheme-{item.scheme}"
    summary = item.run.summary
    reached = sum(r.reached for r in summary.rooms)
    return {
        "anchor": anchor,
        "title": _scheme_title(item.scheme),
        "place": place,
        "summary": (
            f"{reached} of {len(summary.rooms)} rooms reach setpoint; peak source "
            f"power {summary.peak_source_power_W / W_PER_KW:.1f} kW; index circuit "
            f"{item.design.figures.index_emitter} needs "
            f"{item.design.figures.index_pressure_drop_kPa:.1f} kPa at design flow; "
            f"water content {item.design.figures.water_volume_L:.0f} L."
        ),
        "figures": [
            {
                "caption": "Schematic: supply and return, pipe sizes, pumps",
                "svg": figure_svg(plot_schematic(item.design.built), anchor + "-plan"),
            },
            {
                "caption": "Warm-up: room air temperatures on the morning simulated",
                "svg": figure_svg(plot_warmup(item.run), anchor + "-warmup"),
            },
            {
                "caption": "Pressure along supply and return at design conditions",
                "svg": figure_svg(plot_pressure(item.profile), anchor + "-pressure"),
            },
        ],
        "radiators": radiator_rows(item),
        "pipes": pipe_rows(item),
        "pumps": pump_rows(item),
        "cautions": scheme_cautions(item),
        "valves_as_given": "balance" not in item.extras,
        "extras": [
            installation_section(item),  # vents, drains, fill, obstacles, floor pumps
            *(
                {"notes": [], "tables": [], **EXTRA_SECTIONS[name](item.extras[name])}
                for name in EXTRA_SECTIONS
                if name in item.extras
            ),
        ],
    }


def page_context(handover: Handover, generated: str, version: str) -> dict:
    """The whole page's context.

    Parameters
    ----------
    handover : Handover
        The report's content. [-]
    generated : str
        When the page was made, as it is to be printed. [-]
    version : str
        simheat's version. [-]

    Returns
    -------
    dict
        ``scenario`` (name, description, source file), ``facts``, ``rooms``,
        ``comparison``, ``schemes``, ``cautions`` (general first), ``generated``,
        ``version``.
    """
    s = handover.scenario
    place = {name: i for i, name in enumerate(handover.comparison.ranking, start=1)}
    schemes = sorted(
        (scheme_context(item, place[item.scheme]) for item in handover.schemes),
        key=lambda c: c["place"],
    )
    cautions = [c for item in handover.schemes for c in scheme_cautions(item)]
    return {
        "scenario": {
            "name": s.name,
            "description": s.description,
            "source": Path(s.source_path).name,
        },
        "facts": house_facts(handover),
        "rooms": room_rows(handover),
        "comparison": comparison_context(handover),
        "schemes": schemes,
        "caution": CAUTION,
        "cautions": cautions,
        "generated": generated,
        "version": version,
    }
