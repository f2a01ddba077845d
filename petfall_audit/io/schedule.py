"""Import floors and openings from a window and balcony schedule (CSV or XLSX).

Four steps, each usable on its own (the desktop dialog drives them one by one):

1. :func:`read_table` reads the active visible sheet (or the CSV) into a :class:`RawTable` of
   strings.
2. :func:`guess_mapping` guesses which field each header holds; :func:`header_units` reads units
   from headers such as ``Width (in)``. Both results are plain dicts the user may edit, or
   :func:`load_mapping` reads them from a JSON file.
3. :func:`preview_import` parses every row against the current building and returns an
   :class:`ImportPreview`: the openings and floors it would add or change and every problem,
   located by spreadsheet row (the header is row 1) and column.
4. :func:`apply_import` merges the preview into the building, or replaces its openings. It
   refuses a preview with problems unless the caller accepts the valid rows; a row with any
   problem is never applied in part.

Lengths are read with :mod:`petfall_audit.units`: a unit in the cell wins over a unit in the
header, which wins over the column's own default (metres, or millimetres for gaps). The file
format, the column list and the rules are described in ``docs/schedule-import.md``.
"""

from __future__ import annotations

import codecs
import csv
import dataclasses
import datetime as _dt
import difflib
import io
import json
import math
import re
import zipfile
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from enum import StrEnum
from pathlib import Path
from typing import Any, Literal, NamedTuple

from petfall_audit.errors import ScheduleImportError
from petfall_audit.io._schema import LIMITS
from petfall_audit.model import (
    WINDOW_KINDS,
    Building,
    CatsPresent,
    Facade,
    Floor,
    OpenFrequency,
    Opening,
    OpeningKind,
    Screen,
)
from petfall_audit.safe_text import MAX_MESSAGE_CHARS, cut
from petfall_audit.units import parse_gap_mm, parse_length_m

__all__ = [
    "Kind",
    "ColumnSpec",
    "COLUMNS",
    "FLOOR_FIELDS",
    "RawTable",
    "ImportProblem",
    "ImportPreview",
    "LoadedMapping",
    "read_table",
    "MAX_FILE_BYTES",
    "MAX_SHEET_XML_BYTES",
    "MAX_ROWS",
    "MAX_COLUMNS",
    "MAX_CELL_CHARS",
    "guess_mapping",
    "combine_mapping",
    "header_units",
    "load_mapping",
    "preview_import",
    "apply_import",
    "column_letter",
]

Kind = Literal["text", "int", "length", "gap", "bool", "enum"]


@dataclass(frozen=True, slots=True)
class ColumnSpec:
    """One column a schedule may hold.

    ``field`` is the :class:`~petfall_audit.model.Opening` field (or ``floor_elevation_m`` /
    ``floor_label`` for the floor the row sits on); ``header`` the template's header (with its
    default unit); ``aliases`` other headers that mean the same; ``kind`` how cells are read:
    ``length`` in metres, ``gap`` in millimetres, ``enum`` one of ``choices``.
    """

    field: str
    header: str
    kind: Kind
    required: bool = False
    aliases: tuple[str, ...] = ()
    choices: type[StrEnum] | None = None
    example: str = ""
    help: str = ""
    min_value: float | None = None
    max_value: float | None = None
    positive: bool = False  # the value must be more than ``min_value``

    @property
    def default_unit(self) -> str | None:
        """``m`` for lengths, ``mm`` for gaps, ``None`` for the rest."""
        return {"length": "m", "gap": "mm"}.get(self.kind)


