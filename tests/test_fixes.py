"""The control catalogue, applicability, conflicts, conditions, options and recommendations."""

from __future__ import annotations

import copy
import json
from dataclasses import replace
from pathlib import Path

import numpy as np
import pint
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from petfall_audit._resources import resource_path
from petfall_audit.code_profile import code_profile
from petfall_audit.demo import sample_building
from petfall_audit.fixes import (
    FIRE_ACCESS_CONDITION,
    HIERARCHY,
    PERMISSION_CONDITION,
    WIND_CONDITION,
    CatalogueError,
    Option,
    attachment_condition,
    candidates,
    escape_condition,
    load_catalogue,
    opening_options,
    parse_catalogue,
    recommend,
    recommendation_lines,
)
from petfall_audit.guard_rules import why_code_compliant_is_not_cat_safe
from petfall_audit.likelihood import assess_likelihood
from petfall_audit.model import OpenFrequency, Opening, OpeningKind, Screen
from petfall_audit.risk import assess, risk_score

UREG = pint.UnitRegistry()
CAT = load_catalogue()
GENERIC = code_profile("generic")
ENGLAND = code_profile("england")
ESCAPE_CONDITION = escape_condition(GENERIC)
ESCAPE_BLOCKING = {
    "net_clamp_30",
    "net_anchored_30",
    "net_anchored_20",
    "screen_pet_fixed",
    "limiter_fixed_40",
}


def _doc() -> dict:
    return json.loads(resource_path("controls.json").read_text(encoding="utf-8"))


def _balcony(**kw: object) -> Opening:
    base = dict(
        id="B1",
        floor=1,
        facade="n",
        kind=OpeningKind.BALCONY,
        x_m=0.0,
        width_m=3.0,
        projection_m=1.5,
        largest_gap_mm=110.0,
        flat_rail_top=True,
        climbing_aids=True,
        open_frequency=OpenFrequency.DAILY,
    )
    base.update(kw)
    return Opening(**base)  # type: ignore[arg-type]


def _window(**kw: object) -> Opening:
    base = dict(
        id="W1",
        floor=1,
        facade="n",
        kind=OpeningKind.WINDOW_CASEMENT,
        x_m=0.0,
        width_m=1.0,
        open_frequency=OpenFrequency.DAILY,
    )
    base.update(kw)
    return Opening(**base)  # type: ignore[arg-type]


def _ids(cands: list, openings_index: int = 0) -> set[str]:
    return {CAT.controls[c.control_index].id for c in cands if c.opening_index == openings_index}


# --- catalogue ----------------------------------------------------------------------------------


def test_shipped_catalogue_is_in_hierarchy_order_with_a_currency() -> None:
    ranks = [HIERARCHY.index(c.hierarchy) for c in CAT.controls]
    assert ranks == sorted(ranks)
    assert {c.hierarchy for c in CAT.controls} == set(HIERARCHY)
    assert CAT.currency == "EUR"
    assert "invented demo values" in CAT.description


def test_catalogue_errors_are_located() -> None:
    doc = _doc()
    doc["controls"][3]["cost"]["per_m_width"] = "cheap"
    doc["controls"][1]["applies_to"]["kinds"].append("chimney")
    doc["controls"][2]["conflicts"].append("no_such_rule")
    doc["controls"][4]["effect"]["colour"] = "blue"
    with pytest.raises(CatalogueError) as info:
        parse_catalogue(doc)
    where = {p.where for p in info.value.problems}
    assert "controls[3].cost.per_m_width" in where
    assert "controls[1].applies_to.kinds[2]" in where
    assert "controls[2].conflicts[4]" in where
    assert "controls[4].effect.colour" in where


def test_catalogue_needs_releasable_with_the_escape_rule_and_a_known_format(tmp_path: Path) -> None:
    doc = _doc()
    del doc["controls"][6]["releasable"]  # limiter_fixed_40
    with pytest.raises(CatalogueError, match=r"controls\[6\]\.releasable"):
        parse_catalogue(doc)
    bad = copy.deepcopy(_doc())
    bad["format"] = "something-else"
    with pytest.raises(CatalogueError, match="not a control catalogue"):
        parse_catalogue(bad)
    path = tmp_path / "broken.json"
    path.write_text("{not json", encoding="utf-8")
    with pytest.raises(CatalogueError, match="line 1"):
        load_catalogue(path)


