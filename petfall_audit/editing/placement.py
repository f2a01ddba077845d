"""Where a new opening goes: the floor and facade the user works on, at a free place that the
building's rules accept. No Qt."""

from __future__ import annotations

import dataclasses
from collections.abc import Iterable

from petfall_audit.editing.commands import new_problems
from petfall_audit.editing.document import validate
from petfall_audit.errors import Problem
from petfall_audit.model import Building, Opening, OpeningKind

__all__ = ["new_opening", "free_x_m", "duplicates"]

#: Width (m) and projection (m) of a new balcony before the user measures it.
NEW_WIDTH_M = 1.0
NEW_PROJECTION_M = 1.0


def free_x_m(building: Building, level: int, facade: str, width_m: float = NEW_WIDTH_M) -> float:
    """Left edge (m along the facade) of a free place ``width_m`` wide on ``facade`` at
    ``level``: right of the openings already there, or 0 when the facade has no room left."""
    taken = sorted((o.x_m, o.x_m + o.width_m) for o in building.openings
                   if o.floor == level and o.facade == facade)
    length_m = next((f.length_m for f in building.facades if f.id == facade), None)
    x = 0.0
    for start, end in taken:
        if x + width_m <= start + 1e-9:
            break
        x = max(x, end)
    if length_m is not None and x + width_m > length_m + 1e-9:
        return 0.0
    return round(x, 3)


def duplicates(building: Building, ids: Iterable[str]) -> list[Opening]:
    """Copies of the openings ``ids``: same floor, facade and every field, a new id
    (``<id>-copy``, ``<id>-copy-2``...) and the next free place along the facade."""
    used = {o.id for o in building.openings}
    trial = building
    out: list[Opening] = []
    for oid in ids:
        source = building.opening(oid)
        new_id = _unique(used, f"{source.id}-copy")
        used.add(new_id)
        x_m = free_x_m(trial, source.floor, source.facade, source.width_m)
        copy = dataclasses.replace(source, id=new_id, x_m=x_m, photos=())
        trial = dataclasses.replace(trial, openings=(*trial.openings, copy))
        out.append(copy)
    return out


def _unique(existing: set[str], base: str) -> str:
    if base not in existing:
        return base
    n = 2
    while f"{base}-{n}" in existing:
        n += 1
    return f"{base}-{n}"


def _candidates(building: Building, level: int | None,
                facade: str | None) -> Iterable[tuple[int, str]]:
    """Places to try, best first: the floor and facade asked for; then, when only a floor was
    asked for, that floor on the other facades; then the facade (asked for, else the first)
    from its lowest floor up; then every other facade."""
    levels = [f.level for f in sorted(building.floors, key=lambda f: f.level)]
    facades = [f.id for f in building.facades]
    if facade not in facades:
        facade = None
    if level not in levels:
        level = None
    order: list[tuple[int, str]] = []
    if level is not None:
        order += [(level, fa) for fa in ([facade] if facade else facades)]
    for fa in [facade or facades[0], *facades]:
        order += [(lv, fa) for lv in levels]
    yield from dict.fromkeys(order)


def new_opening(building: Building, *, level: int | None = None,
                facade: str | None = None) -> tuple[Opening | None, list[Problem]]:
    """A new balcony for ``building``, on ``level`` and ``facade`` when given (the floor and
    facade the user works on), at a free place; when the rules refuse it there (a surface below
    stands above that floor, say), the next floor up or the next facade that accepts it.

    Returns ``(opening, [])``, or ``(None, problems)`` with the reasons the preferred place was
    refused when no floor and facade accept a new opening."""
    if not building.floors or not building.facades:
        return None, [Problem("openings", "add a floor and a facade first")]
    before = validate(building)
    used = {o.id for o in building.openings}
    first_refusal: list[Problem] | None = None
    for lv, fa in _candidates(building, level, facade):
        x_m = free_x_m(building, lv, fa)
        opening = Opening(id=_unique(used, f"{fa}-{lv:02d}-new"), floor=lv, facade=fa,
                          kind=OpeningKind.BALCONY, x_m=x_m, width_m=NEW_WIDTH_M,
                          projection_m=NEW_PROJECTION_M)
        trial = dataclasses.replace(building, openings=(*building.openings, opening))
        added = new_problems(before, validate(trial))
        if not added:
            return opening, []
        if first_refusal is None:
            first_refusal = added
    return None, first_refusal or []
