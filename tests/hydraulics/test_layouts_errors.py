"""Bad layout input: a ScenarioError naming the scenario field."""

from __future__ import annotations

from pathlib import Path

import pytest

from simheat.errors import ScenarioError
from simheat.hydraulics import layouts
from simheat.scenario import parse_scenario

SCENARIOS = Path(__file__).resolve().parents[2] / "scenarios"
BUNGALOW = (SCENARIOS / "bungalow.toml").read_text()
TWO_STOREY = (SCENARIOS / "two_storey.toml").read_text()
TINY = (Path(__file__).parent / "data_one_pipe_tiny.toml").read_text()


def _floor_keys(text: str, keys: str) -> str:
    """Add keys to the first [[route.floors]] table."""
    return text.replace(
        "[[route.floors]]\nfloor = 0\n", f"[[route.floors]]\nfloor = 0\n{keys}\n", 1
    )


def test_split_emitter_on_another_floor():
    with pytest.raises(ScenarioError, match=r"'bath' is not on this floor's run"):
        parse_scenario(_floor_keys(TWO_STOREY, 'split_after_emitter = "bath"'))


def test_manifold_at_the_end_of_an_open_run_leaves_split_empty():
    scenario = parse_scenario(_floor_keys(TWO_STOREY, "manifold_position_m = 0.0"))
    with pytest.raises(ScenarioError, match=r"manifold_position_m: .*circuit empty"):
        layouts.build(scenario, "split_direct_return")


def test_given_split_and_manifold_build():
    text = _floor_keys(
        BUNGALOW, 'manifold_position_m = 10.0\nsplit_after_emitter = "study"'
    )
    net = layouts.build(parse_scenario(text), "split_direct_return")
    assert net.n_links > 0


@pytest.mark.parametrize(
    ("share", "problem"), [(0.0, "pass no water"), (1.0, "bypass is shut")]
)
def test_one_pipe_share_out_of_range(share, problem):
    text = TINY.replace(
        "one_pipe_emitter_share = 0.3", f"one_pipe_emitter_share = {share}"
    )
    with pytest.raises(
        ScenarioError, match=rf"layout\.one_pipe_emitter_share: .*{problem}"
    ):
        parse_scenario(text)


def test_one_pipe_tees_that_pass_no_water():
    # Nearly shut radiator valves (Kv 0.01) behind tees with no run resistance:
    # almost all the loop water takes the bypass.
    text = TINY.replace(
        "one_pipe_emitter_share = 0.3", "one_pipe_tee_zeta = 0.0"
    ).replace("kv_m3_per_h = 1.0", "kv_m3_per_h = 0.01")
    scenario = parse_scenario(text)
    with pytest.raises(
        ScenarioError,
        match=r"layout\.one_pipe_tee_zeta: .*pass only .* to emitter 'rad_a'",
    ):
        layouts.build(scenario, "one_pipe_loop")


def test_share_and_tee_zeta_together():
    text = TINY.replace(
        "one_pipe_emitter_share = 0.3",
        "one_pipe_emitter_share = 0.3\none_pipe_tee_zeta = 4.0",
    )
    with pytest.raises(ScenarioError, match="give only one of"):
        parse_scenario(text)


def test_floor_pump_for_a_missing_floor():
    text = (
        TINY
        + "\n[[layout.floor_pumps]]\nfloor = 3\n"
        + "flow_m3_per_h = [0.0, 0.5]\nhead_kPa = [20.0, 5.0]\n"
    )
    with pytest.raises(
        ScenarioError, match=r"layout\.floor_pumps\[0\]\.floor: no floor 3"
    ):
        parse_scenario(text)


def test_unknown_fitting_key():
    text = TINY + "\n[layout.fittings]\nelbow_zeta_90 = 1.0\n"
    with pytest.raises(
        ScenarioError, match=r"layout\.fittings\.elbow_zeta_90: unknown key"
    ):
        parse_scenario(text)


def test_unknown_scheme_in_the_scenario_list():
    text = TINY.replace('schemes = ["one_pipe_loop"]', 'schemes = ["one_pipe"]')
    with pytest.raises(ScenarioError, match=r"schemes\[0\]: unknown scheme 'one_pipe'"):
        parse_scenario(text)


def test_sizing_limits_no_catalog_size_meets():
    # The tightest gradient the loader accepts (10 Pa/m) with a design flow of
    # 5000 kg/h: no catalog size carries it within the limit.
    text = TINY.replace(
        "kv_m3_per_h = 1.0", "kv_m3_per_h = 1.0\ndesign_flow_kg_per_h = 5000.0", 1
    ) + ('\n[layout.sizing]\nmode = "auto"\ngradient_max_Pa_per_m = 10.0\n')
    with pytest.raises(ScenarioError, match=r"layout\.sizing: .*exceeds the limits"):
        layouts.build(parse_scenario(text), "direct_return")
