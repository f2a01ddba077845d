"""The building file: parsing, located problems, versions, atomic saves, the JSON Schema."""

from __future__ import annotations

import copy
import dataclasses
import json
import os
import stat
import tempfile
from pathlib import Path
from typing import Any

import jsonschema
import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from petfall_audit._resources import resource_path
from petfall_audit.demo import make_large_tower
from petfall_audit.errors import FileFormatError, Problem, ValidationFailed
from petfall_audit.io import atomic, migrations
from petfall_audit.io._schema import SCHEMA_FILENAME, building_json_schema, dumps_schema
from petfall_audit.io.building_file import (
    CURRENT_VERSION,
    FORMAT,
    building_to_dict,
    dumps_building,
    load_building,
    parse_building,
    save_building,
    validate_building,
)
from petfall_audit.model import (
    CAT_PRESETS,
    Building,
    CatsPresent,
    Fixed,
    LogNormal,
    Normal,
    OpeningKind,
    Screen,
    SurfaceKind,
    Uniform,
)
from tests.strategies import FIXTURE, base_documents, mutated_documents, random_documents

# --- test data and shorthands ------------------------------------------------------------


def minimal_doc() -> dict[str, Any]:
    """A small valid document that leaves every optional field out."""
    return {
        "format": FORMAT,
        "version": 1,
        "building": {"name": "Minimal"},
        "floors": [
            {"level": 0, "label": "G", "elevation_m": 0},
            {"level": 1, "label": "1", "elevation_m": 3.2},
            {"level": 2, "label": "2", "elevation_m": 6.4},
        ],
        "facades": [{"id": "north", "length_m": 20}],
        "surfaces": [{"id": "ground", "kind": "lawn", "elevation_m": 0}],
        "openings": [
            {
                "id": "a",
                "floor": 1,
                "facade": "north",
                "kind": "balcony",
                "x_m": 1,
                "width_m": 3,
                "projection_m": 1.5,
            },
            {
                "id": "b",
                "floor": 2,
                "facade": "north",
                "kind": "window_casement",
                "x_m": 6,
                "width_m": 1.2,
            },
        ],
    }


def problems_of(doc: object) -> list[Problem]:
    with pytest.raises(ValidationFailed) as info:
        parse_building(doc)
    return info.value.problems


def as_text(problems: list[Problem]) -> list[str]:
    return [str(p) for p in problems]


# --- parsing valid documents -----------------------------------------------------------------


def test_minimal_document_takes_the_model_defaults() -> None:
    b = parse_building(minimal_doc())
    a = b.opening("a")
    assert a.kind is OpeningKind.BALCONY and a.projection_m == 1.5
    assert a.perch_height_m == 1.1 and a.screen is Screen.NONE
    assert a.cats_present is CatsPresent.UNKNOWN and a.photos == ()
    assert b.surfaces[0].facade is None and b.surfaces[0].to_facade_m is None
    assert b.info.air_temperature_c == 15.0
    assert b.cat_profile == CAT_PRESETS["adult"]
    assert validate_building(b) == []


def test_fixture_of_version_1_keeps_loading() -> None:
    # The committed fixture of file version 1 must load, with these values, for good.
    b = load_building(FIXTURE)
    assert b.info.site_altitude_m == 1000.0 and b.info.audit_date == "2026-03-01"
    assert [f.level for f in b.floors] == [-1, 0, 1, 2]
    assert b.surfaces[0].kind is SurfaceKind.ROOF and b.surfaces[0].to_facade_m == 1.8
    assert b.surfaces[2].facade is None
    f2 = b.opening("F2")
    assert f2.netting_mesh_mm == 30.0 and f2.photos == ("photos/f2-front.jpg", "photos/f2-rail.jpg")
    assert b.opening("B1").escape_window and b.opening("B1").limiter_gap_mm == 100.0
    p = b.cat_profile
    assert p.preset == "kitten"
    assert p.mass_kg == LogNormal(2.0, 0.4)
    assert p.cda_tense_m2 == Normal(0.07, 0.01)
    assert p.cda_spread_m2 == CAT_PRESETS["kitten"].cda_spread_m2  # left out: from the preset
    assert p.righting_time_s == Uniform(0.3, 0.45)
    assert p.launch_speed_mps == Fixed(1.5)
    assert p.relax_probability == 1.0


