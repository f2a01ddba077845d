"""Undoable edits of a :class:`~petfall_audit.editing.document.Document`.

Every edit is a command with ``do(doc)``, ``undo(doc)`` and a ``label`` for the Edit menu.
A command computes a new immutable :class:`~petfall_audit.model.Building` from the current one,
checks it with the building file's validation rules and refuses (:class:`EditRefused`) rather
than apply a change that adds a problem; problems that were already there do not block it.
Undo puts back the very building object that was there before, so it restores the model exactly.

Commands are run by :class:`~petfall_audit.editing.history.History`; no Qt here.
"""

from __future__ import annotations

import dataclasses
import math
import re
from collections import Counter
from collections.abc import Hashable, Iterable, Mapping, Sequence
from enum import StrEnum
from typing import Any, get_type_hints

from petfall_audit.editing.document import Document, validate
from petfall_audit.errors import PetfallError, Place, Problem
from petfall_audit.field_registry import field_words, section_fields
from petfall_audit.model import (
    Building,
    BuildingInfo,
    CatProfile,
    Facade,
    Floor,
    InjuryThresholds,
    Opening,
    PlanSettings,
    Surface,
)
from petfall_audit.present.numbers import fmt_count

__all__ = [
    "EditRefused",
    "refusal_text",
    "Command",
    "BuildingCommand",
    "SetOpeningFields",
    "AddOpenings",
    "RemoveOpenings",
    "PasteOpenings",
    "AddFloors",
    "AddFloor",
    "PasteFloors",
    "RemoveFloor",
    "SetFloor",
    "SetFloorElevations",
    "CopyFloorOpenings",
    "SetBuildingInfo",
    "AddFacade",
    "RemoveFacade",
    "SetFacade",
    "AddSurface",
    "RemoveSurface",
    "SetSurface",
    "SetCatProfile",
    "SetInjuryModel",
    "SetPlanSettings",
    "SetFixStatus",
    "RecordFixes",
    "FitPlanFixes",
    "ReplaceBuilding",
    "DEFAULT_ID_PATTERN",
    "FACADE_LEVEL_PATTERN",
    "KEEP_NUMBERING",
    "copied_id",
    "copy_ids",
]

#: Pattern for the ids of copied openings by facade, level and number. Fields: ``{facade}``,
#: ``{level}``, ``{n}`` (1-based position of the opening on its facade on the source floor),
#: ``{id}`` (source id), ``{kind}`` and ``{label}`` (the target floor's label).
FACADE_LEVEL_PATTERN = "{facade}-{level:02d}-{n}"
#: The default: keep the copied ids' own numbering with the floor number replaced (``S01-B1``
#: on level 5 becomes ``S05-B1``); when the source ids carry no floor number, by
#: :data:`FACADE_LEVEL_PATTERN`.
KEEP_NUMBERING = ""
DEFAULT_ID_PATTERN = KEEP_NUMBERING


class EditRefused(PetfallError, ValueError):
    """An edit was refused because it would make the building invalid; ``problems`` says why."""

    def __init__(self, problems: Sequence[Problem], *, building: Building | None = None) -> None:
        self.problems = list(problems)
        #: The building the problems' places refer to (the edit's result), if known.
        self.building = building
        super().__init__("\n".join(str(p) for p in self.problems) or "edit refused")


def refusal_text(problems: Sequence[Problem], *, limit: int = 3) -> str:
    """The reasons of a refusal in plain words: each message once, at most ``limit`` of them."""
    messages = list(dict.fromkeys(p.message for p in problems))
    text = "; ".join(messages[:limit])
    if len(messages) > limit:
        more = len(messages) - limit
        text += f" (and {more} more problem{'s' if more != 1 else ''} like these)"
    return text or "edit refused"


_FLOOR_LEVEL = Place("floors", None, "level")


def _refuse(where: str | Place, message: str) -> EditRefused:
    return EditRefused([Problem(where, message)])


def _problem_key(problem: Problem) -> tuple[str, str, str]:
    # Indices shift when items are added or removed; compare problems without them.
    return problem.place.section, problem.place.field, problem.message


