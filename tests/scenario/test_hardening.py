"""The loader on hostile input: bounds with reasons, likely typos, odd shapes.

Each listed failure of issue 18 that the loader now refuses has its one-line
message here (the message is the contract). The bounds themselves are argued
beside their constants in the section modules and in the README (*Bounds*).
"""

from __future__ import annotations

import re

import pytest
from test_load import _DELETE, ORIGIN, changed, error_pattern, parse

from simheat.errors import ScenarioError
from simheat.scenario import load_scenario, parse_scenario
from simheat.scenario.fields import SHOWN_KEY_LENGTH, SHOWN_VALUE_LENGTH
from simheat.scenario.load import MAX_KEY_PARTS, MAX_NESTING


@pytest.mark.parametrize(
    ("path", "value", "message"),
    [
        # issue 18: "temperature_drop_K = 1e-9 gives design flows of 6.75e11 kg/h";
        # 5e-324 gave Infinity in the JSON of flows
        (("design", "temperature_drop_K"), 1e-9, "must be >= 1, got 1e-09"),
        (("design", "temperature_drop_K"), 5e-324, "must be >= 1, got 4.94066e-324"),
        # "design_heat_load_W = 1e-308 gives flow_pct_of_design: Infinity"
        (
            ("rooms", 0, "design_heat_load_W"),
            1e-308,
            "5e-310 W/m2 of floor area is outside 1 to 1000 (a room's design load",
        ),
        # a room of 1 m2 cannot take 1 MW
        (
            ("rooms", 0, "design_heat_load_W"),
            50_000.0,
            "2.5e+03 W/m2 of floor area is outside 1 to 1000",
        ),
        # "internal_gains_W = 1e6 gives 4,615 °C air"
        (
            ("rooms", 0, "internal_gains_W"),
            1e6,
            "5e+04 W/m2 of floor area is outside 0 to 50 (internal gains",
        ),
        # "nominal_power_kW = 5e-324: ZeroDivisionError in the report"
        (("emitters", 0, "nominal_power_kW"), 5e-324, "must be >= 0.05"),
        # "output_step_min = 1e-5: a 56 GiB allocation; 5e-324: OverflowError"
        (("simulation", "output_step_min"), 1e-5, "must be >= 0.0166667, got 1e-05"),
        (("simulation", "output_step_min"), 5e-324, "must be >= 0.0166667"),
        # "pipe_cell_length_m = 0.01: MemoryError"
        (("simulation", "pipe_cell_length_m"), 0.01, "must be >= 0.1, got 0.01"),
        (("simulation", "rtol"), 1e-300, "must be >= 1e-09"),
        (("simulation", "initial_water_temp_C"), 99.0, "must be <= 95, got 99"),
        (
            ("emitters", 1, "kv_m3_per_h"),
            1e-300,
            "must be 0 (shut for good) or >= 0.001",
        ),
        (("emitters", 0, "proportional_band_K"), 0.01, "must be >= 0.5"),
        (("emitters", 0, "water_volume_L"), 1e-9, "must be >= 0.001"),
        (("emitters", 0, "metal_mass_kg"), 1e4, "must be <= 120, got 10000"),
        (("rooms", 0, "height_m"), 0.2, "must be >= 1.5"),
        (("source", "max_power_kW"), 1e-6, "must be >= 0.1"),
        (("source", "water_volume_L"), 1e-9, "must be >= 0.01"),
        (("route", "feed_length_m"), 1e-6, "must be 0.01 to 1000 m, got 1e-06"),
    ],
)
def test_value_outside_its_physical_bound_is_refused(path, value, message):
    dotted = re.sub(r"\.(\d+)", r"[\1]", ".".join(map(str, path)))
    with pytest.raises(ScenarioError, match=error_pattern(dotted, message)):
        parse((path, value))


def test_valve_table_kv_of_1e_300_is_refused():
    # issue 18: "A valve Kv table entry of 1e-300: ZeroDivisionError"
    table = {"presets": [1, 2, 3], "kv_m3_per_h": [1e-300, 0.2, 0.4]}
    pattern = error_pattern(
        "valve_types.trv.kv_m3_per_h", "every Kv must lie within 0.001 to 100 m3/h"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("valve_types", "trv"), table))


