"""Layouts as installed: tapered headers, fittings, obstacles, heights."""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
from fluids.core import dP_from_K
from fluids.friction import one_phase_dP
from iapws import IAPWS95

from simheat.hydraulics import layouts
from simheat.hydraulics.heights import FILL_MARGIN_KPA
from simheat.hydraulics.layouts.pipes import pipe_series
from simheat.hydraulics.sizing import design_figures
from simheat.hydraulics.solver import solve_flows
from simheat.physics.water import density_kg_m3, viscosity_Pa_s
from simheat.resolve import resolve
from simheat.scenario import parse_scenario

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"
BUNGALOW = (SCENARIOS / "bungalow.toml").read_text()
TWO_STOREY = (SCENARIOS / "two_storey.toml").read_text()
G = 9.80665  # standard gravity, 3rd CGPM (1901)


def _tee(text: str, emitter: str, keys: str) -> str:
    """Add keys to the inline table of ``emitter``'s tee."""
    start = text.index(f'{{ emitter = "{emitter}"')
    end = text.index("}", start)
    return text[:end].rstrip() + ", " + keys + " " + text[end:]


def _floor0(text: str, keys: str) -> str:
    old = "[[route.floors]]\nfloor = 0\n"
    return text.replace(old, old + keys + "\n", 1)


def _link(built, name):
    return next(spec for spec in built.links if spec.name == name)


# -- tapered headers ----------------------------------------------------------


def test_tee_header_pipe_sets_both_lines_of_its_stretch():
    text = _tee(TWO_STOREY, "kitchen", 'header_pipe = "cu_28x1"')
    text = _tee(text, "lounge_back", 'header_pipe = "cu_15x1"')
    built = layouts.describe(parse_scenario(text), "direct_return")
    for line in ("supply", "return"):
        assert _link(built, f"header:{line}:kitchen").pipe.name == "cu_28x1"
        assert _link(built, f"header:{line}:wc").pipe.name == "cu_22x1"  # floor's
        assert _link(built, f"header:{line}:lounge_back").pipe.name == "cu_15x1"


def test_reverse_return_takes_the_return_header_pipe_on_the_return_line():
    # Reverse return: on the stretch from wc to hall the supply carries the flow
    # of hall onwards, the return that of kitchen and wc; the return segment of
    # that stretch is named after the tee it starts from (wc).
    text = _tee(
        TWO_STOREY, "hall", 'header_pipe = "cu_15x1", return_header_pipe = "cu_28x1"'
    )
    built = layouts.describe(parse_scenario(text), "reverse_return")
    assert _link(built, "header:supply:hall").pipe.name == "cu_15x1"
    assert _link(built, "header:return:wc").pipe.name == "cu_28x1"
    # The return back along the whole run spans every stretch: the floor's pipe.
    assert _link(built, "floor0:return:back").pipe.name == "cu_22x1"


def test_auto_sizing_steps_a_tapered_header_down_within_the_limits():
    # Every supply segment of a direct-return header gets the smallest copper
    # size within 0.7 m/s and 150 Pa/m at its own design flow (velocity by hand
    # with IAPWS-95 density); the size before it in the series breaks a limit.
    text = TWO_STOREY + '\n[layout.sizing]\nmode = "auto"\n'
    scenario = parse_scenario(text)
    built = layouts.describe(scenario, "direct_return")
    figures = {s.link: s for s in design_figures(built).header_segments}
    temp = resolve(scenario).design_water_temp_C
    rho = IAPWS95(T=temp + 273.15, P=0.1).rho
    bores = []
    for tee in scenario.route.floors[0].tees:
        name = f"header:supply:{scenario.emitters[tee.emitter].id}"
        spec = _link(built, name)
        flow = spec.design_flow_kg_s
        v = flow / (rho * math.pi * spec.pipe.inner_diameter_m**2 / 4)
        # our density fit is within 1e-4 of IAPWS-95 (tests/physics/test_water)
        assert figures[name].velocity_m_s == pytest.approx(v, rel=1e-4)
        assert v <= 0.7
        assert figures[name].gradient_Pa_m <= 150.0
        series = pipe_series(spec.pipe.name)
        i = [p.name for p in series].index(spec.pipe.name)
        if i > 0:
            smaller = series[i - 1]
            v_small = flow / (rho * math.pi * smaller.inner_diameter_m**2 / 4)
            dp_small, _ = _friction(flow, smaller, temp)
            assert v_small > 0.7 or dp_small > 150.0
        assert figures[name].flow_kg_h == pytest.approx(3600 * flow, rel=1e-12)
        bores.append(spec.pipe.inner_diameter_m)
    # The flows fall along the run, so the sizes step down (never up).
    assert np.all(np.diff(bores) <= 0.0)
    assert bores[0] > bores[-1]