COLUMNS: tuple[ColumnSpec, ...] = (
    ColumnSpec(
        "id",
        "Opening ID",
        "text",
        True,
        (
            "id",
            "opening",
            "opening id",
            "ref",
            "reference",
            "opening ref",
            "tag",
            "mark",
            "window id",
            "window ref",
            "unit ref",
        ),
        example="N-01-B1",
        help="unique reference of the balcony or window",
    ),
    ColumnSpec(
        "floor",
        "Floor",
        "int",
        True,
        ("floor", "level", "storey", "story", "floor level", "floor no", "floor number"),
        example="1",
        help="floor level number (or a floor label the building already has)",
    ),
    ColumnSpec(
        "floor_elevation_m",
        "Floor elevation (m)",
        "length",
        False,
        (
            "floor elevation",
            "floor height",
            "ffl",
            "finished floor level",
            "level elevation",
            "floor level elevation",
            "elevation",
        ),
        example="3.6",
        help="finished floor level above the datum; creates or updates the floor",
        min_value=LIMITS.elevation_min_m,
        max_value=LIMITS.elevation_max_m,
    ),
    ColumnSpec(
        "floor_label",
        "Floor label",
        "text",
        False,
        ("floor label", "floor name", "level name", "level label"),
        example="Level 1",
        help="name of the floor, when the row creates it",
    ),
    ColumnSpec(
        "facade",
        "Facade",
        "text",
        True,
        ("facade", "façade", "elevation name", "face", "side", "orientation"),
        example="north",
        help="facade id; an unknown facade is created",
    ),
    ColumnSpec(
        "kind",
        "Type",
        "enum",
        True,
        ("kind", "type", "opening type", "window type", "category"),
        OpeningKind,
        example="balcony",
        help="what kind of opening",
    ),
    ColumnSpec(
        "x_m",
        "Position along facade (m)",
        "length",
        False,
        (
            "x",
            "position",
            "offset",
            "position along facade",
            "distance from left",
            "left edge",
            "x m",
        ),
        example="2.4",
        help="left edge along the facade (blank = 0)",
        min_value=0.0,
        max_value=LIMITS.length_max_m,
    ),
    ColumnSpec(
        "width_m",
        "Width (m)",
        "length",
        True,
        ("width", "opening width", "clear width", "w"),
        example="3.2",
        help="width of the balcony or window",
        min_value=0.0,
        max_value=LIMITS.width_max_m,
        positive=True,
    ),
    ColumnSpec(
        "projection_m",
        "Projection (m)",
        "length",
        False,
        ("projection", "depth", "balcony depth", "outstand"),
        example="1.5",
        help="how far a balcony stands out (0 for windows)",
        min_value=0.0,
        max_value=LIMITS.projection_max_m,
    ),
    ColumnSpec(
        "perch_height_m",
        "Rail or sill height (m)",
        "length",
        False,
        (
            "perch height",
            "rail height",
            "guard height",
            "sill height",
            "rail or sill height",
            "balustrade height",
            "handrail height",
            "height",
            "rail",
            "sill",
            "rail top",
            "top of rail",
            "guard",
        ),
        example="1.1",
        help="rail top or sill above the floor (blank = 1.1 m)",
        min_value=0.0,
        max_value=LIMITS.perch_height_max_m,
    ),
    ColumnSpec(
        "largest_gap_mm",
        "Largest gap (mm)",
        "gap",
        False,
        ("largest gap", "max gap", "baluster gap", "infill gap", "gap", "baluster spacing"),
        example="95",
        help="widest gap in the guard infill (blank = solid)",
        min_value=0.0,
        max_value=LIMITS.gap_max_mm,
    ),
    ColumnSpec(
        "bottom_gap_mm",
        "Bottom gap (mm)",
        "gap",
        False,
        ("bottom gap", "gap under guard", "toe gap", "gap at floor"),
        example="40",
        help="gap under the guard (blank = none)",
        min_value=0.0,
        max_value=LIMITS.gap_max_mm,
    ),
    ColumnSpec(
        "climbable_infill",
        "Climbable infill",
        "bool",
        False,
        ("climbable infill", "climbable", "horizontal rails"),
        example="no",
        help="yes if the infill has horizontal rails a cat can climb",
    ),
    ColumnSpec(
        "flat_rail_top",
        "Flat rail top",
        "bool",
        False,
        ("flat rail top", "flat top", "wide rail top", "flat handrail"),
        example="yes",
        help="yes if the rail top is flat and wide enough to sit on",
    ),
    ColumnSpec(
        "climbing_aids",
        "Climbing aids",
        "bool",
        False,
        ("climbing aids", "furniture near guard", "planters"),
        example="no",
        help="yes if furniture, planters or bins stand next to the guard",
    ),
    ColumnSpec(
        "limiter_gap_mm",
        "Limiter gap (mm)",
        "gap",
        False,
        ("limiter gap", "restrictor gap", "limiter", "restrictor", "opening limiter"),
        example="",
        help="opening the limiter allows (blank = no limiter)",
        min_value=0.0,
        max_value=LIMITS.gap_max_mm,
    ),
    ColumnSpec(
        "screen",
        "Screen",
        "enum",
        False,
        ("screen", "insect screen", "fly screen", "mesh screen"),
        Screen,
        example="none",
        help="screen fitted to the opening",
    ),
    ColumnSpec(
        "netting_mesh_mm",
        "Netting mesh (mm)",
        "gap",
        False,
        ("netting mesh", "net mesh", "netting", "mesh", "mesh size", "net"),
        example="",
        help="mesh of fitted netting (blank = no netting)",
        min_value=0.0,
        max_value=LIMITS.mesh_max_mm,
        positive=True,
    ),
    ColumnSpec(
        "open_frequency",
        "How often open",
        "enum",
        False,
        ("open frequency", "how often open", "opened", "frequency", "usage"),
        OpenFrequency,
        example="daily",
        help="how often it stands open",
    ),
    ColumnSpec(
        "cats_present",
        "Cats present",
        "enum",
        False,
        ("cats present", "cats", "cat", "has cats", "cat in flat"),
        CatsPresent,
        example="yes",
        help="whether cats live behind it",
    ),
    ColumnSpec(
        "escape_window",
        "Emergency escape window",
        "bool",
        False,
        (
            "escape window",
            "emergency escape",
            "emergency escape window",
            "egress",
            "egress window",
            "escape",
        ),
        example="no",
        help="yes if it is an emergency escape window",
    ),
    ColumnSpec(
        "notes",
        "Notes",
        "text",
        False,
        ("notes", "note", "comments", "comment", "remarks"),
        example="example row: replace or delete",
        help="free text",
    ),
)

