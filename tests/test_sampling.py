"""Tests of the cat-profile sampler (petfall_audit.sampling)."""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest
from scipy import stats

from petfall_audit.model import CAT_PRESETS, CatProfile, Fixed, LogNormal, Normal, Uniform
from petfall_audit.sampling import DEFAULT_SAMPLES, DEFAULT_SEED, CatSamples, sample_cat_profile

ADULT = CAT_PRESETS["adult"]
FIELDS = [f.name for f in dataclasses.fields(CatSamples)]


def test_defaults_and_shapes() -> None:
    assert (DEFAULT_SAMPLES, DEFAULT_SEED) == (4000, 1)
    s = sample_cat_profile(ADULT)
    assert s.n == DEFAULT_SAMPLES
    for name in FIELDS:
        a = getattr(s, name)
        assert a.shape == (s.n,), name
        assert a.dtype == (bool if name == "relaxes" else np.float64), name
    assert np.all((s.position_fraction >= 0) & (s.position_fraction < 1))
    assert np.all((s.relax_fraction > 0) & (s.relax_fraction < 1))
    assert np.all(s.mass_kg > 0) and np.all(s.launch_speed_mps >= 0)


def test_same_seed_same_cats_other_seed_other_cats() -> None:
    a = sample_cat_profile(ADULT, 500, seed=7)
    b = sample_cat_profile(ADULT, 500, seed=7)
    c = sample_cat_profile(ADULT, 500, seed=8)
    for name in FIELDS:
        np.testing.assert_array_equal(getattr(a, name), getattr(b, name))
    assert not np.array_equal(a.mass_kg, c.mass_kg)


def test_spread_area_and_relaxing() -> None:
    s = sample_cat_profile(ADULT, 20_000)
    assert np.all(s.cda_spread_m2 >= s.cda_tense_m2)
    np.testing.assert_array_equal(s.cda_spread_m2[~s.relaxes], s.cda_tense_m2[~s.relaxes])
    assert np.all(s.cda_spread_m2[s.relaxes] > s.cda_tense_m2[s.relaxes])
    # Bernoulli(0.7): the share lies within 4 binomial standard errors
    se = math.sqrt(0.7 * 0.3 / s.n)
    assert abs(s.relaxes.mean() - 0.7) < 4 * se


def test_lognormal_has_the_given_arithmetic_mean_and_sd() -> None:
    # Source: log-normal moments, mean = exp(mu + s²/2), var = (exp(s²) − 1) exp(2 mu + s²)
    # (scipy.stats.lognorm as the reference library).
    s = sample_cat_profile(ADULT, 40_000, seed=3)
    sigma = math.sqrt(math.log1p((1.1 / 4.1) ** 2))
    ref = stats.lognorm(s=sigma, scale=4.1 / math.sqrt(1 + (1.1 / 4.1) ** 2))
    assert ref.mean() == pytest.approx(4.1) and ref.std() == pytest.approx(1.1)
    assert abs(s.mass_kg.mean() - 4.1) < 4 * 1.1 / math.sqrt(s.n)
    assert s.mass_kg.std() == pytest.approx(1.1, rel=0.03)
    assert stats.kstest(s.mass_kg, ref.cdf).pvalue > 1e-3


def test_normal_is_truncated_at_zero_exactly() -> None:
    # Source: scipy.stats.truncnorm (reference library) for Normal(0.1, 0.1) truncated to > 0.
    profile = dataclasses.replace(ADULT, launch_speed_mps=Normal(0.1, 0.1))
    s = sample_cat_profile(profile, 40_000, seed=5)
    ref = stats.truncnorm(a=-1.0, b=np.inf, loc=0.1, scale=0.1)
    assert np.all(s.launch_speed_mps >= 0)
    assert s.launch_speed_mps.mean() == pytest.approx(ref.mean(), rel=0.01)
    assert stats.kstest(s.launch_speed_mps, ref.cdf).pvalue > 1e-3


