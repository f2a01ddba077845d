"""Risk, ranking and the whole-building assessment (petfall_audit.risk, sensitivity)."""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest

from petfall_audit.injury import (
    BANDS,
    DEFAULT_THRESHOLDS,
    dose_g,
    surface_stop_m,
)
from petfall_audit.model import (
    CAT_PRESETS,
    Building,
    BuildingInfo,
    CatProfile,
    CatsPresent,
    Facade,
    Fixed,
    Floor,
    OpenFrequency,
    Opening,
    OpeningKind,
    Surface,
    SurfaceKind,
)
from petfall_audit.physics import peak_speed_of_falls
from petfall_audit.present.explain import explain_all
from petfall_audit.risk import HHSRS_CLASS_WEIGHTS, MODEL_VERSION, assess, risk_score
from petfall_audit.sampling import sample_cat_profile
from petfall_audit.sensitivity import with_sensitivity

N = 600  # samples: enough for stable shares, fast

FLOORS = (Floor(0, "G", 0.0), Floor(1, "1", 4.5)) + tuple(
    Floor(i, str(i), 4.5 + 3.1 * (i - 1)) for i in range(2, 41)
)


def _window(oid: str, floor: int, facade: str = "street", **kw: object) -> Opening:
    base = dict(kind=OpeningKind.WINDOW_CASEMENT, x_m=2.0, width_m=1.0, perch_height_m=0.9,
                cats_present=CatsPresent.YES, open_frequency=OpenFrequency.DAILY)
    base.update(kw)
    return Opening(id=oid, floor=floor, facade=facade, **base)  # type: ignore[arg-type]


def _balcony(oid: str, floor: int, facade: str = "street", **kw: object) -> Opening:
    base = dict(x_m=0.0, width_m=5.0, projection_m=1.5, perch_height_m=1.1,
                cats_present=CatsPresent.YES, open_frequency=OpenFrequency.DAILY)
    base.update(kw)
    return Opening(id=oid, floor=floor, facade=facade, kind=OpeningKind.BALCONY, **base)  # type: ignore[arg-type]


def _building(openings: list[Opening], profile: CatProfile | None = None) -> Building:
    return Building(
        info=BuildingInfo(name="Test House", address="1 Example Row"),
        floors=FLOORS,
        facades=(Facade("street", 20.0), Facade("garden", 20.0), Facade("court", 20.0)),
        surfaces=(
            Surface("pavement", SurfaceKind.CONCRETE, 0.0, facade="street"),
            Surface("lawn", SurfaceKind.LAWN, 0.0, facade="garden"),
            Surface("yard", SurfaceKind.CONCRETE, 0.0, facade="court"),
        ),
        openings=tuple(openings),
        cat_profile=CAT_PRESETS["adult"] if profile is None else profile,
    )


def _deterministic(relax_probability: float) -> CatProfile:
    return CatProfile(
        mass_kg=Fixed(4.1), cda_tense_m2=Fixed(0.114), cda_spread_m2=Fixed(0.227),
        relax_probability=relax_probability, relax_fraction=Fixed(0.75),
        righting_time_s=Fixed(0.3), launch_speed_mps=Fixed(0.5),
    )


def test_risk_score_is_the_hhsrs_formula() -> None:
    # HHSRS (Housing Act 2004 guidance): score = Σ weight × spread% / N; 1 in 100 with all harm
    # in class II scores 1000, the Category 1 threshold
    assert risk_score(np.array([0.01]), np.array([[0, 0, 1.0, 0]]))[0] == pytest.approx(1000.0)
    assert HHSRS_CLASS_WEIGHTS.tolist() == [10, 300, 1000, 10000]
    p = np.array([[0.1, 0.2, 0.3, 0.4], [0.25, 0.25, 0.25, 0.25]])
    ref = [sum(w * 100 * q for w, q in zip(HHSRS_CLASS_WEIGHTS, row, strict=True)) / 50
           for row in p]
    np.testing.assert_allclose(risk_score(np.full(2, 1 / 50), p), ref)