#: Fields that describe the row's floor rather than the opening.
FLOOR_FIELDS = frozenset({"floor_elevation_m", "floor_label"})

_SPEC = {c.field: c for c in COLUMNS}
_OPENING_DEFAULTS = {
    f.name: f.default for f in dataclasses.fields(Opening) if f.default is not dataclasses.MISSING
}
_OPENING_DEFAULTS["x_m"] = 0.0  # a schedule without positions puts openings at the facade start
_HUMAN = {
    "id": "id",
    "floor": "floor",
    "floor_elevation_m": "floor elevation",
    "floor_label": "floor label",
    "facade": "facade",
    "kind": "type",
    "x_m": "position",
    "width_m": "width",
    "projection_m": "projection",
    "perch_height_m": "rail or sill height",
    "largest_gap_mm": "largest gap",
    "bottom_gap_mm": "bottom gap",
    "limiter_gap_mm": "limiter gap",
    "netting_mesh_mm": "netting mesh",
}
_ENUM_SYNONYMS: dict[str, str] = {
    # opening kinds, in the words of the trade
    "casement": "window_casement",
    "casement window": "window_casement",
    "sliding": "window_sliding",
    "sliding window": "window_sliding",
    "slider": "window_sliding",
    "hung": "window_hung",
    "sash": "window_hung",
    "sash window": "window_hung",
    "double hung": "window_hung",
    "single hung": "window_hung",
    "hung window": "window_hung",
    "tilt and turn": "window_tilt_turn",
    "tilt turn": "window_tilt_turn",
    "tilt & turn": "window_tilt_turn",
    "tilt-turn": "window_tilt_turn",
    "top hung": "window_top_hung",
    "awning": "window_top_hung",
    "awning window": "window_top_hung",
    "fixed glazing": "fixed",
    "fixed light": "fixed",
    "roof terrace": "terrace",
    "walkway": "gallery",
    "access gallery": "gallery",
    "deck access": "gallery",
    "juliet balcony": "balcony",
    # screens
    "pet resistant": "pet_resistant",
    "pet screen": "pet_resistant",
    "pet proof": "pet_resistant",
    "fly screen": "insect",
    "insect screen": "insect",
    "no": "none",
    "": "none",
    # cats present / frequency
    "y": "yes",
    "n": "no",
    "?": "unknown",
    "dont know": "unknown",
    "not known": "unknown",
    "seasonally": "seasonal",
    "summer": "seasonal",
    "every day": "daily",
    "permanently": "always",
    "rare": "rarely",
    "never opened": "never",
}
_TRUE = {"yes", "y", "true", "t", "1", "x", "✓", "ja", "oui", "si", "sí"}
_FALSE = {"no", "n", "false", "f", "0", "", "-", "nein", "non"}
_NONE_WORDS = {"", "-", "—", "none", "n/a", "na", "solid", "no"}
_HEADER_UNIT = re.compile(r"^(?P<name>.*?)\s*[\(\[]\s*(?P<unit>[^\)\]]*?)\s*[\)\]]\s*$")
_FT_IN_HEADERS = {
    "ft-in",
    "ft in",
    "ft/in",
    "ft & in",
    "ft and in",
    "ft+in",
    "feet and inches",
    "ft-in-fraction",
}


def column_letter(index: int) -> str:
    """Spreadsheet letter of a 0-based column index: 0 -> ``A``, 26 -> ``AA``."""
    letters = ""
    index += 1
    while index:
        index, rem = divmod(index - 1, 26)
        letters = chr(65 + rem) + letters
    return letters


# --- reading files ------------------------------------------------------------------------------


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
    boms = ((codecs.BOM_UTF32_LE, "utf-32"), (codecs.BOM_UTF32_BE, "utf-32"),
            (codecs.BOM_UTF8, "utf-8-sig"), (codecs.BOM_UTF16_LE, "utf-16"),
            (codecs.BOM_UTF16_BE, "utf-16"))
    encoding = next((enc for bom, enc in boms if data.startswith(bom)), None)
    encoding = encoding or _looks_utf16(data) or ""
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
        notes.append("hidden sheet(s) not read: " + ", ".join(repr(t) for t in hidden))
    if others:
        notes.append("other sheet(s) not read: " + ", ".join(repr(t) for t in others))
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


# --- mapping ------------------------------------------------------------------------------------


def _norm(text: str) -> str:
    text = text.lower().replace("_", " ").replace("&", " and ")
    text = re.sub(r"[^\w?]+", " ", text)
    return re.sub(r"\s+", " ", text).strip()


def _split_header(header: str) -> tuple[str, str | None]:
    """``"Width (in)"`` -> (``"Width"``, ``"in"``); ``"Width"`` -> (``"Width"``, ``None``)."""
    m = _HEADER_UNIT.match(header)
    if m is None:
        return header.strip(), None
    return m.group("name").strip(), m.group("unit").strip() or None


