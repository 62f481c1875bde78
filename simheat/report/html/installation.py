"""The hand-over page's section on filling, venting and draining a scheme as laid.

From the scheme's design figures (:mod:`simheat.hydraulics.heights`,
:mod:`simheat.hydraulics.detours`) and its run: the cold fill pressure and the
static head, every high point that needs an automatic air vent and every low
point that needs a drain, what each obstacle on the route costs, and how the
floor pumps of a ``_floor_pumps`` scheme ran under their floor controls. The
section has the shape of the optional analyses' sections
(:mod:`simheat.report.html.sections`): a title, notes and tables of text.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from simheat.hydraulics.heights import FILL_MARGIN_KPA

if TYPE_CHECKING:
    from simheat.analysis.handover import SchemeHandover

__all__ = ["installation_section"]

S_PER_H = 3600.0  # [s/h]


def _points_rows(heights) -> list[list[str]]:
    rows = []
    for kind, points in (
        ("air vent", heights.high_points),
        ("drain", heights.low_points),
    ):
        for p in points:
            rows.append([kind, p.where, f"{p.height_m:.2f}", p.obstacle or "--"])
    return rows


def _obstacle_rows(obstacles) -> list[list[str]]:
    return [
        [
            o.name,
            o.passed,
            str(o.pipes),
            f"{o.extra_length_m:.1f}",
            str(o.extra_elbows),
            f"{o.extra_pressure_drop_kPa:.2f}",
            str(o.air_vents),
            str(o.drains),
        ]
        for o in obstacles
    ]


def _floor_pump_notes(item: SchemeHandover) -> list[str]:
    run = item.run
    duration_h = run.scenario.simulation.duration_s / S_PER_H
    controls = run.scenario.layout.floor_controls
    notes = []
    for name, record in run.floor_pumps.items():
        floor = int(name.removeprefix("pump:floor"))
        control = controls.get(floor)
        if control is None or not control.switched:
            continue
        notes.append(
            f"{name} ran {record['on_time_s'] / S_PER_H:.2f} h of the "
            f"{duration_h:.2f} h simulated and started or stopped "
            f"{record['switches']} times under its floor control."
        )
    return notes


def installation_section(item: SchemeHandover) -> dict:
    """Filling, venting and draining of one scheme, and its obstacles' cost.

    Parameters
    ----------
    item : SchemeHandover
        One scheme's content (its design figures and run). [-]

    Returns
    -------
    dict
        ``title``, ``notes`` (fill pressure and static head; each switched
        floor pump's time running and switches) and ``tables`` (vents and
        drains; obstacles, when the route has any).
    """
    figures = item.design.figures
    heights = figures.heights
    notes, tables = [], []
    if heights is not None:
        notes.append(
            f"Fill cold to at least {heights.fill_pressure_kPa:.0f} kPa at the plant: "
            f"the static head of the highest point, {heights.highest_m:.2f} m above "
            f"the plant, plus {FILL_MARGIN_KPA:g} kPa (common trade practice). The "
            f"lowest point, {heights.lowest_m:.2f} m, then sits at "
            f"{heights.lowest_point_pressure_kPa:.0f} kPa; the static head between "
            f"them is {heights.static_head_kPa:.1f} kPa."
        )
        tables.append(
            {
                "caption": "High points, where air collects (an automatic air vent "
                "each), and low points (a drain each), from the pipe geometry; "
                "radiators are vented by their own bleed valves. Height above the "
                "plant.",
                "head": ["Needs", "Where", "Height [m]", "Obstacle"],
                "rows": _points_rows(heights),
            }
        )
    if figures.obstacles:
        tables.append(
            {
                "caption": "What each obstacle on the route costs this scheme: "
                "summed over the pipes passing it, the extra pressure drop at "
                "design flow.",
                "head": [
                    "Obstacle",
                    "Passed",
                    "Pipes",
                    "Extra pipe [m]",
                    "Extra elbows",
                    "Extra drop [kPa]",
                    "Vents",
                    "Drains",
                ],  # fmt: skip
                "rows": _obstacle_rows(figures.obstacles),
            }
        )
    notes += _floor_pump_notes(item)
    return {"title": "Filling, venting and draining", "notes": notes, "tables": tables}