def new_problems(before: Sequence[Problem], after: Sequence[Problem]) -> list[Problem]:
    """Problems of ``after`` that ``before`` did not already have (as a multiset)."""
    remaining = Counter(_problem_key(p) for p in before)
    added = []
    for p in after:
        key = _problem_key(p)
        if remaining[key] > 0:
            remaining[key] -= 1
        else:
            added.append(p)
    return added


class Command:
    """Base of every edit: ``label`` for menus, ``do``/``undo`` on a document.

    ``merge_key``: two consecutive commands with the same non-``None`` key (typing into one
    field, a drag) become one undo step.
    """

    label: str = "Edit"
    merge_key: Hashable | None = None

    def do(self, doc: Document) -> None:  # pragma: no cover - abstract
        raise NotImplementedError

    def undo(self, doc: Document) -> None:  # pragma: no cover - abstract
        raise NotImplementedError

    def merge(self, other: Command) -> bool:
        """Absorb ``other`` (already done after this one); True if merged."""
        return False


class BuildingCommand(Command):
    """A command defined by :meth:`apply`, a pure function from one building to the next."""

    def __init__(self, label: str, merge_key: Hashable | None = None) -> None:
        self.label = label
        self.merge_key = merge_key
        self._before: Building | None = None
        self._after: Building | None = None
        self._after_problems: list[Problem] | None = None

    def apply(self, building: Building) -> Building:  # pragma: no cover - abstract
        raise NotImplementedError

    def do(self, doc: Document) -> None:
        before = doc.building
        if self._after is not None and before is self._before:  # redo: the same result again
            doc.set_building(self._after, problems=self._after_problems)
            return
        after = self.apply(before)
        after_problems = validate(after)
        added = new_problems(doc.problems(), after_problems)
        if added:
            raise EditRefused(added, building=after)
        self._before, self._after, self._after_problems = before, after, after_problems
        doc.set_building(after, problems=after_problems)

    def undo(self, doc: Document) -> None:
        if self._before is None:
            raise RuntimeError("undo of a command that was never done")
        doc.set_building(self._before)

    def merge(self, other: Command) -> bool:
        if (
            self.merge_key is None
            or other.merge_key != self.merge_key
            or not isinstance(other, BuildingCommand)
            or other._before is not self._after
        ):
            return False
        self._after, self._after_problems = other._after, other._after_problems
        return True


# --- field helpers -------------------------------------------------------------------------------


def _coerce_changes(cls: type, changes: Mapping[str, Any], where: str) -> dict[str, Any]:
    """Check field names of a model class and turn enum strings into enum members."""
    hints = get_type_hints(cls)
    names = {f.name for f in dataclasses.fields(cls)}
    out: dict[str, Any] = {}
    for name, value in changes.items():
        if name not in names:
            raise _refuse(Place(where, None, name), f"there is no field {name!r}")
        hint = hints[name]
        enum_types = [t for t in getattr(hint, "__args__", (hint,)) if isinstance(t, type)
                      and issubclass(t, StrEnum)]
        if enum_types and isinstance(value, str) and not isinstance(value, StrEnum):
            try:
                value = enum_types[0](value)
            except ValueError:
                allowed = ", ".join(m.value for m in enum_types[0])
                raise _refuse(Place(where, None, name), f"must be one of {allowed}") from None
        out[name] = value
    return out


def _replace_items(items: tuple[Any, ...], key: str, wanted: Iterable[Any], changes: dict[str, Any],
                   where: str) -> tuple[Any, ...]:
    wanted = set(wanted)
    found = set()
    out = []
    for item in items:
        k = getattr(item, key)
        if k in wanted:
            found.add(k)
            item = dataclasses.replace(item, **changes)
        out.append(item)
    missing = wanted - found
    if missing:
        raise _refuse(where, f"not found: {', '.join(map(str, sorted(missing, key=str)))}")
    return tuple(out)


def _named(noun: str, item_id: str) -> str:
    """``"surface P1"``; just ``"surface"`` when the id is the noun the app numbers new items
    with (``surface``, ``surface-2``), so that a label never reads "Add surface surface"."""
    if re.fullmatch(rf"{re.escape(noun)}(?:[-_ ]?\d+)?", item_id.strip().lower()):
        return noun
    return f"{noun} {item_id}"


# --- openings ------------------------------------------------------------------------------------


