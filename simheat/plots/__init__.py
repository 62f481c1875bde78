"""Figures of computed results, one function per kind, and :func:`save_figure`.

Every ``plot_<kind>(result, ax=None)`` draws a result that a simulation or an
analysis computed, returns a matplotlib Figure and never shows it; no figure
function solves or simulates. The figures of a stored run that ``simheat plot
--kind`` names are :data:`PLOT_KIND_NAMES`: ``warmup``, ``flows``, ``source`` and
``energy`` draw a :class:`~simheat.runs.run.Run`; ``pressure`` draws the
:class:`~simheat.analysis.pressure.PressureProfile` that
:func:`~simheat.analysis.pressure.design_pressure_profile` computes for the run.

Importing this package is light (no matplotlib, numba or scipy): the figure
functions are imported from their modules on first access, so the CLI can offer
the kind names as choices cheaply.
"""

from __future__ import annotations

import importlib
import sys
from pathlib import Path
from typing import TYPE_CHECKING, Any

from simheat.files import atomic_path

if TYPE_CHECKING:
    from matplotlib.figure import Figure

FIGURE_DPI = 150  # resolution of raster figures [dots per inch]
FIGURE_FORMATS = {".png": "png", ".svg": "svg"}

PLOT_KIND_NAMES: tuple[str, ...] = ("warmup", "flows", "pressure", "source", "energy")
"""Figure kinds of a run, in the order ``simheat plot --kind all`` writes them."""

SWEEP_PLOT_KIND_NAMES: tuple[str, ...] = ("metrics", "probability")
"""Figure kinds of a sweep file (:mod:`simheat.plots.sweep`)."""

# Figure functions by name -> module that defines them (imported on first access).
_FIGURE_MODULES = {
    "plot_warmup": "simheat.plots.warmup",
    "plot_flows": "simheat.plots.flows",
    "plot_pressure": "simheat.plots.pressure",
    "plot_source": "simheat.plots.source",
    "plot_energy": "simheat.plots.energy",
    "plot_scheme_comparison": "simheat.plots.comparison",
    "plot_interaction": "simheat.plots.interaction",
    "plot_throttle_response": "simheat.plots.interaction",
    "plot_schematic": "simheat.plots.schematic",
    "plot_sweep_metrics": "simheat.plots.sweep",
    "plot_setpoint_probability": "simheat.plots.sweep",
    "plot_readiness": "simheat.plots.readiness",
}

__all__ = [
    "FIGURE_FORMATS",
    "PLOT_KIND_NAMES",
    "SWEEP_PLOT_KIND_NAMES",
    "plot_energy",
    "plot_flows",
    "plot_interaction",
    "plot_pressure",
    "plot_readiness",
    "plot_scheme_comparison",
    "plot_schematic",
    "plot_setpoint_probability",
    "plot_source",
    "plot_sweep_metrics",
    "plot_throttle_response",
    "plot_warmup",
    "save_figure",
]


def __getattr__(name: str) -> Any:
    """Import a figure function from its module on first access (PEP 562)."""
    module = _FIGURE_MODULES.get(name)
    if module is None:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    return getattr(importlib.import_module(module), name)


def save_figure(fig: Figure, path: str | Path, *, overwrite: bool = False) -> Path:
    """Write a figure as PNG or SVG, chosen by the file suffix, and close it.

    Parameters
    ----------
    fig : matplotlib.figure.Figure
        The figure to write. [-]
    path : str or Path
        Output path ending in ``.png`` or ``.svg``. [-]
    overwrite : bool, optional
        Replace an existing file at ``path``. [-]

    Returns
    -------
    Path
        The path written.

    Raises
    ------
    ValueError
        When the suffix is neither ``.png`` nor ``.svg``.
    FileExistsError
        When ``path`` exists and ``overwrite`` is false (the file is left as it
        was; ``filename`` is the path).
    OutputError
        When the folder cannot be written.

    Notes
    -----
    The figure is written to a temporary name in the target directory and then
    renamed onto ``path`` (:func:`simheat.files.atomic_path`), so a crash never
    leaves a half-written figure under the final name.
    """
    path = Path(path)
    file_format = FIGURE_FORMATS.get(path.suffix.lower())
    if file_format is None:
        raise ValueError(
            f"{path}: figure suffix must be one of {', '.join(FIGURE_FORMATS)}, "
            f"got {path.suffix or 'none'!r}"
        )
    try:
        with atomic_path(path, overwrite=overwrite) as temporary:
            fig.savefig(
                temporary, format=file_format, dpi=FIGURE_DPI, bbox_inches="tight"
            )
    finally:
        _close(fig)
    return path


def _close(fig: Figure) -> None:
    """Release pyplot's reference to ``fig``, if pyplot manages it."""
    pyplot = sys.modules.get("matplotlib.pyplot")
    if pyplot is not None:
        pyplot.close(fig)
