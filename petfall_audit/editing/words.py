"""Places in a building in the words of its user: ``floors[2].elevation_m`` becomes
``Floor 2, elevation`` (the floor's own label), ``openings[4]`` ``opening S01-B1``. No Qt."""

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
from petfall_audit.errors import Problem
from petfall_audit.model import Building

__all__ = ["place_words", "plain_text", "problem_words"]

_FIELDS: dict[str, tuple[FieldSpec, ...]] = {
    "floors": FLOOR_FIELDS, "openings": OPENING_FIELDS, "facades": FACADE_FIELDS,
    "surfaces": SURFACE_FIELDS, "info": INFO_FIELDS,
}
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


def place_words(where: str, building: Building | None = None) -> str:
    """``where`` of a problem (``floors[2].elevation_m``) in words (``Floor 2, elevation``)."""
    m = _PATH.match(where)
    if m:
        part, index, field = m.group(1), int(m.group(2)), m.group(3).lstrip(".")
        words = _item_words(building, part, index)
        words = words[:1].upper() + words[1:]
        return f"{words}, {_field_words(part, field)}" if field else words
    head, _, field = where.partition(".")
    if head == "info":
        return f"Building details, {_field_words(head, field)}" if field else "Building details"
    if head in _FIELDS and field:
        return _field_words(head, field)
    return where.replace("_", " ")


def plain_text(text: str, building: Building | None = None) -> str:
    """``text`` with every internal place (``floors[1]``) written in words."""
    return _PATH.sub(lambda m: place_words(m.group(0), building), text)


def problem_words(problems: Sequence[Problem], building: Building | None = None, *,
                  limit: int = 3) -> str:
    """The reasons of a refusal in words, each with its place: at most ``limit`` of them."""
    seen: dict[str, None] = {}
    for p in problems:
        place = place_words(p.where, building) if p.where else ""
        message = plain_text(p.message, building)
        seen.setdefault(f"{place}: {message}" if place else message)
    messages = list(seen)
    text = "; ".join(messages[:limit])
    if len(messages) > limit:
        more = len(messages) - limit
        text += f" (and {more} more problem{'s' if more != 1 else ''} like these)"
    return text or "edit refused"