_ALIASES: dict[str, str] = {}
for _c in COLUMNS:
    for _alias in (_c.field, _split_header(_c.header)[0], *_c.aliases):
        _ALIASES.setdefault(_norm(_alias), _c.field)
    _ALIASES.setdefault(_norm(_c.field.removesuffix("_m").removesuffix("_mm")), _c.field)


def guess_mapping(headers: Sequence[str]) -> dict[str, str]:
    """Guess the field of each header: ``{header: field}`` for the headers it recognises.

    Units in brackets are ignored (``Width (in)`` is ``width_m``); case, spaces, ``_`` and
    punctuation do not matter; close misspellings are accepted. Each field goes to the first
    header that names it.
    """
    mapping: dict[str, str] = {}
    taken: set[str] = set()
    pending: list[str] = []
    for header in headers:
        if not header or header in mapping:
            continue
        key = _norm(_split_header(header)[0])
        field_name = _ALIASES.get(key)
        if field_name is not None and field_name not in taken:
            mapping[header] = field_name
            taken.add(field_name)
        else:
            pending.append(header)
    for header in pending:
        key = _norm(_split_header(header)[0])
        for match in difflib.get_close_matches(key, list(_ALIASES), n=3, cutoff=0.8):
            if _ALIASES[match] not in taken:
                mapping[header] = _ALIASES[match]
                taken.add(_ALIASES[match])
                break
    return {h: mapping[h] for h in headers if h in mapping}


def combine_mapping(guessed: Mapping[str, str], chosen: Mapping[str, str]) -> dict[str, str]:
    """``guessed`` overridden by ``chosen`` (e.g. a mapping file or the user's edits).

    A header in ``chosen`` takes its field from there (``""`` ignores the column); a field that
    ``chosen`` gives to a header is taken away from any other guessed header.
    """
    claimed = {f for f in chosen.values() if f}
    combined = {h: f for h, f in guessed.items() if h not in chosen and f not in claimed}
    combined.update({h: f for h, f in chosen.items() if f})
    return combined


def header_units(headers: Sequence[str]) -> dict[str, str]:
    """Units written in headers: ``{"Width (in)": "in", "Sill height [mm]": "mm"}``.

    ``(ft-in)`` and similar mean feet for a bare number. Units are not checked here;
    :func:`preview_import` reports an unknown one at row 1.
    """
    units: dict[str, str] = {}
    for header in headers:
        unit = _split_header(header)[1]
        if unit:
            units[header] = "ft" if _norm(unit) in {_norm(u) for u in _FT_IN_HEADERS} else unit
    return units


class LoadedMapping(NamedTuple):
    """A mapping file: ``columns`` {header: field} and ``units`` {header: unit}."""

    columns: dict[str, str]
    units: dict[str, str]


def load_mapping(path: str | Path) -> LoadedMapping:
    """Read a mapping file (JSON).

    Either ``{"Header": "field", ...}`` or ``{"columns": {"Header": "field"}, "units":
    {"Header": "in"}}``. A field of ``""`` or ``null`` ignores the column. Raises
    :class:`ScheduleImportError` for a malformed file or an unknown field name.
    """
    path = Path(path)
    try:
        data = json.loads(path.read_text(encoding="utf-8-sig"))
    except (OSError, UnicodeDecodeError, json.JSONDecodeError) as exc:
        raise ScheduleImportError(f"{path.name}: cannot read the mapping ({exc})") from exc
    if not isinstance(data, dict):
        raise ScheduleImportError(f"{path.name}: a mapping is a JSON object")
    nested = isinstance(data.get("columns"), dict)
    columns_raw = data["columns"] if nested else data
    units_raw = data.get("units", {}) if nested else {}
    if not isinstance(columns_raw, dict) or not isinstance(units_raw, dict):
        raise ScheduleImportError(f"{path.name}: 'columns' and 'units' must be JSON objects")
    columns: dict[str, str] = {}
    for header, field_name in columns_raw.items():
        if field_name in (None, ""):
            columns[str(header)] = ""
            continue
        if not isinstance(field_name, str) or field_name not in _SPEC:
            raise ScheduleImportError(
                f"{path.name}: column '{header}': unknown field {field_name!r}; "
                f"fields are {', '.join(_SPEC)}"
            )
        columns[str(header)] = field_name
    units = {str(h): str(u) for h, u in units_raw.items()}
    return LoadedMapping(columns, units)


# --- preview ------------------------------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class ImportProblem:
    """A problem at spreadsheet ``row`` (header = 1; 0 = the whole file) and ``column``.

    ``column`` is the header text (``""`` when the problem is not in one column), ``letter`` the
    spreadsheet column letter (``""`` likewise).
    """

    row: int
    column: str
    message: str
    letter: str = ""

    def __post_init__(self) -> None:
        # a message never grows with the cell it is about (long values are cut)
        object.__setattr__(self, "column", cut(self.column))
        object.__setattr__(self, "message", cut(self.message, MAX_MESSAGE_CHARS))

    def __str__(self) -> str:
        where = f"row {self.row}" if self.row else "file"
        if self.column or self.letter:
            col = f"{self.letter} ({self.column})" if self.letter else f"'{self.column}'"
            where += f", column {col}"
        return f"{where}: {self.message}"


