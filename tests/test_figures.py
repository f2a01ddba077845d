"""Figure data shared by the PDF and the window: facade elevations, floor comparison, profiles."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import stats

from petfall_audit.figures import (
    facade_elevations,
    fall_profile_figure,
    floor_comparison,
    representative_cat,
    storey_heights_m,
)
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
    from petfall_audit.risk import assess

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
