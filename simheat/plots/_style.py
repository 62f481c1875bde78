"""Shared look of simheat figures: palette, line styles, sizes, new axes, marks.

Every figure module takes its colours and line styles from here. Colours are the
Okabe-Ito palette, so every figure reads the same with the common colour-vision
deficiencies. Meaning is never carried by colour alone: supply and return also
differ in line style, and flags also differ in hatching or marker.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

    from simheat.runs.run import Run

# Okabe-Ito qualitative palette, distinguishable with the common colour-vision
# deficiencies (M. Okabe, K. Ito, "Color Universal Design", 2008). Yellow is left
# last because it is faint on white.
PALETTE = (
    "#0072B2",  # blue
    "#D55E00",  # vermillion
    "#009E73",  # bluish green
    "#CC79A7",  # reddish purple
    "#E69F00",  # orange
    "#56B4E9",  # sky blue
    "#000000",  # black
    "#F0E442",  # yellow
)
# Room air-temperature line styles, cycled once the palette is used up (dashed is
# kept for setpoints).
AIR_LINE_STYLES = ("-", "-.", ":")
SUPPLY_COLOUR = PALETTE[1]  # vermillion: the hot line
RETURN_COLOUR = PALETTE[0]  # blue: the cooled line
ACCENT_COLOUR = PALETTE[2]  # bluish green: what is fine
WARNING_COLOUR = PALETTE[3]  # reddish purple: what needs attention
NEUTRAL_COLOUR = "#7f7f7f"  # grey: references, limits, schedule marks, outdoor
FIGURE_SIZE_IN = (10.0, 6.0)  # [in]
GRID_STYLE = {"linewidth": 0.4, "alpha": 0.5}
J_PER_KWH = 3.6e6  # [J/kWh]


def room_style(index: int) -> tuple[str, str]:
    """Colour and air line style of the room at ``index``.

    Parameters
    ----------
    index : int
        Position of the room in the scenario. [-]

    Returns
    -------
    tuple of str
        Colour (hex) and matplotlib line style; rooms past the eighth reuse the
        colours with the next line style.

    Examples
    --------
    >>> room_style(0)
    ('#0072B2', '-')
    >>> room_style(8)
    ('#0072B2', '-.')
    """
    colour = PALETTE[index % len(PALETTE)]
    style = AIR_LINE_STYLES[(index // len(PALETTE)) % len(AIR_LINE_STYLES)]
    return colour, style


def new_axes(ax: Axes | None, figsize: tuple[float, float] = FIGURE_SIZE_IN):
    """Return ``(figure, axes)``: the given axes and its figure, or a new pair.

    Parameters
    ----------
    ax : matplotlib.axes.Axes or None
        Axes to draw into, or None for a new figure. [-]
    figsize : tuple of float
        Size of a new figure. [in]

    Returns
    -------
    tuple
        The figure and the axes.

    Notes
    -----
    New figures are built without pyplot, so no window opens under any backend.
    """
    if ax is not None:
        return ax.figure, ax
    from matplotlib.figure import Figure

    fig: Figure = Figure(figsize=figsize, layout="constrained")
    return fig, fig.add_subplot()


def scheme_title(run: Run, what: str) -> str:
    """Two-line title: the scenario's name, then what is shown and the scheme.

    Parameters
    ----------
    run : Run
        The run plotted. [-]
    what : str
        What the figure shows, e.g. ``"energy books"``. [-]

    Returns
    -------
    str
        The title text.
    """
    return f"{run.scenario.name}\n{what}, {run.scheme.replace('_', ' ')} scheme"


def mark_comfort_start(ax: Axes, run: Run) -> None:
    """Draw a dotted vertical line at the start of comfort, when it is not at 0.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Axes with time in hours on x. [-]
    run : Run
        The run plotted. [-]
    """
    comfort_start_h = run.scenario.schedule.comfort_start_s / 3600.0
    if comfort_start_h > 0.0:
        ax.axvline(
            comfort_start_h, color=NEUTRAL_COLOUR, linewidth=0.8, linestyle=":",
            gid="comfort_start",
        )  # fmt: skip


def minus_sign(text: str) -> str:
    """Replace hyphen-minus by the typographic minus sign in a number's text.

    Parameters
    ----------
    text : str
        Text holding numbers. [-]

    Returns
    -------
    str
        The text with U+2212 for each ``-``.

    Examples
    --------
    >>> minus_sign("-0.3 %")
    '\u22120.3 %'
    """
    return text.replace("-", "\u2212")
