"""`petfall-audit check`: 0 for a good file, 2 and located problems for a broken one."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from petfall_audit._resources import sample_names, sample_path
from petfall_audit.cli import main


@pytest.mark.parametrize("name", sample_names())
def test_check_accepts_the_samples(name: str, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["check", str(sample_path(name))]) == 0
    out, err = capsys.readouterr()
    assert "valid" in out and err == ""


def test_check_lists_located_problems_and_exits_2(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    doc = json.loads(sample_path("walkup").read_text(encoding="utf-8"))
    doc["openings"][12]["floor"] = 40
    doc["building"]["site_altitude_m"] = "abc"
    doc["facades"][0]["colour"] = "red"
    path = tmp_path / "broken.json"
    path.write_text(json.dumps(doc), encoding="utf-8")
    assert main(["check", str(path)]) == 2
    out, err = capsys.readouterr()
    lines = err.splitlines()
    assert out == ""
    assert lines[0] == f"{path}: 3 problems:"
    assert [line.strip() for line in lines[1:]] == [
        "building.site_altitude_m: expected a number, got 'abc'",
        "facades[0].colour: unknown field 'colour'",
        "openings[12].floor: level 40 does not exist",
    ]
    assert "Traceback" not in err


@pytest.mark.parametrize(
    ("content", "expected"),
    [
        ('{"format": "petfall-audit-building", "version": 9}', "newer version (9)"),
        ("{\n  oops\n}", "line 2, column 3: not valid JSON"),
        ("", "the file is empty"),
    ],
)
def test_check_refuses_unreadable_files(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], content: str, expected: str
) -> None:
    path = tmp_path / "b.json"
    path.write_text(content, encoding="utf-8")
    assert main(["check", str(path)]) == 2
    err = capsys.readouterr().err
    assert expected in err and "Traceback" not in err


def test_check_on_a_missing_file_exits_2(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    assert main(["check", str(tmp_path / "none.json")]) == 2
    assert "cannot read the file" in capsys.readouterr().err


def test_check_counts_read_as_english(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    doc = {"format": "petfall-audit-building", "version": 1, "building": {"name": "One Room"},
           "floors": [{"level": 0, "label": "G", "elevation_m": 0.0}],
           "facades": [{"id": "front", "length_m": 5.0}]}
    path = tmp_path / "one.json"
    path.write_text(json.dumps(doc), "utf-8")
    assert main(["check", str(path)]) == 0
    assert "1 floor, 1 facade, 0 surfaces, 0 openings" in capsys.readouterr().out


def test_the_app_without_a_screen_says_so_instead_of_crashing(
    monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]
) -> None:
    import sys

    from petfall_audit.cli import main

    for name in ("DISPLAY", "WAYLAND_DISPLAY", "QT_QPA_PLATFORM"):
        monkeypatch.delenv(name, raising=False)
    monkeypatch.setattr(sys, "platform", "linux")
    assert main([]) == 1
    assert "no screen" in capsys.readouterr().err


def test_check_names_photos_that_are_not_in_the_folder(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    doc = json.loads(sample_path("walkup").read_text(encoding="utf-8"))
    (tmp_path / "photos").mkdir()
    (tmp_path / "photos" / "here.png").write_bytes(b"\x89PNG\r\n\x1a\n")
    doc["openings"][2]["photos"] = ["photos/here.png", "photos/gone.jpg"]
    path = tmp_path / "walkup.json"
    path.write_text(json.dumps(doc), "utf-8")
    assert main(["check", str(path)]) == 0  # a missing photo is a warning, not an error
    out = capsys.readouterr().out
    opening = doc["openings"][2]["id"]
    assert f"openings[2].photos[1]: {opening!r}: photo 'photos/gone.jpg' is not in" in out
    assert "here.png" not in out
