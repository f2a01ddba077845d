"""Finding openings and making new ids and floors for the editor. No Qt."""

from __future__ import annotations

from collections.abc import Iterable
from typing import Any

from petfall_audit.model import BALCONY_LIKE, WINDOW_KINDS, Building, Floor, Opening, OpeningKind

__all__ = ["fields_for_kind", "select_openings", "unique_id", "next_floor", "storey_heights_m",
           "elevations_for_storey_height", "next_floors", "applicable_openings"]

_OPENING_WINDOWS = WINDOW_KINDS - {OpeningKind.FIXED}

#: field -> (kinds a set value fits, when the value counts as set, why the others are skipped)
_FITS: dict[str, tuple[frozenset[OpeningKind], Any, str]] = {
    "limiter_gap_mm": (_OPENING_WINDOWS, lambda v: v is not None,
                       "a limiter fits opening windows only"),
    "escape_window": (_OPENING_WINDOWS, bool,
                      "only an opening window can be an emergency escape window"),
    "projection_m": (BALCONY_LIKE, lambda v: v is not None and v > 0,
                     "only balconies, terraces and galleries stand out from the facade"),
}


def fields_for_kind(opening: Opening, kind: OpeningKind) -> dict[str, Any]:
    """The fields of ``opening`` that no longer apply once it becomes ``kind``, with the value
    they take: a window sits in the wall (projection 0); a limiter and the escape-window mark fit
    opening windows only. Empty when nothing has to change."""
    changes: dict[str, Any] = {}
    if kind in WINDOW_KINDS and opening.projection_m != 0:
        changes["projection_m"] = 0.0
    if kind not in _OPENING_WINDOWS:
        if opening.limiter_gap_mm is not None:
            changes["limiter_gap_mm"] = None
        if opening.escape_window:
            changes["escape_window"] = False
    return changes


def applicable_openings(building: Building, ids: Iterable[str], field: str,
                        value: Any) -> tuple[list[str], list[str], str]:
    """Split ``ids`` into the openings that setting ``field`` to ``value`` fits and those it
    does not (e.g. a limiter on a balcony); returns ``(fits, skipped, why)``. Clearing a value
    fits every opening."""
    ids = list(ids)
    rule = _FITS.get(field)
    if rule is None or not rule[1](value):
        return ids, [], ""
    kinds, _is_set, why = rule
    kind_of = {o.id: o.kind for o in building.openings}
    fits = [i for i in ids if kind_of.get(i) in kinds or i not in kind_of]
    chosen = set(fits)
    return fits, [i for i in ids if i not in chosen], why


def select_openings(
    building: Building,
    *,
    facades: Iterable[str] | None = None,
    kinds: Iterable[OpeningKind | str] | None = None,
    levels: Iterable[int] | None = None,
) -> list[str]:
    """Ids of the openings on any of ``facades``, of any of ``kinds``, on any of ``levels``.

    ``None`` for a criterion means any. E.g. every south balcony:
    ``select_openings(b, facades=["south"], kinds=["balcony"])``.
    """
    facade_set = None if facades is None else set(facades)
    kind_set = None if kinds is None else {OpeningKind(k) for k in kinds}
    level_set = None if levels is None else set(levels)
    return [
        o.id
        for o in building.openings
        if (facade_set is None or o.facade in facade_set)
        and (kind_set is None or o.kind in kind_set)
        and (level_set is None or o.floor in level_set)
    ]


def unique_id(existing: Iterable[str], base: str) -> str:
    """``base`` if unused, else ``base-2``, ``base-3``..."""
    used = set(existing)
    if base not in used:
        return base
    n = 2
    while f"{base}-{n}" in used:
        n += 1
    return f"{base}-{n}"


def storey_heights_m(building: Building) -> dict[int, float | None]:
    """Height (m) from each floor to the next one up, by level; ``None`` for the top floor."""
    floors = sorted(building.floors, key=lambda f: f.level)
    out: dict[int, float | None] = {}
    for lower, upper in zip(floors, [*floors[1:], None], strict=True):
        out[lower.level] = None if upper is None else upper.elevation_m - lower.elevation_m
    return out


def elevations_for_storey_height(building: Building, level: int,
                                 height_m: float) -> dict[int, float]:
    """New elevations (m) when the floor at ``level`` gets storey height ``height_m``.

    Every floor above moves by the same amount, so their own storey heights stay as they are.
    """
    floors = sorted(building.floors, key=lambda f: f.level)
    index = next(i for i, f in enumerate(floors) if f.level == level)
    if index == len(floors) - 1:
        raise ValueError("the top floor has no storey above it")
    delta = floors[index].elevation_m + height_m - floors[index + 1].elevation_m
    return {f.level: f.elevation_m + delta for f in floors[index + 1:]}


def next_floors(building: Building, count: int) -> list[Floor]:
    """``count`` new floors above the top one, each one storey up (see :func:`next_floor`)."""
    out: list[Floor] = []
    b = building
    for _ in range(max(0, count)):
        floor = next_floor(b)
        out.append(floor)
        b = Building(info=b.info, floors=(*b.floors, floor))
    return out


def next_floor(building: Building) -> Floor:
    """A new floor above the top one, one storey up (the top storey's height, else 3 m).

    The 3 m default only applies when the building has a single floor; the user edits it.
    """
    floors = sorted(building.floors, key=lambda f: f.level)
    if not floors:
        return Floor(level=0, label="Ground floor", elevation_m=0.0)
    top = floors[-1]
    storey_m = top.elevation_m - floors[-2].elevation_m if len(floors) > 1 else 3.0
    level = top.level + 1
    return Floor(level=level, label=f"Level {level}", elevation_m=top.elevation_m + storey_m)
