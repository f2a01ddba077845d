"""Severity index and injury bands (petfall_audit.injury)."""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest

from petfall_audit.injury import (
    BANDS,
    DEFAULT_STOPS,
    DEFAULT_THRESHOLDS,
    G0,
    InjuryThresholds,
    StoppingDistances,
    band_at_least,
    band_of,
    band_probabilities,
    dose_g,
    expected_band,
    righting_fraction,
    severity_index_g,
    surface_stop_m,
)
from petfall_audit.model import SurfaceKind

RHO = 1.225  # kg/m³, ISA sea level (ISO 2533)


def _fall(drop_m: np.ndarray, mass_kg: float, cda_m2: float) -> tuple[np.ndarray, np.ndarray]:
    """Speed (m/s) and time (s) after a drop from rest with quadratic drag, closed form
    (Taylor, Classical Mechanics, 2005, §2.4): v = v_t sqrt(1 - exp(-2gh/v_t²)),
    t = (v_t/g) arccosh(exp(gh/v_t²))."""
    vt = np.sqrt(2 * mass_kg * G0 / (RHO * cda_m2))
    v = vt * np.sqrt(-np.expm1(-2 * G0 * drop_m / vt**2))
    t = vt / G0 * np.arccosh(np.exp(G0 * drop_m / vt**2))
    return v, t


def _two_posture_speed(drop_m: np.ndarray, mass_kg: float, cda_tense: float, cda_spread: float,
                       relax_fraction: float) -> np.ndarray:
    """Impact speed (m/s) of a cat that spreads out at relax_fraction × tense terminal speed:
    v² = v_t2² + (v0² - v_t2²) exp(-2 g d / v_t2²) after the switch (closed form of the same
    equation of motion, Taylor §2.4)."""
    vt1 = np.sqrt(2 * mass_kg * G0 / (RHO * cda_tense))
    vt2 = np.sqrt(2 * mass_kg * G0 / (RHO * cda_spread))
    v0 = relax_fraction * vt1
    h_switch = -vt1**2 / (2 * G0) * np.log1p(-relax_fraction**2)
    v1, _ = _fall(drop_m, mass_kg, cda_tense)
    d = np.maximum(drop_m - h_switch, 0.0)
    v2 = np.sqrt(vt2**2 + (v0**2 - vt2**2) * np.exp(-2 * G0 * d / vt2**2))
    return np.where(drop_m <= h_switch, v1, v2)


def test_index_is_mean_deceleration() -> None:
    # v² = 2 a s (constant-deceleration kinematics, any physics textbook): 10 m/s over 0.12 m
    sev = severity_index_g(10.0, True, 0.0)
    assert sev == pytest.approx(100.0 / (2 * 0.12 * 9.80665), rel=1e-12)
    # unrighted: the cat's own stopping distance only
    assert severity_index_g(10.0, False, 0.0) == pytest.approx(100 / (2 * 0.03 * 9.80665))
    # half way through the turn: halfway between the two stopping distances
    assert severity_index_g(10.0, 0.5, 0.0) == pytest.approx(100 / (2 * 0.075 * 9.80665))


def test_softer_surfaces_give_lower_severity() -> None:
    # design assumption (from memory; no published cat surface factors): lawn, soil and shrubs
    # are kinder than hard ground
    kinds = [SurfaceKind.CONCRETE, SurfaceKind.ASPHALT, SurfaceKind.ROOF, SurfaceKind.DECK,
             SurfaceKind.GRAVEL, SurfaceKind.LAWN, SurfaceKind.PLANTING, SurfaceKind.WATER]
    sev = severity_index_g(15.0, True, surface_stop_m(kinds))
    assert np.all(np.diff(sev) < 0)
    # grass roughly one band lower than concrete for a righted cat (design assumption, from memory)
    lawn, concrete = surface_stop_m([SurfaceKind.LAWN, SurfaceKind.CONCRETE])
    assert 1.4 < (DEFAULT_STOPS.righted_m + lawn) / (DEFAULT_STOPS.righted_m + concrete) < 2.5


def test_band_edges() -> None:
    t = DEFAULT_THRESHOLDS
    sev = np.array([0.0, t.moderate_g - 1e-9, t.moderate_g, t.serious_g, t.life_threatening_g, 1e6])
    assert band_of(sev).tolist() == [0, 0, 1, 2, 3, 3]
    assert len(BANDS) == 4


def test_thresholds_validate() -> None:
    with pytest.raises(ValueError):
        InjuryThresholds(moderate_g=50, serious_g=40, life_threatening_g=100)
    with pytest.raises(ValueError):
        InjuryThresholds(moderate_g=0.0)
    with pytest.raises(ValueError):
        StoppingDistances(righted_m=0.01, unrighted_m=0.03)
    with pytest.raises(ValueError):
        InjuryThresholds(spread=-0.1)
    with pytest.raises(ValueError):
        InjuryThresholds(spread=float("nan"))


def test_adjustable_thresholds_move_bands() -> None:
    sev = np.array([30.0])
    assert band_of(sev)[0] == 1
    assert band_of(sev, InjuryThresholds(5.0, 20.0, 25.0))[0] == 3


