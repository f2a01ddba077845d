"""What a building's code profile decides: the clauses the audit cites, the conditions that go
with each fix, the devices allowed, the checks, the report's method section and dates, the
leaflet's words - and that it changes nothing in the physics."""

from __future__ import annotations

import dataclasses
import json
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from pypdf import PdfReader

from petfall_audit._resources import sample_path
from petfall_audit.cli import main
from petfall_audit.code_profile import PROFILE_IDS, code_profile
from petfall_audit.demo import make_large_tower, sample_building
from petfall_audit.fixes import (
    BLOCKING_FIELDS,
    attachment_condition,
    candidates,
    escape_condition,
    load_catalogue,
    opening_options,
)
from petfall_audit.guard_rules import UNCITED, why_code_compliant_is_not_cat_safe
from petfall_audit.io.survey import check_warnings
from petfall_audit.model import Building, Opening, OpeningKind
from petfall_audit.plan import make_plan
from petfall_audit.risk import assess

CAT = load_catalogue()
FAST = ["--samples", "300", "--seed", "5"]
NETS = {c.id for c in CAT.controls if any(name == "netting_mesh_mm" for name, _ in c.effect)}


def _with_profile(building: Building, profile_id: str, **info: object) -> Building:
    return dataclasses.replace(
        building, info=dataclasses.replace(building.info, code_profile=profile_id, **info)
    )


def _file_with_profile(tmp_path: Path, profile_id: str, **info: object) -> Path:
    doc = json.loads(sample_path("walkup").read_text(encoding="utf-8"))
    doc["building"]["code_profile"] = profile_id
    doc["building"].update(info)
    path = tmp_path / f"walkup-{profile_id}.json"
    path.write_text(json.dumps(doc), encoding="utf-8")
    return path


def _pdf_text(path: Path) -> str:
    text = "\n".join(page.extract_text() or "" for page in PdfReader(path).pages)
    return " ".join(text.split())


def _window(**kw: object) -> Opening:
    base: dict[str, object] = dict(id="W1", floor=1, facade="n", kind=OpeningKind.WINDOW_CASEMENT,
                                   x_m=0.0, width_m=1.0, perch_height_m=0.8)
    base.update(kw)
    return Opening(**base)  # type: ignore[arg-type]


def _balcony(**kw: object) -> Opening:
    base: dict[str, object] = dict(id="B1", floor=1, facade="n", kind=OpeningKind.BALCONY,
                                   x_m=0.0, width_m=3.0, projection_m=1.5, largest_gap_mm=90.0,
                                   bottom_gap_mm=60.0, climbable_infill=True)
    base.update(kw)
    return Opening(**base)  # type: ignore[arg-type]


# --- acceptance: the report cites the profile's code and no other ------------------------------


@pytest.fixture(scope="module")
def reports(tmp_path_factory: pytest.TempPathFactory) -> dict[str, str]:
    tmp = tmp_path_factory.mktemp("profiles")
    out = {}
    for pid in ("england", "us-ibc", "generic"):
        src = _file_with_profile(tmp, pid, audit_date="2026-03-14")
        pdf = tmp / f"{pid}.pdf"
        assert main(["report", str(src), "-o", str(pdf), "--budget", "3000", *FAST]) == 0
        out[pid] = _pdf_text(pdf)
    return out


def test_england_report_cites_approved_document_k_and_no_ibc(reports: dict[str, str]) -> None:
    text = reports["england"]
    # Approved Document K (2013), Diagram 3.1: 1100 mm balcony guards
    assert "Approved Document K, Diagram 3.1" in text
    assert "IBC" not in text and "IRC" not in text and "ASTM F2090" not in text
    assert "Building code: England (Approved Documents)" in text
    assert "read in the text" in text  # each rule's confidence is listed


def test_us_report_cites_the_ibc_and_no_approved_document(reports: dict[str, str]) -> None:
    text = reports["us-ibc"]
    assert "IBC §1015.3" in text  # IBC 1015.3: 42 in guards
    assert "Approved Document" not in text and "reg. 7(2)" not in text
    assert "from memory: verify" in text  # IBC: no anti-climb rule adopted (MEM in the notes)


