"""Fix tracking: recorded fixes and the plan's settings in the building file, fitted fixes as
barriers at the next audit, and the comparison and PDF naming the fitted fixes."""

from __future__ import annotations

import dataclasses
import json
import re
from pathlib import Path

import pytest

from petfall_audit.cli import main
from petfall_audit.compare import compare_buildings
from petfall_audit.errors import ValidationFailed
from petfall_audit.fix_tracking import apply_fitted, record_plan, set_fix_status
from petfall_audit.io.building_file import dumps_building, load_building, save_building
from petfall_audit.io.compare_export import comparison_to_dict
from petfall_audit.model import FixRecord, FixStatus
from petfall_audit.plan import make_plan, plan_from_settings, with_plan_settings
from petfall_audit.risk import assess
from tests.test_compare import SAMPLES, SEED, earlier_building

ROOT = Path(__file__).resolve().parents[1]


def _controls() -> dict[str, dict[str, object]]:
    doc = json.loads((ROOT / "resources" / "controls.json").read_text(encoding="utf-8"))
    return {c["id"]: c for c in doc["controls"]}


def test_fix_records_round_trip_and_absent_means_none(tmp_path: Path) -> None:
    b = earlier_building()
    assert '"fixes"' not in dumps_building(b)  # no records: the file reads as before
    b = set_fix_status(b, "B-2", "net_anchored_30", "approved", date="2025-06-01",
                       note="Owners' meeting")
    b = set_fix_status(b, "B-2", "net_anchored_30", FixStatus.FITTED, date="2025-07-15")
    b = set_fix_status(b, "W-1", "limiter_release_40", "declined", date="2025-06-01")
    path = tmp_path / "b.json"
    save_building(b, path)
    again = load_building(path)
    assert again.fixes == (
        FixRecord("B-2", "net_anchored_30", FixStatus.FITTED, "2025-07-15", "Owners' meeting"),
        FixRecord("W-1", "limiter_release_40", FixStatus.DECLINED, "2025-06-01", ""),
    )
    doc = json.loads(path.read_text(encoding="utf-8"))
    assert doc["fixes"][0] == {"opening": "B-2", "control": "net_anchored_30",
                               "status": "fitted", "date": "2025-07-15",
                               "note": "Owners' meeting"}


@pytest.mark.parametrize(("record", "place"), [
    ({"opening": "B-2", "control": "net_anchored_30", "status": "done"}, "fixes[0].status"),
    ({"opening": "B-2", "control": "net_anchored_30", "date": "2025-02-30"}, "fixes[0].date"),
    ({"opening": "", "control": "net_anchored_30"}, "fixes[0].opening"),
])
def test_a_bad_fix_record_is_reported_at_its_place(tmp_path: Path, record: dict[str, str],
                                                    place: str) -> None:
    doc = json.loads(dumps_building(earlier_building()))
    doc["fixes"] = [record]
    path = tmp_path / "bad.json"
    path.write_text(json.dumps(doc), encoding="utf-8")
    with pytest.raises(ValidationFailed) as err:
        load_building(path)
    assert place in [p.where for p in err.value.problems]


def test_a_version_1_file_still_loads_without_fixes(tmp_path: Path) -> None:
    doc = json.loads(dumps_building(earlier_building()))
    doc["version"] = 1
    for key in ("injury", "fixes"):
        doc.pop(key, None)
    doc["building"].pop("code_profile", None)
    path = tmp_path / "v1.json"
    path.write_text(json.dumps(doc), encoding="utf-8")
    b = load_building(path)
    assert b.fixes == () and len(b.openings) == 4


def test_saved_budget_and_settings_reproduce_the_same_plan(tmp_path: Path) -> None:
    b = with_plan_settings(earlier_building(), 900.0, currency="EUR", samples=300, seed=5)
    direct = make_plan(assess(b, samples=300, seed=5), 900.0)
    path = tmp_path / "planned.json"
    save_building(b, path)
    reopened = load_building(path)
    assert reopened.plan == b.plan
    again = plan_from_settings(reopened)
    assert again.actions == direct.actions and again.total_cost == direct.total_cost
    assert again.actions  # the budget buys something


def test_cli_plan_uses_the_saved_settings(tmp_path: Path, capsys: pytest.CaptureFixture[str]
                                          ) -> None:
    b = with_plan_settings(earlier_building(), 900.0, samples=300, seed=5)
    path = tmp_path / "planned.json"
    save_building(b, path)
    assert main(["plan", str(path), "--format", "json"]) == 0
    saved = json.loads(capsys.readouterr().out)
    assert main(["plan", str(path), "--format", "json", "--budget", "900", "--samples", "300",
                 "--seed", "5"]) == 0
    given = json.loads(capsys.readouterr().out)
    assert saved == given


