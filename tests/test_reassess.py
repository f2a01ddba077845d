"""Incremental reassessment (petfall_audit.reassess): after any sequence of edits, the result
equals a full recompute of the same building with the same samples and seed, array for array.

The reference is :func:`petfall_audit.risk.assess` run from scratch on each version; the
reassessor must reproduce it exactly (common random numbers: the same cats for every version),
while simulating only the openings whose falls can have changed.
"""

from __future__ import annotations

import dataclasses
from typing import Any

import numpy as np
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from petfall_audit.demo import sample_building
from petfall_audit.model import CAT_PRESETS, Building, InjuryThresholds, OpeningKind
from petfall_audit.reassess import Reassessor
from petfall_audit.risk import Assessment, assess

SAMPLES = 48
SEED = 5
_FALL_FIELDS = ("drop_m", "landing", "impact_speed_mps", "fall_time_s", "righted")


def assert_same(got: Assessment, want: Assessment) -> None:
    """Every array and every per-opening result equal, bit for bit."""
    assert got.openings == want.openings
    for name in ("band_probabilities", "risk"):
        assert np.array_equal(getattr(got, name), getattr(want, name)), name
    for name in ("annual_probability", "one_in_n", "rate_per_year"):
        assert np.array_equal(getattr(got.likelihood, name), getattr(want.likelihood, name))
    assert got.likelihood.factors == want.likelihood.factors
    assert got.rho_kg_m3 == want.rho_kg_m3 and got.thresholds == want.thresholds
    if want.falls is None:
        assert got.falls is None
        return
    assert got.falls is not None and got.severity_g is not None
    assert got.falls.landing_ids == want.falls.landing_ids
    assert got.falls.opening_ids == want.falls.opening_ids
    for name in _FALL_FIELDS:
        assert np.array_equal(getattr(got.falls, name), getattr(want.falls, name)), name
    assert np.array_equal(got.severity_g, want.severity_g)


def _opening_edit(b: Building, i: int, field: str, value: Any) -> Building:
    ops = list(b.openings)
    ops[i % len(ops)] = dataclasses.replace(ops[i % len(ops)], **{field: value})
    return dataclasses.replace(b, openings=tuple(ops))


def _apply(b: Building, edit: tuple[Any, ...]) -> Building:
    kind, i, x = edit
    if kind == "projection":
        o = b.openings[i % len(b.openings)]
        return _opening_edit(b, i, "projection_m", max(0.0, o.projection_m + x))
    if kind == "perch":
        o = b.openings[i % len(b.openings)]
        return _opening_edit(b, i, "perch_height_m", max(0.3, o.perch_height_m + x))
    if kind == "x":
        return _opening_edit(b, i, "x_m", max(0.0, b.openings[i % len(b.openings)].x_m + x))
    if kind == "width":
        return _opening_edit(b, i, "width_m", 0.5 + abs(x))
    if kind == "netting":
        return _opening_edit(b, i, "netting_mesh_mm", None if x < 0 else 20.0 + 10 * x)
    if kind == "kind":
        o = b.openings[i % len(b.openings)]
        new = (OpeningKind.WINDOW_CASEMENT if o.kind is OpeningKind.BALCONY
               else OpeningKind.BALCONY)
        return _opening_edit(b, i, "kind", new)
    if kind == "remove" and len(b.openings) > 1:
        ops = list(b.openings)
        del ops[i % len(ops)]
        return dataclasses.replace(b, openings=tuple(ops))
    if kind == "reverse":
        return dataclasses.replace(b, openings=b.openings[::-1])
    if kind == "surface" and b.surfaces:
        ss = list(b.surfaces)
        s = ss[i % len(ss)]
        ss[i % len(ss)] = dataclasses.replace(s, elevation_m=s.elevation_m + x)
        return dataclasses.replace(b, surfaces=tuple(ss))
    if kind == "floor":
        fs = list(b.floors)
        k = 1 + i % (len(fs) - 1)
        fs[k] = dataclasses.replace(fs[k], elevation_m=fs[k].elevation_m + abs(x) / 4)
        return dataclasses.replace(b, floors=tuple(fs))
    if kind == "cat":
        return dataclasses.replace(b, cat_profile=CAT_PRESETS["kitten" if x > 0 else "adult"])
    if kind == "site":
        info = dataclasses.replace(b.info, site_altitude_m=max(0.0, 500 * x))
        return dataclasses.replace(b, info=info)
    if kind == "injury":
        return dataclasses.replace(b, injury=InjuryThresholds(spread=0.6 + abs(x) / 4))
    return b


edits = st.lists(
    st.tuples(
        st.sampled_from(["projection", "perch", "x", "width", "netting", "kind", "remove",
                         "reverse", "surface", "floor", "cat", "site", "injury"]),
        st.integers(0, 500),
        st.floats(-1.0, 1.0, allow_nan=False),
    ),
    min_size=1, max_size=5,
)


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(name=st.sampled_from(["walkup", "tower"]), steps=edits)
def test_every_edit_gives_the_full_recompute(name: str, steps: list[tuple[Any, ...]]) -> None:
    building = sample_building(name)
    r = Reassessor(samples=SAMPLES, seed=SEED, keep_falls=True)
    assert_same(r.assess(building), assess(building, samples=SAMPLES, seed=SEED,
                                           keep_falls=True))
    for step in steps:
        building = _apply(building, step)
        assert_same(r.assess(building), assess(building, samples=SAMPLES, seed=SEED,
                                               keep_falls=True))


def test_without_kept_falls_the_summaries_still_match() -> None:
    building = sample_building("tower")
    r = Reassessor(samples=SAMPLES, seed=SEED)  # keeps no falls
    r.assess(building)
    edited = _apply(building, ("projection", 3, 0.5))
    got = r.assess(edited)
    assert got.falls is None
    assert_same(got, assess(edited, samples=SAMPLES, seed=SEED, keep_falls=False))


def test_only_the_openings_an_edit_can_reach_are_simulated() -> None:
    building = sample_building("tower")
    r = Reassessor(samples=SAMPLES, seed=SEED)
    r.assess(building)
    assert 0 < r.last_simulated <= len(building.openings)
    # the likelihood alone: no fall changes
    netted = _apply(building, ("netting", 0, 0.5))
    assert r.to_simulate(netted) == 0
    r.assess(netted)
    assert r.last_simulated == 0
    # a balcony reaching further out: itself, and some of the openings above it
    i = next(k for k, o in enumerate(building.openings) if o.kind is OpeningKind.BALCONY)
    deeper = _apply(netted, ("projection", i, 0.6))
    r.assess(deeper)
    assert 1 <= r.last_simulated < len(building.openings) // 2
    # a new cat profile reaches every fall
    kitten = _apply(deeper, ("cat", 0, 1.0))
    r.assess(kitten)
    full = Reassessor(samples=SAMPLES, seed=SEED)
    full.assess(kitten)
    assert r.last_simulated == full.last_simulated > 0


def test_a_tower_of_repeating_openings_is_assessed_once_per_distinct_fall() -> None:
    from petfall_audit.demo import make_large_tower
    from petfall_audit.reassess import assess_deduplicated

    tower = make_large_tower(8, 6)
    seen: list[tuple[int, int]] = []
    got = assess_deduplicated(tower, samples=SAMPLES, seed=SEED,
                              progress=lambda done, total: seen.append((done, total)))
    assert_same(got, assess(tower, samples=SAMPLES, seed=SEED, keep_falls=False))
    simulated = seen[-1][1]
    assert 0 < simulated < len(tower.openings)  # identical storeys share their falls
