"""Import from IFC building models (petfall_audit.io.ifc_import and ``import MODEL.ifc``).

Every model is built inside the test with ``ifcopenshell.api`` (tests/ifc_builder.py), so the
expected numbers are the ones the test put into the model: storey elevations, sills, widths and
positions written here, converted by the model's own declared unit. Compass bearings are worked
out by hand beside each check (plane geometry, no source needed).
"""

from __future__ import annotations

import dataclasses
import json
import math
import sys
from pathlib import Path

import pytest

pytest.importorskip("ifcopenshell")

from petfall_audit.cli import main  # noqa: E402
from petfall_audit.errors import ModelImportError, ValidationFailed  # noqa: E402
from petfall_audit.io.building_file import (  # noqa: E402
    load_building,
    save_building,
    validate_building,
)
from petfall_audit.io.ifc_import import (  # noqa: E402
    apply_model,
    new_building,
    preview_model,
    read_model,
)
from petfall_audit.io.survey import SURVEY_PREFIX, survey_warnings  # noqa: E402
from petfall_audit.model import (  # noqa: E402
    CatsPresent,
    OpeningKind,
    Surface,
    SurfaceKind,
)
from tests.ifc_builder import IfcModelBuilder, box_tower  # noqa: E402

# Storeys at 0, 4.5, 7.6, ... m: a tall ground floor, then 3.1 m floor to floor (invented).
ELEVATIONS_M = (0.0, 4.5, 7.6, 10.7, 13.8)


def _acceptance_model(tmp_path: Path, *, schema: str = "IFC4", unit: str = "mm") -> Path:
    b = IfcModelBuilder(schema=schema, unit=unit, true_north_deg=0.0)
    box_tower(b, ELEVATIONS_M, windows_per_face=3, sill_m=0.9, window_width_m=1.2,
              faces=("south", "north"))
    return b.write(tmp_path / f"tower-{schema}-{unit}.ifc")


@pytest.mark.parametrize(("schema", "unit"), [("IFC4", "mm"), ("IFC4", "m"),
                                              ("IFC2X3", "mm"), ("IFC2X3", "m")])
def test_acceptance_floors_sills_widths_facades_positions(
    tmp_path: Path, schema: str, unit: str
) -> None:
    model = read_model(_acceptance_model(tmp_path, schema=schema, unit=unit))
    # the unit the builder declared: millimetres are 0.001 m (SI prefix milli)
    assert model.metres_per_unit == pytest.approx(0.001 if unit == "mm" else 1.0)
    building, preview = new_building(model)
    assert not preview.problems
    # exactly those floors, in order, level 0 at the datum
    assert [f.level for f in building.floors] == [0, 1, 2, 3, 4]
    assert [f.elevation_m for f in building.floors] == pytest.approx(ELEVATIONS_M, abs=0.01)
    assert [f.label for f in building.floors] == [f"Level {k}" for k in range(5)]
    # that many openings: 5 storeys x 2 faces x 3 windows
    assert len(building.openings) == 30
    for o in building.openings:
        assert o.perch_height_m == pytest.approx(0.9, abs=0.01)
        assert o.width_m == pytest.approx(1.2, abs=0.01)
        assert o.projection_m == 0.0
        assert o.kind is OpeningKind.WINDOW_CASEMENT
    # two facades, named by compass: the y = 0 face looks south, the y = 8 m face north
    assert sorted(f.id for f in building.facades) == ["north", "south"]
    # each facade as long as its 12 m wall (the wall's body geometry)
    assert {f.id: f.length_m for f in building.facades} == pytest.approx(
        {"north": 12.0, "south": 12.0}, abs=0.01)
    for facade in ("north", "south"):
        for level in range(5):
            xs = sorted(o.x_m for o in building.openings
                        if o.facade == facade and o.floor == level)
            # windows centred in thirds of the 12 m wall: left edges 1.4, 5.4, 9.4 m from the
            # facade's left end as seen from outside
            assert xs == pytest.approx([1.4, 5.4, 9.4], abs=0.01)
            assert len(set(xs)) == 3


