"""Likelihood of a fall within 12 months (petfall_audit.likelihood)."""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np
import pytest
from scipy import stats

from petfall_audit.likelihood import (
    ENTRAPMENT_HAZARD,
    FACTORS,
    MIN_ANNUAL_PROBABILITY,
    assess_likelihood,
    gap_pass_share,
    mass_cdf,
)
from petfall_audit.model import (
    CAT_PRESETS,
    CatsPresent,
    Fixed,
    LogNormal,
    Normal,
    OpenFrequency,
    Opening,
    OpeningKind,
    Screen,
    Uniform,
)
from petfall_audit.present.explain import REASON_CODES, explain_all

ADULT = CAT_PRESETS["adult"]
KITTEN = CAT_PRESETS["kitten"]

BALCONY = Opening(
    id="B1", floor=5, facade="south", kind=OpeningKind.BALCONY, x_m=0.0, width_m=3.0,
    projection_m=1.5, cats_present=CatsPresent.YES, open_frequency=OpenFrequency.DAILY,
)
WINDOW = Opening(
    id="W1", floor=5, facade="south", kind=OpeningKind.WINDOW_CASEMENT, x_m=4.0, width_m=0.9,
    perch_height_m=0.9, cats_present=CatsPresent.YES, open_frequency=OpenFrequency.DAILY,
)


def _p(*openings: Opening, profile=ADULT) -> np.ndarray:  # type: ignore[no-untyped-def]
    return assess_likelihood(openings, profile=profile).annual_probability


def test_mass_cdf_matches_scipy() -> None:
    # reference library: scipy.stats (log-normal from arithmetic mean and sd; normal truncated
    # at zero; uniform)
    ln = LogNormal(4.1, 1.1)
    s2 = math.log1p((1.1 / 4.1) ** 2)
    ref = stats.lognorm(s=math.sqrt(s2), scale=math.exp(math.log(4.1) - s2 / 2))
    nm = Normal(1.0, 0.6)
    tn = stats.truncnorm(a=(0 - 1.0) / 0.6, b=np.inf, loc=1.0, scale=0.6)
    for x in (0.5, 2.0, 4.1, 6.0, 9.0):
        assert mass_cdf(ln, x) == pytest.approx(ref.cdf(x), rel=1e-9, abs=1e-12)
        assert mass_cdf(nm, x) == pytest.approx(tn.cdf(x), rel=1e-9, abs=1e-12)
        assert mass_cdf(Uniform(2.0, 6.0), x) == pytest.approx(stats.uniform(2, 4).cdf(x))
    assert mass_cdf(Fixed(4.0), 3.9) == 0.0 and mass_cdf(Fixed(4.0), 4.1) == 1.0


def test_gap_pass_share_follows_cat_skull_sizes() -> None:
    # child rules (100 mm ADK 3.3, 102 mm IBC 1015.4 / ASTM F2090) do not stop cats:
    # child sphere 100-125 mm vs adult cranial width 42.8 mm (Vet Sci 2021;8:161)
    assert gap_pass_share(100.0, ADULT) > 0.99
    assert gap_pass_share(102.0, KITTEN) > 0.99
    # 30 mm mesh is the standard pet net and holds adults and kittens (pet-net practice;
    # common practice, no source)
    assert gap_pass_share(30.0, ADULT) < 0.001
    assert gap_pass_share(30.0, KITTEN) < 0.05
    # 20 mm for kittens (pet-net practice; common practice, no source)
    assert gap_pass_share(20.0, KITTEN) < 1e-4
    # a kitten's head went through a 40 mm mesh (a breeder's report; anecdote, no source)
    assert gap_pass_share(40.0, KITTEN) > 0.3
    # adult cranial width 42.8 mm (Vet Sci 2021;8:161): gaps near it stop nearly all adults,
    # gaps well past the zygomatic width (60-70 mm, from memory) let nearly all through
    assert gap_pass_share(43.0, ADULT) < 0.02
    assert gap_pass_share(70.0, ADULT) > 0.95
    shares = [gap_pass_share(g, ADULT) for g in range(20, 120, 5)]
    assert all(a <= b for a, b in zip(shares, shares[1:], strict=False))


def test_netting_smaller_than_a_cat_can_pass_lowers_likelihood() -> None:
    netted = replace(BALCONY, netting_mesh_mm=30.0)
    coarse = replace(BALCONY, netting_mesh_mm=80.0)
    p_open, p_net, p_coarse = _p(BALCONY, netted, coarse)
    assert p_net < p_open / 10
    assert p_coarse == pytest.approx(p_open, rel=0.05)


