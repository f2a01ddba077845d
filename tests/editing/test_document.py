"""The Qt-free document: change callbacks per kind, dirty flag, path, revision."""

from __future__ import annotations

import dataclasses

import pytest

from petfall_audit.editing.document import Document, changed_kinds
from petfall_audit.model import (
    CAT_PRESETS,
    Building,
    BuildingInfo,
    Facade,
    Floor,
    Opening,
    OpeningKind,
    Surface,
    SurfaceKind,
)


def small_building() -> Building:
    return Building(
        info=BuildingInfo(name="Test House (invented)"),
        floors=(Floor(0, "Ground", 0.0), Floor(1, "First", 3.2)),
        facades=(Facade("south", 12.0),),
        surfaces=(Surface("ground", SurfaceKind.LAWN, 0.0),),
        openings=(Opening("S-01-1", 1, "south", OpeningKind.BALCONY, 1.0, 3.0, 1.2),),
    )


def test_set_building_reports_only_the_parts_that_changed() -> None:
    doc = Document(small_building())
    seen: list[str] = []
    doc.on_changed("*", seen.append)
    b = doc.building
    new_opening = dataclasses.replace(b.openings[0], width_m=2.0)
    kinds = doc.set_building(dataclasses.replace(b, openings=(new_opening,)))
    assert kinds == ["openings"] and seen == ["openings"]
    assert doc.revision == 1
    doc.set_building(dataclasses.replace(doc.building, cat_profile=CAT_PRESETS["kitten"],
                                         info=dataclasses.replace(b.info, name="X")))
    assert seen == ["openings", "building", "profile"]


def test_the_same_building_again_is_no_change() -> None:
    doc = Document(small_building())
    seen: list[str] = []
    doc.on_changed("*", seen.append)
    assert doc.set_building(doc.building) == []
    assert seen == [] and doc.revision == 0


def test_callbacks_per_kind_and_unsubscribe() -> None:
    doc = Document(small_building())
    floors: list[str] = []
    stop = doc.on_changed("floors", floors.append)
    b = doc.building
    doc.set_building(dataclasses.replace(b, floors=b.floors[:1], openings=()))
    assert floors == ["floors"]
    stop()
    doc.set_building(b)
    assert floors == ["floors"]


def test_dirty_and_path_are_reported_once_per_change(tmp_path) -> None:  # type: ignore[no-untyped-def]
    doc = Document(small_building())
    seen: list[str] = []
    doc.on_changed("dirty", seen.append)
    doc.on_changed("path", seen.append)
    doc.dirty = True
    doc.dirty = True
    doc.path = tmp_path / "a.json"
    doc.path = tmp_path / "a.json"
    assert seen == ["dirty", "path"]
    assert doc.display_name == "a.json"


def test_unknown_kind_is_refused() -> None:
    with pytest.raises(ValueError, match="kind"):
        Document(small_building()).on_changed("windows", lambda kind: None)


def test_changed_kinds_compares_values_not_identity() -> None:
    a = small_building()
    b = small_building()  # equal but distinct objects
    assert changed_kinds(a, b) == []


def test_problems_are_cached_per_revision() -> None:
    doc = Document(small_building())
    assert doc.problems() == []
    b = doc.building
    bad = dataclasses.replace(b.openings[0], floor=7)  # no floor 7
    doc.set_building(dataclasses.replace(b, openings=(bad,)))
    assert any("level 7" in p.message for p in doc.problems())