def test_generic_report_cites_no_clause_and_says_to_check_locally(
    reports: dict[str, str],
) -> None:
    text = reports["generic"]
    for code in ("IBC", "IRC", "Approved Document", "NCC", "BBR", "NBC", "ASTM F2090",
                 "reg. 7(2)", "SJVFS"):
        assert code not in text, code
    assert "Local rules must be checked" in text
    assert "no clause: check the local rule" in text


def test_report_dates_follow_the_profile_date_style(reports: dict[str, str]) -> None:
    # British and US day-month order (common practice, no source), written out
    assert "14 March 2026" in reports["england"]
    assert "March 14, 2026" in reports["us-ibc"]
    assert "2026-03-14" in reports["generic"]


# --- acceptance: nets on a 20-storey building ------------------------------------------------


@pytest.fixture(scope="module")
def tower() -> Building:
    return make_large_tower(20, 4)  # 20 storeys, the top one 60.3 m up


def test_england_plan_for_a_20_storey_building_puts_the_fire_rule_on_every_net(
    tower: Building,
) -> None:
    """Building Regulations 2010 reg. 7(2) (SI 2018/1230): a residential building with a storey
    at 18 m or more: attachments on every floor must be A2-s1,d0 or A1."""
    rule = attachment_condition(code_profile("england"))
    assert rule is not None and "reg. 7(2)" in rule and "A2-s1,d0" in rule
    a = assess(_with_profile(tower, "england"), samples=100, seed=1)
    plan = make_plan(a, 1e7)
    nets = [x for x in plan.actions if x.control_id in NETS]
    assert len(nets) > 10
    assert all(rule in x.conditions for x in nets)
    # every net offered, on low floors too, not only those the plan picked
    options = [o for opts in opening_options(a, CAT).values() for o in opts]
    assert all(rule in o.conditions for o in options if o.control_id in NETS)


def test_us_plan_for_a_20_storey_building_invents_no_fire_rule(tower: Building) -> None:
    assert attachment_condition(code_profile("us-ibc")) is None  # none in the research notes
    plan = make_plan(assess(_with_profile(tower, "us-ibc"), samples=100, seed=1), 1e7)
    nets = [x for x in plan.actions if x.control_id in NETS]
    assert nets
    for x in nets:
        text = " ".join(x.conditions)
        assert "reg. 7" not in text and "A2-s1,d0" not in text and "Tall building" not in text


def test_a_low_building_gets_no_fire_rule_for_attachments_in_england() -> None:
    # reg. 7(2) applies from a storey at 18 m: a 9 m building is not a relevant building
    england = code_profile("england")
    low = candidates([_balcony()], [9.0], CAT, profile=england)
    rule = attachment_condition(england)
    assert rule is not None and all(rule not in c.conditions for c in low)


# --- acceptance: escape windows, under every profile -----------------------------------------


@settings(max_examples=120, deadline=None)
@given(profile_id=st.sampled_from(PROFILE_IDS), height_m=st.floats(0.0, 120.0),
       kind=st.sampled_from([OpeningKind.WINDOW_CASEMENT, OpeningKind.WINDOW_HUNG,
                             OpeningKind.WINDOW_SLIDING, OpeningKind.WINDOW_TILT_TURN,
                             OpeningKind.WINDOW_TOP_HUNG]))
def test_an_escape_window_never_gets_a_fixed_device_or_permanent_net(
    profile_id: str, height_m: float, kind: OpeningKind
) -> None:
    profile = code_profile(profile_id)
    window = _window(kind=kind, escape_window=True)
    for c in candidates([window], [height_m], CAT, profile=profile):
        control = CAT.controls[c.control_index]
        if any(name in BLOCKING_FIELDS for name, _ in control.effect):
            assert control.releasable is True, (profile_id, control.id)
            assert escape_condition(profile) in c.conditions


def test_escape_condition_cites_only_the_profile_rules() -> None:
    # Approved Document B vol. 1 para 2.8; IRC R310.4 (research notes §1)
    assert "Approved Document B" in escape_condition(code_profile("england"))
    assert "IRC" not in escape_condition(code_profile("england"))
    us = escape_condition(code_profile("us-ibc"))
    assert "IRC §R310.4" in us and "Approved Document" not in us
    generic = escape_condition(code_profile("generic"))
    assert "check the local rule" in generic and "IRC" not in generic


