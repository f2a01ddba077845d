"""Places in a building in the words of its user: the place ``floors[2].elevation_m`` of a
problem becomes ``Floor 2, elevation`` (the floor's own label), ``openings[4]``
``Opening S01-B1``. No Qt."""

from __future__ import annotations

import re
from collections.abc import Sequence

from petfall_audit.editing.fields import (
    FACADE_FIELDS,
    FLOOR_FIELDS,
    INFO_FIELDS,
    OPENING_FIELDS,
    SURFACE_FIELDS,
    FieldSpec,
)
from petfall_audit.errors import Place, Problem
from petfall_audit.model import Building
from petfall_audit.present.explain import problem_message

__all__ = ["place_words", "plain_text", "problem_words"]

_FIELDS: dict[str, tuple[FieldSpec, ...]] = {
    "floors": FLOOR_FIELDS, "openings": OPENING_FIELDS, "facades": FACADE_FIELDS,
    "surfaces": SURFACE_FIELDS, "info": INFO_FIELDS,
}
_LISTS = ("floors", "openings", "facades", "surfaces")
# a place written inside a message's text ("... (also floors[1])"), put in words for people
_PATH = re.compile(r"\b(floors|openings|facades|surfaces)\[(\d+)\]((?:\.[A-Za-z_]\w*)?)")


def _item_words(building: Building | None, part: str, index: int) -> str:
    items = getattr(building, part, ()) if building is not None else ()
    item = items[index] if 0 <= index < len(items) else None
    if part == "floors":
        if item is None:
            return f"floor number {index + 1}"
        return item.label or f"Level {item.level}"
    noun = part[:-1]
    return f"{noun} {item.id}" if item is not None else f"{noun} number {index + 1}"


def _field_words(part: str, name: str) -> str:
    for spec in _FIELDS.get(part, ()):
        if spec.name == name:
            return spec.label.lower()
    return re.sub(r"_(m|mm|kg|m2|s|mps|c)$", "", name).replace("_", " ")


def place_words(place: Place | str, building: Building | None = None) -> str:
    """A problem's place in words: ``Place("floors", 2, "elevation_m")`` reads
    ``Floor 2, floor level above datum`` (the floor's own label), ``Place("openings", 4)``
    ``Opening S01-B1``. A text is a place without parts and reads as it is."""
    if isinstance(place, str):
        place = Place(place)
    section, index, field = place.section, place.index, place.field
    head = field.replace("[", ".").split(".", 1)[0]
    if index is not None and section in _LISTS:
        words = _item_words(building, section, index)
        words = words[:1].upper() + words[1:]
        return f"{words}, {_field_words(section, head)}" if head else words
    if section in ("info", "building"):
        return f"Building details, {_field_words('info', head)}" if head else "Building details"
    if section in _FIELDS and head:
        return _field_words(section, head)
    return str(place).replace("_", " ")


def plain_text(text: str, building: Building | None = None) -> str:
    """``text`` with every internal place (``floors[1]``) written in words."""
    return _PATH.sub(lambda m: place_words(
        Place(m.group(1), int(m.group(2)), m.group(3).lstrip(".")), building), text)


def problem_words(problems: Sequence[Problem], building: Building | None = None, *,
                  limit: int = 3, sep: str = "; ", system: str = "metric") -> str:
    """The reasons of a refusal in words, each with its place: at most ``limit`` of them,
    joined by ``sep``; numbers in the units of ``system``."""
    seen: dict[str, None] = {}
    for p in problems:
        place = place_words(p.place, building) if p.where else ""
        message = plain_text(problem_message(p, system), building)
        seen.setdefault(f"{place}: {message}" if place else message)
    messages = list(seen)
    text = sep.join(messages[:limit])
    if len(messages) > limit:
        more = len(messages) - limit
        text += f" (and {more} more problem{'s' if more != 1 else ''} like these)"
    return text or "edit refused"
