"""Scenario keys of the piping schemes: ``schemes`` and the ``[layout]`` table.

``[layout]`` holds what the route geometry does not: the one-pipe diverter tees,
home-run and low-loss header pipes, the primary and floor pumps of the
``_floor_pumps`` schemes, fitting overrides and the pipe sizing rule.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import replace

from simheat.scenario.circuits import read_circuit_valves
from simheat.scenario.common import MAX_FLOOR, MIN_FLOOR, length_m
from simheat.scenario.fields import Table, shown
from simheat.scenario.fittings import FITTING_KEYS, FittingTable
from simheat.scenario.floor_control import read_floor_control
from simheat.scenario.model import (
    FloorControl,
    LayoutOptions,
    Pump,
    Route,
    SizingLimits,
    ValveType,
)
from simheat.scenario.plant import read_pump
from simheat.scenario.route import read_pipe
from simheat.schemes import SCHEME_NAMES, unknown_scheme

DEFAULT_SCHEMES = ["direct_return", "reverse_return"]
DEFAULT_LOW_LOSS_HEADER_LENGTH_M = 0.5
# Share of a one-pipe loop's flow a diverter tee sends through its emitter:
# diverter tees are sold for about 30-50 %; below 5 % the emitter is all but
# bypassed, above 95 % the bypass is all but shut. [-]
MIN_ONE_PIPE_SHARE = 0.05
MAX_ONE_PIPE_SHARE = 0.95
# Local loss coefficients: the largest fitting in a heating circuit (a tight
# diverter tee, a closed-down regulating valve body) stays below a few hundred. [-]
MAX_ZETA = 1000.0
# Sizing limits: velocities of 0.05-10 m/s (the sizing rule's common values are
# 0.5-1.5 m/s), friction gradients of 10-10000 Pa/m (common values 100-300). [m/s],
# [Pa/m]
MIN_SIZING_VELOCITY_M_S = 0.05
MAX_SIZING_VELOCITY_M_S = 10.0
MIN_SIZING_GRADIENT_PA_M = 10.0
MAX_SIZING_GRADIENT_PA_M = 1e4


def read_schemes(t: Table) -> tuple[str, ...]:
    """The top-level ``schemes`` list: known scheme names, at least one.

    Parameters
    ----------
    t : Table
        The top-level table. [-]

    Returns
    -------
    tuple of str
        Names of :data:`simheat.schemes.SCHEME_NAMES`, in the file's order,
        each once.
    """
    names = t.raw("schemes", DEFAULT_SCHEMES)
    if not isinstance(names, list) or not names:
        raise t.fail("schemes", "must be a non-empty list of scheme names")
    for i, name in enumerate(names):
        if not isinstance(name, str) or name not in SCHEME_NAMES:
            raise t.fail(f"schemes[{i}]", unknown_scheme(name))
        if name in names[:i]:
            raise t.fail(
                f"schemes[{i}]",
                f"scheme {shown(name)} is listed twice "
                f"(also schemes[{names.index(name)}])",
            )
    return tuple(names)


def read_layout(
    t: Table,
    route: Route,
    duration_s: float,
    valve_types: dict[str, ValveType] | None = None,
    emitter_ids: tuple[str, ...] = (),
    room_ids: dict[str, int] | None = None,
    emitter_rooms: Sequence[int] = (),
) -> LayoutOptions:
    """The ``[layout]`` table: one-pipe tees, pipes, pumps, fittings, sizing.

    Parameters
    ----------
    t : Table
        The ``[layout]`` table (empty when absent).
    route : Route
        The route: floor pumps must name its floors. [-]
    duration_s : float
        Simulated time, the latest pump stop time. [s]
    valve_types : dict of str to ValveType, optional
        The scenario's preset tables (circuit valves name one). [-]
    emitter_ids : tuple of str
        Emitter ids in scenario order (circuit names may hold one). [-]
    room_ids : dict of str to int, optional
        Index of each room id, for floor thermostats' reference rooms. [-]
    emitter_rooms : sequence of int
        Room of each emitter, to find the rooms of a floor. [-]

    Returns
    -------
    LayoutOptions
        The layout settings in SI units.
    """
    if t.has("one_pipe_emitter_share") and t.has("one_pipe_tee_zeta"):
        raise t.fail(
            "one_pipe_emitter_share",
            "give only one of one_pipe_emitter_share or one_pipe_tee_zeta, got both",
        )
    share = None
    if t.has("one_pipe_emitter_share"):
        share = t.number("one_pipe_emitter_share")
        if share < MIN_ONE_PIPE_SHARE:
            raise t.fail(
                "one_pipe_emitter_share",
                f"must be >= {MIN_ONE_PIPE_SHARE:g} (near 0 the diverter tees pass "
                f"no water to the emitters), got {share:g}",
            )
        if share > MAX_ONE_PIPE_SHARE:
            raise t.fail(
                "one_pipe_emitter_share",
                f"must be <= {MAX_ONE_PIPE_SHARE:g} (near 1 the bypass is shut), "
                f"got {share:g}",
            )
    tee_zeta = None
    if t.has("one_pipe_tee_zeta"):
        tee_zeta = t.number("one_pipe_tee_zeta", non_negative=True, high=MAX_ZETA)
    floor_pumps, floor_controls = _floor_pumps(
        t, route, duration_s, room_ids or {}, emitter_rooms
    )
    fittings = _fittings(t.table("fittings", {}))
    sizing = _sizing(t.table("sizing", {}))
    circuit_valves = (
        read_circuit_valves(
            t.table("circuit_valves"), route, valve_types or {}, emitter_ids
        )
        if t.has("circuit_valves")
        else None
    )
    layout = LayoutOptions(
        one_pipe_emitter_share=share,
        one_pipe_tee_zeta=tee_zeta,
        home_run_pipe=read_pipe(t, "home_run_pipe") if t.has("home_run_pipe") else None,
        low_loss_header_pipe=(
            read_pipe(t, "low_loss_header_pipe")
            if t.has("low_loss_header_pipe")
            else None
        ),
        low_loss_header_length_m=length_m(
            t, "low_loss_header_length_m", DEFAULT_LOW_LOSS_HEADER_LENGTH_M
        ),
        primary_pump=(
            read_pump(t.table("primary_pump"), duration_s)
            if t.has("primary_pump")
            else None
        ),
        floor_pumps=floor_pumps,
        fittings=fittings,
        sizing=sizing,
        circuit_valves=circuit_valves,
        floor_controls=floor_controls,
    )
    t.reject_unknown()
    return layout


def _floor_pumps(
    t: Table,
    route: Route,
    duration_s: float,
    room_ids: dict[str, int],
    emitter_rooms: Sequence[int],
) -> tuple[dict[int, Pump], dict[int, FloorControl]]:
    """``[[layout.floor_pumps]]``: one pump per floor of the route, in file order.

    Also each pump's floor control (:mod:`simheat.scenario.floor_control`).
    """
    floors = {f.floor for f in route.floors}
    pumps: dict[int, Pump] = {}
    controls: dict[int, FloorControl] = {}
    for pt in t.tables("floor_pumps", []):
        number = pt.integer("floor", low=MIN_FLOOR, high=MAX_FLOOR)
        if number not in floors:
            raise pt.fail("floor", f"no floor {number} on the route")
        if number in pumps:
            raise pt.fail("floor", f"floor {number} already has a pump")
        control = read_floor_control(pt, number, route, room_ids, emitter_rooms)
        if control is not None:
            controls[number] = control
        pumps[number] = read_pump(pt, duration_s)
    return pumps, controls


def _fittings(ft: Table) -> FittingTable:
    """``[layout.fittings]``: the default fitting table with the given entries."""
    overrides: dict[str, float] = {}
    for key, is_count in FITTING_KEYS.items():
        if ft.has(key):
            if is_count:
                overrides[key] = ft.integer(key, low=0, high=100)
            else:
                overrides[key] = ft.number(key, non_negative=True, high=MAX_ZETA)
    ft.reject_unknown()
    return replace(FittingTable(), **overrides)


def _sizing(st: Table) -> SizingLimits:
    """``[layout.sizing]``: given sizes or automatic, with the limits."""
    defaults = SizingLimits()
    sizing = SizingLimits(
        mode=st.text("mode", defaults.mode, choices={"given", "auto"}),
        header_velocity_max_m_s=st.number(
            "header_velocity_max_m_per_s",
            defaults.header_velocity_max_m_s,
            low=MIN_SIZING_VELOCITY_M_S,
            high=MAX_SIZING_VELOCITY_M_S,
        ),
        branch_velocity_max_m_s=st.number(
            "branch_velocity_max_m_per_s",
            defaults.branch_velocity_max_m_s,
            low=MIN_SIZING_VELOCITY_M_S,
            high=MAX_SIZING_VELOCITY_M_S,
        ),
        gradient_max_Pa_m=st.number(
            "gradient_max_Pa_per_m",
            defaults.gradient_max_Pa_m,
            low=MIN_SIZING_GRADIENT_PA_M,
            high=MAX_SIZING_GRADIENT_PA_M,
        ),
    )
    st.reject_unknown()
    return sizing