def _friction(flow, pipe, temp):
    """Friction per metre by fluids (Colebrook-White), our water properties."""
    rho, mu = float(density_kg_m3(temp)), float(viscosity_Pa_s(temp))
    dp = one_phase_dP(
        flow, rho, mu, pipe.inner_diameter_m, pipe.roughness_m, 1.0, "Colebrook"
    )
    return dp, None


def test_auto_sizing_keeps_a_tees_series():
    text = _tee(TWO_STOREY, "kitchen", 'header_pipe = "pex_20x2"')
    text += '\n[layout.sizing]\nmode = "auto"\n'
    built = layouts.describe(parse_scenario(text), "direct_return")
    assert _link(built, "header:supply:kitchen").pipe.name.startswith("pex_")
    assert _link(built, "header:supply:wc").pipe.name.startswith("cu_")


# -- fittings where they are --------------------------------------------------


def test_tee_fittings_reach_the_emitter_circuit():
    scenario = parse_scenario(TWO_STOREY)
    base = layouts.build(scenario, "direct_return")
    text = _tee(
        TWO_STOREY,
        "hall",
        'extra_elbows = 2, extra_zeta = 1.25, fittings = ["ball_valve", "elbow_45"]',
    )
    built = layouts.describe(parse_scenario(text), "direct_return")
    k = built.network.link_names.index("emitter:hall")
    table = built.fittings
    added = 2 * table.elbow_zeta + 1.25 + table.ball_valve_zeta + table.elbow_45_zeta
    assert built.network.zeta[k] - base.zeta[k] == pytest.approx(added, rel=1e-12)
    assert built.fitting_count["ball_valve"] == 1
    assert built.fitting_count["elbow_45"] == 1


@pytest.mark.parametrize("scheme", ["direct_return", "reverse_return"])
def test_header_fittings_sit_on_the_header_of_their_stretch_only(scheme):
    scenario = parse_scenario(TWO_STOREY)
    base = layouts.build(scenario, scheme)
    text = _tee(TWO_STOREY, "hall", 'header_fittings = ["ball_valve"]')
    net = layouts.build(parse_scenario(text), scheme)
    changed = {net.link_names[k] for k in np.flatnonzero(net.zeta != base.zeta)}
    # The stretch from wc to hall: its supply segment (named after hall) and its
    # return segment (after hall under direct return, after wc under reverse).
    ret = "header:return:hall" if scheme == "direct_return" else "header:return:wc"
    assert changed == {"header:supply:hall", ret}
    k = net.link_names.index("header:supply:hall")
    assert net.zeta[k] - base.zeta[k] == pytest.approx(
        scenario.layout.fittings.ball_valve_zeta, rel=1e-12
    )


# -- obstacles ------------------------------------------------------------------

DOOR = (
    'obstacles = [{ name = "hall door", position_m = 14.0, passed = "over", '
    "height_m = 2.1 }]"
)  # between living_a (13.0 m) and living_b (17.0 m) on the bungalow's ring


@pytest.fixture(scope="module")
def door_loop():
    """The bungalow's one-pipe ring without and with a door on the loop."""
    before = layouts.describe(parse_scenario(BUNGALOW), "one_pipe_loop")
    after = layouts.describe(parse_scenario(_floor0(BUNGALOW, DOOR)), "one_pipe_loop")
    return before, after


def test_over_the_door_adds_rise_and_fall_and_four_elbows(door_loop):
    before, after = door_loop
    k = before.network.link_names.index("loop:living_b")
    added_m = after.network.length_m - before.network.length_m
    assert added_m[k] == pytest.approx(2 * 2.1, rel=1e-12)
    assert np.count_nonzero(added_m) == 1  # only the loop segment passes it
    assert after.network.zeta[k] - before.network.zeta[k] == pytest.approx(
        4 * after.fittings.elbow_zeta, rel=1e-12
    )
    assert after.fitting_count["elbow"] - before.fitting_count["elbow"] == 4