def test_seen_from_outside_left_to_right(tmp_path: Path) -> None:
    # The north wall runs from (12, 8) to (0, 8). Standing north of it and looking south, the
    # left end is the east corner (x = 12): the window named N1 (nearest x = 12) is leftmost.
    model = read_model(_acceptance_model(tmp_path))
    north = {o.name: o.x_m for o in model.openings if o.facade == "north" and o.level == 0}
    assert north["W-00-N1"] < north["W-00-N2"] < north["W-00-N3"]
    south = {o.name: o.x_m for o in model.openings if o.facade == "south" and o.level == 0}
    assert south["W-00-S1"] < south["W-00-S2"] < south["W-00-S3"]


def test_storeys_out_of_order_and_a_basement(tmp_path: Path) -> None:
    b = IfcModelBuilder(unit="mm")
    for name, z in (("Third", 7.6), ("Ground", 0.0), ("Basement", -3.2), ("First", 4.5)):
        storey = b.storey(name, z)
        wall = b.wall(storey, (0.0, 0.0), (10.0, 0.0), body=False)
        b.window(storey, wall, along_m=2.0, sill_m=1.0, width_m=0.9, name=f"W-{name}")
    model = read_model(b.write(tmp_path / "shuffled.ifc"))
    assert [(s.level, s.label) for s in model.storeys] == [
        (-1, "Basement"), (0, "Ground"), (1, "First"), (2, "Third")]
    assert [s.elevation_m for s in model.storeys] == pytest.approx([-3.2, 0.0, 4.5, 7.6])
    level_of = {o.name: o.level for o in model.openings}
    assert level_of == {"W-Basement": -1, "W-Ground": 0, "W-First": 1, "W-Third": 2}
    assert all(o.perch_height_m == pytest.approx(1.0) for o in model.openings)
    # walls without body geometry: the facade runs from the wall's start to the last window
    (facade,) = model.facades
    assert facade.length_m == pytest.approx(2.0 + 0.9)


def test_window_on_a_rotated_face_and_true_north(tmp_path: Path) -> None:
    # A 12 x 8 m plan with its north-east corner cut off by a wall from (12, 6) to (10, 8):
    # that wall's outward normal is (1, 1)/sqrt(2), 45° clockwise from the model's +y axis.
    # The model's +y axis points 30° clockwise from true north, so that face has bearing
    # 30 + 45 = 75° (east by the eight-point compass, 75/45 = 1.67 -> 2) and the y = 0 face
    # 30 + 180 = 210° (south-west, 210/45 = 4.67 -> 5).
    b = IfcModelBuilder(unit="mm", true_north_deg=30.0)
    storey = b.storey("Ground", 0.0)
    south = b.wall(storey, (0.0, 0.0), (12.0, 0.0))
    b.window(storey, south, along_m=1.0, sill_m=0.9, name="S")
    corner = b.wall(storey, (12.0, 6.0), (10.0, 8.0))
    b.window(storey, corner, along_m=0.8, sill_m=0.6, width_m=1.0, name="NE")
    west = b.wall(storey, (0.0, 8.0), (0.0, 0.0))
    b.window(storey, west, along_m=3.0, sill_m=0.9, name="W")
    model = read_model(b.write(tmp_path / "rotated.ifc"))
    by_name = {o.name: o for o in model.openings}
    facades = {f.id: f for f in model.facades}
    assert by_name["NE"].facade == "east"
    assert facades["east"].bearing_deg == pytest.approx(75.0, abs=0.01)
    assert by_name["S"].facade == "south-west"
    assert facades["south-west"].bearing_deg == pytest.approx(210.0, abs=0.01)
    # the west face's normal is -x, 270° from +y: bearing 300°, north-west (300/45 = 6.67 -> 7)
    assert by_name["W"].facade == "north-west"
    assert by_name["NE"].perch_height_m == pytest.approx(0.6)
    assert by_name["NE"].width_m == pytest.approx(1.0)
    assert by_name["NE"].x_m == pytest.approx(0.8, abs=1e-6)  # from the wall's start corner


def test_no_true_north_names_faces_by_angle(tmp_path: Path) -> None:
    b = IfcModelBuilder(unit="m", true_north_deg=None)
    box_tower(b, (0.0, 3.0), windows_per_face=1, faces=("south", "east", "north", "west"))
    model = read_model(b.write(tmp_path / "nonorth.ifc"))
    # outward normals -y, +x, +y, -x are 180°, 90°, 0° and 270° clockwise from the +y axis
    assert sorted(f.id for f in model.facades) == ["face-000", "face-090", "face-180", "face-270"]
    assert all(f.bearing_deg is None for f in model.facades)
    assert any("no true north" in a for a in model.assumptions)


