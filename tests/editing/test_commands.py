"""Undoable commands without Qt: each edit applies, refuses invalid results, and undoes exactly."""

from __future__ import annotations

import dataclasses

import pytest

from petfall_audit.editing.commands import (
    AddFacade,
    AddFloor,
    AddOpenings,
    CopyFloorOpenings,
    EditRefused,
    RemoveFacade,
    RemoveFloor,
    RemoveOpenings,
    SetBuildingInfo,
    SetCatProfile,
    SetFacade,
    SetFloor,
    SetFloorElevations,
    SetOpeningFields,
    SetSurface,
)
from petfall_audit.editing.document import Document
from petfall_audit.editing.query import (
    applicable_openings,
    elevations_for_storey_height,
    next_floor,
    select_openings,
    storey_heights_m,
    unique_id,
)
from petfall_audit.model import (
    CAT_PRESETS,
    Building,
    BuildingInfo,
    Facade,
    Floor,
    Opening,
    OpeningKind,
    Screen,
    Surface,
    SurfaceKind,
)


def tower(levels: int = 12) -> Building:
    """An invented slab: a tall ground floor, then 3.0 m storeys; openings only on level 1."""
    floors = tuple(Floor(lv, f"Level {lv}", 0.0 if lv == 0 else 4.5 + 3.0 * (lv - 1))
                   for lv in range(levels))
    openings = (
        Opening("south-01-1", 1, "south", OpeningKind.BALCONY, 1.0, 3.0, projection_m=1.5),
        Opening("south-01-2", 1, "south", OpeningKind.BALCONY, 6.0, 3.0, projection_m=1.5),
        Opening("north-01-1", 1, "north", OpeningKind.WINDOW_CASEMENT, 2.0, 1.2),
    )
    return Building(
        info=BuildingInfo(name="Alder Row (invented)"),
        floors=floors,
        facades=(Facade("south", 20.0, "South"), Facade("north", 20.0, "North")),
        surfaces=(Surface("pavement", SurfaceKind.CONCRETE, 0.0),),
        openings=openings,
    )


def run(cmd, building: Building | None = None) -> tuple[Document, Building]:  # type: ignore[no-untyped-def]
    doc = Document(building or tower())
    before = doc.building
    cmd.do(doc)
    return doc, before


def test_set_opening_fields_applies_and_undo_restores_the_same_object() -> None:
    doc, before = run(SetOpeningFields(["south-01-1"], {"netting_mesh_mm": 30.0,
                                                        "screen": "pet_resistant"}))
    o = doc.building.opening("south-01-1")
    assert o.netting_mesh_mm == 30.0 and o.screen is Screen.PET_RESISTANT
    assert doc.building.opening("south-01-2") is before.opening("south-01-2")
    cmd = SetOpeningFields(["south-01-2"], {"width_m": 2.5})
    cmd.do(doc)
    after = doc.building
    cmd.undo(doc)
    cmd.do(doc)  # redo gives back the very same building
    assert doc.building is after


def test_invalid_result_is_refused_and_nothing_changes() -> None:
    doc = Document(tower())
    before = doc.building
    with pytest.raises(EditRefused) as info:
        SetOpeningFields(["south-01-1"], {"width_m": -1.0}).do(doc)
    assert doc.building is before and doc.revision == 0
    assert info.value.problems and "width_m" in info.value.problems[0].where
    assert isinstance(info.value, ValueError)
    with pytest.raises(EditRefused, match="runs to"):  # past the end of a 20 m facade
        SetOpeningFields(["south-01-1"], {"x_m": 19.0}).do(doc)


def test_a_problem_that_was_already_there_does_not_block_other_edits() -> None:
    b = tower()
    bad = dataclasses.replace(b.openings[2], floor=40)  # no level 40: an existing problem
    doc = Document(dataclasses.replace(b, openings=(*b.openings[:2], bad)))
    assert doc.problems()
    SetOpeningFields(["south-01-1"], {"netting_mesh_mm": 25.0}).do(doc)
    assert doc.building.opening("south-01-1").netting_mesh_mm == 25.0


def test_unknown_field_and_bad_enum_are_refused_at_once() -> None:
    with pytest.raises(EditRefused, match="no field"):
        SetOpeningFields(["x"], {"colour": "red"})
    with pytest.raises(EditRefused, match="must be one of"):
        SetOpeningFields(["x"], {"screen": "lace curtain"})
    with pytest.raises(EditRefused, match="same id"):
        SetOpeningFields(["a", "b"], {"id": "c"})


def test_missing_opening_is_refused() -> None:
    with pytest.raises(EditRefused, match="not found: nope"):
        run(SetOpeningFields(["nope"], {"width_m": 1.0}))


