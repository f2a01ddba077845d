"""Ids of copied openings keep the building's numbering (no Qt)."""

from __future__ import annotations

import dataclasses

from hypothesis import given
from hypothesis import strategies as st

from petfall_audit.editing.commands import FACADE_LEVEL_PATTERN, KEEP_NUMBERING, copy_ids
from petfall_audit.editing.numbering import level_digits, renumbered_id
from petfall_audit.model import Building, BuildingInfo, Facade, Floor, Opening, OpeningKind


def test_the_floor_number_is_found_where_every_id_has_it() -> None:
    assert level_digits(["S01-B1", "S01-B2", "S01-B3"], 1) == 0
    assert level_digits(["B1-L03", "B2-L03"], 3) == 1
    assert level_digits(["street-a", "street-b"], 1) is None
    assert level_digits(["S01-B1"], -1) is None


def test_renumbering_keeps_the_padding() -> None:
    assert renumbered_id("S01-B1", 0, 5) == "S05-B1"
    assert renumbered_id("S01-B1", 0, 12) == "S12-B1"
    assert renumbered_id("B2-L003", 1, 40) == "B2-L040"


@given(st.from_regex(r"[A-Z]{1,3}", fullmatch=True), st.integers(0, 99), st.integers(0, 99),
       st.integers(1, 9))
def test_renumbering_changes_the_level_only(prefix: str, level: int, new: int, n: int) -> None:
    source = f"{prefix}{level:02d}-B{n}"
    run = level_digits([source], level)
    assert run == 0  # the first run of digits reads as the level
    assert renumbered_id(source, 0, new) == f"{prefix}{new:02d}-B{n}"


def _building() -> Building:
    floors = tuple(Floor(k, f"Level {k}", 3.0 * k) for k in range(6))
    openings = tuple(Opening(f"S01-B{n}", 1, "street", OpeningKind.BALCONY, 2.0 * n, 1.0, 1.0)
                     for n in range(1, 4))
    return Building(info=BuildingInfo(name="Numbered (invented)"), floors=floors,
                    facades=(Facade("street", 20.0),), openings=openings)


def test_copies_keep_the_building_numbering() -> None:
    ids = [new for _lv, _o, new in copy_ids(_building(), 1, [4, 5], KEEP_NUMBERING)]
    assert ids == ["S04-B1", "S04-B2", "S04-B3", "S05-B1", "S05-B2", "S05-B3"]


def test_ids_without_a_floor_number_fall_back_to_facade_level_number() -> None:
    b = _building()
    b = dataclasses.replace(b, openings=tuple(dataclasses.replace(o, id=f"flat-{k}")
                                              for k, o in enumerate(b.openings, 1)))
    # "flat-1" has a 1 in it, but "flat-2" does not read as floor 1: no common floor number
    ids = [new for _lv, _o, new in copy_ids(b, 1, [2], KEEP_NUMBERING)]
    assert ids == ["street-02-1", "street-02-2", "street-02-3"]
    assert ids == [new for _lv, _o, new in copy_ids(b, 1, [2], FACADE_LEVEL_PATTERN)]
