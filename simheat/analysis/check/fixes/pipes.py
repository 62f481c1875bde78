"""Pipe-size fixes: the next catalog size up where the pressure goes."""

from __future__ import annotations

from simheat.analysis.check.edits import ScenarioEdit
from simheat.analysis.check.fixes.core import Fix, FixFinder
from simheat.analysis.check.starving import Cause
from simheat.hydraulics.layouts.pipes import pipe_series

# The pipe groups taking the most pressure that are tried. [-]
PIPE_GROUPS_TRIED = 2


def pipe_key(finder: FixFinder, role: str) -> tuple | None:
    """Scenario key setting the pipe type of a segment role on the emitter's path.

    Parameters
    ----------
    finder : FixFinder
        The starving emitter and its scheme. [-]
    role : str
        The segment's role (``feed``, ``riser``, ``header`` ...). [-]

    Returns
    -------
    tuple or None
        Key path (``route.feed_pipe``, the floor's ``header_pipe``,
        ``layout.home_run_pipe``); None for a role no key sets.
    """
    if role in ("feed", "riser"):
        return ("route", "feed_pipe")
    if role in ("header", "loop", "bypass", "manifold_feed"):
        return (*finder.floor_path, "header_pipe")
    if role == "home_run":
        return ("layout", "home_run_pipe")
    return None


def current_pipe(finder: FixFinder, key: tuple) -> str:
    """Pipe type name the scenario sets at ``key``.

    Parameters
    ----------
    finder : FixFinder
        The starving emitter and its scheme. [-]
    key : tuple
        A key path from :func:`pipe_key`. [-]

    Returns
    -------
    str
        The catalog name in force there.
    """
    if key == ("route", "feed_pipe"):
        return finder.scenario.route.feed_pipe.name
    if key[-1] == "header_pipe":
        return finder.floor.header_pipe.name
    home = finder.scenario.layout.home_run_pipe
    return (home or finder.floor.branch_pipe).name


def pipe_fixes(finder: FixFinder, cause: Cause) -> list[Fix]:
    """Next size up on the pipe groups taking the most pressure.

    Parameters
    ----------
    finder : FixFinder
        The starving emitter and its scheme. [-]
    cause : Cause
        Where the emitter's pressure goes (its segments' drops in Pa). [-]

    Returns
    -------
    list of Fix
        One fix per group of the :data:`PIPE_GROUPS_TRIED` groups taking the
        most pressure (a group: the pipes one scenario key sets), and both
        together when neither alone lifts the radiator; none when the scenario
        sizes pipes automatically.
    """
    if finder.scenario.layout.sizing.mode == "auto":
        return []
    taken: dict[tuple, float] = {}
    for seg in cause.segments:
        key = pipe_key(finder, seg.role)
        if key is not None:
            taken[key] = taken.get(key, 0.0) + seg.dp_Pa
    groups = sorted(taken, key=lambda k: -taken[k])[:PIPE_GROUPS_TRIED]
    edits = []
    for key in groups:
        name = current_pipe(finder, key)
        series = [p.name for p in pipe_series(name)]
        if name in series and series.index(name) + 1 < len(series):
            edits.append(ScenarioEdit(key, series[series.index(name) + 1]))
    fixes = [
        finder.fix(
            "pipe_size",
            f"next size up: {e.text()} (takes "
            f"{taken[e.path] / 1e3:.1f} kPa of this circuit's pressure)",
            [e],
        )
        for e in edits
    ]
    if len(edits) > 1 and not any(f.lifts for f in fixes):
        fixes.append(
            finder.fix(
                "pipe_size",
                "next size up on both: " + "; ".join(e.text() for e in edits),
                edits,
            )
        )
    return fixes