@pytest.mark.parametrize("name", sorted(CAT_PRESETS))
def test_cat_profile_as_preset_name(name: str) -> None:
    doc = minimal_doc() | {"cat_profile": name}
    assert parse_building(doc).cat_profile == CAT_PRESETS[name]


def test_cat_profile_without_preset_key_starts_from_adult() -> None:
    doc = minimal_doc() | {"cat_profile": {"mass_kg": 5}}
    p = parse_building(doc).cat_profile
    assert p.preset == "adult" and p.mass_kg == Fixed(5.0)
    assert p.cda_tense_m2 == CAT_PRESETS["adult"].cda_tense_m2


def test_fixed_parameters_make_a_deterministic_profile() -> None:
    params = {"mass_kg": 4.1, "cda_tense_m2": 0.114, "cda_spread_m2": 0.227,
              "relax_probability": 0, "relax_fraction": 0.75, "righting_time_s": 0.3,
              "launch_speed_mps": 0}  # fmt: skip
    p = parse_building(minimal_doc() | {"cat_profile": {"preset": None, **params}}).cat_profile
    assert p.is_deterministic and p.preset is None
    # Written back as explicit parameters, the preset name kept.
    assert building_to_dict(parse_building(minimal_doc()))["cat_profile"] == {
        "preset": "adult",
        "mass_kg": {"lognormal": {"mean": 4.1, "sd": 1.1}},
        "cda_tense_m2": {"mean": 0.114, "sd": 0.012},
        "cda_spread_m2": {"mean": 0.227, "sd": 0.023},
        "relax_probability": 0.7,
        "relax_fraction": {"min": 0.65, "max": 0.85},
        "righting_time_s": {"min": 0.25, "max": 0.4},
        "launch_speed_mps": {"min": 0.0, "max": 2.5},
    }


def test_parse_does_not_change_the_callers_document() -> None:
    doc = minimal_doc()
    before = copy.deepcopy(doc)
    parse_building(doc)
    assert doc == before


# --- located problems ------------------------------------------------------------------------


def _set(doc: dict[str, Any], path: str, value: Any) -> dict[str, Any]:
    node: Any = doc
    parts = path.replace("[", ".").replace("]", "").split(".")
    for part in parts[:-1]:
        node = node[int(part)] if part.isdigit() else node[part]
    last = parts[-1]
    node[int(last) if last.isdigit() else last] = value
    return doc


