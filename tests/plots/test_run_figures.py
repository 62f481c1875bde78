"""Flows, source, energy and pressure figures draw the run's own numbers."""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
from matplotlib.figure import Figure

from simheat.analysis.flows import STARVING_FRACTION, steady_flow_split
from simheat.analysis.pressure import design_pressure_profile
from simheat.plots._style import PALETTE
from simheat.plots.energy import plot_energy
from simheat.plots.flows import plot_flows, route_order
from simheat.plots.pressure import plot_pressure
from simheat.plots.source import plot_source
from simheat.report.figures import RUN_FIGURES

SCHEMES = ["direct_return", "reverse_return"]


def artists_with_prefix(ax, prefix, kind="lines"):
    return [a for a in getattr(ax, kind) if (a.get_gid() or "").startswith(prefix)]


def bars(ax):
    return {p.get_gid().removeprefix("flow:"): p for p in artists_with_prefix(
        ax, "flow:", "patches")}  # fmt: skip


@pytest.fixture(scope="module")
def profiles(bungalow_runs):
    """Design-point pressure profile of each bungalow run, ``{scheme: profile}``."""
    return {s: design_pressure_profile(run) for s, run in bungalow_runs.items()}


@pytest.mark.parametrize("kind", sorted(RUN_FIGURES))
def test_kind_draws_into_given_axes(bungalow_runs, kind):
    fig = Figure()
    ax = fig.add_subplot()
    assert RUN_FIGURES[kind](bungalow_runs["direct_return"], ax=ax) is fig


@pytest.mark.parametrize("scheme", SCHEMES)
def test_flow_bars_are_mean_comfort_flows_in_kg_per_h(bungalow_runs, scheme):
    run = bungalow_runs[scheme]
    drawn = bars(plot_flows(run).axes[0])
    assert list(drawn) == [run.summary.emitters[i].id for i in route_order(run)]
    for result in run.summary.emitters:
        expected = result.mean_flow_kg_s * 3600.0
        assert drawn[result.id].get_height() == pytest.approx(expected, rel=1e-12)


def test_design_ticks_sit_at_design_flow(bungalow_runs):
    run = bungalow_runs["direct_return"]
    ax = plot_flows(run).axes[0]
    for result in run.summary.emitters:
        (tick,) = artists_with_prefix(ax, f"design:{result.id}")
        expected = result.design_flow_kg_s * 3600.0
        np.testing.assert_allclose(tick.get_ydata(), [expected] * 2, rtol=1e-12)
        (limit,) = artists_with_prefix(ax, f"limit:{result.id}")
        np.testing.assert_allclose(
            limit.get_ydata(), [STARVING_FRACTION * expected] * 2, rtol=1e-12
        )


def test_route_order_follows_the_tees_floor_by_floor(bungalow_runs):
    run = bungalow_runs["direct_return"]
    tees = [t.emitter for f in run.scenario.route.floors for t in f.tees]
    assert route_order(run) == tees
    assert sorted(tees) == list(range(len(run.scenario.emitters)))


@pytest.fixture(scope="module")
def design_split(bungalow_runs):
    """The bungalow's direct return at design conditions (heads open)."""
    run = bungalow_runs["direct_return"]
    return steady_flow_split(run.scenario, run.scheme)


def _with_design_share(split, share):
    first = split.emitters[0]
    emitters = (
        dataclasses.replace(first, flow_kg_s=share * first.design_flow_kg_s),
        *split.emitters[1:],
    )
    return dataclasses.replace(split, emitters=emitters), first.id


@pytest.mark.parametrize(
    ("share", "hatched", "label"),
    [
        (0.5, True, "50 %"),
        (0.897, True, "89.7 %"),  # whole percent would read 90 %: one decimal
        (STARVING_FRACTION - 1e-6, True, "89.9 %"),
        (STARVING_FRACTION, False, "90 %"),
        (0.9004, False, "90 %"),
        (1.0, False, "100 %"),
    ],
)
def test_starving_at_design_conditions_hatches_and_labels_by_one_rule(
    bungalow_runs, design_split, share, hatched, label
):
    run = bungalow_runs["direct_return"]
    split, emitter = _with_design_share(design_split, share)
    ax = plot_flows(run, design=split).axes[0]
    assert (bars(ax)[emitter].get_hatch() == "//") is hatched
    (text,) = [t for t in ax.texts if t.get_gid() == f"share:{emitter}"]
    assert text.get_text() == label
    (diamond,) = artists_with_prefix(ax, f"at_design:{emitter}")
    expected = share * design_split.emitters[0].design_flow_kg_s * 3600.0
    assert diamond.get_ydata()[0] == pytest.approx(expected, rel=1e-12)


