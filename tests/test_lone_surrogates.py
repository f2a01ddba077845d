"""Lone surrogates (``"\\ud800"`` in JSON) are not characters (Unicode 15, §3.9 D75: a lone
surrogate is ill-formed in UTF-16 and cannot be encoded in UTF-8), so the loader refuses them
at their place instead of letting check, assess, report and save crash on them later."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from petfall_audit._resources import sample_path
from petfall_audit.cli import main
from petfall_audit.errors import ValidationFailed
from petfall_audit.io.building_file import load_building, parse_building


def _doc() -> dict[str, object]:
    doc = json.loads(sample_path("walkup").read_text(encoding="utf-8"))
    assert isinstance(doc, dict)
    return doc


def _write(tmp_path: Path, doc: dict[str, object]) -> Path:
    path = tmp_path / "b.json"
    path.write_text(json.dumps(doc, ensure_ascii=True), encoding="utf-8")  # keeps \ud800 escaped
    assert "\\ud800" in path.read_text(encoding="utf-8") or "\\udfff" in path.read_text("utf-8")
    return path


@pytest.mark.parametrize(("field", "where"), [
    (("building", "name"), "building.name"),
    (("openings", 2, "notes"), "openings[2].notes"),
    (("floors", 1, "label"), "floors[1].label"),
    (("openings", 0, "id"), "openings[0].id"),
])
def test_a_lone_surrogate_is_refused_with_its_place(
        tmp_path: Path, field: tuple[object, ...], where: str) -> None:
    doc = _doc()
    node: object = doc
    for part in field[:-1]:
        node = node[part]  # type: ignore[index]
    node[field[-1]] = "Flat \ud800 three"  # type: ignore[index]
    with pytest.raises(ValidationFailed) as err:
        load_building(_write(tmp_path, doc))
    places = [p.where for p in err.value.problems]
    assert where in places
    problem = next(p for p in err.value.problems if p.where == where)
    assert "surrogate" in problem.message and "character 6" in problem.message
    with pytest.raises(ValidationFailed):
        parse_building(doc)


def test_a_surrogate_in_a_field_name_is_refused(tmp_path: Path) -> None:
    doc = _doc()
    doc["building"]["no\udfffte"] = "x"  # type: ignore[index]
    with pytest.raises(ValidationFailed) as err:
        load_building(_write(tmp_path, doc))
    assert [p.where for p in err.value.problems] == ["building"]


@pytest.mark.parametrize("command", [["check"], ["assess", "--samples", "16"],
                                     ["report", "--samples", "16", "-o", "OUT"]])
def test_commands_refuse_it_without_a_traceback(
        tmp_path: Path, capsys: pytest.CaptureFixture[str], command: list[str]) -> None:
    doc = _doc()
    doc["building"]["name"] = "\ud800"  # type: ignore[index]
    path = _write(tmp_path, doc)
    argv = [command[0], str(path), *(str(tmp_path / "a.pdf") if c == "OUT" else c
                                     for c in command[1:])]
    assert main(argv) == 2
    err = capsys.readouterr().err
    assert "building.name" in err and "Traceback" not in err


@pytest.mark.parametrize("escape", ["\\uD800", "\\uDbFf", "\\udc00", "\\uDFFF"])
def test_an_escape_in_capitals_is_refused_too(tmp_path: Path, escape: str) -> None:
    # JSON escapes are case-blind (RFC 8259, §7): the loader's quick look at the text for
    # surrogate escapes must see every spelling
    name = '"Brackenhythe'
    text = json.dumps(_doc(), ensure_ascii=True).replace(name, f'"{escape}{name[1:]}', 1)
    assert escape in text
    path = tmp_path / "b.json"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(ValidationFailed) as err:
        load_building(path)
    assert any("surrogate" in p.message for p in err.value.problems)


def test_a_surrogate_pair_is_a_character_and_loads(tmp_path: Path) -> None:
    doc = _doc()
    doc["building"]["name"] = "Flat \U0001f408 three"  # type: ignore[index]
    path = tmp_path / "b.json"
    path.write_text(json.dumps(doc, ensure_ascii=True), encoding="utf-8")
    assert "\\ud83d\\udc08" in path.read_text(encoding="utf-8")
    assert load_building(path).info.name == "Flat \U0001f408 three"
