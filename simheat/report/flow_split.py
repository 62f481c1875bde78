"""Flow split: the steady split with every valve open, as JSON-ready data and text."""

from __future__ import annotations

from simheat.analysis.flows import BRANCH_NOISE_LIMIT_M_S, STARVING_FRACTION, FlowSplit
from simheat.report.caution import CAUTION
from simheat.report.numbers import KG_S_TO_KG_H, PA_PER_KPA, percent

__all__ = ["flow_split_dict", "flow_split_text"]


def flow_split_dict(split: FlowSplit) -> dict:
    """A steady flow split as JSON-ready data in practical units.

    Parameters
    ----------
    split : FlowSplit
        The steady flow split. [-]

    Returns
    -------
    dict
        Keys ``scheme``, ``water_temperature_C``, ``emitters``, ``pump`` (the pump
        through the heat source), ``pumps`` (every pump), ``limits`` and
        ``caution``; flows in kg/h, pressures in kPa, velocities in m/s.
    """
    return {
        "scheme": split.scheme,
        "water_temperature_C": split.water_temp_C,
        "emitters": [
            {
                "id": e.id,
                "flow_kg_per_h": round(e.flow_kg_s * KG_S_TO_KG_H, 2),
                "design_flow_kg_per_h": round(e.design_flow_kg_s * KG_S_TO_KG_H, 2),
                # None for an emitter shut for good (no design flow)
                "flow_pct_of_design": percent(e.flow_kg_s, e.design_flow_kg_s),
                "dp_available_kPa": round(e.dp_available_Pa / PA_PER_KPA, 3),
                "branch_velocity_m_per_s": round(e.branch_velocity_m_s, 3),
                "starving": e.starving,
                "noisy": e.noisy,
                "closed": e.closed,
            }
            for e in split.emitters
        ],
        "pump": {
            "flow_m3_per_h": round(split.pump_flow_m3_h, 4),
            "head_kPa": round(split.pump_head_Pa / PA_PER_KPA, 3),
        },
        "pumps": [
            {
                "name": name,
                "flow_m3_per_h": round(q, 4),
                "head_kPa": round(h / PA_PER_KPA, 3),
            }
            for name, q, h in split.pumps
        ],
        "limits": {
            "starving_below_pct_of_design": 100.0 * STARVING_FRACTION,
            "branch_noise_velocity_m_per_s": BRANCH_NOISE_LIMIT_M_S,
        },
        "caution": CAUTION,
    }


def flow_split_text(split: FlowSplit) -> str:
    """A steady flow split as a plain-text table with flags.

    Parameters
    ----------
    split : FlowSplit
        The steady flow split. [-]

    Returns
    -------
    str
        One row per emitter, the pump duty point and the meaning of the flags.
    """
    data = flow_split_dict(split)
    limits = data["limits"]
    lines = [
        f"steady flow split -- scheme: {data['scheme']}, all valves open, water at "
        f"{data['water_temperature_C']:g} °C",
        "",
        f"{'emitter':<14}{'flow':>10}{'design':>10}{'of design':>11}{'dp at tees':>12}"
        f"{'branch v':>11}  flags",
    ]
    for e in data["emitters"]:
        flags = []
        if e["starving"]:
            flags.append("STARVING")
        if e["noisy"]:
            flags.append("NOISE")
        if e["closed"]:
            flags.append("CLOSED")
        pct = e["flow_pct_of_design"]
        pct = "--" if pct is None else f"{pct:.0f} %"
        lines.append(
            f"{e['id']:<14}{e['flow_kg_per_h']:>5.0f} kg/h"
            f"{e['design_flow_kg_per_h']:>5.0f} kg/h"
            f"{pct:>11}{e['dp_available_kPa']:>8.2f} kPa"
            f"{e['branch_velocity_m_per_s']:>7.2f} m/s  {' '.join(flags)}"
        )
    lines += [
        "",
        *(
            f"pump duty point, {p['name']}: {p['flow_m3_per_h']:.3f} m3/h "
            f"at {p['head_kPa']:.1f} kPa"
            for p in data["pumps"]
        ),
        f"flags: STARVING below {limits['starving_below_pct_of_design']:.0f} % "
        f"of design flow; NOISE above {limits['branch_noise_velocity_m_per_s']:g} m/s "
        "in the branch (common trade limit)",
    ]
    return "\n".join(lines)
