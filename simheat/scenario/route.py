"""Scenario section ``[route]``: the pipe run of the house, floor by floor.

Pipe types are catalog names or custom tables. Positions along a run (where the
manifold sits, where split direct return divides it, where an obstacle stands)
and the heights of floors and tees are checked against the run's geometry by the
resolve step (:mod:`simheat.resolve.route`).

A tee may carry route detail: the header pipe of the stretch leading to it (a
tapered header), its height, and fittings beyond the fitting table's counts on
its emitter's circuit or on the header stretch. A floor may carry its height,
obstacles its pipes must pass, and the length of the drop to the floor below
used by the schemes that run one loop through the floors.
"""

from __future__ import annotations

from simheat.physics.pipe_catalog import PIPE_CATALOG
from simheat.scenario.common import (
    MAX_FLOOR,
    MAX_PIPE_LENGTH_M,
    MIN_FLOOR,
    length_m,
)
from simheat.scenario.fields import Table, shown
from simheat.scenario.fittings import NAMED_FITTINGS
from simheat.scenario.model import (
    OBSTACLE_PASSES,
    ExtraFittings,
    FloorRoute,
    Obstacle,
    PipeSpec,
    Route,
    Tee,
)

CUSTOM_OUTER_TO_INNER = 1.15  # outer/inner diameter of a custom pipe by default [-]
# Bore of a custom pipe: microbore copper of 6 mm outside has a 4.8 mm bore, the
# narrowest that carries heating water; 200 mm is a district main. [mm]
MIN_BORE_MM = 4.0
MAX_BORE_MM = 200.0
# Roughness of a custom pipe: at most 5 mm, and at most 5 % of the bore, where
# the Colebrook-White law stops describing real pipes (Moody's chart ends at a
# relative roughness of 0.05). [mm], [-]
MAX_ROUGHNESS_MM = 5.0
MAX_RELATIVE_ROUGHNESS = 0.05
# Outer diameter of a custom pipe: a wall thicker than the bore is not a heating
# pipe (thick steel of DN10 has an outer/inner ratio of about 1.4). [-]
MAX_OUTER_TO_INNER = 3.0
# Temperature around the pipes in unheated space: a ventilated crawl space on
# the coldest design day to a hot loft. [°C]
MIN_UNHEATED_C = -30.0
MAX_UNHEATED_C = 40.0
# Heights above (or below) the plant: beyond any house, catches unit mistakes. [m]
MAX_HEIGHT_M = 100.0
# How far pipes rise over or dip under an obstacle (a door is about 2.1 m). [m]
MAX_DETOUR_RISE_M = 10.0
MAX_EXTRA_ELBOWS = 100  # extra elbows on one pipe [-]
MAX_EXTRA_ZETA = 1e4  # extra local loss coefficient on one pipe [-]
# Elbows a pipe gains passing an obstacle: up, across, down, along (or out,
# along, back, along around it); common trade practice, our choice. [-]
DEFAULT_OBSTACLE_ELBOWS = 4


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
            raise t.fail(key, f"unknown pipe type {shown(value)}; known types: {known}")
        p = PIPE_CATALOG[value]
        return PipeSpec(value, p.inner_diameter_m, p.roughness_m, p.outer_diameter_m)
    if isinstance(value, dict):
        sub = Table(value, t.where(key), t.origin)
        d_mm = sub.number("inner_diameter_mm", low=MIN_BORE_MM, high=MAX_BORE_MM)
        spec = PipeSpec(
            sub.text("name", "custom"),
            d_mm / 1e3,
            sub.number(
                "roughness_mm",
                positive=True,
                high=min(MAX_ROUGHNESS_MM, MAX_RELATIVE_ROUGHNESS * d_mm),
            )
            / 1e3,
            sub.number(
                "outer_diameter_mm",
                d_mm * CUSTOM_OUTER_TO_INNER,
                positive=True,
                high=MAX_OUTER_TO_INNER * d_mm,
            )
            / 1e3,
        )
        sub.reject_unknown()
        if spec.outer_diameter_m <= spec.inner_diameter_m:
            raise sub.fail("outer_diameter_mm", "must exceed inner_diameter_mm")
        return spec
    raise t.fail(key, f"must be a pipe type name or a table, got {shown(value)}")


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
                raise tt.fail("emitter", f"unknown emitter {shown(name)}")
            if name in seen:
                raise tt.fail(
                    "emitter",
                    f"emitter {shown(name)} is already on the route at {seen[name]}",
                )
            seen[name] = tt.path
            tees.append(_read_tee(tt, emitter_ids[name]))
            tt.reject_unknown()
        floors.append(
            FloorRoute(
                floor=ft.integer("floor", low=MIN_FLOOR, high=MAX_FLOOR),
                riser_length_m=length_m(ft, "riser_length_m", 0.0, zero_allowed=True),
                header_pipe=read_pipe(ft, "header_pipe", t.data["header_pipe"]),
                branch_pipe=read_pipe(ft, "branch_pipe", t.data["branch_pipe"]),
                tees=tuple(tees),
                **_floor_layout(ft, tees, emitter_ids),
                **_floor_detail(ft),
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
        feed_length_m=length_m(t, "feed_length_m"),
        feed_pipe=feed,
        floors=tuple(sorted(floors, key=lambda f: f.floor)),
        insulated=t.boolean("insulated", True),
        unheated_space_temp_C=t.number(
            "unheated_space_temp_C", 10.0, low=MIN_UNHEATED_C, high=MAX_UNHEATED_C
        ),
        pipes_in_unheated_space=t.boolean("pipes_in_unheated_space", False),
    )
    t.reject_unknown()
    return route


def _floor_layout(ft: Table, tees: list[Tee], emitter_ids: dict[str, int]) -> dict:
    """A floor's optional ring closing, manifold position and split point."""
    keys: dict = {}
    if ft.has("closing_length_m"):
        keys["closing_length_m"] = length_m(ft, "closing_length_m")
    if ft.has("manifold_position_m"):
        keys["manifold_position_m"] = ft.number(
            "manifold_position_m", non_negative=True, high=MAX_PIPE_LENGTH_M
        )
    if ft.has("split_after_emitter"):
        name = ft.text("split_after_emitter")
        on_floor = {emitter_ids.get(name)} & {t.emitter for t in tees}
        if not on_floor:
            raise ft.fail(
                "split_after_emitter",
                f"emitter {shown(name)} is not on this floor's run",
            )
        keys["split_after"] = emitter_ids[name]
    return keys


def _read_tee(tt: Table, emitter: int) -> Tee:
    """One entry of a floor's ``tees``: lengths and the optional route detail."""
    keys: dict = {}
    for key in ("header_pipe", "return_header_pipe"):
        if tt.has(key):
            keys[key] = read_pipe(tt, key)
    if tt.has("height_m"):
        keys["height_m"] = tt.number("height_m", low=-MAX_HEIGHT_M, high=MAX_HEIGHT_M)
    return Tee(
        emitter,
        length_m(tt, "header_length_m", zero_allowed=True),
        length_m(tt, "branch_length_m"),
        fittings=read_extra_fittings(tt, ""),
        header_fittings=read_extra_fittings(tt, "header_"),
        **keys,
    )


def read_extra_fittings(t: Table, prefix: str) -> ExtraFittings:
    """``<prefix>extra_elbows``, ``<prefix>extra_zeta`` and ``<prefix>fittings``.

    Parameters
    ----------
    t : Table
        The table holding the keys (a tee). [-]
    prefix : str
        ``""`` for the emitter's circuit, ``"header_"`` for the header stretch. [-]

    Returns
    -------
    ExtraFittings
        Extra elbows [-], extra zeta [-] and fittings named from the table.
    """
    named_key = f"{prefix}fittings"
    names = t.raw(named_key, [])
    if not isinstance(names, list):
        raise t.fail(named_key, f"must be a list of fitting names, got {shown(names)}")
    for i, name in enumerate(names):
        if name not in NAMED_FITTINGS:
            known = ", ".join(NAMED_FITTINGS)
            raise t.fail(
                f"{named_key}[{i}]", f"unknown fitting {shown(name)}; known: {known}"
            )
    return ExtraFittings(
        elbows=t.integer(f"{prefix}extra_elbows", 0, low=0, high=MAX_EXTRA_ELBOWS),
        zeta=t.number(
            f"{prefix}extra_zeta", 0.0, non_negative=True, high=MAX_EXTRA_ZETA
        ),
        named=tuple(names),
    )


def _floor_detail(ft: Table) -> dict:
    """A floor's optional height, obstacles and drop length."""
    keys: dict = {}
    if ft.has("height_m"):
        keys["height_m"] = ft.number("height_m", low=-MAX_HEIGHT_M, high=MAX_HEIGHT_M)
    if ft.has("drop_length_m"):
        keys["drop_length_m"] = length_m(ft, "drop_length_m")
    keys["obstacles"] = tuple(
        _read_obstacle(ot, i) for i, ot in enumerate(ft.tables("obstacles", []))
    )
    return keys


_OBSTACLE_SIZE_KEY = {
    "over": "height_m",
    "under": "depth_m",
    "around": "extra_length_m",
}


def _read_obstacle(ot: Table, i: int) -> Obstacle:
    """One ``[[route.floors.obstacles]]`` table."""
    passed = ot.text("passed", choices=set(OBSTACLE_PASSES))
    size_key = _OBSTACLE_SIZE_KEY[passed]
    for key in _OBSTACLE_SIZE_KEY.values():
        if key != size_key and ot.has(key):
            raise ot.fail(
                key, f"does not apply to an obstacle passed {passed!r}; give {size_key}"
            )
    if passed == "around":
        rise = 0.0
        extra = ot.number(size_key, positive=True, high=MAX_PIPE_LENGTH_M)
    else:
        rise = ot.number(size_key, positive=True, high=MAX_DETOUR_RISE_M)
        extra = 2.0 * rise
    obstacle = Obstacle(
        name=ot.text("name", f"obstacle {i + 1}"),
        position_m=ot.number("position_m", positive=True, high=MAX_PIPE_LENGTH_M),
        passed=passed,
        rise_m=rise,
        extra_length_m=extra,
        elbows=ot.integer(
            "elbows", DEFAULT_OBSTACLE_ELBOWS, low=0, high=MAX_EXTRA_ELBOWS
        ),
        where=ot.path,
    )
    ot.reject_unknown()
    return obstacle
