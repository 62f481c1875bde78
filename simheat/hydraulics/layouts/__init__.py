"""Build the network of each piping scheme from one description of the house.

Every scheme uses the same rooms, emitters and route (``[route]``, one run per
floor with its tee points) and the same plant: the pump on the return before
the heat source, the expansion vessel at the pump's suction as the pressure
reference, the feed from the plant to the foot of the riser, and risers between
floors. Each floor is its own circuit; the schemes differ in how a floor's
circuit reaches its emitters:

- ``direct_return``: supply and return headers side by side along the run; the
  first emitter has the shortest loop, the last the longest.
- ``reverse_return``: the return header starts at the first emitter and runs
  with the flow, so every emitter's loop through the headers is equally long.
- ``split_direct_return``: two direct-return circuits leave a supply/return
  manifold in opposite directions along the run and meet at the split point.
- ``home_run_manifold``: one supply/return pair per emitter from a manifold.
- ``one_pipe_loop``: emitters in series on one loop, each fed through diverter
  tees with a bypass, so the water cools along the loop.

Each scheme also comes as ``<scheme>_floor_pumps``: the plant's pump drives only
a primary loop to a low-loss header, and each floor's circuit has its own pump
behind the header. Without the suffix all floors hang off one riser and share
the plant's pump.

Two more schemes join the floors in reverse return themselves and have no
``_floor_pumps`` variant (:mod:`~.reverse_house`):

- ``reverse_return_single_loop``: one reverse-return loop through every floor,
  top floor first, so every emitter's loop through headers and risers has the
  same length.
- ``reverse_return_risers``: each floor in reverse return, and the floors
  joined in reverse return on the risers, so every floor circuit sees the same
  riser length.

:func:`build` returns the :class:`~simheat.hydraulics.network.Network` the solver
and the dynamics consume; :func:`describe` returns it with pipe types, fitting
counts, design flows and drawing positions (:class:`BuiltLayout`). Both take the
scenario and resolve it (:func:`simheat.resolve.resolve`, cached per scenario).
The scheme names are those of :mod:`simheat.schemes`.

Modules: :mod:`~.records` (link records, BuiltLayout, link names),
:mod:`~.builder` (the Builder), :mod:`~.plant` (plant, feed, risers),
:mod:`~.assembly` (shared pump or floor pumps), :mod:`~.pipes` (catalog sizing,
link pressure drop), :mod:`~.drawing` (schematic positions), and one module per
floor-circuit family (:mod:`~.two_pipe`, :mod:`~.split`, :mod:`~.home_run`,
:mod:`~.one_pipe`).
"""

from __future__ import annotations

from collections.abc import Callable
from functools import partial

from simheat.errors import ScenarioError
from simheat.hydraulics.layouts.assembly import FloorCircuit, floor_pumps, shared_pump
from simheat.hydraulics.layouts.home_run import home_run_floor
from simheat.hydraulics.layouts.one_pipe import one_pipe_floor
from simheat.hydraulics.layouts.records import (
    PLANT_PUMP_LINK,
    BuiltLayout,
    floor_pump_link,
)
from simheat.hydraulics.layouts.reverse_house import reverse_risers, single_loop
from simheat.hydraulics.layouts.split import split_floor
from simheat.hydraulics.layouts.two_pipe import direct_floor, reverse_floor
from simheat.hydraulics.network import Network
from simheat.resolve import ResolvedScenario, resolve
from simheat.scenario.model import Scenario
from simheat.schemes import FLOOR_PUMPS_SUFFIX, SCHEME_NAMES, unknown_scheme

__all__ = [
    "FLOOR_CIRCUITS",
    "FLOOR_PUMPS_SUFFIX",
    "HOUSE_LAYOUTS",
    "PLANT_PUMP_LINK",
    "SCHEMES",
    "BuiltLayout",
    "build",
    "describe",
    "direct_return",
    "floor_pump_link",
    "reverse_return",
]

FLOOR_CIRCUITS: dict[str, FloorCircuit] = {
    "direct_return": direct_floor,
    "reverse_return": reverse_floor,
    "split_direct_return": split_floor,
    "home_run_manifold": home_run_floor,
    "one_pipe_loop": one_pipe_floor,
}
"""Floor circuit of each base scheme of :data:`simheat.schemes.BASE_SCHEMES`."""

Describer = Callable[[Scenario, ResolvedScenario], BuiltLayout]


HOUSE_LAYOUTS: dict[str, Describer] = {
    "reverse_return_single_loop": single_loop,
    "reverse_return_risers": reverse_risers,
}
"""Builder of each scheme of :data:`simheat.schemes.HOUSE_SCHEMES`."""


def _describer(name: str) -> Describer:
    if name in HOUSE_LAYOUTS:
        return partial(HOUSE_LAYOUTS[name], scheme=name)
    if name.endswith(FLOOR_PUMPS_SUFFIX):
        circuit = FLOOR_CIRCUITS[name.removesuffix(FLOOR_PUMPS_SUFFIX)]
        return partial(floor_pumps, scheme=name, circuit=circuit)
    return partial(shared_pump, scheme=name, circuit=FLOOR_CIRCUITS[name])


_DESCRIBERS: dict[str, Describer] = {name: _describer(name) for name in SCHEME_NAMES}


def _network_of(name: str) -> Callable[[Scenario], Network]:
    def builder(scenario: Scenario) -> Network:
        return describe(scenario, name).network

    builder.__name__ = name
    builder.__doc__ = (
        f"Network of the ``{name}`` scheme for a scenario.\n\n"
        "Parameters\n----------\nscenario : Scenario\n    The house. [-]\n"
    )
    return builder


SCHEMES: dict[str, Callable[[Scenario], Network]] = {
    name: _network_of(name) for name in SCHEME_NAMES
}
"""Every scheme name and the function that builds its network from a scenario."""

direct_return = SCHEMES["direct_return"]
reverse_return = SCHEMES["reverse_return"]


def _check(scheme: str) -> None:
    if scheme not in SCHEMES:
        raise ScenarioError(f"scheme: {unknown_scheme(scheme)}")


def describe(scenario: Scenario, scheme: str) -> BuiltLayout:
    """Build ``scheme`` for ``scenario`` with everything the plan knows.

    Parameters
    ----------
    scenario : Scenario
        The house; resolved here (:func:`simheat.resolve.resolve`, cached). [-]
    scheme : str
        One of :data:`SCHEMES`. [-]

    Returns
    -------
    BuiltLayout
        The network with pipe types, fitting counts, design flows and drawing
        positions.

    Raises
    ------
    ScenarioError
        For an unknown scheme name, a scenario that does not resolve, or a
        route the scheme cannot use (the message names the scenario field).
    """
    _check(scheme)
    return _DESCRIBERS[scheme](scenario, resolve(scenario))


def build(scenario: Scenario, scheme: str) -> Network:
    """Build the network of ``scheme`` for ``scenario``.

    Parameters
    ----------
    scenario : Scenario
        The house; resolved here (:func:`simheat.resolve.resolve`, cached). [-]
    scheme : str
        One of :data:`SCHEMES`. [-]

    Returns
    -------
    Network
        The network.

    Raises
    ------
    ScenarioError
        For an unknown scheme name, a scenario that does not resolve, or a
        route the scheme cannot use.
    """
    return describe(scenario, scheme).network