def test_window_with_no_storey(tmp_path: Path) -> None:
    b = IfcModelBuilder(unit="mm", true_north_deg=0.0)
    ground = b.storey("Ground", 0.0)
    first = b.storey("First", 4.5)
    wall = b.wall(first, (0.0, 0.0), (10.0, 0.0))
    # in no storey, but its wall is on the first floor
    b.window(None, wall, along_m=1.0, sill_m=0.9, name="by-wall", storey_z_m=4.5)
    # in no storey, on a wall in no storey: placed by its height (bottom at 4.5 + 1.1 m)
    loose = b.wall(None, (0.0, 8.0), (0.0, 0.0))
    b.window(None, loose, along_m=2.0, sill_m=1.1, name="by-height", storey_z_m=4.5)
    # and one below the lowest storey: left out, with the reason
    b.window(None, loose, along_m=5.0, sill_m=-2.0, name="too-low", storey_z_m=0.0)
    b.window(ground, b.wall(ground, (10.0, 0.0), (10.0, 8.0)), along_m=1.0, sill_m=0.9,
             name="normal")
    model = read_model(b.write(tmp_path / "nostorey.ifc"))
    by_name = {o.name: o for o in model.openings}
    assert by_name["by-wall"].level == 1
    assert by_name["by-wall"].perch_height_m == pytest.approx(0.9)
    assert any("no storey" in a for a in by_name["by-wall"].assumptions)
    assert by_name["by-height"].level == 1
    assert by_name["by-height"].perch_height_m == pytest.approx(1.1)
    assert any("by its height" in a for a in by_name["by-height"].assumptions)
    assert "too-low" not in by_name
    assert any("too-low" in s and "below the lowest" in s for s in model.skipped)


@pytest.mark.parametrize(
    ("operation", "kind", "noted"),
    [
        ("TILTANDTURNLEFTHAND", OpeningKind.WINDOW_TILT_TURN, False),
        ("SLIDINGHORIZONTAL", OpeningKind.WINDOW_SLIDING, False),
        ("SLIDINGVERTICAL", OpeningKind.WINDOW_HUNG, False),
        ("TOPHUNG", OpeningKind.WINDOW_TOP_HUNG, False),
        ("SIDEHUNGRIGHTHAND", OpeningKind.WINDOW_CASEMENT, False),
        ("FIXEDCASEMENT", OpeningKind.FIXED, False),
        ("BOTTOMHUNG", OpeningKind.WINDOW_TILT_TURN, True),
        ("OTHEROPERATION", OpeningKind.WINDOW_CASEMENT, True),
        (None, OpeningKind.WINDOW_CASEMENT, True),
    ],
)
@pytest.mark.parametrize("schema", ["IFC4", "IFC2X3"])
def test_kind_from_the_window_type(tmp_path: Path, schema: str, operation: str | None,
                                   kind: OpeningKind, noted: bool) -> None:
    # operation names: IfcWindowPanelOperationEnum (ISO 16739)
    b = IfcModelBuilder(schema=schema, unit="mm")
    storey = b.storey("Ground", 0.0)
    b.window(storey, b.wall(storey, (0.0, 0.0), (6.0, 0.0)), along_m=1.0, sill_m=0.9,
             operation=operation, name="W1")
    (opening,) = read_model(b.write(tmp_path / "kind.ifc")).openings
    assert opening.kind is kind
    # (a one-wall model also notes which side is outside; only the kind matters here)
    kind_notes = [a for a in opening.assumptions if "outside" not in a]
    assert bool(kind_notes) is noted
    if operation is None:
        assert "casement" in kind_notes[0] and "does not say" in kind_notes[0]


def test_width_from_geometry_when_overall_width_is_missing(tmp_path: Path) -> None:
    b = IfcModelBuilder(unit="mm")
    storey = b.storey("Ground", 0.0)
    b.window(storey, b.wall(storey, (0.0, 0.0), (6.0, 0.0)), along_m=2.0, sill_m=0.8,
             width_m=None, geometry_width_m=1.35, name="W1")
    (opening,) = read_model(b.write(tmp_path / "geom.ifc")).openings
    assert opening.width_m == pytest.approx(1.35, abs=1e-6)
    assert opening.perch_height_m == pytest.approx(0.8, abs=1e-6)
    assert any("geometry" in a for a in opening.assumptions)


