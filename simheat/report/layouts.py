"""Layouts: every scheme's pipe, fittings, index circuit and pump, as data and text."""

from __future__ import annotations

from collections.abc import Mapping
from pathlib import Path

from simheat.analysis.layouts import LayoutDesigns
from simheat.hydraulics.heights import FILL_MARGIN_KPA
from simheat.hydraulics.sizing import DesignFigures
from simheat.report.caution import CAUTION

__all__ = ["FITTING_WORDS", "layouts_dict", "layouts_text", "segments_text"]

FITTING_WORDS = {
    "tee": ("tee", "tees"),
    "elbow": ("elbow", "elbows"),
    "manifold_connection": ("manifold connection", "manifold connections"),
    "diverter_tee": ("diverter tee", "diverter tees"),
    "low_loss_header": ("low-loss header", "low-loss headers"),
    "elbow_45": ("45° elbow", "45° elbows"),
    "ball_valve": ("ball valve", "ball valves"),
    "tee_run": ("extra tee run", "extra tee runs"),
    "tee_branch": ("extra tee branch", "extra tee branches"),
    "radiator": ("extra radiator body", "extra radiator bodies"),
    "heat_source": ("extra heat exchanger", "extra heat exchangers"),
}
"""Singular and plural of each fitting kind, for text."""
MAX_LISTED_OVER_LIMIT = 3  # runs above the sizing limits named in text
MAX_LISTED_POINTS = 4  # air vents or drains named in text


def _fitting_words(kind: str, n: int) -> str:
    words = FITTING_WORDS.get(kind, (kind.replace("_", " "),) * 2)
    return f"{n} {words[n != 1]}"


def layouts_dict(
    layouts: LayoutDesigns, figure_paths: Mapping[str, Path] | None = None
) -> dict:
    """Layouts as JSON-ready data.

    Parameters
    ----------
    layouts : LayoutDesigns
        Result of :func:`simheat.analysis.layouts.design_layouts`. [-]
    figure_paths : mapping of str to Path, optional
        Schematic written per scheme; added to each scheme as ``figure``. [-]

    Returns
    -------
    dict
        ``scenario``; ``sizing_limits``: ``{mode, header_velocity_max_m_per_s,
        branch_velocity_max_m_per_s, gradient_max_Pa_per_m}``; ``schemes``: the
        design figures of each scheme
        (:meth:`~simheat.hydraulics.sizing.DesignFigures.to_dict`); ``caution``.
    """
    limits = layouts.sizing
    paths = figure_paths or {}
    return {
        "scenario": layouts.scenario_name,
        "sizing_limits": {
            "mode": limits.mode,
            "header_velocity_max_m_per_s": limits.header_velocity_max_m_s,
            "branch_velocity_max_m_per_s": limits.branch_velocity_max_m_s,
            "gradient_max_Pa_per_m": limits.gradient_max_Pa_m,
        },
        "schemes": [
            {
                **d.figures.to_dict(),
                **({"figure": str(paths[d.scheme])} if d.scheme in paths else {}),
            }
            for d in layouts.designs
        ],
        "caution": CAUTION,
    }


def figures_text(figures: DesignFigures, every_point: bool = False) -> str:
    """One scheme's design figures as an indented block of text.

    Parameters
    ----------
    figures : DesignFigures
        The scheme's figures. [-]
    every_point : bool, optional
        Name every air vent and drain; by default the first
        :data:`MAX_LISTED_POINTS` of each, the rest counted. [-]

    Returns
    -------
    str
        Scheme name, then pipe, fittings, index circuit, pump duties, water
        volume, the sizing check, heights (static head, cold fill pressure, air
        vents, drains) and each obstacle's cost, one per line.
    """
    f = figures
    total = sum(f.pipe_length_m.values())
    lines = [f"{f.scheme}"]
    sizes = ", ".join(
        f"{name} {length:.1f} m" for name, length in f.pipe_length_m.items()
    )
    lines.append(f"  pipe:          {total:.1f} m ({sizes})")
    counts = ", ".join(
        _fitting_words(kind, n) for kind, n in f.fitting_count.items() if n
    )
    lines.append(f"  fittings:      {counts}")
    lines.append(
        f"  index circuit: {f.index_emitter}, {f.index_pressure_drop_kPa:.1f} kPa "
        "at design flows"
    )
    for p in f.pumps:
        lines.append(
            f"  pump duty:     {p.pump} {p.flow_m3_h:.2f} m3/h at {p.head_kPa:.1f} kPa"
        )
    lines.append(f"  water volume:  {f.water_volume_L:.1f} L")
    if f.over_limit:
        shown = f.over_limit[:MAX_LISTED_OVER_LIMIT]
        worst = ", ".join(f"{name} ({v:.2f} m/s, {g:.0f} Pa/m)" for name, v, g in shown)
        rest = len(f.over_limit) - len(shown)
        more = f" and {rest} more" if rest > 0 else ""
        lines.append(
            f"  sizing:        {len(f.over_limit)} run(s) above the limits: "
            f"{worst}{more}"
        )
    else:
        lines.append("  sizing:        every run within the limits")
    if f.heights is not None:
        lines += _heights_lines(f, every_point)
    for o in f.obstacles:
        vents = f", {o.air_vents} air vent(s)" if o.air_vents else ""
        drains = f", {o.drains} drain(s)" if o.drains else ""
        lines.append(
            f"  obstacle:      {o.name} ({o.passed}): {o.pipes} pipe(s) pass it, "
            f"+{o.extra_length_m:.1f} m pipe, +{o.extra_elbows} elbows, "
            f"+{o.extra_pressure_drop_kPa:.2f} kPa at design flow{vents}{drains}"
        )
    return "\n".join(lines)