@dataclass(frozen=True, slots=True)
class ImportPreview:
    """What an import would do, before it is applied.

    ``values``: one dict per valid row of the fields its mapped cells set (SI units, model
    types), with ``rows`` the spreadsheet row of each; ``openings`` the same rows as
    :class:`Opening` objects built on the model defaults. ``floors``: floors the schedule adds
    or changes. ``facades``: facades the import would create. ``updates``: ids of openings the
    building already has (a merge changes them; a replace drops all others). ``problems``: every
    bad cell and row. ``bad_rows``: rows that will not be imported.
    """

    openings: tuple[Opening, ...]
    rows: tuple[int, ...]
    values: tuple[Mapping[str, Any], ...]
    floors: tuple[Floor, ...]
    facades: tuple[Facade, ...]
    updates: tuple[str, ...]
    problems: tuple[ImportProblem, ...]
    bad_rows: tuple[int, ...]
    ignored_columns: tuple[str, ...]
    rows_read: int
    mapping: Mapping[str, str] = field(default_factory=dict)

    @property
    def ok(self) -> bool:
        """True when there is nothing to report and at least one opening to import."""
        return not self.problems and bool(self.openings)

    def problems_at(self, row: int) -> tuple[ImportProblem, ...]:
        """Problems of one spreadsheet row."""
        return tuple(p for p in self.problems if p.row == row)

    def summary(self) -> str:
        """One line: rows read, openings, floors and facades it would add, rows refused."""
        new = len(self.openings) - len(self.updates)
        parts = [
            f"{self.rows_read} row(s) read",
            f"{new} new opening(s)",
            f"{len(self.updates)} existing opening(s) matched",
        ]
        if self.floors:
            parts.append(f"{len(self.floors)} floor(s) added or changed")
        if self.facades:
            parts.append(
                f"{len(self.facades)} new facade(s): " + ", ".join(f.id for f in self.facades)
            )
        if self.bad_rows:
            parts.append(f"{len(self.bad_rows)} row(s) with problems")
        return "; ".join(parts)


class _Column(NamedTuple):
    position: int  # 0-based column index in the table
    header: str
    spec: ColumnSpec
    unit: str | None


def _resolve_columns(
    table: RawTable, mapping: Mapping[str, str], units: Mapping[str, str]
) -> tuple[list[_Column], list[ImportProblem], list[str]]:
    problems: list[ImportProblem] = []
    columns: list[_Column] = []
    ignored: list[str] = []
    seen_headers: dict[str, int] = {}
    by_field: dict[str, str] = {}
    for index, header in enumerate(table.headers):
        letter = column_letter(index)
        field_name = mapping.get(header, "")
        if not field_name:
            if header:
                ignored.append(header)
            continue
        if header in seen_headers:
            problems.append(
                ImportProblem(1, header, "the same header appears twice; rename one", letter)
            )
            continue
        seen_headers[header] = index
        spec = _SPEC.get(field_name)
        if spec is None:
            problems.append(ImportProblem(1, header, f"unknown field '{field_name}'", letter))
            continue
        if field_name in by_field:
            problems.append(
                ImportProblem(
                    1,
                    header,
                    f"'{_human(field_name)}' is already read from column '{by_field[field_name]}'",
                    letter,
                )
            )
            continue
        by_field[field_name] = header
        unit = units.get(header)
        if unit is not None and spec.default_unit is None:
            problems.append(
                ImportProblem(
                    1, header, f"a unit ('{unit}') makes no sense for {_human(field_name)}", letter
                )
            )
            continue
        if unit is not None:
            try:
                parse_length_m("1", default_unit=unit)
            except ValueError as exc:
                problems.append(ImportProblem(1, header, f"header unit: {exc}", letter))
                continue
        columns.append(_Column(index, header, spec, unit or spec.default_unit))
    for spec in COLUMNS:
        if spec.required and spec.field not in by_field:
            problems.append(
                ImportProblem(
                    1,
                    "",
                    f"no column holds the {_human(spec.field)} "
                    f"(expected a header such as '{spec.header}')",
                )
            )
    return columns, problems, ignored


def _human(field_name: str) -> str:
    return _HUMAN.get(field_name, field_name.replace("_", " "))


def _parse_enum(text: str, choices: type[StrEnum]) -> StrEnum:
    key = _norm(text)
    candidates = (
        key,
        key.replace(" ", "_"),
        _ENUM_SYNONYMS.get(key, ""),
        _ENUM_SYNONYMS.get(text.strip().lower(), ""),
    )
    for candidate in candidates:
        if candidate:
            try:
                return choices(candidate)
            except ValueError:
                continue
    allowed = ", ".join(m.value for m in choices)
    raise ValueError(f"unknown value '{text}' (use one of: {allowed})")


