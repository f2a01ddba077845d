"""The edit history without Qt: undo, redo, labels, the saved state, merging and the limit."""

from __future__ import annotations

import pytest

from petfall_audit.editing.commands import EditRefused, SetBuildingInfo, SetOpeningFields
from petfall_audit.editing.document import Document
from petfall_audit.editing.history import History
from petfall_audit.model import Building, BuildingInfo, Facade, Floor, Opening, OpeningKind


def building() -> Building:
    return Building(
        info=BuildingInfo(name="Birch Yard (invented)"),
        floors=(Floor(0, "Ground", 0.0), Floor(1, "First", 3.0)),
        facades=(Facade("east", 10.0),),
        openings=(Opening("E-1", 1, "east", OpeningKind.WINDOW_HUNG, 1.0, 1.0),),
    )


def width(h: History) -> float:
    return h.doc.building.opening("E-1").width_m


def test_undo_redo_walk_the_steps_and_restore_the_model_exactly() -> None:
    h = History(Document(building()))
    start = h.doc.building
    h.push(SetOpeningFields(["E-1"], {"width_m": 1.5}))
    middle = h.doc.building
    h.push(SetOpeningFields(["E-1"], {"width_m": 2.0}))
    assert h.undo_label == "Set width of E-1" and width(h) == 2.0
    assert h.undo() and h.doc.building is middle
    assert h.undo() and h.doc.building is start
    assert not h.undo() and not h.can_undo
    assert h.redo_label.startswith("Set width")
    assert h.redo() and h.redo() and width(h) == 2.0 and not h.redo()


def test_dirty_flag_follows_the_saved_step() -> None:
    h = History(Document(building()))
    assert not h.doc.dirty
    h.push(SetOpeningFields(["E-1"], {"width_m": 1.5}))
    assert h.doc.dirty
    h.set_clean()
    assert not h.doc.dirty
    h.push(SetOpeningFields(["E-1"], {"width_m": 2.0}))
    assert h.doc.dirty
    h.undo()
    assert not h.doc.dirty  # back at the saved state
    h.undo()
    assert h.doc.dirty
    h.push(SetBuildingInfo({"notes": "branch"}))  # the saved state can no longer be reached
    assert h.doc.dirty and not h.is_clean
    h.undo()
    assert h.doc.dirty


def test_a_refused_edit_is_not_recorded() -> None:
    h = History(Document(building()))
    with pytest.raises(EditRefused):
        h.push(SetOpeningFields(["E-1"], {"width_m": 50.0}))  # wider than the facade
    assert not h.can_undo and not h.doc.dirty


def test_typing_into_one_field_merges_into_one_step() -> None:
    h = History(Document(building()))
    start = h.doc.building
    for w in (1.1, 1.2, 1.3):
        h.push(SetOpeningFields(["E-1"], {"width_m": w}, merge_key=("E-1", "width_m")))
    h.push(SetOpeningFields(["E-1"], {"width_m": 1.4}))  # no key: a step of its own
    assert len(h.labels()) == 2
    h.undo()
    assert width(h) == 1.3
    h.undo()
    assert h.doc.building is start


def test_no_merge_into_the_saved_step() -> None:
    h = History(Document(building()))
    key = ("E-1", "width_m")
    h.push(SetOpeningFields(["E-1"], {"width_m": 1.1}, merge_key=key))
    h.set_clean()
    h.push(SetOpeningFields(["E-1"], {"width_m": 1.2}, merge_key=key))
    assert len(h.labels()) == 2
    h.undo()
    assert not h.doc.dirty and width(h) == 1.1


def test_limit_drops_the_oldest_steps() -> None:
    h = History(Document(building()), limit=3)
    for w in (1.1, 1.2, 1.3, 1.4, 1.5):
        h.push(SetOpeningFields(["E-1"], {"width_m": w}))
    assert len(h.labels()) == 3
    while h.undo():
        pass
    assert width(h) == 1.2 and h.doc.dirty  # the saved state fell off the end
    with pytest.raises(ValueError):
        History(h.doc, limit=0)


def test_on_changed_is_called_after_each_step() -> None:
    h = History(Document(building()))
    calls: list[bool] = []
    stop = h.on_changed(lambda: calls.append(h.can_undo))
    h.push(SetOpeningFields(["E-1"], {"width_m": 1.5}))
    h.undo()
    stop()
    h.redo()
    assert calls == [True, False]
