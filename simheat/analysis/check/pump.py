"""Each pump's operating point on its curve against the index circuit's need."""

from __future__ import annotations

from dataclasses import dataclass

from simheat.hydraulics.layouts import BuiltLayout
from simheat.hydraulics.network import PUMP_MODE_NAMES
from simheat.hydraulics.sizing import DesignFigures
from simheat.hydraulics.solver import Flows, pump_duty_points
from simheat.physics._kernels import (
    PUMP_MODE_FIXED_SPEED,
    regulated_pump_rise_Pa,
    water_density_kg_m3,
)
from simheat.physics.pump import control_flow_m3_s


@dataclass(frozen=True)
class PumpCheck:
    """One pump: where it runs, and whether it serves the index circuit at design.

    Attributes
    ----------
    pump : str
        Pump link name (``pump``, ``pump:floor1``). [-]
    mode : str
        Control mode (``fixed_speed``, ``constant_dp``, ``proportional_dp``). [-]
    operating_flow_m3_h, operating_head_Pa : float
        Operating point with every valve open at its preset, water at the
        design supply temperature. [m3/h], [Pa]
    design_flow_m3_h : float
        Total design flow through the pump. [m3/h]
    index_emitter : str or None
        Emitter of its index circuit. [-]
    need_Pa : float
        Pressure the index circuit needs at design flows. [Pa]
    available_Pa : float
        Pressure rise the pump gives at the design flow (its curve, or its
        control head where that is lower). [Pa]
    """

    pump: str
    mode: str
    operating_flow_m3_h: float
    operating_head_Pa: float
    design_flow_m3_h: float
    index_emitter: str | None
    need_Pa: float
    available_Pa: float

    @property
    def margin_Pa(self) -> float:
        """Available minus needed rise at the design flow. [Pa]."""
        return self.available_Pa - self.need_Pa

    @property
    def can_deliver(self) -> bool:
        """Whether the pump gives the design flow at the index circuit's need."""
        return bool(self.margin_Pa >= 0.0)


def pump_checks(
    built: BuiltLayout, flows: Flows, figures: DesignFigures
) -> tuple[PumpCheck, ...]:
    """Operating point and design margin of every pump of a scheme.

    Parameters
    ----------
    built : BuiltLayout
        The scheme. [-]
    flows : Flows
        Its operating point, every valve open. [kg/s]
    figures : DesignFigures
        Its design figures (:func:`simheat.hydraulics.sizing.design_figures`):
        design flow and index circuit need of each pump. [-]

    Returns
    -------
    tuple of PumpCheck
        One per pump, in link order.

    Notes
    -----
    The available rise at the design flow is the pump's law of
    :func:`simheat.physics._kernels.regulated_pump_rise_Pa` at full speed
    (fixed speed: the fitted curve; regulated: the control head, capped by the
    curve), with water at the mean design temperature.
    """
    net = built.network
    duties = {d.pump: d for d in figures.pumps}
    rho = float(water_density_kg_m3(built.design_temp_C))
    out = []
    for link, flow_m3_h, head_kPa in pump_duty_points(net, flows):
        name = net.link_names[link]
        duty = duties[name]
        a0, a1, a2 = (float(x) for x in net.pump_coeffs[link])
        mode = int(net.pump_mode[link])
        setpoint = float(net.pump_setpoint_Pa[link])
        control = (
            0.0
            if mode == PUMP_MODE_FIXED_SPEED
            else control_flow_m3_s(a0, a1, a2, setpoint)
        )
        m_design = duty.flow_m3_h / 3600.0 * rho
        available, _ = regulated_pump_rise_Pa(
            m_design, a0, a1, a2, 1.0, mode, setpoint, control, built.design_temp_C
        )
        out.append(
            PumpCheck(
                pump=name,
                mode=PUMP_MODE_NAMES[mode],
                operating_flow_m3_h=float(flow_m3_h),
                operating_head_Pa=float(head_kPa) * 1e3,
                design_flow_m3_h=duty.flow_m3_h,
                index_emitter=duty.index_emitter,
                need_Pa=duty.head_kPa * 1e3,
                available_Pa=float(available),
            )
        )
    return tuple(out)