def test_user_catalogue_with_other_currency_and_costs(tmp_path: Path) -> None:
    doc = _doc()
    doc["currency"] = "GBP"
    doc["controls"] = [c for c in doc["controls"] if c["id"] == "tenant_guidance"]
    doc["controls"][0]["cost"]["fixed"] = 7.5
    path = tmp_path / "mine.json"
    path.write_text(json.dumps(doc), encoding="utf-8")
    cat = load_catalogue(path)
    assert cat.currency == "GBP"
    assert cat.cost(cat.controls[0], _window()) == 7.5


def test_cost_by_width_and_area() -> None:
    # net: fixed 250 + 28 per m² over (3 + 2 × 1.5) m × 2.4 m = 14.4 m² -> 653.20 (hand calculation)
    assert CAT.cost(CAT.control("net_anchored_30"), _balcony()) == pytest.approx(653.2)
    # infill: 80 + 140 per m of width × 3 m = 500
    assert CAT.cost(CAT.control("infill_panels"), _balcony()) == pytest.approx(500.0)
    # screen: 60 + 110 per m² × (1.0 m × 1.2 m) = 192
    assert CAT.cost(CAT.control("screen_pet_fixed"), _window()) == pytest.approx(192.0)


# --- applicability, conflicts, conditions ------------------------------------------------------

openings_st = st.builds(
    Opening,
    id=st.just("X"),
    floor=st.just(1),
    facade=st.just("n"),
    kind=st.sampled_from(list(OpeningKind)),
    x_m=st.just(0.0),
    width_m=st.floats(0.4, 8.0),
    projection_m=st.floats(0.0, 3.0),
    largest_gap_mm=st.none() | st.floats(10, 200),
    bottom_gap_mm=st.none() | st.floats(10, 200),
    flat_rail_top=st.booleans(),
    climbing_aids=st.booleans(),
    limiter_gap_mm=st.none() | st.floats(20, 150),
    screen=st.sampled_from(list(Screen)),
    netting_mesh_mm=st.none() | st.floats(15, 80),
    open_frequency=st.sampled_from(list(OpenFrequency)),
    escape_window=st.booleans(),
)


@settings(max_examples=200, deadline=None)
@given(opening=openings_st, height_m=st.floats(0.0, 120.0))
def test_escape_windows_never_get_a_blocking_control(opening: Opening, height_m: float) -> None:
    cands = candidates([opening], [height_m], CAT)
    for c in cands:
        control = CAT.controls[c.control_index]
        assert opening.kind in control.kinds
        if opening.escape_window:
            assert control.id not in ESCAPE_BLOCKING
            assert control.releasable is not False or "escape_window" not in control.conflicts
            if "escape_window" in control.conflicts:
                assert ESCAPE_CONDITION in c.conditions
        if "exterior_permission" in control.conflicts:
            assert PERMISSION_CONDITION in c.conditions
        assert set(control.conditions) <= set(c.conditions)
    if opening.kind is OpeningKind.FIXED:
        assert cands == []


def test_releasable_devices_on_an_escape_window_carry_the_escape_condition() -> None:
    cands = candidates([_window(escape_window=True)], [10.0], CAT)
    ids = _ids(cands)
    assert {"limiter_release_40", "screen_pet_hinged"} <= ids
    assert not ids & ESCAPE_BLOCKING
    for c in cands:
        if CAT.controls[c.control_index].id in {"limiter_release_40", "screen_pet_hinged"}:
            assert ESCAPE_CONDITION in c.conditions
            assert "without a key or tool" in ESCAPE_CONDITION
            assert "check the local rule" in ESCAPE_CONDITION  # generic: no clause
    # the same window, not an escape window, gets the fixed devices too
    assert {"limiter_fixed_40", "screen_pet_fixed"} <= _ids(candidates([_window()], [10.0], CAT))


