"""Steady throttle of one radiator valve: physical checks and bad input."""

from pathlib import Path

import numpy as np
import pytest

from simheat.analysis.throttle import (
    throttle_matrix,
    throttle_steady,
    throttle_transient,
)
from simheat.errors import ScenarioError
from simheat.hydraulics.layouts import SCHEMES
from simheat.physics.water import specific_heat_J_kg_K
from simheat.scenario import load_scenario

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"
BUNGALOW_TEXT = (SCENARIOS / "bungalow.toml").read_text(encoding="utf-8")
EMITTER_IDS = [
    "kitchen_a", "kitchen_b", "hall", "living_a", "living_b", "living_c", "study",
    "bed1_a", "bed1_b", "bath", "bed2", "bed3",
]  # fmt: skip
# A 200 mm smooth tube: at the bungalow's ~1.5 m3/h the header velocity is about
# 0.01 m/s and its pressure drop a few mPa per metre, so the shared pipes carry
# (almost) no resistance.
WIDE_PIPE = "{ inner_diameter_mm = 200, roughness_mm = 0.001, outer_diameter_mm = 210 }"
# A pump whose head is constant to 1 Pa per m3/h over its whole range: a falling
# pump curve is itself a resistance shared by every emitter, so it is held flat to
# isolate what the headers do.
FLAT_PUMP = "head_kPa = [30.0, 29.999, 29.998, 29.997, 29.996]"
BUNGALOW_PUMP = "head_kPa = [45.0, 42.0, 35.0, 24.0, 10.0]"
BUNGALOW_HEADER = 'header_pipe = "cu_22x1"'


def _variant(tmp_path, name, text):
    path = tmp_path / f"{name}.toml"
    path.write_text(text, encoding="utf-8")
    return load_scenario(path)


@pytest.fixture(scope="module")
def bungalow():
    return load_scenario(SCENARIOS / "bungalow.toml")


@pytest.fixture(scope="module")
def flat_pump_houses(tmp_path_factory):
    """The bungalow with a flat pump curve: its own headers, and very wide ones."""
    # the variants are made by text replacement: the originals must be there
    assert BUNGALOW_PUMP in BUNGALOW_TEXT
    assert BUNGALOW_HEADER in BUNGALOW_TEXT
    tmp = tmp_path_factory.mktemp("throttle")
    flat = BUNGALOW_TEXT.replace(BUNGALOW_PUMP, FLAT_PUMP)
    wide = flat.replace(
        BUNGALOW_HEADER, f"header_pipe = {WIDE_PIPE}\nfeed_pipe = {WIDE_PIPE}"
    )
    return {
        "normal": _variant(tmp, "normal", flat),
        "wide": _variant(tmp, "wide", wide),
    }


# One-pipe loops are left out: there the emitters share the loop flow in series,
# each through its own diverter tee and bypass, so the coupling runs through the
# other emitters' bypasses, not the headers (closing one emitter lowers the loop
# flow and every other emitter's flow, by about 5 % in the bungalow, wide pipes
# or not).
PARALLEL_SCHEMES = [s for s in sorted(SCHEMES) if not s.startswith("one_pipe")]


@pytest.mark.parametrize("scheme", PARALLEL_SCHEMES)
def test_interaction_vanishes_without_header_resistance(flat_pump_houses, scheme):
    # With no shared resistance (headers, feed, pump curve slope) each emitter
    # circuit sees a fixed pressure difference, so closing one cannot change the
    # others (parallel branches across an ideal pressure source, Kirchhoff's laws).
    # Remaining shared drop: the 200 mm headers and the pump's 1 Pa per m3/h.
    matrix = throttle_matrix(flat_pump_houses["wide"], scheme, 0.0)
    assert matrix.interaction_mean_pct < 1.0
    assert matrix.interaction_max_pct < 1.0


@pytest.mark.parametrize("scheme", ["direct_return", "reverse_return"])
def test_ordinary_headers_couple_the_emitters(flat_pump_houses, scheme):
    # The same house with its 22 mm copper headers: the interaction is real, well
    # above the 1 % left with wide headers (same pump, only the headers differ).
    matrix = throttle_matrix(flat_pump_houses["normal"], scheme, 0.0)
    assert matrix.interaction_mean_pct > 5.0


@pytest.fixture(scope="module")
def direct_return_closures(bungalow):
    return throttle_matrix(bungalow, "direct_return", 0.0)


@pytest.mark.parametrize("emitter", EMITTER_IDS)
def test_closing_one_emitter_never_lowers_another_in_direct_return(
    direct_return_closures, emitter
):
    # Two-pipe direct return with one fixed-speed pump is a ladder: closing rung k
    # lowers the total flow, so the pump head rises and every header segment
    # upstream of k carries less flow and drops less pressure; every other rung
    # then sees a larger pressure difference and takes more water. Tolerance: the
    # flow solve converges to 1e-9 kg/s on flows of about 0.01-0.06 kg/s.
    result = next(r for r in direct_return_closures.results if r.emitter_id == emitter)
    for change in result.changes:
        assert change.flow_after_kg_s >= change.flow_before_kg_s * (1.0 - 1e-9)