def test_fitted_fixes_become_barriers_and_others_do_not() -> None:
    b = earlier_building()
    b = set_fix_status(b, "B-2", "net_anchored_30", "fitted", date="2025-07-15")
    b = set_fix_status(b, "B-4", "net_anchored_30", "declined")
    b = set_fix_status(b, "W-1", "limiter_release_40", "checked")
    b = set_fix_status(b, "W-9", "limiter_release_40", "fitted")  # no such opening
    b = set_fix_status(b, "W-3", "no_such_control", "fitted")
    after, skipped = apply_fitted(b)
    effects = {k: c["effect"] for k, c in _controls().items()}  # the shipped catalogue's
    assert after.opening("B-2").netting_mesh_mm == effects["net_anchored_30"]["netting_mesh_mm"]
    assert after.opening("W-1").limiter_gap_mm == effects["limiter_release_40"]["limiter_gap_mm"]
    assert after.opening("B-4") == b.opening("B-4") and after.opening("W-3") == b.opening("W-3")
    assert sorted(s.record.opening_id for s in skipped) == ["W-3", "W-9"]


def test_record_plan_adds_each_action_once() -> None:
    b = with_plan_settings(earlier_building(), 900.0, samples=300, seed=5)
    plan = plan_from_settings(b)
    once = record_plan(b, plan, date="2025-05-02")
    assert [(r.opening_id, r.control_id) for r in once.fixes] == [
        (a.opening_id, a.control_id) for a in plan.actions]
    assert all(r.status is FixStatus.RECOMMENDED for r in once.fixes)
    assert record_plan(once, plan) == once


def test_comparison_names_the_fitted_fix_and_what_it_removed(tmp_path: Path) -> None:
    earlier = earlier_building()
    recorded = set_fix_status(earlier, "B-2", "net_anchored_30", "fitted", date="2025-07-15")
    later, _ = apply_fitted(recorded)
    later = dataclasses.replace(later, info=dataclasses.replace(later.info,
                                                                audit_date="2026-05-04"))
    c = compare_buildings(earlier, later, samples=SAMPLES, seed=SEED)
    row = c.opening("B-2")
    assert row.fitted == ("net_anchored_30",) and row.change_names == ("netting_mesh_mm",)
    # the fitted net is the only change, so all the risk removed is the fix's
    assert c.removed_by_fixes == pytest.approx(c.risk_removed, rel=1e-9)
    doc = comparison_to_dict(c)
    assert doc["fixes_fitted"][0]["control"] == "net_anchored_30"
    assert doc["fixes_fitted"][0]["removed_at_opening"] == doc["openings"][0]["removed_by_fixes"]
    # and the PDF says so
    e_path, l_path, pdf = tmp_path / "e.json", tmp_path / "l.json", tmp_path / "a.pdf"
    save_building(earlier, e_path)
    save_building(later, l_path)
    assert main(["report", str(l_path), "--earlier", str(e_path), "-o", str(pdf),
                 "--samples", str(SAMPLES), "--seed", str(SEED)]) == 0
    from pypdf import PdfReader

    text = " ".join(" ".join(p.extract_text() or "" for p in PdfReader(pdf).pages).split())
    assert "Fixes fitted since" in text and "Anchored enclosure net, 30 mm mesh" in text


def test_cli_fixes_records_sets_lists_and_applies(tmp_path: Path,
                                                  capsys: pytest.CaptureFixture[str]) -> None:
    path, nxt = tmp_path / "2025.json", tmp_path / "2026.json"
    save_building(with_plan_settings(earlier_building(), 900.0, samples=300, seed=5), path)
    assert main(["fixes", str(path), "--record-plan", "--date", "2025-05-02"]) == 0
    recorded = load_building(path).fixes
    assert recorded and all(r.status is FixStatus.RECOMMENDED for r in recorded)
    assert main(["fixes", str(path), "--set", "B-2", "net_anchored_30", "fitted", "--date",
                 "2025-07-15", "--note", "Fitted by the caretaker"]) == 0
    b = load_building(path)
    assert FixRecord("B-2", "net_anchored_30", FixStatus.FITTED, "2025-07-15",
                     "Fitted by the caretaker") in b.fixes
    capsys.readouterr()
    assert main(["fixes", str(path)]) == 0
    assert "B-2  net_anchored_30  Fitted  2025-07-15" in capsys.readouterr().out
    assert main(["fixes", str(path), "--apply-fitted", "-o", str(nxt), "--date",
                 "2026-05-04"]) == 0
    started = load_building(nxt)
    assert started.opening("B-2").netting_mesh_mm == 30.0
    assert started.info.audit_date == "2026-05-04"
    assert load_building(path).opening("B-2").netting_mesh_mm is None  # FILE left as it was
    for bad in (["--set", "B-2", "net_anchored_30", "done"],
                ["--set", "Z-9", "net_anchored_30", "fitted"],
                ["--set", "B-2", "no_such", "fitted"],
                ["--apply-fitted"], ["--date", "2025-13-01"]):
        assert main(["fixes", str(path), *bad]) == 2, bad


