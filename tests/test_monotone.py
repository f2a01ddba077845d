"""Never safer higher up, never safer behind a coarser barrier (properties of the whole model).

The published evidence these stand on: the later case series found injuries rising with height
and no height at which falls get gentler (Vnuk et al. 2004, J Feline Med Surg 6:305; Karabağlı
et al., Pak Vet J; Candela Andrade et al. 2025, J Feline Med Surg); and a barrier with a wider gap
lets more cats through, never fewer (if the head passes, the body follows: common practice, no
source).
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from petfall_audit.likelihood import assess_likelihood
from petfall_audit.model import (
    CAT_PRESETS,
    Building,
    BuildingInfo,
    CatsPresent,
    Facade,
    Floor,
    OpenFrequency,
    Opening,
    OpeningKind,
    Screen,
    Surface,
    SurfaceKind,
)
from petfall_audit.risk import assess

DROPS_M = np.concatenate([np.arange(0.5, 10.0, 0.25), np.arange(10.0, 150.5, 2.0)])


def _windows_over(drops_m: np.ndarray, kind: SurfaceKind, preset: str) -> Building:
    """The same window (sill 0.9 m above its floor) at every drop, over one surface."""
    floors = tuple(Floor(i, f"F{i}", float(d) - 0.9) for i, d in enumerate(drops_m))
    ops = tuple(Opening(f"W{i}", i, "f", OpeningKind.WINDOW_CASEMENT, 0.0, 1.0,
                        perch_height_m=0.9, cats_present=CatsPresent.YES,
                        open_frequency=OpenFrequency.DAILY) for i in range(len(drops_m)))
    return Building(BuildingInfo("Drops"), floors, (Facade("f", 5.0),),
                    (Surface("below", kind, 0.0),), ops, cat_profile=CAT_PRESETS[preset])


def _assert_never_safer(b: Building, samples: int) -> None:
    a = assess(b, samples=samples, seed=3)
    tail = np.cumsum(a.band_probabilities[:, ::-1], axis=1)[:, ::-1][:, 1:]  # P(>= b), b=1..3
    assert np.all(np.diff(tail, axis=0) >= -1e-12), "a band or worse got less likely"
    bands = np.array([o.expected_band for o in a.openings])
    assert np.all(np.diff(bands) >= 0), "the expected band fell"
    risk = np.array([o.risk for o in a.openings])
    assert np.all(np.diff(risk) >= -1e-9 * np.abs(risk[1:])), "the risk score fell"


@pytest.mark.parametrize("kind", list(SurfaceKind))
@pytest.mark.parametrize("preset", list(CAT_PRESETS))
def test_never_safer_higher_up_for_every_preset_and_surface(preset: str, kind: SurfaceKind
                                                            ) -> None:
    _assert_never_safer(_windows_over(DROPS_M, kind, preset), samples=300)


@settings(max_examples=25, deadline=None)
@given(
    preset=st.sampled_from(list(CAT_PRESETS)),
    kind=st.sampled_from(list(SurfaceKind)),
    drops=st.lists(st.floats(0.5, 150.0), min_size=2, max_size=6, unique=True),
    launch=st.floats(0.0, 6.0),
)
def test_never_safer_higher_up_property(preset: str, kind: SurfaceKind, drops: list[float],
                                        launch: float) -> None:
    b = _windows_over(np.sort(np.array(drops)), kind, preset)
    from petfall_audit.model import Fixed

    b = dataclasses.replace(b, cat_profile=dataclasses.replace(
        b.cat_profile, launch_speed_mps=Fixed(launch)))
    _assert_never_safer(b, samples=64)


# --- barriers --------------------------------------------------------------------------------

_GAP = st.floats(0.0, 400.0)


def _annual(o: Opening, preset: str) -> float:
    return float(assess_likelihood([o], profile=CAT_PRESETS[preset]).annual_probability[0])


_BALCONY = Opening("B", 3, "f", OpeningKind.BALCONY, 0.0, 3.0, projection_m=1.5,
                   cats_present=CatsPresent.YES, open_frequency=OpenFrequency.DAILY)
_WINDOW = Opening("W", 3, "f", OpeningKind.WINDOW_CASEMENT, 0.0, 1.2, perch_height_m=0.9,
                  cats_present=CatsPresent.YES, open_frequency=OpenFrequency.DAILY)


@settings(max_examples=200, deadline=None)
@given(preset=st.sampled_from(list(CAT_PRESETS)),
       field=st.sampled_from(["netting_mesh_mm", "largest_gap_mm", "bottom_gap_mm",
                              "limiter_gap_mm"]),
       a=_GAP, b=_GAP, screen=st.sampled_from(list(Screen)))
def test_a_coarser_barrier_never_gives_a_lower_likelihood(
    preset: str, field: str, a: float, b: float, screen: Screen
) -> None:
    lo, hi = sorted((a, b))
    base = _WINDOW if field == "limiter_gap_mm" else _BALCONY
    if field == "netting_mesh_mm":
        lo, hi = max(lo, 1.0), max(hi, 1.0)  # a mesh has an opening
    base = dataclasses.replace(base, screen=screen)
    fine = _annual(dataclasses.replace(base, **{field: lo}), preset)
    coarse = _annual(dataclasses.replace(base, **{field: hi}), preset)
    assert fine <= coarse * (1 + 1e-12)
    # and a barrier, however coarse, is never worse than none (guards: a gap is worse than none)
    if field in ("netting_mesh_mm", "limiter_gap_mm"):
        assert coarse <= _annual(base, preset) * (1 + 1e-12)


def test_no_step_backwards_at_half_of_the_cats() -> None:
    # the share of adult cats a 55 mm gap lets through is near a half (gap model in
    # docs/risk-model.md): a sweep across it must not step down anywhere
    for field, base in (("netting_mesh_mm", _BALCONY), ("limiter_gap_mm", _WINDOW)):
        gaps = np.linspace(20.0, 120.0, 501)
        p = [_annual(dataclasses.replace(base, **{field: float(g)}), "adult") for g in gaps]
        assert np.all(np.diff(p) >= -1e-15), field
