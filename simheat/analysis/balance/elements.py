"""What balancing can set, and every link's pressure drop at its design flow.

Per emitter one element is adjustable: the lockshield when the emitter has one
with a table, else the valve's preset when its valve type has a table, else the
valve's Kv itself (no table: the Kv to set). Per circuit with a declared valve,
that valve's preset. Pressure drops use the physics kernels the flow solver uses
(:mod:`simheat.physics._kernels`): Darcy-Weisbach pipe with local losses, the Kv
law of valves; the Kv an element needs comes from inverting the same Kv law.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from simheat.errors import ScenarioError
from simheat.hydraulics.network import Network
from simheat.physics._kernels import (
    check_valve_reverse_dp_Pa,
    pipe_pressure_drop_Pa,
    valve_pressure_drop_Pa,
)
from simheat.physics.valve import series_kv_m3_h
from simheat.resolve import ResolvedScenario
from simheat.scenario.model import Scenario, ValveType

KIND_PRESET = "preset"  # a valve body's preset from its valve type's table
KIND_LOCKSHIELD = "lockshield"  # turns of a lockshield from its table
KIND_KV = "kv"  # a valve's Kv, no table
KIND_CIRCUIT = "circuit"  # a circuit valve's preset from its table

SETTING_KEYS = {
    KIND_PRESET: "preset",
    KIND_LOCKSHIELD: "lockshield_turns",
    KIND_KV: "kv_m3_per_h",
}
"""Scenario key of each emitter element's setting."""


@dataclass(frozen=True)
class Element:
    """An adjustable valve and the valves in series with it on its link.

    Attributes
    ----------
    kind : str
        ``preset``, ``lockshield``, ``kv`` or ``circuit``. [-]
    valve_type : str or None
        Name of its table (``[valve_types.NAME]``); None for ``kv``. [-]
    presets, kv_m3_h : tuple of float
        The table: settings [-] and Kv at each [m3/h], Kv rising with the
        setting; for ``kv`` the single fully open Kv.
    fixed_kv_m3_h : float or None
        Kv of the valves in series that stay as they are (the valve body
        behind a lockshield); None for none. [m3/h]
    setting : float or None
        The scenario's setting (preset or turns) [-]; its Kv for ``kv``. [m3/h]
    """

    kind: str
    valve_type: str | None
    presets: tuple[float, ...]
    kv_m3_h: tuple[float, ...]
    fixed_kv_m3_h: float | None
    setting: float | None

    @property
    def has_table(self) -> bool:
        """Whether the element has a table of settings."""
        return self.kind != KIND_KV

    @property
    def max_kv_m3_h(self) -> float:
        """Kv fully open (the largest setting). [m3/h]."""
        return self.kv_m3_h[-1]

    @property
    def min_kv_m3_h(self) -> float | None:
        """Kv at the smallest setting; None when any Kv can be set. [m3/h]."""
        return self.kv_m3_h[0] if self.has_table else None

    def link_kv_m3_h(self, kv_m3_h: float) -> float:
        """Kv of the link's valves with this element at ``kv_m3_h``.

        Parameters
        ----------
        kv_m3_h : float
            The element's Kv. [m3/h]

        Returns
        -------
        float
            Kv of the element in series with the fixed valves. [m3/h]
        """
        if self.fixed_kv_m3_h is None:
            return kv_m3_h
        return series_kv_m3_h(kv_m3_h, self.fixed_kv_m3_h)

    def element_kv_m3_h(self, link_kv_m3_h: float) -> float:
        """Kv of the element that gives the link's valves ``link_kv_m3_h``.

        Parameters
        ----------
        link_kv_m3_h : float
            Kv of the link's valves together. [m3/h]

        Returns
        -------
        float
            The element's Kv; ``inf`` when even an element without loss
            gives less. [m3/h]
        """
        if self.fixed_kv_m3_h is None:
            return link_kv_m3_h
        rest = link_kv_m3_h**-2 - self.fixed_kv_m3_h**-2
        return math.inf if rest <= 0.0 else rest**-0.5

    def setting_of(self, kv_m3_h: float) -> float:
        """Setting (preset or turns) at the element's Kv; the Kv for ``kv``.

        Parameters
        ----------
        kv_m3_h : float
            The element's Kv, within its table. [m3/h]

        Returns
        -------
        float
            Preset or turns [-] (linear between table rows); the Kv [m3/h]
            for an element without a table.
        """
        if not self.has_table:
            return kv_m3_h
        return float(np.interp(kv_m3_h, self.kv_m3_h, self.presets))


def _table(scenario: Scenario, name: str, where: str) -> ValveType:
    table = scenario.valve_types[name]
    if any(b <= a for a, b in zip(table.kv_m3_h, table.kv_m3_h[1:], strict=False)):
        raise ScenarioError(
            f"valve_types.{name}.kv_m3_per_h: must rise with the preset for "
            f"balancing ({where} uses it), got {list(table.kv_m3_h)} "
            f"({scenario.source_path})"
        )
    return table


