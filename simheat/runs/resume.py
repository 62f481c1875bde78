"""Resuming an interrupted set of runs: which existing run files can be kept.

``simheat run --all-schemes --resume`` keeps a scheme's run file when it is
complete and belongs to the same scenario: it loads cleanly (sealed and sound,
see :mod:`simheat.runs.checks`), holds that scheme, and embeds exactly the
scenario text being run. Run files are written whole or not at all (a temporary
name and a rename), so a run killed half-way leaves the schemes it finished and
nothing for the others.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from simheat.errors import RunFileError
from simheat.runs.run import Run
from simheat.runs.store import load_run
from simheat.scenario.model import Scenario

__all__ = ["Kept", "kept_run", "reusable_run"]


def reusable_run(path: str | Path, scenario: Scenario, scheme: str) -> Run | None:
    """The run stored at ``path`` if it is complete and of this scenario and scheme.

    Parameters
    ----------
    path : str or Path
        Where the scheme's run file would be. [-]
    scenario : Scenario
        The scenario about to be run; its text is compared with the file's. [-]
    scheme : str
        The piping scheme. [-]

    Returns
    -------
    Run or None
        The loaded run; None when there is no file, it does not load (damaged,
        not a run file, a schema this simheat does not read), or it holds another
        scheme or another scenario text (any change to the file, comments
        included, counts: the text is what the run file records).
    """
    path = Path(path)
    if not path.is_file():
        return None
    try:
        run = load_run(path)
    except RunFileError:
        return None
    if run.scheme != scheme or run.scenario.text != scenario.text:
        return None
    return run


@dataclass(frozen=True)
class Kept:
    """A run kept by ``--resume``, and whether its figure must be drawn again.

    Attributes
    ----------
    run : Run
        The loaded run. [-]
    redraw_figure : bool
        The figure is missing, or older than the run file (so not its figure). [-]
    """

    run: Run
    redraw_figure: bool


def kept_run(
    run_path: str | Path, figure_path: str | Path, scenario: Scenario, scheme: str
) -> Kept | None:
    """The run a resumed ``simheat run`` keeps for one scheme, if any.

    Parameters
    ----------
    run_path, figure_path : str or Path
        The scheme's run file and warm-up figure. [-]
    scenario : Scenario
        The scenario about to be run. [-]
    scheme : str
        The piping scheme. [-]

    Returns
    -------
    Kept or None
        The run (see :func:`reusable_run`) and whether its figure needs drawing;
        None when the scheme must be simulated.
    """
    run = reusable_run(run_path, scenario, scheme)
    if run is None:
        return None
    figure_path = Path(figure_path)
    redraw = (
        not figure_path.is_file()
        or figure_path.stat().st_mtime < Path(run_path).stat().st_mtime
    )
    return Kept(run, redraw)