def test_nets_high_up_need_wind_rated_fixings() -> None:
    low = {CAT.controls[c.control_index].id: c for c in candidates([_balcony()], [9.0], CAT)}
    high = {CAT.controls[c.control_index].id: c for c in candidates([_balcony()], [30.0], CAT)}
    assert "net_clamp_30" in low and "net_clamp_30" not in high  # clamp poles only to 18 m
    assert WIND_CONDITION not in low["net_anchored_30"].conditions
    assert WIND_CONDITION in high["net_anchored_30"].conditions
    assert "wind-rated" in WIND_CONDITION


def test_galleries_keep_fire_access_and_smoke_vents_clear() -> None:
    gallery = _balcony(kind=OpeningKind.GALLERY)
    by_id = {CAT.controls[c.control_index].id: c for c in candidates([gallery], [6.0], CAT)}
    assert FIRE_ACCESS_CONDITION in by_id["net_anchored_30"].conditions
    assert FIRE_ACCESS_CONDITION in by_id["infill_panels"].conditions
    assert "smoke vents" in FIRE_ACCESS_CONDITION


def test_a_control_already_in_place_is_not_offered() -> None:
    done = _window(
        screen=Screen.PET_RESISTANT, climbing_aids=False, open_frequency=OpenFrequency.RARELY
    )
    ids = _ids(candidates([done], [5.0], CAT))
    assert not ids & {"screen_pet_fixed", "screen_pet_hinged", "clear_climbing_aids", "keep_closed"}


# --- options on a real assessment ----------------------------------------------------------------


@pytest.fixture(scope="module")
def walkup_assessment():  # type: ignore[no-untyped-def]
    return assess(sample_building("walkup"), samples=300, seed=3)


def test_options_lower_the_risk_and_match_an_independent_recomputation(walkup_assessment) -> None:  # type: ignore[no-untyped-def]
    a = walkup_assessment
    options = opening_options(a, CAT)
    assert list(options) == [o.id for o in a.building.openings]
    n_checked = 0
    for i, opening in enumerate(a.building.openings):
        ranked = options[opening.id]
        keys = [(o.risk_after, o.cost, o.catalogue_index) for o in ranked]
        assert keys == sorted(keys)
        for opt in ranked:
            assert opt.risk_before == pytest.approx(a.risk[i])
            assert opt.risk_after < opt.risk_before
            if opening.escape_window:
                assert opt.control_id not in ESCAPE_BLOCKING
        if ranked:  # residual = risk_score(likelihood of the modified opening) with the same bands
            opt = ranked[0]
            control = CAT.control(opt.control_id)
            p = assess_likelihood([control.apply(opening)], profile=a.building.cat_profile)
            # a control that relies on people counts only while kept (docs/fixes.md)
            kept = p.annual_probability * control.likelihood_multiplier
            now = a.likelihood.annual_probability[i : i + 1]
            expected = risk_score(
                control.adherence * kept + (1 - control.adherence) * now,
                a.band_probabilities[i : i + 1],
            )[0]
            assert opt.risk_after == pytest.approx(expected, rel=1e-12)
            n_checked += 1
    assert n_checked > 10
    assert any(o.escape_window for o in a.building.openings)


def test_escape_window_in_a_real_building_gets_no_fixed_device(walkup_assessment) -> None:  # type: ignore[no-untyped-def]
    a = walkup_assessment
    openings = tuple(
        replace(o, escape_window=True)
        if o.kind in {OpeningKind.WINDOW_CASEMENT, OpeningKind.WINDOW_HUNG}
        else o
        for o in a.building.openings
    )
    a2 = assess(replace(a.building, openings=openings), samples=100, seed=3)
    options = opening_options(a2, CAT)
    for o in openings:
        for opt in options[o.id]:
            if o.escape_window:
                assert opt.control_id not in ESCAPE_BLOCKING


# --- recommendation ------------------------------------------------------------------------------


def _opt(control: str, cost: float, after: float, idx: int, before: float = 100.0) -> Option:
    return Option("X", control, control, cost, before, after, (), "engineer", idx)


