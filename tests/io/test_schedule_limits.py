"""Schedule import under hostile or unlucky spreadsheets: sizes limited before reading, formulas
without a saved value refused at their cell, the active visible sheet read and hidden ones named,
encodings detected honestly. XLSX facts from ECMA-376 Part 1 (SpreadsheetML: a formula cell
``<f>`` with an optional cached value ``<v>``; ``sheetState`` hidden/veryHidden; the
``activeTab`` of the workbook view); byte-order marks from the Unicode Standard, §23.8."""

from __future__ import annotations

import codecs
from pathlib import Path

import openpyxl
import pytest

from petfall_audit.errors import ScheduleImportError
from petfall_audit.io.schedule import read as schedule  # the reading step holds the limits
from petfall_audit.io.schedule import read_table

FIXTURES = Path(__file__).parents[1] / "fixtures" / "schedules"
HEAD = ["Opening ID", "Floor", "Facade", "Type", "Position along facade (m)", "Width (m)",
        "Rail or sill height (m)"]
ROW = ["N-1", 1, "north", "balcony", 1.0, 2.0, 0.85]


def _xlsx(path: Path, rows: list[list[object]]) -> Path:
    wb = openpyxl.Workbook()
    ws = wb.active
    for r in rows:
        ws.append(r)
    wb.save(path)
    return path


def test_a_formula_without_a_saved_value_is_refused_at_its_cell(tmp_path: Path) -> None:
    # openpyxl writes formulas without a cached value, as some generators do
    path = _xlsx(tmp_path / "f.xlsx", [HEAD, [*ROW[:6], "=0.85"]])
    with pytest.raises(ScheduleImportError, match=r"row 2, column G: =0\.85 has no saved value"):
        read_table(path)


def test_a_hidden_first_sheet_is_not_imported_and_is_named(tmp_path: Path) -> None:
    wb = openpyxl.Workbook()
    old = wb.active
    old.title = "Old survey"
    old.append(HEAD)
    old.append(["OLD-1", 9, "south", "balcony", 0, 1, 1.1])
    old.sheet_state = "hidden"
    current = wb.create_sheet("Schedule")
    current.append(HEAD)
    current.append(ROW)
    wb.active = 0  # the workbook says the hidden sheet is active
    wb.save(tmp_path / "h.xlsx")
    table = read_table(tmp_path / "h.xlsx")
    assert [cells[0] for _, cells in table.rows] == ["N-1"]
    assert any("hidden" in n and "Old survey" in n for n in table.notes)


def test_the_active_visible_sheet_is_read(tmp_path: Path) -> None:
    wb = openpyxl.Workbook()
    first = wb.active
    first.append(["Notes"])
    second = wb.create_sheet("Openings")
    second.append(HEAD)
    second.append(ROW)
    wb.active = 1
    wb.save(tmp_path / "a.xlsx")
    table = read_table(tmp_path / "a.xlsx")
    assert table.headers[0] == "Opening ID"
    assert any("'Openings' read" in n for n in table.notes)


def test_an_xlsx_whose_sheet_unpacks_too_large_is_refused_before_reading(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    path = _xlsx(tmp_path / "big.xlsx", [HEAD, [*ROW[:6], 0.85], ["x" * 30_000]])
    assert path.stat().st_size < 50_000  # compresses well: a small file on disk
    monkeypatch.setattr(schedule, "MAX_SHEET_XML_BYTES", 20_000)
    called: list[bool] = []
    monkeypatch.setattr(openpyxl, "load_workbook", lambda *a, **k: called.append(True))
    with pytest.raises(ScheduleImportError, match="unpack to"):
        read_table(path)
    assert not called, "the workbook was opened before its size was checked"


def test_a_huge_xlsx_cell_is_refused_at_its_place(tmp_path: Path) -> None:
    path = _xlsx(tmp_path / "cell.xlsx", [HEAD, [*ROW[:6], 0.85, "y" * 30_000]])
    with pytest.raises(ScheduleImportError, match="row 2, column H: the cell holds 30,000"):
        read_table(path)


def test_too_many_rows_are_refused(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(schedule, "MAX_ROWS", 50)
    rows = [HEAD, *([f"N-{i}", 1, "north", "balcony", 0, 1, 1] for i in range(60))]
    with pytest.raises(ScheduleImportError, match="more than 50 rows"):
        read_table(_xlsx(tmp_path / "rows.xlsx", rows))
    csv_path = tmp_path / "rows.csv"
    csv_path.write_text("\n".join(",".join(map(str, r)) for r in rows), encoding="utf-8")
    with pytest.raises(ScheduleImportError, match="more than 50 rows"):
        read_table(csv_path)


def test_a_csv_cell_over_the_csv_modules_limit_is_a_clear_error(tmp_path: Path) -> None:
    path = tmp_path / "big.csv"
    path.write_text(",".join(HEAD) + "\n" + 'N-1,1,north,balcony,1,2,"' + "z" * 200_000 + '"\n',
                    encoding="utf-8")
    with pytest.raises(ScheduleImportError, match="line 2: a cell is longer"):
        read_table(path)
    path.write_text(",".join(HEAD) + "\nN-1,1,north,balcony,1,2," + "z" * 30_000 + "\n",
                    encoding="utf-8")
    with pytest.raises(ScheduleImportError, match="row 2, column G"):
        read_table(path)


def _csv_text() -> str:
    return (FIXTURES / "metric.csv").read_text(encoding="utf-8")


@pytest.mark.parametrize("encoding", ["utf-16", "utf-16-le", "utf-16-be", "utf-8-sig", "utf-8"])
def test_utf16_and_utf8_files_read_the_same(tmp_path: Path, encoding: str) -> None:
    text = _csv_text().replace("corner flat", "Eckwohnung Süd — 2½ m")
    path = tmp_path / "s.csv"
    path.write_bytes(text.encode(encoding))
    table = read_table(path)
    expected = read_table(FIXTURES / "metric.csv")
    assert table.headers == expected.headers
    assert table.rows[0][1][-1] == "Eckwohnung Süd — 2½ m"


def test_one_bad_byte_in_utf8_is_refused_with_its_place_not_read_as_mojibake(
        tmp_path: Path) -> None:
    data = _csv_text().replace("corner flat", "Süd").encode("utf-8")
    lines = data.split(b"\n")
    lines[2] = lines[2] + b"\xff"
    path = tmp_path / "bad.csv"
    path.write_bytes(b"\n".join(lines))
    with pytest.raises(ScheduleImportError, match=r"line 3, byte \d+: byte 0xFF is not UTF-8"):
        read_table(path)


def test_a_windows_1252_file_is_read_and_said(tmp_path: Path) -> None:
    path = tmp_path / "w.csv"
    path.write_bytes(_csv_text().replace("corner flat", "Süd-Ecke").encode("cp1252"))
    table = read_table(path)
    assert table.rows[0][1][-1] == "Süd-Ecke"
    assert any("Windows-1252" in n for n in table.notes)


def test_utf32_bom_is_not_taken_for_utf16(tmp_path: Path) -> None:
    path = tmp_path / "u32.csv"
    path.write_bytes(codecs.BOM_UTF32_LE + _csv_text().encode("utf-32-le"))
    assert read_table(path).headers == read_table(FIXTURES / "metric.csv").headers
