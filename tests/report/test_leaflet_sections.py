"""The leaflet: issued on the audit date, sections chosen and edited (command line and data), the
profile's words; the audit PDF carries every opening's notes."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from pypdf import PdfReader

from petfall_audit._resources import sample_path
from petfall_audit.cli import main
from petfall_audit.code_profile import code_profile
from petfall_audit.report.leaflet_sections import (
    SECTION_KEYS,
    LeafletTextError,
    choose_sections,
    default_sections,
    parse_sections_text,
    sections_text,
)

FAST = ["--samples", "300", "--seed", "5"]


def _text(path: Path) -> str:
    return " ".join("\n".join(p.extract_text() or "" for p in PdfReader(path).pages).split())


def _walkup(tmp_path: Path, **building: object) -> tuple[Path, dict]:  # type: ignore[type-arg]
    doc = json.loads(sample_path("walkup").read_text(encoding="utf-8"))
    doc["building"].update(building)
    path = tmp_path / "walkup.json"
    path.write_text(json.dumps(doc), encoding="utf-8")
    return path, doc


def test_the_leaflet_is_issued_on_the_audit_date(tmp_path: Path) -> None:
    src, _ = _walkup(tmp_path, audit_date="2025-11-03", code_profile="england")
    leaflet = tmp_path / "leaflet.pdf"
    assert main(["report", str(src), "-o", str(tmp_path / "a.pdf"), "--leaflet", str(leaflet),
                 *FAST]) == 0
    # the audit's day, in the British day-month order of the profile (common practice)
    assert "Issued 3 November 2025." in _text(leaflet)


def test_the_leaflet_uses_the_profile_words(tmp_path: Path) -> None:
    src, _ = _walkup(tmp_path, code_profile="us-ibc")
    leaflet = tmp_path / "leaflet.pdf"
    assert main(["report", str(src), "-o", str(tmp_path / "a.pdf"), "--leaflet", str(leaflet),
                 *FAST]) == 0
    text = _text(leaflet)
    # US usage (common practice, no source): "stories", "apartment"
    assert "high stories" in text and "every apartment" in text
    assert "storeys" not in text and " flat " not in text
    sections = default_sections(code_profile("england"))
    british = " ".join(s.title + " " + " ".join(s.items) for s in sections)
    assert "storeys" in british and "every flat" in british


def test_leaflet_sections_can_be_left_out_from_the_command_line(tmp_path: Path) -> None:
    src, _ = _walkup(tmp_path)
    full, cut = tmp_path / "full.pdf", tmp_path / "cut.pdf"
    assert main(["report", str(src), "-o", str(tmp_path / "a.pdf"), "--budget", "3000",
                 "--leaflet", str(full), *FAST]) == 0
    assert main(["report", str(src), "-o", str(tmp_path / "a.pdf"), "--budget", "3000",
                 "--leaflet", str(cut), "--leaflet-omit", "checks,measures",
                 "--leaflet-omit", "why", *FAST]) == 0
    full_text, cut_text = _text(full), _text(cut)
    assert "What to check at home" in full_text and "plans these measures" in full_text
    assert "What to check at home" not in cut_text and "plans these measures" not in cut_text
    assert "Why cats fall" not in cut_text
    # the escape-window warning and the cautions stay, whatever is left out
    assert "Never block an escape window" in cut_text and "Indicative model only" in cut_text
    assert main(["report", str(src), "-o", str(tmp_path / "a.pdf"), "--leaflet",
                 str(tmp_path / "x.pdf"), "--leaflet-omit", "nonsense", *FAST]) == 2
    assert main(["report", str(src), "-o", str(tmp_path / "a.pdf"), "--leaflet-omit", "why",
                 *FAST]) == 2  # no --leaflet: refused, not ignored


def test_leaflet_text_round_trip_from_the_command_line(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    src, _ = _walkup(tmp_path, code_profile="england")
    text_file = tmp_path / "leaflet.txt"
    assert main(["leaflet-text", str(src), "-o", str(text_file)]) == 0
    text = text_file.read_text(encoding="utf-8")
    assert text.startswith("[why] Why cats fall, even from high storeys")
    edited = text.replace("[checks] What to check at home", "[checks] Before you open a window")
    edited = edited.replace("- Never leave a tilt-and-turn window",
                            "- Our volunteers fit limiters for free: ask us.\n"
                            "- Never leave a tilt-and-turn window")
    start = edited.index("[after_fall]")
    end = edited.index("[contact]")
    edited = edited[:start] + edited[end:]  # the charity drops the vet advice box
    text_file.write_text(edited, encoding="utf-8")
    leaflet = tmp_path / "leaflet.pdf"
    assert main(["report", str(src), "-o", str(tmp_path / "a.pdf"), "--leaflet", str(leaflet),
                 "--leaflet-text", str(text_file), *FAST]) == 0
    out = _text(leaflet)
    assert "Before you open a window" in out and "Our volunteers fit limiters" in out
    assert "If your cat falls" not in out
    bad = tmp_path / "bad.txt"
    bad.write_text("[nope] Title\nline\n", encoding="utf-8")
    capsys.readouterr()
    assert main(["report", str(src), "-o", str(tmp_path / "a.pdf"), "--leaflet", str(leaflet),
                 "--leaflet-text", str(bad), *FAST]) == 2
    assert "line 1" in capsys.readouterr().err


def test_sections_text_parses_back_to_the_same_sections() -> None:
    sections = default_sections(code_profile("australia-ncc"))
    assert parse_sections_text(sections_text(sections), sections) == sections
    assert tuple(s.key for s in sections) == SECTION_KEYS


def test_edited_text_is_bounded_and_errors_name_the_line() -> None:
    with pytest.raises(LeafletTextError, match="line 1"):
        parse_sections_text("stray text\n[why] Title\n")
    with pytest.raises(LeafletTextError, match="line 3: the section \\[why\\] appears twice"):
        parse_sections_text("[why] A\nx\n[why] B\n")
    with pytest.raises(LeafletTextError, match="longer than"):
        parse_sections_text("[why] A\n" + "x" * 30_000)
    with pytest.raises(ValueError, match="unknown leaflet section"):
        choose_sections(default_sections(), ["colour"])


def test_the_audit_carries_every_opening_notes(tmp_path: Path) -> None:
    src, doc = _walkup(tmp_path)
    doc["openings"][-1]["notes"] = "Sash cord frayed on the lowest-ranked window."
    src.write_text(json.dumps(doc), encoding="utf-8")
    pdf = tmp_path / "a.pdf"
    assert main(["report", str(src), "-o", str(pdf), "--top", "1", *FAST]) == 0
    text = _text(pdf)
    assert "Appendix: notes on the openings" in text
    assert "Sash cord frayed on the lowest-ranked window." in text
    with_notes = [o for o in doc["openings"] if o.get("notes", "").strip()]
    assert len(with_notes) > 1
    for o in with_notes:
        assert o["notes"].split("\n")[0].strip()[:30] in text, o["id"]


def test_a_profile_animal_welfare_rule_reaches_the_tenants() -> None:
    # SJVFS 2008:5 ch. 3 §8: a cat alone on a balcony more than 5 m up needs a net
    swedish = " ".join(i for s in default_sections(code_profile("sweden-bbr")) for i in s.items)
    assert "SJVFS 2008:5, ch. 3 §8" in swedish and "more than 5 m up" in swedish
    english = " ".join(i for s in default_sections(code_profile("england")) for i in s.items)
    assert "SJVFS" not in english
