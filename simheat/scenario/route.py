"""Scenario section ``[route]``: the pipe run of the house, floor by floor.

Pipe types are catalog names or custom tables. Positions along a run (where the
manifold sits, where split direct return divides it) are checked against the
run's geometry by the resolve step (:mod:`simheat.resolve.route`).
"""

from __future__ import annotations

from simheat.physics.pipe_catalog import PIPE_CATALOG
from simheat.scenario.common import MAX_FLOOR, MAX_PIPE_LENGTH_M
from simheat.scenario.fields import Table
from simheat.scenario.model import FloorRoute, PipeSpec, Route, Tee

CUSTOM_OUTER_TO_INNER = 1.15  # outer/inner diameter of a custom pipe by default [-]


def read_pipe(t: Table, key: str, default=None) -> PipeSpec:
    """A pipe type: a catalog name, or a table with the bore and roughness in mm.

    Parameters
    ----------
    t : Table
        The table holding the key. [-]
    key : str
        The key (``header_pipe``, ``branch_pipe``, ...). [-]
    default : str or dict, optional
        Value used when the key is absent; required when None. [-]

    Returns
    -------
    PipeSpec
        Name, inner diameter [m], roughness [m] and outer diameter. [m]
    """
    value = t.raw(key, default)
    if isinstance(value, str):
        if value not in PIPE_CATALOG:
            known = ", ".join(sorted(PIPE_CATALOG))
            raise t.fail(key, f"unknown pipe type {value!r}; known types: {known}")
        p = PIPE_CATALOG[value]
        return PipeSpec(value, p.inner_diameter_m, p.roughness_m, p.outer_diameter_m)
    if isinstance(value, dict):
        sub = Table(value, t.where(key), t.origin)
        d_m = sub.number("inner_diameter_mm", positive=True, high=200.0) / 1e3
        spec = PipeSpec(
            sub.text("name", "custom"),
            d_m,
            sub.number("roughness_mm", positive=True, high=5.0) / 1e3,
            sub.number(
                "outer_diameter_mm", d_m * 1e3 * CUSTOM_OUTER_TO_INNER, positive=True
            )
            / 1e3,
        )
        sub.reject_unknown()
        if spec.outer_diameter_m <= spec.inner_diameter_m:
            raise sub.fail("outer_diameter_mm", "must exceed inner_diameter_mm")
        return spec
    raise t.fail(key, f"must be a pipe type name or a table, got {value!r}")


def read_route(t: Table, emitter_ids: dict[str, int]) -> Route:
    """The ``[route]`` table: feed, floors with their tees, insulation.

    Every emitter is visited exactly once; each floor appears once. Floors are
    returned in ascending order of their number; each remembers its table's
    place in the file (``FloorRoute.where``) for messages.

    Parameters
    ----------
    t : Table
        The ``[route]`` table.
    emitter_ids : dict of str to int
        Index of each emitter id. [-]

    Returns
    -------
    Route
        The route in SI units.
    """
    # Validated here so errors name the route-level key; floors inherit them.
    read_pipe(t, "header_pipe")
    read_pipe(t, "branch_pipe")
    feed = read_pipe(t, "feed_pipe", t.data.get("header_pipe"))
    seen: dict[str, str] = {}
    floors = []
    for ft in t.tables("floors", min_len=1):
        tees = []
        for tt in ft.tables("tees", min_len=1):
            name = tt.text("emitter")
            if name not in emitter_ids:
                raise tt.fail("emitter", f"unknown emitter {name!r}")
            if name in seen:
                raise tt.fail(
                    "emitter",
                    f"emitter {name!r} is already on the route at {seen[name]}",
                )
            seen[name] = tt.path
            tees.append(
                Tee(
                    emitter_ids[name],
                    tt.number(
                        "header_length_m", non_negative=True, high=MAX_PIPE_LENGTH_M
                    ),
                    tt.number("branch_length_m", positive=True, high=MAX_PIPE_LENGTH_M),
                )
            )
            tt.reject_unknown()
        floors.append(
            FloorRoute(
                floor=ft.integer("floor", low=-5, high=MAX_FLOOR),
                riser_length_m=ft.number(
                    "riser_length_m", 0.0, non_negative=True, high=MAX_PIPE_LENGTH_M
                ),
                header_pipe=read_pipe(ft, "header_pipe", t.data["header_pipe"]),
                branch_pipe=read_pipe(ft, "branch_pipe", t.data["branch_pipe"]),
                tees=tuple(tees),
                **_floor_layout(ft, tees, emitter_ids),
                where=ft.path,
            )
        )
        ft.reject_unknown()
    missing = [name for name in emitter_ids if name not in seen]
    if missing:
        raise t.fail(
            "floors", f"the route does not visit emitter(s) {', '.join(missing)}"
        )
    numbers = [f.floor for f in floors]
    if len(set(numbers)) != len(numbers):
        raise t.fail("floors", f"each floor may appear once, got floors {numbers}")
    route = Route(
        feed_length_m=t.number("feed_length_m", positive=True, high=MAX_PIPE_LENGTH_M),
        feed_pipe=feed,
        floors=tuple(sorted(floors, key=lambda f: f.floor)),
        insulated=t.boolean("insulated", True),
        unheated_space_temp_C=t.number(
            "unheated_space_temp_C", 10.0, low=-30.0, high=40.0
        ),
        pipes_in_unheated_space=t.boolean("pipes_in_unheated_space", False),
    )
    t.reject_unknown()
    return route


def _floor_layout(ft: Table, tees: list[Tee], emitter_ids: dict[str, int]) -> dict:
    """A floor's optional ring closing, manifold position and split point."""
    keys: dict = {}
    if ft.has("closing_length_m"):
        keys["closing_length_m"] = ft.number(
            "closing_length_m", positive=True, high=MAX_PIPE_LENGTH_M
        )
    if ft.has("manifold_position_m"):
        keys["manifold_position_m"] = ft.number(
            "manifold_position_m", non_negative=True, high=MAX_PIPE_LENGTH_M
        )
    if ft.has("split_after_emitter"):
        name = ft.text("split_after_emitter")
        on_floor = {emitter_ids.get(name)} & {t.emitter for t in tees}
        if not on_floor:
            raise ft.fail(
                "split_after_emitter", f"emitter {name!r} is not on this floor's run"
            )
        keys["split_after"] = emitter_ids[name]
    return keys
