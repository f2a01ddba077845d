"""Ids of copied openings that keep the building's own numbering: ``S01-B1`` copied to level 5
becomes ``S05-B1``. No Qt."""

from __future__ import annotations

import re
from collections.abc import Sequence

__all__ = ["level_digits", "renumbered_id"]

_DIGITS = re.compile(r"\d+")


def level_digits(ids: Sequence[str], level: int) -> int | None:
    """Which run of digits (0-based, counted from the left) of every id in ``ids`` is the floor
    number ``level``: the first run that reads as ``level`` in all of them. ``None`` when there
    is none (or ``level`` is negative)."""
    if level < 0 or not ids:
        return None
    runs = [[m.group(0) for m in _DIGITS.finditer(i)] for i in ids]
    shortest = min(len(r) for r in runs)
    for k in range(shortest):
        if all(int(r[k]) == level for r in runs):
            return k
    return None


def renumbered_id(opening_id: str, run: int, level: int) -> str:
    """``opening_id`` with its ``run``-th run of digits replaced by ``level``, padded with zeros
    to the width it had (``S01-B1``, run 0, level 5: ``S05-B1``; level 12: ``S12-B1``)."""
    matches = list(_DIGITS.finditer(opening_id))
    m = matches[run]
    digits = str(level).zfill(len(m.group(0)))
    return opening_id[:m.start()] + digits + opening_id[m.end():]
