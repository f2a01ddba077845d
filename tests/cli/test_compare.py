"""The ``petfall-audit compare`` command and the comparison exporters."""

from __future__ import annotations

import csv
import dataclasses
import io
import json
from pathlib import Path

import pytest

from petfall_audit.cautions import CAUTIONS
from petfall_audit.cli import main
from petfall_audit.io.building_file import save_building
from petfall_audit.io.compare_export import CSV_COLUMNS
from petfall_audit.risk import assess
from tests.test_compare import SAMPLES, SEED, earlier_building, later_building


def _run(capsys: pytest.CaptureFixture[str], *argv: str) -> tuple[int, str, str]:
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


@pytest.fixture()
def files(tmp_path: Path) -> tuple[str, str]:
    e, la = tmp_path / "2025.json", tmp_path / "2026.json"
    save_building(earlier_building(), e)
    save_building(later_building(), la)
    return str(e), str(la)


def _sampling() -> tuple[str, ...]:
    return ("--samples", str(SAMPLES), "--seed", str(SEED))


def test_json_has_the_keys_of_the_issue_and_exact_statuses(capsys, files) -> None:  # type: ignore[no-untyped-def]
    code, out, _ = _run(capsys, "compare", *files, "--format", "json", *_sampling())
    assert code == 0
    doc = json.loads(out)
    assert {"openings", "risk_before", "risk_after"} <= set(doc)
    by_id = {o["id"]: o for o in doc["openings"]}
    for o in doc["openings"]:
        assert {"id", "status", "changes", "risk_before", "risk_after", "band_before",
                "band_after"} <= set(o)
    assert {k: (v["status"], v["changes"]) for k, v in by_id.items()} == {
        "B-2": ("changed", ["netting_mesh_mm"]),
        "W-1": ("changed", ["floor_elevation_m"]),
        "B-4": ("unchanged", []),
        "W-5": ("added", []),
        "W-3": ("removed", []),
    }
    assert by_id["W-5"]["risk_before"] is None and by_id["W-5"]["band_before"] is None
    assert by_id["W-3"]["risk_after"] is None and by_id["W-3"]["band_after"] is None
    assert by_id["B-2"]["field_changes"] == [
        {"field": "netting_mesh_mm", "old": None, "new": 30.0, "unit": "mm"}]
    # the totals are the sums of the two audits' own risk scores (to 4 significant digits)
    before = sum(o.risk for o in assess(earlier_building(), samples=SAMPLES, seed=SEED).openings)
    after = sum(o.risk for o in assess(later_building(), samples=SAMPLES, seed=SEED).openings)
    assert doc["risk_before"] == pytest.approx(before, rel=1e-3)
    assert doc["risk_after"] == pytest.approx(after, rel=1e-3)
    assert doc["samples"] == SAMPLES and doc["seed"] == SEED
    assert doc["cautions"] == list(CAUTIONS)


def test_a_file_compared_with_itself_reports_zero(capsys, files) -> None:  # type: ignore[no-untyped-def]
    code, out, _ = _run(capsys, "compare", files[0], files[0], "--format", "json", *_sampling())
    doc = json.loads(out)
    assert code == 0
    assert {o["status"] for o in doc["openings"]} == {"unchanged"}
    assert doc["risk_before"] == doc["risk_after"] and doc["risk_removed"] == 0


def test_table_lists_the_changes_worst_first_and_the_cautions(capsys, files) -> None:  # type: ignore[no-untyped-def]
    code, out, _ = _run(capsys, "compare", *files, *_sampling())
    assert code == 0
    assert "Netting mesh: no net → 30 mm" in out
    assert "Floor level above datum: 3.0 m → 3.4 m" in out
    assert "Indicative model only" in out
    # the added window raises the risk most, so it comes first among the rows
    rows = [line.split()[0] for line in out.splitlines() if line[:2] in ("B-", "W-")]
    assert rows[0] == "W-5" and "B-4" not in rows