def emitter_element(
    scenario: Scenario, resolved: ResolvedScenario, index: int
) -> Element:
    """The element balancing sets on an emitter.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    resolved : ResolvedScenario
        Its derived quantities (the Kv of valve and lockshield). [-]
    index : int
        Emitter index. [-]

    Returns
    -------
    Element
        The lockshield when the emitter has one, else its valve's preset, else
        its valve's Kv.

    Raises
    ------
    ScenarioError
        When the table's Kv does not rise with its setting (no unique setting
        for a Kv).
    """
    e = scenario.emitters[index]
    r = resolved.emitters[index]
    where = f"emitters[{index}]"
    if e.lockshield_type is not None:
        t = _table(scenario, e.lockshield_type, where)
        return Element(
            KIND_LOCKSHIELD,
            e.lockshield_type,
            t.presets,
            t.kv_m3_h,
            r.valve_kv_m3_h,
            e.lockshield_turns,
        )
    if e.valve_type is not None:
        t = _table(scenario, e.valve_type, where)
        return Element(KIND_PRESET, e.valve_type, t.presets, t.kv_m3_h, None, e.preset)
    return Element(KIND_KV, None, (e.kv_m3_h,), (e.kv_m3_h,), None, e.kv_m3_h)


def circuit_element(scenario: Scenario, circuit: str) -> Element:
    """The element of a circuit's declared balancing valve.

    Parameters
    ----------
    scenario : Scenario
        The house (``[layout.circuit_valves]``). [-]
    circuit : str
        Circuit name. [-]

    Returns
    -------
    Element
        The circuit valve's preset.
    """
    valves = scenario.layout.circuit_valves
    t = _table(scenario, valves.valve_type, "layout.circuit_valves")
    setting = valves.presets.get(circuit, t.presets[-1])
    return Element(KIND_CIRCUIT, valves.valve_type, t.presets, t.kv_m3_h, None, setting)


def pipe_drop_Pa(
    network: Network, link: int, mass_flow_kg_s: float, temp_C: float
) -> float:
    """Pressure drop of a link's pipe and local losses (no valve, no pump).

    Parameters
    ----------
    network : Network
        The network. [-]
    link : int
        Link index. [-]
    mass_flow_kg_s : float
        Signed mass flow. [kg/s]
    temp_C : float
        Water temperature. [°C]

    Returns
    -------
    float
        Signed pressure drop, Darcy-Weisbach with Colebrook-White friction and
        the link's zeta (:func:`simheat.physics._kernels.pipe_pressure_drop_Pa`).
        [Pa]
    """
    length = float(network.length_m[link])
    zeta = float(network.zeta[link])
    if not (length > 0.0 or zeta > 0.0):
        return 0.0
    dp, _ = pipe_pressure_drop_Pa(
        mass_flow_kg_s,
        length,
        float(network.inner_diameter_m[link]),
        float(network.roughness_m[link]),
        zeta,
        temp_C,
    )
    return float(dp)


def fixed_drop_Pa(
    network: Network, link: int, mass_flow_kg_s: float, temp_C: float
) -> float:
    """Pressure drop of a link whose valve (if any) stays as it is, fully open.

    Parameters
    ----------
    network : Network
        The network. [-]
    link : int
        Link index (not a pump). [-]
    mass_flow_kg_s : float
        Signed mass flow. [kg/s]
    temp_C : float
        Water temperature. [°C]

    Returns
    -------
    float
        Pipe, local losses, valve at opening 1 and a check valve's reverse
        drop, as the flow solver's link law adds them. [Pa]
    """
    dp = pipe_drop_Pa(network, link, mass_flow_kg_s, temp_C)
    kv = float(network.kv_m3_h[link])
    if kv > 0.0:
        dp += valve_drop_Pa(mass_flow_kg_s, kv, temp_C)
    if network.check_valve[link]:
        dp += float(check_valve_reverse_dp_Pa(mass_flow_kg_s)[0])
    return dp


def valve_drop_Pa(mass_flow_kg_s: float, kv_m3_h: float, temp_C: float) -> float:
    """Pressure drop of a fully open valve of Kv ``kv_m3_h``.

    Parameters
    ----------
    mass_flow_kg_s : float
        Signed mass flow. [kg/s]
    kv_m3_h : float
        Kv, > 0. [m3/h]
    temp_C : float
        Water temperature (density). [°C]

    Returns
    -------
    float
        The Kv law of :func:`simheat.physics._kernels.valve_pressure_drop_Pa` at
        opening 1. [Pa]
    """
    return float(valve_pressure_drop_Pa(mass_flow_kg_s, kv_m3_h, 1.0, temp_C)[0])


def kv_for_drop_m3_h(mass_flow_kg_s: float, drop_Pa: float, temp_C: float) -> float:
    """Kv of a valve that takes ``drop_Pa`` at a flow: the Kv law inverted.

    Parameters
    ----------
    mass_flow_kg_s : float
        Mass flow, > 0. [kg/s]
    drop_Pa : float
        Pressure drop the valve must take; ``inf`` is returned for <= 0. [Pa]
    temp_C : float
        Water temperature (density). [°C]

    Returns
    -------
    float
        ``Kv = sqrt(dp(m, Kv=1) / drop)``: the valve law's drop falls as
        ``1/Kv^2`` exactly, so this Kv gives the drop through the same law.
        [m3/h]

    Notes
    -----
    With the Kv definition (EN 60534-2-1) this is ``Q / sqrt(dp_bar * 1000 /
    rho)`` with ``Q = 3600 m / rho`` in m3/h, to the law's regularisation of
    ``m|m|`` (relative ``m0^2 / (4 m^2)``, below 1e-6 above 5 kg/h).

    Examples
    --------
    >>> round(kv_for_drop_m3_h(1000.0 / 3600.0, 1e5 * 1000.0 / 999.97, 4.0), 4)
    1.0
    """
    if not drop_Pa > 0.0:
        return math.inf
    return math.sqrt(valve_drop_Pa(mass_flow_kg_s, 1.0, temp_C) / drop_Pa)