@pytest.mark.parametrize(
    ("path", "value", "expected"),
    [
        ("openings[1].floor", 40, "openings[1].floor: level 40 does not exist"),
        (
            "building.site_altitude_m",
            "abc",
            "building.site_altitude_m: expected a number, got 'abc'",
        ),
        ("building.colour", "red", "building.colour: unknown field 'colour'"),
        (
            "openings[0].widht_m",
            3,
            "openings[0].widht_m: unknown field 'widht_m' (did you mean 'width_m'?)",
        ),
        ("floors[1].level", 1.5, "floors[1].level: expected a whole number, got 1.5"),
        (
            "openings[0].climbable_infill",
            1,
            "openings[0].climbable_infill: expected true or false, got 1",
        ),
        ("openings[0].kind", "balkony", "openings[0].kind: expected 'balcony', 'terrace'"),
        (
            "openings[0].screen",
            "cat",
            "openings[0].screen: expected 'none', 'insect' or 'pet_resistant', got 'cat'",
        ),
        ("openings[0].width_m", 0, "openings[0].width_m: must be greater than 0 m, got 0"),
        (
            "openings[0].perch_height_m",
            3.5,
            "openings[0].perch_height_m: must be at most 3 m, got 3.5",
        ),
        (
            "openings[0].largest_gap_mm",
            -5,
            "openings[0].largest_gap_mm: must be at least 0 mm, got -5",
        ),
        ("openings[0].netting_mesh_mm", 800, "openings[0].netting_mesh_mm: must be at most 500 mm"),
        ("floors[2].elevation_m", 5000, "floors[2].elevation_m: must be at most 1000 m"),
        ("building.site_altitude_m", 9500, "building.site_altitude_m: must be at most 9000 m"),
        ("building.air_temperature_c", -80, "building.air_temperature_c: must be at least -60 °C"),
        (
            "building.audit_date",
            "30/06/2026",
            "building.audit_date: expected a date written YYYY-MM-DD",
        ),
        ("building.audit_date", "2026-02-30", "building.audit_date: no such date: '2026-02-30'"),
        (
            "openings[0].facade",
            "nroth",
            "openings[0].facade: facade 'nroth' does not exist (did you mean 'north'?)",
        ),
        ("surfaces[0].facade", "south", "surfaces[0].facade: facade 'south' does not exist"),
        (
            "surfaces[0].to_facade_m",
            0,
            "surfaces[0].to_facade_m: the outer edge must lie further out than the inner edge",
        ),
        (
            "openings[1].x_m",
            19.5,
            "openings[1].x_m: the opening runs to 20.7 m along facade 'north'",
        ),
        (
            "openings[1].projection_m",
            0.5,
            "openings[1].projection_m: a casement window sits in the wall",
        ),
        ("openings[0].escape_window", True, "openings[0].escape_window: only an opening window"),
        ("openings[1].photos", ["/home/x.jpg"], "openings[1].photos[0]: expected a path relative"),
        (
            "openings[1].id",
            "a",
            "openings[1].id: opening id 'a' is used more than once (also openings[0])",
        ),
        (
            "facades",
            [{"id": "north", "length_m": 20}, {"id": "north", "length_m": 5}],
            "facades[1].id: facade id 'north' is used more than once (also facades[0])",
        ),
        ("floors[2].level", 0, "floors[2].level: level 0 is used more than once (also floors[0])"),
        (
            "floors[2].elevation_m",
            3.0,
            "floors[2].elevation_m: level 2 at 3 m is not above level 1 at 3.2 m",
        ),
        (
            "floors",
            [
                {"level": 1, "label": "1", "elevation_m": 3.2},
                {"level": 0, "label": "G", "elevation_m": 0},
            ],
            "floors[1].level: floors must be listed from the lowest level up",
        ),
        (
            "surfaces[0].elevation_m",
            4.0,
            "surfaces[0].elevation_m: at 4 m this surface is above the openings it would catch: "
            "openings[0]",
        ),
        (
            "surfaces[0].from_facade_m",
            2.0,
            "facades[0]: nothing lies below opening 'a' on facade 'north' from 0 to 2 m out",
        ),
        ("openings[0].floor", "1", "openings[0].floor: expected a whole number, got '1'"),
        ("openings[0].x_m", float("nan"), "openings[0].x_m: expected a finite number, got NaN"),
        ("openings", {"a": 1}, "openings: expected a list […], got an object"),
        ("building", [], "building: expected an object {…}, got a list"),
        (
            "cat_profile",
            "tiger",
            "cat_profile: expected 'adult', 'kitten' or 'heavy_adult', got 'tiger'",
        ),
        (
            "cat_profile",
            3,
            "cat_profile: expected a preset name (adult, kitten, heavy_adult) or an object",
        ),
        (
            "cat_profile",
            {"mass_kg": "heavy"},
            "cat_profile.mass_kg: expected a number or a distribution",
        ),
        (
            "cat_profile",
            {"mass_kg": {"mean": 4, "sd": -1}},
            "cat_profile.mass_kg.sd: must be at least 0 kg, got -1",
        ),
        (
            "cat_profile",
            {"mass_kg": {"min": 5, "max": 3}},
            "cat_profile.mass_kg.max: must not be below min (5), got 3",
        ),
        (
            "cat_profile",
            {"mass_kg": {"lognormal": {"mean": 0, "sd": 1}}},
            "cat_profile.mass_kg.lognormal.mean: must be greater than 0 kg",
        ),
        (
            "cat_profile",
            {"mass_kg": 45},
            "cat_profile.mass_kg: must be at most 30 kg, got 45 kg (far heavier than any cat)",
        ),
        ("cat_profile", {"relax_fraction": 1.0}, "cat_profile.relax_fraction: must be less than 1"),
        (
            "cat_profile",
            {"relax_probability": 1.5},
            "cat_profile.relax_probability: must be at most 1, got 1.5",
        ),
        (
            "cat_profile",
            {"cda_spread_m2": 0.05},
            "cat_profile.cda_spread_m2: the spread-out posture (0.05 m²) must not meet less air",
        ),
        (
            "cat_profile",
            {"launch_speed_mps": -1},
            "cat_profile.launch_speed_mps: must be at least 0 m/s, got -1 m/s",
        ),
        (
            "cat_profile",
            {"mass_kg": True},
            "cat_profile.mass_kg: expected a number or a distribution",
        ),
        ("cat_profile", {"colour": "ginger"}, "cat_profile.colour: unknown field 'colour'"),
        (  # lighter than a newborn kitten (about 100 g; common practice, no source)
            "cat_profile",
            {"mass_kg": 0.001},
            "cat_profile.mass_kg: must be at least 0.1 kg, got 0.001 kg",
        ),
        (
            "cat_profile",
            {"mass_kg": {"lognormal": {"mean": 4.1, "sd": 1e6}}},
            "cat_profile.mass_kg.lognormal.sd: must be at most 30 kg",
        ),
    ],
)
def test_each_problem_is_located_in_plain_words(path: str, value: Any, expected: str) -> None:
    texts = as_text(problems_of(_set(minimal_doc(), path, value)))
    assert any(t.startswith(expected) for t in texts), texts


