"""A report of any file the loader accepts succeeds: the tallest building the limits allow, ids
and labels at their longest without a space, notes at their longest. Text limits are the
documented ones (docs/building-file.md) and the loader enforces them at their place."""

from __future__ import annotations

import copy
import dataclasses
import json
from pathlib import Path

import pytest
from pypdf import PdfReader
from reportlab.platypus import Paragraph

from petfall_audit._resources import sample_path
from petfall_audit.demo import sample_building
from petfall_audit.editing.fields import INFO_FIELDS, OPENING_FIELDS, parse_value
from petfall_audit.errors import ValidationFailed
from petfall_audit.io._schema import LIMITS
from petfall_audit.io.building_file import load_building, parse_building, save_building
from petfall_audit.model import Building, Floor
from petfall_audit.plan import make_plan
from petfall_audit.report import write_audit, write_leaflet
from petfall_audit.report.sections import _CHUNK_CHARS, _long_text
from petfall_audit.report.styles import audit_styles
from petfall_audit.risk import assess

SAMPLES = 16


def _report(b: Building, tmp_path: Path) -> PdfReader:
    path = tmp_path / "b.json"
    save_building(b, path)
    b = load_building(path)  # the loader accepts it: the report must succeed
    a = assess(b, samples=SAMPLES, seed=1)
    plan = make_plan(a, 5000)
    write_audit(a, plan, tmp_path / "a.pdf", top_n=len(b.openings))
    write_leaflet(a, plan, tmp_path / "l.pdf")
    return PdfReader(tmp_path / "a.pdf")


def test_the_tallest_building_allowed_prints_its_floor_chart_over_several_pages(
        tmp_path: Path) -> None:
    b = sample_building("walkup")
    top_given = max(f.level for f in b.floors)
    top_elevation_m = max(f.elevation_m for f in b.floors)
    floors = (*b.floors, *(Floor(i, f"Level {i}", top_elevation_m + 3.0 * (i - top_given))
                           for i in range(top_given + 1, LIMITS.level_max + 1)))
    top = LIMITS.level_max
    ops = list(b.openings)
    ops[0] = dataclasses.replace(ops[0], floor=top)
    b = dataclasses.replace(b, floors=floors, openings=tuple(ops))
    reader = _report(b, tmp_path)
    titles = [p.extract_text() for p in reader.pages]
    assert sum("Floor comparison (" in t for t in titles) >= 2


def test_longest_words_and_texts_print(tmp_path: Path) -> None:
    b = sample_building("walkup")
    n, L = LIMITS.name_max_chars, LIMITS
    info = dataclasses.replace(b.info, name="N" * n, auditor="U" * n,
                               address="A" * L.address_max_chars,
                               notes=("a very long note " * 2000)[: L.notes_max_chars])
    floors = tuple(dataclasses.replace(f, label="F" * n) for f in b.floors)
    facades = tuple(dataclasses.replace(f, label="G" * n) for f in b.facades)
    surfaces = tuple(dataclasses.replace(s, label="S" * n) for s in b.surfaces)
    ops = tuple(dataclasses.replace(o, id=f"{i:03d}" + "I" * (L.id_max_chars - 3),
                                    notes="W" * L.notes_max_chars)
                for i, o in enumerate(b.openings))
    b = dataclasses.replace(b, info=info, floors=floors, facades=facades, surfaces=surfaces,
                            openings=ops)
    reader = _report(b, tmp_path)
    assert len(reader.pages) > 10


def test_long_notes_are_laid_out_in_small_paragraphs() -> None:
    """reportlab re-wraps what is left of a paragraph at every page split, so one paragraph of
    n characters costs about n²; pieces of bounded size keep the layout linear."""
    st = audit_styles()
    text = ("word " * 4000) + "\n" + "x" * 20_000
    parts = _long_text(text, st.body)
    assert all(isinstance(p, Paragraph) for p in parts)
    lengths = [len(p.getPlainText()) for p in parts]  # type: ignore[attr-defined]
    assert max(lengths) <= _CHUNK_CHARS
    assert sum(lengths) >= len(text) - 4000 - 2  # only the spaces at the cuts are dropped


def _doc() -> dict[str, object]:
    doc = json.loads(sample_path("walkup").read_text(encoding="utf-8"))
    assert isinstance(doc, dict)
    return doc


@pytest.mark.parametrize(("path", "value", "message"), [
    (("building", "name"), "x" * (LIMITS.name_max_chars + 1), "at most 200 characters"),
    (("building", "address"), "x" * (LIMITS.address_max_chars + 1), "at most 500 characters"),
    (("building", "notes"), "x" * (LIMITS.notes_max_chars + 1), "at most 20000 characters"),
    (("floors", 1, "label"), "x" * 201, "at most 200 characters"),
    (("facades", 0, "label"), "x" * 201, "at most 200 characters"),
    (("openings", 2, "notes"), "x" * 20_001, "at most 20000 characters"),
    (("openings", 2, "photos"), [f"p{i}.png" for i in range(21)], "at most 20 items"),
    (("openings", 2, "facade"), "x" * 101, "at most 100 characters"),
])
def test_the_loader_enforces_the_text_limits_at_their_place(
        path: tuple[object, ...], value: object, message: str) -> None:
    doc = copy.deepcopy(_doc())
    node: object = doc
    for part in path[:-1]:
        node = node[part]  # type: ignore[index]
    node[path[-1]] = value  # type: ignore[index]
    with pytest.raises(ValidationFailed) as err:
        parse_building(doc)
    where = "".join(f"[{p}]" if isinstance(p, int) else f".{p}" for p in path).lstrip(".")
    hits = [p for p in err.value.problems if p.where == where]
    assert hits and message in hits[0].message
    assert len(hits[0].message) < 200, "the message does not echo the value"


def test_the_editor_refuses_text_longer_than_the_loader_accepts() -> None:
    notes = next(f for f in OPENING_FIELDS if f.name == "notes")
    name = next(f for f in INFO_FIELDS if f.name == "name")
    ident = next(f for f in OPENING_FIELDS if f.name == "id")
    assert parse_value(notes, "n" * LIMITS.notes_max_chars) == "n" * LIMITS.notes_max_chars
    for spec, limit in ((notes, LIMITS.notes_max_chars), (name, LIMITS.name_max_chars),
                        (ident, LIMITS.id_max_chars)):
        with pytest.raises(ValueError, match="at most"):
            parse_value(spec, "n" * (limit + 1))