class SetOpeningFields(BuildingCommand):
    """Set fields (``{"netting_mesh_mm": 30.0}``) on the openings with ``ids``."""

    def __init__(self, ids: Iterable[str], changes: Mapping[str, Any], *, label: str | None = None,
                 merge_key: Hashable | None = None) -> None:
        self.ids = tuple(ids)
        if not self.ids:
            raise ValueError("ids: give at least one opening id")
        self.changes = _coerce_changes(Opening, changes, "openings")
        if "id" in self.changes and len(self.ids) > 1:
            raise _refuse(Place("openings", None, "id"), "several openings cannot take the same id")
        fields = field_words("openings", self.changes)
        target = self.ids[0] if len(self.ids) == 1 else fmt_count(len(self.ids), "opening")
        self._default_label = label is None
        self._base_label = label or f"Set {fields} of {target}"
        super().__init__(self._base_label, merge_key)

    def apply(self, building: Building) -> Building:
        from petfall_audit.editing.query import fields_for_kind

        openings = _replace_items(building.openings, "id", self.ids, self.changes, "openings")
        kind = self.changes.get("kind")
        if kind is not None:  # fields that no longer apply to the new kind, in the same step
            carried: set[str] = set()
            wanted = set(self.ids)
            out = []
            for o in openings:
                extra = {k: v for k, v in fields_for_kind(o, kind).items()
                         if k not in self.changes} if o.id in wanted else {}
                carried.update(extra)
                out.append(dataclasses.replace(o, **extra) if extra else o)
            openings = tuple(out)
            if carried and self._default_label:
                names = [f.name for f in section_fields("openings") if f.name in carried]
                self.label = f"{self._base_label} (and {field_words('openings', names)} to suit)"
        return dataclasses.replace(building, openings=openings)


class AddOpenings(BuildingCommand):
    """Add openings, at ``index`` in the list (default: the end)."""

    def __init__(self, openings: Iterable[Opening], *, index: int | None = None,
                 label: str | None = None) -> None:
        self.openings = tuple(openings)
        self.index = index
        what = self.openings[0].id if len(self.openings) == 1 else fmt_count(len(self.openings),
                                                                             "opening")
        super().__init__(label or f"Add {what}")

    def apply(self, building: Building) -> Building:
        existing = {o.id for o in building.openings}
        clash = sorted({o.id for o in self.openings} & existing)
        if clash:
            raise _refuse(Place("openings", None, "id"), f"id already used: {', '.join(clash)}")
        items = list(building.openings)
        at = len(items) if self.index is None else max(0, min(self.index, len(items)))
        items[at:at] = self.openings
        return dataclasses.replace(building, openings=tuple(items))


#: Fields a pasted row must give to make a new opening (an existing id needs only the id).
_NEW_OPENING_NEEDS = ("floor", "facade", "kind", "x_m", "width_m")


class PasteOpenings(BuildingCommand):
    """Rows pasted from a spreadsheet, as one step: a row whose id exists changes that opening
    (only the columns pasted), any other row adds an opening (it needs an id, floor, facade,
    kind, position and width). ``added`` and ``updated`` hold the ids after :meth:`do`."""

    def __init__(self, rows: Sequence[Mapping[str, Any]], *, label: str | None = None) -> None:
        self.rows = [dict(r) for r in rows]
        self.added: tuple[str, ...] = ()
        self.updated: tuple[str, ...] = ()
        super().__init__(label or f"Paste {fmt_count(len(self.rows), 'row')}")

    def apply(self, building: Building) -> Building:
        openings = list(building.openings)
        where = {o.id: k for k, o in enumerate(openings)}
        added: list[str] = []
        updated: list[str] = []
        for n, row in enumerate(self.rows, 1):
            values = _coerce_changes(Opening, row, "openings")
            oid = values.get("id")
            if oid is not None and oid in where:
                k = where[oid]
                openings[k] = dataclasses.replace(openings[k], **values)
                updated.append(oid)
                continue
            missing = [f for f in ("id", *_NEW_OPENING_NEEDS) if f not in values]
            if missing:
                names = field_words("openings", missing)
                raise _refuse(f"row {n}", f"a new opening needs {names}; the row has none")
            new = Opening(**values)
            where[new.id] = len(openings)
            openings.append(new)
            added.append(new.id)
        self.added, self.updated = tuple(added), tuple(updated)
        return dataclasses.replace(building, openings=tuple(openings))