def test_missing_required_fields_are_named() -> None:
    doc = minimal_doc()
    del doc["openings"][0]["kind"]
    del doc["building"]["name"]
    assert as_text(problems_of(doc)) == [
        "building.name: required field is missing",
        "openings[0].kind: required field is missing",
    ]


def test_every_problem_is_reported_at_once_in_file_order() -> None:
    doc = minimal_doc()
    doc["building"]["site_altitude_m"] = "high"
    doc["floors"][1]["elevation_m"] = -1.0  # out of order
    doc["openings"][0]["floor"] = 40  # unknown level (a valid item otherwise)
    doc["openings"][1]["kind"] = "door"  # a shape problem: this item is left out of the checks
    doc["cat_profile"] = {"mass_kg": -2, "launch_speed_mps": "fast"}
    problems = problems_of(doc)
    assert [p.where for p in problems] == [
        "building.site_altitude_m",
        "floors[1].elevation_m",
        "openings[0].floor",
        "openings[1].kind",
        "cat_profile.mass_kg",
        "cat_profile.launch_speed_mps",
    ]


def test_checks_that_would_guess_are_skipped_when_a_section_has_a_broken_item() -> None:
    doc = minimal_doc()
    doc["floors"][1]["label"] = 7  # floor 1 is left out...
    problems = problems_of(doc)
    # ...so opening "a" on level 1 is not reported as being on a missing floor.
    assert as_text(problems) == ["floors[1].label: expected text, got 7"]


def test_duplicate_keys_in_the_json_are_reported(tmp_path: Path) -> None:
    text = json.dumps(minimal_doc(), indent=1).replace(
        '"name": "Minimal"', '"name": "Minimal", "name": "Other"'
    )
    path = tmp_path / "dup.json"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(ValidationFailed) as info:
        load_building(path)
    assert as_text(info.value.problems) == [
        "building.name: field 'name' is given more than once; give each field once"
    ]


# --- whole-document problems -----------------------------------------------------------------


@pytest.mark.parametrize(
    ("doc", "expected"),
    [
        ([], "not a building file: expected a JSON object at the top, got a list"),
        ({"version": 1}, 'not a building file: "format" is missing'),
        (
            {"format": "cad-drawing", "version": 1},
            "not a building file: \"format\" is 'cad-drawing'",
        ),
        ({"format": FORMAT}, 'the building file has no "version"'),
        ({"format": FORMAT, "version": "1"}, "\"version\" must be a whole number, got '1'"),
        ({"format": FORMAT, "version": True}, '"version" must be a whole number, got true'),
        ({"format": FORMAT, "version": 0}, "unknown building file version 0"),
        (
            {"format": FORMAT, "version": 7},
            "this building file was written by a newer version (7) of petfall-audit; "
            "this version reads up to 2",
        ),
    ],
)
def test_not_a_building_file_or_a_newer_version(doc: object, expected: str) -> None:
    with pytest.raises(FileFormatError) as info:
        parse_building(doc)
    assert str(info.value).startswith(expected)


def test_bad_json_is_placed_at_its_line_and_column(tmp_path: Path) -> None:
    path = tmp_path / "broken.json"
    path.write_text(
        '{\n  "format": "petfall-audit-building",\n  "version": 1\n  "building": {}\n}\n'
    )
    with pytest.raises(ValidationFailed) as info:
        load_building(path)
    assert as_text(info.value.problems) == [
        "line 4, column 3: not valid JSON: expected a comma between items"
    ]