def test_identical_openings_rank_as_the_trade_expects() -> None:
    ops = [
        _balcony("open", 6),
        _balcony("netted", 6, x_m=8.0, netting_mesh_mm=30.0),
        _window("over-concrete", 6, "street", x_m=15.0),
        _window("over-lawn", 6, "garden"),
        _balcony("deep-balcony", 5, "court", x_m=0.0, width_m=6.0, projection_m=2.5),
        _window("over-balcony", 6, "court", x_m=2.0),
        _window("no-cats", 6, "street", x_m=17.0, cats_present=CatsPresent.NO),
    ]
    a = assess(_building(ops), samples=N, seed=3)
    r = {o.id: o for o in a.openings}
    # netting with a mesh smaller than a cat can pass (30 mm pet-net practice; common practice,
    # no source)
    assert r["netted"].rank > r["open"].rank
    assert r["netted"].risk_rank > r["open"].risk_rank
    assert r["netted"].annual_probability < r["open"].annual_probability / 10
    # hard ground is worse than lawn (Candela Andrade et al. 2025: severity linked to surface)
    assert r["over-concrete"].rank < r["over-lawn"].rank
    assert r["over-concrete"].expected_severity_g > r["over-lawn"].expected_severity_g
    # a deep balcony below catches the cat (common practice, no source): a short drop, a milder band
    assert r["over-balcony"].rank > r["over-concrete"].rank
    assert r["over-balcony"].landing.get("deep-balcony", 0.0) > 0.9
    assert r["over-balcony"].expected_band < r["over-concrete"].expected_band
    # no cats: lower likelihood, lower in the list among equal bands
    assert r["no-cats"].annual_probability < r["over-concrete"].annual_probability
    assert r["no-cats"].rank > r["over-concrete"].rank
    assert sorted(o.rank for o in a.openings) == list(range(1, len(ops) + 1))
    assert sorted(o.risk_rank for o in a.openings) == list(range(1, len(ops) + 1))


def test_band_probabilities_and_deterministic_profile() -> None:
    ops = [_window(f"W{i}", i) for i in (1, 3, 8, 20)]
    a = assess(_building(ops), samples=N)
    np.testing.assert_allclose(a.band_probabilities.sum(axis=1), 1.0, atol=1e-12)
    for o in a.openings:
        assert sum(o.bands.values()) == pytest.approx(1.0)
        assert list(o.bands) == list(BANDS)
        assert o.drop_m.p5 <= o.drop_m.p50 <= o.drop_m.p95
        assert sum(o.landing.values()) == pytest.approx(1.0)
    step = replace(DEFAULT_THRESHOLDS, spread=0.0)
    det = assess(_building(ops, _deterministic(0.0)), samples=50, thresholds=step)
    # position along the width still varies, but nothing below catches, and with no spread
    # between cats hurt by the same fall: one band each
    assert np.all(np.count_nonzero(det.band_probabilities, axis=1) == 1)
    # with the fitted spread the same identical cats spread over several bands
    spread = assess(_building(ops, _deterministic(0.0)), samples=50)
    assert np.all(np.count_nonzero(spread.band_probabilities > 0.05, axis=1) >= 2)


def test_never_relaxing_cat_gets_worse_with_every_floor() -> None:
    ops = [_window(f"W{i}", i) for i in range(1, 41)]
    a = assess(_building(ops, _deterministic(0.0)), samples=20)
    sev = np.array([o.expected_severity_g for o in a.openings])
    assert np.all(np.diff(sev) > 0)
    bands = np.array([o.expected_band for o in a.openings])
    assert np.all(np.diff(bands) >= 0)


def test_always_relaxing_cat_lands_slower_but_is_not_hurt_less() -> None:
    # relaxed cats peak just after spreading out and settle a few percent lower (fact of the
    # trade, no source); the later case series found no height at which falls get gentler
    # (Vnuk et al. 2004; Karabağlı et al.; Candela Andrade et al. 2025), so the dose follows the
    # highest speed reached and nothing falls with height
    ops = [_window(f"W{i}", i) for i in range(1, 41)]
    a = assess(_building(ops, _deterministic(1.0)), samples=20)
    v = np.array([o.impact_speed_mps.p50 for o in a.openings])
    k = int(np.argmax(v))
    assert 0 < k < len(v) - 1 and 0.02 < 1 - v[-1] / v[k] < 0.10
    sev = np.array([o.expected_severity_g for o in a.openings])
    assert np.all(np.diff(sev) >= -1e-9 * sev[1:])
    tail = np.cumsum(a.band_probabilities[:, ::-1], axis=1)[:, ::-1]
    assert np.all(np.diff(tail, axis=0) >= -1e-12)
    risk = np.array([o.risk for o in a.openings])
    assert np.all(np.diff(risk) >= -1e-9 * risk[1:])


def test_default_profile_never_shows_a_higher_floor_as_safer() -> None:
    # the "safer above seven storeys" claim was not reproduced by the Zagreb (Vnuk et al. 2004),
    # Istanbul (Karabağlı et al.) and Berlin (Candela Andrade et al. 2025) series
    ops = [_window(f"W{i}", i) for i in range(1, 41)]
    a = assess(_building(ops), samples=N)
    sev = np.array([o.expected_severity_g for o in a.openings])
    assert np.all(np.diff(sev) >= -1e-9 * sev[1:])
    bands = np.array([o.expected_band for o in a.openings])
    assert np.all(np.diff(bands) >= 0)
    risk = np.array([o.risk for o in a.openings])
    assert np.all(np.diff(risk) >= -1e-9 * risk[1:])