def test_copy_a_typical_floor_to_ten_levels() -> None:
    cmd = CopyFloorOpenings(1, range(2, 12))
    doc, before = run(cmd)
    b = doc.building
    assert len(b.openings) == 3 + 3 * 10
    assert b.opening("south-05-2").floor == 5
    assert b.opening("north-11-1").kind is OpeningKind.WINDOW_CASEMENT
    copy, src = b.opening("south-07-1"), before.opening("south-01-1")
    assert dataclasses.replace(copy, id=src.id, floor=src.floor) == src
    assert "10 floors" in cmd.label
    cmd.undo(doc)
    assert doc.building is before


def test_copy_with_a_custom_pattern_and_replacing_existing_openings() -> None:
    doc, _ = run(CopyFloorOpenings(1, [2, 3], id_pattern="{id}@{level}"))
    assert {o.id for o in doc.building.openings if o.floor == 3} == {
        "south-01-1@3", "south-01-2@3", "north-01-1@3"}
    with pytest.raises(EditRefused, match="already used"):
        CopyFloorOpenings(1, [2], id_pattern="{id}@{level}").do(doc)
    CopyFloorOpenings(1, [2], id_pattern="{id}@{level}", replace_existing=True).do(doc)
    assert sum(o.floor == 2 for o in doc.building.openings) == 3


def test_copy_refuses_bad_patterns_missing_floors_and_empty_floors() -> None:
    with pytest.raises(EditRefused, match="not a valid pattern"):
        run(CopyFloorOpenings(1, [2], id_pattern="{floor}"))
    with pytest.raises(EditRefused, match="no floor at level 30"):
        run(CopyFloorOpenings(1, [2, 30]))
    with pytest.raises(EditRefused, match="no openings"):
        run(CopyFloorOpenings(4, [5]))
    with pytest.raises(EditRefused, match="other than"):
        CopyFloorOpenings(1, [1])


def test_floors_add_remove_and_renumber() -> None:
    doc, before = run(AddFloor(next_floor(tower())))
    assert doc.building.floors[-1].level == 12
    assert doc.building.floors[-1].elevation_m == pytest.approx(4.5 + 3.0 * 11)
    with pytest.raises(EditRefused, match="already a floor"):
        AddFloor(Floor(3, "again", 99.0)).do(doc)
    RemoveFloor(1).do(doc)
    assert not doc.building.openings and all(f.level != 1 for f in doc.building.floors)
    doc, _ = run(SetFloor(1, {"level": 20, "elevation_m": 70.0}))
    assert doc.building.floors[-1].level == 20
    assert {o.floor for o in doc.building.openings} == {20}


def test_storey_height_moves_every_floor_above() -> None:
    b = tower(5)
    assert storey_heights_m(b) == {0: 4.5, 1: 3.0, 2: 3.0, 3: 3.0, 4: None}
    mapping = elevations_for_storey_height(b, 1, 3.4)
    doc, _ = run(SetFloorElevations(mapping), b)
    heights = storey_heights_m(doc.building)
    assert heights[1] == pytest.approx(3.4) and heights[2] == pytest.approx(3.0)
    with pytest.raises(ValueError, match="top floor"):
        elevations_for_storey_height(b, 4, 3.0)
    with pytest.raises(EditRefused, match="not above"):  # a floor below the one under it
        run(SetFloorElevations({2: 1.0}), b)


def test_facade_rename_carries_over_and_remove_needs_an_empty_facade() -> None:
    b = dataclasses.replace(tower(), surfaces=(
        *tower().surfaces, Surface("lawn", SurfaceKind.LAWN, 0.0, facade="south",
                                   from_facade_m=0.0, to_facade_m=4.0)))
    doc, _ = run(SetFacade("south", {"id": "garden"}), b)
    assert {o.facade for o in doc.building.openings} == {"garden", "north"}
    assert doc.building.surfaces[1].facade == "garden"
    with pytest.raises(EditRefused, match="sit on facade"):
        RemoveFacade("north").do(doc)
    AddFacade(Facade("east", 8.0)).do(doc)
    RemoveFacade("east").do(doc)
    assert [f.id for f in doc.building.facades] == ["garden", "north"]


def test_openings_add_remove_info_profile_surface() -> None:
    new = Opening("south-01-3", 1, "south", OpeningKind.WINDOW_TILT_TURN, 12.0, 1.0)
    doc, before = run(AddOpenings([new], index=0))
    assert doc.building.openings[0] is new
    with pytest.raises(EditRefused, match="already used"):
        AddOpenings([new]).do(doc)
    RemoveOpenings(["south-01-3", "north-01-1"]).do(doc)
    assert [o.id for o in doc.building.openings] == ["south-01-1", "south-01-2"]
    SetBuildingInfo({"address": "1 Sample Lane"}).do(doc)
    assert doc.building.info.address == "1 Sample Lane"
    with pytest.raises(EditRefused, match="YYYY-MM-DD"):
        SetBuildingInfo({"audit_date": "last May"}).do(doc)
    SetCatProfile(CAT_PRESETS["kitten"]).do(doc)
    assert doc.building.cat_profile.preset == "kitten"
    SetSurface("pavement", {"kind": "gravel"}).do(doc)
    assert doc.building.surfaces[0].kind is SurfaceKind.GRAVEL


