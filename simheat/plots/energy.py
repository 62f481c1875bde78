"""Energy books figure: where the source's heat went, cumulative over the morning."""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from simheat.plots._style import (
    ACCENT_COLOUR,
    GRID_STYLE,
    J_PER_KWH,
    NEUTRAL_COLOUR,
    RETURN_COLOUR,
    SUPPLY_COLOUR,
    WARNING_COLOUR,
    clock_axis,
    mark_comfort_start,
    minus_sign,
    new_axes,
    scheme_title,
)

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

    from simheat.runs.run import Run

# Columns of Run.energy_J (cumulative counters, see simheat.runs.store).
SOURCE_COLUMN, ROOMS_COLUMN, PIPES_COLUMN, UNHEATED_COLUMN = 0, 1, 2, 3


def energy_series_kWh(run: Run) -> dict[str, np.ndarray]:
    """Cumulative energy books of a run over time.

    Parameters
    ----------
    run : Run
        A simulated run. [-]

    Returns
    -------
    dict of str to ndarray
        ``source``, ``rooms`` (heat given to the rooms by the emitters),
        ``pipes`` (pipe losses), ``pipes_to_rooms`` and ``pipes_to_unheated``
        (the pipe losses split into heat given to the rooms the pipes run
        through and heat lost to unheated space; absent for run files written
        before the split was counted) and ``stored`` (change of heat stored in
        water and radiator metal since the start), each cumulative from the
        start of the run. [kWh]

    Notes
    -----
    The books close when ``source = rooms + pipes + stored`` at every time, and
    ``pipes = pipes_to_rooms + pipes_to_unheated``.
    """
    energy = np.asarray(run.energy_J) / J_PER_KWH
    stored = np.asarray(run.stored_heat_J) / J_PER_KWH
    books = {
        "source": energy[:, SOURCE_COLUMN],
        "rooms": energy[:, ROOMS_COLUMN],
        "pipes": energy[:, PIPES_COLUMN],
        "stored": stored - stored[0],
    }
    if energy.shape[1] > UNHEATED_COLUMN:
        books["pipes_to_unheated"] = energy[:, UNHEATED_COLUMN]
        books["pipes_to_rooms"] = energy[:, PIPES_COLUMN] - energy[:, UNHEATED_COLUMN]
    return books


def plot_energy(run: Run, ax: Axes | None = None) -> Figure:
    """Plot the energy books: cumulative source heat and where it went.

    Cumulative heat from the source, heat given to the rooms by the radiators,
    heat the pipes give to the rooms they run through, heat the pipes lose to
    unheated space, and the change of heat stored in the water and radiator
    metal, in kWh against clock time, with the sum of the uses dotted over the
    source line (they coincide when the books close). Pipe heat that warms a
    room is not wasted; heat lost to unheated space is. The title states the
    closure error of the whole run. A run file written before the split was
    counted draws one line of pipe losses instead.

    Parameters
    ----------
    run : Run
        A simulated run. [-]
    ax : matplotlib.axes.Axes, optional
        Axes to draw into; a new figure is made when omitted. [-]

    Returns
    -------
    matplotlib.figure.Figure
        The figure. Lines carry the gids ``"energy:source"``, ``"energy:rooms"``,
        ``"energy:pipes_to_rooms"`` and ``"energy:pipes_to_unheated"`` (or
        ``"energy:pipes"`` without the split), ``"energy:stored"`` and
        ``"energy:sum"``. [kWh]
    """
    fig, ax = new_axes(ax)
    time_h = np.asarray(run.time_s) / 3600.0
    books = energy_series_kWh(run)
    styles = {
        "source": ("Heat from the source", "black", "-", 2.2),
        "rooms": ("Heat to the rooms from the radiators", ACCENT_COLOUR, "-", 1.6),
    }
    if "pipes_to_unheated" in books:
        styles["pipes_to_rooms"] = (
            "Heat to the rooms from the pipes", ACCENT_COLOUR, (0, (1, 1.5)), 1.8,
        )  # fmt: skip
        styles["pipes_to_unheated"] = (
            "Heat lost to unheated space from the pipes", SUPPLY_COLOUR, "--", 1.6,
        )  # fmt: skip
    else:
        styles["pipes"] = ("Pipe losses", SUPPLY_COLOUR, "--", 1.6)
    styles["stored"] = ("Change of stored heat", RETURN_COLOUR, "-.", 1.6)
    for key, (label, colour, style, width) in styles.items():
        ax.plot(
            time_h, books[key], color=colour, linestyle=style, linewidth=width,
            label=label, gid=f"energy:{key}",
        )  # fmt: skip
    ax.plot(
        time_h, books["rooms"] + books["pipes"] + books["stored"],
        color=WARNING_COLOUR, linestyle=":", linewidth=1.4,
        label="Radiators + pipes + stored", gid="energy:sum",
    )  # fmt: skip
    ax.axhline(0.0, color=NEUTRAL_COLOUR, linewidth=0.6)
    mark_comfort_start(ax, run)
    ax.set_xlim(float(time_h[0]), float(time_h[-1]))
    clock_axis(ax, run)
    ax.set_ylabel("Cumulative energy [kWh]")
    ax.grid(True, **GRID_STYLE)
    books_total = run.summary.energy
    closure = minus_sign(f"{books_total.balance_error_pct:.3f} %")
    ax.set_title(
        scheme_title(run, "energy books")
        + f"; source {books_total.source_J / J_PER_KWH:.2f} kWh,"
        + f" closure error {closure}"
    )
    ax.legend(loc="upper left", fontsize=8, frameon=False)
    return fig
