"""Figures of a run, one function per kind, and :func:`save_figure`.

Every ``plot_<kind>(run, ax=None)`` returns a matplotlib Figure and never shows it;
:data:`PLOT_KINDS` maps the kind names of ``simheat plot --kind`` to them.
matplotlib itself is imported on the first plot, so importing this package (as the
CLI does for its choices) stays cheap.
"""

from __future__ import annotations

import sys
from collections.abc import Callable
from pathlib import Path
from typing import TYPE_CHECKING

from simheat.plots.energy import plot_energy
from simheat.plots.flows import plot_flows
from simheat.plots.pressure import plot_pressure
from simheat.plots.source import plot_source
from simheat.plots.warmup import plot_warmup

if TYPE_CHECKING:
    from matplotlib.figure import Figure

FIGURE_DPI = 150  # resolution of raster figures [dots per inch]
FIGURE_FORMATS = {".png": "png", ".svg": "svg"}

# Figure kinds by name, in the order ``--kind all`` writes them.
PLOT_KINDS: dict[str, Callable[..., Figure]] = {
    "warmup": plot_warmup,
    "flows": plot_flows,
    "pressure": plot_pressure,
    "source": plot_source,
    "energy": plot_energy,
}

__all__ = [
    "FIGURE_FORMATS",
    "PLOT_KINDS",
    "plot_energy",
    "plot_flows",
    "plot_pressure",
    "plot_source",
    "plot_warmup",
    "save_figure",
]


def save_figure(fig: Figure, path: str | Path) -> Path:
    """Write a figure as PNG or SVG, chosen by the file suffix, and close it.

    Parameters
    ----------
    fig : matplotlib.figure.Figure
        The figure to write. [-]
    path : str or Path
        Output path ending in ``.png`` or ``.svg``. [-]

    Returns
    -------
    Path
        The path written.

    Raises
    ------
    ValueError
        When the suffix is neither ``.png`` nor ``.svg``.
    """
    path = Path(path)
    file_format = FIGURE_FORMATS.get(path.suffix.lower())
    if file_format is None:
        raise ValueError(
            f"{path}: figure suffix must be one of {', '.join(FIGURE_FORMATS)}, "
            f"got {path.suffix or 'none'!r}"
        )
    fig.savefig(path, format=file_format, dpi=FIGURE_DPI, bbox_inches="tight")
    pyplot = sys.modules.get("matplotlib.pyplot")
    if pyplot is not None:
        pyplot.close(fig)  # release pyplot's reference, if it manages this figure
    return path
