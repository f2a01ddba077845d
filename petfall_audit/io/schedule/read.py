"""Step 1 of a schedule import: read a CSV or XLSX file into a :class:`RawTable` of strings.

Sizes are limited before anything is read (:data:`MAX_FILE_BYTES`, :data:`MAX_SHEET_XML_BYTES`,
:data:`MAX_ROWS`, :data:`MAX_COLUMNS`, :data:`MAX_CELL_CHARS`); an unreadable, empty, too large
or refused file raises :class:`~petfall_audit.errors.ScheduleImportError` with its place.
"""

from __future__ import annotations

import csv
import dataclasses
import datetime as _dt
import io
import math
import re
import zipfile
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from petfall_audit.errors import ScheduleImportError
from petfall_audit.io.schedule.columns import column_letter
from petfall_audit.io.text_bytes import bom_encoding
from petfall_audit.present.numbers import plural

__all__ = [
    "RawTable",
    "read_table",
    "MAX_FILE_BYTES",
    "MAX_SHEET_XML_BYTES",
    "MAX_ROWS",
    "MAX_COLUMNS",
    "MAX_CELL_CHARS",
]



#: Largest schedule file read (bytes): 32 MiB, far above a tower's schedule.
MAX_FILE_BYTES = 32 * 2**20
#: Largest uncompressed size of the sheet read from an XLSX file and its shared strings
#: together (bytes), checked in the archive's directory before anything is unpacked.
MAX_SHEET_XML_BYTES = 128 * 2**20
#: Most rows read from a schedule (header included).
MAX_ROWS = 50_000
#: Most columns read from a schedule.
MAX_COLUMNS = 200
#: Longest cell read (characters): the longest text field of a building file.
MAX_CELL_CHARS = 20_000
_EXCEL_MAX_ROWS = 1_048_576  # rows of a sheet in the XLSX format (ECMA-376), the most scanned


@dataclass(frozen=True, slots=True)
class RawTable:
    """A schedule as strings: ``headers`` (row 1) and ``rows`` as (spreadsheet row, cells).

    Blank rows and comment rows (first cell starting with ``#``) are left out; the row numbers of
    the others stay as in the file. Cells are stripped; short rows are padded with ``""``.
    ``notes`` says in plain words what was read and what was left aside (the sheet used, hidden
    or other sheets, the encoding guessed).
    """

    headers: tuple[str, ...]
    rows: tuple[tuple[int, tuple[str, ...]], ...]
    source: str = ""
    notes: tuple[str, ...] = ()


def read_table(path: str | Path) -> RawTable:
    """Read a ``.csv`` (delimiter sniffed: comma, semicolon, tab or bar) or ``.xlsx`` schedule.

    XLSX: the active sheet if it is visible (else the first visible one), cell values (not
    formulas); a formula without a saved value is refused with its cell. CSV: UTF-8 or UTF-16
    (with a byte-order mark, or UTF-16 recognised by its zero bytes), UTF-8 without a mark, or
    Windows-1252 for a file with no UTF-8 in it at all; a file that is UTF-8 but for a few bad
    bytes is refused with the place of the first. Sizes are limited before reading
    (:data:`MAX_FILE_BYTES`, :data:`MAX_SHEET_XML_BYTES`, :data:`MAX_ROWS`,
    :data:`MAX_COLUMNS`, :data:`MAX_CELL_CHARS`). Raises :class:`ScheduleImportError` for an
    unreadable, empty, too large or refused file.
    """
    path = Path(path)
    suffix = path.suffix.lower()
    notes: list[str] = []
    if suffix in (".xlsx", ".xlsm"):
        grid = _read_xlsx(path, notes)
    elif suffix in (".csv", ".txt", ".tsv"):
        grid = _read_csv(path, notes)
    else:
        raise ScheduleImportError(f"{path.name}: not a schedule (expected .csv or .xlsx)")
    table = _table_from_grid(grid, source=path.name)
    return dataclasses.replace(table, notes=tuple(notes))