class RemoveOpenings(BuildingCommand):
    """Remove the openings with ``ids``."""

    def __init__(self, ids: Iterable[str], *, label: str | None = None) -> None:
        self.ids = tuple(ids)
        what = self.ids[0] if len(self.ids) == 1 else fmt_count(len(self.ids), "opening")
        super().__init__(label or f"Remove {what}")

    def apply(self, building: Building) -> Building:
        wanted = set(self.ids)
        missing = wanted - {o.id for o in building.openings}
        if missing:
            raise _refuse("openings", f"not found: {', '.join(sorted(missing))}")
        return dataclasses.replace(
            building, openings=tuple(o for o in building.openings if o.id not in wanted)
        )


# --- floors --------------------------------------------------------------------------------------


def _sorted_floors(floors: Iterable[Floor]) -> tuple[Floor, ...]:
    return tuple(sorted(floors, key=lambda f: f.level))


class AddFloor(BuildingCommand):
    """Add a floor (kept in level order)."""

    def __init__(self, floor: Floor, *, label: str | None = None) -> None:
        self.floor = floor
        super().__init__(label or f"Add floor {floor.level}")

    def apply(self, building: Building) -> Building:
        if any(f.level == self.floor.level for f in building.floors):
            raise _refuse(_FLOOR_LEVEL, f"there is already a floor at level {self.floor.level}")
        return dataclasses.replace(building, floors=_sorted_floors((*building.floors, self.floor)))


class AddFloors(BuildingCommand):
    """Add several floors at once (kept in level order), one undo step."""

    def __init__(self, floors: Sequence[Floor], *, label: str | None = None) -> None:
        self.floors = tuple(floors)
        super().__init__(label or f"Add {fmt_count(len(self.floors), 'floor')}")

    def apply(self, building: Building) -> Building:
        taken = {f.level for f in building.floors}
        clash = sorted({f.level for f in self.floors} & taken)
        if clash or len({f.level for f in self.floors}) != len(self.floors):
            raise _refuse(_FLOOR_LEVEL, "there is already a floor at level "
                          + ", ".join(map(str, clash or [self.floors[0].level])))
        return dataclasses.replace(building,
                                   floors=_sorted_floors((*building.floors, *self.floors)))


class PasteFloors(BuildingCommand):
    """Rows pasted from a spreadsheet, as one step: a row whose level exists changes that
    floor (only the columns pasted), any other row adds a floor (it needs a level and a floor
    level above the datum). ``added`` and ``updated`` hold the levels after :meth:`do`."""

    def __init__(self, rows: Sequence[Mapping[str, Any]], *, label: str | None = None) -> None:
        self.rows = [dict(r) for r in rows]
        self.added: tuple[int, ...] = ()
        self.updated: tuple[int, ...] = ()
        super().__init__(label or f"Paste {fmt_count(len(self.rows), 'floor')}")

    def apply(self, building: Building) -> Building:
        floors = {f.level: f for f in building.floors}
        added: list[int] = []
        updated: list[int] = []
        for n, row in enumerate(self.rows, 1):
            values = _coerce_changes(Floor, row, "floors")
            level = values.get("level")
            if level is None:
                raise _refuse(f"row {n}", "a pasted floor needs its level; the row has none")
            if level in floors:
                floors[level] = dataclasses.replace(floors[level], **values)
                updated.append(level)
                continue
            if "elevation_m" not in values:
                raise _refuse(f"row {n}", "a new floor needs its floor level above the datum; "
                                          "the row has none")
            floors[level] = Floor(level=level, label=values.get("label") or "",
                                  elevation_m=values["elevation_m"])
            added.append(level)
        self.added, self.updated = tuple(added), tuple(updated)
        return dataclasses.replace(building, floors=_sorted_floors(floors.values()))