def _parse_bool(text: str) -> bool:
    key = text.strip().lower()
    if key in _TRUE:
        return True
    if key in _FALSE:
        return False
    raise ValueError(f"'{text}' is not yes or no")


def _parse_int(text: str) -> int:
    try:
        value = float(text.replace(",", "."))
    except ValueError:
        raise ValueError(f"'{text}' is not a whole number") from None
    if not value.is_integer():
        raise ValueError(f"'{text}' is not a whole number")
    return int(value)


def _parse_cell(text: str, col: _Column, floor_labels: Mapping[str, int]) -> Any:
    """The value of one cell for its field; ``ValueError`` with a plain message."""
    spec = col.spec
    if spec.kind == "text":
        return text
    if spec.kind == "bool":
        return _parse_bool(text)
    if spec.kind == "enum":
        assert spec.choices is not None
        return _parse_enum(text, spec.choices)
    if spec.kind == "int":
        try:
            return _parse_int(text)
        except ValueError:
            level = floor_labels.get(_norm(text))
            if level is None:
                raise ValueError(
                    f"unknown floor '{text}' (give a level number or a known floor label)"
                ) from None
            return level
    assert col.unit is not None
    if spec.kind == "gap":
        if text.strip().lower() in _NONE_WORDS:
            return None
        value = parse_gap_mm(text, default_unit=col.unit)
        unit_label = "mm"
    else:
        value = parse_length_m(text, default_unit=col.unit)
        unit_label = "m"
    name = _human(spec.field)
    if spec.min_value is not None:
        if value < 0 <= spec.min_value:
            raise ValueError(f"negative {name} ({value:g} {unit_label})")
        if value < spec.min_value or (spec.positive and value <= spec.min_value):
            bound = "more than" if spec.positive else "at least"
            raise ValueError(
                f"{name} must be {bound} {spec.min_value:g} {unit_label} (got {value:g})"
            )
    if spec.max_value is not None and value > spec.max_value:
        raise ValueError(
            f"{name} of {value:g} {unit_label} is implausible; check the unit "
            f"(a bare number in this column is read in {col.unit})"
        )
    return value


def preview_import(
    table: RawTable,
    mapping: Mapping[str, str],
    building: Building,
    *,
    units: Mapping[str, str] | None = None,
) -> ImportPreview:
    """Parse every row of ``table`` against ``building`` and report what an import would do.

    ``mapping`` is {header: field} (see :func:`guess_mapping`); ``units`` {header: unit} for
    bare numbers (default: :func:`header_units` of the table's headers). A row's floor must
    exist in the building unless the schedule gives that floor an elevation (column
    ``floor_elevation_m``, in this row or another). Every problem names its row and column.
    """
    if units is None:
        units = header_units(table.headers)
    columns, problems, ignored = _resolve_columns(table, mapping, units)
    fatal = bool(problems)
    floor_labels = {_norm(f.label): f.level for f in building.floors if f.label}
    building_levels = {f.level: f for f in building.floors}

    parsed: list[tuple[int, dict[str, Any], list[ImportProblem]]] = []
    for row_number, cells in table.rows:
        values: dict[str, Any] = {}
        row_problems: list[ImportProblem] = []
        for col in columns:
            text = cells[col.position] if col.position < len(cells) else ""
            letter = column_letter(col.position)
            if not text:
                if col.spec.required:
                    row_problems.append(
                        ImportProblem(
                            row_number, col.header, f"empty {_human(col.spec.field)}", letter
                        )
                    )
                elif col.spec.field not in FLOOR_FIELDS:
                    values[col.spec.field] = _blank_value(col.spec)
                continue
            try:
                values[col.spec.field] = _parse_cell(text, col, floor_labels)
            except ValueError as exc:
                row_problems.append(ImportProblem(row_number, col.header, str(exc), letter))
        extra = [i for i in range(len(table.headers), len(cells)) if cells[i]]
        if extra:
            row_problems.append(
                ImportProblem(
                    row_number,
                    "",
                    f"cells beyond the last header (column "
                    f"{column_letter(extra[0])}); add a header or remove them",
                    column_letter(extra[0]),
                )
            )
        parsed.append((row_number, values, row_problems))

    header_of = {c.spec.field: c for c in columns}
    floors, floor_rows = _schedule_floors(parsed, header_of, building_levels)
    known_levels = set(building_levels) | set(floors)
    _check_rows(parsed, header_of, known_levels)
    if not fatal:
        _check_merged(parsed, header_of, building, floors, floor_rows)

    good = [(n, v) for n, v, p in parsed if not p and not fatal]
    for _, _, row_problems in parsed:
        problems.extend(row_problems)
    openings = tuple(_opening(values) for _, values in good)
    existing_ids = {o.id for o in building.openings}
    return ImportPreview(
        openings=openings,
        rows=tuple(n for n, _ in good),
        values=tuple(v for _, v in good),
        floors=_floors_to_apply(floors, [v for _, v in good], building_levels),
        facades=_new_facades(openings, building),
        updates=tuple(o.id for o in openings if o.id in existing_ids),
        problems=tuple(sorted(problems, key=lambda p: (p.row, p.letter.rjust(3), p.message))),
        bad_rows=tuple(
            sorted({n for n, _, p in parsed if p} if not fatal else {n for n, _, _ in parsed})
        ),
        ignored_columns=tuple(ignored),
        rows_read=len(table.rows),
        mapping=dict(mapping),
    )