def test_over_the_door_makes_exactly_one_high_point_with_its_vent(door_loop):
    before, after = door_loop
    flat = design_figures(before).heights
    # The level house is one level stretch: one vent, one drain.
    assert len(flat.high_points) == 1
    assert len(flat.low_points) == 1
    heights = design_figures(after).heights
    assert len(heights.high_points) == 1
    (vent,) = heights.high_points
    assert (vent.where, vent.obstacle) == ("loop:living_b", "hall door")
    assert vent.height_m == pytest.approx(2.1, rel=1e-12)
    assert heights.highest_m == pytest.approx(2.1, rel=1e-12)
    (cost,) = design_figures(after).obstacles
    assert (cost.pipes, cost.air_vents, cost.drains) == (1, 1, 0)


def test_over_the_door_pressure_drop_is_the_added_pipe_and_elbows(door_loop):
    # By hand: Darcy-Weisbach with Colebrook-White (fluids.friction.one_phase_dP)
    # for the 4.2 m of added pipe plus K rho v^2 / 2 for the four elbows
    # (fluids.core.dP_from_K), at the loop's design flow and mean design
    # temperature, our water properties (checked against IAPWS-95 elsewhere).
    # Tolerance: the zeta term's regularisation, v0^2/(2 v^2) < 1e-7 here.
    before, after = door_loop
    spec = _link(after, "loop:living_b")
    flow = spec.design_flow_kg_s
    temp = after.design_temp_C
    rho, mu = float(density_kg_m3(temp)), float(viscosity_Pa_s(temp))
    d = spec.pipe.inner_diameter_m
    v = flow / (rho * math.pi * d**2 / 4)
    assert rho * v * d / mu > 4000  # turbulent: outside our transition blend
    by_hand = one_phase_dP(flow, rho, mu, d, spec.pipe.roughness_m, 4.2, "Colebrook")
    by_hand += dP_from_K(4 * after.fittings.elbow_zeta, rho, v)
    (cost,) = design_figures(after).obstacles
    assert cost.extra_pressure_drop_kPa * 1e3 == pytest.approx(by_hand, rel=1e-6)
    assert cost.extra_length_m == pytest.approx(4.2)
    assert cost.extra_elbows == 4


def test_the_flow_solve_sees_the_detour(door_loop):
    # The longer loop gives the pump more to push: less loop flow at the design
    # temperature.
    before, after = door_loop
    k = before.network.link_names.index("loop:floor0:return")
    m0 = solve_flows(before.network, water_temp_C=65.0).mass_flow_kg_s[k]
    m1 = solve_flows(after.network, water_temp_C=65.0).mass_flow_kg_s[k]
    assert m1 < m0


def test_two_pipe_headers_each_get_a_vent_over_the_door():
    # Both header lines pass the door: one high point each. The headers beyond
    # the door are cut off from the plant by the humps (radiators sit above
    # them and drain nothing): each needs its own drain, besides the plant's.
    built = layouts.describe(parse_scenario(_floor0(BUNGALOW, DOOR)), "direct_return")
    figures = design_figures(built)
    vents = sorted(p.where for p in figures.heights.high_points)
    assert vents == ["header:return:living_b", "header:supply:living_b"]
    assert len(figures.heights.low_points) == 3
    (cost,) = figures.obstacles
    assert (cost.pipes, cost.air_vents, cost.extra_elbows) == (2, 2, 8)


def test_home_run_legs_each_pass_the_door():
    built = layouts.describe(
        parse_scenario(_floor0(BUNGALOW, DOOR)), "home_run_manifold"
    )
    (cost,) = design_figures(built).obstacles
    # The manifold sits at the ring's start: the pairs to the emitters from 14 m
    # to the far side of the ring (24.25 m) pass the door, two legs each.
    scenario = parse_scenario(BUNGALOW)
    passing = [
        t
        for t, x in zip(
            scenario.route.floors[0].tees,
            np.cumsum([t.header_length_m for t in scenario.route.floors[0].tees]),
            strict=True,
        )
        if 14.0 < x <= 48.5 / 2
    ]
    assert cost.pipes == 2 * len(passing)
    assert cost.air_vents == cost.pipes


