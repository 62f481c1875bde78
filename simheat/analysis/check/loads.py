"""Room heat loads as the scenario gives them and as its envelopes give them."""

from __future__ import annotations

from dataclasses import dataclass

from simheat.resolve import ResolvedScenario
from simheat.resolve.loads import EnvelopeLoad
from simheat.scenario.model import Scenario


@dataclass(frozen=True)
class RoomLoad:
    """Design heat load of one room: given, computed, and which one drives.

    Attributes
    ----------
    id, name : str
        The room. [-]
    given_W : float or None
        Design load the scenario gives (from ``design_heat_load_W`` or
        ``heat_loss_W_per_K`` times the design difference). [W]
    computed : EnvelopeLoad or None
        Load computed from the envelope, when the room describes one. [W]
    design_load_W : float
        The load that drives design flows and the room model. [W]
    """

    id: str
    name: str
    given_W: float | None
    computed: EnvelopeLoad | None
    design_load_W: float

    @property
    def drives(self) -> str:
        """``"given"`` or ``"computed"``: which load drives the model."""
        return "given" if self.given_W is not None else "computed"

    @property
    def difference_W(self) -> float | None:
        """Computed minus given load, when both exist. [W]."""
        if self.given_W is None or self.computed is None:
            return None
        return self.computed.total_W - self.given_W

    @property
    def reheat_W(self) -> float:
        """Reheat allowance from the envelope, 0 without one. [W]."""
        return 0.0 if self.computed is None else self.computed.reheat_W

    @property
    def with_reheat_W(self) -> float:
        """The driving load plus the reheat allowance. [W]."""
        return self.design_load_W + self.reheat_W


def room_loads(scenario: Scenario, resolved: ResolvedScenario) -> tuple[RoomLoad, ...]:
    """Every room's design load, given and computed.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    resolved : ResolvedScenario
        Its resolve step (design loads, envelope loads). [W]

    Returns
    -------
    tuple of RoomLoad
        One per room, in scenario order.

    Notes
    -----
    A load given in the scenario drives the model even when the room also
    describes its envelope: it is the designer's explicit figure. The computed
    load (EN 12831 simplified, :func:`simheat.resolve.loads.envelope_load`) is
    reported beside it with the difference.
    """
    out = []
    for room, rr in zip(scenario.rooms, resolved.rooms, strict=True):
        out.append(
            RoomLoad(
                id=room.id,
                name=room.name,
                given_W=rr.design_heat_load_W if rr.load_given else None,
                computed=rr.envelope_load,
                design_load_W=rr.design_heat_load_W,
            )
        )
    return tuple(out)
