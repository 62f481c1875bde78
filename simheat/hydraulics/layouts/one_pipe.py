"""One-pipe loop: emitters in series on one loop, each fed through diverter tees.

The loop leaves the riser, runs along the floor's run through every tee point
and returns to the riser (round the ring when the run is closed, else back along
the run). At each emitter a diverter tee sends part of the loop flow through the
emitter while the rest passes the short loop segment between the emitter's two
tees (the bypass). Water leaving an emitter mixes back into the loop, so each
emitter downstream is fed cooler water.

The bypass resistance comes from the scenario: either the share of the loop flow
each emitter takes at design (``layout.one_pipe_emitter_share``; the bypass zeta
is then solved for, per emitter) or the zeta of the tee's run
(``layout.one_pipe_tee_zeta``; the share then follows). The loop's design flow
carries the floor's design load at the design temperature drop.
"""

from __future__ import annotations

import math

from scipy.optimize import brentq

from simheat.errors import ScenarioError
from simheat.hydraulics.layouts.builder import Builder
from simheat.hydraulics.layouts.drawing import (
    ONE_PIPE_EMITTER_Y,
    SUPPLY_Y,
    floor_y,
    tail_lane,
)
from simheat.hydraulics.layouts.pipes import link_pressure_drop_Pa
from simheat.hydraulics.layouts.records import Along, LinkSpec
from simheat.hydraulics.network import LINE_RETURN, LINE_SUPPLY, LINK_PIPE
from simheat.physics._kernels import water_density_kg_m3
from simheat.resolve.route import tee_positions_m
from simheat.scenario.model import FloorRoute

# Loop pipe between a diverter tee and the return tee of the same emitter: about
# a radiator's connection spacing (our choice). It is not part of the route's
# header lengths. [m]
BYPASS_LENGTH_M = 0.3
# Share of the loop flow through each emitter when the scenario gives neither the
# share nor a tee zeta: about a third (common trade practice, from memory). [-]
DEFAULT_EMITTER_SHARE = 0.35
# Below this share of the loop flow a tee is taken to pass no water to its
# emitter. [-]
MIN_EMITTER_SHARE = 0.01
DRAW_HALF_SPAN = 0.3  # half the drawn spacing of an emitter's two tees


def one_pipe_floor(
    b: Builder, floor: FloorRoute, index: int, supply: int, ret: int
) -> None:
    """One-pipe loop with diverter tees on one floor.

    Parameters
    ----------
    b : Builder
        The network under construction. [-]
    floor : FloorRoute
        The floor's run. [-]
    index : int
        Route index of the floor (for drawing). [-]
    supply, ret : int
        Supply and return nodes where the floor's circuit starts. [-]
    """
    s = b.scenario
    layout = s.layout
    y = floor_y(index)
    loop_flow = b.flow(t.emitter for t in floor.tees)
    share = layout.one_pipe_emitter_share or DEFAULT_EMITTER_SHARE
    pipe = floor.header_pipe
    node = supply
    pairs = []
    for tee, x in zip(floor.tees, tee_positions_m(floor), strict=True):
        e = s.emitters[tee.emitter]
        height = b.geometry.tee_height(index, tee)
        diverter = b.pipe(
            f"loop:{e.id}",
            node,
            tee.header_length_m,
            pipe,
            {"elbow": b.table.elbows_per_header_segment},
            LINE_SUPPLY,
            e.room,
            role="loop",
            flow_kg_s=loop_flow,
            end_xy=(float(x) - DRAW_HALF_SPAN, y + SUPPLY_Y),
            end_height_m=height,
            along=Along(index, float(x) - tee.header_length_m, float(x)),
        )
        if diverter == node and pairs:
            # Two emitters at one point: keep their tee pairs apart.
            diverter = b.node(
                f"loop:{e.id}:tee", LINE_SUPPLY, b.distance(node), b.xy(node), height
            )
            b.add(
                LinkSpec(
                    f"loop:{e.id}",
                    node,
                    diverter,
                    LINK_PIPE,
                    "loop",
                    pipe=pipe,
                    fittings={"elbow": 0, "tee_run": 1},
                    room=e.room,
                    design_flow_kg_s=loop_flow,
                )
            )
        joint = b.node(
            f"loop:{e.id}:return_tee",
            LINE_SUPPLY,
            b.distance(diverter) + BYPASS_LENGTH_M,
            (float(x) + DRAW_HALF_SPAN, y + SUPPLY_Y),
            height,
        )
        bypass = b.add(
            LinkSpec(
                f"bypass:{e.id}",
                diverter,
                joint,
                LINK_PIPE,
                "bypass",
                length_m=BYPASS_LENGTH_M,
                pipe=pipe,
                room=e.room,
                design_flow_kg_s=(1.0 - share) * loop_flow,
            )
        )
        link = b.emitter(
            tee.emitter,
            diverter,
            joint,
            2.0 * tee.branch_length_m,
            floor.branch_pipe,
            b.emitter_fittings(),
            (float(x), y + ONE_PIPE_EMITTER_Y),
            flow_kg_s=share * loop_flow,
        )
        b.count["diverter_tee"] += 2
        pairs.append((tee.emitter, link, bypass))
        node = joint
    closing = floor.closing_length_m
    last_m = float(tee_positions_m(floor)[-1])
    back_m = closing if closing is not None else last_m
    b.pipe(
        f"loop:floor{floor.floor}:return",
        node,
        back_m,
        pipe,
        {"elbow": b.table.elbows_per_header_segment},
        LINE_RETURN,
        -1,
        role="loop",
        flow_kg_s=loop_flow,
        end=ret,
        # round the ring's closing pipe, or back along the open run
        along=(
            Along(index, last_m, last_m + back_m, True)
            if closing
            else Along(index, last_m, 0.0, False)
        ),
        via=tail_lane(b.xy(node), b.xy(ret)),
    )
    b.after_sizing.append(lambda builder: _set_bypasses(builder, pairs, loop_flow))