def _windows_over(drops_m: np.ndarray, kind: SurfaceKind) -> Building:
    """One window per drop (sill 0.9 m above its floor) over one surface."""
    floors = tuple(Floor(i, f"F{i}", float(d) - 0.9) for i, d in enumerate(drops_m))
    ops = tuple(Opening(f"W{i}", i, "f", OpeningKind.WINDOW_CASEMENT, 0.0, 1.0,
                        perch_height_m=0.9) for i in range(len(drops_m)))
    return Building(BuildingInfo("Drops"), floors, (Facade("f", 5.0),),
                    (Surface("below", kind, 0.0),), ops)


def test_adult_over_concrete_spreads_over_bands_at_every_height() -> None:
    # the case series report a wide spread of outcomes at every height: most cats survive,
    # many from high floors have only minor injuries, a minority die even from low floors
    # (research summary of Vnuk et al. 2004, Candela Andrade et al. 2025, Merbl et al. 2013)
    drops = np.arange(3.0, 60.5, 1.0)
    a = assess(_windows_over(drops, SurfaceKind.CONCRETE), samples=N)
    p = a.band_probabilities
    assert np.all(np.count_nonzero(p >= 0.10, axis=1) >= 2), p[np.count_nonzero(
        p >= 0.10, axis=1) < 2]
    serious_or_worse = p[:, 2] + p[:, 3]
    assert np.all(np.diff(serious_or_worse) > 0)  # rises with the drop (Karabağlı et al.)


def test_berlin_conditions_give_the_reported_share_of_deaths() -> None:
    # Candela Andrade et al. 2025, J Feline Med Surg (1125 cats, Berlin): typically 8-15 m,
    # 74.2 % landed on hard ground; 13.3 % died or were put to sleep. The life-threatening band
    # also holds cats that survive with intensive care, so its share may be somewhat higher.
    drops = np.linspace(8.0, 15.0, 15)
    hard = assess(_windows_over(drops, SurfaceKind.CONCRETE), samples=N).band_probabilities
    soft = assess(_windows_over(drops, SurfaceKind.LAWN), samples=N).band_probabilities
    share = 0.742 * hard[:, 3].mean() + 0.258 * soft[:, 3].mean()
    assert 0.10 <= share <= 0.25
    # severity linked to surface: hard ground worse than lawn at the same heights
    assert np.all(hard[:, 3] > soft[:, 3])


def test_case_series_height_shape() -> None:
    storey_m = 3.0  # storeys of 2.7-3.5 m (common practice, no source)
    drops = np.arange(1, 13) * storey_m + 0.9
    a = assess(_windows_over(drops, SurfaceKind.CONCRETE), samples=N)
    means_a = np.array([o.expected_severity_g for o in a.openings])
    # Karabağlı et al., Pak Vet J (Istanbul, 160 cats): injury score rose steadily with height
    assert np.all(np.diff(means_a) > 0)
    # Vnuk et al. 2004, J Feline Med Surg 6:305: falls from the 7th storey up were more severe
    assert means_a[6:].mean() > 1.4 * means_a[1:6].mean()
    life = a.band_probabilities[:, 3]
    assert life[6:].mean() > 1.5 * life[1:6].mean()


def test_factors_hazards_and_ranked_views() -> None:
    ops = [
        _window("tt", 4, kind=OpeningKind.WINDOW_TILT_TURN),
        _balcony("gappy", 4, x_m=10.0, largest_gap_mm=110.0, flat_rail_top=True),
        _window("low", 1, "garden"),
    ]
    b = _building(ops)
    pond = Surface("pond", SurfaceKind.WATER, 0.0, facade="garden")
    b = replace(b, surfaces=b.surfaces + (pond,))
    b = replace(b, surfaces=tuple(s for s in b.surfaces if s.id != "lawn"))
    a = assess(b, samples=N)
    r = {o.id: o for o in a.openings}
    assert any("trapped" in h for h in explain_all(r["tt"].hazards))
    assert any("drown" in h for h in explain_all(r["low"].hazards))
    assert any("110 mm" in f for f in explain_all(r["gappy"].factors))
    assert any("rail top" in f for f in explain_all(r["gappy"].factors))
    assert all(o.factors for o in a.openings)
    assert [o.rank for o in a.ranked("band")] == [1, 2, 3]
    assert [o.risk_rank for o in a.ranked("risk")] == [1, 2, 3]
    assert a.model_version == MODEL_VERSION
    with pytest.raises(ValueError):
        a.ranked("cost")  # type: ignore[arg-type]


