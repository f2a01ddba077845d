"""No command writes over one of its own input files (a results file written over the building
file would lose the audit), and batch never writes results into the folder of its buildings."""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

from petfall_audit._resources import sample_path
from petfall_audit.cli import main

FAST = ("--samples", "64")


@pytest.fixture()
def building(tmp_path: Path) -> Path:
    path = tmp_path / "court.json"
    shutil.copyfile(sample_path("walkup"), path)
    return path


@pytest.mark.parametrize("argv", [
    ("assess", "{f}", "-o", "{f}", *FAST),
    ("assess", "{f}", "-o", "{dir}/./court.json", *FAST),
    ("plan", "{f}", "--budget", "10", "-o", "{f}", *FAST),
    ("plan", "{f}", "--budget", "10", "--write-after", "{f}", *FAST),
    ("report", "{f}", "-o", "{f}", "--format", "json", *FAST),
    ("report", "{f}", "-o", "{dir}/a.pdf", "--leaflet", "{f}", *FAST),
    ("leaflet-text", "{f}", "-o", "{f}"),
    ("compare", "{f}", "{other}", "-o", "{f}", *FAST),
    ("fixes", "{f}", "--apply-fitted", "-o", "{f}"),
])
def test_an_output_over_an_input_is_refused_and_the_input_kept(
        argv: tuple[str, ...], building: Path, tmp_path: Path,
        capsys: pytest.CaptureFixture[str]) -> None:
    other = tmp_path / "other.json"
    shutil.copyfile(sample_path("walkup"), other)
    before = building.read_bytes()
    args = [a.format(f=building, dir=tmp_path, other=other) for a in argv]
    assert main(args) == 2
    assert "is the input file" in capsys.readouterr().err
    assert building.read_bytes() == before


def test_an_output_through_a_link_to_the_input_is_refused(
        building: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    link = tmp_path / "link.json"
    link.symlink_to(building)
    before = building.read_bytes()
    assert main(["assess", str(building), "-o", str(link), *FAST]) == 2
    assert building.read_bytes() == before


def test_fixes_may_still_write_the_updated_records_in_place(
        building: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["fixes", str(building), "--record-plan", "--budget", "500", "-o",
                 str(building), *FAST]) == 0
    assert '"fixes"' in building.read_text(encoding="utf-8")


def test_batch_refuses_to_write_results_among_its_buildings(
        building: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    before = building.read_bytes()
    assert main(["batch", str(building), "--out-dir", str(tmp_path), "--jobs", "1", *FAST]) == 2
    assert "a folder of their own" in capsys.readouterr().err
    assert building.read_bytes() == before and not (tmp_path / "summary.csv").exists()
    out = tmp_path / "results"
    assert main(["batch", str(building), "--out-dir", str(out), "--jobs", "1", *FAST]) == 0
    assert (out / "court.json").exists() and building.read_bytes() == before


@pytest.mark.parametrize("argv, what", [
    (("template", "{out}"), "a filled-in schedule"),
    (("leaflet-text", "{f}", "-o", "{out}"), "an edited leaflet text"),
    (("fixes", "{f}", "--apply-fitted", "-o", "{out}"), "the next audit as surveyed"),
])
def test_a_document_a_person_edits_is_replaced_only_with_force(
        argv: tuple[str, ...], what: str, building: Path, tmp_path: Path,
        capsys: pytest.CaptureFixture[str]) -> None:
    suffix = ".xlsx" if argv[0] == "template" else (".txt" if argv[0] == "leaflet-text"
                                                      else ".json")
    out = tmp_path / f"filled-in{suffix}"
    out.write_bytes(b"hours of survey work")
    args = [a.format(f=building, out=out) for a in argv]
    assert main(args) == 2
    err = " ".join(capsys.readouterr().err.split())
    assert f"already exists and may hold {what}" in err and "--force" in err
    assert out.read_bytes() == b"hours of survey work"
    assert main([*args, "--force"]) == 0
    assert out.read_bytes() != b"hours of survey work"


def test_batch_counts_a_building_given_twice_once(
        building: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # batch a.json ./a.json --portfolio-budget ... planned the estate with the building twice
    import json

    out = tmp_path / "results"
    again = str(building.parent / "." / building.name)
    assert main(["batch", str(building), again, "--out-dir", str(out), "--jobs", "1",
                 "--portfolio-budget", "500", *FAST]) == 0
    err = capsys.readouterr().err
    assert f"{again}: the same file as {building}, given again; assessed once" in err
    assert sorted(p.name for p in out.glob("*.json")) == ["court.json", "portfolio-plan.json"]
    doc = json.loads((out / "portfolio-plan.json").read_text(encoding="utf-8"))
    assert len(doc["portfolio"]["buildings"]) == 1
    # a copy is another building (an identical block): both count
    copy = tmp_path / "court-copy.json"
    shutil.copyfile(building, copy)
    assert main(["batch", str(building), str(copy), "--out-dir", str(tmp_path / "r2"),
                 "--jobs", "1", *FAST]) == 0
    assert (tmp_path / "r2" / "court-copy.json").exists()