def test_under_a_beam_makes_a_low_point():
    beam = (
        'obstacles = [{ name = "beam", position_m = 14.0, passed = "under", '
        "depth_m = 0.4 }]"
    )
    built = layouts.describe(parse_scenario(_floor0(BUNGALOW, beam)), "one_pipe_loop")
    heights = design_figures(built).heights
    drains = [p for p in heights.low_points if p.obstacle == "beam"]
    assert len(drains) == 1
    assert drains[0].height_m == pytest.approx(-0.4)
    assert heights.lowest_m == pytest.approx(-0.4)
    # the level loop around it is now a high point (every pipe away dips)
    assert [p.obstacle for p in heights.high_points] == [None]


def test_around_a_column_adds_pipe_and_elbows_and_no_vent_or_drain(door_loop):
    # Passed around: the loop segment gains the given 1.5 m and its 4 elbows,
    # stays level (the level house keeps its one vent and one drain), and the
    # extra pressure drop is that pipe and those elbows by hand as for the door.
    column = (
        'obstacles = [{ name = "column", position_m = 14.0, passed = "around", '
        "extra_length_m = 1.5 }]"
    )
    before, _ = door_loop
    after = layouts.describe(parse_scenario(_floor0(BUNGALOW, column)), "one_pipe_loop")
    k = before.network.link_names.index("loop:living_b")
    added_m = after.network.length_m - before.network.length_m
    assert added_m[k] == pytest.approx(1.5, rel=1e-12)
    assert np.count_nonzero(added_m) == 1
    figures = design_figures(after)
    assert (len(figures.heights.high_points), len(figures.heights.low_points)) == (1, 1)
    (cost,) = figures.obstacles
    assert (cost.pipes, cost.extra_elbows, cost.air_vents, cost.drains) == (1, 4, 0, 0)
    spec = _link(after, "loop:living_b")
    temp = after.design_temp_C
    rho, mu = float(density_kg_m3(temp)), float(viscosity_Pa_s(temp))
    d = spec.pipe.inner_diameter_m
    v = spec.design_flow_kg_s / (rho * math.pi * d**2 / 4)
    by_hand = one_phase_dP(
        spec.design_flow_kg_s, rho, mu, d, spec.pipe.roughness_m, 1.5, "Colebrook"
    ) + dP_from_K(4 * after.fittings.elbow_zeta, rho, v)
    assert cost.extra_pressure_drop_kPa * 1e3 == pytest.approx(by_hand, rel=1e-6)


# -- heights ------------------------------------------------------------------


def test_two_storey_static_head_and_fill_pressure():
    # The upper floor sits 3 m up (its riser, taken as vertical); hydrostatics
    # p = rho g h with cold water (IAPWS-95 at 10 °C) and standard gravity.
    built = layouts.describe(parse_scenario(TWO_STOREY), "direct_return")
    h = design_figures(built).heights
    rho = IAPWS95(T=283.15, P=0.1).rho
    assert (h.highest_m, h.lowest_m) == (3.0, 0.0)
    assert h.static_head_kPa == pytest.approx(rho * G * 3.0 / 1e3, rel=1e-4)
    assert h.fill_pressure_kPa == pytest.approx(
        rho * G * 3.0 / 1e3 + FILL_MARGIN_KPA, rel=1e-4
    )
    # Upper supply and return headers: a vent each; the plant: the drain.
    assert len(h.high_points) == 2
    assert [p.where for p in h.low_points] == ["plant:return"]


def test_a_raised_tee_is_a_high_point_of_both_headers():
    # hall's tee 1 m up between wc and lounge_front at floor level: the headers
    # climb to it and fall away. Beyond it both header lines are cut off from
    # the plant's level (one drain each).
    text = _tee(TWO_STOREY, "hall", "height_m = 1.0")
    h = design_figures(layouts.describe(parse_scenario(text), "direct_return")).heights
    at_hall = sorted(p.where for p in h.high_points if p.height_m == 1.0)
    assert at_hall == ["header:return:hall:start", "header:supply:hall:end"]
    assert len(h.high_points) == 4  # and the upper floor's two
    assert len(h.low_points) == 3


def test_heights_of_a_basement_plant():
    # Ground floor 2.4 m above the plant, up a 2.4 m riser from the feed.
    text = TWO_STOREY.replace(
        "[[route.floors]]\nfloor = 0\n",
        "[[route.floors]]\nfloor = 0\nriser_length_m = 2.4\n",
    )
    built = layouts.describe(parse_scenario(text), "direct_return")
    h = design_figures(built).heights
    assert built.node_height_m[built.network.node_names.index("plant:supply")] == 0.0
    assert h.highest_m == pytest.approx(5.4)
    assert h.lowest_m == 0.0
