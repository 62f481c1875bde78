"""Figures by kind name: what ``simheat plot --kind`` draws.

Each kind of a run gets what its figure function draws: the run itself; for
``pressure`` the design-point profile that
:func:`~simheat.analysis.pressure.design_pressure_profile` computes from the run;
for ``flows`` also the steady flow split at design conditions
(:func:`~simheat.analysis.flows.steady_flow_split`), by which starving is judged.
Each of those is one steady flow solve. A sweep file gets the sweep figures
(:func:`plot_sweep_file`): the metrics against the parameters and, for a random
sweep, the probability of rooms at setpoint, both computed from the file's table
by :mod:`simheat.batch.analysis`. The figure functions in :mod:`simheat.plots`
only draw.
"""

from __future__ import annotations

import errno
from collections.abc import Callable
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np

from simheat.analysis.flows import steady_flow_split
from simheat.analysis.pressure import design_pressure_profile
from simheat.batch.analysis import metric_points, setpoint_probability
from simheat.batch.sweepfile import SweepResults, read_sweep
from simheat.batch.table import DONE
from simheat.errors import RunFileError
from simheat.files import output_folder
from simheat.plots import save_figure
from simheat.plots.energy import plot_energy
from simheat.plots.flows import plot_flows
from simheat.plots.pressure import plot_pressure
from simheat.plots.source import plot_source
from simheat.plots.sweep import (
    SWEEP_PLOT_KINDS,
    plot_setpoint_probability,
    plot_sweep_metrics,
)
from simheat.plots.warmup import plot_warmup
from simheat.report.numbers import S_PER_MIN, clock
from simheat.runs.run import Run
from simheat.scenario import parse_scenario

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

__all__ = ["RUN_FIGURES", "plot_sweep_file", "run_figure", "sweep_figure"]

ALL_KINDS = "all"  # every figure a file has
# Points of the time grid over which the probability of rooms at setpoint is
# drawn, from the start of comfort to the end of the run. [-]
PROBABILITY_TIME_POINTS = 361


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


def sweep_figure(results: SweepResults, kind: str) -> Figure:
    """Draw one figure of a sweep, computing what the figure shows first.

    Parameters
    ----------
    results : SweepResults
        A sweep file read back, with at least one finished variant. [-]
    kind : str
        ``metrics`` (each metric against each parameter) or ``probability``
        (share of variants with each room at setpoint over time; a random
        sweep). [-]

    Returns
    -------
    matplotlib.figure.Figure
        The figure (never shown).

    Raises
    ------
    ValueError
        For a kind that is not a sweep figure.
    ScenarioError
        When the probability figure's base scenario (stored in the file) no
        longer loads.
    """
    if kind == "metrics":
        return plot_sweep_metrics(metric_points(results))
    if kind != "probability":
        raise ValueError(
            f"kind: unknown sweep figure {kind!r}; known: {', '.join(SWEEP_PLOT_KINDS)}"
        )
    base = parse_scenario(results.base_text, origin=f"{results.path} (base)")
    schedule = base.schedule
    horizon_s = base.simulation.duration_s - schedule.comfort_start_s
    time_min = np.linspace(0.0, horizon_s / S_PER_MIN, PROBABILITY_TIME_POINTS)
    return plot_setpoint_probability(
        time_min,
        setpoint_probability(results, time_min),
        title=results.name,
        comfort_clock=clock(schedule.start_clock_s, schedule.comfort_start_s),
        n_variants={
            s: sum(r["status"] == DONE and r["scheme"] == s for r in results.rows)
            for s in results.schemes
        },
    )


def plot_sweep_file(
    sweep_path: Path,
    kind: str = ALL_KINDS,
    out_dir: Path | None = None,
    file_format: str = "png",
    overwrite: bool = False,
) -> list[Path]:
    """Read a sweep file, draw its figures and save them (``simheat plot``).

    Parameters
    ----------
    sweep_path : Path
        The sweep file. [-]
    kind : str, optional
        ``metrics``, ``probability`` or ``all`` (probability only for a random
        sweep). [-]
    out_dir : Path, optional
        Directory of the figures (default: the sweep file's), made if
        missing; each is named ``<sweep stem>_<kind>.<file_format>``. [-]
    file_format : str, optional
        ``png`` or ``svg``. [-]
    overwrite : bool, optional
        Replace existing figure files. [-]

    Returns
    -------
    list of Path
        The files written, in the order drawn.

    Raises
    ------
    RunFileError
        When the file is not a sweep file, ``kind`` is not a sweep figure,
        ``probability`` is asked of a sweep that is not random, or no variant
        finished.
    FileExistsError
        When a figure file exists and ``overwrite`` is false (``filename`` set
        to it); checked before anything is drawn.
    OutputError
        When ``out_dir`` cannot be made or written.
    """
    sweep_path = Path(sweep_path)
    results = read_sweep(sweep_path)
    if kind == ALL_KINDS:
        kinds = ["metrics", *(["probability"] if results.mode == "random" else [])]
    elif kind not in SWEEP_PLOT_KINDS:
        raise RunFileError(
            f"{sweep_path}: --kind {kind} draws a run file; a sweep file has kinds "
            f"{', '.join(SWEEP_PLOT_KINDS)}"
        )
    elif kind == "probability" and results.mode != "random":
        raise RunFileError(
            f"{sweep_path}: --kind probability needs a random sweep, this is a "
            f"{results.mode} sweep"
        )
    else:
        kinds = [kind]
    if results.count(DONE) == 0:
        raise RunFileError(f"{sweep_path}: no finished variant to draw")
    out_dir = sweep_path.parent if out_dir is None else Path(out_dir)
    targets = {k: out_dir / f"{sweep_path.stem}_{k}.{file_format}" for k in kinds}
    if not overwrite:
        for path in targets.values():
            if path.exists():
                raise FileExistsError(errno.EEXIST, "file exists", str(path))
    output_folder(out_dir)
    return [
        save_figure(sweep_figure(results, k), path, overwrite=overwrite)
        for k, path in targets.items()
    ]
