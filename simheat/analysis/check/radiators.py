"""Radiator output at design conditions against each radiator's share of its load."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from simheat.analysis.check.loads import RoomLoad
from simheat.physics.emitter import emitter_output_W, log_mean_excess_K, steady_output_W
from simheat.physics.water import specific_heat_J_kg_K
from simheat.resolve import ResolvedScenario
from simheat.scenario.model import Scenario


@dataclass(frozen=True)
class RadiatorCheck:
    """One radiator at the design supply temperature, design flow, room at setpoint.

    Attributes
    ----------
    id, room : str
        Emitter and room ids. [-]
    nominal_W : float
        Output at 75/65/20 °C. [W]
    share_W, share_with_reheat_W : float
        Its share of the room's design load (by nominal output, as the design
        flows share it), without and with the room's reheat allowance. [W]
    design_flow_kg_s : float
        Its design mass flow. [kg/s]
    output_W : float
        Steady output at the design supply temperature and design flow with
        the room at its setpoint (EN 442). [W]
    nominal_for_load_W, nominal_for_reheat_W : float or None
        Nominal output that gives the share (and the share plus reheat) at the
        design supply temperature and temperature drop; None when the design
        return temperature does not lie above the room's setpoint. [W]
    """

    id: str
    room: str
    nominal_W: float
    share_W: float
    share_with_reheat_W: float
    design_flow_kg_s: float
    output_W: float
    nominal_for_load_W: float | None
    nominal_for_reheat_W: float | None

    @property
    def margin_pct(self) -> float:
        """Output over the share, minus 100 (0 for a radiator shut for good). [%]."""
        if self.share_W == 0.0:
            return 0.0
        return 100.0 * (self.output_W / self.share_W - 1.0)

    @property
    def undersized(self) -> bool:
        """Whether the output at design falls short of the share."""
        return bool(self.output_W < self.share_W)


def output_per_nominal(exponent: float, supply_C: float, drop_K: float, room_C: float):
    """Output per watt of nominal output with the water at the design temperatures.

    Parameters
    ----------
    exponent : float
        EN 442 exponent n. [-]
    supply_C : float
        Design supply temperature. [°C]
    drop_K : float
        Design temperature drop. [K]
    room_C : float
        Room setpoint. [°C]

    Returns
    -------
    float or None
        ``(dT_lm / dT_n)^n`` with ``dT_lm`` the log mean excess of supply and
        ``supply - drop`` over the room; None when the return would not lie
        above the room. [-]

    Examples
    --------
    At 75/65 °C and 20 °C it is 1 (the nominal point):

    >>> round(output_per_nominal(1.3, 75.0, 10.0, 20.0), 9)
    1.0
    """
    if supply_C - drop_K <= room_C:
        return None
    excess = log_mean_excess_K(supply_C, supply_C - drop_K, room_C)
    return float(emitter_output_W(1.0, exponent, excess))


def radiator_checks(
    scenario: Scenario, resolved: ResolvedScenario, loads: tuple[RoomLoad, ...]
) -> tuple[RadiatorCheck, ...]:
    """Every radiator's output at design against its share of the room load.

    Parameters
    ----------
    scenario : Scenario
        The house (design temperatures, emitters). [-]
    resolved : ResolvedScenario
        Its resolve step (design flows, mean design water temperature). [-]
    loads : tuple of RoomLoad
        Room loads (:func:`simheat.analysis.check.loads.room_loads`). [W]

    Returns
    -------
    tuple of RadiatorCheck
        One per emitter, in scenario order.

    Notes
    -----
    The output is the steady EN 442 output (log mean excess, the project's one
    emitter law, :func:`simheat.physics.emitter.steady_output_W`) at the design
    supply temperature, the design mass flow and the room at its setpoint.
    A radiator gives exactly its share at design flow when its return leaves
    at ``supply - drop``; the nominal output that does is the share divided by
    :func:`output_per_nominal`. The load plus reheat is met the same way, at
    its own (larger) flow at the design drop.
    """
    design = scenario.design
    cp = float(specific_heat_J_kg_K(resolved.design_water_temp_C))
    nominal_by_room = np.zeros(len(scenario.rooms))
    for e in scenario.emitters:
        if not e.closed:  # one shut for good takes no share (see resolve)
            nominal_by_room[e.room] += e.nominal_power_W
    out = []
    for e, re in zip(scenario.emitters, resolved.emitters, strict=True):
        room = scenario.rooms[e.room]
        load = loads[e.room]
        fraction = 0.0 if e.closed else e.nominal_power_W / nominal_by_room[e.room]
        share = load.design_load_W * fraction
        share_reheat = load.with_reheat_W * fraction
        per_nominal = output_per_nominal(
            e.exponent, design.supply_temp_C, design.temperature_drop_K, room.setpoint_C
        )
        out.append(
            RadiatorCheck(
                id=e.id,
                room=room.id,
                nominal_W=e.nominal_power_W,
                share_W=share,
                share_with_reheat_W=share_reheat,
                design_flow_kg_s=re.design_mass_flow_kg_s,
                output_W=0.0
                if e.closed
                else steady_output_W(
                    e.nominal_power_W,
                    e.exponent,
                    design.supply_temp_C,
                    re.design_mass_flow_kg_s,
                    room.setpoint_C,
                    cp,
                ),
                nominal_for_load_W=None if per_nominal is None else share / per_nominal,
                nominal_for_reheat_W=(
                    None if per_nominal is None else share_reheat / per_nominal
                ),
            )
        )
    return tuple(out)
