"""Whether a barrier holds a profile's cats, against published and sourced gap values (each
source named beside its check; the gap model is in docs/risk-model.md)."""

from __future__ import annotations

from dataclasses import replace

import pytest

from petfall_audit.barriers import gap_holds, is_protected
from petfall_audit.guard_rules import why_code_compliant_is_not_cat_safe
from petfall_audit.likelihood import assess_likelihood
from petfall_audit.model import CAT_PRESETS, Opening, OpeningKind, Screen

ADULT, KITTEN, HEAVY = CAT_PRESETS["adult"], CAT_PRESETS["kitten"], CAT_PRESETS["heavy_adult"]

WINDOW = Opening(id="W", floor=3, facade="f", kind=OpeningKind.WINDOW_CASEMENT, x_m=1.0,
                 width_m=1.0, perch_height_m=0.9)
BALCONY = Opening(id="B", floor=3, facade="f", kind=OpeningKind.BALCONY, x_m=1.0, width_m=2.0,
                  perch_height_m=1.1, projection_m=1.2)


@pytest.mark.parametrize("gap_mm, source", [
    (100.0, "Approved Document K para 3.3: 100 mm sphere; UK limiter practice 100 mm"),
    (102.0, "IBC §1015.4 / IRC §R312.1.3 / ASTM F2090: 4 in (102 mm)"),
    (125.0, "NCC balustrades and NSW window devices: 125 mm sphere"),
    (110.0, "BBR 8:2321: gaps of 110-230 mm are a head trap"),
])
def test_no_child_rule_gap_holds_any_cat(gap_mm: float, source: str) -> None:
    # research facts §1: every child rule (100, 102, 125 mm) is wider than an adult cat's skull
    for profile in (ADULT, KITTEN, HEAVY):
        assert not gap_holds(gap_mm, profile), source


def test_pet_net_meshes_of_the_trade_hold_the_cats_they_are_sold_for() -> None:
    # pet-net practice (research facts §6, common practice): 30 x 30 mm standard, also sold for
    # young animals; 20 x 20 mm for kittens
    assert gap_holds(30.0, ADULT) and gap_holds(30.0, HEAVY)
    assert gap_holds(20.0, KITTEN)


def test_gaps_against_the_measured_skull_width() -> None:
    # European Shorthair CT (Vet Sci 2021;8:161): cranial width 42.8 ± 2.6 mm. A gap two SD
    # below the mean bony width is narrower than nearly every adult skull: it holds adults.
    assert gap_holds(42.8 - 2 * 2.6, ADULT)
    # zygomatic (widest) skull width about 60-70 mm (from memory): a 70 mm gap passes the whole
    # head of a typical adult, so it holds no adults
    assert not gap_holds(70.0, ADULT)


def test_kittens_pass_gaps_that_were_seen_to_pass_kittens() -> None:
    # anecdotes (forum, breeder; research facts §3): a kitten through a 38 x 83 mm hole, a
    # kitten's head through a 40 mm mesh
    assert not gap_holds(38.0, KITTEN)
    assert not gap_holds(40.0, KITTEN)


def test_the_cases_of_the_issue_are_not_protected() -> None:
    # a balcony with a 100 mm net and a window with a 150 mm limiter (wider than ASTM F2090's
    # 102 mm child limit) hold no cat
    assert not is_protected(replace(BALCONY, netting_mesh_mm=100.0), ADULT)
    assert not is_protected(replace(WINDOW, limiter_gap_mm=150.0), ADULT)
    # a limiter recorded on a balcony is no barrier (a balcony has no sash to limit)
    assert not is_protected(replace(BALCONY, limiter_gap_mm=20.0), KITTEN)
    # a pet-resistant screen is; an insect screen is not (cats push through it: common practice)
    assert is_protected(replace(WINDOW, screen=Screen.PET_RESISTANT), ADULT)
    assert not is_protected(replace(WINDOW, screen=Screen.INSECT), ADULT)


@pytest.mark.parametrize("opening", [
    replace(BALCONY, netting_mesh_mm=100.0),
    replace(BALCONY, netting_mesh_mm=30.0),
    replace(WINDOW, limiter_gap_mm=150.0),
    replace(WINDOW, limiter_gap_mm=100.0),
    replace(WINDOW, limiter_gap_mm=30.0),
    replace(WINDOW, netting_mesh_mm=40.0),
    replace(WINDOW, screen=Screen.PET_RESISTANT),
])
@pytest.mark.parametrize("profile", [ADULT, KITTEN])
def test_likelihood_and_guard_rules_agree_with_the_predicate(opening: Opening, profile) -> None:  # type: ignore[no-untyped-def]
    """The one predicate decides the likelihood's words and whether the guard rules explain
    anything: a protected opening is described as fitted and needs no explanation; an
    unprotected one is said to let cats through and lists why the code is not enough."""
    protected = is_protected(opening, profile)
    codes = {r.code for r in assess_likelihood([opening], profile=profile).factors[0]}
    reasons = why_code_compliant_is_not_cat_safe(opening, cat=profile)
    assert (reasons == []) == protected
    if opening.netting_mesh_mm is not None:
        assert ("net_fitted" in codes) == protected
        assert ("net_mesh_large" in codes) == (not protected)
    if opening.limiter_gap_mm is not None:
        assert ("limiter_fitted" in codes) == protected
