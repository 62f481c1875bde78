"""The schematic shows what the layout is: distinct return paths, sizes, floors.

Checks read the drawn artists (paths, gids, text positions), not only that a
figure renders.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.lines import Line2D
from matplotlib.path import Path as MplPath

from simheat.hydraulics.layouts import describe
from simheat.hydraulics.layouts.drawing import RETURN_TAIL_DY
from simheat.hydraulics.network import LINK_PIPE
from simheat.plots.schematic import pipe_label, plot_schematic, return_segments
from simheat.resolve import resolve
from simheat.resolve.route import split_run, tee_positions_m
from simheat.scenario import load_scenario

SCENARIOS_DIR = Path(__file__).resolve().parents[2] / "scenarios"


@pytest.fixture(scope="module")
def houses():
    return {
        name: load_scenario(SCENARIOS_DIR / f"{name}.toml")
        for name in ("bungalow", "two_storey")
    }


def _expected_return_pieces(scenario, scheme: str) -> int:
    """Straight pieces of the return drawn for a one-floor two-pipe scheme.

    Counted from the route alone: one piece per return-header segment of
    positive length (between consecutive tees; direct return also from the first
    tee back to the floor's start), one for the feed return, and for reverse
    return four for the tail (down to its lane, back along it, up, into the
    riser).
    """
    (floor,) = scenario.route.floors
    positions = tee_positions_m(floor)
    gaps = np.diff(positions)
    header = int(np.count_nonzero(gaps > 0.0))
    if scheme == "direct_return":
        header += int(positions[0] > 0.0)
        tail = 0
    else:
        tail = 4
    return header + tail + 1


@pytest.mark.parametrize("scheme", ["direct_return", "reverse_return"])
def test_return_path_pieces_are_distinct(houses, scheme):
    scenario = houses["bungalow"]
    built = describe(scenario, scheme)
    assert len(return_segments(built)) == _expected_return_pieces(scenario, scheme)


def test_reverse_return_tail_runs_on_its_own_lane(houses):
    built = describe(houses["two_storey"], "reverse_return")
    net = built.network
    for index, floor in enumerate(houses["two_storey"].route.floors):
        k = net.link_names.index(f"floor{floor.floor}:return:back")
        path = built.link_path_xy(k)
        floor_return_y = 4.0 * index
        lane = path[1:3]  # the run back along the lane
        assert lane[:, 1] == pytest.approx([floor_return_y - RETURN_TAIL_DY] * 2)
        assert lane[0, 0] > lane[1, 0]  # from the far end back towards the riser


def _segment_count_if_drawn_straight(built) -> int:
    """What the old drawing showed: every return pipe straight between its nodes."""
    plain = type(built)(
        **{**built.__dict__, "link_via": {}},
    )
    return len(return_segments(plain))


def test_straight_tail_would_hide_the_return(houses):
    # The measure itself can fail: drawn straight, the tail lies on the header.
    scenario = houses["bungalow"]
    built = describe(scenario, "reverse_return")
    assert _segment_count_if_drawn_straight(built) < _expected_return_pieces(
        scenario, "reverse_return"
    )


def test_every_pipe_size_is_written(houses):
    built = describe(houses["two_storey"], "reverse_return")
    fig = plot_schematic(built)
    written = {
        t.get_text() for t in fig.axes[0].texts if str(t.get_gid()).startswith("size:")
    }
    used = {
        pipe_label(spec.pipe)
        for k, spec in enumerate(built.links)
        if built.network.link_kind[k] == LINK_PIPE
        and spec.pipe is not None
        and spec.length_m > 0.0
        and spec.role != "low_loss_header"
    }
    assert written == used
    assert {"cu_22x1", "cu_15x1"} <= written  # the demo's header and upper floor


def test_a_header_of_one_size_is_labelled_once(houses):
    built = describe(houses["bungalow"], "direct_return")
    fig = plot_schematic(built)
    supply_y = max(built.node_xy[:, 1])
    labels = [
        t
        for t in fig.axes[0].texts
        if str(t.get_gid()).startswith("size:") and t.xy[1] == pytest.approx(supply_y)
    ]
    assert len(labels) == 1


def test_floors_are_named_at_their_bands(houses):
    scenario = houses["two_storey"]
    fig = plot_schematic(describe(scenario, "direct_return"))
    texts = {t.get_gid(): t for t in fig.axes[0].texts if t.get_gid()}
    for index, floor in enumerate(scenario.route.floors):
        text = texts[f"floor:floor {floor.floor}"]
        assert text.get_text() == f"floor {floor.floor}"
        assert 4.0 * index < text.get_position()[1] < 4.0 * index + 1.2


def test_split_point_is_marked_at_the_manifold(houses):
    scenario = houses["two_storey"]
    built = describe(scenario, "split_direct_return")
    fig = plot_schematic(built)
    marks = [
        line for line in fig.axes[0].lines if str(line.get_gid()).startswith("split:")
    ]
    design = resolve(scenario).design_mass_flow_kg_s
    expected = sorted(
        split_run(floor, design, "f").manifold_m for floor in scenario.route.floors
    )
    assert sorted(float(line.get_xdata()[0]) for line in marks) == pytest.approx(
        expected
    )


def _display_bbox_of_marker(line: Line2D, renderer):
    from matplotlib.transforms import Bbox

    x, y = line.get_xydata()[0]
    cx, cy = line.axes.transData.transform((x, y))
    r = line.get_markersize() / 2.0 * renderer.points_to_pixels(1.0)
    return Bbox.from_extents(cx - r, cy - r, cx + r, cy + r)


@pytest.mark.parametrize("house", ["bungalow", "two_storey"])
@pytest.mark.parametrize(
    "scheme", ["home_run_manifold_floor_pumps", "direct_return_floor_pumps"]
)
def test_pump_symbols_and_labels_keep_clear_of_pipes(houses, house, scheme):
    fig = plot_schematic(describe(houses[house], scheme))
    renderer = FigureCanvasAgg(fig).get_renderer()
    fig.draw(renderer)  # settle the layout
    ax = fig.axes[0]
    pipes = [
        line
        for line in ax.lines
        if str(line.get_gid()).startswith(("link:", "branch:"))
    ]
    pumps = [line for line in ax.lines if str(line.get_gid()).startswith("pump:")]
    labels = {
        t.get_gid().split(":", 1)[1]: t
        for t in ax.texts
        if str(t.get_gid()).startswith("pump_label:")
    }
    assert len(pumps) == len(labels) >= 2
    for pump in pumps:
        name = pump.get_gid().split(":", 1)[1]
        boxes = {
            "symbol": _display_bbox_of_marker(pump, renderer).shrunk(0.8, 0.8),
            "label": labels[name].get_window_extent(renderer),
        }
        for pipe in pipes:
            if pipe.get_gid() == f"link:{name}":
                continue  # a pump sits on its own pipe
            path = MplPath(ax.transData.transform(pipe.get_xydata()))
            for what, box in boxes.items():
                assert not path.intersects_bbox(box, filled=False), (
                    f"{name} {what} overlaps {pipe.get_gid()}"
                )


def test_on_a_ring_the_split_is_marked_where_both_circuits_end(houses):
    scenario = houses["bungalow"]  # its run closes on itself
    (floor,) = scenario.route.floors
    assert floor.closing_length_m is not None
    run = split_run(floor, resolve(scenario).design_mass_flow_kg_s, "f")
    fig = plot_schematic(describe(scenario, "split_direct_return"))
    marks = sorted(
        float(line.get_xdata()[0])
        for line in fig.axes[0].lines
        if str(line.get_gid()).startswith("split:")
    )
    ahead_end = run.manifold_m + sum(length for _, length in run.ahead)
    back_end = run.manifold_m - sum(length for _, length in run.back)
    assert marks == pytest.approx(sorted([back_end, ahead_end]))
    # Unrolled, the ends lie less than a ring apart: the stretch of the ring
    # between the two circuits' last radiators carries no pipe.
    ring = float(tee_positions_m(floor)[-1]) + floor.closing_length_m
    assert 0.0 < ahead_end - back_end < ring