class RemoveFloor(BuildingCommand):
    """Remove the floor at ``level`` and every opening on it (undo brings them back).

    After :meth:`do`, ``removed_openings`` holds the ids of the openings that went with it and
    the default label names how many."""

    def __init__(self, level: int, *, label: str | None = None) -> None:
        self.level = level
        self.removed_openings: tuple[str, ...] = ()
        self._default_label = label is None
        super().__init__(label or f"Remove floor {level}")

    def apply(self, building: Building) -> Building:
        if not any(f.level == self.level for f in building.floors):
            raise _refuse("floors", f"there is no floor at level {self.level}")
        self.removed_openings = tuple(o.id for o in building.openings if o.floor == self.level)
        if self._default_label and self.removed_openings:
            self.label = (f"Remove floor {self.level} and its "
                          f"{fmt_count(len(self.removed_openings), 'opening')}")
        return dataclasses.replace(
            building,
            floors=tuple(f for f in building.floors if f.level != self.level),
            openings=tuple(o for o in building.openings if o.floor != self.level),
        )


class SetFloor(BuildingCommand):
    """Change a floor's ``label``, ``elevation_m`` or ``level`` (its openings move with it)."""

    def __init__(self, level: int, changes: Mapping[str, Any], *, label: str | None = None) -> None:
        self.level = level
        self.changes = _coerce_changes(Floor, changes, "floors")
        fields = field_words("floors", self.changes)
        super().__init__(label or f"Set {fields} of floor {level}")

    def apply(self, building: Building) -> Building:
        floors = _replace_items(building.floors, "level", [self.level], self.changes, "floors")
        openings = building.openings
        new_level = self.changes.get("level", self.level)
        if new_level != self.level:
            if any(f.level == new_level for f in building.floors):
                raise _refuse(_FLOOR_LEVEL, f"there is already a floor at level {new_level}")
            openings = tuple(
                dataclasses.replace(o, floor=new_level) if o.floor == self.level else o
                for o in openings
            )
        return dataclasses.replace(building, floors=_sorted_floors(floors), openings=openings)


class SetFloorElevations(BuildingCommand):
    """Set the elevation (m above the datum) of several floors at once: ``{level: elevation_m}``."""

    def __init__(self, elevations_m: Mapping[int, float], *, label: str | None = None) -> None:
        self.elevations_m = {int(k): float(v) for k, v in elevations_m.items()}
        super().__init__(label or "Set floor elevations")

    def apply(self, building: Building) -> Building:
        levels = {f.level for f in building.floors}
        missing = set(self.elevations_m) - levels
        if missing:
            raise _refuse("floors", f"no floor at level {', '.join(map(str, sorted(missing)))}")
        floors = tuple(
            dataclasses.replace(f, elevation_m=self.elevations_m[f.level])
            if f.level in self.elevations_m
            else f
            for f in building.floors
        )
        return dataclasses.replace(building, floors=floors)


def copied_id(pattern: str, opening: Opening, *, level: int, n: int, floor_label: str) -> str:
    """The id of a copy of ``opening`` on ``level`` by ``pattern`` (see :data:`DEFAULT_ID_PATTERN`).

    Raises :class:`EditRefused` when the pattern is not valid.
    """
    try:
        return pattern.format(id=opening.id, facade=opening.facade, level=level, n=n,
                              kind=opening.kind.value, label=floor_label)
    except (KeyError, IndexError, ValueError) as exc:
        raise _refuse(
            "id pattern",
            f"{pattern!r} is not a valid pattern ({exc}); use fields {{facade}}, {{level}}, "
            "{n}, {id}, {kind}, {label}",
        ) from None


def copy_ids(building: Building, level: int, to_levels: Sequence[int],
             pattern: str = DEFAULT_ID_PATTERN) -> list[tuple[int, Opening, str]]:
    """``(target level, source opening, new id)`` for each copy of floor ``level``'s openings,
    by target level. With :data:`KEEP_NUMBERING` the ids keep their numbering with the floor
    number replaced (by :data:`FACADE_LEVEL_PATTERN` when they carry none). Raises
    :class:`EditRefused` for a pattern that is not valid."""
    from petfall_audit.editing.numbering import level_digits, renumbered_id

    floors = {f.level: f for f in building.floors}
    source = [o for o in building.openings if o.floor == level]
    run = level_digits([o.id for o in source], level) if pattern == KEEP_NUMBERING else None
    if pattern == KEEP_NUMBERING and run is None:
        pattern = FACADE_LEVEL_PATTERN
    out: list[tuple[int, Opening, str]] = []
    for lv in sorted(to_levels):
        counter: Counter[str] = Counter()
        for o in source:
            counter[o.facade] += 1
            if run is not None:
                new_id = renumbered_id(o.id, run, lv)
            else:
                label = floors[lv].label if lv in floors else ""
                new_id = copied_id(pattern, o, level=lv, n=counter[o.facade], floor_label=label)
            out.append((lv, o, new_id))
    return out