def test_cats_absent_lowers_likelihood() -> None:
    yes, unknown, no = _p(BALCONY, replace(BALCONY, cats_present=CatsPresent.UNKNOWN),
                          replace(BALCONY, cats_present=CatsPresent.NO))
    assert no < unknown < yes
    assert no < yes / 10


def test_open_frequency_orders_likelihood() -> None:
    order = [OpenFrequency.NEVER, OpenFrequency.RARELY, OpenFrequency.SEASONAL,
             OpenFrequency.DAILY, OpenFrequency.ALWAYS]
    p = _p(*(replace(WINDOW, open_frequency=f) for f in order))
    assert np.all(np.diff(p) > 0)


def test_fixed_glazing_is_effectively_never() -> None:
    res = assess_likelihood([replace(WINDOW, kind=OpeningKind.FIXED)])
    assert res.annual_probability[0] == MIN_ANNUAL_PROBABILITY
    assert res.one_in_n[0] == pytest.approx(1 / MIN_ANNUAL_PROBABILITY)


def test_screens_and_limiters() -> None:
    p = _p(WINDOW, replace(WINDOW, screen=Screen.INSECT),
           replace(WINDOW, screen=Screen.PET_RESISTANT), replace(WINDOW, limiter_gap_mm=100.0),
           replace(WINDOW, limiter_gap_mm=40.0))
    none, insect, pet, lim100, lim40 = p
    assert pet < insect < none
    assert lim100 == pytest.approx(none, rel=0.01)  # a child limiter does not stop a cat
    assert lim40 < none / 10
    # a kitten passes the 40 mm limiter that stops adults
    assert _p(replace(WINDOW, limiter_gap_mm=40.0), profile=KITTEN)[0] > 5 * lim40


def test_code_height_guard_does_not_stop_a_cat_and_perches_invite() -> None:
    solid = BALCONY
    wide_gaps = replace(BALCONY, largest_gap_mm=100.0)  # code-compliant for children (ADK 3.3)
    flat = replace(BALCONY, flat_rail_top=True)
    aids = replace(BALCONY, climbing_aids=True)
    p_solid, p_gaps, p_flat, p_aids = _p(solid, wide_gaps, flat, aids)
    assert p_gaps > p_solid and p_flat > p_solid and p_aids > p_solid
    # a solid guard still leaves a good share: cats jump onto the rail
    open_window = _p(replace(WINDOW, kind=OpeningKind.BALCONY, projection_m=1.0))[0]
    assert p_solid >= 0.3 * open_window


def test_tilt_and_turn_entrapment_is_a_separate_hazard() -> None:
    tt = replace(WINDOW, kind=OpeningKind.WINDOW_TILT_TURN)
    res = assess_likelihood([tt, WINDOW, replace(tt, cats_present=CatsPresent.NO),
                             replace(tt, screen=Screen.PET_RESISTANT)])
    assert ENTRAPMENT_HAZARD in res.hazards[0]
    assert res.hazards[1] == () and res.hazards[2] == () and res.hazards[3] == ()
    assert not any("trapped" in f for f in explain_all(res.factors[0]))


def test_factors_are_codes_that_read_as_plain_words() -> None:
    ops = [BALCONY, replace(BALCONY, largest_gap_mm=90.0, flat_rail_top=True, netting_mesh_mm=30),
           replace(WINDOW, limiter_gap_mm=100.0, escape_window=True),
           replace(WINDOW, screen=Screen.INSECT)]
    res = assess_likelihood(ops)
    for reasons in res.factors:
        assert reasons and all(r.code in FACTORS for r in reasons)
        words = explain_all(reasons)
        assert all(isinstance(w, str) and w and "{" not in w for w in words)
        # every code has its own words (an unknown code would read as the code itself)
        assert all(r.code in REASON_CODES for r in reasons)
    assert any("jump" in w for w in explain_all(res.factors[0]))
    assert any("escape" in w for w in explain_all(res.factors[2]))
    # the limiter's gap travels as a length in metres, not as text
    limiter = next(r for r in res.factors[2] if r.code.startswith("limiter"))
    assert limiter.number("gap_m") == pytest.approx(0.100)
    assert all(f.source for f in FACTORS.values())
    np.testing.assert_allclose(res.one_in_n, 1 / res.annual_probability)
    assert np.all((res.annual_probability > 0) & (res.annual_probability < 1))


