"""Heights and positions along the floors' runs, as the layout builders use them.

A thin view over :mod:`simheat.resolve.route` for one route: floor and tee
heights, the run's height at any position, each tee's position, and the stretch
of run a pipe between two positions covers.
"""

from __future__ import annotations

from simheat.hydraulics.layouts.records import Along
from simheat.resolve.route import (
    feed_end_height_m,
    floor_heights_m,
    ring_length_m,
    run_height_m,
    tee_positions_m,
)
from simheat.scenario.model import Route, Tee

__all__ = ["RunGeometry"]


class RunGeometry:
    """Heights and positions of one route's runs.

    Parameters
    ----------
    route : Route
        The scenario's route. [-]

    Attributes
    ----------
    floor_heights_m : list of float
        Height of each floor's run at its start above the plant. [m]
    feed_end_height_m : float
        Height of the foot of the riser. [m]
    tee_position_m : dict of int to float
        Position of each emitter's tee along its floor's run. [m]
    """

    def __init__(self, route: Route) -> None:
        self.route = route
        self.floor_heights_m = floor_heights_m(route)
        self.feed_end_height_m = feed_end_height_m(route, self.floor_heights_m)
        self.tee_position_m = {
            t.emitter: float(x)
            for f in route.floors
            for t, x in zip(f.tees, tee_positions_m(f), strict=True)
        }

    def run_height(self, floor_index: int, position_m: float) -> float:
        """Height of a floor's run at a position along it.

        Parameters
        ----------
        floor_index : int
            Route index of the floor. [-]
        position_m : float
            Position along the run from its start. [m]

        Returns
        -------
        float
            Height above the plant (:func:`simheat.resolve.route.run_height_m`). [m]
        """
        return run_height_m(
            self.route.floors[floor_index],
            self.floor_heights_m[floor_index],
            position_m,
        )

    def tee_height(self, floor_index: int, tee: Tee) -> float:
        """Height of the header at a tee: given, or the floor's.

        Parameters
        ----------
        floor_index : int
            Route index of the tee's floor. [-]
        tee : Tee
            The tee. [-]

        Returns
        -------
        float
            Height above the plant. [m]
        """
        if tee.height_m is not None:
            return tee.height_m
        return self.floor_heights_m[floor_index]

    def shorter_along(self, floor_index: int, a_m: float, b_m: float) -> Along:
        """A pipe from position ``a_m`` to ``b_m`` of a run, the shorter way on a ring.

        Parameters
        ----------
        floor_index : int
            Route index of the floor. [-]
        a_m, b_m : float
            Positions along the run. [m]

        Returns
        -------
        Along
            The stretch (:class:`~simheat.hydraulics.layouts.records.Along`).
        """
        ring = ring_length_m(self.route.floors[floor_index])
        if ring is None:
            return Along(floor_index, a_m, b_m)
        return Along(floor_index, a_m, b_m, (b_m - a_m) % ring <= 0.5 * ring)
