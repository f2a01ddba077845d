"""Write a blank opening schedule (CSV or XLSX) in the columns the importer reads unmapped.

The template has the header row, one example row to replace or delete, and (CSV: as ``#``
comment rows; XLSX: on a second sheet) what each column means and the cautions. A schedule kept
in these columns imports with no mapping file; see ``docs/schedule-import.md``.
"""

from __future__ import annotations

import io
from pathlib import Path
from typing import Literal

from petfall_audit.cautions import CAUTIONS
from petfall_audit.errors import ScheduleImportError
from petfall_audit.io.atomic import atomic_write_bytes
from petfall_audit.io.csv_safe import csv_writer
from petfall_audit.io.schedule import COLUMNS, ColumnSpec

__all__ = ["template_headers", "template_example", "write_template"]

System = Literal["metric", "imperial"]

# Example row in feet and inches: the same opening as the metric example, rounded to the inch.
_IMPERIAL_EXAMPLE = {
    "floor_elevation_m": "11' 10\"",
    "x_m": "7' 10\"",
    "width_m": "10' 6\"",
    "projection_m": "4' 11\"",
    "perch_height_m": "3' 7\"",
    "largest_gap_mm": "3 3/4",
    "bottom_gap_mm": "1 1/2",
}


def _header(spec: ColumnSpec, system: System) -> str:
    if system == "imperial" and spec.kind in ("length", "gap"):
        name = spec.header.rsplit(" (", 1)[0]
        return f"{name} ({'ft' if spec.kind == 'length' else 'in'})"
    return spec.header


def template_headers(system: System = "metric") -> tuple[str, ...]:
    """Headers of the template; lengths in m / mm (metric) or ft / in (imperial)."""
    _check(system)
    return tuple(_header(spec, system) for spec in COLUMNS)


def template_example(system: System = "metric") -> tuple[str, ...]:
    """The example row, one cell per header."""
    _check(system)
    if system == "metric":
        return tuple(spec.example for spec in COLUMNS)
    return tuple(_IMPERIAL_EXAMPLE.get(spec.field, spec.example) for spec in COLUMNS)


def _notes(system: System) -> list[tuple[str, str]]:
    rows = [
        (header, ("required: " if spec.required else "") + spec.help + _choices(spec))
        for header, spec in zip(template_headers(system), COLUMNS, strict=True)
    ]
    rows.append(("", "A unit in a cell (42 in, 3'6\", 1100 mm) wins over the unit in the header."))
    rows.append(("", "Rows whose first cell starts with # are skipped."))
    return rows


def _choices(spec: ColumnSpec) -> str:
    if spec.choices is not None:
        return " (" + ", ".join(m.value for m in spec.choices) + ")"
    if spec.kind == "bool":
        return " (yes or no)"
    return ""


def _check(system: str) -> None:
    if system not in ("metric", "imperial"):
        raise ValueError(f"system must be 'metric' or 'imperial', not {system!r}")


def write_template(path: str | Path, *, system: System = "metric") -> None:
    """Write the blank schedule to ``path`` (``.csv`` or ``.xlsx``), replacing it atomically."""
    _check(system)
    path = Path(path)
    suffix = path.suffix.lower()
    if suffix == ".csv":
        data = _csv_bytes(system)
    elif suffix == ".xlsx":
        data = _xlsx_bytes(system)
    else:
        raise ScheduleImportError(f"{path.name}: a template is .csv or .xlsx")
    atomic_write_bytes(path, data)


def _csv_bytes(system: System) -> bytes:
    out = io.StringIO(newline="")
    writer = csv_writer(out, lineterminator="\r\n")
    writer.writerow(template_headers(system))
    writer.writerow(template_example(system))
    for header, text in _notes(system):
        writer.writerow([f"# {header}: {text}" if header else f"# {text}"])
    for caution in CAUTIONS:
        writer.writerow([f"# {caution}"])
    # BOM so that spreadsheet programs read the file as UTF-8
    return out.getvalue().encode("utf-8-sig")


def _xlsx_bytes(system: System) -> bytes:
    from openpyxl import Workbook
    from openpyxl.styles import Font
    from openpyxl.utils import get_column_letter
    from openpyxl.worksheet.datavalidation import DataValidation

    workbook = Workbook()
    sheet = workbook.active
    sheet.title = "Openings"
    headers = template_headers(system)
    sheet.append(list(headers))
    sheet.append(list(template_example(system)))
    for cell in sheet[1]:
        cell.font = Font(bold=True)
    sheet.freeze_panes = "A2"
    for index, (header, spec) in enumerate(zip(headers, COLUMNS, strict=True), start=1):
        letter = get_column_letter(index)
        sheet.column_dimensions[letter].width = max(12, len(header) + 2)
        # every cell as text, so that 3'6" or 1100 mm stay as typed
        for row in range(2, 501):
            sheet.cell(row=row, column=index).number_format = "@"
        values = None
        if spec.choices is not None:
            values = [m.value for m in spec.choices]
        elif spec.kind == "bool":
            values = ["yes", "no"]
        if values:
            rule = DataValidation(
                type="list", formula1='"' + ",".join(values) + '"', allow_blank=not spec.required
            )
            rule.add(f"{letter}2:{letter}500")
            sheet.add_data_validation(rule)
    notes = workbook.create_sheet("Notes")
    notes.append(["Column", "Meaning"])
    notes["A1"].font = Font(bold=True)
    notes["B1"].font = Font(bold=True)
    for header, text in _notes(system):
        notes.append([header, text])
    notes.append([])
    notes.append(["Cautions"])
    notes.cell(row=notes.max_row, column=1).font = Font(bold=True)
    for caution in CAUTIONS:
        notes.append(["", caution])
    notes.column_dimensions["A"].width = 30
    notes.column_dimensions["B"].width = 100
    out = io.BytesIO()
    workbook.save(out)
    return out.getvalue()