def _balcony_model(tmp_path: Path, **slab: object) -> Path:
    b = IfcModelBuilder(unit="mm", true_north_deg=0.0)
    for k, z in enumerate((0.0, 3.0)):
        storey = b.storey(f"Level {k}", z)
        wall = b.wall(storey, (0.0, 0.0), (12.0, 0.0))
        b.window(storey, wall, along_m=1.0, sill_m=0.9, name=f"W{k}")
        b.wall(storey, (12.0, 8.0), (0.0, 8.0))
        b.window(storey, b.wall(storey, (12.0, 8.0), (0.0, 8.0)), along_m=1.0, sill_m=0.9,
                 name=f"N{k}")
        if k == 1:
            b.door(storey, wall, along_m=8.0, width_m=0.9, name="D1")
            # 4 m wide (x 7..11), standing 1.5 m out from the south wall (y -1.5..0)
            b.slab(storey, [(7.0, -1.5), (11.0, -1.5), (11.0, 0.0), (7.0, 0.0)], **slab)
    return b.write(tmp_path / "balcony.ifc")


@pytest.mark.parametrize(
    "slab",
    [
        {"predefined_type": "USERDEFINED", "object_type": "BALCONY", "name": "B1"},
        {"properties": {"IsBalcony": True}, "name": "B1"},
        {"name": "B1 balcony slab"},
    ],
)
def test_balcony_slab_with_its_door(tmp_path: Path, slab: dict[str, object]) -> None:
    model = read_model(_balcony_model(tmp_path, **slab))
    balconies = [o for o in model.openings if o.kind is OpeningKind.BALCONY]
    assert len(balconies) == 1
    (b,) = balconies
    assert b.level == 1 and b.facade == "south"
    assert b.projection_m == pytest.approx(1.5, abs=0.01)
    assert b.width_m == pytest.approx(4.0, abs=0.01)
    assert b.x_m == pytest.approx(7.0, abs=0.01)  # the south wall starts at x = 0
    assert b.perch_height_m == pytest.approx(1.1)  # assumed, and said so
    assert any("rail height" in a for a in b.assumptions)
    assert any("door 'D1'" in a for a in b.assumptions)


def test_a_plain_floor_slab_is_no_balcony(tmp_path: Path) -> None:
    model = read_model(_balcony_model(tmp_path, predefined_type="FLOOR", name="Floor slab"))
    assert not [o for o in model.openings if o.kind is OpeningKind.BALCONY]
    assert any("door" in s and "no balcony" in s for s in model.skipped)


def test_every_assumption_is_in_the_notes(tmp_path: Path) -> None:
    model = read_model(_balcony_model(tmp_path, object_type="BALCONY",
                                      predefined_type="USERDEFINED"))
    building, _ = new_building(model)
    notes = {o.id: o.notes for o in building.openings}
    for o in model.openings:
        assert o.assumptions
        for assumption in o.assumptions:
            assert assumption in notes[o.id]
        assert SURVEY_PREFIX in notes[o.id]
        assert o.global_id in notes[o.id]


