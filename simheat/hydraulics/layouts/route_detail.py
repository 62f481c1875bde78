"""Route detail on the built links: tapered headers, fittings where they are, detours.

Run by :meth:`Builder.finish <simheat.hydraulics.layouts.builder.Builder.finish>`
before pipes are sized, on every scheme alike:

- a header pipe lying within one tee's stretch of the run (from the previous tee
  or the floor's start to that tee) takes the tee's ``header_pipe`` (the return
  line its ``return_header_pipe``) and gains the tee's ``header_fittings``;
- an emitter's circuit gains its tee's ``fittings``;
- every pipe laid along a run (headers, loops, manifold feeds, home-run pairs,
  return pipes back along the run) passing an obstacle gains the detour's pipe
  and elbows (for each of the pipes it stands for: both legs of a home-run
  pair), and lists the detour with its height in ``detours``.

Pipes spanning several tees' stretches (the return of reverse return back along
the run, a manifold feed, a home-run pair) keep the floor's header pipe and get
no stretch's fittings: those sit on the header of that stretch alone.
"""

from __future__ import annotations

from collections import Counter
from collections.abc import Callable, Sequence

from simheat.hydraulics.layouts.records import Detour, LinkSpec
from simheat.resolve.route import obstacles_passed, run_intervals, stretch_index
from simheat.scenario.model import ExtraFittings, Route, Tee

__all__ = ["HEADER_STRETCH_ROLES", "apply_route_detail"]

HEADER_STRETCH_ROLES = frozenset({"header", "loop", "manifold_feed"})
"""Roles of the pipes that are the header of a stretch of the run."""


def _add_fittings(count: Counter, spec: LinkSpec, extra: ExtraFittings) -> None:
    """Add extra fittings to a link and to the layout's fitting count."""
    for kind, n in extra.counts().items():
        spec.fittings[kind] = spec.fittings.get(kind, 0) + n
        count[kind] += n
    spec.extra_zeta += extra.zeta


def _header_stretch(count: Counter, spec: LinkSpec, tee: Tee, returning: bool) -> None:
    """A header pipe within one tee's stretch: its pipe and fittings."""
    pipe = tee.header_pipe
    if returning and tee.return_header_pipe is not None:
        pipe = tee.return_header_pipe
    if pipe is not None:
        spec.pipe = pipe
    _add_fittings(count, spec, tee.header_fittings)


def apply_route_detail(
    route: Route,
    links: Sequence[LinkSpec],
    returning: Callable[[LinkSpec], bool],
    run_height_m: Callable[[int, float], float],
    count: Counter,
) -> None:
    """Apply the route's detail to built links (in place).

    Parameters
    ----------
    route : Route
        The scenario's route (tees with their detail, obstacles). [-]
    links : sequence of LinkSpec
        Every link of the layout; changed in place. [-]
    returning : callable
        Whether a link lies on the return line (it takes a return header
        pipe). [-]
    run_height_m : callable
        Height of a floor's run above the plant, ``(floor index, position)``.
        [m]
    count : Counter
        The layout's fitting counts by kind; extra fittings are added. [-]
    """
    floors = route.floors
    tee_of = {t.emitter: t for f in floors for t in f.tees}
    for spec in links:
        if spec.emitter >= 0:
            _add_fittings(count, spec, tee_of[spec.emitter].fittings)
        if spec.along is None:
            continue
        along = spec.along
        floor = floors[along.floor]
        if along.goes_forward:
            intervals = run_intervals(floor, along.from_m, along.to_m)
        else:
            intervals = run_intervals(floor, along.to_m, along.from_m)
        if spec.role in HEADER_STRETCH_ROLES:
            i = stretch_index(floor, intervals)
            if i is not None:
                _header_stretch(count, spec, floor.tees[i], returning(spec))
        passed = obstacles_passed(floor, intervals)
        # detours in order from the link's a end to its b end
        for obstacle in passed if along.goes_forward else passed[::-1]:
            elbows = spec.pipes * obstacle.elbows
            spec.length_m += spec.pipes * obstacle.extra_length_m
            spec.fittings["elbow"] = spec.fittings.get("elbow", 0) + elbows
            count["elbow"] += elbows
            offset = {"over": 1.0, "under": -1.0, "around": 0.0}[obstacle.passed]
            height = run_height_m(along.floor, obstacle.position_m)
            spec.detours.append(Detour(obstacle, height + offset * obstacle.rise_m))
