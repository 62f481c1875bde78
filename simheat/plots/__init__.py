"""plots."""

from __future__ import annotations

import sys
from pathlib import Path

from matplotlib.figure import Figure

FIGURE_DPI = 150  # resolution of raster figures [dots per inch]
FIGURE_FORMATS = {".png": "png", ".svg": "svg"}


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
