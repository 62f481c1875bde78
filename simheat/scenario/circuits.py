"""Circuit names and the ``[layout.circuit_valves]`` table.

Circuits are the parts of a layout that share a manifold, a header or a riser
and can each get a balancing valve on their return:

- ``primary``: the loop through the heat source to the low-loss header (the
  ``_floor_pumps`` schemes);
- ``floor<N>``: floor N's circuit where it leaves the riser or the low-loss
  header (in a one-pipe scheme, the floor's loop);
- ``floor<N>:ahead`` and ``floor<N>:back``: the two circuits of split direct
  return at floor N's manifold, running forward and backward along the route;
- ``floor<N>:<emitter id>``: an emitter's home-run pair at floor N's manifold.

The layout builders name their circuits with the functions here, and the loader
checks names in the scenario against the route.
"""

from __future__ import annotations

from simheat.scenario.fields import Table, shown
from simheat.scenario.model import CircuitValves, Route, ValveType

PRIMARY_CIRCUIT = "primary"
SPLIT_SIDES = ("ahead", "back")


def floor_circuit(floor: int) -> str:
    """Name of floor ``floor``'s circuit.

    Parameters
    ----------
    floor : int
        Storey number. [-]

    Returns
    -------
    str
        ``floor<N>``.

    Examples
    --------
    >>> floor_circuit(1)
    'floor1'
    """
    return f"floor{floor}"


def manifold_circuit(floor: int, branch: str) -> str:
    """Name of a circuit at floor ``floor``'s manifold.

    Parameters
    ----------
    floor : int
        Storey number. [-]
    branch : str
        ``ahead`` or ``back`` (split direct return), or the emitter id of a
        home-run pair. [-]

    Returns
    -------
    str
        ``floor<N>:<branch>``.

    Examples
    --------
    >>> manifold_circuit(0, "ahead")
    'floor0:ahead'
    """
    return f"{floor_circuit(floor)}:{branch}"


def circuit_names(route: Route, emitter_ids: tuple[str, ...]) -> set[str]:
    """Every circuit name some scheme can have on this route.

    Parameters
    ----------
    route : Route
        The route (floors and the emitters on them). [-]
    emitter_ids : tuple of str
        Emitter ids in scenario order. [-]

    Returns
    -------
    set of str
        ``primary``, each floor's circuit, its split sides and its home-run
        pairs.
    """
    names = {PRIMARY_CIRCUIT}
    for floor in route.floors:
        names.add(floor_circuit(floor.floor))
        branches = [*SPLIT_SIDES, *(emitter_ids[t.emitter] for t in floor.tees)]
        names.update(manifold_circuit(floor.floor, b) for b in branches)
    return names


def read_circuit_valves(
    t: Table,
    route: Route,
    valve_types: dict[str, ValveType],
    emitter_ids: tuple[str, ...],
) -> CircuitValves:
    """The ``[layout.circuit_valves]`` table: valve type, circuits, presets.

    Parameters
    ----------
    t : Table
        The table. [-]
    route : Route
        The route: circuit names must name its floors and emitters. [-]
    valve_types : dict of str to ValveType
        The scenario's preset tables. [-]
    emitter_ids : tuple of str
        Emitter ids in scenario order. [-]

    Returns
    -------
    CircuitValves
        The valve type, the circuits that get one (None: all) and the presets
        [-] by circuit name.
    """
    valve_type = t.text("valve_type")
    if valve_type not in valve_types:
        known = ", ".join(sorted(valve_types)) or "none, add a [valve_types] table"
        raise t.fail(
            "valve_type",
            f"unknown valve type {shown(valve_type)}; known types: {known}",
        )
    known_names = circuit_names(route, emitter_ids)
    circuits = None
    if t.has("circuits"):
        value = t.raw("circuits")
        if not isinstance(value, list) or not value:
            raise t.fail(
                "circuits", f"must be a non-empty list of names, got {shown(value)}"
            )
        for i, name in enumerate(value):
            _check_name(t, f"circuits[{i}]", name, known_names)
        circuits = tuple(value)
    presets = {}
    table = valve_types[valve_type].presets
    pt = t.table("presets", {})
    for name in list(pt.data):
        _check_name(pt, name, name, known_names)
        value = pt.number(name)
        if not table[0] <= value <= table[-1]:
            raise pt.fail(
                name,
                f"preset must be within the table's {table[0]:g} to {table[-1]:g}, "
                f"got {value:g}",
            )
        presets[name] = value
    t.reject_unknown()
    return CircuitValves(valve_type, circuits, presets)


def _check_name(t: Table, key: str, name, known: set[str]) -> None:
    if not isinstance(name, str) or name not in known:
        raise t.fail(
            key,
            f"unknown circuit {shown(name)}; circuits are primary, floor<N>, "
            "floor<N>:ahead, floor<N>:back and floor<N>:<emitter id> for the "
            "route's floors and the emitters on them",
        )
