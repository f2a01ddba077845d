"""Exceptions raised by petfall_audit.

::

    PetfallError                    base of everything this package raises on purpose
    ├── BuildingFileError           a building file cannot be read into a model
    │   ├── FileFormatError         not a building file, or from a newer version
    │   └── ValidationFailed        a list of located problems (``.problems``)
    ├── CatalogueError              a control catalogue cannot be read (``.problems``)
    ├── ScheduleImportError         a schedule spreadsheet cannot be imported
    ├── PlanError                   the budgeted fix plan cannot be solved
    └── ReportError                 a report or export cannot be written

Invalid arguments to the computation functions raise the built-in ``ValueError``, naming the
argument.
"""

from __future__ import annotations

__all__ = [
    "PetfallError",
    "BuildingFileError",
    "FileFormatError",
    "ValidationFailed",
    "Problem",
    "CatalogueError",
    "ScheduleImportError",
    "PlanError",
    "ReportError",
]

from collections.abc import Sequence
from dataclasses import dataclass

from petfall_audit.safe_text import MAX_MESSAGE_CHARS, cut


@dataclass(frozen=True, slots=True)
class Problem:
    """One located problem: ``where`` like ``openings[12].floor``, ``message`` in plain words."""

    where: str
    message: str

    def __post_init__(self) -> None:
        # a message never grows with the value it is about (long values are cut)
        object.__setattr__(self, "where", cut(self.where, 200))
        object.__setattr__(self, "message", cut(self.message, MAX_MESSAGE_CHARS))

    def __str__(self) -> str:
        return f"{self.where}: {self.message}" if self.where else self.message


class PetfallError(Exception):
    """Base class of the errors this package raises on purpose."""


class BuildingFileError(PetfallError):
    """A building file cannot be read into a model."""


class FileFormatError(BuildingFileError):
    """The file is not a building file, or was written by a newer version."""


class ValidationFailed(BuildingFileError):
    """The document has problems; ``problems`` lists them all, each with its place."""

    def __init__(self, problems: list[Problem]) -> None:
        self.problems = list(problems)
        super().__init__("\n".join(str(p) for p in self.problems))


class CatalogueError(PetfallError):
    """A control catalogue cannot be read; ``problems`` lists each located problem."""

    def __init__(self, problems: Sequence[Problem], source: str = "") -> None:
        self.problems = list(problems)
        head = f"{source}: " if source else ""
        super().__init__(
            head + "invalid control catalogue:\n" + "\n".join(f"  {p}" for p in self.problems)
        )


class ScheduleImportError(PetfallError):
    """A schedule spreadsheet cannot be imported."""


class PlanError(PetfallError):
    """The budgeted fix plan cannot be solved."""


class ReportError(PetfallError):
    """A report or export cannot be written."""
