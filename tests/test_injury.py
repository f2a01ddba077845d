"""Severity index and injury bands (petfall_audit.injury)."""

from __future__ import annotations

import numpy as np
import pytest

from petfall_audit.injury import (
    BANDS,
    DEFAULT_STOPS,
    DEFAULT_THRESHOLDS,
    G0,
    InjuryThresholds,
    StoppingDistances,
    band_of,
    band_probabilities,
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


def test_adjustable_thresholds_move_bands() -> None:
    sev = np.array([30.0])
    assert band_of(sev)[0] == 1
    assert band_of(sev, InjuryThresholds(5.0, 20.0, 25.0))[0] == 3


def test_band_probabilities_sum_to_one_and_single_band_when_deterministic() -> None:
    rng = np.random.default_rng(3)
    sev = rng.lognormal(3.5, 1.0, size=(7, 501))
    p = band_probabilities(sev)
    assert p.shape == (7, 4)
    np.testing.assert_allclose(p.sum(axis=1), 1.0, atol=1e-12)
    # agrees with counting bands one by one
    b = band_of(sev)
    for k in range(4):
        np.testing.assert_allclose(p[:, k], (b == k).mean(axis=1))
    same = np.full((3, 10), 70.0)
    p1 = band_probabilities(same)
    assert np.all(np.count_nonzero(p1, axis=1) == 1)
    assert np.all(p1[:, 2] == 1.0)


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
    np.testing.assert_array_equal(expected_band(band_probabilities(sev)),
                                  band_of(np.median(sev, axis=1)))


def test_righting_fraction() -> None:
    assert righting_fraction([0.0, 0.15, 0.3, 2.0], 0.3).tolist() == [0.0, 0.5, 1.0, 1.0]


def test_never_relaxing_cat_severity_rises_with_drop() -> None:
    # closed-form fall (Taylor §2.4), righting time 0.3 s (popular science, from memory)
    drop = np.linspace(0.02, 120.0, 4000)
    v, t = _fall(drop, 4.1, 0.114)
    for surface in (0.0, surface_stop_m([SurfaceKind.LAWN])[0]):
        sev = severity_index_g(v, righting_fraction(t, 0.3), surface)
        assert np.all(np.diff(sev) > 0)


def test_always_relaxing_cat_dips_no_more_than_its_speed() -> None:
    # cat figures: tense ~24 m/s, spread ~17 m/s, relaxing at ~3/4 of tense terminal speed
    # (fact of the trade, no source); closed form, Taylor §2.4
    drop = np.linspace(0.5, 150.0, 3000)
    v = _two_posture_speed(drop, 4.1, 0.114, 0.227, 0.75)
    _, t = _fall(drop, 4.1, 0.114)
    sev = severity_index_g(v, righting_fraction(t, 0.3), 0.0)
    i_peak = int(np.argmax(v))
    speed_dip = 1 - v[-1] / v[i_peak]
    assert 0.02 < speed_dip < 0.10  # "a few percent lower"
    # the index follows the speed alone: no decrease with height of its own
    ratio = sev[drop > 1.0] / v[drop > 1.0] ** 2
    np.testing.assert_allclose(ratio, ratio[0], rtol=1e-12)
    sev_dip = 1 - sev[-1] / sev[i_peak]
    assert sev_dip <= 1 - (1 - speed_dip) ** 2 + 1e-12
    # the peak and the settled speed of the default 4.1 kg cat sit in the same band
    assert band_of(sev[i_peak]) == band_of(sev[-1]) == 3
