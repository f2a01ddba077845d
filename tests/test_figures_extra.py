"""Figure data of the on-screen views (Qt-free): per-level summaries, posture paths, the
impact-speed curve, what lies below a facade and the budget grid."""

from __future__ import annotations

import math

import numpy as np
import pytest

from petfall_audit.demo import sample_building
from petfall_audit.figures import representative_cat
from petfall_audit.figures_extra import (
    align_levels,
    budget_grid,
    facade_context,
    impact_speed_curve,
    level_summary,
    posture_paths,
)
from petfall_audit.fixes import opening_options
from petfall_audit.physics import G0
from petfall_audit.plan import curve_from_options
from petfall_audit.risk import assess


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