def test_recommend_prefers_an_effective_control_over_a_cheap_token() -> None:
    leaflet = _opt("leaflet", 3.0, 90.0, 9)  # 10 % less, 3.3 per unit cost
    net = _opt("net", 600.0, 3.0, 2)  # 97 % less, 0.16 per unit cost
    limiter = _opt("limiter", 35.0, 5.0, 3)  # 95 % less, 2.7 per unit cost
    rec = recommend({"X": [net, limiter, leaflet], "Y": []})
    assert rec["X"] == limiter and rec["Y"] is None
    # nothing reaches the share floor: the largest reduction wins
    rec = recommend({"X": [_opt("a", 10.0, 50.0, 0), _opt("b", 5.0, 60.0, 1)]})
    assert rec["X"] is not None and rec["X"].control_id == "a"
    # equal ratio and residual: cheaper, then catalogue order
    rec = recommend({"X": [_opt("late", 10.0, 5.0, 7), _opt("early", 10.0, 5.0, 1)]})
    assert rec["X"] is not None and rec["X"].control_id == "early"
    with pytest.raises(ValueError, match="min_share"):
        recommend({}, min_share=1.5)


# --- guard rules and why code-compliant is not cat-safe --------------------------------------


def test_reasons_name_the_code_clause_and_the_cat_source() -> None:
    # England, Approved Document K (2013): Diagram 3.1 (1100 mm balcony guards), para 3.3
    # (100 mm sphere); the cat's skull from Vet Sci 2021;8:161
    reasons = " ".join(
        why_code_compliant_is_not_cat_safe(_balcony(largest_gap_mm=90.0), code=ENGLAND)
    )
    assert "1100 mm (Approved Document K, Diagram 3.1)" in reasons
    assert "100 mm, Approved Document K, para 3.3" in reasons
    assert "IBC" not in reasons and "NCC" not in reasons and "BBR" not in reasons
    assert "Vet Sci 2021;8:161" in reasons
    us = " ".join(
        why_code_compliant_is_not_cat_safe(
            _window(limiter_gap_mm=100.0), code=code_profile("us-ibc")
        )
    )
    assert "ASTM F2090" in us and "IBC §1015.8" in us and "Approved Document" not in us
    assert "4.0 in" in us  # ASTM F2090: under 4 in, in the profile's imperial units
    # a 30 mm net or a pet-resistant screen holds a cat: nothing to explain
    assert why_code_compliant_is_not_cat_safe(_balcony(netting_mesh_mm=30.0)) == []
    assert why_code_compliant_is_not_cat_safe(_window(screen=Screen.PET_RESISTANT)) == []


def test_limiter_wider_than_the_child_limit_is_not_said_to_meet_it() -> None:
    # ASTM F2090: child devices keep the opening under 4 in (102 mm); a 150 mm gap does not
    us = code_profile("us-ibc")
    wide = " ".join(why_code_compliant_is_not_cat_safe(_window(limiter_gap_mm=150.0), code=us))
    assert "wider than even the child limit" in wide and "can meet the child limit" not in wide
    narrow = " ".join(
        why_code_compliant_is_not_cat_safe(_window(limiter_gap_mm=100.0), code=us)
    )
    assert "can meet the child limit" in narrow


def test_recommendation_text_carries_conditions_and_reasons(walkup_assessment) -> None:  # type: ignore[no-untyped-def]
    a = walkup_assessment
    options = opening_options(a, CAT)
    rec = recommend(options)
    worst = int(np.argmax(a.risk))
    opening = a.building.openings[worst]
    option = rec[opening.id]
    assert option is not None
    text = "\n".join(
        recommendation_lines(opening, option, currency=CAT.currency, code=ENGLAND)
    )
    assert option.control_name in text and "EUR" in text
    for condition in option.conditions:
        assert condition in text
    assert "Why meeting the building code is not enough for a cat" in text
    assert "Approved Document K" in text and "Vet Sci 2021;8:161" in text