def test_select_openings_and_unique_id() -> None:
    b = CopyFloorOpenings(1, range(2, 6)).apply(tower())
    south_balconies = select_openings(b, facades=["south"], kinds=["balcony"])
    assert len(south_balconies) == 2 * 5
    assert select_openings(b, levels=[3]) == ["south-03-1", "south-03-2", "north-03-1"]
    assert unique_id(["a", "a-2"], "a") == "a-3" and unique_id([], "a") == "a"


def test_copying_onto_a_floor_with_openings_in_the_way_is_refused_unless_replacing() -> None:
    b = tower()
    occupied = dataclasses.replace(
        b, openings=(*b.openings,
                     Opening("S-2A", 2, "south", OpeningKind.BALCONY, 1.5, 2.0, projection_m=1.5)))
    doc = Document(occupied)
    # the default ids (south-02-1...) do not clash, but the copies would sit over S-2A
    with pytest.raises(EditRefused, match="floor 2 already has openings where the copies"):
        CopyFloorOpenings(1, [2, 3]).do(doc)
    assert doc.building is occupied
    CopyFloorOpenings(1, [2, 3], replace_existing=True).do(doc)
    ids = {o.id for o in doc.building.openings}
    assert "S-2A" not in ids and {"south-02-1", "south-03-2"} <= ids
    # a floor whose openings sit elsewhere on the facade takes the copies beside them
    beside = dataclasses.replace(
        b, openings=(*b.openings,
                     Opening("S-2Z", 2, "south", OpeningKind.BALCONY, 15.0, 2.0,
                             projection_m=1.5)))
    doc = Document(beside)
    CopyFloorOpenings(1, [2]).do(doc)
    assert {"S-2Z", "south-02-1"} <= {o.id for o in doc.building.openings}


def test_removing_a_floor_names_the_openings_that_go_with_it() -> None:
    cmd = RemoveFloor(1)
    doc, before = run(cmd)
    assert cmd.label == "Remove floor 1 and its 3 openings"
    assert set(cmd.removed_openings) == {o.id for o in before.openings}
    cmd.undo(doc)
    assert doc.building is before
    empty = RemoveFloor(5)
    run(empty)
    assert empty.label == "Remove floor 5" and empty.removed_openings == ()


def test_a_refusal_states_each_reason_once_and_at_most_three() -> None:
    from petfall_audit.editing.commands import refusal_text
    from petfall_audit.errors import Problem

    problems = [Problem(f"openings[{i}].x_m", f"runs past the end ({i} m)") for i in range(6)]
    problems += [Problem("openings[9].x_m", "runs past the end (0 m)")]  # the same message again
    text = refusal_text(problems)
    assert text.count("runs past the end") == 3
    assert text.endswith("(and 3 more problems like these)")
    assert refusal_text(problems[:1]) == "runs past the end (0 m)"


def test_applicable_openings_skips_kinds_a_value_does_not_fit() -> None:
    b = tower()
    ids = [o.id for o in b.openings]
    # a limiter restricts how far a window opens: the model applies it to opening windows only
    fits, skipped, why = applicable_openings(b, ids, "limiter_gap_mm", 100.0)
    assert fits == ["north-01-1"] and skipped == ["south-01-1", "south-01-2"]
    assert "window" in why
    assert applicable_openings(b, ids, "limiter_gap_mm", None) == (ids, [], "")  # clearing
    fits, skipped, _ = applicable_openings(b, ids, "escape_window", True)
    assert fits == ["north-01-1"]
    fits, skipped, _ = applicable_openings(b, ids, "projection_m", 1.2)
    assert skipped == ["north-01-1"]
    assert applicable_openings(b, ids, "netting_mesh_mm", 30.0) == (ids, [], "")


def test_changing_the_kind_carries_fields_that_no_longer_apply() -> None:
    """A window sits in the wall (projection 0); a limiter and the escape-window mark fit opening
    windows only (the building file's own rules, docs/building-file.md)."""
    from petfall_audit.editing.query import fields_for_kind
    from petfall_audit.model import Opening, OpeningKind

    balcony = Opening("b", 0, "f", OpeningKind.BALCONY, 0.0, 1.0, projection_m=1.2)
    assert fields_for_kind(balcony, OpeningKind.WINDOW_HUNG) == {"projection_m": 0.0}
    assert fields_for_kind(balcony, OpeningKind.TERRACE) == {}
    window = Opening("w", 0, "f", OpeningKind.WINDOW_CASEMENT, 0.0, 1.0, limiter_gap_mm=90.0,
                     escape_window=True)
    assert fields_for_kind(window, OpeningKind.FIXED) == {"limiter_gap_mm": None,
                                                          "escape_window": False}
    assert fields_for_kind(window, OpeningKind.WINDOW_SLIDING) == {}
