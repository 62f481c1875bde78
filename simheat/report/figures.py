"""Figures of a run by kind name: what ``simheat plot --kind`` draws.

Each kind gets what its figure function draws: the run itself; for ``pressure``
the design-point profile that
:func:`~simheat.analysis.pressure.design_pressure_profile` computes from the run;
for ``flows`` also the steady flow split at design conditions
(:func:`~simheat.analysis.flows.steady_flow_split`), by which starving is judged.
Each of those is one steady flow solve. The figure functions in
:mod:`simheat.plots` only draw.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import TYPE_CHECKING

from simheat.analysis.flows import steady_flow_split
from simheat.analysis.pressure import design_pressure_profile
from simheat.plots.energy import plot_energy
from simheat.plots.flows import plot_flows
from simheat.plots.pressure import plot_pressure
from simheat.plots.source import plot_source
from simheat.plots.warmup import plot_warmup
from simheat.runs.run import Run

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

__all__ = ["RUN_FIGURES", "run_figure"]


def _pressure(run: Run, ax: Axes | None = None) -> Figure:
    return plot_pressure(design_pressure_profile(run), ax=ax)


def _flows(run: Run, ax: Axes | None = None) -> Figure:
    return plot_flows(run, design=steady_flow_split(run.scenario, run.scheme), ax=ax)


RUN_FIGURES: dict[str, Callable[..., Figure]] = {
    "warmup": plot_warmup,
    "flows": _flows,
    "pressure": _pressure,
    "source": plot_source,
    "energy": plot_energy,
}
"""Kind name -> ``f(run, ax=None)`` returning the Figure, in the order of
:data:`simheat.plots.PLOT_KIND_NAMES`."""


def run_figure(run: Run, kind: str, ax: Axes | None = None) -> Figure:
    """Draw one figure of a run, computing what the figure needs first.

    Parameters
    ----------
    run : Run
        A simulated or loaded run. [-]
    kind : str
        One of :data:`simheat.plots.PLOT_KIND_NAMES`. [-]
    ax : matplotlib.axes.Axes, optional
        Axes to draw into; a new figure is made when omitted. [-]

    Returns
    -------
    matplotlib.figure.Figure
        The figure (never shown).

    Raises
    ------
    ValueError
        For an unknown kind.
    ConvergenceError
        When the pressure profile's flow solve does not converge.
    """
    draw = RUN_FIGURES.get(kind)
    if draw is None:
        raise ValueError(
            f"kind: unknown figure kind {kind!r}; known: {', '.join(RUN_FIGURES)}"
        )
    return draw(run, ax=ax)