def test_step_response_counts_bands_and_single_band_when_deterministic() -> None:
    step = replace(DEFAULT_THRESHOLDS, spread=0.0)
    rng = np.random.default_rng(3)
    sev = rng.lognormal(3.5, 1.0, size=(7, 501))
    p = band_probabilities(sev, step)
    assert p.shape == (7, 4)
    np.testing.assert_allclose(p.sum(axis=1), 1.0, atol=1e-12)
    # with no spread the band is the dose's median band: counting bands one by one agrees
    b = band_of(sev, step)
    for k in range(4):
        np.testing.assert_allclose(p[:, k], (b == k).mean(axis=1))
    same = np.full((3, 10), 100.0)
    p1 = band_probabilities(same, step)
    assert np.all(np.count_nonzero(p1, axis=1) == 1)
    assert np.all(p1[:, 2] == 1.0)


def test_dose_response_is_an_ordinal_probit_on_the_log_dose() -> None:
    # reference: scipy.stats.norm (an independent implementation of the normal CDF), applied to
    # the definition P(band >= b | D) = Phi((ln D - ln theta_b) / sigma), averaged over falls
    from scipy.stats import norm

    t = InjuryThresholds(20.0, 60.0, 150.0, 0.7)
    rng = np.random.default_rng(4)
    sev = rng.lognormal(4.0, 0.8, size=(5, 300))
    p = band_probabilities(sev, t)
    at_least = np.stack([norm.cdf((np.log(sev) - np.log(x)) / 0.7).mean(axis=1)
                         for x in (20.0, 60.0, 150.0)], axis=1)
    want = np.column_stack([1 - at_least[:, 0], at_least[:, 0] - at_least[:, 1],
                            at_least[:, 1] - at_least[:, 2], at_least[:, 2]])
    np.testing.assert_allclose(p, want, rtol=1e-10, atol=1e-14)
    # a fall exactly at a band's median dose is that band or worse for half of the cats
    assert band_at_least(np.array([60.0]), t)[0, 1] == pytest.approx(0.5, abs=1e-12)
    # even one fixed dose spreads over the bands: cats are hurt differently by the same fall
    one = band_probabilities(np.full((1, 50), 60.0), t)[0]
    assert np.count_nonzero(one > 0.05) == 4 and np.count_nonzero(one > 0.3) == 2


def test_expected_band_is_the_median_band() -> None:
    p = np.array([
        [0.6, 0.2, 0.1, 0.1],   # median minor
        [0.4, 0.2, 0.2, 0.2],   # P(>= moderate) 0.6, P(>= serious) 0.4 -> moderate
        [0.0, 0.0, 0.5, 0.5],   # exact half at life-threatening
        [0.0, 0.0, 0.0, 1.0],
    ])
    assert expected_band(p).tolist() == [0, 1, 3, 3]
    rng = np.random.default_rng(5)
    sev = rng.lognormal(3.8, 0.8, size=(20, 999))
    step = replace(DEFAULT_THRESHOLDS, spread=0.0)
    np.testing.assert_array_equal(expected_band(band_probabilities(sev, step)),
                                  band_of(np.median(sev, axis=1), step))


def test_righting_fraction() -> None:
    assert righting_fraction([0.0, 0.15, 0.3, 2.0], 0.3).tolist() == [0.0, 0.5, 1.0, 1.0]


def test_never_relaxing_cat_severity_rises_with_drop() -> None:
    # closed-form fall (Taylor §2.4), righting time 0.3 s (popular science, from memory)
    drop = np.linspace(0.02, 120.0, 4000)
    v, t = _fall(drop, 4.1, 0.114)
    for surface in (0.0, surface_stop_m([SurfaceKind.LAWN])[0]):
        sev = severity_index_g(v, righting_fraction(t, 0.3), surface)
        assert np.all(np.diff(sev) > 0)


def test_always_relaxing_cat_slows_but_its_dose_does_not_fall() -> None:
    # cat figures: tense ~24 m/s, spread ~17 m/s, relaxing at ~3/4 of tense terminal speed
    # (fact of the trade, no source); closed form, Taylor §2.4. The impact speed dips after the
    # cat spreads out; the dose is taken from the highest speed reached, so it never falls.
    drop = np.linspace(0.5, 150.0, 3000)
    v = _two_posture_speed(drop, 4.1, 0.114, 0.227, 0.75)
    _, t = _fall(drop, 4.1, 0.114)
    i_peak = int(np.argmax(v))
    assert 0.02 < 1 - v[-1] / v[i_peak] < 0.10  # "a few percent lower"
    peak = np.maximum.accumulate(v)  # the highest speed so far (the definition)
    dose = dose_g(peak, t, 0.3, 0.0)
    assert np.all(np.diff(dose) >= 0)
    np.testing.assert_allclose(dose[i_peak:], dose[i_peak], rtol=1e-12)
    np.testing.assert_allclose(dose, severity_index_g(peak, righting_fraction(t, 0.3), 0.0))