def _floors_to_apply(
    floors: Mapping[int, Floor],
    values: Sequence[Mapping[str, Any]],
    building_levels: Mapping[int, Floor],
) -> tuple[Floor, ...]:
    """Schedule floors that valid rows stand on and that are new or differ from the building."""
    used = {v["floor"] for v in values}
    return tuple(
        sorted(
            (f for level, f in floors.items() if level in used and building_levels.get(level) != f),
            key=lambda f: f.level,
        )
    )


_WHERE = re.compile(r"^(?P<section>openings|floors|facades)\[(?P<index>\d+)\](?:\.(?P<field>\w+))?")


def _check_merged(
    parsed: list[tuple[int, dict[str, Any], list[ImportProblem]]],
    header_of: Mapping[str, _Column],
    building: Building,
    floors: Mapping[int, Floor],
    floor_rows: Mapping[int, int],
) -> None:
    """Check the building the good rows would make (facade lengths, floor order, escape
    windows...) with :func:`validate_building`; add each problem of an imported opening or floor
    to its row. Problems the building had already are not the schedule's and are left out."""
    from petfall_audit.io.building_file import validate_building

    good = [(n, v) for n, v, p in parsed if not p]
    if not good:
        return
    openings = [_opening(v) for _, v in good]
    levels = {f.level: f for f in building.floors}
    trial = _merged(
        building,
        openings,
        [v for _, v in good],
        _floors_to_apply(floors, [v for _, v in good], levels),
        "merge",
    )
    row_of_id = {v["id"]: n for n, v in good}
    new_facades = {f.id for f in trial.facades} - {f.id for f in building.facades}
    problems_of = {n: p for n, _, p in parsed}
    for problem in validate_building(trial):
        m = _WHERE.match(problem.where)
        if m is None:
            continue
        index, field_name = int(m.group("index")), m.group("field") or ""
        section = m.group("section")
        rows: list[int] = []
        if section == "openings":
            rows = [row_of_id[i] for i in (trial.openings[index].id,) if i in row_of_id]
        elif section == "floors":
            rows = [r for r in (floor_rows.get(trial.floors[index].level),) if r is not None]
            field_name = "floor_elevation_m" if field_name == "elevation_m" else field_name
        elif trial.facades[index].id in new_facades:  # a facade the schedule creates
            rows = [n for n, v in good if v["facade"] == trial.facades[index].id]
            field_name = "facade"
        col = header_of.get(field_name)
        message = problem.message if col else f"{field_name or 'row'}: {problem.message}"
        if section == "facades" and trial.facades[index].id in new_facades:
            message = (
                f"facade {trial.facades[index].id!r} is not in the building, so this import "
                f"would create it with nothing below it ({problem.message}); check the name, or "
                "add the facade and what lies below it first"
            )
        for row in rows:
            problems_of[row].append(
                ImportProblem(
                    row,
                    col.header if col else "",
                    message,
                    column_letter(col.position) if col else "",
                )
            )


def _blank_value(spec: ColumnSpec) -> Any:
    """What an empty optional cell means: the model default (``None``, no, 0, 1.1 m...)."""
    return _OPENING_DEFAULTS.get(spec.field)


def _schedule_floors(
    parsed: list[tuple[int, dict[str, Any], list[ImportProblem]]],
    header_of: Mapping[str, _Column],
    building_levels: Mapping[int, Floor],
) -> tuple[dict[int, Floor], dict[int, int]]:
    """Floors that rows define with an elevation, and the row that first defines each; a
    second, different definition is a problem."""
    floors: dict[int, Floor] = {}
    first_row: dict[int, int] = {}
    if "floor_elevation_m" not in header_of:
        return floors, first_row
    col = header_of["floor_elevation_m"]
    for row_number, values, row_problems in parsed:
        level = values.get("floor")
        elevation = values.get("floor_elevation_m")
        if level is None or elevation is None:
            continue
        old = building_levels.get(level)
        label = values.get("floor_label") or (old.label if old else _default_label(level))
        floor = Floor(level=level, label=label, elevation_m=elevation)
        if level in floors:
            prev = floors[level]
            if not math.isclose(prev.elevation_m, elevation, abs_tol=1e-6) or (
                "floor_label" in values and prev.label != label
            ):
                row_problems.append(
                    ImportProblem(
                        row_number,
                        col.header,
                        f"floor {level} was given elevation {prev.elevation_m:g} m and label "
                        f"'{prev.label}' in row {first_row[level]}; rows disagree",
                        column_letter(col.position),
                    )
                )
            continue
        floors[level] = floor
        first_row[level] = row_number
    return floors, first_row


