"""The heat pump's part of the compiled source block: capacity, COP, flow share.

Called from the compiled right-hand side (:func:`simheat.dynamics._kernels.warmup_rhs`)
with the source's record (:class:`simheat.dynamics._records.SourceParams`). A
boiler's record answers with its fixed power limit, a full flow share and no
electricity; a heat pump's reads its rating table at the moment's outdoor
temperature and the temperature of the water it delivers. The laws themselves
live in :mod:`simheat.physics._heat_pump_kernels`.
"""

from __future__ import annotations

from simheat._jit import njit
from simheat.dynamics._records import SOURCE_HEAT_PUMP
from simheat.physics._heat_pump_kernels import min_flow_share, table_lookup


@njit(cache=True)
def source_capacity_W(source, outdoor_C, flow_C):
    """The most heat the source can give now.

    Parameters
    ----------
    source : SourceParams
        The source's record. [-]
    outdoor_C : float
        Outdoor temperature. [°C]
    flow_C : float
        Temperature of the water the source delivers. [°C]

    Returns
    -------
    float
        A boiler's power limit; a heat pump's rated capacity at the outdoor and
        flow temperature, interpolated in its rating table
        (:func:`simheat.physics._heat_pump_kernels.table_lookup`, held at the
        table's edges). [W]
    """
    if source.kind == SOURCE_HEAT_PUMP:
        return table_lookup(
            source.outdoor_axis_C,
            source.flow_axis_C,
            source.capacity_W,
            outdoor_C,
            flow_C,
        )
    return source.max_power_W


@njit(cache=True)
def source_cop(source, outdoor_C, flow_C):
    """A heat pump's COP at the outdoor and flow temperature.

    Parameters
    ----------
    source : SourceParams
        A heat pump's record. [-]
    outdoor_C : float
        Outdoor temperature. [°C]
    flow_C : float
        Temperature of the water it delivers. [°C]

    Returns
    -------
    float
        The rating table's COP there, bilinear and held at the edges. [-]
    """
    return table_lookup(
        source.outdoor_axis_C, source.flow_axis_C, source.cop, outdoor_C, flow_C
    )


@njit(cache=True)
def source_flow_share(source, flow_kg_s):
    """Share of the source's output its flow allows.

    Parameters
    ----------
    source : SourceParams
        The source's record. [-]
    flow_kg_s : float
        Water flow through the source. [kg/s]

    Returns
    -------
    float
        1 for a boiler; for a heat pump 0 below its minimum flow, 1 above,
        smooth between (:func:`simheat.physics._heat_pump_kernels.min_flow_share`). [-]
    """
    if source.kind == SOURCE_HEAT_PUMP:
        return min_flow_share(flow_kg_s, source.min_flow_kg_s)
    return 1.0


@njit(cache=True)
def source_electric_W(source, heat_W, outdoor_C, flow_C):
    """Electric power a heat pump draws for the heat it gives now.

    Parameters
    ----------
    source : SourceParams
        The source's record. [-]
    heat_W : float
        Heat the source puts into the water. [W]
    outdoor_C : float
        Outdoor temperature. [°C]
    flow_C : float
        Temperature of the water it delivers. [°C]

    Returns
    -------
    float
        ``heat_W`` over the COP of the rating table at the same point (the
        definition of COP, EN 14511-1); 0 for a boiler (its fuel is not
        counted). [W]
    """
    if source.kind == SOURCE_HEAT_PUMP:
        return heat_W / source_cop(source, outdoor_C, flow_C)
    return 0.0
