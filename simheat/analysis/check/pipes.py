"""The pipe schedule: every pipe at design flow and at the operating point."""

from __future__ import annotations

from dataclasses import dataclass

from simheat.hydraulics.layouts import BuiltLayout
from simheat.hydraulics.layouts.pipes import (
    friction_gradient_Pa_m,
    rule_limits,
    velocity_m_s,
)
from simheat.hydraulics.layouts.records import sizing_rule
from simheat.hydraulics.solver import Flows

# Link roles without a pipe of the distribution (the heat source's own stubs).
NOT_DISTRIBUTION = frozenset({"source", "pump"})


@dataclass(frozen=True)
class PipeRow:
    """One pipe segment of a scheme.

    Attributes
    ----------
    link : str
        Link name in the network. [-]
    role : str
        ``feed``, ``riser``, ``header``, ``emitter`` (the branch pair of a
        radiator), ``home_run``, ``loop``, ``bypass``, ``manifold_feed`` or
        ``low_loss_header``. [-]
    pipe : str
        Pipe type (catalog name or ``custom``). [-]
    length_m : float
        Pipe length (both branches of an emitter together). [m]
    design_flow_kg_s, flow_kg_s : float
        Mass flow at design and at the operating point. [kg/s]
    design_velocity_m_s, velocity_m_s : float
        Mean velocity at design flow and at the operating point. [m/s]
    design_gradient_Pa_m, gradient_Pa_m : float
        Friction gradient at design flow and at the operating point. [Pa/m]
    velocity_limit_m_s, gradient_limit_Pa_m : float
        The sizing limits of its role (``[layout.sizing]``). [m/s], [Pa/m]
    """

    link: str
    role: str
    pipe: str
    length_m: float
    design_flow_kg_s: float
    flow_kg_s: float
    design_velocity_m_s: float
    velocity_m_s: float
    design_gradient_Pa_m: float
    gradient_Pa_m: float
    velocity_limit_m_s: float
    gradient_limit_Pa_m: float

    @property
    def over_limit(self) -> tuple[str, ...]:
        """Limits exceeded at design flow or at the operating point.

        ``velocity`` and/or ``gradient``; empty when within both.
        """
        over = []
        if max(self.design_velocity_m_s, self.velocity_m_s) > self.velocity_limit_m_s:
            over.append("velocity")
        if (
            max(self.design_gradient_Pa_m, self.gradient_Pa_m)
            > self.gradient_limit_Pa_m
        ):
            over.append("gradient")
        return tuple(over)


def pipe_schedule(
    built: BuiltLayout, flows: Flows, water_temp_C: float
) -> tuple[PipeRow, ...]:
    """Every pipe segment with its flows, velocities and gradients.

    Parameters
    ----------
    built : BuiltLayout
        The scheme (pipe types, roles, design flows at the mean design water
        temperature). [-]
    flows : Flows
        The operating point: every valve open at its preset. [kg/s]
    water_temp_C : float
        Water temperature of the operating point. [°C]

    Returns
    -------
    tuple of PipeRow
        In link order: plant, feed, risers, each floor's headers and branches.

    Notes
    -----
    Velocity ``m / (rho pi d^2 / 4)``; gradient by Darcy-Weisbach with
    Colebrook-White friction (:mod:`simheat.hydraulics.layouts.pipes`), the
    same laws the sizing rule uses. The limits are those of
    ``[layout.sizing]`` (headers, feed and risers by the header velocity,
    branches and home-run pairs by the branch velocity).
    """
    rows = []
    for k, spec in enumerate(built.links):
        if spec.pipe is None or spec.length_m <= 0.0 or spec.role in NOT_DISTRIBUTION:
            continue
        d = spec.pipe.inner_diameter_m
        eps = spec.pipe.roughness_m
        m_design = abs(spec.design_flow_kg_s)
        m = abs(float(flows.mass_flow_kg_s[k]))
        v_max, g_max = rule_limits(sizing_rule(spec.role), built.limits)
        rows.append(
            PipeRow(
                link=spec.name,
                role=spec.role,
                pipe=spec.pipe.name,
                length_m=spec.length_m,
                design_flow_kg_s=m_design,
                flow_kg_s=m,
                design_velocity_m_s=velocity_m_s(m_design, d, built.design_temp_C),
                velocity_m_s=velocity_m_s(m, d, water_temp_C),
                design_gradient_Pa_m=friction_gradient_Pa_m(
                    m_design, d, eps, built.design_temp_C
                ),
                gradient_Pa_m=friction_gradient_Pa_m(m, d, eps, water_temp_C),
                velocity_limit_m_s=v_max,
                gradient_limit_Pa_m=g_max,
            )
        )
    return tuple(rows)
