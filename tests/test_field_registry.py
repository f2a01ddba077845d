"""The one field registry: the editor, the undo labels and the building file's JSON Schema agree
with it field by field."""

from __future__ import annotations

import json

import pytest

from petfall_audit._resources import resource_path
from petfall_audit.editing.commands import (
    AddFacade,
    AddSurface,
    SetBuildingInfo,
    SetFacade,
    SetFloor,
    SetOpeningFields,
    SetSurface,
)
from petfall_audit.editing.fields import (
    FACADE_FIELDS,
    FLOOR_FIELDS,
    INFO_FIELDS,
    INJURY_FIELDS,
    OPENING_FIELDS,
    SURFACE_FIELDS,
    max_chars,
)
from petfall_audit.field_registry import FIELDS, field_def, field_words
from petfall_audit.model import Facade, Surface, SurfaceKind

_MODEL_OF = {
    "openings": "OpeningModel", "floors": "FloorModel", "facades": "FacadeModel",
    "surfaces": "SurfaceModel", "info": "BuildingModel", "injury": "InjuryModel",
}
_SCHEMA = json.loads(resource_path("building.schema.json").read_text(encoding="utf-8"))


def _shipped(section: str, name: str) -> dict:
    prop = _SCHEMA["$defs"][_MODEL_OF[section]]["properties"][name]
    # an optional number is {"anyOf": [{limits...}, {"type": "null"}]}
    for branch in prop.get("anyOf", ()):
        if branch.get("type") != "null":
            return {**branch, "description": prop.get("description")}
    return prop


@pytest.mark.parametrize("field", [f for f in FIELDS if f.name != "photos"],
                         ids=lambda f: f"{f.section}.{f.name}")
def test_the_shipped_schema_agrees_with_the_registry_field_by_field(field) -> None:
    prop = _shipped(field.section, field.name)
    assert prop.get("description") == field.description
    if field.minimum is not None:
        key = "exclusiveMinimum" if field.exclusive_minimum else "minimum"
        assert prop[key] == field.minimum
    else:
        assert "minimum" not in prop and "exclusiveMinimum" not in prop
    assert prop.get("maximum") == field.maximum
    assert prop.get("maxLength") == field.max_chars
    if field.enum is not None:
        assert prop["enum"] == [m.value for m in field.enum]


def test_every_field_of_the_schema_sections_is_in_the_registry() -> None:
    for section, model in _MODEL_OF.items():
        names = set(_SCHEMA["$defs"][model]["properties"]) - {"plan"}
        assert names == {f.name for f in FIELDS if f.section == section}, section


def test_the_editor_fields_are_the_registry_fields() -> None:
    for section, specs in (("openings", OPENING_FIELDS), ("floors", FLOOR_FIELDS),
                           ("facades", FACADE_FIELDS), ("surfaces", SURFACE_FIELDS),
                           ("info", INFO_FIELDS), ("injury", INJURY_FIELDS)):
        for spec in specs:
            f = field_def(section, spec.name)
            assert (spec.label, spec.kind, spec.optional, spec.help, spec.enum) == (
                f.label, f.kind, f.optional, f.help, f.enum)
            if f.max_chars is not None:
                assert max_chars(spec) == f.max_chars


def test_undo_labels_read_as_words_without_field_names_or_units() -> None:
    # common practice, no source: an Edit menu names the change in the user's words
    assert SetOpeningFields(["S-05-2"], {"perch_height_m": 1.0}).label == (
        "Set rail or sill height of S-05-2")
    assert SetOpeningFields(["S-05-2"], {"width_m": 1.0, "projection_m": 0.0}).label == (
        "Set width and projection of S-05-2")
    assert AddSurface(Surface(id="surface", kind=SurfaceKind.LAWN, elevation_m=0.0)).label == (
        "Add surface")
    assert AddSurface(Surface(id="surface-3", kind=SurfaceKind.LAWN, elevation_m=0.0)).label == (
        "Add surface")
    assert AddSurface(Surface(id="P1", kind=SurfaceKind.LAWN, elevation_m=0.0)).label == (
        "Add surface P1")
    assert AddFacade(Facade(id="facade-2", length_m=10.0)).label == "Add facade"
    labels = [SetOpeningFields(["A"], {f.name: None}).label for f in FIELDS
              if f.section == "openings" and f.name not in ("id",)]
    labels += [SetFloor(1, {"elevation_m": 3.0}).label, SetFacade("N", {"length_m": 9.0}).label,
               SetSurface("P", {"x_from_m": 1.0}).label,
               SetBuildingInfo({"site_altitude_m": 3.0}).label]
    for label in labels:
        assert "_" not in label, label
        for unit in (" m ", " mm ", " c ", " g "):
            assert unit not in f" {label} ", label


def test_field_words_join_like_a_sentence() -> None:
    assert field_words("openings", ["width_m"]) == "width"
    assert field_words("openings", ["width_m", "notes", "netting_mesh_mm"]) == (
        "width, notes and netting mesh")


def test_the_schedule_columns_take_their_names_limits_and_words_from_the_registry() -> None:
    from petfall_audit.field_registry import SCHEDULE_COLUMNS
    from petfall_audit.io.schedule import COLUMNS, guess_mapping

    assert [c.field for c in COLUMNS] == [d.key for d in SCHEDULE_COLUMNS]
    for spec, d in zip(COLUMNS, SCHEDULE_COLUMNS, strict=True):
        if spec.kind in ("length", "gap"):
            assert (spec.min_value, spec.max_value, spec.positive) == (
                d.field.minimum, d.field.maximum, d.field.exclusive_minimum)
        assert spec.choices is d.field.enum
        # every registry alias of the field is recognised as a header for this column
        for alias in d.aliases:
            assert guess_mapping([alias]) == {alias: d.key}
        assert guess_mapping([d.header]) == {d.header: d.key}
    assert guess_mapping(["Rail or sill height (in)"]) == {
        "Rail or sill height (in)": "perch_height_m"}
    # a floor column is not taken for a bare "Name" header
    assert guess_mapping(["Name"]) == {}
