"""Rows of a table as tab-separated text, to and from a spreadsheet. No Qt.

Copying writes a header line of the columns' labels, then one line per row, each value as the
table shows it (with its unit). A text cell that a spreadsheet would read as a formula (``=``,
``+``, ``-``, ``@`` first) gets a leading apostrophe, which spreadsheets hide and pasting back
removes. Pasting reads a header line when there is one (labels or field names, in any order),
else the table's own column order; every value is read as if typed in its cell.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Sequence
from typing import Any

from petfall_audit.editing.fields import FieldSpec, format_value, parse_value
from petfall_audit.errors import Problem

__all__ = ["MAX_PASTE_CHARS", "MAX_PASTE_ROWS", "rows_to_tsv", "parse_tsv", "PastedRow"]

#: Longest clipboard text read (characters) and most rows pasted at once.
MAX_PASTE_CHARS = 5_000_000
MAX_PASTE_ROWS = 20_000
_FORMULA_START = ("=", "+", "-", "@", "\t", "\r")


def _cell(text: str) -> str:
    text = text.replace("\t", " ").replace("\r", " ").replace("\n", " ")
    return "'" + text if text.startswith(_FORMULA_START) and not _is_number(text) else text


def _is_number(text: str) -> bool:
    head = text.split(" ", 1)[0]
    try:
        float(head)
    except ValueError:
        return False
    return True


def rows_to_tsv(items: Sequence[Any], fields: Sequence[FieldSpec], units: str = "metric") -> str:
    """``items`` (model dataclasses) as tab-separated text: a header of the labels, then one
    line per item; ends with a newline."""
    lines = ["\t".join(_cell(s.label) for s in fields)]
    for item in items:
        lines.append("\t".join(_cell(format_value(s, getattr(item, s.name), units))
                               for s in fields))
    return "\n".join(lines) + "\n"


@dataclasses.dataclass(frozen=True, slots=True)
class PastedRow:
    """One pasted line: its 1-based line number and the values read, by field name."""

    line: int
    values: dict[str, Any]


def _header_map(cells: list[str], fields: Sequence[FieldSpec]) -> list[FieldSpec | None] | None:
    by_name = {s.label.lower(): s for s in fields} | {s.name.lower(): s for s in fields}
    found = [by_name.get(c.strip().lower()) for c in cells]
    return found if sum(f is not None for f in found) >= max(1, len(cells) // 2) else None


def parse_tsv(text: str, fields: Sequence[FieldSpec], units: str = "metric"
              ) -> tuple[list[PastedRow], list[Problem]]:
    """Read tab-separated ``text`` into rows of values for ``fields``; problems are located as
    ``line N, <label>``. Empty lines are skipped; cells beyond the known columns are ignored."""
    problems: list[Problem] = []
    if len(text) > MAX_PASTE_CHARS:
        return [], [Problem("clipboard", f"more than {MAX_PASTE_CHARS:,} characters to paste; "
                                         "paste fewer rows at a time")]
    lines = text.replace("\r\n", "\n").replace("\r", "\n").split("\n")
    columns: list[FieldSpec | None] = list(fields)
    start = 0
    if lines and lines[0].strip():
        header = _header_map(lines[0].split("\t"), fields)
        if header is not None:
            columns, start = header, 1
    rows: list[PastedRow] = []
    for number, line in enumerate(lines[start:], start + 1):
        if not line.strip():
            continue
        if len(rows) >= MAX_PASTE_ROWS:
            problems.append(Problem("clipboard", f"only the first {MAX_PASTE_ROWS:,} rows are "
                                                 "pasted"))
            break
        values: dict[str, Any] = {}
        for spec, raw in zip(columns, line.split("\t"), strict=False):
            if spec is None:
                continue
            cell = raw[1:] if raw.startswith("'") else raw
            try:
                values[spec.name] = parse_value(spec, cell, units)
            except ValueError as exc:
                problems.append(Problem(f"line {number}, {spec.label}", str(exc)))
        rows.append(PastedRow(number, values))
    return rows, problems