def _points_text(points, every_point: bool) -> str:
    listed = len(points) if every_point else MAX_LISTED_POINTS
    shown = ", ".join(f"{p.where} ({p.height_m:.1f} m)" for p in points[:listed])
    rest = len(points) - listed
    more = f" and {rest} more (one scheme at a time names all)" if rest > 0 else ""
    return f"{len(points)}: {shown}{more}"


def _heights_lines(f: DesignFigures, every_point: bool) -> list[str]:
    """Heights, static head, fill pressure, vents and drains of one scheme."""
    h = f.heights
    return [
        f"  heights:       highest {h.highest_m:.2f} m, lowest {h.lowest_m:.2f} m "
        f"above the plant; static head at the lowest point {h.static_head_kPa:.1f} "
        "kPa",
        f"  cold fill:     at least {h.fill_pressure_kPa:.0f} kPa at the plant "
        f"(highest point + {FILL_MARGIN_KPA:g} kPa, common trade practice); "
        f"{h.lowest_point_pressure_kPa:.0f} kPa at the lowest point",
        f"  air vents:     {_points_text(h.high_points, every_point)}",
        f"  drains:        {_points_text(h.low_points, every_point)}",
    ]


def segments_text(figures: DesignFigures) -> str:
    """The header segments of one scheme, one per line, as sized.

    Parameters
    ----------
    figures : DesignFigures
        The scheme's figures. [-]

    Returns
    -------
    str
        Link, pipe, length, design flow, velocity and friction gradient of each
        feed, riser, header and loop pipe.
    """
    width = max((len(seg.link) for seg in figures.header_segments), default=4)
    lines = ["  header segments (pipe, length, design flow, velocity, gradient):"]
    for seg in figures.header_segments:
        lines.append(
            f"    {seg.link:<{width}}  {seg.pipe:<10}{seg.length_m:6.1f} m"
            f"{seg.flow_kg_h:7.0f} kg/h{seg.velocity_m_s:6.2f} m/s"
            f"{seg.gradient_Pa_m:6.0f} Pa/m"
        )
    return "\n".join(lines)


def layouts_text(
    layouts: LayoutDesigns, figure_paths: Mapping[str, Path] | None = None
) -> str:
    """Layouts as plain text: the sizing rule, then one block per scheme.

    Parameters
    ----------
    layouts : LayoutDesigns
        Result of :func:`simheat.analysis.layouts.design_layouts`. [-]
    figure_paths : mapping of str to Path, optional
        Schematic written per scheme; named under its block. [-]

    Returns
    -------
    str
        The text, each block followed by a blank line (no caution; callers add
        it). A single scheme's block names every air vent and drain.
    """
    limits = layouts.sizing
    paths = figure_paths or {}
    lines = [
        f"{layouts.scenario_name}: piping schemes at design flows",
        f"sizing limits ({limits.mode} sizes; common trade practice): "
        f"{limits.header_velocity_max_m_s:g} m/s in headers, "
        f"{limits.branch_velocity_max_m_s:g} m/s in branches, "
        f"{limits.gradient_max_Pa_m:g} Pa/m\n",
    ]
    one = len(layouts.designs) == 1
    for d in layouts.designs:
        lines.append(figures_text(d.figures, every_point=one))
        if layouts.list_segments:
            lines.append(segments_text(d.figures))
        if d.scheme in paths:
            lines.append(f"  schematic:     {paths[d.scheme]}")
        lines.append("")
    return "\n".join(lines)