def test_uniform_range() -> None:
    s = sample_cat_profile(ADULT, 10_000)
    assert s.launch_speed_mps.min() >= 0.0 and s.launch_speed_mps.max() <= 2.5
    assert s.launch_speed_mps.mean() == pytest.approx(1.25, abs=0.05)


def test_size_is_shared_by_mass_and_areas() -> None:
    # documented assumption: a heavy cat is a large one (comonotone draws)
    s = sample_cat_profile(ADULT, 2000)
    order = np.argsort(s.mass_kg)
    assert np.all(np.diff(s.cda_tense_m2[order]) >= 0)
    vt = np.sqrt(2 * s.mass_kg * 9.80665 / (1.225 * s.cda_tense_m2))
    # Fact of the trade, no source: tense terminal speed about 24 m/s.
    assert 21.0 < np.median(vt) < 27.0


def test_common_random_numbers_across_parameter_changes() -> None:
    base = sample_cat_profile(ADULT, 1000)
    heavier = sample_cat_profile(dataclasses.replace(ADULT, mass_kg=LogNormal(5.0, 1.1)), 1000)
    assert np.all(heavier.mass_kg > base.mass_kg)
    np.testing.assert_array_equal(heavier.launch_speed_mps, base.launch_speed_mps)
    np.testing.assert_array_equal(heavier.position_fraction, base.position_fraction)
    np.testing.assert_array_equal(heavier.relaxes, base.relaxes)


def test_deterministic_profile_gives_identical_cats() -> None:
    profile = CatProfile(
        mass_kg=Fixed(4.0), cda_tense_m2=Fixed(0.1), cda_spread_m2=Fixed(0.2),
        relax_probability=1.0, relax_fraction=Fixed(0.75), righting_time_s=Fixed(0.3),
        launch_speed_mps=Fixed(1.0),
    )
    assert profile.is_deterministic
    s = sample_cat_profile(profile, 50)
    for name in FIELDS:
        if name != "position_fraction":
            assert np.unique(getattr(s, name)).size == 1, name
    assert s.relaxes.all()
    never = sample_cat_profile(dataclasses.replace(profile, relax_probability=0.0), 50)
    assert not never.relaxes.any()
    np.testing.assert_array_equal(never.cda_spread_m2, never.cda_tense_m2)


@pytest.mark.parametrize(
    ("field", "dist"),
    [
        ("mass_kg", Fixed(0.0)),
        ("mass_kg", Normal(4.0, -1.0)),
        ("mass_kg", LogNormal(-1.0, 0.5)),
        ("cda_tense_m2", Uniform(-0.1, 0.2)),
        ("cda_spread_m2", Uniform(0.3, 0.2)),
        ("relax_fraction", Fixed(1.0)),
        ("relax_fraction", Uniform(0.5, 1.2)),
        ("righting_time_s", Fixed(float("nan"))),
        ("launch_speed_mps", Fixed(-1.0)),
    ],
)
def test_invalid_distributions_name_the_parameter(field: str, dist: object) -> None:
    with pytest.raises(ValueError, match=field):
        sample_cat_profile(dataclasses.replace(ADULT, **{field: dist}), 10)


def test_invalid_probability_and_count() -> None:
    with pytest.raises(ValueError, match="relax_probability"):
        sample_cat_profile(dataclasses.replace(ADULT, relax_probability=1.5), 10)
    with pytest.raises(ValueError, match="n"):
        sample_cat_profile(ADULT, 0)


def test_normal_relax_fraction_truncated_inside_unit_interval() -> None:
    s = sample_cat_profile(dataclasses.replace(ADULT, relax_fraction=Normal(0.9, 0.2)), 5000)
    assert np.all((s.relax_fraction > 0) & (s.relax_fraction < 1))


@pytest.mark.parametrize("seed", [-1, 1.5, "1", True])
def test_invalid_seed_is_a_clear_value_error(seed: object) -> None:
    with pytest.raises(ValueError, match="seed must be a whole number"):
        sample_cat_profile(CAT_PRESETS["adult"], 10, seed=seed)  # type: ignore[arg-type]