@pytest.mark.parametrize(
    ("content", "expected"),
    [
        pytest.param(b"", "not a building file: the file is empty", id="empty"),
        pytest.param(b"  \n", "not a building file: the file is empty", id="blank"),
        pytest.param(b'{"name": "\xff"}', "not a building file: not UTF-8 text", id="latin-1"),
        pytest.param(
            b"[" * 100_000, "not a building file: the JSON is nested too deeply", id="deep"
        ),
    ],
)
def test_unreadable_content(tmp_path: Path, content: bytes, expected: str) -> None:
    path = tmp_path / "b.json"
    path.write_bytes(content)
    with pytest.raises(FileFormatError) as info:
        load_building(path)
    assert str(info.value).startswith(expected)


def test_a_missing_file_is_a_file_format_error(tmp_path: Path) -> None:
    with pytest.raises(FileFormatError, match="cannot read the file"):
        load_building(tmp_path / "nowhere.json")


def test_a_byte_order_mark_is_accepted(tmp_path: Path) -> None:
    path = tmp_path / "bom.json"
    path.write_bytes(b"\xef\xbb\xbf" + json.dumps(minimal_doc()).encode())
    assert load_building(path).info.name == "Minimal"


@pytest.mark.parametrize("bom, encoding", [
    (b"\xff\xfe", "utf-16-le"), (b"\xfe\xff", "utf-16-be"),
    (b"\xff\xfe\x00\x00", "utf-32-le"), (b"\x00\x00\xfe\xff", "utf-32-be"),
])
def test_a_file_saved_as_utf16_or_utf32_with_its_mark_loads(tmp_path: Path, bom: bytes,
                                                             encoding: str) -> None:
    # Windows Notepad's "Unicode" is UTF-16 with a byte-order mark (codecs.BOM_UTF16_LE)
    doc = minimal_doc()
    doc["building"]["name"] = "Kestrel Yard ☂ 🐈"  # BMP and non-BMP characters
    path = tmp_path / "wide.json"
    path.write_bytes(bom + json.dumps(doc, ensure_ascii=False).encode(encoding))
    assert load_building(path).info.name == "Kestrel Yard ☂ 🐈"
    # without the mark nothing is guessed: the bytes are read as UTF-8 and refused
    path.write_bytes(json.dumps(doc).encode(encoding))
    with pytest.raises((FileFormatError, ValidationFailed)):
        load_building(path)
    # a lone surrogate in UTF-16 is refused in words, never loaded
    path.write_bytes(b"\xff\xfe" + '{"a": "'.encode("utf-16-le") + b"\x00\xd8"
                     + '"}'.encode("utf-16-le"))
    with pytest.raises(FileFormatError, match="not UTF-16 text"):
        load_building(path)


# --- versions and migrations -----------------------------------------------------------------


def test_an_older_version_is_migrated_in_order(monkeypatch: pytest.MonkeyPatch) -> None:
    calls: list[int] = []

    def from_minus_1(doc: dict[str, Any]) -> dict[str, Any]:  # fake: "site" became "building"
        calls.append(-1)
        doc["building"] = doc.pop("site")
        return doc

    def from_0(doc: dict[str, Any]) -> dict[str, Any]:  # fake: "height_m" became "elevation_m"
        calls.append(doc["version"])
        for floor in doc["floors"]:
            floor["elevation_m"] = floor.pop("height_m")
        return doc

    monkeypatch.setattr(migrations, "MIGRATIONS",
                        {-1: from_minus_1, 0: from_0, 1: migrations.MIGRATIONS[1]})
    old = minimal_doc()
    old["version"] = -1
    old["site"] = old.pop("building")
    for floor in old["floors"]:
        floor["height_m"] = floor.pop("elevation_m")
    before = copy.deepcopy(old)
    assert parse_building(old) == parse_building(minimal_doc())
    assert calls == [-1, 0]  # in order; the second step saw version 0
    assert old == before  # the caller's document is untouched


def test_a_failing_migration_is_a_file_format_error(monkeypatch: pytest.MonkeyPatch) -> None:
    def broken(doc: dict[str, Any]) -> dict[str, Any]:
        raise KeyError("site")

    monkeypatch.setattr(migrations, "MIGRATIONS", {0: broken})
    with pytest.raises(
        FileFormatError, match="cannot convert the building file from version 0 to 1"
    ):
        parse_building(minimal_doc() | {"version": 0})


def test_current_version_is_two_and_written() -> None:
    assert CURRENT_VERSION == 2
    d = building_to_dict(parse_building(minimal_doc()))
    assert (d["format"], d["version"]) == (FORMAT, 2)


# --- writing ---------------------------------------------------------------------------------


