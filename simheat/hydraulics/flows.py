"""The converged flow split of a network at one operating point."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from simheat.errors import ScenarioError
from simheat.physics._kernels import water_density_kg_m3

__all__ = ["Flows"]


@dataclass(frozen=True, eq=False)
class Flows:
    """Converged flow split of a network at one operating point.

    Attributes
    ----------
    mass_flow_kg_s : ndarray
        Signed mass flow per link, positive from ``from_node`` to ``to_node``.
        [kg/s]
    pressure_Pa : ndarray
        Gauge pressure per node, zero at the reference node. [Pa]
    iterations : int
        Laplacian factorizations used (linear start included). [-]
    max_imbalance_kg_s : float
        Largest net mass flow out of any node. [kg/s]
    max_residual_Pa : float
        Largest link equation residual; when the solve ended on a tiny Newton
        step, the estimate of the residual that step leaves (see
        :meth:`FlowSolver.solve`). [Pa]
    water_temp_C : ndarray
        Water temperature per link used in the solve. [°C]
    valve_opening : ndarray
        Valve opening per link used in the solve. [-]
    pump_speed : ndarray
        Pump speed ratio per link used in the solve (the maximum speed of a
        regulated pump). [-]
    link_names : tuple of str
        Link names of the network, in link order. [-]
    link_evaluations : int
        Evaluations of every link law, the main cost of a solve. [-]
    """

    mass_flow_kg_s: np.ndarray
    pressure_Pa: np.ndarray
    iterations: int
    max_imbalance_kg_s: float
    max_residual_Pa: float
    water_temp_C: np.ndarray
    valve_opening: np.ndarray
    pump_speed: np.ndarray
    link_names: tuple[str, ...]
    link_evaluations: int = 0

    @classmethod
    def of_solve(
        cls,
        mass_flow_kg_s: np.ndarray,
        pressure_Pa: np.ndarray,
        iterations: int,
        max_imbalance_kg_s: float,
        max_residual_Pa: float,
        water_temp_C: np.ndarray,
        valve_opening: np.ndarray,
        pump_speed: np.ndarray,
        link_names: tuple[str, ...],
        link_evaluations: int,
    ) -> Flows:
        """A Flows from a solve's outcome, fields in declaration order.

        The solver makes one per solve, and the dynamics many thousands per
        run; this sets the fields directly rather than through the frozen
        dataclass's ``__init__`` (a third of the Python cost of a small
        network's solve).

        Parameters
        ----------
        mass_flow_kg_s, pressure_Pa, iterations, max_imbalance_kg_s, \
        max_residual_Pa, water_temp_C, valve_opening, pump_speed, link_names, \
        link_evaluations
            As the attributes. [kg/s, Pa, -, kg/s, Pa, °C, -, -, -, -]

        Returns
        -------
        Flows
        """
        flows = object.__new__(cls)
        flows.__dict__.update(
            mass_flow_kg_s=mass_flow_kg_s,
            pressure_Pa=pressure_Pa,
            iterations=int(iterations),
            max_imbalance_kg_s=float(max_imbalance_kg_s),
            max_residual_Pa=float(max_residual_Pa),
            water_temp_C=water_temp_C,
            valve_opening=valve_opening,
            pump_speed=pump_speed,
            link_names=link_names,
            link_evaluations=int(link_evaluations),
        )
        return flows

    def _link_index(self, link: int | str) -> int:
        if isinstance(link, str):
            try:
                return self.link_names.index(link)
            except ValueError:
                raise ScenarioError(f"no link named {link!r}") from None
        index = int(link)
        if not 0 <= index < len(self.link_names):
            raise ScenarioError(
                f"link index must be in 0..{len(self.link_names) - 1}, got {index}"
            )
        return index

    def volume_flow_m3_h(self, link: int | str) -> float:
        """Volume flow of one link at its water temperature.

        Parameters
        ----------
        link : int or str
            Link index or link name. [-]

        Returns
        -------
        float
            Signed volume flow. [m3/h]

        Raises
        ------
        ScenarioError
            When no such link exists.
        """
        k = self._link_index(link)
        rho = water_density_kg_m3(float(self.water_temp_C[k]))
        return float(self.mass_flow_kg_s[k]) / rho * 3600.0