def _set_bypasses(b: Builder, pairs, loop_flow: float) -> None:
    """Give each bypass its resistance and each tee pair its design split."""
    layout = b.scenario.layout
    temp = b.resolved.design_water_temp_C
    rho = float(water_density_kg_m3(temp))
    for emitter, link, bypass in pairs:
        e_spec, b_spec = b.links[link], b.links[bypass]
        e_zeta = b.zeta(e_spec.fittings)
        e_id = b.scenario.emitters[emitter].id

        def emitter_dp(m, e_spec=e_spec, e_zeta=e_zeta):
            return link_pressure_drop_Pa(e_spec, m, e_zeta, temp)

        if layout.one_pipe_tee_zeta is not None:
            zeta = layout.one_pipe_tee_zeta

            def imbalance(share, b_spec=b_spec, zeta=zeta, emitter_dp=emitter_dp):
                bypass_dp = link_pressure_drop_Pa(
                    b_spec, (1.0 - share) * loop_flow, zeta, temp
                )
                return emitter_dp(share * loop_flow) - bypass_dp

            share = float(brentq(imbalance, 0.0, 1.0, xtol=1e-10))
            if share < MIN_EMITTER_SHARE:
                raise ScenarioError(
                    f"layout.one_pipe_tee_zeta: with a tee zeta of {zeta:g} the "
                    f"diverter tees pass only {100 * share:.2g} % of the loop flow "
                    f"to emitter {e_id!r} (at least {100 * MIN_EMITTER_SHARE:g} % "
                    "needed); raise the tee zeta"
                )
        else:
            share = layout.one_pipe_emitter_share or DEFAULT_EMITTER_SHARE
            m_bypass = (1.0 - share) * loop_flow
            area = math.pi / 4.0 * b_spec.pipe.inner_diameter_m**2
            v = m_bypass / (rho * area)
            friction = link_pressure_drop_Pa(b_spec, m_bypass, 0.0, temp)
            zeta = (emitter_dp(share * loop_flow) - friction) / (0.5 * rho * v * v)
            if zeta < 0.0:
                raise ScenarioError(
                    f"layout.one_pipe_emitter_share: a share of {share:g} cannot be "
                    f"reached at emitter {e_id!r}: even an unrestricted bypass takes "
                    "less of the flow; raise the share"
                )
        b_spec.extra_zeta = zeta
        b_spec.fittings = {}
        e_spec.design_flow_kg_s = share * loop_flow
        b_spec.design_flow_kg_s = (1.0 - share) * loop_flow