def test_head_throttled_mean_flow_alone_is_not_called_starving(bungalow_runs):
    # A room at setpoint throttles its radiator far below design: without the
    # design-condition split the figure judges nothing and says so.
    run = bungalow_runs["direct_return"]
    emitters = list(run.summary.emitters)
    emitters[0] = dataclasses.replace(
        emitters[0], mean_flow_kg_s=0.3 * emitters[0].design_flow_kg_s
    )
    summary = dataclasses.replace(run.summary, emitters=tuple(emitters))
    ax = plot_flows(dataclasses.replace(run, summary=summary)).axes[0]
    assert all(bar.get_hatch() is None for bar in bars(ax).values())
    assert "heads regulating" in ax.get_title()


def test_run_figure_judges_flows_at_design_conditions(bungalow_runs, design_split):
    run = bungalow_runs["direct_return"]
    ax = RUN_FIGURES["flows"](run).axes[0]
    for flow in design_split.emitters:
        (diamond,) = artists_with_prefix(ax, f"at_design:{flow.id}")
        assert diamond.get_ydata()[0] == pytest.approx(flow.flow_kg_s * 3600.0)
        assert (bars(ax)[flow.id].get_hatch() == "//") is flow.starving


def test_source_power_is_drawn_in_kW_and_temperatures_in_C(bungalow_runs):
    run = bungalow_runs["direct_return"]
    fig = plot_source(run)
    power_ax, temp_ax = fig.axes
    (power,) = artists_with_prefix(power_ax, "source_power")
    np.testing.assert_allclose(power.get_ydata(), run.source_power_W / 1000.0)
    np.testing.assert_allclose(power.get_xdata(), run.time_s / 3600.0)
    (supply,) = artists_with_prefix(temp_ax, "supply_temp")
    (ret,) = artists_with_prefix(temp_ax, "return_temp")
    np.testing.assert_array_equal(supply.get_ydata(), run.supply_temp_C)
    np.testing.assert_array_equal(ret.get_ydata(), run.return_temp_C)


def test_source_power_limit_is_marked_above_the_power_line(bungalow_runs):
    run = bungalow_runs["direct_return"]
    ax = plot_source(run).axes[0]
    (limit,) = artists_with_prefix(ax, "power_limit")
    (power,) = artists_with_prefix(ax, "source_power")
    expected_kW = run.scenario.source.max_power_W / 1000.0
    np.testing.assert_allclose(limit.get_ydata(), [expected_kW] * 2)
    assert limit.get_zorder() > power.get_zorder()
    assert limit.get_color() != power.get_color()


def _with_power(run, power_W):
    return dataclasses.replace(run, source_power_W=power_W)


def test_time_at_the_power_limit_is_shaded_and_in_the_title(bungalow_runs):
    run = bungalow_runs["direct_return"]
    max_W = run.scenario.source.max_power_W
    time_h = run.time_s / 3600.0
    # At the limit from 0.5 h to 2 h (both ends on the output grid), below after.
    power = np.where((time_h >= 0.5) & (time_h <= 2.0), max_W, 0.6 * max_W)
    ax = plot_source(_with_power(run, power)).axes[0]
    (span,) = artists_with_prefix(ax, "at_limit:", "patches")
    corners = span.get_transform().transform(span.get_path().vertices)
    data_x = ax.transData.inverted().transform(corners)[:, 0]
    assert sorted({round(float(x), 6) for x in data_x}) == pytest.approx([0.5, 2.0])
    share = 1.5 / time_h[-1]
    assert f"at its power limit 90 min ({100 * share:.0f} % of the run)" in (
        ax.get_title()
    )


def test_a_source_never_at_its_limit_says_so(bungalow_runs):
    run = bungalow_runs["direct_return"]
    power = np.full_like(run.source_power_W, 0.5 * run.scenario.source.max_power_W)
    ax = plot_source(_with_power(run, power)).axes[0]
    assert not artists_with_prefix(ax, "at_limit:", "patches")
    assert ax.get_title().endswith("never at its power limit")


@pytest.mark.parametrize("scheme", SCHEMES)
def test_energy_lines_end_at_the_summary_books(bungalow_runs, scheme):
    run = bungalow_runs[scheme]
    ax = plot_energy(run).axes[0]
    books = run.summary.energy
    final = {
        "source": books.source_J,
        "rooms": books.room_gains_J,
        "pipes_to_rooms": books.pipe_to_rooms_J,
        "pipes_to_unheated": books.pipe_to_unheated_J,
        "stored": books.stored_change_J,
    }
    for key, joules in final.items():
        (line,) = artists_with_prefix(ax, f"energy:{key}")
        assert line.get_ydata()[0] == pytest.approx(0.0, abs=1e-12)
        assert line.get_ydata()[-1] == pytest.approx(joules / 3.6e6, rel=1e-9)
    assert not artists_with_prefix(ax, "energy:pipes:")


