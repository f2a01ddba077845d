"""``petfall-audit report``: PDF audit, leaflet and CSV/JSON exports from the command line."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from pypdf import PdfReader

from petfall_audit._resources import sample_path
from petfall_audit.cli import main

FAST = ["--samples", "300", "--seed", "5"]


def _text(path: Path) -> str:
    return "\n".join(p.extract_text() or "" for p in PdfReader(path).pages)


def test_report_pdf_and_leaflet(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    out, leaflet = tmp_path / "audit.pdf", tmp_path / "leaflet.pdf"
    code = main(["report", str(sample_path("walkup")), "-o", str(out), "--budget", "2500",
                 "--leaflet", str(leaflet), "--contact", "Cat Aid <East> & Co | 0123 456",
                 "--top", "2", *FAST])
    assert code == 0, capsys.readouterr().err
    printed = capsys.readouterr().out
    assert str(out) in printed and str(leaflet) in printed
    text = _text(out)
    assert "Fix plan" in text and "2,500 EUR" in text
    assert text.count("Opening #") == 2  # --top 2 detail pages
    assert "Cat Aid <East> & Co" in text  # issuer on the cover
    assert "Cat Aid <East> & Co" in _text(leaflet) and "0123 456" in _text(leaflet)


def test_report_json_matches_assess_numbers(tmp_path: Path) -> None:
    out = tmp_path / "r.json"
    assert main(["report", str(sample_path("walkup")), "-o", str(out), "--budget", "1000",
                 *FAST]) == 0
    doc = json.loads(out.read_text("utf-8"))
    assert doc["results"]["seed"] == 5 and doc["results"]["samples"] == 300
    assert doc["plan"] is not None and doc["caution"]


def test_report_csv_without_budget_writes_no_plan(tmp_path: Path) -> None:
    out = tmp_path / "r.csv"
    assert main(["report", str(sample_path("walkup")), "-o", str(out), "--format", "csv",
                 *FAST]) == 0
    assert out.exists() and not (tmp_path / "r-plan.csv").exists()
    assert out.read_text("utf-8").startswith("# ")  # cautions first


def test_report_bad_input_exit_2(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    bad = tmp_path / "bad.json"
    bad.write_text("{not json", "utf-8")
    assert main(["report", str(bad), "-o", str(tmp_path / "a.pdf")]) == 2
    assert "Traceback" not in capsys.readouterr().err
    assert main(["report", str(sample_path("walkup")), "-o", str(tmp_path / "a.pdf"),
                 "--samples", "0"]) == 2
    assert main(["report", str(sample_path("walkup")), "-o", str(tmp_path / "a.pdf"),
                 "--format", "xml"]) == 2
    assert not (tmp_path / "a.pdf").exists()


def test_leaflet_to_a_missing_folder_is_refused_before_the_audit_is_written(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    out = tmp_path / "audit.pdf"
    code = main(["report", str(sample_path("walkup")), "-o", str(out),
                 "--leaflet", str(tmp_path / "missing" / "leaflet.pdf"), *FAST])
    assert code == 2
    assert not out.exists()  # nothing half-done: the audit is not written either
    err = capsys.readouterr().err
    assert "leaflet.pdf" in err and ".tmp" not in err


def test_report_of_a_building_without_openings_says_so(tmp_path: Path) -> None:
    from petfall_audit.io.building_file import save_building
    from petfall_audit.model import Building, BuildingInfo, Facade, Floor

    path = tmp_path / "bare.json"
    save_building(Building(info=BuildingInfo(name="Bare Hall"), floors=(Floor(0, "G", 0.0),),
                           facades=(Facade("south", 10.0),)), path)
    out = tmp_path / "bare.pdf"
    assert main(["report", str(path), "-o", str(out), "--budget", "100", *FAST]) == 0
    text = _text(out)
    assert "No openings are recorded" in text
    assert "()" not in text  # the scope once listed the opening kinds as "()"
