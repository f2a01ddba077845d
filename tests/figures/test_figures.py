"""Figure data shared by the PDF and the window: facade elevations and what lies below them,
per-floor summaries, fall profiles and posture paths, the impact-speed curve and budget grid."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import stats

from petfall_audit.demo import sample_building
from petfall_audit.figures import (
    align_levels,
    budget_grid,
    facade_context,
    facade_elevations,
    fall_profile_figure,
    floor_comparison,
    impact_speed_curve,
    level_summary,
    posture_paths,
    representative_cat,
    storey_heights_m,
)
from petfall_audit.fixes import opening_options
from petfall_audit.model import (
    CAT_PRESETS,
    Building,
    BuildingInfo,
    Facade,
    Fixed,
    Floor,
    LogNormal,
    Normal,
    Opening,
    OpeningKind,
    Surface,
    SurfaceKind,
    Uniform,
)
from petfall_audit.physics import G0
from petfall_audit.plan import curve_from_options
from petfall_audit.risk import assess


def small_building() -> Building:
    """An invented four-storey block: a tall ground floor, balconies north, windows south."""
    floors = (Floor(0, "Ground", 0.0), Floor(1, "First", 4.2), Floor(2, "Second", 7.1),
              Floor(3, "Third", 10.0))
    openings = (
        Opening("N1-B", 1, "north", OpeningKind.BALCONY, 1.0, 3.0, projection_m=1.5),
        Opening("N2-B", 2, "north", OpeningKind.BALCONY, 1.0, 3.0, projection_m=1.5),
        Opening("N3-B", 3, "north", OpeningKind.BALCONY, 1.0, 3.0, projection_m=1.5,
                flat_rail_top=True),
        Opening("S1-W", 1, "south", OpeningKind.WINDOW_CASEMENT, 2.0, 1.0, perch_height_m=0.9),
        Opening("S3-W", 3, "south", OpeningKind.WINDOW_TILT_TURN, 2.0, 1.0, perch_height_m=0.9),
    )
    return Building(
        info=BuildingInfo(name="Invented Court", address="1 Nowhere Row"),
        floors=floors,
        facades=(Facade("north", 12.0, "North"), Facade("south", 12.0)),
        surfaces=(Surface("lawn-n", SurfaceKind.LAWN, 0.0, facade="north"),),
        openings=openings,
    )


@pytest.fixture(scope="module")
def assessment():  # type: ignore[no-untyped-def]
    return assess(small_building(), samples=400, seed=3)


def test_storey_heights_follow_the_floors_not_3_m() -> None:
    h = storey_heights_m(small_building())
    assert h == pytest.approx({0: 4.2, 1: 2.9, 2: 2.9, 3: 2.9})


def test_representative_cat_uses_medians() -> None:
    # Median of a log-normal with arithmetic mean m and sd s is m / sqrt(1 + (s/m)^2);
    # checked against scipy.stats.lognorm (independent reference).
    prof = CAT_PRESETS["adult"]
    cat = representative_cat(prof)
    m, s = prof.mass_kg.mean, prof.mass_kg.sd  # type: ignore[union-attr]
    sigma = math.sqrt(math.log(1 + (s / m) ** 2))
    mu = math.log(m) - sigma**2 / 2
    assert cat.mass_kg == pytest.approx(stats.lognorm(sigma, scale=math.exp(mu)).median())
    assert isinstance(prof.cda_tense_m2, Normal)
    assert cat.cda_tense_m2 == pytest.approx(prof.cda_tense_m2.mean)
    assert isinstance(prof.relax_fraction, Uniform)
    assert cat.relax_fraction == pytest.approx(0.75)
    assert cat.relaxes  # 70 % of adult cats relax in the preset


def test_representative_cat_that_does_not_relax() -> None:
    from dataclasses import replace

    prof = replace(CAT_PRESETS["adult"], relax_probability=0.2, mass_kg=Fixed(4.0))
    cat = representative_cat(prof)
    assert cat.mass_kg == 4.0 and not cat.relaxes
    assert representative_cat(replace(prof, mass_kg=LogNormal(4.0, 0.0))).mass_kg == 4.0


def test_facade_elevation_geometry_and_bands(assessment) -> None:  # type: ignore[no-untyped-def]
    elevs = {e.facade_id: e for e in facade_elevations(assessment)}
    assert set(elevs) == {"north", "south"}
    north = elevs["north"]
    assert north.opening_ids == ("N1-B", "N2-B", "N3-B")
    assert north.label == "North" and elevs["south"].label == "south"
    # balconies are drawn from their floor; the rail line sits at the perch height (1.1 m)
    np.testing.assert_allclose(north.bottom_m, [4.2, 7.1, 10.0])
    np.testing.assert_allclose(north.guard_m, [5.3, 8.2, 11.1])
    assert np.all(north.top_m > north.bottom_m)
    assert np.all(np.isnan(elevs["south"].guard_m))
    # windows from the sill
    np.testing.assert_allclose(elevs["south"].bottom_m, [4.2 + 0.9, 10.0 + 0.9])
    by_id = {o.id: o for o in assessment.openings}
    for e in elevs.values():
        assert [by_id[i].expected_band for i in e.opening_ids] == e.band.tolist()
        assert [by_id[i].rank for i in e.opening_ids] == e.rank.tolist()
    assert north.roof_m == pytest.approx(12.9)


def test_floor_comparison_counts_every_opening_once(assessment) -> None:  # type: ignore[no-untyped-def]
    fc = floor_comparison(assessment)
    assert fc.levels.tolist() == [0, 1, 2, 3]
    assert fc.n_openings.tolist() == [0, 2, 1, 2]
    assert fc.band_counts.sum(axis=1).tolist() == fc.n_openings.tolist()
    assert fc.max_risk[0] == 0.0 and math.isnan(fc.max_impact_p50_mps[0])
    top = [o for o in assessment.openings if o.floor == 3]
    assert fc.max_impact_p50_mps[3] == pytest.approx(max(o.impact_speed_mps.p50 for o in top))
    assert fc.max_risk[3] == pytest.approx(max(o.risk for o in top))


def test_fall_profile_figure_matches_the_closed_form(assessment) -> None:  # type: ignore[no-untyped-def]
    # Closed form for the tense-only phase, v(h) = v_t sqrt(1 - exp(-2 g h / v_t^2))
    # (Taylor, Classical Mechanics, 2005, §2.4): the profile, which relaxes to a lower terminal
    # speed part-way or not at all, must land no faster than a tense cat and no slower than a
    # fully spread one over the same drop.
    fig = fall_profile_figure(assessment, "N3-B")
    res = next(o for o in assessment.openings if o.id == "N3-B")
    assert fig.drop_m == pytest.approx(res.drop_m.p50)
    g = 9.80665
    cat = fig.cat

    def closed(cda: float) -> float:
        vt = math.sqrt(2 * cat.mass_kg * g / (fig.rho_kg_m3 * cda))
        return vt * math.sqrt(1 - math.exp(-2 * g * fig.drop_m / vt**2))

    v = fig.impact_speed_mps
    assert closed(cat.cda_spread_m2) - 1e-6 <= v <= closed(cat.cda_tense_m2) + 0.05
    assert fig.t_s[0] == 0.0 and fig.height_m[0] == pytest.approx(fig.drop_m, abs=1e-6)
    assert fig.speed_mps[-1] == pytest.approx(fig.impact_speed_mps, rel=1e-3)
    assert "median" in fig.caption and "N3-B" in fig.caption
    with pytest.raises(KeyError):
        fall_profile_figure(assessment, "nope")


@pytest.fixture(scope="module")
def tower():  # type: ignore[no-untyped-def]
    return assess(sample_building("tower"), samples=64, seed=3)


def test_level_summary_adds_up_the_openings(tower) -> None:  # type: ignore[no-untyped-def]
    s = level_summary(tower)
    assert s.n_openings.sum() == len(tower.openings)
    assert s.falls_per_year.sum() == pytest.approx(sum(o.annual_probability
                                                       for o in tower.openings))
    for level, band in zip(s.levels.tolist(), s.worst_band.tolist(), strict=True):
        bands = [o.expected_band for o in tower.openings if o.floor == level]
        assert band == (max(bands) if bands else -1)


def test_align_levels_matches_by_level_number(tower) -> None:  # type: ignore[no-untyped-def]
    street = level_summary(tower, "street")
    east = level_summary(tower, "east")
    a, b = align_levels(street, east)
    assert np.array_equal(a.levels, b.levels)
    assert np.array_equal(a.worst_band, street.worst_band)
    assert np.allclose(b.falls_per_year, east.falls_per_year)
    short = level_summary(tower, "street")
    cut = type(short)(**{**{f: getattr(short, f) for f in short.__dataclass_fields__},
                         "levels": short.levels[:3], "labels": short.labels[:3],
                         "elevation_m": short.elevation_m[:3], "worst_band": short.worst_band[:3],
                         "falls_per_year": short.falls_per_year[:3],
                         "max_impact_p50_mps": short.max_impact_p50_mps[:3],
                         "max_risk": short.max_risk[:3], "n_openings": short.n_openings[:3]})
    x, y = align_levels(street, cut)
    assert len(y.levels) == len(street.levels)
    assert np.all(y.worst_band[3:] == -1) and np.all(y.falls_per_year[3:] == 0)


def test_tense_path_matches_the_closed_form(tower) -> None:  # type: ignore[no-untyped-def]
    worst = tower.ranked()[0]
    paths = posture_paths(tower, worst.id)
    tense = next(p for p in paths if p.name == "stays tense")
    cat = representative_cat(tower.building.cat_profile)
    rho = tower.falls.rho_kg_m3
    # closed-form quadratic-drag fall from rest (Taylor, Classical Mechanics, 2005, §2.4):
    # v(h) = v_t sqrt(1 - exp(-2 g h / v_t²)), v_t = sqrt(2 m g / (rho C_d A))
    vt = math.sqrt(2 * cat.mass_kg * G0 / (rho * cat.cda_tense_m2))
    h = worst.drop_m.p50
    v_closed = vt * math.sqrt(1 - math.exp(-2 * G0 * h / vt**2))
    assert tense.impact_speed_mps == pytest.approx(v_closed, rel=1e-4)
    # t(h) = (v_t / g) arccosh(exp(g h / v_t²)) (same source)
    assert tense.fall_time_s == pytest.approx(vt / G0 * math.acosh(math.exp(G0 * h / vt**2)),
                                              rel=1e-4)
    assert tense.switch_time_s is None
    assert sum(p.share for p in paths) == pytest.approx(1.0)


def test_impact_curve_puts_every_opening_on_it(tower) -> None:  # type: ignore[no-untyped-def]
    c = impact_speed_curve(tower)
    assert c.opening_ids == tuple(o.id for o in tower.openings)
    assert np.all(np.diff(c.speed_tense_mps) >= 0)  # faster with every metre of drop
    assert c.drop_m[-1] >= np.max(c.opening_drop_m)
    on_curve = np.interp(c.opening_drop_m, c.drop_m, c.speed_typical_mps)
    assert np.allclose(c.opening_speed_mps, on_curve, rtol=2e-3, atol=0.05)
    assert np.all(c.speed_tense_mps <= np.sqrt(2 * G0 * c.drop_m) + 1e-9)  # drag only slows


def test_facade_context_lists_surfaces_and_catching_balconies(tower) -> None:  # type: ignore[no-untyped-def]
    ctx = facade_context(tower.building, "street")
    ids = [s.id for s in ctx.surfaces]
    assert ids[0] == "podium_roof" and "street_pavement" in ids
    assert all(s.kind != "lawn" for s in ctx.surfaces)  # the east lawn is not in front
    assert ctx.catching and all(c.projection_m > 0 for c in ctx.catching)


def test_budget_grid_reaches_the_flat_end_of_the_curve(tower) -> None:  # type: ignore[no-untyped-def]
    options = opening_options(tower)
    grid = budget_grid(options, 15)
    assert grid[0] == 0 and np.all(np.diff(grid) > 0) and grid.size == 15
    _, removed = curve_from_options(options, [grid[-1], 10 * grid[-1]])
    assert removed[0] == pytest.approx(removed[1], rel=1e-9)  # more money removes no more


# --- sensitivity to the cat profile -------------------------------------------------------------


@pytest.fixture(scope="module")
def swings(assessment):  # type: ignore[no-untyped-def]
    from petfall_audit.figures import sensitivity_figure

    return sensitivity_figure(assessment)


def test_sensitivity_bars_are_sorted_and_cover_every_parameter(swings) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.present import PARAMETER_LABELS
    from petfall_audit.sensitivity import PARAMETERS

    assert set(swings.parameters) == {name for name, _ in PARAMETERS}
    assert swings.labels == tuple(PARAMETER_LABELS[p] for p in swings.parameters)
    mags = np.abs(swings.swing_pct)
    assert np.all(np.diff(mags) <= 1e-12)  # largest absolute swing first
    assert len(swings.opening_ids) == 5 and swings.base_risk > 0
    assert swings.samples == swings.assessment_samples == 400 and not swings.reduced


def test_sensitivity_signs_follow_the_terminal_speed(swings) -> None:  # type: ignore[no-untyped-def]
    # Terminal speed v_t = sqrt(2 m g / (rho C_d A)) (Taylor, Classical Mechanics, 2005, §2.4):
    # a heavier cat falls faster, a larger drag area slower; the injury index rises with the
    # impact speed, so the top risk rises with mass and falls with the tense drag area.
    swing = dict(zip(swings.parameters, swings.swing_pct, strict=True))
    assert swing["mass_kg"] > 5.0
    assert swing["cda_tense_m2"] < -1.0
    assert swings.parameters[0] == "mass_kg"
    i = swings.parameters.index("mass_kg")
    assert swings.low_pct[i] < 0 < swings.high_pct[i]


def test_sensitivity_percentages_are_of_the_base_risk(assessment, swings) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.sensitivity import sensitivity_analysis

    res = sensitivity_analysis(assessment)
    by_name = {s.parameter: s for s in res.swings}
    for k, name in enumerate(swings.parameters):
        s = by_name[name]
        assert swings.swing_pct[k] == pytest.approx(100.0 * s.swing, abs=1e-9)
        assert swings.low_pct[k] == pytest.approx(100.0 * (s.risk_low / res.base_risk - 1))
        assert swings.high_pct[k] - swings.low_pct[k] == pytest.approx(swings.swing_pct[k])
        assert swings.low_value[k] < swings.high_value[k]
    # units: SI values, the mass range between the adult preset's 10th and 90th percentiles
    i = swings.parameters.index("mass_kg")
    assert swings.units[i] == "kg" and swings.range_text[i].endswith(" kg")
    assert 2.0 < swings.low_value[i] < 4.1 < swings.high_value[i] < 7.0
    j = swings.parameters.index("relax_probability")
    assert swings.high_value[j] - swings.low_value[j] == pytest.approx(0.4)  # ±0.2
    assert swings.range_text[j] == "50–90%"


def test_sensitivity_reuses_a_filled_in_analysis_and_can_use_fewer_cats(assessment) -> None:  # type: ignore[no-untyped-def]
    from dataclasses import replace

    from petfall_audit.figures import sensitivity_figure
    from petfall_audit.sensitivity import ParameterSwing, SensitivityResult, with_sensitivity

    filled = with_sensitivity(assessment)
    fig = sensitivity_figure(filled)
    assert fig is not None
    assert fig.swing_pct == pytest.approx([100.0 * s.swing for s in filled.sensitivity.swings])
    # an analysis already filled in is drawn as it is, not run again
    made_up = SensitivityResult(("N3-B",), 200.0, (ParameterSwing("mass_kg", "kg", 3.0, 5.0,
                                                                   150.0, 250.0, 0.5),))
    fig = sensitivity_figure(replace(assessment, sensitivity=made_up))
    assert fig is not None and fig.parameters == ("mass_kg",)
    assert fig.low_pct.tolist() == [-25.0] and fig.high_pct.tolist() == [25.0]
    assert fig.range_text == ("3.0–5.0 kg",) and fig.span_pct == 25.0
    fewer = sensitivity_figure(assessment, max_samples=100)
    assert fewer is not None and fewer.samples == 100 and fewer.reduced
    assert sensitivity_figure(assessment, cancelled=lambda: True) is None


def test_sensitivity_of_a_building_without_openings_is_none() -> None:
    from dataclasses import replace

    from petfall_audit.figures import sensitivity_figure
    from petfall_audit.present import fmt_change_pct

    empty = assess(replace(small_building(), openings=()), samples=10, seed=1)
    assert sensitivity_figure(empty) is None
    assert [fmt_change_pct(v) for v in (43.2, -4.94, 0.01, 9.96)] == ["+43%", "-4.9%", "0%",
                                                                         "+10%"]
