"""Layouts: every scheme's pipe, fittings, index circuit and pump, as data and text."""

from __future__ import annotations

from collections.abc import Mapping
from pathlib import Path

from simheat.analysis.layouts import LayoutDesigns
from simheat.hydraulics.sizing import DesignFigures
from simheat.report.caution import CAUTION

__all__ = ["FITTING_WORDS", "layouts_dict", "layouts_text"]

FITTING_WORDS = {
    "tee": ("tee", "tees"),
    "elbow": ("elbow", "elbows"),
    "manifold_connection": ("manifold connection", "manifold connections"),
    "diverter_tee": ("diverter tee", "diverter tees"),
    "low_loss_header": ("low-loss header", "low-loss headers"),
}
"""Singular and plural of each fitting kind, for text."""
MAX_LISTED_OVER_LIMIT = 3  # runs above the sizing limits named in text


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


def figures_text(figures: DesignFigures) -> str:
    """One scheme's design figures as an indented block of text.

    Parameters
    ----------
    figures : DesignFigures
        The scheme's figures. [-]

    Returns
    -------
    str
        Scheme name, then pipe, fittings, index circuit, pump duties, water
        volume and the sizing check, one per line.
    """
    f = figures
    total = sum(f.pipe_length_m.values())
    lines = [f"{f.scheme}"]
    sizes = ", ".join(
        f"{name} {length:.1f} m" for name, length in f.pipe_length_m.items()
    )
    lines.append(f"  pipe:          {total:.1f} m ({sizes})")
    counts = ", ".join(
        f"{n} {FITTING_WORDS[kind][n != 1]}" for kind, n in f.fitting_count.items() if n
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
        it).
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
    for d in layouts.designs:
        lines.append(figures_text(d.figures))
        if d.scheme in paths:
            lines.append(f"  schematic:     {paths[d.scheme]}")
        lines.append("")
    return "\n".join(lines)