def _table_from_grid(grid: Iterable[Sequence[str]], *, source: str = "") -> RawTable:
    headers: tuple[str, ...] | None = None
    rows: list[tuple[int, tuple[str, ...]]] = []
    for number, raw in enumerate(grid, start=1):
        cells = tuple(c.strip() for c in raw)
        if headers is None:
            if number == 1 and not any(cells):
                raise ScheduleImportError(f"{source}: row 1 must hold the column headers")
            headers = cells
            continue
        if not any(cells) or cells[0].startswith("#"):
            continue
        width = max(len(headers), len(cells))
        rows.append((number, cells + ("",) * (width - len(cells))))
    if headers is None:
        raise ScheduleImportError(f"{source}: the file is empty")
    # trailing empty header cells (a sheet's used range is often wider than the table)
    last = max((i for i, h in enumerate(headers) if h), default=-1)
    headers = headers[: last + 1]
    return RawTable(headers=headers, rows=tuple(rows), source=source)


def _size_problem(name: str, row: int, cells: Sequence[str]) -> str | None:
    """Why row ``row`` (1-based) of the file ``name`` is too large, or ``None``."""
    if row > MAX_ROWS:
        return f"{name}: more than {MAX_ROWS:,} rows; split the schedule into several files"
    if len(cells) > MAX_COLUMNS:
        last = max((i for i, c in enumerate(cells) if c), default=-1)
        if last >= MAX_COLUMNS:
            return (f"{name}: row {row} has more than {MAX_COLUMNS} columns; a schedule "
                    f"holds at most {MAX_COLUMNS}")
    for i, cell in enumerate(cells):
        if len(cell) > MAX_CELL_CHARS:
            return (f"{name}: row {row}, column {column_letter(i)}: the cell holds "
                    f"{len(cell):,} characters, more than the {MAX_CELL_CHARS:,} allowed")
    return None


_UTF8_MULTIBYTE = re.compile(rb"[\xc2-\xf4][\x80-\xbf]+")


def _line_col(data: bytes, offset: int) -> str:
    line = data.count(b"\n", 0, offset) + 1
    col = offset - (data.rfind(b"\n", 0, offset) + 1) + 1
    return f"line {line}, byte {col}"


def _looks_utf16(data: bytes) -> str | None:
    """``utf-16-le`` or ``utf-16-be`` for text without a byte-order mark whose every other
    byte is mostly zero (ASCII text in UTF-16), else ``None``."""
    sample = data[:4096]
    if len(sample) < 4 or len(sample) % 2:
        return None
    even, odd = sample[0::2], sample[1::2]
    if odd.count(0) > 0.6 * len(odd) and even.count(0) < 0.1 * len(even):
        return "utf-16-le"
    if even.count(0) > 0.6 * len(even) and odd.count(0) < 0.1 * len(odd):
        return "utf-16-be"
    return None


def _decode(data: bytes, name: str = "the file", notes: list[str] | None = None) -> str:
    """The text of a CSV file, its encoding detected honestly (see :func:`read_table`)."""
    said = notes if notes is not None else []
    encoding = bom_encoding(data) or _looks_utf16(data) or ""
    if encoding:
        try:
            text = data.decode(encoding)
        except UnicodeDecodeError as exc:
            raise ScheduleImportError(
                f"{name}: not valid {encoding.upper().replace('-SIG', '')} text "
                f"(byte {exc.start + 1} cannot be read)") from None
        if not encoding.startswith("utf-8"):
            said.append(f"read as {encoding.upper().replace('-LE', '').replace('-BE', '')} text")
        return text
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError as exc:
        if _UTF8_MULTIBYTE.search(data):
            raise ScheduleImportError(
                f"{name}: {_line_col(data, exc.start)}: byte 0x{data[exc.start]:02X} is not "
                "UTF-8, though the rest of the file is; save the file again as UTF-8 (or "
                "correct that character)") from None
    try:
        text = data.decode("cp1252")
    except UnicodeDecodeError as exc:
        raise ScheduleImportError(
            f"{name}: {_line_col(data, exc.start)}: byte 0x{data[exc.start]:02X} is neither "
            "UTF-8 nor Windows-1252 text; save the file again as UTF-8") from None
    said.append("read as Windows-1252 text (not UTF-8)")
    return text


