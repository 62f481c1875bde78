import pytest

from simheat.batch import load_sweep
from simheat.batch.spec import variant_count
from simheat.errors import ScenarioError


def test_a_missing_key_path_names_the_parameter(write_sweep):
    path = write_sweep(
        """
[[parameters]]
key = "source.flow_temp_C"
values = [60.0, 70.0]

[[parameters]]
key = "emitters.living_x.nominal_power_kW"
values = [1.0]
"""
    )
    with pytest.raises(
        ScenarioError, match=r"^parameters\[1\]\.key: 'emitters\.living_x"
    ):
        load_sweep(path)


def test_zip_needs_equal_lengths(write_sweep):
    path = write_sweep(
        """
mode = "zip"
[[parameters]]
key = "source.flow_temp_C"
values = [60.0, 70.0]
[[parameters]]
key = "weather.outdoor_temp_C"
values = [-10.0, -5.0, 0.0]
"""
    )
    with pytest.raises(ScenarioError, match="zip mode needs equal numbers of values"):
        load_sweep(path)


def test_random_mode_refuses_a_list_of_values(write_sweep):
    path = write_sweep(
        """
mode = "random"
samples = 4
[[parameters]]
key = "source.flow_temp_C"
values = [60.0, 70.0]
"""
    )
    with pytest.raises(ScenarioError, match=r"parameters\[0\]\.values: random mode"):
        load_sweep(path)


def test_grid_mode_refuses_a_distribution(write_sweep):
    path = write_sweep(
        """
[[parameters]]
key = "pump.head_kPa"
scale = { uniform = [0.9, 1.1] }
"""
    )
    with pytest.raises(ScenarioError, match=r"parameters\[0\]\.scale\.uniform: a dist"):
        load_sweep(path)


def test_sobol_needs_a_power_of_two(write_sweep):
    path = write_sweep(
        """
mode = "random"
samples = 10
sampling = "sobol"
[[parameters]]
key = "source.flow_temp_C"
uniform = [60.0, 70.0]
"""
    )
    with pytest.raises(ScenarioError, match="samples: Sobol points .* got 10"):
        load_sweep(path)


def test_an_unknown_top_level_key_is_refused(write_sweep):
    path = write_sweep(
        'sample = 4\n[[parameters]]\nkey = "pump.head_kPa"\nscale = [1]\n'
    )
    with pytest.raises(ScenarioError, match="^sample: unknown key"):
        load_sweep(path)


def test_an_unknown_scheme_is_refused(write_sweep):
    path = write_sweep(
        'schemes = ["two_pipe"]\n[[parameters]]\nkey = "pump.head_kPa"\nscale = [1]\n'
    )
    with pytest.raises(ScenarioError, match=r"schemes\[0\]: unknown scheme 'two_pipe'"):
        load_sweep(path)


def test_a_bad_base_scenario_is_reported_as_such(write_sweep, short_bungalow):
    short_bungalow.write_text(
        short_bungalow.read_text().replace("max_power_kW = 16.0", "max_power_kW = -1")
    )
    path = write_sweep('[[parameters]]\nkey = "pump.head_kPa"\nscale = [1]\n')
    with pytest.raises(ScenarioError, match=r"source\.max_power_kW.*bungalow\.toml"):
        load_sweep(path)


def test_scale_of_a_text_value_is_refused_before_running(write_sweep):
    path = write_sweep('[[parameters]]\nkey = "route.header_pipe"\nscale = [1.2]\n')
    with pytest.raises(
        ScenarioError, match=r"parameters\[0\]\.key: .*scale needs a num"
    ):
        load_sweep(path)


def test_a_range_includes_its_stop(write_sweep):
    path = write_sweep(
        """
schemes = ["direct_return", "reverse_return"]
[[parameters]]
key = "weather.outdoor_temp_C"
range = { start = -15.0, stop = -5.0, step = 2.5 }
"""
    )
    spec = load_sweep(path)
    assert spec.parameters[0].values == (-15.0, -12.5, -10.0, -7.5, -5.0)
    assert variant_count(spec) == 10  # 5 points x 2 schemes


def test_a_range_of_tenths_does_not_lose_its_last_point(write_sweep):
    # 0.1 * 3 is 0.30000000000000004 in binary floating point
    path = write_sweep(
        """
[[parameters]]
key = "pump.head_kPa"
scale = { range = { start = 0.0, stop = 0.3, step = 0.1 } }
"""
    )
    assert load_sweep(path).parameters[0].values == (0.0, 0.1, 0.2, 0.3)


def test_the_content_hash_follows_the_base_scenario(write_sweep, short_bungalow):
    path = write_sweep('[[parameters]]\nkey = "pump.head_kPa"\nscale = [1]\n')
    before = load_sweep(path).content_hash
    short_bungalow.write_text(short_bungalow.read_text() + "\n# edited\n")
    assert load_sweep(path).content_hash != before


@pytest.mark.parametrize("number", ["nan", "inf", "-inf"])
@pytest.mark.parametrize("form", ["values", "scale", "offset"])
def test_a_non_finite_value_is_refused_by_position(write_sweep, form, number):
    # issue 18: NaN in a sweep's values reached the sweep file's strict JSON
    # and ended the command in an internal error
    path = write_sweep(
        f"""
[[parameters]]
key = "source.flow_temp_C"
{form} = [1.0, {number}]
"""
    )
    with pytest.raises(
        ScenarioError, match=rf"^parameters\[0\]\.{form}\[1\]: must be finite, got"
    ):
        load_sweep(path)


def test_a_non_finite_number_inside_a_table_value_is_refused(write_sweep):
    path = write_sweep(
        """
[[parameters]]
key = "route.header_pipe"
values = ["cu_22x1", { inner_diameter_mm = 20.0, roughness_mm = nan }]
"""
    )
    with pytest.raises(
        ScenarioError,
        match=r"^parameters\[0\]\.values\[1\]\.roughness_mm: must be finite, got nan",
    ):
        load_sweep(path)
