"""Kv of the balancing valves on a layout's circuits (``[layout.circuit_valves]``)."""

from __future__ import annotations

from simheat.physics.valve import kv_from_preset
from simheat.scenario.model import CircuitValves, ValveType


def circuit_valve_kv_m3_h(
    valves: CircuitValves | None, valve_types: dict[str, ValveType], circuit: str
) -> float | None:
    """Kv of the balancing valve on a circuit, None when it gets none.

    Parameters
    ----------
    valves : CircuitValves or None
        The scenario's ``[layout.circuit_valves]`` (None: no circuit valves). [-]
    valve_types : dict of str to ValveType
        The scenario's preset tables. [-]
    circuit : str
        Circuit name (``floor1``, ``floor0:ahead`` ...). [-]

    Returns
    -------
    float or None
        Kv at the circuit's preset (the table's largest, fully open, when none
        is given), linear between table rows; None when the circuit has no
        valve. [m3/h]
    """
    if valves is None or (
        valves.circuits is not None and circuit not in valves.circuits
    ):
        return None
    table = valve_types[valves.valve_type]
    preset = valves.presets.get(circuit, table.presets[-1])
    return float(kv_from_preset(preset, table.presets, table.kv_m3_h))