def _read_csv(path: Path, notes: list[str] | None = None) -> list[list[str]]:
    try:
        size = path.stat().st_size
        if size > MAX_FILE_BYTES:
            raise ScheduleImportError(
                f"{path.name}: the file is {size / 2**20:,.0f} MiB, more than the "
                f"{MAX_FILE_BYTES // 2**20} MiB a schedule may be")
        with path.open("rb") as fh:
            data = fh.read(MAX_FILE_BYTES + 1)
    except OSError as exc:
        raise ScheduleImportError(f"{path}: cannot read the file: {exc.strerror or exc}") from None
    if len(data) > MAX_FILE_BYTES:
        raise ScheduleImportError(
            f"{path.name}: more than the {MAX_FILE_BYTES // 2**20} MiB a schedule may be")
    text = _decode(data, path.name, notes)
    if not text.strip():
        raise ScheduleImportError(f"{path.name}: the file is empty")
    delimiter = _sniff_delimiter(text)
    reader = csv.reader(io.StringIO(text, newline=""), delimiter=delimiter, quotechar='"')
    grid: list[list[str]] = []
    try:
        for row in reader:
            problem = _size_problem(path.name, reader.line_num, row)
            if problem:
                raise ScheduleImportError(problem)
            grid.append(row)
    except csv.Error as exc:
        line = max(reader.line_num, 1)
        what = (f"a cell is longer than the {MAX_CELL_CHARS:,} characters allowed"
                if "field larger" in str(exc) else f"cannot be read as CSV ({exc})")
        raise ScheduleImportError(f"{path.name}: line {line}: {what}") from None
    return grid


def _sniff_delimiter(text: str) -> str:
    """The delimiter that splits the first lines into the same, largest number of fields."""
    sample = [line[:MAX_CELL_CHARS] for line in text.splitlines()[:30] if line.strip()]
    best, best_score = ",", (False, 1)
    for delimiter in (",", ";", "\t", "|"):
        try:
            counts = [len(r) for r in csv.reader(sample, delimiter=delimiter, quotechar='"')]
        except csv.Error:
            continue
        if not counts:
            continue
        score = (all(c == counts[0] for c in counts) and counts[0] > 1, counts[0])
        if score > best_score:
            best, best_score = delimiter, score
    return best


def _cell_text(value: Any) -> str:
    if value is None:
        return ""
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, float):
        if math.isfinite(value) and value.is_integer():
            return str(int(value))
        return repr(value)
    if isinstance(value, _dt.datetime | _dt.date | _dt.time):
        return value.isoformat()
    return str(value)


def _check_xlsx_sizes(path: Path) -> None:
    """Refuse an XLSX file whose sheets or shared strings would unpack to more than
    :data:`MAX_SHEET_XML_BYTES`, from the sizes in the archive's directory (which bound what
    unpacking produces), before anything is unpacked."""
    try:
        size = path.stat().st_size
        if size > MAX_FILE_BYTES:
            raise ScheduleImportError(
                f"{path.name}: the file is {size / 2**20:,.0f} MiB, more than the "
                f"{MAX_FILE_BYTES // 2**20} MiB a schedule may be")
        with zipfile.ZipFile(path) as archive:
            parts = archive.infolist()
    except (OSError, zipfile.BadZipFile) as exc:
        raise ScheduleImportError(f"{path.name}: cannot read the workbook ({exc})") from None
    largest = max((p.file_size for p in parts if p.filename.startswith("xl/worksheets/")),
                  default=0)
    shared = sum(p.file_size for p in parts if p.filename.startswith("xl/sharedStrings"))
    total = sum(p.file_size for p in parts)
    if largest + shared > MAX_SHEET_XML_BYTES or total > 4 * MAX_SHEET_XML_BYTES:
        raise ScheduleImportError(
            f"{path.name}: the workbook would unpack to {max(largest + shared, total) / 2**20:,.0f}"
            f" MiB, more than the {MAX_SHEET_XML_BYTES // 2**20} MiB a schedule may be; save "
            "the schedule alone in a new workbook")


