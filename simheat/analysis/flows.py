"""Steady flow split of a scheme at a uniform water temperature, per emitter."""

from __future__ import annotations

import math
from dataclasses import dataclass

from simheat.hydraulics.layouts import describe
from simheat.hydraulics.solver import pump_duty_points, solve_flows
from simheat.physics.water import density_kg_m3
from simheat.scenario.model import Scenario

# An emitter below this share of its design flow is flagged as starving. [-]
STARVING_FRACTION = 0.9
# Velocity in radiator branches above which flow noise is likely: 0.5 m/s is a common
# trade limit for small-bore branches in dwellings (common trade practice). [m/s]
BRANCH_NOISE_LIMIT_M_S = 0.5


@dataclass(frozen=True)
class EmitterFlow:
    """Steady flow of one emitter.

    Attributes
    ----------
    id : str
        Emitter id. [-]
    flow_kg_s, design_flow_kg_s : float
        Mass flow and design mass flow. [kg/s]
    dp_available_Pa : float
        Pressure difference between its supply and return tee points. [Pa]
    branch_velocity_m_s : float
        Mean velocity in its branch pipe. [m/s]
    closed : bool
        Whether its valves are shut for good (no flow, no design flow). [-]
    """

    id: str
    flow_kg_s: float
    design_flow_kg_s: float
    dp_available_Pa: float
    branch_velocity_m_s: float
    closed: bool = False

    @property
    def starving(self) -> bool:
        """Whether the flow is below :data:`STARVING_FRACTION` of design."""
        return bool(self.flow_kg_s < STARVING_FRACTION * self.design_flow_kg_s)

    @property
    def noisy(self) -> bool:
        """Whether the branch velocity exceeds :data:`BRANCH_NOISE_LIMIT_M_S`."""
        return bool(self.branch_velocity_m_s > BRANCH_NOISE_LIMIT_M_S)


@dataclass(frozen=True)
class FlowSplit:
    """Steady flow split of one scheme: emitters and pump duty points.

    ``pump_flow_m3_h`` and ``pump_head_Pa`` are the duty point of the pump in series
    with the heat source (the only pump, or the primary pump behind a low-loss
    header); ``pumps`` lists every pump as (link name, flow [m3/h], head [Pa]).

    Attributes
    ----------
    scheme : str
        Piping scheme. [-]
    water_temp_C : float
        Uniform water temperature of the solve. [°C]
    emitters : tuple of EmitterFlow
        One per emitter, in the order of ``Network.emitter_ids``. [-]
    pump_flow_m3_h : float
        Volume flow of the pump in series with the heat source. [m3/h]
    pump_head_Pa : float
        Head of that pump. [Pa]
    pumps : tuple of (str, float, float)
        Every pump as (link name, flow, head). [-], [m3/h], [Pa]
    """

    scheme: str
    water_temp_C: float
    emitters: tuple[EmitterFlow, ...]
    pump_flow_m3_h: float
    pump_head_Pa: float
    pumps: tuple[tuple[str, float, float], ...] = ()


def steady_flow_split(
    scenario: Scenario, scheme: str | None = None, water_temp_C: float | None = None
) -> FlowSplit:
    """Solve the flow split with every valve fully open at one water temperature.

    Parameters
    ----------
    scenario : Scenario
        The house. [-]
    scheme : str, optional
        Piping scheme; the scenario's first when omitted. [-]
    water_temp_C : float, optional
        Uniform water temperature; the design supply temperature by default. [°C]

    Returns
    -------
    FlowSplit
        Per-emitter flows against design flows, available differential pressure,
        branch velocity, and the pump duty point.

    Notes
    -----
    Design flows come from the layout (:meth:`BuiltLayout.emitter_design_flow_kg_s`):
    in a one-pipe loop an emitter's share of the loop flow.
    """
    scheme = scenario.schemes[0] if scheme is None else scheme
    temp = scenario.design.supply_temp_C if water_temp_C is None else water_temp_C
    built = describe(scenario, scheme)
    network = built.network
    flows = solve_flows(network, water_temp_C=temp)
    links = network.emitter_links()
    design = built.emitter_design_flow_kg_s
    rho = float(density_kg_m3(temp))
    emitters = []
    for i, link in enumerate(links):
        m = float(flows.mass_flow_kg_s[link])
        area = math.pi / 4.0 * network.inner_diameter_m[link] ** 2
        dp = (
            flows.pressure_Pa[network.from_node[link]]
            - flows.pressure_Pa[network.to_node[link]]
        )
        emitters.append(
            EmitterFlow(
                id=network.emitter_ids[i],
                flow_kg_s=m,
                design_flow_kg_s=float(design[i]),
                dp_available_Pa=float(dp),
                branch_velocity_m_s=abs(m) / (rho * area),
                closed=bool(network.closed[link]),
            )
        )
    pumps = tuple(
        (network.link_names[link], float(flow_m3_h), float(head_kPa) * 1e3)
        for link, flow_m3_h, head_kPa in pump_duty_points(network, flows)
    )
    source_pump = _source_circuit_pump(network)
    main = next(p for p in pumps if p[0] == network.link_names[source_pump])
    return FlowSplit(scheme, temp, tuple(emitters), main[1], main[2], pumps)


def _source_circuit_pump(network) -> int:
    """The pump link that drives the water through the heat source.

    Every layout puts that pump directly upstream of the source (its outlet node is
    the source's inlet node).
    """
    source = int(network.source_links()[0])
    for link in network.pump_links():
        if network.to_node[link] == network.from_node[source]:
            return int(link)
    return int(network.pump_links()[0])