def test_dumps_is_stable_and_writes_every_field() -> None:
    b = parse_building(minimal_doc())
    text = dumps_building(b)
    assert text.endswith("}\n") and text == dumps_building(parse_building(json.loads(text)))
    opening = json.loads(text)["openings"][1]
    assert list(opening) == [f.name for f in dataclasses.fields(b.openings[1])]
    assert opening["netting_mesh_mm"] is None and opening["photos"] == []


def test_save_and_load_round_trip(tmp_path: Path) -> None:
    b = load_building(FIXTURE)
    path = tmp_path / "out.json"
    save_building(b, path)
    assert load_building(path) == b


def test_dumps_refuses_non_finite_numbers() -> None:
    b = parse_building(minimal_doc())
    bad = dataclasses.replace(b, info=dataclasses.replace(b.info, site_altitude_m=float("nan")))
    with pytest.raises(ValueError):
        dumps_building(bad)


def test_atomic_write_replaces_and_keeps_permissions(tmp_path: Path) -> None:
    path = tmp_path / "b.json"
    path.write_text("old")
    os.chmod(path, 0o640)
    atomic.atomic_write_text(path, "new ✓")
    assert path.read_text(encoding="utf-8") == "new ✓"
    assert stat.S_IMODE(path.stat().st_mode) == 0o640
    assert sorted(p.name for p in tmp_path.iterdir()) == ["b.json"]


@pytest.mark.parametrize("failing", ["fsync", "replace"])
def test_a_failed_save_leaves_the_old_file_and_no_temporary(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch, failing: str
) -> None:
    path = tmp_path / "b.json"
    save_building(parse_building(minimal_doc()), path)
    before = path.read_bytes()

    def disk_full(*args: object) -> None:
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(atomic.os, failing, disk_full)
    with pytest.raises(OSError, match="No space left"):
        save_building(load_building(FIXTURE), path)
    monkeypatch.undo()
    assert path.read_bytes() == before
    assert sorted(p.name for p in tmp_path.iterdir()) == ["b.json"]


# --- checks on a model (the GUI calls validate_building after edits) --------------------------


def test_validate_building_on_edited_models() -> None:
    b = parse_building(minimal_doc())
    a, w = b.openings
    edited = dataclasses.replace(
        b,
        openings=(
            dataclasses.replace(a, floor=40, x_m=float("inf")),
            dataclasses.replace(
                w, kind=OpeningKind.FIXED, escape_window=True, photos=("C:/x.jpg",)
            ),
        ),
        cat_profile=dataclasses.replace(
            b.cat_profile, relax_fraction=Uniform(0.5, 1.2), preset="lion"
        ),
    )
    assert as_text(validate_building(edited)) == [
        "openings[0].floor: level 40 does not exist",
        "openings[0].x_m: expected a finite number, got infinity",
        "openings[1].escape_window: only an opening window can be an emergency escape window, "
        "not fixed glazing",
        "openings[1].photos[0]: expected a path relative to the building file, got 'C:/x.jpg'",
        "cat_profile.preset: unknown preset 'lion' (known: adult, kitten, heavy_adult)",
        "cat_profile.relax_fraction.max: must be less than 1, got 1.2 (a fraction of the terminal "
        "speed)",
    ]


def test_large_tower_is_valid_deterministic_and_sized() -> None:
    b = make_large_tower()
    assert len(b.floors) == 60 and len(b.openings) == 1200
    assert validate_building(b) == []
    assert make_large_tower() == b
    small = make_large_tower(floors=3, openings_per_floor=7)
    assert len(small.openings) == 21 and validate_building(small) == []
    with pytest.raises(ValueError, match="floors"):
        make_large_tower(floors=0)
    assert parse_building(json.loads(dumps_building(small))) == small


# --- JSON Schema -----------------------------------------------------------------------------


def test_committed_schema_is_the_generated_one() -> None:
    committed = resource_path(SCHEMA_FILENAME).read_text(encoding="utf-8")
    assert committed == dumps_schema(), "run: python -m petfall_audit.io._schema"


def test_schema_is_valid_and_checks_the_fixture() -> None:
    schema = building_json_schema()
    jsonschema.Draft202012Validator.check_schema(schema)
    validator = jsonschema.Draft202012Validator(schema)
    validator.validate(building_to_dict(load_building(FIXTURE)))  # the fixture, migrated
    bad = minimal_doc() | {"version": 2}
    bad["openings"][0]["colour"] = "red"
    bad["cat_profile"] = {"mass_kg": {"mean": 4, "max": 5}}
    assert len(list(validator.iter_errors(bad))) == 2