def test_fixed_limiters_only_where_the_profile_allows_them() -> None:
    """ASTM F2006-21 §1.3: non-releasable devices only on windows more than 75 ft (22.86 m) up
    in multi-family buildings; England allows a fixed restrictor on any window not needed for
    escape (Approved Document B, from memory)."""
    us, england = code_profile("us-ibc"), code_profile("england")

    def ids(height_m: float, profile: object) -> set[str]:
        return {CAT.controls[c.control_index].id
                for c in candidates([_window()], [height_m], CAT, profile=profile)}  # type: ignore[arg-type]

    assert "limiter_fixed_40" not in ids(10.0, us) and "screen_pet_fixed" not in ids(10.0, us)
    assert "limiter_release_40" in ids(10.0, us)
    assert "limiter_fixed_40" in ids(30.0, us)  # 30 m > 75 ft
    assert "limiter_fixed_40" in ids(10.0, england)
    high = [c for c in candidates([_window()], [30.0], CAT, profile=us)
            if CAT.controls[c.control_index].id == "limiter_fixed_40"]
    assert any("ASTM F2006" in x for x in high[0].conditions)


# --- switching profile changes citations and conditions, never the physics ---------------------


def test_switching_profile_changes_citations_and_conditions_not_the_physics() -> None:
    base = sample_building("walkup")
    a_en = assess(_with_profile(base, "england"), samples=200, seed=4)
    a_us = assess(_with_profile(base, "us-ibc"), samples=200, seed=4)
    for pid in PROFILE_IDS:  # every profile: the same falls, bands, likelihoods and risks
        other = a_us if pid == "us-ibc" else assess(_with_profile(base, pid), samples=200, seed=4)
        np.testing.assert_array_equal(a_en.risk, other.risk)
        np.testing.assert_array_equal(a_en.band_probabilities, other.band_probabilities)
        np.testing.assert_array_equal(a_en.likelihood.annual_probability,
                                      other.likelihood.annual_probability)
        for r_en, r_other in zip(a_en.openings, other.openings, strict=True):
            assert r_en.impact_speed_mps == r_other.impact_speed_mps
            assert r_en.drop_m == r_other.drop_m
    cond_en = {c for opts in opening_options(a_en, CAT).values() for o in opts
               for c in o.conditions}
    cond_us = {c for opts in opening_options(a_us, CAT).values() for o in opts
               for c in o.conditions}
    assert cond_en != cond_us
    assert any("Approved Document B" in c for c in cond_en)
    assert not any("Approved Document" in c for c in cond_us)
    balcony = next(o for o in base.openings if o.kind is OpeningKind.BALCONY)
    en = " ".join(why_code_compliant_is_not_cat_safe(balcony, code=code_profile("england")))
    us = " ".join(why_code_compliant_is_not_cat_safe(balcony, code=code_profile("us-ibc")))
    assert "Approved Document K" in en and "IBC" not in en
    assert "IBC" in us and "Approved Document" not in us


def test_generic_explanations_cite_no_clause() -> None:
    reasons = " ".join(why_code_compliant_is_not_cat_safe(_balcony()))
    assert UNCITED in reasons
    for code in ("IBC", "Approved Document", "NCC", "BBR", "NBC"):
        assert code not in reasons


def test_explanations_read_in_the_profile_units() -> None:
    # IBC 1015.3: 42 in; a US reader reads inches (the profile's imperial units)
    us = " ".join(why_code_compliant_is_not_cat_safe(_balcony(), code=code_profile("us-ibc")))
    assert "42.0 in (IBC §1015.3)" in us
    en = " ".join(why_code_compliant_is_not_cat_safe(_balcony(), code=code_profile("england")))
    assert "1100 mm (Approved Document K, Diagram 3.1)" in en


# --- check: an escape window's limiter against the minimum clear opening ------------------------