def test_same_seed_same_result_and_progress() -> None:
    ops = [_window("a", 3), _balcony("b", 7)]
    calls: list[tuple[int, int]] = []
    a1 = assess(_building(ops), samples=N, seed=9, progress=lambda d, t: calls.append((d, t)))
    a2 = assess(_building(ops), samples=N, seed=9)
    assert a1.openings == a2.openings
    np.testing.assert_array_equal(a1.severity_g, a2.severity_g)
    assert calls and calls[-1][0] == calls[-1][1]
    with pytest.raises(ValueError):
        assess(_building(ops), samples=0)


def test_empty_building() -> None:
    a = assess(_building([]), samples=10)
    assert a.openings == () and a.band_probabilities.shape == (0, 4)


def test_sensitivity_names_the_parameters_that_matter() -> None:
    ops = [_window(f"W{i}", i) for i in (2, 5, 9, 14, 20, 30)]
    a = with_sensitivity(assess(_building(ops), samples=300))
    s = a.sensitivity
    assert s is not None and len(s.opening_ids) == 5
    swings = [abs(w.swing) for w in s.swings]
    assert swings == sorted(swings, reverse=True)
    names = [w.parameter for w in s.swings]
    assert set(names) == {"mass_kg", "cda_tense_m2", "cda_spread_m2", "relax_probability",
                          "relax_fraction", "righting_time_s", "launch_speed_mps"}
    # heavier cats fall faster (v_t = sqrt(2mg/(rho C_d A)), Taylor §2.4): mass moves risk up
    mass = next(w for w in s.swings if w.parameter == "mass_kg")
    assert mass.risk_high > mass.risk_low and mass.low_value < mass.high_value
    # long falls end long after the cat has righted itself: righting time cannot matter here
    rt = next(w for w in s.swings if w.parameter == "righting_time_s")
    assert rt.swing == 0.0


def test_in_place_severity_matches_the_injury_formula() -> None:
    from petfall_audit.physics import simulate_falls
    from petfall_audit.risk import severity_of_falls

    b = _building([_window("g", 1, "garden"), _window("s", 1), _window("h", 12),
                   _balcony("deep", 2, "court", projection_m=2.5), _window("c", 3, "court")])
    cat = sample_cat_profile(b.cat_profile, 300, seed=2)
    falls = simulate_falls(b, cat)
    surf = surface_stop_m(falls.landing_kinds)[falls.landing]
    ref = dose_g(peak_speed_of_falls(falls, cat), falls.fall_time_s, cat.righting_time_s, surf)
    np.testing.assert_allclose(severity_of_falls(falls, cat), ref, rtol=1e-12)


def test_percentiles_match_numpy() -> None:
    from petfall_audit.physics import simulate_falls
    from petfall_audit.risk import percentiles

    ops = [_window(f"W{i}", i) for i in (1, 2, 2, 5)] + [
        _balcony("deep", 2, "court", projection_m=2.5), _window("c", 3, "court"),
        _window("g", 4, "garden")]
    b = _building(ops)
    a = assess(b, samples=400, seed=8)
    falls = simulate_falls(b, sample_cat_profile(b.cat_profile, 400, seed=8))
    for i, o in enumerate(a.openings):
        # reference: numpy's linear percentile on the full rows
        ref_d = np.percentile(falls.drop_m[i], [5, 50, 95])
        ref_v = np.percentile(falls.impact_speed_mps[i], [5, 50, 95])
        np.testing.assert_allclose([o.drop_m.p5, o.drop_m.p50, o.drop_m.p95], ref_d, rtol=1e-12)
        np.testing.assert_allclose(
            [o.impact_speed_mps.p5, o.impact_speed_mps.p50, o.impact_speed_mps.p95], ref_v,
            rtol=1e-12)
    np.testing.assert_allclose(percentiles(np.arange(101.0)), [5.0, 50.0, 95.0])


def test_large_buildings_are_summarised_block_by_block_with_the_same_results() -> None:
    # the same building assessed keeping every fall and block by block gives the same numbers
    ops = [_window(f"W{i}", i) for i in range(1, 30)] + [_balcony(f"B{i}", i) for i in (3, 9)]
    b = _building(ops)
    whole = assess(b, samples=300, seed=4, keep_falls=True)
    lean = assess(b, samples=300, seed=4, keep_falls=False)
    assert lean.falls is None and lean.severity_g is None
    assert whole.falls is not None and whole.severity_g is not None
    assert whole.severity_g.shape == (len(ops), 300)
    assert lean.openings == whole.openings
    np.testing.assert_array_equal(lean.band_probabilities, whole.band_probabilities)
    assert lean.rho_kg_m3 == whole.falls.rho_kg_m3
    with pytest.raises(ValueError, match="at most"):
        from petfall_audit.risk import MAX_SAMPLES

        assess(b, samples=MAX_SAMPLES + 1, seed=1)
