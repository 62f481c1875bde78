import numpy as np
import pytest

from simheat.batch import expand, load_sweep


def test_grid_varies_the_first_parameter_slowest_and_schemes_fastest(write_sweep):
    path = write_sweep(
        """
schemes = ["direct_return", "reverse_return"]
[[parameters]]
key = "source.flow_temp_C"
values = [60.0, 70.0]
[[parameters]]
key = "route.header_pipe"
values = ["cu_22x1", "cu_28x1", "cu_15x1"]
"""
    )
    variants = expand(load_sweep(path))
    assert len(variants) == 2 * 3 * 2
    assert [v.id for v in variants] == list(range(12))
    assert variants[0].values == (60.0, "cu_22x1")
    assert variants[1].values == (60.0, "cu_22x1")
    assert [v.scheme for v in variants[:2]] == ["direct_return", "reverse_return"]
    assert variants[2].values == (60.0, "cu_28x1")
    assert variants[6].values == (70.0, "cu_22x1")


def test_zip_pairs_the_values(write_sweep):
    path = write_sweep(
        """
mode = "zip"
[[parameters]]
key = "source.flow_temp_C"
values = [60.0, 70.0, 75.0]
[[parameters]]
key = "weather.outdoor_temp_C"
values = [-5.0, -10.0, -15.0]
"""
    )
    variants = expand(load_sweep(path))
    assert [v.values for v in variants] == [(60.0, -5.0), (70.0, -10.0), (75.0, -15.0)]
    assert {v.scheme for v in variants} == {"direct_return"}  # the base's first


RANDOM = """
mode = "random"
samples = {samples}
seed = {seed}
sampling = "{sampling}"
[[parameters]]
key = "weather.outdoor_temp_C"
uniform = [-15.0, -5.0]
[[parameters]]
key = "source.flow_temp_C"
normal = [70.0, 2.0]
[[parameters]]
key = "route.header_pipe"
choice = ["cu_22x1", "cu_28x1"]
"""


def _random(write_sweep, samples=40, seed=3, sampling="latin_hypercube"):
    body = RANDOM.format(samples=samples, seed=seed, sampling=sampling)
    return [v.values for v in expand(load_sweep(write_sweep(body)))]


def test_latin_hypercube_puts_one_point_in_each_stratum(write_sweep):
    # The defining property of a Latin hypercube (McKay, Beckman & Conover 1979):
    # split each input's range into n equal-probability strata; every stratum
    # holds exactly one of the n points.
    values = _random(write_sweep, samples=40)
    outdoor = np.array([v[0] for v in values])
    strata = np.floor((outdoor + 15.0) / 10.0 * 40).astype(int)
    assert sorted(strata) == list(range(40))
    # Same for the normal input through its CDF, and for the choice: 40 strata
    # over 2 choices gives each choice exactly 20 times.
    from scipy.stats import norm

    flow = np.array([v[1] for v in values])
    strata = np.floor(norm.cdf((flow - 70.0) / 2.0) * 40).astype(int)
    assert sorted(strata) == list(range(40))
    assert sum(v[2] == "cu_22x1" for v in values) == 20


def test_random_points_are_reproducible_and_follow_the_seed(write_sweep):
    first = _random(write_sweep, seed=3)
    assert _random(write_sweep, seed=3) == first
    assert _random(write_sweep, seed=4) != first


@pytest.mark.parametrize("sampling", ["latin_hypercube", "sobol"])
def test_random_points_stay_in_their_ranges(write_sweep, sampling):
    values = _random(write_sweep, samples=64, sampling=sampling)
    assert len(values) == 64
    assert all(-15.0 <= v[0] <= -5.0 for v in values)
    assert all(isinstance(v[0], float) for v in values)  # plain floats, not numpy
    assert {v[2] for v in values} == {"cu_22x1", "cu_28x1"}


def test_normal_draws_match_their_mean_and_spread(write_sweep):
    # With 1000 stratified points the sample mean of a normal input is within a
    # small fraction of a standard deviation (plain random sampling would be
    # within about 3 sd / sqrt(1000) = 0.1 sd); the spread within 2 %.
    flow = np.array([v[1] for v in _random(write_sweep, samples=1000)])
    assert flow.mean() == pytest.approx(70.0, abs=0.1 * 2.0)
    assert flow.std() == pytest.approx(2.0, rel=0.02)