# --- property-based: never another exception ------------------------------------------------

_BASES = base_documents()


def _assert_outcome(doc: object) -> None:
    try:
        b = parse_building(doc)
    except ValidationFailed as exc:
        assert exc.problems
        for p in exc.problems:
            assert p.where and p.message, p
    except FileFormatError as exc:
        assert str(exc)
    else:
        assert isinstance(b, Building)
        assert validate_building(b) == []
        assert parse_building(json.loads(dumps_building(b))) == b


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(mutated_documents(_BASES))
def test_mutated_documents_give_a_model_or_located_problems(doc: object) -> None:
    _assert_outcome(doc)


@settings(max_examples=150, deadline=None)
@given(random_documents())
def test_random_documents_give_a_model_or_located_problems(doc: object) -> None:
    _assert_outcome(doc)


@settings(max_examples=60, deadline=None)
@given(st.binary(max_size=200) | st.text(max_size=200).map(str.encode))
def test_random_bytes_never_crash_the_loader(content: bytes) -> None:
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "b.json"
        path.write_bytes(content)
        try:
            load_building(path)
        except ValidationFailed as exc:
            assert all(p.where and p.message for p in exc.problems)
        except FileFormatError as exc:
            assert str(exc)


def test_the_file_words_are_the_model_words() -> None:
    from typing import get_args

    from petfall_audit.io import _schema
    from petfall_audit.model import CatsPresent, OpenFrequency, SurfaceKind

    pairs = [
        (_schema.OpeningKindName, OpeningKind),
        (_schema.SurfaceKindName, SurfaceKind),
        (_schema.ScreenName, Screen),
        (_schema.OpenFrequencyName, OpenFrequency),
        (_schema.CatsPresentName, CatsPresent),
    ]
    for literal, enum in pairs:
        assert get_args(literal) == tuple(member.value for member in enum)
    assert get_args(_schema.PresetName) == tuple(CAT_PRESETS)


def test_the_example_in_the_documentation_loads() -> None:
    docs = Path(__file__).resolve().parents[2] / "docs" / "building-file.md"
    text = docs.read_text(encoding="utf-8")
    example = text.split("## Example", 1)[1].split("```json", 1)[1].split("```", 1)[0]
    b = parse_building(json.loads(example))
    assert b.opening("F1").escape_window and validate_building(b) == []


def test_version_1_fixture_is_migrated_and_falls_as_version_1_computed() -> None:
    # Reference: the falls of the committed version-1 fixture as the version-1 code computed them
    # (tests/fixtures/building_v1_falls.json, written before the format moved to version 2).
    # The file uses no field of version 2, so every drop and landing element must be the same.
    from petfall_audit.physics import simulate_falls
    from petfall_audit.sampling import sample_cat_profile

    raw = json.loads(FIXTURE.read_text(encoding="utf-8"))
    assert raw["version"] == 1
    b = load_building(FIXTURE)
    assert building_to_dict(b)["version"] == 2
    assert all(s.x_from_m is None and s.x_to_m is None for s in b.surfaces)
    ref = json.loads((FIXTURE.parent / "building_v1_falls.json").read_text(encoding="utf-8"))
    cat = sample_cat_profile(b.cat_profile, ref["samples"], seed=ref["seed"])
    falls = simulate_falls(b, cat)
    for k, oid in enumerate(falls.opening_ids):
        want = ref["openings"][oid]
        got_drops = sorted({round(float(x), 9) for x in falls.drop_m[k]})
        assert got_drops == pytest.approx(want["drops_m"], abs=1e-9), oid
        ids, counts = np.unique(np.asarray(falls.landing_ids)[falls.landing[k]],
                                return_counts=True)
        assert dict(zip(ids.tolist(), counts.tolist(), strict=True)) == want["landing"], oid


# --- version 2: surfaces along part of a facade, the injury section ------------------------


def _v2_doc() -> dict[str, Any]:
    doc = minimal_doc() | {"version": 2}
    doc["facades"] = [{"id": "north", "length_m": 40}]
    doc["floors"] = [{"level": k, "label": str(k), "elevation_m": 3.0 * k} for k in range(6)]
    doc["surfaces"] = [
        {"id": "podium", "kind": "roof", "elevation_m": 7.0, "facade": "north",
         "to_facade_m": 12.0, "x_from_m": 0.0, "x_to_m": 10.0},
        {"id": "street", "kind": "concrete", "elevation_m": 0.0, "facade": "north"},
    ]
    doc["openings"] = [
        {"id": "over", "floor": 4, "facade": "north", "kind": "window_casement", "x_m": 3,
         "width_m": 1.2},
        {"id": "beside_low", "floor": 1, "facade": "north", "kind": "window_casement",
         "x_m": 30, "width_m": 1.2},
    ]
    return doc


