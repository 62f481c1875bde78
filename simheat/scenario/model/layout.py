"""Layout options: pipe sizing limits, circuit valves and the per-scheme choices.

Part of :mod:`simheat.scenario.model` (values as given, SI units, validated;
nothing computed).
"""

from __future__ import annotations

from dataclasses import dataclass, field

from simheat.scenario.fittings import FittingTable
from simheat.scenario.model.piping import PipeSpec
from simheat.scenario.model.plant import Pump


@dataclass(frozen=True)
class SizingLimits:
    """Pipe sizing rule: size from the route or chosen by the limits.

    Attributes
    ----------
    mode : str
        ``"given"`` (the route's pipe types) or ``"auto"`` (smallest catalog size
        of the same series within the limits). [-]
    header_velocity_max_m_s, branch_velocity_max_m_s : float
        Largest mean velocity in headers (feed, risers, headers, loops) and in
        branches (emitter branches, home-run pairs). [m/s]
    gradient_max_Pa_m : float
        Largest friction pressure gradient. [Pa/m]
    """

    mode: str = "given"
    header_velocity_max_m_s: float = 0.7
    branch_velocity_max_m_s: float = 0.5
    gradient_max_Pa_m: float = 150.0


@dataclass(frozen=True)
class CircuitValves:
    """Balancing valves on the circuits that share a manifold, header or riser.

    Attributes
    ----------
    valve_type : str
        Name of the valve type (a key of ``Scenario.valve_types``) whose table
        gives the valve's Kv per preset. [-]
    circuits : tuple of str or None
        Names of the circuits that get a valve (``primary``, ``floor1``,
        ``floor0:ahead``, ``floor0:kitchen`` ...); None for every circuit a
        scheme has. [-]
    presets : dict of str to float
        Preset of each circuit's valve by circuit name; a circuit not listed
        has its valve fully open (the table's largest preset). [-]
    """

    valve_type: str
    circuits: tuple[str, ...] | None = None
    presets: dict = field(default_factory=dict)


@dataclass(frozen=True)
class LayoutOptions:
    """Settings of the piping schemes beyond the route geometry.

    Attributes
    ----------
    one_pipe_emitter_share : float or None
        Share of a one-pipe loop's flow passing through each emitter at design;
        sets the bypass resistance of every diverter tee. [-]
    one_pipe_tee_zeta : float or None
        Zeta of the diverter tee's run (the bypass), referred to the loop pipe
        velocity; used instead of the fraction when given. [-]
    home_run_pipe : PipeSpec or None
        Pipe type of home-run pairs; None for each floor's branch pipe. [-]
    low_loss_header_pipe : PipeSpec or None
        Pipe type of the low-loss header; None to size it from the feed. [-]
    low_loss_header_length_m : float
        Length of the low-loss header between its primary connections. [m]
    primary_pump : Pump or None
        Primary pump behind a low-loss header; None for the scenario's pump. [-]
    floor_pumps : dict of int to Pump
        Each floor's own pump behind a low-loss header, by floor number; a floor
        not listed uses the scenario's pump. [-]
    fittings : FittingTable
        Zeta values and fitting counts: the defaults of
        :mod:`simheat.scenario.fittings` with the scenario's overrides. [-]
    sizing : SizingLimits
        Pipe sizing rule. [-]
    circuit_valves : CircuitValves or None
        Balancing valves on the circuits (``[layout.circuit_valves]``); None for
        none. [-]
    floor_controls : dict of int to FloorControl
        Floor thermostats and shut-off periods of the floor pumps, by floor
        number; floors without any are absent. [-]
    """

    one_pipe_emitter_share: float | None = None
    one_pipe_tee_zeta: float | None = None
    home_run_pipe: PipeSpec | None = None
    low_loss_header_pipe: PipeSpec | None = None
    low_loss_header_length_m: float = 0.5
    primary_pump: Pump | None = None
    floor_pumps: dict = field(default_factory=dict)
    fittings: FittingTable = field(default_factory=FittingTable)
    sizing: SizingLimits = field(default_factory=SizingLimits)
    circuit_valves: CircuitValves | None = None
    floor_controls: dict = field(default_factory=dict)
