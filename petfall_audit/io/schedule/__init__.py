"""Import floors and openings from a window and balcony schedule (CSV or XLSX).

Four steps, each usable on its own (the desktop dialog drives them one by one), one module each:

1. :func:`read_table` (:mod:`.read`) reads the active visible sheet (or the CSV) into a
   :class:`RawTable` of strings.
2. :func:`guess_mapping` (:mod:`.mapping`) guesses which field each header holds;
   :func:`header_units` reads units from headers such as ``Width (in)``. Both results are plain
   dicts the user may edit, or :func:`load_mapping` reads them from a JSON file.
3. :func:`preview_import` (:mod:`.preview`) parses every row against the current building and
   returns an :class:`ImportPreview`: the openings and floors it would add or change and every
   problem, located by spreadsheet row (the header is row 1) and column; :func:`preview_grid`
   (:mod:`.grid`) lays the rows out as a grid with the bad cells marked, in the file's units.
4. :func:`apply_import` (:mod:`.apply`) merges the preview into the building, or replaces its
   openings. It refuses a preview with problems unless the caller accepts the valid rows; a row
   with any problem is never applied in part.

Each cell is read by :mod:`.cells`. The columns (:mod:`.columns`) come from the field registry
(:mod:`petfall_audit.field_registry`). Lengths are read with :mod:`petfall_audit.units`: a unit
in the cell wins over a unit in the header, which wins over the column's own default (metres, or
millimetres for gaps). The file format, the column list and the rules are described in
``docs/schedule-import.md``.
"""

from __future__ import annotations

from petfall_audit.io.schedule.apply import apply_import
from petfall_audit.io.schedule.columns import (
    COLUMNS,
    FLOOR_FIELDS,
    ColumnSpec,
    Kind,
    column_letter,
)
from petfall_audit.io.schedule.grid import GridCell, PreviewGrid, preview_grid
from petfall_audit.io.schedule.mapping import (
    LoadedMapping,
    combine_mapping,
    guess_mapping,
    header_units,
    load_mapping,
)
from petfall_audit.io.schedule.preview import ImportPreview, ImportProblem, preview_import
from petfall_audit.io.schedule.read import (
    MAX_CELL_CHARS,
    MAX_COLUMNS,
    MAX_FILE_BYTES,
    MAX_ROWS,
    MAX_SHEET_XML_BYTES,
    RawTable,
    read_table,
)

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
    "GridCell",
    "PreviewGrid",
    "preview_grid",
]