def _overlaps(a: Opening, b: Opening) -> bool:
    """True when two openings on one facade share part of their width (1 mm tolerance)."""
    return (a.facade == b.facade and a.x_m < b.x_m + b.width_m - 1e-3
            and b.x_m < a.x_m + a.width_m - 1e-3)


def _refuse_overlaps(building: Building, source: Sequence[Opening],
                     levels: Sequence[int]) -> None:
    """Refuse a copy whose openings would sit over openings already on a target floor."""
    for lv in levels:
        present = [o for o in building.openings if o.floor == lv]
        for copy in source:
            hit = next((o for o in present if _overlaps(o, copy)), None)
            if hit is not None:
                raise _refuse(
                    "levels",
                    f"floor {lv} already has openings where the copies would go ({hit.id} on "
                    f"facade {hit.facade!r} is where the copy of {copy.id} would be); tick "
                    "'replace the openings already on those floors' or copy to other floors",
                )


class CopyFloorOpenings(BuildingCommand):
    """Copy the openings of the floor at ``level`` to each of ``to_levels`` (a typical floor).

    New ids come from ``id_pattern``. With ``replace_existing`` the openings already on the target
    floors are removed first; otherwise a clash of ids, or a copy that would sit over an opening
    already on its floor and facade, refuses the edit.
    """

    def __init__(self, level: int, to_levels: Iterable[int], *,
                 id_pattern: str = DEFAULT_ID_PATTERN, replace_existing: bool = False,
                 label: str | None = None) -> None:
        self.level = level
        self.to_levels = tuple(dict.fromkeys(int(v) for v in to_levels if int(v) != level))
        self.id_pattern = id_pattern
        self.replace_existing = replace_existing
        if not self.to_levels:
            raise _refuse("levels", "choose at least one floor other than the one copied")
        span = (f"floor {self.to_levels[0]}" if len(self.to_levels) == 1
                else f"{len(self.to_levels)} floors")
        super().__init__(label or f"Copy floor {level} openings to {span}")

    def apply(self, building: Building) -> Building:
        floors = {f.level: f for f in building.floors}
        if self.level not in floors:
            raise _refuse("floors", f"there is no floor at level {self.level}")
        missing = [lv for lv in self.to_levels if lv not in floors]
        if missing:
            raise _refuse("levels", "no floor at level " + ", ".join(map(str, missing))
                          + "; add the floors first")
        source = [o for o in building.openings if o.floor == self.level]
        if not source:
            raise _refuse("floors", f"floor {self.level} has no openings to copy")
        targets = set(self.to_levels)
        kept = [o for o in building.openings
                if not (self.replace_existing and o.floor in targets)]
        used = {o.id for o in kept}
        copies: list[Opening] = []
        for lv, o, new_id in copy_ids(building, self.level, self.to_levels, self.id_pattern):
            if new_id in used:
                raise _refuse(
                    "id pattern",
                    f"the copy of {o.id} on floor {lv} would be {new_id!r}, an id already used"
                    + ("" if self.replace_existing else
                       "; tick 'replace the openings already on those floors' or choose "
                       "another way to name the copies"),
                )
            used.add(new_id)
            copies.append(dataclasses.replace(o, id=new_id, floor=lv))
        if not self.replace_existing:
            _refuse_overlaps(building, source, sorted(targets))
        return dataclasses.replace(building, openings=(*kept, *copies))


# --- building details, facades, surfaces, cat profile ---------------------------------------------


class SetBuildingInfo(BuildingCommand):
    """Change building details (``name``, ``address``, ``site_altitude_m``...)."""

    def __init__(self, changes: Mapping[str, Any], *, label: str | None = None,
                 merge_key: Hashable | None = None) -> None:
        self.changes = _coerce_changes(BuildingInfo, changes, "info")
        fields = field_words("info", self.changes)
        super().__init__(label or f"Set building {fields}", merge_key)

    def apply(self, building: Building) -> Building:
        return dataclasses.replace(building, info=dataclasses.replace(building.info,
                                                                      **self.changes))


