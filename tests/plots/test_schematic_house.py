"""The schematic of the house-wide reverse-return schemes: no pipe drawn on another.

A drawn pipe is the polyline of :meth:`BuiltLayout.link_path_xy`; two pipes
*overlap* where segments of theirs are collinear and share a stretch of
positive length (one hides the other), and *cross* where segments meet at a
point inside both. Checked geometrically on the drawing positions the layout
records, the same ones the figure draws.
"""

from __future__ import annotations

import itertools
from pathlib import Path

import numpy as np
import pytest

from simheat.hydraulics.layouts import describe
from simheat.hydraulics.layouts.drawing import RETURN_RISER_X
from simheat.hydraulics.network import LINK_PIPE
from simheat.scenario import parse_scenario

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"
TWO_STOREY = (SCENARIOS / "two_storey.toml").read_text()
# The upper run split over a third floor, as in tests/hydraulics/test_reverse_house.py.
THREE_FLOORS = TWO_STOREY.replace(
    '  { emitter = "box",         header_length_m = 3.0, branch_length_m = 0.6 },\n',
    "]\n\n[[route.floors]]\nfloor = 2\nriser_length_m = 2.8\n"
    "tees = [\n"
    '  { emitter = "box",         header_length_m = 3.0, branch_length_m = 0.6 },\n',
)
HOUSES = {"two_storey": TWO_STOREY, "three_floors": THREE_FLOORS}
SCHEMES = ("reverse_return_single_loop", "reverse_return_risers")
EPS = 1e-9  # drawing units of order 1-20: far above round-off, far below any lane


def _segments(built, link):
    p = built.link_path_xy(link)
    return [(p[i], p[i + 1]) for i in range(len(p) - 1) if np.any(p[i] != p[i + 1])]


def _relation(s, t):
    """'overlap', 'cross' or None for two segments (parametric intersection)."""
    (a, b), (c, d) = s, t
    r, q, w = b - a, d - c, c - a
    denom = r[0] * q[1] - r[1] * q[0]
    if abs(denom) < EPS:
        if abs(w[0] * r[1] - w[1] * r[0]) > EPS:
            return None  # parallel, apart
        rr = float(r @ r)
        lo, hi = sorted((float(w @ r) / rr, float((d - a) @ r) / rr))
        return "overlap" if min(hi, 1.0) - max(lo, 0.0) > 1e-6 else None
    u = (w[0] * q[1] - w[1] * q[0]) / denom
    v = (w[0] * r[1] - w[1] * r[0]) / denom
    return "cross" if EPS < u < 1 - EPS and EPS < v < 1 - EPS else None


def _relations(built):
    net = built.network
    pipes = [k for k in range(net.n_links) if net.link_kind[k] == LINK_PIPE]
    found = []
    for k, m in itertools.combinations(pipes, 2):
        for s in _segments(built, k):
            for t in _segments(built, m):
                kind = _relation(s, t)
                if kind:
                    found.append((kind, net.link_names[k], net.link_names[m]))
    return found


def _straight(built):
    return type(built)(**{**built.__dict__, "link_via": {}})


@pytest.fixture(scope="module")
def built():
    return {
        (house, scheme): describe(parse_scenario(text), scheme)
        for house, text in HOUSES.items()
        for scheme in SCHEMES
    }


def test_the_measure_sees_overlaps_and_crossings():
    square = np.array([[0.0, 0.0], [2.0, 0.0]])
    assert _relation(square, np.array([[1.0, 0.0], [3.0, 0.0]])) == "overlap"
    assert _relation(square, np.array([[1.0, -1.0], [1.0, 1.0]])) == "cross"
    assert _relation(square, np.array([[2.0, 0.0], [2.0, 1.0]])) is None  # a joint
    assert _relation(square, np.array([[0.0, 1.0], [2.0, 1.0]])) is None


@pytest.mark.parametrize("house", HOUSES)
@pytest.mark.parametrize("scheme", SCHEMES)
def test_no_pipe_is_drawn_on_another(built, house, scheme):
    assert [r for r in _relations(built[house, scheme]) if r[0] == "overlap"] == []


@pytest.mark.parametrize("house", HOUSES)
def test_the_single_loops_drops_cross_nothing(built, house):
    layout = built[house, "reverse_return_single_loop"]
    crossing = [r for r in _relations(layout) if r[0] == "cross"]
    assert [r for r in crossing if ":drop:" in r[1] + r[2]] == []
    # what crosses is the lowest floor's way back, under the feed as in
    # reverse return: nothing else
    assert {r[2] for r in crossing} == {"floor0:return:back"}


@pytest.mark.parametrize("house", HOUSES)
def test_drawn_straight_the_drops_would_cut_across(built, house):
    # The measure can fail: without the waypoints the drops run diagonally
    # through the floors, and the way back lies on the lowest return header.
    straight = _relations(_straight(built[house, "reverse_return_single_loop"]))
    assert any(":drop:" in r[1] + r[2] for r in straight)
    assert any(r[0] == "overlap" for r in straight)


@pytest.mark.parametrize("house", HOUSES)
def test_the_return_riser_climbs_on_one_line_and_drops_left_of_the_tails(built, house):
    layout = built[house, "reverse_return_risers"]
    names = layout.network.link_names
    risers = [k for k, n in enumerate(names) if n.startswith("riser") and "return" in n]
    assert risers  # one per floor above the lowest
    xs = {float(x) for k in risers for x in layout.link_path_xy(k)[:, 0]}
    assert xs == {RETURN_RISER_X}
    drop = layout.link_path_xy(names.index("return_riser:drop"))
    tails = [layout.link_path_xy(k) for k, n in enumerate(names) if n.endswith(":back")]
    leftmost_tail = min(float(p[:, 0].min()) for p in tails)
    # down the drop's long vertical, left of where every tail turns up
    assert float(drop[2:, 0].max()) < leftmost_tail
