"""The preview as a grid: the schedule's rows and cells as the file has them, each bad cell
marked with its problem. No Qt: the import dialog shows it, a test reads it.

The grid is lazy: a cell is looked up when asked for, so a schedule of 50,000 rows costs no more
than its problems.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

from petfall_audit.io.schedule.columns import column_letter
from petfall_audit.io.schedule.preview import ImportPreview
from petfall_audit.io.schedule.read import RawTable

__all__ = ["RowStatus", "GridCell", "PreviewGrid", "preview_grid", "STATUS_WORDS"]

RowStatus = Literal["new", "update", "skipped"]
#: How a row's status reads in the grid.
STATUS_WORDS: dict[str, str] = {"new": "New", "update": "Updates", "skipped": "Not imported"}


@dataclass(frozen=True, slots=True)
class GridCell:
    """One cell: its ``text`` as in the file and its ``problem`` (``""``: none)."""

    text: str
    problem: str = ""

    @property
    def bad(self) -> bool:
        """True for a cell with a problem."""
        return bool(self.problem)


@dataclass(frozen=True, slots=True)
class PreviewGrid:
    """The rows of ``table`` with the problems of ``preview`` put on their cells.

    ``headers``: the file's headers; ``fields``: the field each column is read as (``""``:
    ignored); ``row_numbers``: the spreadsheet row of each grid row (the header is row 1);
    ``file_problems``: problems of the whole file (a required column missing...).
    """

    table: RawTable
    fields: tuple[str, ...]
    row_numbers: tuple[int, ...]
    _cell_problems: dict[tuple[int, int], str]
    _row_problems: dict[int, str]
    _header_problems: dict[int, str]
    _status: dict[int, RowStatus]
    file_problems: tuple[str, ...] = ()

    @property
    def headers(self) -> tuple[str, ...]:
        """The file's headers, one per column."""
        return self.table.headers

    @property
    def row_count(self) -> int:
        """How many rows the grid shows (every data row read)."""
        return len(self.row_numbers)

    @property
    def column_count(self) -> int:
        """How many columns: the file's headers."""
        return len(self.table.headers)

    def cell(self, index: int, column: int) -> GridCell:
        """The cell of grid row ``index`` (0-based) and ``column`` (0-based)."""
        number, cells = self.table.rows[index]
        text = cells[column] if column < len(cells) else ""
        return GridCell(text, self._cell_problems.get((number, column), ""))

    def status(self, index: int) -> RowStatus:
        """``new``, ``update`` (an opening the building has) or ``skipped`` (a row with a
        problem, or every row when the file cannot be read as a whole)."""
        return self._status.get(self.row_numbers[index], "skipped")

    def row_problem(self, index: int) -> str:
        """Problems of the row that are in no one cell (``""``: none)."""
        return self._row_problems.get(self.row_numbers[index], "")

    def header_problem(self, column: int) -> str:
        """The problem of a column as a whole (row 1 of the file; ``""``: none)."""
        return self._header_problems.get(column, "")

    def bad_cells(self) -> list[tuple[int, int]]:
        """Every marked cell as (grid row, column), in row order."""
        index_of = {n: i for i, n in enumerate(self.row_numbers)}
        return sorted((index_of[r], c) for r, c in self._cell_problems if r in index_of)

    def index_of_row(self, row_number: int) -> int | None:
        """The grid row of spreadsheet row ``row_number``, or ``None``."""
        try:
            return self.row_numbers.index(row_number)
        except ValueError:
            return None


def _join(old: str, new: str) -> str:
    return f"{old}; {new}" if old else new


def preview_grid(table: RawTable, preview: ImportPreview) -> PreviewGrid:
    """The grid of ``table`` with the problems of ``preview`` (made from that table)."""
    letters = {column_letter(i): i for i in range(max(len(table.headers), 1) + 64)}
    cell_problems: dict[tuple[int, int], str] = {}
    row_problems: dict[int, str] = {}
    header_problems: dict[int, str] = {}
    file_problems: list[str] = []
    for p in preview.problems:
        column = letters.get(p.letter) if p.letter else None
        if column is None and p.column and p.column in table.headers:
            column = table.headers.index(p.column)
        if column is not None and column >= len(table.headers):
            column = None  # a cell beyond the last header: the row's problem
        if p.row <= 1 and column is None:
            file_problems.append(p.message)
        elif p.row == 1 and column is not None:
            header_problems[column] = _join(header_problems.get(column, ""), p.message)
        elif column is not None:
            key = (p.row, column)
            cell_problems[key] = _join(cell_problems.get(key, ""), p.message)
        else:
            row_problems[p.row] = _join(row_problems.get(p.row, ""), p.message)
    updates = set(preview.updates)
    status: dict[int, RowStatus] = {}
    for number, opening in zip(preview.rows, preview.openings, strict=True):
        status[number] = "update" if opening.id in updates else "new"
    fields = tuple(preview.mapping.get(h, "") if h else "" for h in table.headers)
    return PreviewGrid(
        table=table,
        fields=fields,
        row_numbers=tuple(n for n, _ in table.rows),
        _cell_problems=cell_problems,
        _row_problems=row_problems,
        _header_problems=header_problems,
        _status=status,
        file_problems=tuple(file_problems),
    )