class AddFacade(BuildingCommand):
    """Add a facade."""

    def __init__(self, facade: Facade, *, label: str | None = None) -> None:
        self.facade = facade
        super().__init__(label or f"Add {_named('facade', facade.id)}")

    def apply(self, building: Building) -> Building:
        if any(f.id == self.facade.id for f in building.facades):
            raise _refuse("facades.id", f"id already used: {self.facade.id}")
        return dataclasses.replace(building, facades=(*building.facades, self.facade))


class RemoveFacade(BuildingCommand):
    """Remove a facade that no opening sits on (surfaces in front of it go with it)."""

    def __init__(self, facade_id: str, *, label: str | None = None) -> None:
        self.facade_id = facade_id
        super().__init__(label or f"Remove {_named('facade', facade_id)}")

    def apply(self, building: Building) -> Building:
        if not any(f.id == self.facade_id for f in building.facades):
            raise _refuse("facades", f"not found: {self.facade_id}")
        on_it = sum(o.facade == self.facade_id for o in building.openings)
        if on_it:
            raise _refuse("facades", f"{fmt_count(on_it, 'opening')} sit on facade "
                          f"{self.facade_id!r}; move or remove them first")
        return dataclasses.replace(
            building,
            facades=tuple(f for f in building.facades if f.id != self.facade_id),
            surfaces=tuple(s for s in building.surfaces if s.facade != self.facade_id),
        )


class SetFacade(BuildingCommand):
    """Change a facade; a new ``id`` is carried over to its openings and surfaces."""

    def __init__(self, facade_id: str, changes: Mapping[str, Any], *,
                 label: str | None = None) -> None:
        self.facade_id = facade_id
        self.changes = _coerce_changes(Facade, changes, "facades")
        fields = field_words("facades", self.changes)
        super().__init__(label or f"Set {fields} of facade {facade_id}")

    def apply(self, building: Building) -> Building:
        new_id = self.changes.get("id", self.facade_id)
        if new_id != self.facade_id and any(f.id == new_id for f in building.facades):
            raise _refuse("facades.id", f"id already used: {new_id}")
        facades = _replace_items(building.facades, "id", [self.facade_id], self.changes,
                                 "facades")
        openings, surfaces = building.openings, building.surfaces
        if new_id != self.facade_id:
            openings = tuple(dataclasses.replace(o, facade=new_id) if o.facade == self.facade_id
                             else o for o in openings)
            surfaces = tuple(dataclasses.replace(s, facade=new_id) if s.facade == self.facade_id
                             else s for s in surfaces)
        return dataclasses.replace(building, facades=facades, openings=openings,
                                   surfaces=surfaces)


class AddSurface(BuildingCommand):
    """Add a surface below."""

    def __init__(self, surface: Surface, *, label: str | None = None) -> None:
        self.surface = surface
        super().__init__(label or f"Add {_named('surface', surface.id)}")

    def apply(self, building: Building) -> Building:
        if any(s.id == self.surface.id for s in building.surfaces):
            raise _refuse("surfaces.id", f"id already used: {self.surface.id}")
        return dataclasses.replace(building, surfaces=(*building.surfaces, self.surface))


class RemoveSurface(BuildingCommand):
    """Remove a surface below."""

    def __init__(self, surface_id: str, *, label: str | None = None) -> None:
        self.surface_id = surface_id
        super().__init__(label or f"Remove {_named('surface', surface_id)}")

    def apply(self, building: Building) -> Building:
        if not any(s.id == self.surface_id for s in building.surfaces):
            raise _refuse("surfaces", f"not found: {self.surface_id}")
        return dataclasses.replace(
            building, surfaces=tuple(s for s in building.surfaces if s.id != self.surface_id)
        )


class SetSurface(BuildingCommand):
    """Change a surface below (``kind``, ``elevation_m``, extent...)."""

    def __init__(self, surface_id: str, changes: Mapping[str, Any], *,
                 label: str | None = None) -> None:
        self.surface_id = surface_id
        self.changes = _coerce_changes(Surface, changes, "surfaces")
        fields = field_words("surfaces", self.changes)
        super().__init__(label or f"Set {fields} of surface {surface_id}")

    def apply(self, building: Building) -> Building:
        new_id = self.changes.get("id", self.surface_id)
        if new_id != self.surface_id and any(s.id == new_id for s in building.surfaces):
            raise _refuse("surfaces.id", f"id already used: {new_id}")
        surfaces = _replace_items(building.surfaces, "id", [self.surface_id], self.changes,
                                  "surfaces")
        return dataclasses.replace(building, surfaces=surfaces)