def test_csv_is_spreadsheet_safe_and_has_its_columns(capsys, tmp_path) -> None:  # type: ignore[no-untyped-def]
    e = earlier_building()
    hostile = dataclasses.replace(e, openings=tuple(
        dataclasses.replace(o, id="=HYPERLINK(1)") if o.id == "B-4" else o for o in e.openings))
    a, b = tmp_path / "a.json", tmp_path / "b.json"
    save_building(e, a)
    save_building(hostile, b)
    out_path = tmp_path / "cmp.csv"
    code, _, _ = _run(capsys, "compare", str(a), str(b), "--format", "csv", "-o", str(out_path),
                      *_sampling())
    assert code == 0
    text = out_path.read_text(encoding="utf-8")
    rows = list(csv.reader(io.StringIO("\n".join(
        line for line in text.splitlines() if not line.startswith("#")))))
    assert tuple(rows[0]) == CSV_COLUMNS
    ids = [r[0] for r in rows[1:]]
    assert "'=HYPERLINK(1)" in ids and "=HYPERLINK(1)" not in ids


def test_rename_pairs_openings_and_a_bad_pair_is_refused(capsys, tmp_path, files) -> None:  # type: ignore[no-untyped-def]
    later = later_building()
    renamed = dataclasses.replace(later, openings=tuple(
        dataclasses.replace(o, id="B-4a") if o.id == "B-4" else o for o in later.openings))
    path = tmp_path / "renamed.json"
    save_building(renamed, path)
    code, out, _ = _run(capsys, "compare", files[0], str(path), "--rename", "B-4=B-4a",
                        "--format", "json", *_sampling())
    assert code == 0
    row = next(o for o in json.loads(out)["openings"] if o["id"] == "B-4a")
    assert (row["status"], row["earlier_id"]) == ("unchanged", "B-4")
    code, _, err = _run(capsys, "compare", files[0], str(path), "--rename", "B-4", *_sampling())
    assert code == 2 and "EARLIER_ID=LATER_ID" in err
    code, _, err = _run(capsys, "compare", files[0], str(path), "--rename", "Z=B-4a",
                        *_sampling())
    assert code == 2 and "no earlier opening called Z" in err


def test_a_bad_file_is_refused_with_exit_2(capsys, tmp_path, files) -> None:  # type: ignore[no-untyped-def]
    bad = tmp_path / "bad.json"
    bad.write_text("{}", encoding="utf-8")
    code, _, err = _run(capsys, "compare", files[0], str(bad))
    assert code == 2 and err


def _pdf_text(path: Path) -> str:
    from pypdf import PdfReader

    return "\n".join(p.extract_text() or "" for p in PdfReader(path).pages)


def test_pdf_section_shows_the_numbers_of_the_json(capsys, tmp_path, files) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.present import fmt_risk

    code, out, _ = _run(capsys, "compare", *files, "--format", "json", *_sampling())
    doc = json.loads(out)
    pdf = tmp_path / "audit.pdf"
    code, _, err = _run(capsys, "report", files[1], "--earlier", files[0], "-o", str(pdf),
                        *_sampling())
    assert code == 0, err
    text = " ".join(_pdf_text(pdf).split())
    assert "Since the earlier audit" in text
    for title in ("Openings that got worse", "Openings that got better", "New openings",
                  "Removed openings"):
        assert title in text
    assert f"{fmt_risk(doc['risk_before'])} before, {fmt_risk(doc['risk_after'])} after" in text
    by_id = {o["id"]: o for o in doc["openings"]}
    for oid in ("B-2", "W-1"):
        o = by_id[oid]
        assert f"{fmt_risk(o['risk_before'])} {fmt_risk(o['risk_after'])}" in text
    assert fmt_risk(by_id["W-5"]["risk_after"]) in text
    assert fmt_risk(by_id["W-3"]["risk_before"]) in text
    assert "Netting mesh: no net → 30 mm" in text
    assert "different buildings" not in err and "other way round" not in err
    # the two files swapped: the PDF asks, and so does the terminal, where it is not missed
    code, _, err = _run(capsys, "report", files[0], "--earlier", files[1], "-o", str(pdf),
                        *_sampling())
    assert code == 0
    assert f"{files[1]}: The earlier audit is dated 2026-05-04" in " ".join(err.split())
    assert "other way round" in " ".join(_pdf_text(pdf).split())