def test_a_rule_that_relies_on_people_removes_risk_only_while_kept() -> None:
    """Adherence blends the opening with and without the control (docs/fixes.md): a house rule
    kept half of the time removes half of what the same rule kept always would."""
    import dataclasses

    from petfall_audit.demo import sample_building
    from petfall_audit.fixes import Catalogue, load_catalogue, opening_options
    from petfall_audit.risk import assess

    catalogue = load_catalogue()
    keep = next(c for c in catalogue.controls if c.id == "keep_closed")
    assert keep.adherence == 0.5
    always = dataclasses.replace(keep, adherence=1.0)
    only_always = dataclasses.replace(catalogue, controls=(always,))
    only_half = dataclasses.replace(catalogue, controls=(keep,))
    assert isinstance(only_half, Catalogue)
    assessment = assess(sample_building("walkup"), samples=200, seed=3)
    half = opening_options(assessment, only_half)
    full = opening_options(assessment, only_always)
    compared = 0
    for opening_id, options in full.items():
        if not options:
            continue
        removed_full = options[0].risk_before - options[0].risk_after
        removed_half = half[opening_id][0].risk_before - half[opening_id][0].risk_after
        assert removed_half == pytest.approx(0.5 * removed_full, rel=1e-9)
        compared += 1
    assert compared > 0


def test_the_adherence_assumption_is_stated_with_the_option() -> None:
    from petfall_audit.fixes import load_catalogue, opening_options
    from petfall_audit.risk import assess

    options = opening_options(assess(sample_building("walkup"), samples=100), load_catalogue())
    keep = [o for opts in options.values() for o in opts if o.control_id == "keep_closed"]
    assert keep and all(any("kept 50% of the time" in c for c in o.conditions) for o in keep)


def test_an_edited_catalogue_cannot_put_a_fixed_limiter_on_an_escape_window() -> None:
    """A user's catalogue that forgets the escape_window rule on a window limiter is refused at
    load time, and even a control built without it is never offered on an escape window unless
    it releases by hand (IRC R310.4; Approved Document B: escape openings must open without a key
    or tool)."""
    import dataclasses

    from petfall_audit.errors import CatalogueError
    from petfall_audit.fixes import BLOCKING_FIELDS, candidates, opening_heights_m, parse_catalogue

    doc = json.loads(resource_path("controls.json").read_text(encoding="utf-8"))
    limiter = next(c for c in doc["controls"] if c["id"] == "limiter_fixed_40")
    limiter["conflicts"] = [r for r in limiter["conflicts"] if r != "escape_window"]
    with pytest.raises(CatalogueError, match="must name the escape_window rule"):
        parse_catalogue(doc)

    catalogue = load_catalogue()
    for control in catalogue.controls:
        if not any(name in BLOCKING_FIELDS for name, _ in control.effect):
            continue
        stripped = dataclasses.replace(
            control,
            conflicts=tuple(r for r in control.conflicts if r != "escape_window"),
            releasable=None if control.releasable is False else control.releasable,
        )
        building = sample_building("walkup")
        where = [i for i, o in enumerate(building.openings) if o.escape_window]
        assert where, "the walk-up sample has escape windows"
        escape = [building.openings[i] for i in where]
        heights = np.asarray(opening_heights_m(building))[where]
        one = dataclasses.replace(catalogue, controls=(stripped,))
        offered = candidates(escape, heights, one)
        if stripped.releasable is not True:
            assert offered == [], control.id


def test_nets_low_down_on_a_tall_building_carry_the_fire_rule_for_attachments() -> None:
    """England, Building Regulations 2010 reg. 7(2): in a building with a storey at 18 m or more,
    attachments on every floor fall under the fire rule, not only those high up."""
    rule = attachment_condition(ENGLAND)
    assert rule is not None and "reg. 7(2)" in rule and "18 m" in rule
    low_in_tall = {CAT.controls[c.control_index].id: c
                   for c in candidates([_balcony()], [9.0], CAT, tall_building=True,
                                       profile=ENGLAND)}
    low_in_short = {CAT.controls[c.control_index].id: c
                    for c in candidates([_balcony()], [9.0], CAT, tall_building=False,
                                        profile=ENGLAND)}
    assert rule in low_in_tall["net_anchored_30"].conditions
    assert rule not in low_in_short["net_anchored_30"].conditions
    assert WIND_CONDITION not in low_in_tall["net_anchored_30"].conditions