def _default_label(level: int) -> str:
    return "Ground" if level == 0 else f"Level {level}"


def _check_rows(
    parsed: list[tuple[int, dict[str, Any], list[ImportProblem]]],
    header_of: Mapping[str, _Column],
    known_levels: set[int],
) -> None:
    """Row-level checks: unknown floor, duplicate id, a window with a projection."""
    first_id_row: dict[str, int] = {}

    def at(field_name: str, row_number: int, message: str) -> ImportProblem:
        col = header_of.get(field_name)
        return ImportProblem(
            row_number,
            col.header if col else "",
            message,
            column_letter(col.position) if col else "",
        )

    for row_number, values, row_problems in parsed:
        level = values.get("floor")
        if level is not None and level not in known_levels:
            hint = (
                "; add it to the building first, or give its elevation in the "
                "floor elevation column"
            )
            row_problems.append(at("floor", row_number, f"unknown floor {level}{hint}"))
        opening_id = values.get("id")
        if opening_id:
            if opening_id in first_id_row:
                row_problems.append(
                    at(
                        "id",
                        row_number,
                        f"duplicate id '{opening_id}' (also in row {first_id_row[opening_id]})",
                    )
                )
            else:
                first_id_row[opening_id] = row_number
        kind = values.get("kind")
        if kind in WINDOW_KINDS and (values.get("projection_m") or 0.0) > 0.0:
            row_problems.append(
                at("projection_m", row_number, "a window has no projection; leave it blank or 0")
            )


def _opening(values: Mapping[str, Any]) -> Opening:
    fields = {k: v for k, v in values.items() if k not in FLOOR_FIELDS}
    return Opening(**{**_OPENING_DEFAULTS, **fields})


def _new_facades(openings: Sequence[Opening], building: Building) -> tuple[Facade, ...]:
    """Facades the openings name that the building lacks, as long as their openings reach."""
    known = {f.id for f in building.facades}
    reach: dict[str, float] = {}
    for o in openings:
        if o.facade not in known:
            reach[o.facade] = max(reach.get(o.facade, 0.0), o.x_m + o.width_m)
    return tuple(
        Facade(id=name, length_m=round(length, 3), label=name) for name, length in reach.items()
    )


# --- apply --------------------------------------------------------------------------------------


def apply_import(
    building: Building,
    preview: ImportPreview,
    *,
    mode: Literal["merge", "replace"] = "merge",
    accept_valid_rows: bool = False,
) -> Building:
    """Return a new building with the preview's floors and openings applied.

    ``merge``: openings with a known id are updated (columns the schedule lacks keep their
    values), new ids are added after the existing openings. ``replace``: the building's openings
    are replaced by the schedule's. Either way the schedule's floors are added or updated and
    the facades it names are created; other floors, facades and surfaces stay.

    Raises :class:`ScheduleImportError` if the preview has problems and ``accept_valid_rows`` is
    false, if no row is valid, or if the building no longer fits the preview.
    """
    if mode not in ("merge", "replace"):
        raise ValueError(f"mode must be 'merge' or 'replace', not {mode!r}")
    if preview.problems and not accept_valid_rows:
        raise ScheduleImportError(
            f"the schedule has {len(preview.problems)} problem(s) in {len(preview.bad_rows)} "
            "row(s); fix them, or accept the valid rows only"
        )
    if not preview.openings:
        raise ScheduleImportError("no valid row to import; nothing was changed")

    levels = {f.level for f in building.floors} | {f.level for f in preview.floors}
    missing = sorted({o.floor for o in preview.openings} - levels)
    if missing:
        raise ScheduleImportError(
            f"the building has no floor {', '.join(map(str, missing))} any more; "
            "preview the schedule again"
        )
    return _merged(building, preview.openings, preview.values, preview.floors, mode)


def _merged(
    building: Building,
    openings: Sequence[Opening],
    values: Sequence[Mapping[str, Any]],
    new_floors: Sequence[Floor],
    mode: str,
) -> Building:
    floors = {f.level: f for f in building.floors}
    floors.update({f.level: f for f in new_floors})
    facades = list(building.facades)
    known = {f.id for f in facades}
    facades.extend(f for f in _new_facades(openings, building) if f.id not in known)
    if mode == "replace":
        result = list(openings)
    else:
        existing = {o.id: i for i, o in enumerate(building.openings)}
        result = list(building.openings)
        for opening, row_values in zip(openings, values, strict=True):
            index = existing.get(opening.id)
            if index is None:
                result.append(opening)
            else:
                fields = {k: v for k, v in row_values.items() if k not in FLOOR_FIELDS}
                result[index] = dataclasses.replace(result[index], **fields)
    return dataclasses.replace(
        building,
        floors=tuple(sorted(floors.values(), key=lambda f: f.level)),
        facades=tuple(facades),
        openings=tuple(result),
    )