def test_created_file_says_what_is_missing_and_check_lists_it(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    into = tmp_path / "new.json"
    assert main(["import", str(_acceptance_model(tmp_path)), "--into", str(into)]) == 0
    out = capsys.readouterr().out
    assert "created" in out and "not ready to assess" in out
    doc = json.loads(into.read_text(encoding="utf-8"))
    assert doc["surfaces"] == []  # no surface invented
    assert "what lies below each facade" in doc["building"]["notes"]
    # the loader refuses it, each missing surface located at its facade
    with pytest.raises(ValidationFailed) as caught:
        load_building(into)
    wheres = sorted(p.where for p in caught.value.problems)
    assert wheres == ["facades[0]", "facades[1]"]
    assert caught.value.building is not None  # whole, so the app can open it to complete
    assert main(["check", str(into)]) == 2
    err = capsys.readouterr().err
    assert "facades[0]: nothing lies below" in err
    assert "30 warnings" in err and "warning: openings[0]" in err


def test_check_warns_until_surveyed(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    building, _ = new_building(read_model(_acceptance_model(tmp_path)))
    ground = Surface("ground", SurfaceKind.CONCRETE, 0.0, label="Paving")
    building = dataclasses.replace(building, surfaces=(ground,))
    assert validate_building(building) == []
    warnings = survey_warnings(building)
    assert len(warnings) == 30 and all(w.is_warning for w in warnings)
    surveyed = dataclasses.replace(
        building.openings[0], notes=building.openings[0].notes.split(SURVEY_PREFIX)[0])
    building = dataclasses.replace(building, openings=(surveyed, *building.openings[1:]))
    path = tmp_path / "b.json"
    save_building(building, path)
    assert main(["check", str(path)]) == 0
    out = capsys.readouterr().out
    assert "valid" in out and "29 warnings" in out
    assert "openings[0]:" not in out and "openings[1]:" in out


def test_merge_updates_geometry_and_keeps_the_survey(tmp_path: Path) -> None:
    building, _ = new_building(read_model(_acceptance_model(tmp_path)))
    ground = Surface("ground", SurfaceKind.LAWN, 0.0, label="Lawn")
    first = dataclasses.replace(building.openings[0], cats_present=CatsPresent.YES,
                                notes=building.openings[0].notes + "\nTenant has two cats.")
    building = dataclasses.replace(building, surfaces=(ground,),
                                   openings=(first, *building.openings[1:]))
    # the model again, with the sills raised to 1.0 m
    b = IfcModelBuilder(unit="mm", true_north_deg=0.0)
    box_tower(b, ELEVATIONS_M, windows_per_face=3, sill_m=1.0)
    model = read_model(b.write(tmp_path / "v2.ifc"))
    preview = preview_model(model, building)
    assert not preview.problems
    assert len(preview.updates) == 30 and not preview.floors
    merged = apply_model(building, model, preview)
    assert len(merged.openings) == 30
    assert all(o.perch_height_m == pytest.approx(1.0) for o in merged.openings)
    kept = merged.opening(first.id)
    assert kept.cats_present is CatsPresent.YES
    assert "Tenant has two cats." in kept.notes
    assert kept.notes.count("From the building model") == 1
    assert "v2.ifc" in kept.notes and "tower-IFC4-mm.ifc" not in kept.notes
    assert kept.notes.count(SURVEY_PREFIX) == 1
    assert merged.surfaces == (ground,)
    # a surveyed opening (survey line deleted) does not get the line back on a new import
    surveyed = dataclasses.replace(
        merged.openings[1], notes=merged.openings[1].notes.split(SURVEY_PREFIX)[0].strip())
    merged = dataclasses.replace(merged, openings=(merged.openings[0], surveyed,
                                                   *merged.openings[2:]))
    again = apply_model(merged, model, preview_model(model, merged))
    assert SURVEY_PREFIX not in again.opening(surveyed.id).notes
    assert SURVEY_PREFIX in again.opening(first.id).notes


def test_merge_onto_existing_facade_names(tmp_path: Path,
                                          capsys: pytest.CaptureFixture[str]) -> None:
    building, _ = new_building(read_model(_acceptance_model(tmp_path)))
    building = dataclasses.replace(
        building,
        facades=tuple(dataclasses.replace(f, id={"south": "street", "north": "yard"}[f.id],
                                          length_m=20.0) for f in building.facades),
        openings=(),
        surfaces=(Surface("ground", SurfaceKind.CONCRETE, 0.0),),
    )
    into = tmp_path / "b.json"
    save_building(building, into)
    model = _acceptance_model(tmp_path)
    args = ["import", str(model), "--into", str(into), "--facade", "south=street",
            "--facade", "north=yard"]
    assert main(args) == 0
    merged = load_building(into)
    assert {o.facade for o in merged.openings} == {"street", "yard"}
    assert len(merged.facades) == 2
    assert main(["import", str(model), "--into", str(into), "--facade", "east=x"]) == 2
    assert "no facade 'east'" in capsys.readouterr().err


@pytest.mark.parametrize(
    "content",
    [
        b"hello, this is not a model",
        b'{"format": "petfall-audit-building", "version": 1}',
        b"ISO-10303-21;\nHEADER;\nFILE_DESCRIPTION(('x'),'2;1');\nthis is broken",
        b"ISO-10303-21;\nHEADER;\nFILE_SCHEMA(('IFC4'));\nENDSEC;\nDATA;\n#1=IFCWALL(garbage\n"
        b"ENDSEC;\nEND-ISO-10303-21;\n",
        b"",
        b"PK\x03\x04zipped",
    ],
)
def test_corrupt_or_foreign_file_is_refused_and_nothing_written(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], content: bytes
) -> None:
    bad = tmp_path / "model.ifc"
    bad.write_bytes(content)
    with pytest.raises(ModelImportError):
        read_model(bad)
    into = tmp_path / "out.json"
    assert main(["import", str(bad), "--into", str(into)]) == 2
    assert not into.exists()
    err = capsys.readouterr().err
    assert "model.ifc" in err and "Traceback" not in err


def test_truncated_model_is_refused(tmp_path: Path) -> None:
    good = _acceptance_model(tmp_path).read_bytes()
    bad = tmp_path / "cut.ifc"
    bad.write_bytes(good[: len(good) // 2])
    into = tmp_path / "out.json"
    assert main(["import", str(bad), "--into", str(into)]) == 2
    assert not into.exists()


def test_without_ifcopenshell_the_command_says_how_to_install(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], monkeypatch: pytest.MonkeyPatch
) -> None:
    model = _acceptance_model(tmp_path)
    for name in [m for m in sys.modules if m == "ifcopenshell" or m.startswith("ifcopenshell.")]:
        monkeypatch.delitem(sys.modules, name)
    monkeypatch.setitem(sys.modules, "ifcopenshell", None)  # import fails
    into = tmp_path / "out.json"
    assert main(["import", str(model), "--into", str(into)]) == 2
    assert 'pip install "petfall_audit[bim]"' in capsys.readouterr().err
    assert not into.exists()


def test_a_problem_row_is_refused_unless_valid_rows_are_accepted(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    # a window whose bottom is 0.5 m below its storey: a negative sill is refused
    b = IfcModelBuilder(unit="mm")
    storey = b.storey("Ground", 0.0)
    upper = b.storey("First", 3.0)
    wall = b.wall(upper, (0.0, 0.0), (10.0, 0.0))
    b.window(upper, wall, along_m=1.0, sill_m=-0.5, name="sunken")
    b.window(upper, wall, along_m=4.0, sill_m=0.9, name="fine")
    b.window(storey, b.wall(storey, (0.0, 8.0), (0.0, 0.0)), along_m=1.0, sill_m=0.9, name="g")
    model = b.write(tmp_path / "bad-sill.ifc")
    into = tmp_path / "out.json"
    assert main(["import", str(model), "--into", str(into)]) == 2
    assert "rail or sill height" in capsys.readouterr().err
    assert not into.exists()
    assert main(["import", str(model), "--into", str(into), "--accept-valid"]) == 0
    doc = json.loads(into.read_text(encoding="utf-8"))
    assert sorted(o["id"] for o in doc["openings"]) == ["fine", "g"]


def test_unit_conversion_matches_between_millimetres_and_metres(tmp_path: Path) -> None:
    a = read_model(_acceptance_model(tmp_path, unit="mm"))
    b = read_model(_acceptance_model(tmp_path, unit="m"))
    key = [(o.name, o.level, o.facade) for o in a.openings]
    assert key == [(o.name, o.level, o.facade) for o in b.openings]
    for x, y in zip(a.openings, b.openings, strict=True):
        assert math.isclose(x.x_m, y.x_m, abs_tol=1e-6)
        assert math.isclose(x.perch_height_m, y.perch_height_m, abs_tol=1e-6)


def test_ground_given_at_the_import_makes_a_file_that_loads(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    into = tmp_path / "new.json"
    model = _acceptance_model(tmp_path)
    assert main(["import", str(model), "--into", str(into), "--ground", "lawn"]) == 0
    building = load_building(into)
    (ground,) = building.surfaces
    assert ground.kind is SurfaceKind.LAWN and ground.facade is None
    assert ground.to_facade_m is None and "given at the import" in ground.label
    # --ground only when creating; --facade only when merging; neither for a schedule
    assert main(["import", str(model), "--into", str(into), "--ground", "lawn"]) == 2
    assert main(["import", str(model), "--into", str(tmp_path / "other.json"),
                 "--facade", "north=street"]) == 2
    assert not (tmp_path / "other.json").exists()
    schedule = tmp_path / "s.csv"
    schedule.write_text("Opening ID,Floor,Facade,Type,Width (m)\n", encoding="utf-8")
    assert main(["import", str(schedule), "--into", str(into), "--ground", "lawn"]) == 2
    capsys.readouterr()
