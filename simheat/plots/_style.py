"""Shared look of simheat figures: palette, line styles, sizes, new axes, marks.

Every figure module takes its colours and line styles from here. Colours are the
Okabe-Ito palette, so every figure reads the same with the common colour-vision
deficiencies. Meaning is never carried by colour alone: supply and return also
differ in line style, and flags also differ in hatching or marker.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

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
SETPOINT_COLOUR = "0.35"  # dark grey: setpoints are shared by rooms, not one room's
FIGURE_SIZE_IN = (10.0, 6.0)  # [in]
GRID_STYLE = {"linewidth": 0.4, "alpha": 0.5}
J_PER_KWH = 3.6e6  # [J/kWh]
S_PER_H = 3600.0  # [s/h]
CLOCK_AXIS_LABEL = "Clock time"


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


def clock_text(start_clock_s: float, hours: float) -> str:
    """Clock time ``HH:MM`` of a time in hours since the start of a run.

    Parameters
    ----------
    start_clock_s : float
        Clock time of the start of the run, seconds after midnight. [s]
    hours : float
        Time since the start of the run. [h]

    Returns
    -------
    str
        ``HH:MM``, rounded to the minute, wrapping at midnight.

    Examples
    --------
    >>> clock_text(5 * 3600.0, 1.5)
    '06:30'
    """
    total_min = int(round(start_clock_s / 60.0 + hours * 60.0))
    return f"{total_min // 60 % 24:02d}:{total_min % 60:02d}"


def clock_axis(ax: Axes, run: Run) -> None:
    """Label an x axis in hours since the start of ``run`` with clock times.

    The data stay in hours since the start; ticks fall on whole clock hours (half
    hours for runs of three hours or less) and read ``HH:MM``.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Axes with time in hours since the start on x. [-]
    run : Run
        The run plotted (its schedule's start clock). [-]
    """
    from matplotlib.ticker import FixedLocator, FuncFormatter

    start_s = run.scenario.schedule.start_clock_s
    end_h = float(run.time_s[-1]) / S_PER_H
    step_h = 0.5 if end_h <= 3.0 else 1.0
    first_h = (-start_s / S_PER_H) % step_h  # first whole (half) clock hour
    ticks = np.arange(first_h, end_h + 1e-9, step_h)
    ax.xaxis.set_major_locator(FixedLocator(ticks))
    ax.xaxis.set_major_formatter(FuncFormatter(lambda h, _: clock_text(start_s, h)))
    ax.set_xlabel(CLOCK_AXIS_LABEL)