def test_interaction_index_summarises_the_off_diagonal(direct_return_closures):
    values = direct_return_closures.flow_change_pct
    off = np.abs(values[~np.eye(len(EMITTER_IDS), dtype=bool)])
    assert direct_return_closures.interaction_mean_pct == pytest.approx(off.mean())
    assert direct_return_closures.interaction_max_pct == pytest.approx(off.max())


@pytest.mark.parametrize("scheme", ["direct_return", "reverse_return"])
def test_a_fully_open_throttle_changes_nothing(bungalow, scheme):
    # Opening 1 is the all-open reference itself; both solves converge to 1e-9 kg/s.
    result = throttle_steady(bungalow, scheme, "living_b", 1.0)
    for change in (result.throttled, *result.changes):
        assert change.flow_after_kg_s == pytest.approx(
            change.flow_before_kg_s, abs=2e-9
        )


@pytest.mark.parametrize("opening", [0.0, 0.3, 0.7])
def test_throttled_emitter_loses_flow_and_output(bungalow, opening):
    result = throttle_steady(bungalow, "reverse_return", "study", opening)
    assert result.throttled.flow_change_pct < 0.0
    assert result.throttled.output_change_pct < 0.0


@pytest.mark.parametrize("emitter", ["kitchen_a", "bed3"])
def test_output_rises_with_flow_but_less_than_flow(bungalow, emitter):
    # EN 442 steady output at a fixed inlet temperature grows with flow, but less
    # than in proportion: the mean water temperature cannot exceed the inlet.
    result = throttle_steady(bungalow, "direct_return", emitter, 0.0)
    for change in result.changes:
        assert 0.0 < change.output_change_pct < change.flow_change_pct


def test_closed_valve_leakage_water_leaves_at_room_temperature(bungalow):
    # A leakage flow through a radiator sized for ~50 kg/h gives up all its heat:
    # output = m cp (T_in - T_room) (energy balance; the EN 442 output at any
    # real excess temperature far exceeds what the leak carries).
    result = throttle_steady(bungalow, "direct_return", "bed2", 0.0)
    own = result.throttled
    room_C = bungalow.rooms[bungalow.room_index("bed2")].setpoint_C
    cp = float(specific_heat_J_kg_K(result.water_temp_C))
    assert own.output_after_W == pytest.approx(
        own.flow_after_kg_s * cp * (result.water_temp_C - room_C), rel=1e-6
    )


def test_unknown_emitter_is_refused_with_the_known_ids(bungalow):
    with pytest.raises(ScenarioError, match=r"unknown emitter 'garage'; known: .*bed3"):
        throttle_steady(bungalow, "direct_return", "garage", 0.5)


@pytest.mark.parametrize("opening", [-0.1, 1.01, float("nan")])
def test_opening_outside_zero_to_one_is_refused(bungalow, opening):
    with pytest.raises(ScenarioError, match="opening: must be a fraction within 0-1"):
        throttle_steady(bungalow, "direct_return", "hall", opening)


def test_matrix_refuses_an_opening_outside_zero_to_one(bungalow):
    with pytest.raises(ScenarioError, match="opening: must be a fraction within 0-1"):
        throttle_matrix(bungalow, "direct_return", 2.0)


THROTTLE_AT_S = 3600.0


@pytest.fixture(scope="module")
def bath_closed_at_one_hour(bungalow_runs):
    baseline = bungalow_runs["direct_return"]
    return throttle_transient(
        baseline.scenario, "direct_return", "bath", 0.0, THROTTLE_AT_S,
        baseline=baseline,
    )  # fmt: skip


def test_runs_agree_until_the_throttle(bath_closed_at_one_hour):
    # Same model and inputs up to the event; the runs differ only by the
    # integrator's step sequence (rtol 1e-5 on ~20 °C: well under 0.02 K).
    result = bath_closed_at_one_hour
    before = np.asarray(result.throttled.time_s) < THROTTLE_AT_S
    np.testing.assert_allclose(
        result.throttled.air_temp_C[before],
        np.asarray(result.baseline.air_temp_C)[before],
        atol=0.02,
    )


def test_closing_its_only_radiator_leaves_the_room_colder(bath_closed_at_one_hour):
    # The bathroom has one radiator; with it shut for five hours of a -10 °C
    # morning its air ends clearly colder than without the throttle.
    bath = next(r for r in bath_closed_at_one_hour.rooms if r.id == "bath")
    assert bath.final_air_change_K < -1.0


def test_transient_throttle_refuses_a_time_outside_the_run(bungalow):
    with pytest.raises(ScenarioError, match="at_min: must lie within 0-360 min"):
        throttle_transient(bungalow, "direct_return", "bath", 0.0, 400 * 60.0)


def test_transient_throttle_refuses_a_baseline_of_another_scheme(bungalow_runs):
    run = bungalow_runs["reverse_return"]
    with pytest.raises(ScenarioError, match="baseline: run of scheme 'reverse_return'"):
        throttle_transient(
            run.scenario, "direct_return", "bath", 0.0, 60.0, baseline=run
        )