def test_energy_of_an_older_run_without_the_split_draws_one_pipe_line(
    bungalow_runs,
):
    run = bungalow_runs["direct_return"]
    older = dataclasses.replace(run, energy_J=np.asarray(run.energy_J)[:, :3])
    ax = plot_energy(older).axes[0]
    (pipes,) = [line for line in ax.lines if line.get_gid() == "energy:pipes"]
    expected = run.summary.energy.pipe_losses_J / 3.6e6
    assert pipes.get_ydata()[-1] == pytest.approx(expected, rel=1e-9)
    assert not artists_with_prefix(ax, "energy:pipes_to")


@pytest.mark.parametrize("scheme", SCHEMES)
def test_energy_uses_add_up_to_the_source_line(bungalow_runs, scheme):
    run = bungalow_runs[scheme]
    ax = plot_energy(run).axes[0]
    (source,) = artists_with_prefix(ax, "energy:source")
    (total,) = artists_with_prefix(ax, "energy:sum")
    # DESIGN.md: the books close to 0.5 % of the source energy over every run.
    final_kWh = source.get_ydata()[-1]
    np.testing.assert_allclose(
        total.get_ydata(), source.get_ydata(), rtol=0, atol=0.005 * final_kWh
    )


def test_energy_title_states_the_closure_error(bungalow_runs):
    run = bungalow_runs["direct_return"]
    title = plot_energy(run).axes[0].get_title()
    assert f"closure error {run.summary.energy.balance_error_pct:.3f} %" in title


def test_pressure_title_names_the_all_valves_open_design_point(bungalow_runs, profiles):
    run = bungalow_runs["direct_return"]
    title = plot_pressure(profiles["direct_return"]).axes[0].get_title()
    assert "all valves fully open" in title
    assert f"{run.scenario.design.supply_temp_C:.0f} °C" in title


def test_pressure_has_one_tee_bar_per_emitter_in_one_panel(bungalow_runs, profiles):
    run = bungalow_runs["reverse_return"]
    fig = plot_pressure(profiles["reverse_return"])
    panels = [ax for ax in fig.axes if ax.get_ylabel()]
    assert len(panels) == 1
    gids = [line.get_gid() for line in artists_with_prefix(panels[0], "dp:")]
    assert sorted(gids) == sorted(f"dp:{e.id}" for e in run.scenario.emitters)


@pytest.mark.parametrize("scheme", SCHEMES)
def test_pressure_lines_start_at_the_plant(profiles, scheme):
    ax = plot_pressure(profiles[scheme]).axes[0]
    for prefix in ("supply:", "return:"):
        (line,) = artists_with_prefix(ax, prefix)
        assert np.nanmin(line.get_xdata()) == 0.0


def test_supply_and_return_use_distinct_palette_colours(profiles):
    ax = plot_pressure(profiles["direct_return"]).axes[0]
    (supply,) = artists_with_prefix(ax, "supply:")
    (ret,) = artists_with_prefix(ax, "return:")
    assert {supply.get_color(), ret.get_color()} <= set(PALETTE)
    assert supply.get_color() != ret.get_color()
    assert supply.get_linestyle() != ret.get_linestyle()  # not by colour alone


def test_emitters_on_one_manifold_share_one_bar_label(bungalow_runs):
    from simheat.hydraulics.layouts import build

    run = bungalow_runs["direct_return"]
    manifold = build(run.scenario, "home_run_manifold")
    # Every home-run emitter hangs between the same two manifold nodes.
    assert len({(a, b) for a, b in zip(
        manifold.from_node[manifold.emitter_links()],
        manifold.to_node[manifold.emitter_links()], strict=True)}) == 1  # fmt: skip
    profile = design_pressure_profile(dataclasses.replace(run, network=manifold))
    ax = plot_pressure(profile).axes[0]
    n_emitters = len(run.scenario.emitters)
    assert len(artists_with_prefix(ax, "dp:")) == n_emitters
    strip_labels = [t for t in ax.texts if "kPa" in t.get_text()]
    assert len(strip_labels) == 1
    assert "\u2013" in strip_labels[0].get_text()  # the range of flow shares


@pytest.mark.parametrize("scheme", SCHEMES)
def test_hatched_bars_are_the_radiators_check_finds_starving(bungalow_runs, scheme):
    from simheat.analysis.check import starving_at_design

    run = bungalow_runs[scheme]
    ax = RUN_FIGURES["flows"](run).axes[0]
    hatched = {e for e, bar in bars(ax).items() if bar.get_hatch() == "//"}
    assert hatched == set(starving_at_design(run.scenario, scheme))
