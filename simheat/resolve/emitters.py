"""Emitter parameters resolved from the scenario: Kv, body capacity, design flow."""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from simheat.physics.valve import kv_from_preset, series_kv_m3_h
from simheat.scenario.model import Emitter, ValveType

STEEL_CP_J_KG_K = 480.0  # carbon steel near 20 °C, engineering handbooks


@dataclass(frozen=True)
class ResolvedEmitter:
    """What the network and the thermal model need of an emitter.

    Attributes
    ----------
    kv_m3_h : float
        Kv of the valves in the emitter's circuit, fully open: the valve's Kv
        (as given, or read from its valve type's preset table) in series with
        the lockshield's, when it has one with a table. [m3/h]
    metal_capacity_J_K : float
        Heat capacity of the radiator body. [J/K]
    design_mass_flow_kg_s : float
        Design mass flow: the emitter's share of its room's design heat load at
        the design temperature drop. [kg/s]
    valve_kv_m3_h : float or None
        Kv of the valve alone (as given or from its preset). [m3/h]
    lockshield_kv_m3_h : float or None
        Kv of the lockshield at its turns; None without one. [m3/h]
    """

    kv_m3_h: float
    metal_capacity_J_K: float
    design_mass_flow_kg_s: float
    valve_kv_m3_h: float | None = None
    lockshield_kv_m3_h: float | None = None


def valve_kv_m3_h(emitter: Emitter, valve_types: dict[str, ValveType]) -> float:
    """Kv of an emitter's valve, fully open.

    Parameters
    ----------
    emitter : Emitter
        The emitter: its Kv [m3/h], or its preset [-] and valve type.
    valve_types : dict of str to ValveType
        The scenario's preset tables. [-]

    Returns
    -------
    float
        Kv at the preset, linear between table rows (:func:`kv_from_preset`),
        or the given Kv. [m3/h]
    """
    if emitter.kv_m3_h is not None:
        return emitter.kv_m3_h
    table = valve_types[emitter.valve_type]
    return float(kv_from_preset(emitter.preset, table.presets, table.kv_m3_h))


def lockshield_kv_m3_h(
    emitter: Emitter, valve_types: dict[str, ValveType]
) -> float | None:
    """Kv of an emitter's lockshield at its turns, None without a lockshield table.

    Parameters
    ----------
    emitter : Emitter
        The emitter: its lockshield type and turns open [-].
    valve_types : dict of str to ValveType
        The scenario's tables (turns -> Kv for a lockshield). [-]

    Returns
    -------
    float or None
        Kv at the turns, linear between table rows (:func:`kv_from_preset`).
        [m3/h]
    """
    if emitter.lockshield_type is None:
        return None
    table = valve_types[emitter.lockshield_type]
    return float(kv_from_preset(emitter.lockshield_turns, table.presets, table.kv_m3_h))


def emitter_kv_m3_h(emitter: Emitter, valve_types: dict[str, ValveType]) -> float:
    """Kv of an emitter's valve and lockshield in series, fully open.

    Parameters
    ----------
    emitter : Emitter
        The emitter (valve Kv or preset [-], optional lockshield turns [-]).
    valve_types : dict of str to ValveType
        The scenario's tables. [-]

    Returns
    -------
    float
        ``1/Kv^2 = 1/Kv_valve^2 + 1/Kv_lockshield^2``
        (:func:`simheat.physics.valve.series_kv_m3_h`); the valve's Kv when
        there is no lockshield table. [m3/h]
    """
    valve = valve_kv_m3_h(emitter, valve_types)
    lockshield = lockshield_kv_m3_h(emitter, valve_types)
    return valve if lockshield is None else series_kv_m3_h(valve, lockshield)


def design_mass_flows_kg_s(
    emitters: Sequence[Emitter],
    room_load_W: Sequence[float],
    temperature_drop_K: float,
    cp_J_kg_K: float,
) -> np.ndarray:
    """Design mass flow of each emitter from its share of the room's design load.

    Parameters
    ----------
    emitters : sequence of Emitter
        The emitters (room index, nominal output [W]).
    room_load_W : sequence of float
        Design heat load of each room. [W]
    temperature_drop_K : float
        Design temperature drop across the emitters. [K]
    cp_J_kg_K : float
        Specific heat of water at the mean design water temperature. [J/(kg K)]

    Returns
    -------
    ndarray
        Design mass flow per emitter. [kg/s]

    Notes
    -----
    The room's design heat load is shared among its emitters in proportion to
    their nominal output and carried at the design temperature drop:
    ``m = Q / (cp dT)``. An emitter that states its design flow
    (``Emitter.design_flow_kg_s``) keeps it. An emitter shut for good
    (``closed``) has no design flow; its room's load is shared among the
    others (none when all are shut).

    Examples
    --------
    Two equal radiators share a room's 1800 W at a 20 K drop:

    >>> from types import SimpleNamespace
    >>> e = SimpleNamespace(room=0, nominal_power_W=1000.0, design_flow_kg_s=None)
    >>> design_mass_flows_kg_s([e, e], [1800.0], 20.0, 4500.0).tolist()
    [0.01, 0.01]
    """
    room_nominal = np.zeros(len(room_load_W))
    for e in emitters:
        if not getattr(e, "closed", False):
            room_nominal[e.room] += e.nominal_power_W
    flows = np.zeros(len(emitters))
    for i, e in enumerate(emitters):
        if getattr(e, "closed", False):
            continue  # shut for good: no flow, its room's other emitters share
        share = e.nominal_power_W / room_nominal[e.room]
        load_W = room_load_W[e.room] * share
        flows[i] = load_W / (cp_J_kg_K * temperature_drop_K)
        if e.design_flow_kg_s is not None:
            flows[i] = e.design_flow_kg_s
    return flows