def test_check_locates_an_escape_limiter_below_the_minimum_clear_opening(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    base = sample_building("walkup")
    i = next(k for k, o in enumerate(base.openings) if o.escape_window)
    openings = list(base.openings)
    openings[i] = dataclasses.replace(openings[i], limiter_gap_mm=100.0)
    b = dataclasses.replace(base, openings=tuple(openings))
    # Approved Document B vol. 1 para 2.8: 450 mm wide at least
    warned = [w for w in check_warnings(_with_profile(b, "england"))
              if w.where == f"openings[{i}].limiter_gap_mm"]
    assert len(warned) == 1 and warned[0].is_warning
    assert "450 mm" in warned[0].message and "Approved Document B" in warned[0].message
    # IRC R310: 20 in (508 mm)
    us = [w for w in check_warnings(_with_profile(b, "us-ibc")) if "limiter" in w.where]
    assert len(us) == 1 and "508 mm" in us[0].message and "IRC" in us[0].message
    # a limiter wider than the escape opening's minimum is no problem (NBC 9.9.10.1: 380 mm)
    openings[i] = dataclasses.replace(openings[i], limiter_gap_mm=400.0)
    wide = dataclasses.replace(b, openings=tuple(openings))
    assert not [w for w in check_warnings(_with_profile(wide, "canada-nbc"))
                if "limiter" in w.where]
    # the command line lists it
    doc = json.loads(sample_path("walkup").read_text(encoding="utf-8"))
    doc["building"]["code_profile"] = "england"
    doc["openings"][i]["limiter_gap_mm"] = 100.0
    path = tmp_path / "escape.json"
    path.write_text(json.dumps(doc), encoding="utf-8")
    assert main(["check", str(path)]) == 0
    assert f"openings[{i}].limiter_gap_mm" in capsys.readouterr().out


def test_costs_say_when_the_catalogue_currency_is_not_the_profile_one(
    reports: dict[str, str],
) -> None:
    # the shipped catalogue prices in EUR (invented demo values); England pays in GBP (ISO 4217)
    assert "prices in GBP" in reports["england"] and "not converted" in reports["england"]
    assert "not converted" not in reports["generic"]  # generic: EUR, as the catalogue


def _rule_value(profile_id: str, rule_id: str) -> tuple[float | None, float | None, str]:
    r = next(x for x in code_profile(profile_id).rules if x.id == rule_id)
    return r.value_mm, r.value_m, r.text


def test_the_figures_the_first_checks_leave_out_match_the_research_notes() -> None:
    # NCC Vol. 2 Part 3.9.2: floor more than 4 m up -> no climbable elements 150-760 mm
    _, m, text = _rule_value("australia-ncc", "ncc_climb")
    assert m == 4.0 and "150 and 760 mm" in text
    # NCC openable windows, non-bedroom: opening < 865 mm above the floor (MEM in the notes)
    assert _rule_value("australia-ncc", "ncc_other_window")[0] == 865.0
    assert next(r for r in code_profile("australia-ncc").rules
                if r.id == "ncc_other_window").confidence == "from memory; verify"
    # NBC 9.8.8: residential windows need a guard unless the sill is more than 1070 mm up
    mm, _, text = _rule_value("canada-nbc", "nbc_windows")
    assert mm == 1070.0 and "1800 mm" in text
    # BBR 8:2321 (general advice): not climbable up to 0.8 m
    assert _rule_value("sweden-bbr", "bbr_not_climbable")[0] == 800.0
    # IRC R310: sill at most 44 in (1118 mm) above the floor
    _, _, text = _rule_value("us-ibc", "irc_r310_opening")
    assert "44 in (1118 mm)" in text and "5.7 ft²" in text
    # IBC 1015.8: 72 in (1829 mm) above grade
    assert "72 in (1829 mm)" in _rule_value("us-ibc", "ibc_window_sill")[2]
    # UK practice limits window restrictors to about 100 mm (common practice, no source)
    assert _rule_value("england", "en13126_restrictors")[0] == 100.0
    # date order of the place (common practice, no source)
    assert code_profile("australia-ncc").date_format == "dmy"
    assert code_profile("sweden-bbr").date_format == "iso"
