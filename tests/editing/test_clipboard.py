"""Rows as tab-separated text to and from a spreadsheet (no Qt), and the paste command."""

from __future__ import annotations

import dataclasses

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from petfall_audit.demo import sample_building
from petfall_audit.editing.clipboard import MAX_PASTE_CHARS, parse_tsv, rows_to_tsv
from petfall_audit.editing.commands import AddFloors, EditRefused, PasteOpenings
from petfall_audit.editing.document import Document
from petfall_audit.editing.fields import OPENING_FIELDS
from petfall_audit.editing.query import next_floors

FIELDS = tuple(s for s in OPENING_FIELDS if s.name != "notes")


def test_copied_rows_read_back_the_same_in_both_unit_systems() -> None:
    openings = sample_building("block").openings
    for units in ("metric", "imperial"):
        rows, problems = parse_tsv(rows_to_tsv(openings, FIELDS, units), FIELDS, units)
        assert problems == []
        for row, o in zip(rows, openings, strict=True):
            for spec in FIELDS:
                want = getattr(o, spec.name)
                got = row.values[spec.name]
                # printed lengths keep 1 mm (metric) or 1/100 in: compare at that precision
                if isinstance(want, float):
                    assert got == pytest.approx(want, abs=2e-3 if spec.kind != "gap" else 0.5)
                else:
                    assert got == want


def test_text_a_spreadsheet_would_run_as_a_formula_is_quoted_and_read_back() -> None:
    o = dataclasses.replace(sample_building("walkup").openings[0], id="=HYPERLINK(1)")
    text = rows_to_tsv([o], FIELDS)
    assert "\t'=HYPERLINK(1)" in "\t" + text.splitlines()[1]  # OWASP CSV injection advice
    rows, _ = parse_tsv(text, FIELDS)
    assert rows[0].values["id"] == "=HYPERLINK(1)"


def test_columns_in_any_order_by_header_and_problems_by_line() -> None:
    rows, problems = parse_tsv("Width\tId\n1.2 m\tA\n\nabc\tB\n", FIELDS)
    assert [r.values.get("id") for r in rows] == ["A", "B"]
    assert rows[0].values["width_m"] == pytest.approx(1.2)
    assert [p.where for p in problems] == ["line 4, Width"]
    # no header: the table's column order
    rows, problems = parse_tsv("X1\t2\tstreet\n", FIELDS)
    assert problems == [] and rows[0].values == {"id": "X1", "floor": 2, "facade": "street"}


def test_a_huge_paste_is_refused_before_it_is_read() -> None:
    rows, problems = parse_tsv("x" * (MAX_PASTE_CHARS + 1), FIELDS)
    assert rows == [] and "paste fewer rows" in problems[0].message


@settings(max_examples=50, deadline=None)
@given(st.text(max_size=300))
def test_any_text_is_read_or_refused_without_a_traceback(text: str) -> None:
    rows, problems = parse_tsv(text, FIELDS)
    assert all(p.where.startswith(("line ", "clipboard")) for p in problems)


def test_paste_updates_known_ids_and_adds_new_ones_in_one_step() -> None:
    b = sample_building("walkup")
    doc = Document(b)
    first = b.openings[0]
    new = {"id": "N1", "floor": first.floor, "facade": first.facade, "kind": "balcony",
           "x_m": 15.0, "width_m": 1.0, "projection_m": 1.0}
    cmd = PasteOpenings([{"id": first.id, "width_m": 1.3}, new])
    cmd.do(doc)
    assert doc.building.opening(first.id).width_m == 1.3
    assert doc.building.opening("N1").x_m == 15.0
    assert cmd.updated == (first.id,) and cmd.added == ("N1",)
    cmd.undo(doc)
    assert doc.building is b
    with pytest.raises(EditRefused, match="needs floor"):
        PasteOpenings([{"id": "N2"}]).do(doc)


def test_several_floors_are_added_one_storey_apart() -> None:
    b = sample_building("walkup")
    doc = Document(b)
    floors = next_floors(b, 3)
    AddFloors(floors).do(doc)
    tops = doc.building.floors[-4:]
    steps = {round(u.elevation_m - d.elevation_m, 9) for d, u in zip(tops, tops[1:], strict=False)}
    storey = round(b.floors[-1].elevation_m - b.floors[-2].elevation_m, 9)
    assert steps == {storey}