def test_a_partial_podium_loads_beside_a_lower_window() -> None:
    # the window beside the podium is lower than its roof: only openings over its extent count
    b = parse_building(_v2_doc())
    podium = b.surfaces[0]
    assert (podium.x_from_m, podium.x_to_m) == (0.0, 10.0)
    assert building_to_dict(b)["surfaces"][0]["x_to_m"] == 10.0
    assert parse_building(json.loads(dumps_building(b))) == b


def test_partial_surface_problems_are_located() -> None:
    doc = _v2_doc()
    doc["openings"][1]["x_m"] = 8.0  # now over the podium's extent and below its roof
    with pytest.raises(ValidationFailed) as info:
        parse_building(doc)
    assert any(p.where == "surfaces[0].elevation_m" and "beside_low" in p.message
               for p in info.value.problems)
    doc = _v2_doc()
    doc["surfaces"][1]["x_from_m"] = 20.0  # the street no longer lies under 10-20 m ...
    doc["surfaces"].append({"id": "yard", "kind": "concrete", "elevation_m": 0.0,
                            "facade": "north", "x_to_m": 10.0})  # ... only under 0-10 m
    doc["openings"].append({"id": "gap", "floor": 2, "facade": "north",
                            "kind": "window_casement", "x_m": 14, "width_m": 1.0})
    with pytest.raises(ValidationFailed) as info:
        parse_building(doc)
    msgs = [str(p) for p in info.value.problems]
    assert any("nothing lies below opening 'gap'" in m and "from 10 m to 20 m" in m
               for m in msgs), msgs
    doc = _v2_doc()
    doc["surfaces"][0]["x_to_m"] = 0.0
    doc["surfaces"].append({"id": "all", "kind": "lawn", "elevation_m": 0.0, "x_from_m": 1.0})
    with pytest.raises(ValidationFailed) as info:
        parse_building(doc)
    where = {p.where for p in info.value.problems}
    assert {"surfaces[0].x_to_m", "surfaces[2].x_from_m"} <= where


def test_injury_section_round_trips_and_is_checked() -> None:
    doc = _v2_doc()
    doc["injury"] = {"moderate_g": 20.0, "serious_g": 50.0, "life_threatening_g": 150.0,
                     "spread": 0.5}
    b = parse_building(doc)
    assert (b.injury.serious_g, b.injury.spread) == (50.0, 0.5)
    assert building_to_dict(b)["injury"] == doc["injury"]
    doc["injury"] = {"moderate_g": 60.0, "serious_g": 50.0}
    with pytest.raises(ValidationFailed) as info:
        parse_building(doc)
    assert any(p.where.startswith("injury") and "must rise" in p.message
               for p in info.value.problems)


def test_hand_saved_catalogue_and_leaflet_text_with_a_byte_order_mark_load(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # Notepad's "UTF-8 with BOM": the catalogue read "Unexpected UTF-8 BOM", the leaflet's
    # text "text before the first section"
    from petfall_audit._resources import resource_path, sample_path
    from petfall_audit.cli import main
    from petfall_audit.fixes import load_catalogue

    shipped = resource_path("controls.json").read_bytes()
    bom_cat = tmp_path / "controls.json"
    bom_cat.write_bytes(b"\xef\xbb\xbf" + shipped)
    assert load_catalogue(bom_cat) == load_catalogue(None)
    text_file = tmp_path / "leaflet.txt"
    assert main(["leaflet-text", str(sample_path("walkup")), "-o", str(text_file)]) == 0
    text = text_file.read_text(encoding="utf-8")
    for name, data in (("bom8.txt", b"\xef\xbb\xbf" + text.encode("utf-8")),
                       ("wide.txt", text.encode("utf-16"))):
        (tmp_path / name).write_bytes(data)
        assert main(["report", str(sample_path("walkup")), "-o", str(tmp_path / "a.pdf"),
                     "--leaflet", str(tmp_path / "l.pdf"), "--leaflet-text",
                     str(tmp_path / name), "--samples", "64"]) == 0, capsys.readouterr().err
