"""Exceptions raised by petfall_audit.

::

    PetfallError                    base of everything this package raises on purpose
    ├── BuildingFileError           a building file cannot be read into a model
    │   ├── FileFormatError         not a building file, or from a newer version
    │   └── ValidationFailed        a list of located problems (``.problems``)
    ├── CatalogueError              a control catalogue cannot be read (``.problems``)
    ├── CodeProfileError            a code profile cannot be read (``.problems``)
    ├── ScheduleImportError         a schedule spreadsheet cannot be imported
    ├── ModelImportError            a building model (IFC) cannot be imported
    ├── PlanError                   the budgeted fix plan cannot be solved
    ├── ReportError                 a report or export cannot be written
    └── EditRefused                 an edit would add problems to the building (``.problems``);
                                    also a ``ValueError`` (in :mod:`petfall_audit.editing`)

Invalid arguments to the computation functions raise the built-in ``ValueError``, naming the
argument.
"""

from __future__ import annotations

__all__ = [
    "PetfallError",
    "BuildingFileError",
    "FileFormatError",
    "ValidationFailed",
    "Place",
    "Problem",
    "CatalogueError",
    "CodeProfileError",
    "ScheduleImportError",
    "ModelImportError",
    "PlanError",
    "ReportError",
]

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Literal

from petfall_audit.reasons import Reason
from petfall_audit.safe_text import MAX_MESSAGE_CHARS, cut


@dataclass(frozen=True, slots=True)
class Place:
    """Where in a document a problem is.

    ``section``: a part of the building file (``"openings"``, ``"floors"``, ``"info"``,
    ``"cat_profile"`` ...) or another source's place (``"clipboard"``, ``"line 4, Width"``);
    ``index``: the item's position in a list section (``None``: the section itself, or a
    section that is not a list); ``field``: the field of the item or section (``"floor"``,
    ``"photos[0]"``, ``"mass_kg.sd"``; empty: the whole item). Its text form
    (``str(place)``, ``openings[12].floor``) is the path in the file.
    """

    section: str = ""
    index: int | None = None
    field: str = ""

    def __str__(self) -> str:
        head = self.section + (f"[{self.index}]" if self.index is not None else "")
        if head and self.field:
            return f"{head}.{self.field}"
        return head or self.field

    @classmethod
    def of_path(cls, parts: Sequence[str | int]) -> Place:
        """A place from the parts of a path in the file, as a JSON validator gives them
        (``("openings", 12, "floor")``, ``("cat_profile", "mass_kg", "sd")``)."""
        items = list(parts)
        if not items:
            return cls()
        section = str(items.pop(0))
        index: int | None = None
        if items and isinstance(items[0], int) and not isinstance(items[0], bool):
            index = int(items.pop(0))
        field = ""
        for part in items:
            if isinstance(part, int) and not isinstance(part, bool):
                field += f"[{part}]"
            else:
                field += f".{part}" if field else str(part)
        return cls(section, index, field)


@dataclass(frozen=True, slots=True, init=False)
class Problem:
    """One located problem: ``place`` (a :class:`Place`; ``where`` is its text form, like
    ``openings[12].floor``), ``message`` in plain words.

    ``severity``: ``"error"`` (the building cannot be assessed until it is fixed) or
    ``"warning"`` (information still missing that the assessment assumes; see
    :func:`petfall_audit.io.survey.survey_warnings`). Built with a :class:`Place`, or with a
    text for a place that has no parts (``"clipboard"``, ``"line 4, Width"``): the text is
    then the place's section as it is, never read back into parts. In words for people:
    :func:`petfall_audit.editing.words.place_words`. ``reason``: where the message states
    numbers (a value out of its range), the same finding as a code with SI values, so that a
    reader sees it in their own units (:func:`petfall_audit.present.explain.explain`);
    ``message`` is its metric wording.
    """

    where: str
    message: str
    severity: Literal["error", "warning"]
    place: Place
    reason: Reason | None

    def __init__(self, where: str | Place, message: str,
                 severity: Literal["error", "warning"] = "error", place: Place | None = None,
                 reason: Reason | None = None) -> None:
        if place is None:
            place = where if isinstance(where, Place) else Place(str(where))
        # a message never grows with the value it is about (long values are cut)
        object.__setattr__(self, "where", cut(str(place), 200))
        object.__setattr__(self, "message", cut(message, MAX_MESSAGE_CHARS))
        object.__setattr__(self, "severity", severity)
        object.__setattr__(self, "place", place)
        object.__setattr__(self, "reason", reason)

    @property
    def is_warning(self) -> bool:
        return self.severity == "warning"

    def __str__(self) -> str:
        text = f"{self.where}: {self.message}" if self.where else self.message
        return f"warning: {text}" if self.is_warning else text


class PetfallError(Exception):
    """Base class of the errors this package raises on purpose."""


class BuildingFileError(PetfallError):
    """A building file cannot be read into a model."""


class FileFormatError(BuildingFileError):
    """The file is not a building file, or was written by a newer version."""


class ValidationFailed(BuildingFileError):
    """The document has problems; ``problems`` lists them all, each with its place.

    ``building`` is the whole building as read when every item of the file could be read (the
    problems are then in how the items fit together, e.g. nothing below a facade), else
    ``None``; the app can open it for the user to complete."""

    def __init__(self, problems: list[Problem], building: object | None = None) -> None:
        self.problems = list(problems)
        self.building = building
        super().__init__("\n".join(str(p) for p in self.problems))


class CatalogueError(PetfallError):
    """A control catalogue cannot be read; ``problems`` lists each located problem."""

    def __init__(self, problems: Sequence[Problem], source: str = "") -> None:
        self.problems = list(problems)
        head = f"{source}: " if source else ""
        super().__init__(
            head + "invalid control catalogue:\n" + "\n".join(f"  {p}" for p in self.problems)
        )


class CodeProfileError(PetfallError):
    """A code profile cannot be read; ``problems`` lists each located problem."""

    def __init__(self, problems: Sequence[Problem], source: str = "") -> None:
        self.problems = list(problems)
        head = f"{source}: " if source else ""
        super().__init__(
            head + "invalid code profile:\n" + "\n".join(f"  {p}" for p in self.problems)
        )


class ScheduleImportError(PetfallError):
    """A schedule spreadsheet cannot be imported."""


class ModelImportError(PetfallError):
    """A building model (IFC) cannot be read or imported."""


class PlanError(PetfallError):
    """The budgeted fix plan cannot be solved."""


class ReportError(PetfallError):
    """A report or export cannot be written."""
