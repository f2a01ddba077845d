"""What an imported opening still needs from a survey, and the warnings ``check`` lists for it.

An import from a building model (IFC) knows the geometry of each opening but not the things a
model does not hold: the guard's gaps, a limiter, a screen or netting, how often the opening
stands open, whether cats live behind it. The building file has no "unknown" value for most of
these, so the import writes them into the opening's notes as one line that starts with
:data:`SURVEY_PREFIX`, and :func:`survey_warnings` turns each such line into a located warning.
Delete the line from the notes once the opening has been surveyed.
"""

from __future__ import annotations

from collections.abc import Iterable
from pathlib import Path

from petfall_audit.errors import Place, Problem
from petfall_audit.io._checks import code_profile_warnings
from petfall_audit.io.photos import missing_photo_warnings
from petfall_audit.model import Building

__all__ = [
    "SURVEY_PREFIX",
    "survey_line",
    "still_to_survey",
    "survey_warnings",
    "check_warnings",
    "code_profile_warnings",
]

#: The notes line that lists what is still to be surveyed (one line, items separated by ``;``).
SURVEY_PREFIX = "Still to survey:"


def survey_line(items: Iterable[str]) -> str:
    """The notes line for ``items``: ``"Still to survey: a; b; c."``."""
    return f"{SURVEY_PREFIX} {'; '.join(items)}."


def still_to_survey(notes: str) -> tuple[str, ...]:
    """The items of the survey line in ``notes`` (empty when there is none)."""
    for line in notes.splitlines():
        line = line.strip()
        if line.startswith(SURVEY_PREFIX):
            body = line[len(SURVEY_PREFIX):].strip().rstrip(".")
            return tuple(item.strip() for item in body.split(";") if item.strip())
    return ()


def survey_warnings(building: Building) -> list[Problem]:
    """One warning per opening whose notes still list items to survey, located like the file
    (``openings[3]``); the assessment uses the file's values (often the defaults) until then."""
    warnings: list[Problem] = []
    for i, opening in enumerate(building.openings):
        items = still_to_survey(opening.notes)
        if items:
            warnings.append(
                Problem(
                    Place("openings", i),
                    f"{opening.id!r} (level {opening.floor}): not surveyed yet, the file holds "
                    f"defaults for: {', '.join(items)}; survey them, then delete the "
                    f"'{SURVEY_PREFIX}' line from its notes",
                    severity="warning",
                )
            )
    return warnings


def check_warnings(building: Building, folder: Path | None = None) -> list[Problem]:
    """Every warning ``check`` lists: the openings still to survey, then what the building's code
    profile finds (an escape window whose limiter leaves less than the minimum clear opening),
    then, when the building file's ``folder`` is given, the photos it names that are not there."""
    photos = missing_photo_warnings(building, folder) if folder is not None else []
    return [*survey_warnings(building), *code_profile_warnings(building), *photos]