# --- openings that differ only in where they are share one likelihood ------------------------

from hypothesis import given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

from petfall_audit.likelihood import (  # noqa: E402
    PLACEMENT_FIELDS,
    likelihood_key,
    opening_likelihood,
    opening_likelihoods,
)

_gaps = st.one_of(st.none(), st.floats(1.0, 250.0))


@st.composite
def _openings(draw: st.DrawFn) -> Opening:
    return Opening(
        id=draw(st.sampled_from(["A", "B", "C"])), floor=draw(st.integers(0, 30)),
        facade=draw(st.sampled_from(["north", "south"])),
        kind=draw(st.sampled_from(list(OpeningKind))), x_m=draw(st.floats(0.0, 40.0)),
        width_m=draw(st.floats(0.3, 6.0)), projection_m=draw(st.floats(0.0, 3.0)),
        perch_height_m=draw(st.floats(0.0, 2.0)), largest_gap_mm=draw(_gaps),
        bottom_gap_mm=draw(_gaps), limiter_gap_mm=draw(_gaps), netting_mesh_mm=draw(_gaps),
        climbable_infill=draw(st.booleans()), flat_rail_top=draw(st.booleans()),
        climbing_aids=draw(st.booleans()), screen=draw(st.sampled_from(list(Screen))),
        open_frequency=draw(st.sampled_from(list(OpenFrequency))),
        cats_present=draw(st.sampled_from(list(CatsPresent))),
        escape_window=draw(st.booleans()), notes=draw(st.sampled_from(["", "by the stairs"])),
        photos=draw(st.sampled_from([(), ("photos/a.jpg",)])),
    )


@settings(max_examples=200, deadline=None)
@given(_openings(), _openings(), st.sampled_from([ADULT, KITTEN]))
def test_placement_fields_never_change_the_likelihood(a: Opening, b: Opening, profile) -> None:
    """An opening moved, renamed, resized or described otherwise keeps its likelihood, so that
    openings may share it by :func:`likelihood_key` (fails as soon as the likelihood reads a
    field of PLACEMENT_FIELDS)."""
    moved = replace(a, **{name: getattr(b, name) for name in PLACEMENT_FIELDS})
    assert likelihood_key(moved) == likelihood_key(a)
    assert opening_likelihood(moved, profile) == opening_likelihood(a, profile)


@settings(max_examples=100, deadline=None)
@given(st.lists(_openings(), min_size=1, max_size=6), st.lists(st.integers(0, 5), max_size=30),
       st.sampled_from([ADULT, KITTEN]))
def test_shared_likelihoods_equal_one_at_a_time(pool: list[Opening], picks: list[int],
                                                profile) -> None:
    """The likelihoods of a building with repeated openings, worked out once per key, equal
    each opening's own, in order."""
    openings = [pool[i % len(pool)] for i in picks] + pool
    rows = opening_likelihoods(openings, profile)
    assert rows == [opening_likelihood(o, profile) for o in openings]
    one = assess_likelihood(openings, profile=profile)
    assert one.rate_per_year.tolist() == [r[0] for r in rows]


def test_every_field_outside_placement_is_in_the_key() -> None:
    """A field that changes the likelihood is never left out of the key: changing any one
    non-placement field of a guarded balcony changes the key."""
    from dataclasses import fields

    base = replace(BALCONY, largest_gap_mm=80.0, bottom_gap_mm=40.0, limiter_gap_mm=100.0,
                   netting_mesh_mm=30.0)
    changes = {"kind": OpeningKind.WINDOW_CASEMENT, "largest_gap_mm": 81.0,
               "bottom_gap_mm": 41.0, "climbable_infill": True, "flat_rail_top": True,
               "climbing_aids": True, "limiter_gap_mm": 101.0, "screen": Screen.INSECT,
               "netting_mesh_mm": 31.0, "open_frequency": OpenFrequency.NEVER,
               "cats_present": CatsPresent.NO, "escape_window": True}
    others = {f.name for f in fields(Opening)} - PLACEMENT_FIELDS
    assert set(changes) == others  # a new field: add it here and decide where it belongs
    for name, value in changes.items():
        assert likelihood_key(replace(base, **{name: value})) != likelihood_key(base), name
