"""Run and Summary: what a simulation produces and what is stored."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from simheat.hydraulics.network import Network
from simheat.scenario.model import Scenario


@dataclass(frozen=True)
class RoomResult:
    """Warm-up result of one room.

    Attributes
    ----------
    id : str
        Room id.
    setpoint_C : float
        Comfort setpoint. [°C]
    time_to_setpoint_s : float or None
        Time from the start of comfort until the air first comes within the
        tolerance of the setpoint; ``None`` when it never does. [s]
    final_air_temp_C : float
        Air temperature at the end of the run. [°C]
    """

    id: str
    setpoint_C: float
    time_to_setpoint_s: float | None
    final_air_temp_C: float


@dataclass(frozen=True)
class EmitterResult:
    """Flow and output of one emitter over the comfort period.

    Attributes
    ----------
    id, room : str
        Emitter id and the id of its room.
    mean_flow_kg_s, design_flow_kg_s : float
        Time-mean mass flow during comfort and the design mass flow. [kg/s]
    mean_output_W : float
        Time-mean heat output during comfort. [W]
    """

    id: str
    room: str
    mean_flow_kg_s: float
    design_flow_kg_s: float
    mean_output_W: float


@dataclass(frozen=True)
class EnergyBooks:
    """Water-side energy books over the whole run. [J].

    ``source = room_gains + pipe_losses + stored_change`` up to ``balance_error_pct``
    of the source energy.
    """

    source_J: float
    room_gains_J: float
    pipe_losses_J: float
    stored_change_J: float

    @property
    def balance_error_pct(self) -> float:
        """Closure error of the books as a percentage of the source energy. [%]."""
        residual = (
            self.source_J
            - self.room_gains_J
            - self.pipe_losses_J
            - self.stored_change_J
        )
        scale = max(abs(self.source_J), 1.0)
        return 100.0 * abs(residual) / scale


@dataclass(frozen=True)
class Summary:
    """Per-room, per-emitter and energy results of one run."""

    rooms: tuple[RoomResult, ...]
    emitters: tuple[EmitterResult, ...]
    energy: EnergyBooks


@dataclass(frozen=True, eq=False)
class Run:
    """Time series of one simulated morning under one scheme.

    All series share ``time_s`` (seconds from the start of the run); 2-D series have
    one column per room or per emitter in scenario order.
    """

    scenario: Scenario
    scheme: str
    network: Network
    time_s: np.ndarray
    outdoor_temp_C: np.ndarray
    air_temp_C: np.ndarray
    structure_temp_C: np.ndarray
    emitter_flow_kg_s: np.ndarray
    emitter_output_W: np.ndarray
    emitter_inlet_temp_C: np.ndarray
    supply_temp_C: np.ndarray
    return_temp_C: np.ndarray
    source_power_W: np.ndarray
    energy_J: np.ndarray
    stored_heat_J: np.ndarray
    summary: Summary
    solver: dict = field(default_factory=dict)

    @property
    def operative_temp_C(self) -> np.ndarray:
        """Operative temperature: mean of air and structure temperature. [°C]."""
        return 0.5 * (self.air_temp_C + self.structure_temp_C)