def test_pdf_without_an_earlier_audit_has_no_such_section(capsys, tmp_path, files) -> None:  # type: ignore[no-untyped-def]
    pdf = tmp_path / "audit.pdf"
    code, _, _ = _run(capsys, "report", files[1], "-o", str(pdf), *_sampling())
    assert code == 0
    assert "Since the earlier audit" not in _pdf_text(pdf)
    code, _, err = _run(capsys, "report", files[1], "-o", str(pdf), "--rename", "a=b")
    assert code == 2 and "--earlier" in err


def test_two_different_buildings_are_named_as_such_in_every_format(capsys, tmp_path, files) -> None:  # type: ignore[no-untyped-def]
    other = dataclasses.replace(later_building(), openings=tuple(
        dataclasses.replace(o, id=f"Z{i}") for i, o in enumerate(later_building().openings)))
    path = tmp_path / "other.json"
    save_building(other, path)
    code, out, _ = _run(capsys, "compare", files[0], str(path), "--format", "json", *_sampling())
    assert code == 0 and json.loads(out)["doubts"] == ["no_common_openings"]
    code, out, _ = _run(capsys, "compare", files[0], str(path), *_sampling())
    assert code == 0 and "two different buildings" in " ".join(out.split())
    code, out, _ = _run(capsys, "compare", files[0], str(path), "--format", "csv", *_sampling())
    comments = [line for line in out.splitlines() if line.startswith("#")]
    assert any("two different buildings" in line for line in comments)
    code, out, _ = _run(capsys, "compare", *files, "--format", "json", *_sampling())
    assert json.loads(out)["doubts"] == []


def test_renumbered_openings_are_suggested_with_a_rename(capsys, tmp_path, files) -> None:  # type: ignore[no-untyped-def]
    later = dataclasses.replace(earlier_building(), openings=tuple(
        dataclasses.replace(o, id="W 1") if o.id == "W-1" else o
        for o in earlier_building().openings))
    path = tmp_path / "renumbered.json"
    save_building(later, path)
    code, out, _ = _run(capsys, "compare", files[0], str(path), *_sampling())
    flat = " ".join(out.split())
    assert code == 0 and "1 opening looks renumbered" in flat and "W-1 as W 1" in flat
    assert "compare again with --rename 'W-1=W 1'" in flat  # quoted for the shell
    code, out, _ = _run(capsys, "compare", files[0], str(path), "--format", "json", *_sampling())
    assert json.loads(out)["renumbered"] == {"W-1": "W 1"}
    code, out, _ = _run(capsys, "compare", files[0], str(path), "--rename", "W-1=W 1",
                        "--format", "json", *_sampling())
    doc = json.loads(out)
    assert doc["renumbered"] == {} and doc["counts"]["unchanged"] == 4


def test_many_renumbered_openings_are_counted_not_all_spelt_out(tmp_path: Path) -> None:
    from petfall_audit.compare import compare_buildings
    from petfall_audit.io.compare_export import comparison_to_table
    from petfall_audit.model import Opening, OpeningKind
    from petfall_audit.present.comparison import RENUMBERED_NAMED

    base = earlier_building()
    many = tuple(Opening(f"R{i}", floor=1, facade="S", kind=OpeningKind.WINDOW_CASEMENT,
                         x_m=0.5 * i, width_m=0.4) for i in range(RENUMBERED_NAMED + 5))
    e = dataclasses.replace(base, openings=many)
    la = dataclasses.replace(base, openings=tuple(
        dataclasses.replace(o, id=f"N{i}") for i, o in enumerate(many)))
    c = compare_buildings(e, la, samples=64, seed=SEED)
    assert len(c.renumbered) == RENUMBERED_NAMED + 5
    text = " ".join(comparison_to_table(c).split())
    assert "and 5 more." in text and "--rename OLD=NEW for each" in text
    assert text.count("--rename") == 1