class SetCatProfile(BuildingCommand):
    """Replace the cat profile (the population at risk)."""

    def __init__(self, profile: CatProfile, *, label: str | None = None) -> None:
        self.profile = profile
        name = profile.preset.replace("_", " ") if profile.preset else "custom"
        super().__init__(label or f"Set cat profile ({name})")

    def apply(self, building: Building) -> Building:
        return dataclasses.replace(building, cat_profile=self.profile)


class SetInjuryModel(BuildingCommand):
    """Change the injury dose–response (band median doses in g, the spread between cats)."""

    def __init__(self, changes: Mapping[str, Any], *, label: str | None = None,
                 merge_key: Hashable | None = None) -> None:
        self.changes = _coerce_changes(InjuryThresholds, changes, "injury")
        super().__init__(label or "Change the injury bands", merge_key)

    def apply(self, building: Building) -> Building:
        try:
            injury = dataclasses.replace(building.injury, **self.changes)
        except ValueError as exc:
            raise _refuse("injury", str(exc)) from None
        return dataclasses.replace(building, injury=injury)


class SetPlanSettings(BuildingCommand):
    """Keep the fix plan's budget (and its currency) with the audit. Steps of one spin box or
    drag merge into one undo step."""

    def __init__(self, settings: PlanSettings, *, label: str | None = None) -> None:
        self.settings = settings
        if settings.budget is not None and not (math.isfinite(settings.budget)
                                                and settings.budget >= 0):
            raise _refuse("building.plan.budget", "the budget must be an amount of 0 or more")
        super().__init__(label or "Set the plan's budget", merge_key="plan-budget")

    def apply(self, building: Building) -> Building:
        return dataclasses.replace(building, plan=self.settings)


class SetFixStatus(BuildingCommand):
    """Record what became of a recommended fix: ``control_id`` on ``opening_id`` moved to
    ``status`` on ``date`` (ISO ``YYYY-MM-DD`` or empty), with ``note`` (``None``: keep it)."""

    def __init__(self, opening_id: str, control_id: str, status: str, *, date: str = "",
                 note: str | None = None) -> None:
        from petfall_audit.model import FixStatus

        try:
            self.status = FixStatus(status)
        except ValueError:
            raise _refuse("fixes", f"{status!r} is not a status of a fix") from None
        self.opening_id, self.control_id, self.date, self.note = (opening_id, control_id, date,
                                                                  note)
        super().__init__(f"Mark the fix on {opening_id} as {self.status.value}")

    def apply(self, building: Building) -> Building:
        from petfall_audit.fix_tracking import set_fix_status

        return set_fix_status(building, self.opening_id, self.control_id, self.status,
                              date=self.date, note=self.note)


class RecordFixes(BuildingCommand):
    """Record the fixes of a plan (its ``actions``) as recommended, each once."""

    def __init__(self, actions: Sequence[Any], *, date: str = "") -> None:
        self.actions = tuple(actions)
        self.date = date
        super().__init__("Record the plan's fixes as recommended")

    def apply(self, building: Building) -> Building:
        from petfall_audit.fix_tracking import record_plan

        return record_plan(building, self.actions, date=self.date)


class FitPlanFixes(BuildingCommand):
    """Fit every fix of a plan at once (the control's effect written into its opening; fixes
    that rely on people change no field): a what-if accepted."""

    def __init__(self, actions: Sequence[Any], catalogue: Any = None) -> None:
        self.actions = tuple(actions)
        self.catalogue = catalogue
        super().__init__("Fit the plan's fixes")

    def apply(self, building: Building) -> Building:
        from petfall_audit.fix_tracking import apply_plan

        return apply_plan(building, self.actions, self.catalogue)[0]


class ReplaceBuilding(BuildingCommand):
    """Replace the whole building (an import, a recovered file) as one undoable step."""

    def __init__(self, building: Building, *, label: str = "Replace building") -> None:
        self.building = building
        super().__init__(label)

    def apply(self, building: Building) -> Building:
        return self.building