def test_what_if_copy_has_the_risk_the_plan_promised() -> None:
    from petfall_audit.fix_tracking import apply_plan

    b = earlier_building()
    a = assess(b, samples=SAMPLES, seed=SEED)
    plan = make_plan(a, 3000.0)
    after, left = apply_plan(b, plan)
    assert after is not b and b == earlier_building()  # the real building is untouched
    # independent route: the copy assessed in full (physics and all) against the plan's
    # likelihood-only estimate; fixes that an opening's fields cannot show are added back
    full = float(sum(o.risk for o in assess(after, samples=SAMPLES, seed=SEED).openings))
    assert full == pytest.approx(plan.risk_after + sum(x.risk_removed for x in left),
                                 rel=1e-9)
    assert {x.opening_id for x in plan.actions} - {x.opening_id for x in left} <= {
        o.id for o, p in zip(after.openings, b.openings, strict=True) if o != p}


def test_cli_what_if_section_and_copy(tmp_path: Path, capsys: pytest.CaptureFixture[str]
                                      ) -> None:
    from pypdf import PdfReader

    path, after, pdf = tmp_path / "b.json", tmp_path / "after.json", tmp_path / "w.pdf"
    save_building(earlier_building(), path)
    before_text = path.read_text(encoding="utf-8")
    assert main(["plan", str(path), "--budget", "3000", "--write-after", str(after),
                 "--samples", str(SAMPLES), "--seed", str(SEED)]) == 0
    assert path.read_text(encoding="utf-8") == before_text
    # a small budget buys fixes that rely on people (keeping a window shut): they are named as
    # left out, the verb agreeing with their count ("1 fix that relies", "2 fixes that rely")
    assert main(["plan", str(path), "--budget", "200", "--write-after", str(tmp_path / "s.json"),
                 "--samples", str(SAMPLES), "--seed", str(SEED), "-o",
                 str(tmp_path / "p.json")]) == 0
    said = " ".join(capsys.readouterr().err.split())
    assert "left out" in said
    assert ("1 fix that relies on people or changes no field" in said
            or re.search(r"\d+ fixes that rely on people or change no field", said)), said
    assert load_building(after).opening("B-2").netting_mesh_mm is not None
    assert main(["report", str(path), "--budget", "3000", "--what-if", "-o", str(pdf),
                 "--samples", str(SAMPLES), "--seed", str(SEED)]) == 0
    text = " ".join(" ".join(p.extract_text() or "" for p in PdfReader(pdf).pages).split())
    assert "After the plan (what-if)" in text and "Openings the plan improves" in text
    assert main(["report", str(path), "--what-if", "-o", str(pdf)]) == 2


def test_cli_fixes_with_o_writes_there_and_leaves_file_as_it_is(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    path, out = tmp_path / "2025.json", tmp_path / "recorded.json"
    save_building(with_plan_settings(earlier_building(), 900.0, samples=300, seed=5), path)
    before = path.read_bytes()
    assert main(["fixes", str(path), "--record-plan", "-o", str(out)]) == 0
    said = capsys.readouterr().out
    assert path.read_bytes() == before  # FILE untouched
    recorded = load_building(out).fixes
    assert recorded and all(r.status is FixStatus.RECOMMENDED for r in recorded)
    n = len(recorded)
    assert f"{n} {'fix' if n == 1 else 'fixes'} of the plan recorded" in said  # not "fixs"
    assert f"wrote {out}" in said and "is left as it is" in said
    capsys.readouterr()
    assert main(["fixes", str(out), "--set", "B-2", "net_anchored_30", "fitted",
                 "-o", str(out.parent / "." / out.name)]) == 0
    assert "is left as it is" not in capsys.readouterr().out  # the same file, spelt otherwise
    assert any(r.status is FixStatus.FITTED for r in load_building(out).fixes)
    # -o with nothing to write is refused in words, FILE still untouched
    assert main(["fixes", str(path), "-o", str(tmp_path / "x.json")]) == 2
    assert "nothing to write" in capsys.readouterr().err
    assert not (tmp_path / "x.json").exists() and path.read_bytes() == before