def _sheet_to_read(workbook: Any, name: str, notes: list[str]) -> Any:
    """The active sheet if it is visible, else the first visible one; says which, and names
    the sheets left aside."""
    sheets = list(workbook.worksheets)
    visible = [s for s in sheets if getattr(s, "sheet_state", "visible") == "visible"]
    if not visible:
        raise ScheduleImportError(f"{name}: every sheet of the workbook is hidden")
    try:
        active = workbook.active
    except (IndexError, KeyError):  # pragma: no cover - a damaged workbook
        active = None
    sheet = active if active in visible else visible[0]
    hidden = [s.title for s in sheets if s not in visible]
    others = [s.title for s in visible if s is not sheet]
    if len(sheets) > 1:
        notes.append(f"sheet {sheet.title!r} read")
    if hidden:
        notes.append(f"hidden {plural(len(hidden), 'sheet')} not read: "
                     + ", ".join(repr(t) for t in hidden))
    if others:
        notes.append(f"other {plural(len(others), 'sheet')} not read: "
                     + ", ".join(repr(t) for t in others))
    return sheet


def _read_xlsx(path: Path, notes: list[str] | None = None) -> list[list[str]]:
    import openpyxl

    said = notes if notes is not None else []
    if not path.is_file():
        what = "is a folder" if path.is_dir() else "no such file"
        raise ScheduleImportError(f"{path}: cannot read the file: {what}")
    _check_xlsx_sizes(path)
    try:
        values = openpyxl.load_workbook(path, read_only=True, data_only=True)
        formulas = openpyxl.load_workbook(path, read_only=True, data_only=False)
    except Exception as exc:  # openpyxl raises many kinds for a damaged or foreign file
        raise ScheduleImportError(f"{path.name}: cannot read the workbook ({exc})") from exc
    try:
        if not values.worksheets:
            raise ScheduleImportError(f"{path.name}: the workbook has no sheet")
        sheet = _sheet_to_read(values, path.name, said)
        bounds = {"max_row": _EXCEL_MAX_ROWS, "max_col": MAX_COLUMNS + 1, "values_only": True}
        formula_rows = formulas[sheet.title].iter_rows(**bounds)
        grid: list[list[str]] = []
        missing: list[str] = []
        for number, row in enumerate(sheet.iter_rows(**bounds), start=1):
            raw = next(formula_rows, ())
            if number > MAX_ROWS:
                if any(v is not None for v in row):
                    raise ScheduleImportError(_size_problem(path.name, number, ()) or "")
                continue  # the empty rows up to the sheet's stated size
            cells = [_cell_text(v) for v in row]
            problem = _size_problem(path.name, number, cells)
            if problem:
                raise ScheduleImportError(problem)
            for i, (value, source) in enumerate(zip(row, raw, strict=False)):
                if value is None and source is not None and (
                        not isinstance(source, str) or source.startswith("=")):
                    text = source if isinstance(source, str) else "a formula"
                    missing.append(f"row {number}, column {column_letter(i)}: "
                                   f"{_short(text)} has no saved value")
            grid.append(cells)
        if missing:
            more = f" (and {len(missing) - 10} more)" if len(missing) > 10 else ""
            raise ScheduleImportError(
                f"{path.name}: formulas without a saved value cannot be read (the program that "
                "wrote the file did not calculate them); open the file in a spreadsheet "
                "program and save it, or type the values: " + "; ".join(missing[:10]) + more)
        return grid
    finally:
        values.close()
        formulas.close()


def _short(text: str, limit: int = 40) -> str:
    return text if len(text) <= limit else text[: limit - 1] + "…"


