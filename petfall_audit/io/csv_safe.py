"""Spreadsheet-safe CSV cells: no text from a building file reaches a spreadsheet as a formula.

A spreadsheet program that opens a CSV file treats a cell starting with ``=``, ``+``, ``-`` or
``@`` as a formula, and some also after a leading tab or carriage return. Ids, names and notes
come from the user's files, so every CSV this tool writes passes each cell through
:func:`safe_cell`: a text cell starting with one of those characters gets a leading apostrophe
(``'=1+1``), which spreadsheet programs show as text and never evaluate (the neutralisation
recommended by the OWASP "CSV Injection" page). Numbers stay numbers: an ``int`` or ``float``
and a text that is a plain decimal number (``-0.5``, ``+3``, ``1e-3``) are written unchanged.
Line breaks inside a cell are written as ``\n`` so that the cell is quoted: a bare carriage
return would otherwise end the row in a spreadsheet program and start the next with a formula.

Every CSV writer of the package calls :func:`csv_writer` (or :func:`safe_row`); there is no
other way out.
"""

from __future__ import annotations

import csv
import re
from collections.abc import Iterable
from typing import IO, Any, Protocol

__all__ = ["FORMULA_STARTS", "safe_cell", "safe_row", "csv_writer", "SafeWriter"]

#: First characters that make a spreadsheet read a cell as a formula.
FORMULA_STARTS: tuple[str, ...] = ("=", "+", "-", "@", "\t", "\r", "\n")

_NUMBER = re.compile(r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?")


def safe_cell(value: object) -> object:
    """``value`` as it may go into a CSV cell: text that a spreadsheet would read as a formula
    gets a leading apostrophe; numbers (and text that is a plain number) are left alone."""
    if isinstance(value, bool) or not isinstance(value, str):
        return value
    # A lone carriage return is not quoted by the csv module (only the line terminator's
    # characters are) and spreadsheet programs read it as the end of a row: a cell
    # "\r=1" would start a new row with a formula. Line breaks inside a cell become "\n",
    # which is quoted.
    value = value.replace("\r\n", "\n").replace("\r", "\n")
    if value.startswith(FORMULA_STARTS) and not _NUMBER.fullmatch(value):
        return "'" + value
    return value


def safe_row(row: Iterable[object]) -> list[object]:
    """Every cell of ``row`` through :func:`safe_cell`."""
    return [safe_cell(v) for v in row]


class _Writer(Protocol):
    def writerow(self, row: Iterable[Any], /) -> Any: ...


class SafeWriter:
    """A :func:`csv.writer` whose rows pass through :func:`safe_row`."""

    def __init__(self, inner: _Writer) -> None:
        self._inner = inner

    def writerow(self, row: Iterable[object]) -> None:
        """Write one row, neutralised."""
        self._inner.writerow(safe_row(row))

    def writerows(self, rows: Iterable[Iterable[object]]) -> None:
        """Write many rows, neutralised."""
        for row in rows:
            self.writerow(row)


def csv_writer(fh: IO[str], *, lineterminator: str = "\n") -> SafeWriter:
    """A spreadsheet-safe CSV writer on the text stream ``fh``."""
    return SafeWriter(csv.writer(fh, lineterminator=lineterminator))