def test_design_return_must_be_warmer_than_the_rooms():
    # A 50 °C supply with a 40 K drop returns at 10 °C, below the living room's
    # 21 °C: EN 442's log-mean excess has no value there.
    pattern = error_pattern(
        "rooms[0].setpoint_C", "must be below the design return 10 °C"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse(
            (("design", "supply_temp_C"), 50.0),
            (("design", "temperature_drop_K"), 40.0),
            (("source", "flow_temp_C"), 50.0),
        )


def test_gains_above_the_design_load_are_refused():
    from simheat.resolve import resolve

    # 49 W/m2 passes the per-area bound, but exceeds the room's 600 W load
    scenario = parse(
        (("rooms", 0, "internal_gains_W"), 980.0),
        (("rooms", 0, "design_heat_load_W"), 600.0),
    )
    with pytest.raises(
        ScenarioError,
        match=r"^rooms\[0\]\.internal_gains_W: 980 W exceed the room's design heat "
        r"load 600 W, so it needs no heating",
    ):
        resolve(scenario)


@pytest.mark.parametrize(
    ("path", "misspelt", "value", "message"),
    [
        # issue 18: "a misspelt required key (ID, perset) is reported as missing"
        (
            ("rooms", 0, "id"),
            "ID",
            "living",
            "rooms[0].id: required key is missing; unknown key 'ID' may be a "
            "misspelling of 'id'",
        ),
        (
            ("emitters", 0, "preset"),
            "perset",
            2,
            "emitters[0].preset: give one of kv_m3_per_h or preset, got neither; "
            "unknown key 'perset' may be a misspelling of 'preset'",
        ),
        (
            ("rooms", 0, "setpoint_C"),
            "setpont_C",
            21.0,
            "rooms[0].setpoint_C: required key is missing; unknown key 'setpont_C' "
            "may be a misspelling of 'setpoint_C'",
        ),
        (
            ("emitters", 1, "nominal_power_kW"),
            "nominal_power_W",
            800.0,
            "emitters[1].nominal_power_kW: required key is missing; unknown key "
            "'nominal_power_W' may be a misspelling",
        ),
    ],
)
def test_misspelt_required_key_is_named_as_the_likely_typo(
    path, misspelt, value, message
):
    with pytest.raises(ScenarioError, match="^" + re.escape(message)):
        parse((path, _DELETE), ((*path[:-1], misspelt), value))


def test_key_with_a_newline_is_cut_to_one_short_line():
    # issue 18: "A key containing a newline gives a 2-line message; a 1 MB key
    # gives a 1 MB message"
    text = changed() + '\n"bad\\nkey' + "x" * 1_000_000 + '" = 1\n'
    with pytest.raises(ScenarioError) as caught:
        parse_scenario(text, origin=ORIGIN)
    message = str(caught.value)
    assert "\n" not in message
    assert len(message) < 2 * SHOWN_KEY_LENGTH + 100
    assert message.startswith("'bad\\nkeyxxx")
    assert message.endswith(
        f"...: unknown key (check the spelling and the unit) ({ORIGIN})"
    )


def test_huge_value_is_cut_in_the_message():
    with pytest.raises(ScenarioError) as caught:
        parse((("rooms", 0, "name"), ["x" * 1_000_000]))
    message = str(caught.value)
    assert message.startswith("rooms[0].name: must be a string, got ['xxx")
    assert len(message) < SHOWN_VALUE_LENGTH + 100


def test_arrays_nested_too_deep_are_refused_before_parsing():
    # issue 18: "A TOML array nested 1,000 deep: RecursionError"
    text = changed() + "\nextra = " + "[" * 1000 + "]" * 1000 + "\n"
    with pytest.raises(
        ScenarioError,
        match=re.escape(f"{ORIGIN}: line ")
        + r"\d+"
        + re.escape(f": arrays or tables nested more than {MAX_NESTING} deep"),
    ):
        parse_scenario(text, origin=ORIGIN)


def test_dotted_key_too_long_is_refused_before_parsing():
    # issue 18: "A dotted key 100,000 deep: MemoryError"
    text = changed() + "\n" + ".".join(["k"] * 100_000) + " = 1\n"
    with pytest.raises(
        ScenarioError,
        match=r": a dotted key of more than " + str(MAX_KEY_PARTS) + " parts",
    ):
        parse_scenario(text, origin=ORIGIN)


@pytest.mark.parametrize(
    "text",
    [
        'a = "x.y.z.w.v.u.t.s.r.q.p.o.n.m.l.k.j.i.h.g.f.e.d.c.b.a.a.a.a.a.a.a.a.a"',
        "a = '[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[['",
        'a = """\n[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[\n"""',
        "# [[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[",
        "weather.outdoor_temp_C = -10.5",
    ],
)
def test_brackets_and_dots_in_strings_numbers_and_comments_are_not_counted(text):
    # The shape scan skips strings and comments; a number has one dot.
    from simheat.scenario.load import read_toml

    read_toml(text, ORIGIN)


def test_utf8_byte_order_mark_is_accepted(tmp_path):
    # issue 18: "A UTF-8 byte-order mark reads as malformed TOML"
    path = tmp_path / "bom.toml"
    path.write_bytes(b"\xef\xbb\xbf" + changed().encode("utf-8"))
    assert load_scenario(path).name == "Two-room test house"


def test_directory_as_scenario_is_one_line(tmp_path):
    # issue 18: "A directory passed as the scenario gets a 3-line usage error"
    with pytest.raises(
        ScenarioError, match=f"^{re.escape(str(tmp_path))}: is a directory; give a"
    ):
        load_scenario(tmp_path)


def test_duplicate_scheme_names_are_refused():
    # issue 18: "Duplicate scheme names are accepted and then collide with their
    # own output"
    pattern = error_pattern(
        "schemes[1]", "scheme 'direct_return' is listed twice (also schemes[0])"
    )
    with pytest.raises(ScenarioError, match=pattern):
        parse((("schemes",), ["direct_return", "direct_return"]))


def test_malformed_toml_message_is_one_line():
    with pytest.raises(ScenarioError) as caught:
        parse_scenario('name = "a\nb"\n', origin=ORIGIN)
    assert "\n" not in str(caught.value)
    assert str(caught.value).startswith(f"{ORIGIN}: malformed TOML: ")
