"""Step 4 of a schedule import: merge a preview into the building, or replace its openings.

A preview with problems is refused unless the caller accepts the valid rows; a row with any
problem is never applied in part. Facades the schedule names and the building lacks are created
(see :func:`new_facades` for their length).
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Mapping, Sequence
from typing import TYPE_CHECKING, Any, Literal

from petfall_audit.errors import ScheduleImportError
from petfall_audit.io.schedule.columns import FLOOR_FIELDS, OPENING_DEFAULTS
from petfall_audit.limits import LIMITS
from petfall_audit.model import Building, Facade, Floor, Opening
from petfall_audit.present.numbers import fmt_count

if TYPE_CHECKING:
    from petfall_audit.io.schedule.preview import ImportPreview

__all__ = ["apply_import", "merged", "new_facades", "unused_facades", "opening_of",
           "FACADE_MARGIN_MIN_M"]

#: The least margin a new facade gets beyond its furthest opening (m): about the width of a
#: wall end and a downpipe (common practice, no source).
FACADE_MARGIN_MIN_M = 1.0


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
    the facades it names are created (see :func:`new_facades`); other floors and surfaces stay,
    and so do other facades but for the unused ones of a building with no opening yet
    (:func:`unused_facades`).

    Raises :class:`ScheduleImportError` if the preview has problems and ``accept_valid_rows`` is
    false, if no row is valid, or if the building no longer fits the preview.
    """
    if mode not in ("merge", "replace"):
        raise ValueError(f"mode must be 'merge' or 'replace', not {mode!r}")
    if preview.problems and not accept_valid_rows:
        raise ScheduleImportError(
            f"the schedule has {fmt_count(len(preview.problems), 'problem')} in "
            f"{fmt_count(len(preview.bad_rows), 'row')}; fix them, or accept the valid rows only"
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
    return merged(building, preview.openings, preview.values, preview.floors, mode)


def merged(
    building: Building,
    openings: Sequence[Opening],
    values: Sequence[Mapping[str, Any]],
    new_floors: Sequence[Floor],
    mode: str,
) -> Building:
    floors = {f.level: f for f in building.floors}
    floors.update({f.level: f for f in new_floors})
    dropped = set(unused_facades(building, openings))
    facades = [f for f in building.facades if f.id not in dropped]
    known = {f.id for f in building.facades}
    facades.extend(f for f in new_facades(openings, building) if f.id not in known)
    surfaces = tuple(s for s in building.surfaces if s.facade is None or s.facade not in dropped)
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
        surfaces=surfaces,
        openings=tuple(result),
    )


def opening_of(values: Mapping[str, Any]) -> Opening:
    fields = {k: v for k, v in values.items() if k not in FLOOR_FIELDS}
    return Opening(**{**OPENING_DEFAULTS, **fields})


def new_facades(openings: Sequence[Opening], building: Building) -> tuple[Facade, ...]:
    """Facades the openings name that the building lacks.

    Each is as long as its furthest opening reaches (``x + width``) plus a margin as wide as the
    space before its first opening, at least :data:`FACADE_MARGIN_MIN_M`, rounded up to 0.1 m:
    openings usually sit inset from both ends of a wall, and a facade that ends flush with its
    last opening leaves no room to place the next one. The user corrects it in the editor."""
    known = {f.id for f in building.facades}
    reach: dict[str, float] = {}
    start: dict[str, float] = {}
    for o in openings:
        if o.facade not in known:
            reach[o.facade] = max(reach.get(o.facade, 0.0), o.x_m + o.width_m)
            start[o.facade] = min(start.get(o.facade, math.inf), o.x_m)
    out = []
    for name, end in reach.items():
        margin = max(start[name], FACADE_MARGIN_MIN_M)
        length = min(math.ceil(round((end + margin) * 10.0, 6)) / 10.0, LIMITS.length_max_m)
        out.append(Facade(id=name, length_m=max(length, round(end, 3)), label=name))
    return tuple(out)


def unused_facades(building: Building, openings: Sequence[Opening]) -> tuple[str, ...]:
    """Facades an import removes: in a building with no opening yet (a new, blank building),
    the facades no imported opening stands on, when the import brings facades of its own.
    Surfaces in front of only such a facade go with it."""
    if building.openings:
        return ()
    used = {o.facade for o in openings}
    known = {f.id for f in building.facades}
    if not used - known:  # the schedule uses the building's own facades: keep them all
        return ()
    return tuple(f.id for f in building.facades if f.id not in used)
